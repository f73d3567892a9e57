"""Excel cell values as the headless engine holds them.

A value is one of: ``float``, ``str``, ``bool``, :data:`EMPTY` (a blank cell),
an Excel error (the canonical error objects of the `formulas` library, so that
its functions recognise them: ``ISNA``, ``IFERROR``...), or a 2-D ``object``
numpy array of those (a range or an array result).  Error objects compare by
identity, so the engine never makes its own: :func:`error` returns the
canonical one, and the message that explains an error lives beside the value
(see ``Recalculation.messages``).
"""

from __future__ import annotations

import math

import numpy as np
import schedula as sh
from formulas.tokens.operand import Error as _FormulasError
from formulas.tokens.operand import XlError

EMPTY = sh.EMPTY

ERRORS: dict[str, XlError] = {code: err for code, err in _FormulasError.errors.items()
                              if code != "#GETTING_DATA"}
#: Excel error codes that `formulas` has no object for: kept as their own objects.
for _code in ("#SPILL!", "#CALC!"):
    ERRORS.setdefault(_code, XlError(_code))

VALUE = ERRORS["#VALUE!"]
NUM = ERRORS["#NUM!"]
NAME = ERRORS["#NAME?"]
REF = ERRORS["#REF!"]
NA = ERRORS["#N/A"]
DIV0 = ERRORS["#DIV/0!"]
NULL = ERRORS["#NULL!"]


def error(code: str) -> XlError:
    """The canonical error object for an Excel error code such as ``"#NUM!"``."""
    return ERRORS.get(code.upper(), VALUE)


def is_error(value) -> bool:
    return isinstance(value, XlError)


def scalar(value):
    """Plain Python scalar of a numpy scalar / 0-d array; other values unchanged."""
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            return scalar(value.item())
        return value
    if isinstance(value, XlError) or value is EMPTY:
        return value
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return value


def as_array(value) -> np.ndarray:
    """2-D object array of a value (a scalar becomes 1x1)."""
    if isinstance(value, np.ndarray):
        arr = np.asarray(value, dtype=object)
        if arr.ndim == 2:
            return arr
        if arr.ndim == 0:
            return np.array([[scalar(arr.item())]], dtype=object)
        if arr.ndim == 1:
            return arr.reshape(1, -1)
        return arr.reshape(arr.shape[0], -1)
    out = np.empty((1, 1), dtype=object)
    out[0, 0] = value
    return out


def cell_result(value):
    """What a formula cell finally shows, from an evaluated value.

    An array in a single cell shows its top-left element (Excel's behaviour
    for an array result in a cell that is not an array formula); a blank
    shows 0; NaN or an infinity is ``#NUM!``; -0.0 shows as 0.
    """
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            value = value.item()
        elif value.size == 0:
            return VALUE
        else:
            value = value.reshape(value.shape[0], -1)[0, 0] if value.ndim >= 2 else value.flat[0]
        return cell_result(value)
    if value is EMPTY or value is None:
        return 0.0
    if isinstance(value, XlError):
        return value
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        x = float(value)
        if not math.isfinite(x):
            return NUM
        return x + 0.0  # folds -0.0 into 0.0
    if isinstance(value, str):
        return str(value)
    return VALUE


def from_file(value, data_type: str | None):
    """A constant or cached value as openpyxl read it -> engine value."""
    if value is None:
        return EMPTY
    if data_type == "e" or (isinstance(value, str) and data_type is None and value in ERRORS):
        return error(str(value))
    if isinstance(value, bool):
        return value
    if isinstance(value, (int, float)):
        return float(value)
    if hasattr(value, "isoformat"):  # a date openpyxl converted: keep the serial number
        from openpyxl.utils.datetime import to_excel
        try:
            return float(to_excel(value))
        except (TypeError, ValueError):
            return VALUE
    return str(value)


def display(value) -> str:
    """Short human text for a value in reports."""
    if isinstance(value, XlError):
        return str(value)
    if value is EMPTY or value is None:
        return "(blank)"
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return f"{value:.10g}"
    if isinstance(value, str):
        text = repr(value)
        return text if len(text) <= 40 else text[:37] + "..."
    return str(value)
