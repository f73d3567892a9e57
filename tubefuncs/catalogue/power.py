"""Catalogue: power budget (average power, collector heat, coolant flow, waveguide)."""

from __future__ import annotations

from scipy import constants as sc

from ..materials import COPPER_CONDUCTIVITY
from ..physics import power, waveguide
from ..physics.water import FLUID_CHOICES
from .spec import CAUTION_COOLING, CAUTION_RF, NONNEGATIVE, POSITIVE, Check, Function, Param

REF_IAPWS = ("W. Wagner and A. Pruss, The IAPWS formulation 1995 for the thermodynamic "
             "properties of ordinary water substance, J. Phys. Chem. Ref. Data 31(2), "
             "387-535, 2002.")
REF_POZAR = ("D. M. Pozar, Microwave Engineering, 4th ed., Wiley, 2012, Sec. 3.3 "
             "(rectangular waveguide, TE10 conductor attenuation).")
REF_IEC_COPPER = "IEC 60028:1925, International standard of resistance for copper."
REF_PRACTICE = "Energy bookkeeping, common practice."

CATEGORY = "Power budget"

FUNCTIONS = [
    Function(
        name="TUBE_AVERAGE_POWER", func=power.average_power,
        params=(
            Param("peak_power", "Peak (in-pulse) power.", unit="W", domain=NONNEGATIVE),
            Param("pulse_width", "Pulse length (energy-equivalent flat top).", unit="s",
                  domain=NONNEGATIVE),
            Param("prf", "Pulse repetition frequency.", unit="Hz", domain=NONNEGATIVE),
        ),
        result_unit="W",
        help="Average power = peak power x duty cycle (pulse_width x prf); the duty cycle "
             "must not exceed 1 (1 = CW).",
        references=(REF_PRACTICE,), category=CATEGORY, caution=CAUTION_RF,
        checks=(Check(("pulse_width", "prf"), lambda tau, f: tau * f <= 1.0,
                      "pulse_width x prf (the duty cycle) must be <= 1"),),
        result_units=("kW", "W", "MW", "dBm", "dBW"),
    ),
    Function(
        name="TUBE_COLLECTOR_POWER", func=power.collector_power,
        params=(
            Param("beam_power", "DC beam power V0 x I0 (average for pulsed tubes).", unit="W",
                  domain=NONNEGATIVE),
            Param("rf_output", "RF output power; 0 for the no-drive case.", unit="W",
                  domain=NONNEGATIVE),
            Param("body_loss", "Power lost on the body (interception, cavity walls).",
                  unit="W", domain=NONNEGATIVE, default=0.0),
        ),
        result_unit="W",
        help="Collector heat = beam power - RF output - body loss. With no RF drive the "
             "collector takes the FULL beam power: size collector and coolant for the beam "
             "power.",
        references=(REF_PRACTICE,), category=CATEGORY, caution=CAUTION_COOLING,
        checks=(Check(("beam_power", "rf_output", "body_loss"),
                      lambda pb, prf, pw: prf + pw <= pb,
                      "rf_output + body_loss must be <= beam_power"),),
        result_units=("kW", "W", "MW"),
        notes="Neglects the RF drive power. For a depressed collector use the collector "
              "current times the collector voltage. Pulsed tubes: pass average powers.",
    ),
    Function(
        name="TUBE_COOLANT_FLOW", func=power.coolant_flow,
        params=(
            Param("power", "Heat load to carry away.", unit="W", domain=NONNEGATIVE),
            Param("temperature_rise", "Coolant temperature rise, outlet minus inlet.",
                  unit="K", domain=POSITIVE, difference=True),
            Param("fluid", "Coolant at its mean temperature: " + ", ".join(FLUID_CHOICES)
                  + ".", kind="text", default="water", choices=FLUID_CHOICES),
        ),
        result_unit="m**3/s",
        help="Volumetric coolant flow P/(rho cp dT) for a heat load and temperature rise; "
             "water properties from IAPWS-95 at 1 atm. Size a collector for the full beam "
             "power (no RF drive).",
        references=(REF_IAPWS, REF_PRACTICE), category=CATEGORY, caution=CAUTION_COOLING,
        result_units=("L/min", "L/s", "m**3/h"),
        notes="'water' is water at a 25 degC mean temperature; 'water 40C' and the like "
              "name other mean temperatures. 1 L/min of 25 degC water carries 69.5 W per K.",
    ),
    Function(
        name="TUBE_WAVEGUIDE_CUTOFF", func=waveguide.waveguide_cutoff,
        params=(
            Param("width", "Inside width of the broad wall of a rectangular guide.", unit="m",
                  domain=POSITIVE),
        ),
        result_unit="Hz",
        help="Cutoff frequency c/(2 width) of the TE10 mode of an empty rectangular "
             "waveguide.",
        references=(REF_POZAR,), category=CATEGORY, result_units=("GHz", "MHz"),
    ),
    Function(
        name="TUBE_WAVEGUIDE_LOSS", func=waveguide.waveguide_loss,
        params=(
            Param("frequency", "Signal frequency, above the TE10 cutoff.", unit="Hz",
                  domain=POSITIVE),
            Param("width", "Inside width of the broad wall.", unit="m", domain=POSITIVE),
            Param("height", "Inside height of the narrow wall (<= width).", unit="m",
                  domain=POSITIVE),
            Param("length", "Length of the waveguide run.", unit="m", domain=NONNEGATIVE),
            Param("conductivity", "Wall conductivity; default annealed copper 5.8e7 S/m.",
                  unit="S/m", domain=POSITIVE, default=COPPER_CONDUCTIVITY),
        ),
        result_unit="",
        help="Conductor loss in dB of the TE10 mode over a length of rectangular waveguide, "
             "smooth walls; real guides lose about 10-30 % more.",
        references=(REF_POZAR, REF_IEC_COPPER), category=CATEGORY,
        checks=(
            Check(("frequency", "width"), lambda f, a: ((0.5 * sc.c) / (a * f)) ** 2 < 1.0,
                  "frequency is at or below the TE10 cutoff c/(2 width); it must be above it"),
            Check(("width", "height"), lambda a, b: b <= a,
                  "height must be <= width (width is the broad wall)"),
        ),
        notes="Result in dB (power). Perturbation formula for good conductors; dielectric "
              "loss and flange joints not included.",
    ),
]
