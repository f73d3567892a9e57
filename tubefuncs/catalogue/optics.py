"""Catalogue: beam optics and trade figures (space-charge limits, focusing, cathode)."""

from __future__ import annotations

import numpy as np

from ..physics import optics
from .spec import CAUTION_RF, NONNEGATIVE, POSITIVE, Check, Function, Param, between

REF_PIERCE = ("J. R. Pierce, Theory and Design of Electron Beams, 2nd ed., Van Nostrand, "
              "1954 (potential depression, maximum current in a drift tube; from memory).")
REF_BOGDANKEVICH = ("L. S. Bogdankevich and A. A. Rukhadze, Stability of relativistic "
                    "electron beams in a plasma and the problem of critical currents, Sov. "
                    "Phys. Usp. 14, 163, 1971 (from memory).")
REF_REISER = ("M. Reiser, Theory and Design of Charged Particle Beams, 2nd ed., Wiley-VCH, "
              "2008 (limiting current, Busch's theorem, confined flow; from memory).")
REF_GILMOUR = ("A. S. Gilmour, Principles of Traveling Wave Tubes, Artech House, 1994 "
               "(Brillouin and confined flow, area convergence; from memory).")
REF_BAIKOV = ("A. Yu. Baikov, C. Marrelli and I. Syratchev, Toward high-power klystrons with "
              "RF power conversion efficiency on the order of 90 %, IEEE Trans. Electron "
              "Devices 62(10), 2015 (from memory).")

CATEGORY = "Beam optics and trade figures"

CURRENT = Param("current", "DC beam current.", unit="A", domain=NONNEGATIVE)
VOLTAGE = Param("voltage", "Beam voltage (cathode to tunnel).", unit="V", domain=POSITIVE)
BEAM_RADIUS = Param("beam_radius", "Radius of the uniform solid round beam, <= tunnel_radius.",
                    unit="m", domain=POSITIVE)
TUNNEL_RADIUS = Param("tunnel_radius", "Radius of the drift tube (tunnel).", unit="m",
                      domain=POSITIVE)
RATIO = Param("ratio", "Focusing field over the Brillouin field, >= 1 (default 2).", unit="",
              default=2.0, domain=between(1.0, 1e6))

BEAM_IN_TUNNEL = Check(("beam_radius", "tunnel_radius"),
                       lambda b, a: np.asarray(b) <= np.asarray(a),
                       "beam_radius must be <= tunnel_radius")


def _below_limit(location):
    def test(current, voltage, beam_radius, tunnel_radius, *rest):
        loc = rest[0] if rest else location
        return np.isfinite(optics.depressed_voltage(current, voltage, beam_radius,
                                                    tunnel_radius, loc))
    return test


def _limit_text(current, voltage, beam_radius, tunnel_radius, *rest):
    il = float(optics.limiting_current(voltage, beam_radius, tunnel_radius))
    return (f"current {float(current):.4g} A must be below the space-charge limiting current "
            f"{il:.4g} A of the beam in its tunnel (no depressed solution)")


DEPRESSION_NOTES = (
    "Uniform solid beam in a grounded tunnel, confined flow, all electrons from the cathode "
    "at the beam voltage. Depression below the tunnel: I0 (1 - r^2/b^2 + 2 ln(a/b))/(4 pi "
    "eps0 u); self-consistent: u is the velocity at the depressed energy. Above the "
    "space-charge limiting current there is no solution (an error)."
)

