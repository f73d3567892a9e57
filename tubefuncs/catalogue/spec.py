"""Declarations of worksheet functions: the one source of truth.

A :class:`Function` says everything a front end needs: the worksheet name, the
Python physics function it calls, its parameters (name, default SI unit, help,
domain, default), the unit of its result, a one-line help, references and,
where the quantity sizes high voltage, RF power or cooling, a caution.

The Excel add-in, the headless engine and ``tubefuncs/functions.md`` are generated
from these declarations; nothing else lists the functions.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np

REQUIRED = object()  # sentinel: the parameter has no default

ParamKind = Literal["number", "text", "table"]


@dataclass(frozen=True)
class Domain:
    """Allowed interval of a numeric argument, in SI units (NaN never allowed)."""

    low: float = -np.inf
    high: float = np.inf
    low_open: bool = False
    high_open: bool = False
    integer: bool = False

    def ok(self, x):
        """Boolean mask of elements inside the domain (vectorised)."""
        x = np.asarray(x, dtype=float)
        good = np.isfinite(x)
        if self.low > -np.inf:
            good &= (x > self.low) if self.low_open else (x >= self.low)
        if self.high < np.inf:
            good &= (x < self.high) if self.high_open else (x <= self.high)
        if self.integer:
            good &= np.floor(x) == x
        return good

    def ok_scalar(self, x: float) -> bool:
        if x != x or x in (np.inf, -np.inf):
            return False
        if self.low > -np.inf and (x <= self.low if self.low_open else x < self.low):
            return False
        if self.high < np.inf and (x >= self.high if self.high_open else x > self.high):
            return False
        if self.integer and int(x) != x:
            return False
        return True

    def describe(self, unit: str = "") -> str:
        u = f" {unit}" if unit else ""
        parts = []
        if self.low > -np.inf:
            parts.append(f"{'>' if self.low_open else '>='} {self.low:g}{u}")
        if self.high < np.inf:
            parts.append(f"{'<' if self.high_open else '<='} {self.high:g}{u}")
        text = " and ".join(parts) if parts else "finite"
        if self.integer:
            text = ("a whole number " + text) if parts else "a whole number"
        return text


POSITIVE = Domain(low=0.0, low_open=True)
NONNEGATIVE = Domain(low=0.0)
FINITE = Domain()


def between(low: float, high: float, low_open: bool = False, high_open: bool = False,
            integer: bool = False) -> Domain:
    return Domain(low, high, low_open, high_open, integer)


@dataclass(frozen=True)
class Param:
    """One worksheet argument.

    unit : default SI unit of a number ('' for dimensionless); a number in a
        cell is taken in this unit, a text is converted to it.
    kind : 'number' (broadcasts), 'text' (one of ``choices``, or free text when
        ``choices`` is empty), 'table' (a 2-D range passed whole).
    difference : a temperature difference (text in degC means kelvin steps).
    power_db : text in dBm/dBW is accepted (for power arguments).
    """

    name: str
    help: str
    unit: str = ""
    kind: ParamKind = "number"
    default: Any = REQUIRED
    domain: Domain = FINITE
    choices: tuple[str, ...] = ()
    difference: bool = False

    @property
    def required(self) -> bool:
        return self.default is REQUIRED


@dataclass(frozen=True)
class Check:
    """A constraint between arguments, evaluated on SI arrays after broadcasting.

    ``test(*values)`` returns a boolean mask (True = fine) for the arguments
    named in ``args``; ``message`` states what is allowed, e.g.
    ``"beam_radius must be <= tunnel_radius"`` (the values received are
    appended), or is a function of the same arguments returning the whole
    message (for messages that must say, e.g., which table row is wrong).
    """

    args: tuple[str, ...]
    test: Callable[..., Any]
    message: str | Callable[..., str]
    error_value: str = "#NUM!"


@dataclass(frozen=True)
class Function:
    """One worksheet function of the catalogue."""

    name: str                      # worksheet name, e.g. TUBE_TRANSIT_ANGLE
    func: Callable[..., Any]       # Python twin, SI in and out
    params: tuple[Param, ...]
    result_unit: str               # SI unit of the result; '' dimensionless; 'text'
    help: str                      # one line, <= 255 characters
    references: tuple[str, ...] = ()
    category: str = ""
    caution: str = ""              # safety caution shown in help/docs
    checks: tuple[Check, ...] = ()
    invalid_result: str = "outside the model's validity"
    result_units: tuple[str, ...] = ()  # suggested output units for docs
    notes: str = ""                # longer help for docs
    returns_text: bool = False
    result_kind: Literal["broadcast", "scalar", "column"] = "broadcast"
    extra: dict = field(default_factory=dict)

    @property
    def python_name(self) -> str:
        return self.func.__name__

    @property
    def takes_unit(self) -> bool:
        """True when the worksheet function has the optional last ``unit`` argument."""
        return bool(self.result_unit) and not self.returns_text

    @property
    def worksheet_params(self) -> tuple[Param, ...]:
        """Parameters as the worksheet sees them, ``unit`` appended when it applies."""
        if not self.takes_unit:
            return self.params
        return self.params + (Param("unit", f"Unit of the result (default {self.result_unit}).",
                                    kind="text", default=None),)


# Shared caution texts (one wording, reused by every function that needs it).
CAUTION_HV = ("High voltage kills: beam supplies, modulators and guns store lethal energy; "
              "the gun and collector emit X-rays. This is a design estimate, not a rating: "
              "follow the tube maker's data, local codes and licensed practice.")
CAUTION_RF = ("RF power burns and RF exposure injures: keep waveguide runs closed and "
              "interlocked and respect exposure limits. Design estimate only: follow the "
              "tube maker's data, local codes and licensed practice.")
CAUTION_COOLING = ("Cooling water runs under pressure near high voltage; a flow or "
                   "temperature fault destroys a collector in seconds. Design estimate "
                   "only: size with margin and follow the tube maker's data, local "
                   "codes and licensed practice.")
