"""Catalogue: large-signal klystron model (output power, efficiency, saturation)."""

from __future__ import annotations

from ..physics.largesignal import results as ls
from . import gain as _gain_catalogue
from .spec import POSITIVE, Check, Function, Param

REF_TIEN = ("P. K. Tien, L. R. Walker and V. M. Wolontis, A large signal theory of "
            "traveling-wave amplifiers, Proc. IRE 43(3), 260-277, 1955 (charge disks; "
            "from memory).")
REF_WEBBER = ("S. E. Webber, Large signal analysis of the multicavity klystron, IRE Trans. "
              "Electron Devices ED-5(4), 1958 (from memory).")
REF_BRANCH = ("G. M. Branch, Electron beam coupling in interaction gaps of cylindrical "
              "symmetry, IRE Trans. Electron Devices ED-8(3), 193-207, 1961 (from memory).")

CATEGORY = "Large signal"

CAUTION = ("High voltage, RF power and X-rays: the beam supply and modulator store lethal "
           "energy, the output waveguide carries megawatts, and the collector emits X-rays "
           "up to the fastest spent electrons' energy. These figures are design estimates "
           "of an idealised model, not ratings: follow the tube maker's data, local codes "
           "and licensed practice.")

BEAM_PARAMS = _gain_catalogue.PARAMS
OPTIONS = _gain_catalogue.OPTIONS
DRIVE = Param("drive_power", "Available power of the matched drive generator at the input "
              "port; a range gives the transfer curve.", unit="W", domain=POSITIVE)
DRIVE_PARAMS = BEAM_PARAMS + (DRIVE,) + OPTIONS
SAT_PARAMS = BEAM_PARAMS + OPTIONS

# The checks of TUBE_SMALL_SIGNAL_GAIN, with the same options: the table, the radii and
# the validity limits (gain.cavity_limits: overlapping gaps, a tunnel above the TM01
# cutoff, a current above the limiting current, a negative net cavity conductance).
_TABLE_CHECKS = _gain_catalogue.CHECKS

DRIVE_CHECKS = _TABLE_CHECKS + (
    Check(tuple(p.name for p in DRIVE_PARAMS), ls.drive_ok, ls.drive_message),
)
SAT_CHECKS = _TABLE_CHECKS + (
    Check(tuple(p.name for p in SAT_PARAMS), ls.saturation_ok, ls.saturation_message),
)

NOTES = (
    "Model: relativistic one-dimensional disk model of the multi-cavity klystron in periodic "
    "steady state (48 charge disks per RF period, 16 space-charge harmonics), confined "
    "flow, distance as the independent variable; space charge from the Bessel-series "
    "Green's function of a solid "
    "beam in a round tunnel with the relativistic contraction and its periodic images, "
    "scaled to the exact plasma-frequency reduction factor; gridless gap fields whose "
    "coupling at any disk velocity is that of TUBE_GAP_COUPLING; each cavity voltage solved "
    "self-consistently with the current the bunches induce (V = Z (I_g - I)), cavity by "
    "cavity. Conventions and options of TUBE_SMALL_SIGNAL_GAIN (convention of the R/Q "
    "column, hot or cold resonant frequencies, depression; with hot frequencies the "
    "disks' small-signal beam-loading susceptance is taken out), drive = available power of "
    "a matched generator, output = power into the output cavity's external load; at low "
    "drive the gain is the small-signal gain. Errors name the cavity: electrons that stall "
    "or turn back, a gap voltage that does not converge, an energy balance missed by more "
    "than 1e-3 of the beam power; also a tunnel that passes its TM01 mode, a current above "
    "the limiting current, overlapping gaps. Not modelled: radial motion, velocity spread, "
    "beam interception, the penultimate cavity's second-harmonic tuning beyond the circuit "
    "model. Each call solves the tube (about 0.1 s per batch); a range of drives or "
    "frequencies is one batch."
)

INVALID = "outside the large-signal model"


