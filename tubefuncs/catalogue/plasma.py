"""Catalogue: plasma frequency, reduction factor, reduced plasma wavelength, drift."""

from __future__ import annotations

import numpy as np

from ..physics import plasma
from .spec import NONNEGATIVE, POSITIVE, Check, Function, Param

REF_BRANCH_MIHRAN = ("G. M. Branch and T. G. Mihran, Plasma frequency reduction factors in "
                     "electron beams, IRE Trans. Electron Devices ED-2(2), 3-11, 1955 "
                     "(from memory).")
REF_JACKSON = ("J. D. Jackson, Classical Electrodynamics, 3rd ed., Wiley, 1999, Sec. 12.2 "
               "(longitudinal mass; section from memory).")
REF_CODATA = "CODATA recommended values of the fundamental constants, via scipy.constants."

FREQUENCY = Param("frequency", "Signal frequency.", unit="Hz", domain=POSITIVE)
CURRENT = Param("current", "DC beam current.", unit="A", domain=NONNEGATIVE)
CURRENT_POSITIVE = Param("current", "DC beam current.", unit="A", domain=POSITIVE)
VOLTAGE = Param("voltage", "Beam accelerating voltage (cathode to anode).", unit="V",
                domain=POSITIVE)
BEAM_RADIUS = Param("beam_radius", "Radius of the uniform solid round beam.", unit="m",
                    domain=POSITIVE)
TUNNEL_RADIUS = Param("tunnel_radius", "Radius of the drift tube (tunnel), >= beam_radius.",
                      unit="m", domain=POSITIVE)


def _beam_fits_tunnel(beam_radius, tunnel_radius):
    return np.asarray(beam_radius) <= np.asarray(tunnel_radius)


BEAM_IN_TUNNEL = Check(("beam_radius", "tunnel_radius"), _beam_fits_tunnel,
                       "beam_radius must be <= tunnel_radius")

MODEL = ("Model: uniform solid round beam in a round drift tube, confined flow (infinite "
         "axial field, no radial motion), small signal, quasi-static, no velocity spread; "
         "relativistic (longitudinal mass gamma^3, radial constant beta_e/gamma). ")
R_METHOD = ("R is the exact smallest eigenvalue of the space-charge-wave dispersion relation "
            "(Bessel J inside the beam, I and K outside), solved numerically to 1e-9 or "
            "better; not a fit. Brillouin or partly confined flow has different R. ")
FQ_LIMIT = "Returns #NUM! where f_q >= frequency: the model needs f_q well below f. "

FUNCTIONS = [
    Function(
        name="TUBE_PLASMA_FREQ", func=plasma.plasma_freq,
        params=(CURRENT, VOLTAGE, BEAM_RADIUS), result_unit="Hz",
        help="Plasma frequency f_p = omega_p/2pi of a uniform solid beam, longitudinal "
             "(gamma^3), relativistic; multiply by TUBE_REDUCTION_FACTOR for f_q.",
        references=(REF_BRANCH_MIHRAN, REF_JACKSON, REF_CODATA), category="Beam",
        result_units=("MHz", "GHz", "Hz"),
        notes="omega_p^2 = e rho0/(eps0 m_e gamma^3) with rho0 = I/(pi b^2 u0): an infinitely "
              "wide beam of the same charge density. Reduces to the non-relativistic form at "
              "low voltage.",
    ),
    Function(
        name="TUBE_REDUCTION_FACTOR", func=plasma.reduction_factor,
        params=(FREQUENCY, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS), result_unit="",
        help="Plasma-frequency reduction factor R = omega_q/omega_p of a solid beam in a round "
             "tunnel, from the exact space-charge-wave dispersion relation (confined flow).",
        references=(REF_BRANCH_MIHRAN, REF_JACKSON), category="Beam",
        checks=(BEAM_IN_TUNNEL,),
        notes=MODEL + R_METHOD + "Depends on f, V, b and a only through beta_e b/gamma and b/a.",
    ),
    Function(
        name="TUBE_REDUCED_PLASMA_FREQ", func=plasma.reduced_plasma_freq,
        params=(FREQUENCY, CURRENT, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS), result_unit="Hz",
        help="Reduced plasma frequency f_q = R f_p of a solid beam in a round tunnel "
             "(confined flow, small signal, relativistic).",
        references=(REF_BRANCH_MIHRAN, REF_JACKSON, REF_CODATA), category="Beam",
        checks=(BEAM_IN_TUNNEL,), result_units=("MHz", "GHz", "Hz"),
        notes=MODEL + R_METHOD + FQ_LIMIT,
    ),
    Function(
        name="TUBE_PLASMA_WAVELENGTH", func=plasma.plasma_wavelength,
        params=(FREQUENCY, CURRENT_POSITIVE, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS),
        result_unit="m",
        help="Reduced plasma wavelength lambda_q = u0/f_q of a solid beam in a round tunnel "
             "(confined flow, small signal, relativistic).",
        references=(REF_BRANCH_MIHRAN, REF_JACKSON, REF_CODATA), category="Beam",
        checks=(BEAM_IN_TUNNEL,), result_units=("m", "mm", "cm"),
        notes=MODEL + R_METHOD + FQ_LIMIT,
    ),
    Function(
        name="TUBE_OPTIMUM_DRIFT", func=plasma.optimum_drift,
        params=(FREQUENCY, CURRENT_POSITIVE, VOLTAGE, BEAM_RADIUS, TUNNEL_RADIUS),
        result_unit="m",
        help="Drift length lambda_q/4 at which the small-signal RF current of a "
             "velocity-modulated beam peaks (confined flow, relativistic).",
        references=(REF_BRANCH_MIHRAN, REF_JACKSON, REF_CODATA), category="Beam",
        checks=(BEAM_IN_TUNNEL,), result_units=("mm", "cm", "m"),
        notes=MODEL + R_METHOD + FQ_LIMIT + "Practical cavity spacings are often shorter than "
              "lambda_q/4, trading gain for bandwidth (common practice).",
    ),
]
