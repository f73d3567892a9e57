"""Catalogue: gap transit angle, beam coupling, beam loading, ballistic bunching."""

from __future__ import annotations

import numpy as np
from scipy import constants as sc

from ..physics import bunching, gap, loading
from .spec import NONNEGATIVE, POSITIVE, Check, Function, Param, between

REF_LIAO = ("S. Y. Liao, Microwave Devices and Circuits, 3rd ed., Prentice Hall, 1990, "
            "Ch. 9 (gridded-gap coupling, beam loading, two-cavity bunching).")
REF_BRANCH = ("G. M. Branch, Electron beam coupling in interaction gaps of cylindrical "
              "symmetry, IRE Trans. Electron Devices ED-8(3), 193-207, 1961.")
REF_WEBSTER = "D. L. Webster, Cathode-ray bunching, J. Appl. Phys. 10, 501-508, 1939."
REF_JACKSON = ("J. D. Jackson, Classical Electrodynamics, 3rd ed., Wiley, 1999, Sec. 11.5 "
               "(relativistic kinematics).")

CATEGORY = "Gap and bunching"

FREQUENCY = Param("frequency", "Signal frequency.", unit="Hz", domain=NONNEGATIVE)
VOLTAGE = Param("voltage", "Beam accelerating voltage (cathode to anode).", unit="V",
                domain=POSITIVE)
GAP_LENGTH = Param("gap_length", "Gap length along the beam.", unit="m", domain=NONNEGATIVE)


def _radii_given_together(beam_radius, tunnel_radius):
    """True where the radii are both omitted, or both given with beam <= tunnel."""
    if beam_radius is None and tunnel_radius is None:
        return np.True_
    if beam_radius is None or tunnel_radius is None:
        return np.False_
    with np.errstate(invalid="ignore"):
        return np.asarray(beam_radius, dtype=float) <= np.asarray(tunnel_radius, dtype=float)


def _below_cutoff(frequency, tunnel_radius):
    """True where the tunnel is omitted (gridded) or below its TM01 cutoff at the frequency."""
    if tunnel_radius is None:
        return np.True_
    with np.errstate(invalid="ignore"):
        return (2.0 * np.pi * np.asarray(frequency, dtype=float)
                * np.asarray(tunnel_radius, dtype=float) / sc.c < gap.P01)


def _cutoff_text(frequency, tunnel_radius):
    ka = 2.0 * np.pi * float(frequency) * float(tunnel_radius) / sc.c
    return (f"tunnel_radius {float(tunnel_radius):.4g} m propagates at {float(frequency):.6g} "
            f"Hz: 2 pi f a/c = {ka:.4g} must be < 2.405 (TM01 cutoff); the gridless gap model "
            "needs a cut-off tunnel")


RADII_CHECKS = (
    Check(("beam_radius", "tunnel_radius"), _radii_given_together,
          "beam_radius must be <= tunnel_radius (give both radii or neither)"),
    Check(("frequency", "tunnel_radius"), _below_cutoff, _cutoff_text),
)
BEAM_RADIUS_OPT = Param("beam_radius", "Radius of the solid round beam; omit with "
                        "tunnel_radius for a gridded gap without space charge.", unit="m",
                        default=None, domain=POSITIVE)
TUNNEL_RADIUS_OPT = Param("tunnel_radius", "Drift-tube radius at the gap; omit with "
                          "beam_radius for a gridded gap.", unit="m", default=None,
                          domain=POSITIVE)
LOADING_PARAMS = (
    FREQUENCY, GAP_LENGTH, VOLTAGE,
    Param("current", "DC beam current (> 0 with the radii).", unit="A", domain=NONNEGATIVE),
    BEAM_RADIUS_OPT, TUNNEL_RADIUS_OPT,
)
LOADING_NOTES = (
    "Without the radii: gridded gap, kinematic (no space charge). With both radii: "
    "gridless gap (flat field at the tunnel wall) with space charge, the two-wave form of "
    "the small-signal gain model: Y_B = kappa G0 (beta_e/(2 beta_q)) [H(beta_e - beta_q) - "
    "H(beta_e + beta_q)], H = M^2/2 - j S, S the Hilbert transform of M^2 over the wave "
    "number, kappa = 1/(gamma(gamma+1)), G0 = I0/V0. Use the radii for a gridless gap: the "
    "gridded value is about 3 times too small there. Positive susceptance is capacitive "
    "and lowers the resonance. Errors: tunnel above the TM01 cutoff, reduced plasma "
    "frequency >= frequency."
)
REF_BECK = ("A. H. W. Beck, Space-Charge Waves and Slow Electromagnetic Waves, Pergamon, "
            "1958 (electronic gap admittance; from memory).")
