"""Catalogue: small-signal gain and phase of a multi-cavity klystron."""

from __future__ import annotations

import numpy as np

from ..physics import gain
from .spec import POSITIVE, Check, Function, Param

REF_RAMO = ("S. Ramo, Space charge and field waves in an electron beam, Phys. Rev. 56, "
            "276, 1939 (from memory).")
REF_WESSEL_BERG = ("T. Wessel-Berg, A general theory of klystrons with arbitrary, extended "
                   "interaction fields, Microwave Laboratory Report 376, Stanford University, "
                   "1957 (from memory).")
REF_CARYOTAKIS = ("G. Caryotakis, High power klystrons: theory and practice at the Stanford "
                  "Linear Accelerator Center, SLAC-PUB-10620, 2004, Ch. 3.")
REF_WEBSTER = ("D. L. Webster, Cathode-ray bunching, J. Appl. Phys. 10, 501, 1939 "
               "(from memory).")
REF_BRANCH_MIHRAN = ("G. M. Branch and T. G. Mihran, Plasma frequency reduction factors in "
                     "electron beams, IRE Trans. Electron Devices ED-2(2), 3-11, 1955 "
                     "(from memory).")
REF_POZAR = ("D. M. Pozar, Microwave Engineering, 4th ed., Wiley, 2012, Ch. 6 (resonators, "
             "external Q; from memory).")

CATEGORY = "Gain"

PARAMS = (
    Param("frequency", "Signal frequency; a range gives one result per frequency.", unit="Hz",
          domain=POSITIVE),
    Param("voltage", "Beam voltage (cathode to anode).", unit="V", domain=POSITIVE),
    Param("current", "DC beam current.", unit="A", domain=POSITIVE),
    Param("beam_radius", "Radius of the solid round beam, <= tunnel_radius.", unit="m",
          domain=POSITIVE),
    Param("tunnel_radius", "Radius of the drift tube (tunnel).", unit="m", domain=POSITIVE),
    Param("cavities", "Range, one row per cavity from input to output, 6 columns: position "
          "along the beam (m), resonant frequency (Hz), R/Q (ohm, circuit), Q0, Qext "
          "(empty = idle cavity), gap length (m).", kind="table"),
)


def _no_problem(*kinds):
    """Check test: the cavity table has no problem of these kinds."""
    def test(cavities):
        found = {kind for kind, _ in gain.table_problems(cavities)}
        return np.bool_(not found.intersection(kinds))
    return test


def _problem_text(*kinds):
    """Check message: the row-specific text of the first problems of these kinds."""
    def message(cavities):
        texts = [text for kind, text in gain.table_problems(cavities) if kind in kinds]
        return "; ".join(texts[:2]) if texts else f"cavities: problem of kind {kinds[0]}"
    return message


def _beam_in_tunnel(beam_radius, tunnel_radius):
    return np.asarray(beam_radius) <= np.asarray(tunnel_radius)


CHECKS = (
    Check(("cavities",), _no_problem("layout"), _problem_text("layout"), "#VALUE!"),
    Check(("cavities",), _no_problem("rows"), _problem_text("rows")),
    Check(("cavities",), _no_problem("empty"), _problem_text("empty")),
    Check(("cavities",), _no_problem("value"), _problem_text("value")),
    Check(("cavities",), _no_problem("order"), _problem_text("order")),
    Check(("cavities",), _no_problem("port"), _problem_text("port")),
    Check(("beam_radius", "tunnel_radius"), _beam_in_tunnel,
          "beam_radius must be <= tunnel_radius"),
    Check(("frequency", "voltage", "current", "beam_radius", "tunnel_radius", "cavities"),
          gain.cavity_spacing_ok,
          "cavities: each cavity must lie within half a reduced plasma wavelength "
          "(u0/(2 f_q)) of the previous one"),
)

