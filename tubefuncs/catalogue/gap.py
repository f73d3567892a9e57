"""Catalogue: gap transit angle, beam coupling, beam loading, ballistic bunching."""

from __future__ import annotations

import numpy as np

from ..physics import bunching, gap
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
        checks=(
            Check(("beam_radius", "tunnel_radius"), _radii_given_together,
                  "beam_radius must be <= tunnel_radius (give both radii or neither)"),
        ),
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
        name="TUBE_BEAM_LOADING", func=gap.beam_loading,
        params=(
            FREQUENCY, GAP_LENGTH, VOLTAGE,
            Param("current", "DC beam current.", unit="A", domain=NONNEGATIVE),
        ),
        result_unit="S", result_units=("uS", "mS", "S"),
        help="Electronic beam-loading conductance of a gridded gap, kinematic small-signal: "
             "G_B = (I0/V0)(M^2 - M cos(theta/2))/(gamma(gamma+1)). No space charge.",
        references=(REF_LIAO, REF_JACKSON), category=CATEGORY,
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
