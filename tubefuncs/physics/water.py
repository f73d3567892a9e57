"""Properties of liquid cooling water at atmospheric pressure, tabulated.

Density and isobaric specific heat capacity of ordinary water at
0.101325 MPa from the IAPWS-95 formulation [1], evaluated once with an
independent open-source implementation of that formulation and written here to
7 significant figures (density to 1e-4 kg/m^3, heat capacity to 0.01 J/(kg K)).
The library does not depend on that implementation; the tests compare this
table with it.

The fluids are a closed set of names: ``"water"`` (mean coolant temperature
25 degC) and ``"water <T>C"`` for T = 10, 20, 25, 30, 40, 50, 60, 70, 80.
Pick the entry nearest to the mean coolant temperature in the collector or
body circuit; between 10 and 80 degC the heat capacity changes by less than
0.5 % and the density by less than 3 %, so the nearest entry is good to
better than 0.5 % in flow.

Pressure: the loop pressure of a cooling circuit (a few bar) changes these
values by less than 0.05 % [from memory: the compressibility of liquid water
is about 4.5e-10 1/Pa, i.e. 0.045 % per MPa], far below the uncertainty of a
flow estimate.

References
----------
[1] W. Wagner and A. Pruss, "The IAPWS formulation 1995 for the thermodynamic
    properties of ordinary water substance for general and scientific use",
    J. Phys. Chem. Ref. Data 31(2), 387-535, 2002. doi:10.1063/1.1461829
"""

from __future__ import annotations

#: Pressure of the tabulated states. [Pa]
PRESSURE = 101325.0

#: Temperature [degC] -> (density [kg/m^3], isobaric heat capacity [J/(kg K)]),
#: IAPWS-95 [1] at 0.101325 MPa.
WATER_TABLE: dict[int, tuple[float, float]] = {
    10: (999.7025, 4195.16),
    20: (998.2072, 4184.05),
    25: (997.0476, 4181.31),
    30: (995.6495, 4179.82),
    40: (992.2164, 4179.41),
    50: (988.0350, 4181.34),
    60: (983.1958, 4184.95),
    70: (977.7646, 4190.07),
    80: (971.7904, 4196.75),
}

#: Temperature [degC] of the plain name "water".
DEFAULT_WATER_TEMPERATURE = 25

#: Fluid names accepted by the coolant functions, in display order.
FLUID_CHOICES: tuple[str, ...] = ("water",) + tuple(f"water {t}C" for t in WATER_TABLE)

_FLUIDS: dict[str, tuple[float, float]] = {"water": WATER_TABLE[DEFAULT_WATER_TEMPERATURE]}
_FLUIDS.update({f"water {t}c": props for t, props in WATER_TABLE.items()})


def fluid_properties(fluid: str) -> tuple[float, float]:
    """Density and isobaric heat capacity of a named coolant.

    Parameters
    ----------
    fluid : str
        One of :data:`FLUID_CHOICES`; case and repeated blanks are ignored,
        and a blank before ``C`` is allowed (``"Water 40 C"``).

    Returns
    -------
    density : float
        Mass density. [kg/m^3]
    heat_capacity : float
        Isobaric specific heat capacity c_p. [J/(kg K)]

    Raises
    ------
    ValueError
        For a name outside :data:`FLUID_CHOICES` (a text argument cannot be
        an array element, so it cannot turn into NaN).
    """
    key = " ".join(str(fluid).lower().split())
    if key.endswith(" c"):
        key = key[:-2] + "c"
    try:
        return _FLUIDS[key]
    except KeyError:
        raise ValueError(f"unknown fluid {fluid!r}; choose one of "
                         + ", ".join(FLUID_CHOICES)) from None