FUNCTIONS = [
    Function(
        name="TUBE_LIMITING_CURRENT", func=optics.limiting_current,
        params=(VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS),
        checks=(BEAM_IN_TUNNEL,),
        result_unit="A", result_units=("A", "kA"),
        help="Space-charge limiting current of a solid beam in its tunnel (confined flow): "
             "17.045 kA (gamma^(2/3) - 1)^1.5/(1 + 2 ln(a/b)).",
        references=(REF_BOGDANKEVICH, REF_REISER, REF_PIERCE), category=CATEGORY,
        notes="Energy balance on the axis with the velocity of the depressed electrons; the "
              "current it allows is largest at gamma_k = gamma^(1/3). Non-relativistically "
              "the perveance 25.4 uperv/(1 + 2 ln(a/b)). Klystrons run far below it.",
    ),
    Function(
        name="TUBE_POTENTIAL_DEPRESSION", func=optics.potential_depression,
        params=(CURRENT, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS),
        checks=(BEAM_IN_TUNNEL,
                Check(("current", "voltage", "beam_radius", "tunnel_radius"),
                      _below_limit("axis"), _limit_text)),
        result_unit="V", result_units=("V", "kV"),
        help="Space-charge potential depression on the beam axis, I0 (1 + 2 ln(a/b))/(4 pi "
             "eps0 u), self-consistent; TUBE_DEPRESSED_VOLTAGE gives the kinetic voltage.",
        references=(REF_PIERCE, REF_REISER), category=CATEGORY, notes=DEPRESSION_NOTES,
    ),
    Function(
        name="TUBE_DEPRESSED_VOLTAGE", func=optics.depressed_voltage,
        params=(CURRENT, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS,
                Param("location", "\"mean\" (default): averaged over the beam; \"axis\": on "
                      "the axis.", kind="text", choices=("mean", "axis"), default="mean")),
        checks=(BEAM_IN_TUNNEL,
                Check(("current", "voltage", "beam_radius", "tunnel_radius", "location"),
                      _below_limit("mean"), _limit_text)),
        result_unit="V", result_units=("V", "kV"),
        help="Kinetic voltage of the beam after its space-charge depression (beam average by "
             "default, or on the axis); what the gain functions use with depression \"mean\".",
        references=(REF_PIERCE, REF_REISER), category=CATEGORY, notes=DEPRESSION_NOTES,
    ),
    Function(
        name="TUBE_CONFINED_FLOW_FIELD", func=optics.confined_flow_field,
        params=(CURRENT, VOLTAGE, BEAM_RADIUS, RATIO),
        result_unit="T", result_units=("T", "mT"),
        help="Axial focusing field of a confined-flow beam, ratio times the relativistic "
             "Brillouin field; TUBE_CATHODE_FLUX gives the cathode flux it needs.",
        references=(REF_GILMOUR, REF_REISER), category=CATEGORY,
        notes="Solenoid-focused klystrons commonly run at 1.5 to 3 times the Brillouin field "
              "(common practice). Equilibrium at the beam radius needs the cathode flux "
              "pi b^2 B_B sqrt(ratio^2 - 1).",
    ),
    Function(
        name="TUBE_CATHODE_FLUX", func=optics.cathode_flux,
        params=(CURRENT, VOLTAGE, BEAM_RADIUS, RATIO),
        result_unit="Wb", result_units=("Wb", "mWb", "uWb"),
        help="Magnetic flux through the cathode that holds the beam at its radius in a field "
             "ratio times the Brillouin field: pi b^2 B_B sqrt(ratio^2 - 1).",
        references=(REF_GILMOUR, REF_REISER), category=CATEGORY,
        notes="Busch's theorem and the radial balance of the edge electron give "
              "B^2 - (Psi_c/(pi b^2))^2 = B_B^2 (relativistic B_B). Divide by the cathode area "
              "for the field at the cathode. Ratio 1 is Brillouin flow (no cathode flux).",
    ),
    Function(
        name="TUBE_CATHODE_LOADING", func=optics.cathode_loading,
        params=(CURRENT, Param("beam_radius", "Radius of the beam in the tunnel.", unit="m",
                               domain=POSITIVE),
                Param("convergence", "Area convergence: cathode area over beam area, >= 1.",
                      unit="", domain=between(1.0, np.inf))),
        result_unit="A/m**2", result_units=("A/cm**2", "A/m**2"),
        help="Current density at the cathode, I0/(pi b^2 C), of a gun with area convergence "
             "C = cathode area / beam area.",
        references=(REF_GILMOUR,), category=CATEGORY,
        notes="Uniform emission. Long-life dispenser cathodes are commonly run at a few A/cm^2 "
              "(common practice); ask for 'A/cm**2'.",
    ),
    Function(
        name="TUBE_EFFICIENCY_ESTIMATE", func=optics.efficiency_estimate,
        params=(Param("perveance", "Beam perveance (text such as '1.2 uperv' accepted), "
                      "0 to 4 uperv.", unit="A/V**1.5", domain=between(0.0, 4e-6)),),
        result_unit="",
        help="Typical efficiency of a conventional klystron, 0.90 - 0.20 x microperveance "
             "(common practice: a trend line through existing tubes, not a bound).",
        references=(REF_BAIKOV,), category=CATEGORY,
        notes="Common practice: single designs scatter by several points around the line, "
              "and high-efficiency bunching schemes beat it. The coefficients are from memory.",
    ),
    Function(
        name="TUBE_OPTIMUM_QEXT", func=optics.optimum_qext,
        params=(Param("power", "RF output power into the load.", unit="W", domain=POSITIVE),
                Param("gap_voltage", "Peak output-gap voltage (commonly 0.8 to 1 times the "
                      "beam voltage at saturation).", unit="V", domain=POSITIVE),
                Param("r_over_q", "R/Q of the output cavity, in the given convention.",
                      unit="ohm", domain=POSITIVE),
                Param("convention", "R/Q convention: \"circuit\" (default) or "
                      "\"accelerator\" (\"linac\" accepted).", kind="text",
                      choices=("circuit", "accelerator", "linac"), default="circuit")),
        result_unit="",
        help="External Q of the output cavity that delivers the power at the gap voltage: "
             "Qext = V^2/(2 (R/Q) P) in the circuit convention (common practice).",
        references=(REF_GILMOUR,), category=CATEGORY, caution=CAUTION_RF,
        notes="Common practice: the load conductance that takes P at V; wall losses neglected "
              "(they take a fraction Qext/Q0 more).",
    ),
]
