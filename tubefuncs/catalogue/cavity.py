"""Catalogue: pillbox cavity, skin effect, Q, R/Q, gap voltage."""

from __future__ import annotations

from ..materials import COPPER_CONDUCTIVITY
from ..physics import cavity
from .spec import CAUTION_RF, NONNEGATIVE, POSITIVE, Function, Param

REF_JACKSON = ("J. D. Jackson, Classical Electrodynamics, 3rd ed., Wiley, 1999, Secs. 8.1, "
               "8.7-8.8 (skin depth, cylindrical cavity, Q).")
REF_WANGLER = ("T. P. Wangler, RF Linear Accelerators, 2nd ed., Wiley-VCH, 2008 (transit-time "
               "factor, shunt impedance, R/Q).")
REF_AS = ("M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions, NBS, 1964, "
          "Table 9.5 (zeros of J0).")
REF_IEC = "IEC 60028:1925, International standard of resistance for copper."

CATEGORY = "Cavities"

CONVENTION = Param(
    "convention", "Shunt-impedance convention: \"circuit\" (R = V^2/2P, default) or "
    "\"accelerator\" (R = V^2/P; \"linac\" accepted).", kind="text",
    choices=("circuit", "accelerator", "linac"), default="circuit")
FREQUENCY = Param("frequency", "Frequency.", unit="Hz", domain=POSITIVE)
CONDUCTIVITY = Param("conductivity", "Electrical conductivity of the wall (default annealed "
                     "copper, 5.8e7 S/m).", unit="S/m", default=COPPER_CONDUCTIVITY,
                     domain=POSITIVE)
RADIUS = Param("radius", "Inner radius of the pillbox.", unit="m", domain=POSITIVE)
LENGTH = Param("length", "Inner length of the pillbox (the gap).", unit="m", domain=POSITIVE)

FUNCTIONS = [
    Function(
        name="TUBE_PILLBOX_FREQ", func=cavity.pillbox_freq, params=(RADIUS,),
        result_unit="Hz", result_units=("GHz", "MHz"),
        help="Resonant frequency of the TM010 mode of a closed pillbox cavity, "
             "2.405 c/(2 pi radius).",
        references=(REF_JACKSON, REF_AS), category=CATEGORY,
    ),
    Function(
        name="TUBE_SKIN_DEPTH", func=cavity.skin_depth, params=(FREQUENCY, CONDUCTIVITY),
        result_unit="m", result_units=("um", "mm"),
        help="Skin depth 1/sqrt(pi f mu0 sigma) of a non-magnetic conductor, default "
             "copper.",
        references=(REF_JACKSON, REF_IEC), category=CATEGORY,
    ),
    Function(
        name="TUBE_SURFACE_RESISTANCE", func=cavity.surface_resistance,
        params=(FREQUENCY, CONDUCTIVITY),
        result_unit="ohm", result_units=("mohm", "ohm"),
        help="Surface resistance sqrt(pi f mu0/sigma) of a non-magnetic conductor, default "
             "copper.",
        references=(REF_JACKSON, REF_IEC), category=CATEGORY,
    ),
    Function(
        name="TUBE_PILLBOX_Q", func=cavity.pillbox_q, params=(RADIUS, LENGTH, CONDUCTIVITY),
        result_unit="",
        help="Unloaded Q of the TM010 mode of a closed pillbox (side wall and end plates, "
             "no beam holes): (radius/delta)/(1 + radius/length).",
        references=(REF_JACKSON, REF_IEC), category=CATEGORY,
    ),
    Function(
        name="TUBE_PILLBOX_R_OVER_Q", func=cavity.pillbox_r_over_q,
        params=(
            RADIUS, LENGTH,
            Param("voltage", "Beam voltage; when given, R/Q includes the transit-time "
                  "factor T^2, else T = 1 (geometric).", unit="V", default=None,
                  domain=POSITIVE),
            CONVENTION,
        ),
        result_unit="ohm",
        help="On-axis R/Q of a pillbox TM010 mode; with T^2 when the beam voltage is given. "
             "convention: \"circuit\" V^2/(2 omega W) (default) or \"accelerator\" "
             "V^2/(omega W), twice as large.",
        references=(REF_WANGLER, REF_JACKSON), category=CATEGORY,
    ),
    Function(
        name="TUBE_LOADED_Q", func=cavity.loaded_q,
        params=(
            Param("q0", "Unloaded quality factor Q0.", unit="", domain=POSITIVE),
            Param("qext", "External quality factor of the coupling.", unit="",
                  domain=POSITIVE),
        ),
        result_unit="",
        help="Loaded quality factor from 1/QL = 1/Q0 + 1/Qext (beam loading not included).",
        references=(REF_JACKSON,), category=CATEGORY,
    ),
    Function(
        name="TUBE_CIRCUIT_EFFICIENCY", func=cavity.circuit_efficiency,
        params=(
            Param("q0", "Unloaded quality factor Q0 of the output cavity.", unit="",
                  domain=POSITIVE),
            Param("qext", "External quality factor of its coupling to the load.", unit="",
                  domain=POSITIVE),
        ),
        result_unit="",
        help="Output-circuit efficiency Q0/(Q0 + Qext) = QL/Qext: the share of the power the "
             "beam gives the output cavity that reaches the load (the rest heats the walls).",
        references=(REF_JACKSON,), category=CATEGORY,
    ),
    Function(
        name="TUBE_COUPLING_BETA", func=cavity.coupling_beta,
        params=(
            Param("q0", "Unloaded quality factor Q0.", unit="", domain=POSITIVE),
            Param("qext", "External quality factor of the coupling.", unit="",
                  domain=POSITIVE),
        ),
        result_unit="",
        help="Coupling factor Q0/Qext of a cavity to its line (1 = critical coupling; the "
             "reflection at resonance is |1 - beta|/(1 + beta)).",
        references=("D. M. Pozar, Microwave Engineering, 4th ed., Wiley, 2012, Sec. 6.7 "
                    "(coupling of resonators; from memory for the section).",),
        category=CATEGORY,
    ),
    Function(
        name="TUBE_GAP_VOLTAGE", func=cavity.gap_voltage,
        params=(
            Param("power", "RF power dissipated in the loaded cavity (walls plus load).",
                  unit="W", domain=NONNEGATIVE),
            Param("r_over_q", "R/Q of the cavity, in the same convention.", unit="ohm",
                  domain=POSITIVE),
            Param("q_loaded", "Loaded quality factor QL.", unit="", domain=POSITIVE),
            CONVENTION,
        ),
        result_unit="V", result_units=("kV", "V"),
        help="Peak gap voltage: circuit sqrt(2 (R/Q) QL P) (default) or accelerator "
             "sqrt((R/Q) QL P); convention must match that of r_over_q.",
        references=(REF_WANGLER,), category=CATEGORY, caution=CAUTION_RF,
    ),
]
