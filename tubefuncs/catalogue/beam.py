"""Catalogue: beam kinematics, perveance, beam power, focusing, diode."""

from __future__ import annotations

from ..physics import beam
from .spec import CAUTION_HV, NONNEGATIVE, POSITIVE, Function, Param

REF_CODATA = "CODATA recommended values of the fundamental constants, via scipy.constants."
REF_JACKSON = "J. D. Jackson, Classical Electrodynamics, 3rd ed., Wiley, 1999, Sec. 11.5."
REF_CHILD = ("C. D. Child, Discharge from hot CaO, Phys. Rev. (Series I) 32, 492, 1911 "
             "(from memory).")
REF_LANGMUIR = ("I. Langmuir, The effect of space charge and residual gases on thermionic "
                "currents in high vacuum, Phys. Rev. 2, 450, 1913 (from memory).")
REF_JORY = ("H. R. Jory and A. W. Trivelpiece, Exact relativistic solution for the "
            "one-dimensional diode, J. Appl. Phys. 40, 3924, 1969 (from memory).")
REF_BRILLOUIN = ("L. Brillouin, A theorem of Larmor and its importance for electrons in "
                 "magnetic fields, Phys. Rev. 67, 260, 1945 (title from memory).")

VOLTAGE = Param("voltage", "Beam accelerating voltage (cathode to anode).", unit="V",
                domain=NONNEGATIVE)
VOLTAGE_POSITIVE = Param("voltage", "Beam accelerating voltage (cathode to anode).", unit="V",
                         domain=POSITIVE)
CURRENT = Param("current", "DC beam current.", unit="A", domain=NONNEGATIVE)
BEAM_RADIUS = Param("beam_radius", "Radius of the uniform solid round beam.", unit="m",
                    domain=POSITIVE)

FUNCTIONS = [
    Function(
        name="TUBE_GAMMA", func=beam.gamma, params=(VOLTAGE,), result_unit="",
        help="Lorentz factor gamma = 1 + eV/(m_e c^2) of electrons accelerated from rest "
             "through the beam voltage.",
        references=(REF_JACKSON, REF_CODATA), category="Beam",
    ),
    Function(
        name="TUBE_BETA", func=beam.beta, params=(VOLTAGE,), result_unit="",
        help="Normalised velocity v/c of electrons accelerated from rest through the beam "
             "voltage (relativistic).",
        references=(REF_JACKSON, REF_CODATA), category="Beam",
    ),
    Function(
        name="TUBE_VELOCITY", func=beam.velocity, params=(VOLTAGE,), result_unit="m/s",
        help="DC velocity u0 = beta c of electrons accelerated from rest through the beam "
             "voltage (relativistic).",
        references=(REF_JACKSON, REF_CODATA), category="Beam", result_units=("km/s", "m/s"),
    ),
    Function(
        name="TUBE_PERVEANCE", func=beam.perveance, params=(CURRENT, VOLTAGE_POSITIVE),
        result_unit="A/V**1.5",
        help="Perveance K = I/V^1.5 of a beam or gun, in A/V^1.5; ask for 'uperv' to get "
             "microperveance.",
        references=(REF_CHILD, REF_LANGMUIR), category="Beam",
        result_units=("uperv", "perv", "A/V**1.5"),
        notes="A constant of the gun geometry for a space-charge-limited gun. Klystron guns "
              "run at about 0.2 to 3 uperv (common practice).",
    ),
    Function(
        name="TUBE_BEAM_CURRENT", func=beam.beam_current,
        params=(Param("perveance", "Gun perveance K = I/V^1.5 (text such as '1.2 uperv' "
                      "accepted).", unit="A/V**1.5", domain=NONNEGATIVE),
                VOLTAGE),
        result_unit="A",
        help="DC beam current I = K V^1.5 of a space-charge-limited gun of perveance K at "
             "the beam voltage.",
        references=(REF_CHILD, REF_LANGMUIR), category="Beam", caution=CAUTION_HV,
        result_units=("A", "mA", "kA"),
        notes="Assumes the gun is space-charge limited (cathode hot enough), so the "
              "perveance is a constant of its geometry.",
    ),
    Function(
        name="TUBE_BEAM_POWER", func=beam.beam_power, params=(VOLTAGE, CURRENT),
        result_unit="W",
        help="DC beam power P = V I drawn from the beam supply; with no RF drive all of it "
             "reaches the collector.",
        references=("P = V I, the power delivered by the beam supply (common practice).",),
        category="Beam", caution=CAUTION_HV, result_units=("W", "kW", "MW"),
        notes="Size the collector and its cooling for the full beam power: an undriven tube "
              "dumps all of it there (common practice).",
    ),
    Function(
        name="TUBE_CHILD_LANGMUIR", func=beam.child_langmuir,
        params=(Param("voltage", "Anode-to-cathode voltage.", unit="V", domain=NONNEGATIVE),
                Param("spacing", "Cathode-to-anode spacing of the planar diode.", unit="m",
                      domain=POSITIVE),
                Param("area", "Emitting cathode area.", unit="m**2", domain=NONNEGATIVE)),
        result_unit="A",
        help="Space-charge-limited current of a planar diode, Child-Langmuir law "
             "(4 eps0/9) sqrt(2e/m) V^1.5 S/d^2; non-relativistic.",
        references=(REF_CHILD, REF_LANGMUIR, REF_JORY, REF_CODATA), category="Beam",
        caution=CAUTION_HV, result_units=("A", "mA", "kA"),
        notes="Non-relativistic, one-dimensional law (parallel planes, spacing small against "
              "the cathode size), zero emission velocity, space-charge limited. Relativistic "
              "motion lowers the current: the law is high by 0.2 % at 10 kV, 2.1 % at "
              "100 kV, 9.5 % at 500 kV and 17.6 % at 1 MV, i.e. the exact current is 0.2 %, "
              "2.0 %, 8.7 % and 14.9 % lower than the law (computed by quadrature of the "
              "1-D relativistic planar diode equation). Real guns are not planar: use "
              "TUBE_PERVEANCE with the gun's perveance for them.",
    ),
    Function(
        name="TUBE_BRILLOUIN_FIELD", func=beam.brillouin_field,
        params=(CURRENT, VOLTAGE_POSITIVE, BEAM_RADIUS),
        result_unit="T",
        help="Brillouin field B_B = sqrt(2I/(pi eps0 eta gamma u0 b^2)) that balances the "
             "space charge of a solid round beam (relativistic; no cathode flux).",
        references=(REF_BRILLOUIN, REF_CODATA), category="Beam", result_units=("T", "mT"),
        notes="Brillouin flow: uniform axial field, no magnetic flux at the cathode, "
              "electrons rotating at the Larmor frequency; includes the beam's self-magnetic "
              "pinch and relativistic mass, neglects the field of the rotation itself. Reduces "
              "to 8.30218e-4 sqrt(I)/(b V^0.25) T (b in m) at low voltage. Solenoid-focused "
              "klystrons run at about 1.5 to 3 times B_B in confined or partly confined flow "
              "(from memory; a design default, not a rule).",
    ),
]
