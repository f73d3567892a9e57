"""Calling catalogue functions (``TUBE_...``) from the headless engine.

Arguments go to :func:`tubefuncs.worksheet.evaluate` in the worksheet layer's
Excel-shaped form (numbers, text, ``None`` for a blank or omitted argument,
2-D lists for ranges, :class:`tubefuncs.errors.CellError` for an error value);
its input errors come back as Excel error values, and their messages are
noted for the report.
"""

from __future__ import annotations

import math

import numpy as np

from . import values as V

#: Prefixes that saved files put before the names of user-defined functions.  The
#: last is LibreOffice Calc's: it saves a call of our extension under its long
#: programmatic name (implementation name + function, upper case).
UDF_PREFIXES = ("_XLUDF.", "_XLL.", "_XLFN._XLWS.", "_XLWS.", "_XLFN.",
                "ORG.TUBEFUNCS.CALC.FUNCTIONS.")


def strip_udf_prefix(name: str) -> str:
    """Catalogue name of a saved UDF name.

    ``_xludf.TUBE_GAMMA``, ``'C:\\addin.xlam'!TUBE_GAMMA``, ``[1]!TUBE_GAMMA`` -> ``TUBE_GAMMA``.
    """
    upper = name.upper()
    if "!" in upper:          # add-in or external-workbook qualified name
        upper = upper.rpartition("!")[2]
    changed = True
    while changed:
        changed = False
        for prefix in UDF_PREFIXES:
            if upper.startswith(prefix):
                upper = upper[len(prefix):]
                changed = True
    return upper


def catalogue_names() -> frozenset:
    """Worksheet names of the catalogue (without importing its topic modules when
    the catalogue's name index is at hand)."""
    try:
        from ..catalogue import names
        return names()
    except Exception:  # pragma: no cover - a broken catalogue must not stop Excel functions
        return frozenset()


def _to_worksheet(value, cell_error):
    """Engine value -> the worksheet layer's Excel-shaped argument."""
    if value is V.EMPTY or value is None:
        return None
    if isinstance(value, np.ndarray):
        arr = V.as_array(value)
        return [[_to_worksheet(v, cell_error) for v in row] for row in arr.tolist()]
    if V.is_error(value):
        return cell_error(str(value), "")
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return value


class CatalogueFunction:
    """A catalogue function bound for the engine: call with engine values."""

    def __init__(self, name: str, notes):
        self.name = name
        self._notes = notes      # callable(code, message, element=None)

    def __call__(self, *args):
        from .. import errors as tube_errors
        from .. import worksheet

        cell_error = tube_errors.CellError
        try:
            converted = [_to_worksheet(a, cell_error) for a in args]
            result = worksheet.evaluate(self.name, converted)
        except tube_errors.TubeInputError as exc:
            code = exc.error_value if exc.error_value in V.ERRORS else "#VALUE!"
            self._notes(code, exc.message)
            return V.error(code)
        except Exception as exc:  # a bug in a physics module: visible, never a crash
            self._notes("#VALUE!", f"{self.name}: internal error {type(exc).__name__}: {exc}")
            return V.VALUE
        return self._from_evaluation(result)

    def _from_evaluation(self, result):
        value = result.value
        errors = getattr(result, "errors", None) or {}
        if isinstance(value, str):
            return value
        if isinstance(value, np.ndarray) and value.ndim > 0:
            arr = np.asarray(value)
            arr = arr.reshape(arr.shape[0], -1) if arr.ndim != 2 else arr
            out = np.empty(arr.shape, dtype=object)
            for (r, c), x in np.ndenumerate(arr):
                err = errors.get((r, c))
                if err is not None:
                    code = err.error_value if err.error_value in V.ERRORS else "#VALUE!"
                    out[r, c] = V.error(code)
                    self._notes(code, err.message, (r, c))
                elif isinstance(x, (float, np.floating, int, np.integer)) and not math.isfinite(x):
                    out[r, c] = V.NUM
                    self._notes("#NUM!", f"{self.name}: result is not a finite number", (r, c))
                else:
                    out[r, c] = V.scalar(x)
            return out
        value = V.scalar(value)
        if isinstance(value, float) and not math.isfinite(value):
            self._notes("#NUM!", f"{self.name}: result is not a finite number")
            return V.NUM
        return value
