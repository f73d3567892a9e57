"""Between values as Calc hands them to an extension and the worksheet layer.

What LibreOffice Calc 7.4 passes to a parameter declared ``any`` (verified in
real Calc by ``tests/test_calc.py``):

* a number or a text as ``float`` / ``str``; an omitted argument as ``None``;
* a range as a tuple of row tuples, an empty cell in it as ``''``;
* a reference to ONE empty cell as ``0.0``: Calc itself reads it as the number
  zero before the extension sees it, for every parameter type that also takes
  a literal number, so an extension cannot tell it from a typed 0 (see
  ``addin/CALC.md``);
* an error value in an argument never reaches us: Calc gives the error itself.

What we return: a float, a text, or a tuple of row tuples (an array formula).
An input error, alone or as an element of an array, is a NaN whose payload
carries Calc's code of the error value, which Calc shows as that error value
(``#NUM!``, ``#VALUE!``, verified in real Calc): ISERROR and ERROR.TYPE see the
same error as headless.  The message of any
error is what ``TUBE_ERROR_TEXT`` returns for the same arguments.
"""

from __future__ import annotations

import math
import struct
from collections.abc import Sequence
from typing import Any

import numpy as np

from ..catalogue import lookup
from ..errors import NAME, NUM, VALUE, TubeInputError
from ..worksheet import evaluate as ws_evaluate

#: Calc's internal codes of the error values we produce (FormulaError in LibreOffice).
CALC_ERROR_CODES = {NUM: 503, VALUE: 519, NAME: 525}


def error_nan(code: str) -> float:
    """A NaN carrying Calc's error code in its payload (Calc shows that error value)."""
    number = CALC_ERROR_CODES.get(code, 519)
    return struct.unpack("<d", struct.pack("<Q", 0x7FF8000000000000 | number))[0]


class CalcCallError(Exception):
    """Raised to Calc for a scalar error; ``error_value`` says which one."""

    def __init__(self, message: str, error_value: str = VALUE):
        super().__init__(message)
        self.message = message
        self.error_value = error_value


def _is_rows(value: Any) -> bool:
    return isinstance(value, (tuple, list)) and len(value) > 0 and all(
        isinstance(r, (tuple, list)) for r in value)


def from_calc(value: Any, kind: str = "number") -> Any:
    """One argument as Calc passes it -> the worksheet layer's form."""
    if _is_rows(value):
        rows = [[None if (isinstance(x, str) and x == "") else x for x in row]
                for row in value]
        if kind != "table" and len(rows) == 1 and len(rows[0]) == 1:
            return rows[0][0]
        return rows
    if isinstance(value, bool):
        return value
    return value


_KINDS: dict = {}


def _kinds(fn) -> tuple:
    kinds = _KINDS.get(fn.name)
    if kinds is None:
        kinds = _KINDS[fn.name] = tuple(p.kind for p in fn.worksheet_params)
    return kinds


def _convert_args(fn, args: Sequence[Any]) -> list:
    kinds = _kinds(fn)
    converted = []
    for i, a in enumerate(args):
        if isinstance(a, tuple):
            a = from_calc(a, kinds[i] if i < len(kinds) else "number")
        converted.append(a)
    while converted and converted[-1] is None:  # trailing omitted arguments
        converted.pop()
    return converted


def evaluate(name: str, args: Sequence[Any]):
    """The worksheet layer's Evaluation of a Calc call (raises TubeInputError)."""
    fn = lookup(name)
    if fn is None:
        raise TubeInputError(f"{name}: not in this version of tubefuncs", NAME, function=name)
    return ws_evaluate(fn.name, _convert_args(fn, args))


def call(name: str, args: Sequence[Any]):
    """Evaluate ``name`` for Calc: float, text or tuple of row tuples.

    An input error comes back as a NaN carrying Calc's code of its error value
    (:func:`error_nan`): Calc shows ``#VALUE!`` or ``#NUM!`` as headless does.
    Anything unexpected is raised as :class:`CalcCallError` (Calc: ``#VALUE!``).
    """
    try:
        result = evaluate(name, args)
    except TubeInputError as exc:
        return error_nan(exc.error_value)
    except Exception as exc:  # a bug in a physics module: visible, never a crash
        raise CalcCallError(f"{name}: internal error {type(exc).__name__}: {exc}") from None
    return to_calc(result)


def to_calc(result):
    value = result.value
    errors = result.errors or {}
    if isinstance(value, str):
        return value
    if isinstance(value, np.ndarray) and value.ndim > 0:
        arr = value.reshape(value.shape[0], -1) if value.ndim != 2 else value
        rows = []
        for r in range(arr.shape[0]):
            row = []
            for c in range(arr.shape[1]):
                err = errors.get((r, c))
                x = float(arr[r, c])
                if err is not None:
                    row.append(error_nan(err.error_value))
                elif not math.isfinite(x):
                    row.append(error_nan(NUM))
                else:
                    row.append(x)
            rows.append(tuple(row))
        if len(rows) == 1 and len(rows[0]) == 1:
            return rows[0][0]
        return tuple(rows)
    x = float(value)
    return x if math.isfinite(x) else error_nan(NUM)


def error_text(name: Any, args: Sequence[Any]):
    """What TUBE_ERROR_TEXT shows: the message of ``name(args)``, '' when it has none.

    For a call that gives a range, a range of messages ('' where the element
    is fine), so the companion can be entered as an array formula beside it.
    """
    if _is_rows(name):
        name = from_calc(name, "text")
    if not isinstance(name, str) or not name.strip():
        return "TUBE_ERROR_TEXT: function_name must be the name of a TUBE_ function, e.g. " \
               "\"TUBE_GAMMA\""
    key = name.strip().upper()
    if lookup(key) is None and lookup("TUBE_" + key) is not None:
        key = "TUBE_" + key
    try:
        result = evaluate(key, args)
    except TubeInputError as exc:
        return exc.message
    except Exception as exc:  # a bug: say so rather than hide it
        return f"{key}: internal error {type(exc).__name__}: {exc}; please report it"
    value = result.value
    if isinstance(value, np.ndarray) and value.ndim > 0 and value.size > 1:
        arr = value.reshape(value.shape[0], -1) if value.ndim != 2 else value
        return tuple(tuple((result.errors.get((r, c)).message if (r, c) in result.errors
                            else ("" if math.isfinite(float(arr[r, c])) else
                                  f"{key}: no finite result"))
                           for c in range(arr.shape[1])) for r in range(arr.shape[0]))
    if result.errors:
        return next(iter(result.errors.values())).message
    return ""
