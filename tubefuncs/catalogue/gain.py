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

#: Optional options of every gain function, last and in this order.
OPTIONS = (
    Param("convention", "R/Q column convention: \"circuit\" (V^2/(2 omega W), default) or "
          "\"accelerator\" (V^2/(omega W), as eigenmode solvers often report; \"linac\" "
          "accepted).", kind="text", choices=gain.CONVENTIONS, default="circuit"),
    Param("resonance", "What the frequency column holds: \"hot\" (beam-loaded, default) or "
          "\"cold\" (cold-test; the beam-loading susceptance is then applied).", kind="text",
          choices=gain.RESONANCES, default="hot"),
    Param("depression", "Beam kinematics from the cathode voltage (\"none\", default) or from "
          "the beam-averaged kinetic voltage after space-charge depression (\"mean\").",
          kind="text", choices=gain.DEPRESSIONS, default="none"),
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


def _limits_ok(*args):
    """Check test: the validity limits of the cavity table with its beam hold."""
    return gain.cavity_limits(*args).ok


def _limits_text(*args):
    """Check message: the first violated limits, naming the row or argument."""
    return gain.cavity_limits(*args).message or "cavities: outside the model's validity"


LIMIT_ARGS = ("frequency", "voltage", "current", "beam_radius", "tunnel_radius", "cavities",
              "convention", "resonance", "depression")

CHECKS = (
    Check(("cavities",), _no_problem("layout"), _problem_text("layout"), "#VALUE!"),
    Check(("cavities",), _no_problem("rows"), _problem_text("rows")),
    Check(("cavities",), _no_problem("empty"), _problem_text("empty")),
    Check(("cavities",), _no_problem("value"), _problem_text("value")),
    Check(("cavities",), _no_problem("order"), _problem_text("order")),
    Check(("cavities",), _no_problem("port"), _problem_text("port")),
    Check(("beam_radius", "tunnel_radius"), _beam_in_tunnel,
          "beam_radius must be <= tunnel_radius"),
    Check(LIMIT_ARGS, _limits_ok, _limits_text),
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
    "conductance (space-charge form). Options, optional and last in this order: convention "
    "of the R/Q column (circuit default, accelerator = twice circuit); resonance \"hot\" "
    "(default: the frequency column is beam-loaded) or \"cold\" (cold-test frequencies: "
    "the beam-loading susceptance of each gap is added, which moves each resonance to its "
    "beam-loaded value); depression \"mean\" to take the beam kinematics from the "
    "depressed kinetic voltage. Idle cavity: leave Qext empty (a very large Qext gives the "
    "same). Not for saturation: small signal only. "
    "Errors: cavities out of order; gaps that overlap (spacing below half the sum of the "
    "gap lengths plus one tunnel radius of fringing margin); a tunnel that propagates at "
    "the frequency (2 pi f a/c >= 2.405, above TM01 cutoff); a current above the "
    "space-charge limiting current; a cavity whose net conductance 1/Q0 + 1/Qext + "
    "(R/Q) G_B is <= 0 (the beam would make it oscillate); non-positive R/Q, Q0 or gap "
    "length; a wrong number of columns; beam_radius > tunnel_radius. "
    "Design rule, not checked: cavities are usually spaced below a quarter reduced "
    "plasma wavelength; beyond half of it the current from the previous gap has passed a "
    "null, which wastes drift length but is still inside the linear theory."
)

INVALID = ("outside the small-signal model (reduced plasma frequency >= frequency, or the "
           "fast space-charge wave faster than light)")

FUNCTIONS = [
    Function(
        name="TUBE_SMALL_SIGNAL_GAIN", func=gain.small_signal_gain, params=PARAMS + OPTIONS,
        result_unit="",
        help="Small-signal gain (dB) of a multi-cavity klystron: output power into the output "
             "cavity's load over the available power of a matched driver at the input port; "
             "space-charge-wave theory.",
        references=(REF_RAMO, REF_WESSEL_BERG, REF_CARYOTAKIS, REF_WEBSTER, REF_BRANCH_MIHRAN,
                    REF_POZAR),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID, notes=MODEL_NOTES,
    ),
    Function(
        name="TUBE_SMALL_SIGNAL_PHASE", func=gain.small_signal_phase, params=PARAMS + OPTIONS,
        result_unit="deg",
        help="Small-signal phase of the output-gap voltage relative to the drive, in degrees "
             "(-180 to 180], transit delay included; same model and arguments as "
             "TUBE_SMALL_SIGNAL_GAIN.",
        references=(REF_RAMO, REF_WESSEL_BERG, REF_CARYOTAKIS, REF_POZAR),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID,
        notes=MODEL_NOTES + " A unit right after cavities (its place before the options "
                            "existed) is still read as the unit.",
        result_units=("deg", "rad"), extra={"former_unit_slot": 6},
    ),
]


def _centre(cavities):
    table = np.asarray(cavities, dtype=float)
    return float(np.nanmean(table[:, gain.F0]))


def _table_fine(cavities):
    table = np.asarray(cavities, dtype=float)
    return table.ndim == 2 and table.shape[1] == gain.N_COLUMNS and not gain.table_problems(table)


def _limits_ok_at_centre(voltage, current, beam_radius, tunnel_radius, cavities, *options):
    """The validity limits at the mean cavity frequency."""
    if not _table_fine(cavities):
        return np.bool_(True)  # the table checks report it
    return gain.cavity_limits(_centre(cavities), voltage, current, beam_radius, tunnel_radius,
                              cavities, *options).ok


def _limits_text_at_centre(voltage, current, beam_radius, tunnel_radius, cavities, *options):
    return gain.cavity_limits(_centre(cavities), voltage, current, beam_radius, tunnel_radius,
                              cavities, *options).message or "cavities: outside the model"


BANDWIDTH_PARAMS = PARAMS[1:] + (
    Param("drop_db", "Drop below the peak gain that bounds the band (dB); 1 dB by default.",
          default=1.0, domain=POSITIVE),
) + OPTIONS
BANDWIDTH_CHECKS = tuple(c for c in CHECKS if "frequency" not in c.args) + (
    Check(LIMIT_ARGS[1:], _limits_ok_at_centre, _limits_text_at_centre),
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
              "deeper dip does not count. A unit right after drop_db (its place before the "
              "options existed) is still read as the unit. " + MODEL_NOTES,
        extra={"former_unit_slot": 6},
    )
)


