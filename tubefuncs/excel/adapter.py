"""Bridge between values as classic xlwings hands them over and the worksheet layer.

The generated UDF module (:mod:`tubefuncs.excel.udfs`) declares every argument
with ``ndim=2`` and ``err_to_str=True``; xlwings therefore passes

* a range or a single cell as a list of row lists (a single cell: ``[[x]]``),
  with ``None`` for empty cells and the text of an Excel error (``"#DIV/0!"``)
  for an error cell,
* an omitted optional argument as the Python default, ``None``.

:func:`call` turns those into the arguments of
:func:`tubefuncs.worksheet.evaluate`, and its result into what a classic
xlwings cell can show: a float, a text, or a list of row lists of floats and
texts.  Classic xlwings cannot return Excel error values with their code: it
passes unknown objects through to pywin32 (``prepare_xl_data_element``), and
pywin32 turns a ``win32com.client.VARIANT(VT_ERROR, code)`` into an error
variant, per element of a list too, but drops the code and always sends
``DISP_E_PARAMNOTFOUND`` (``MakeObjToVariant`` in pywin32's ``oleargs.cpp``);
NaN becomes an empty text, an exception's text lands in the cell.  So an error
is a short text that
starts with the error value and names the function and the argument, e.g.
``#NUM! TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)``: never a traceback,
never more than 255 characters.

This module does not import xlwings: it is plain Python, testable anywhere.
"""

from __future__ import annotations

import logging
import math
from collections.abc import Sequence
from numbers import Real
from typing import Any

import numpy as np

from ..catalogue import lookup
from ..errors import EXCEL_ERROR_VALUES, MAX_CELL_TEXT, CellError, TubeInputError

log = logging.getLogger(__name__)

_ERROR_TEXTS = frozenset(EXCEL_ERROR_VALUES) | {"#GETTING_DATA", "#BLOCKED!", "#FIELD!",
                                               "#BUSY!", "#CONNECT!", "#UNKNOWN!",
                                               "#EXTERNAL!", "#PYTHON!"}


def cell_text(error_value: str, function: str, message: str) -> str:
    """``#NUM! TUBE_X: message``, cut to the 255 characters a cell shows."""
    text = f"{error_value} {function}: {message}"
    if len(text) > MAX_CELL_TEXT:
        text = text[: MAX_CELL_TEXT - 3] + "..."
    return text


# --- arguments ----------------------------------------------------------------

def _element(x: Any) -> Any:
    """One cell value from xlwings -> worksheet-layer value."""
    if isinstance(x, str) and x in _ERROR_TEXTS:
        return CellError(x)
    if isinstance(x, np.generic):
        return x.item()
    return x


def _is_rows(value: Any) -> bool:
    return isinstance(value, (list, tuple)) and len(value) > 0 and all(
        isinstance(row, (list, tuple)) for row in value)


def from_excel(value: Any, kind: str = "number") -> Any:
    """Convert one argument as xlwings passes it (see module docstring).

    A 1 x 1 range becomes its single value, except for ``table`` arguments,
    which stay 2-D.  Error texts become :class:`~tubefuncs.errors.CellError`.
    numpy arrays pass through; numpy scalars become Python scalars.
    """
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            return _element(value.item())
        return value
    if _is_rows(value):
        rows = [[_element(x) for x in row] for row in value]
        if kind != "table" and len(rows) == 1 and len(rows[0]) == 1:
            return rows[0][0]
        return rows
    if isinstance(value, (list, tuple)):
        # A flat sequence (not what xlwings sends with ndim=2): read it as one row.
        if len(value) == 0:
            return None
        return from_excel([list(value)], kind)
    return _element(value)


# --- results ------------------------------------------------------------------

def _number_or_text(x: Any, function: str) -> float | str:
    if isinstance(x, str):
        return x
    if isinstance(x, CellError):
        return x.code
    if isinstance(x, (bool, np.bool_)):
        return bool(x)
    if isinstance(x, (Real, np.number)):
        v = float(x)
        if math.isfinite(v):
            return v
        return cell_text("#NUM!", function, "no finite result for these inputs")
    if x is None:
        return cell_text("#NUM!", function, "no result for these inputs")
    return str(x)


def to_excel(evaluation: Any, function: str) -> float | str | list[list[float | str]]:
    """Evaluation (``.value``, ``.errors``) -> float, text or list of row lists.

    Elements listed in ``.errors`` show that error's cell text; any other
    element without a finite value shows a ``#NUM!`` text rather than the
    empty cell xlwings would make of NaN.  A 1 x 1 result is returned as a
    single value.
    """
    value = evaluation.value
    errors = getattr(evaluation, "errors", None) or {}
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            value = value.item()
        else:
            if value.ndim == 1:          # a 1-D result is read as a column
                value = value.reshape(-1, 1)
            elif value.ndim > 2:
                return cell_text("#VALUE!", function, f"result has {value.ndim} dimensions")
            rows: list[list[float | str]] = []
            for i in range(value.shape[0]):
                row: list[float | str] = []
                for j in range(value.shape[1]):
                    err = errors.get((i, j))
                    row.append(err.cell_text() if err is not None
                               else _number_or_text(value[i, j], function))
                rows.append(row)
            if len(rows) == 1 and len(rows[0]) == 1:
                return rows[0][0]
            if not rows or not rows[0]:
                return cell_text("#VALUE!", function, "empty result")
            return rows
    if errors:
        err = next(iter(errors.values()))
        return err.cell_text()
    if isinstance(value, (list, tuple)):
        return to_excel(_Plain(np.asarray(value, dtype=object), {}), function)
    return _number_or_text(value, function)


class _Plain:
    __slots__ = ("errors", "value")

    def __init__(self, value, errors):
        self.value = value
        self.errors = errors


# --- the one entry point of every generated function -------------------------

def call(name: str, args: Sequence[Any]) -> float | str | list[list[float | str]]:
    """Evaluate worksheet function ``name`` on xlwings-shaped ``args``.

    Never raises: input errors come back as their cell text, and anything
    unexpected as a short ``#VALUE!`` text (the details go to the log).
    """
    fn = lookup(name)
    if fn is None:
        return cell_text("#NAME?", name, "not in this version of tubefuncs; "
                                         "run Import Functions again")
    params = fn.worksheet_params
    try:
        converted = [from_excel(a, params[i].kind if i < len(params) else "number")
                     for i, a in enumerate(args)]
        from ..worksheet import evaluate  # imported here: cheap after the first call

        return to_excel(evaluate(name, converted), name)
    except TubeInputError as exc:
        return exc.cell_text()
    except Exception as exc:  # a cell must never show a traceback
        log.exception("tubefuncs: %s failed", name)
        return cell_text("#VALUE!", name,
                         f"internal error ({type(exc).__name__}: {exc}); please report it")