REF_CARYOTAKIS = ("G. Caryotakis, High power klystrons: theory and practice at the Stanford "
                  "Linear Accelerator Center, SLAC-PUB-10620, 2004, Ch. 3.")
REF_POZAR = ("D. M. Pozar, Microwave Engineering, 4th ed., Wiley, 2012, Ch. 6 (resonators; "
             "from memory).")
LOADING_CHECKS = RADII_CHECKS + (
    Check(("current", "beam_radius"),
          lambda i, b: np.True_ if b is None else np.asarray(i, dtype=float) > 0,
          "current must be > 0 for a gridless gap with space charge"),
    Check(("gap_length", "beam_radius"),
          lambda d, b: np.True_ if b is None else np.asarray(d, dtype=float) > 0,
          "gap_length must be > 0 for a gridless gap"),
)
INVALID_LOADING = ("outside the beam-loading model (reduced plasma frequency >= frequency, "
                   "or the fast space-charge wave faster than light)")

FUNCTIONS = [
    Function(
        name="TUBE_TRANSIT_ANGLE", func=gap.transit_angle,
        params=(
            FREQUENCY,
            Param("length", "Gap or drift length along the beam.", unit="m",
                  domain=NONNEGATIVE),
            VOLTAGE,
        ),
        result_unit="rad", result_units=("deg", "rad"),
        help="Transit angle omega*length/u0 of the beam across a gap or drift, with the "
             "relativistic beam velocity.",
        references=(REF_LIAO, REF_JACKSON), category=CATEGORY,
    ),
    Function(
        name="TUBE_GAP_COUPLING", func=gap.gap_coupling,
        params=(
            FREQUENCY, GAP_LENGTH, VOLTAGE,
            Param("beam_radius", "Radius of the solid round beam; omit with tunnel_radius "
                  "for a gridded gap.", unit="m", default=None, domain=NONNEGATIVE),
            Param("tunnel_radius", "Drift-tube radius at the gap; omit with beam_radius "
                  "for a gridded gap.", unit="m", default=None, domain=POSITIVE),
        ),
        checks=RADII_CHECKS,
        result_unit="",
        help="Beam-coupling coefficient M of a gap: gridded sin(x)/x, x = half the transit "
             "angle; with both radii, a gridless gap's RMS M over the beam (relativistic).",
        notes="Gridless gap: flat gap field at the tunnel wall; radial constant "
              "beta_e/gamma; M^2 = M_grid^2 [I0^2(g b) - I1^2(g b)]/I0^2(g a), the RMS "
              "over a uniform beam, which is what gain and beam loading use. Small "
              "signal, no space charge.",
        references=(REF_LIAO, REF_BRANCH), category=CATEGORY,
    ),
    Function(
        name="TUBE_BEAM_LOADING", func=loading.beam_loading, params=LOADING_PARAMS,
        result_unit="S", result_units=("uS", "mS", "S"),
        help="Beam-loading conductance G_B of a gap: gridded, kinematic without the radii; "
             "with both radii a gridless gap with space charge (two-wave form of the gain "
             "model). Q_B = 1/((R/Q) G_B), circuit R/Q.",
        references=(REF_LIAO, REF_CARYOTAKIS, REF_BRANCH, REF_JACKSON), category=CATEGORY,
        checks=LOADING_CHECKS, invalid_result=INVALID_LOADING, notes=LOADING_NOTES,
    ),
    Function(
        name="TUBE_BEAM_SUSCEPTANCE", func=loading.beam_susceptance, params=LOADING_PARAMS,
        result_unit="S", result_units=("uS", "mS", "S"),
        help="Beam-loading susceptance B_B of a gap (same models and arguments as "
             "TUBE_BEAM_LOADING); positive = capacitive, lowering the cavity's resonance.",
        references=(REF_BECK, REF_CARYOTAKIS, REF_BRANCH), category=CATEGORY,
        checks=LOADING_CHECKS, invalid_result=INVALID_LOADING, notes=LOADING_NOTES,
    ),
    Function(
        name="TUBE_BEAM_LOADED_FREQ", func=loading.beam_loaded_freq,
        params=(
            Param("cold_frequency", "Resonant frequency measured without beam (cold test).",
                  unit="Hz", domain=POSITIVE),
            Param("r_over_q", "R/Q of the cavity, in the given convention.", unit="ohm",
                  domain=POSITIVE),
            GAP_LENGTH, VOLTAGE,
            Param("current", "DC beam current (> 0 with the radii).", unit="A",
                  domain=NONNEGATIVE),
            BEAM_RADIUS_OPT, TUNNEL_RADIUS_OPT,
            Param("convention", "R/Q convention: \"circuit\" (default) or \"accelerator\" "
                  "(\"linac\" accepted).", kind="text",
                  choices=("circuit", "accelerator", "linac"), default="circuit"),
        ),
        checks=(
            Check(("beam_radius", "tunnel_radius"), _radii_given_together,
                  "beam_radius must be <= tunnel_radius (give both radii or neither)"),
            Check(("cold_frequency", "tunnel_radius"), _below_cutoff, _cutoff_text),
            LOADING_CHECKS[2], LOADING_CHECKS[3],
        ),
        result_unit="Hz", result_units=("GHz", "MHz"),
        help="Beam-loaded (hot) resonant frequency of a cavity from its cold-test frequency: "
             "the beam-loading susceptance B_B detunes it, f/fc - fc/f = -(R/Q) B_B(f).",
        references=(REF_POZAR, REF_BECK, REF_CARYOTAKIS), category=CATEGORY,
        invalid_result=INVALID_LOADING,
        notes="Parallel resonator of circuit R/Q with the beam admittance in parallel; "
              "B_B from TUBE_BEAM_SUSCEPTANCE at the loaded frequency (fixed-point "
              "iteration). " + LOADING_NOTES,
    ),
    Function(
        name="TUBE_BUNCHING_PARAM", func=bunching.bunching_param,
        params=(
            Param("gap_voltage", "Peak RF voltage across the modulating gap.", unit="V",
                  domain=NONNEGATIVE),
            FREQUENCY,
            Param("drift_length", "Drift length from the modulating gap.", unit="m",
                  domain=NONNEGATIVE),
            VOLTAGE,
            Param("coupling", "Beam-coupling coefficient M of the modulating gap "
                  "(default 1).", unit="", default=1.0, domain=between(-1.0, 1.0)),
        ),
        checks=(
            Check(("gap_voltage", "voltage", "coupling"),
                  lambda v1, v0, m: np.abs(m) * v1 < v0,
                  "coupling*gap_voltage must be < voltage (the gap would stop electrons)"),
        ),
        result_unit="",
        help="Ballistic bunching parameter X = M V1 theta0/(V0 gamma(gamma+1)) (Webster's "
             "M V1 theta0/(2 V0) at low voltage). No space charge; X > 1.84 is overbunched.",
        references=(REF_WEBSTER, REF_LIAO, REF_JACKSON), category=CATEGORY,
    ),
    Function(
        name="TUBE_HARMONIC_CURRENT", func=bunching.harmonic_current,
        params=(
            Param("current", "DC beam current.", unit="A", domain=NONNEGATIVE),
            Param("bunching_param", "Bunching parameter X.", unit="", domain=NONNEGATIVE),
            Param("harmonic", "Harmonic number, a whole number >= 1 (default 1).", unit="",
                  default=1, domain=between(1, np.inf, integer=True)),
        ),
        result_unit="A", result_units=("mA", "A"),
        help="Ballistic harmonic convection current 2 I0 |J_n(n X)| (peak). Fundamental "
             "maximum 1.164 I0 at X = 1.841. No space charge.",
        references=(REF_WEBSTER, REF_LIAO), category=CATEGORY,
    ),
]