def _drive_fn(name, func, unit, help_text, units=(), refs=(REF_TIEN, REF_WEBBER, REF_BRANCH)):
    return Function(
        name=name, func=func, params=DRIVE_PARAMS, result_unit=unit, help=help_text,
        references=refs, category=CATEGORY, caution=CAUTION, checks=DRIVE_CHECKS,
        invalid_result=INVALID, notes=NOTES, result_units=units,
        extra=_unit_after(BEAM_PARAMS + (DRIVE,), unit))


def _unit_after(leading, unit):
    """A unit written right after the leading arguments (the order design.md gives,
    before the options existed) is still read as the unit (see worksheet.py)."""
    return {"former_unit_slot": len(leading)} if unit else {}


def _sat_fn(name, func, unit, help_text, units=()):
    return Function(
        name=name, func=func, params=SAT_PARAMS, result_unit=unit, help=help_text,
        references=(REF_TIEN, REF_WEBBER, REF_BRANCH), category=CATEGORY, caution=CAUTION,
        checks=SAT_CHECKS, invalid_result=INVALID, extra=_unit_after(BEAM_PARAMS, unit),
        notes="Saturation = the first maximum of the output power as the drive rises; "
              "searched in batches (11 drives over 2.5 decades around the small-signal "
              "estimate, 7 between the neighbours of the peak, a parabola in log drive). "
              + NOTES,
        result_units=units)


FUNCTIONS = [
    _drive_fn("TUBE_OUTPUT_POWER", ls.output_power, "W",
              "RF output power of a multi-cavity klystron at the given drive power: large-"
              "signal relativistic disk model, same beam arguments and cavity table as "
              "TUBE_SMALL_SIGNAL_GAIN. Design estimate.", ("MW", "kW", "dBm", "dBW")),
    _drive_fn("TUBE_EFFICIENCY", ls.efficiency, "",
              "Overall efficiency of a multi-cavity klystron at the given drive: RF power to "
              "the load over beam power V0 I0 (large-signal disk model). Design estimate."),
    _drive_fn("TUBE_LARGE_SIGNAL_GAIN", ls.large_signal_gain, "",
              "Gain in dB, output power over drive power, at the given drive (large-signal "
              "disk model); the small-signal gain at low drive, compressed near saturation."),
    _drive_fn("TUBE_OUTPUT_PHASE", ls.output_phase, "deg",
              "Phase of the output-gap voltage relative to the drive at the given drive, "
              "degrees (-180, 180] (large-signal disk model); its change with drive is the "
              "AM/PM conversion.", ("deg", "rad")),
    _drive_fn("TUBE_OUTPUT_GAP_VOLTAGE", ls.output_gap_voltage, "V",
              "Peak RF voltage across the output gap at the given drive (large-signal disk "
              "model): what the output cavity and window must hold off.", ("kV", "MV")),
    _drive_fn("TUBE_SPENT_BEAM_MIN_ENERGY", ls.spent_beam_min_energy, "eV",
              "Kinetic energy of the slowest electrons leaving the output gap at the given "
              "drive (large-signal disk model); limits collector depression.",
              ("keV", "MeV")),
    _drive_fn("TUBE_SPENT_BEAM_MAX_ENERGY", ls.spent_beam_max_energy, "eV",
              "Kinetic energy of the fastest electrons leaving the output gap at the given "
              "drive (large-signal disk model): sets the collector's X-ray shielding.",
              ("keV", "MeV")),
    _sat_fn("TUBE_SATURATED_POWER", ls.saturated_power, "W",
            "Saturated RF output power of a multi-cavity klystron: the first maximum of the "
            "transfer curve (large-signal disk model, cavity table as TUBE_SMALL_SIGNAL_GAIN)."
            " Needs a small-signal gain of at least 3 dB. Design estimate.",
            ("MW", "kW", "dBm", "dBW")),
    _sat_fn("TUBE_SATURATION_DRIVE", ls.saturation_drive, "W",
            "Drive power (available from a matched generator) that saturates a multi-cavity "
            "klystron: the drive of the first maximum of the transfer curve.",
            ("W", "kW", "dBm", "dBW")),
    _sat_fn("TUBE_SATURATED_EFFICIENCY", ls.saturated_efficiency, "",
            "Efficiency at saturation of a multi-cavity klystron: saturated output power "
            "over beam power V0 I0 (large-signal disk model). Design estimate."),
]