PUSHING_NOTES = ("Central difference of the small-signal transfer at (1 +/- 1e-5) times the "
                 "argument, so the phase needs no unwrapping. Dominated by the transit delay "
                 "omega L/u0 of the whole tube. " + MODEL_NOTES)

FUNCTIONS += [
    Function(
        name="TUBE_PHASE_PER_VOLT", func=gain.phase_per_volt, params=PARAMS + OPTIONS,
        result_unit="rad/V", result_units=("deg/V", "deg/kV"),
        help="Phase pushing: change of the small-signal output phase per volt of beam voltage "
             "at constant current, from the gain model (for a modulator ripple budget).",
        references=(REF_CARYOTAKIS, REF_WEBSTER),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID, notes=PUSHING_NOTES,
    ),
    Function(
        name="TUBE_PHASE_PER_AMPERE", func=gain.phase_per_ampere, params=PARAMS + OPTIONS,
        result_unit="rad/A", result_units=("deg/A",),
        help="Phase pushing: change of the small-signal output phase per ampere of beam "
             "current at constant voltage, from the gain model.",
        references=(REF_CARYOTAKIS, REF_BRANCH_MIHRAN),
        category=CATEGORY, checks=CHECKS, invalid_result=INVALID, notes=PUSHING_NOTES,
    ),
]