MODEL_NOTES = (
    "Definitions: gain = P_out/P_avail in dB, P_out the power into the output cavity's "
    "external load, P_avail the available power of a matched driver at the input cavity's "
    "external port. Phase = phase of the output-gap voltage relative to the drive (the "
    "input-gap voltage the driver sets up at the input resonance without beam), in degrees, "
    "wrapped to (-180, 180], including the beam transit delay. "
    "Model: small-signal space-charge waves in a confined-flow beam; every upstream gap "
    "contributes to the current at each gap (fast and slow wave, each gap coupled by its "
    "gridless-gap coefficient from the beam and tunnel radii and its gap length); reduction "
    "factor at the signal frequency; relativistic velocity modulation 1/(gamma(gamma+1)) "
    "(1/2 non-relativistically). Each cavity is a parallel resonant circuit from R/Q "
    "(circuit convention V^2/(2 omega W)), Q0 and Qext, loaded by the beam-loading "
    "conductance (space-charge form); the beam-loading susceptance is not modelled, so give "
    "the beam-loaded (hot) resonant frequency. Idle cavity: leave Qext empty (a very large "
    "Qext gives the same). Not for saturation: small signal only. "
    "Errors: cavities out of order, a cavity beyond half a reduced plasma wavelength from "
    "the previous one, non-positive R/Q, Q0 or gap length, a wrong number of columns, "
    "beam_radius > tunnel_radius."
)

INVALID = ("outside the small-signal model (reduced plasma frequency >= frequency, or the "
           "fast space-charge wave faster than light)")

FUNCTIONS = [
    Function(
        name="TUBE_SMALL_SIGNAL_GAIN", func=gain.small_signal_gain, params=PARAMS,
        result_unit="",
        help="Small-signal gain (dB) of a multi-cavity klystron: output power into the output "
             "cavity's load over the available power of a matched driver at the input port; "
             "space-charge-wave theory.",
        references=(REF_RAMO, REF_WESSEL_BERG, REF_CARYOTAKIS, REF_WEBSTER, REF_BRANCH_MIHRAN,
                    REF_POZAR),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID, notes=MODEL_NOTES,
    ),
    Function(
        name="TUBE_SMALL_SIGNAL_PHASE", func=gain.small_signal_phase, params=PARAMS,
        result_unit="deg",
        help="Small-signal phase of the output-gap voltage relative to the drive, in degrees "
             "(-180 to 180], transit delay included; same model and arguments as "
             "TUBE_SMALL_SIGNAL_GAIN.",
        references=(REF_RAMO, REF_WESSEL_BERG, REF_CARYOTAKIS, REF_POZAR),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID, notes=MODEL_NOTES,
        result_units=("deg", "rad"),
    ),
]


def _spacing_ok_at_centre(voltage, current, beam_radius, tunnel_radius, cavities):
    """The plasma-wavelength spacing check at the mean cavity frequency."""
    table = np.asarray(cavities, dtype=float)
    if table.ndim != 2 or table.shape[1] != gain.N_COLUMNS or gain.table_problems(table):
        return np.bool_(True)  # the table checks report it
    centre = float(np.nanmean(table[:, gain.F0]))
    return gain.cavity_spacing_ok(centre, voltage, current, beam_radius, tunnel_radius, table)


BANDWIDTH_PARAMS = PARAMS[1:] + (
    Param("drop_db", "Drop below the peak gain that bounds the band (dB); 1 dB by default.",
          default=1.0, domain=POSITIVE),
)
BANDWIDTH_CHECKS = tuple(c for c in CHECKS if "frequency" not in c.args) + (
    Check(("voltage", "current", "beam_radius", "tunnel_radius", "cavities"),
          _spacing_ok_at_centre,
          "cavities: each cavity must lie within half a reduced plasma wavelength "
          "(u0/(2 f_q)) of the previous one"),
)

FUNCTIONS.append(
    Function(
        name="TUBE_SMALL_SIGNAL_BANDWIDTH", func=gain.small_signal_bandwidth,
        params=BANDWIDTH_PARAMS, result_unit="Hz", result_units=("MHz", "kHz", "GHz"),
        help="Width of the band around the small-signal gain peak in which the gain stays "
             "within drop_db (1 dB by default) of the peak; same model and cavity table as "
             "TUBE_SMALL_SIGNAL_GAIN.",
        references=(REF_CARYOTAKIS, REF_POZAR),
        category=CATEGORY, checks=BANDWIDTH_CHECKS,
        invalid_result="the band reaches the edge of the sweep (8 cavity bandwidths beyond "
                       "the outermost cavities) or the small-signal model does not apply",
        notes="The gain is swept over the cavity frequencies widened by eight times the "
              "widest cavity bandwidth f0/Q_L on each side (4001 points), and each band edge "
              "is refined on a finer sweep. A second lobe separated from the peak by a "
              "deeper dip does not count. " + MODEL_NOTES,
    )
)
