"""Bounds on what one formula may build: arrays and texts, checked before the work.

Spreadsheet applications refuse a result they cannot hold; so does the engine,
with an error value and its reason, before the memory is spent:

- an array a formula computes (an operator broadcasting a column against a
  row, MUNIT, MMULT, any standard function over ranges) has at most
  ``Limits.max_array_cells`` elements: ``#NUM!`` beyond;
- a text has at most 32,767 characters (Excel's limit of a cell's text):
  ``#VALUE!`` beyond (``REPT("abc", 1E9)`` is refused before it is built).

An operator or function that combines arrays of shapes (r1 x c1) and
(r2 x c2) gives max(r1, r2) x max(c1, c2) elements (Excel pads the smaller);
that product is what is checked.  Aggregates (SUM, COUNT, SUMPRODUCT...) read
their arguments one by one and build no broadcast: each argument is bounded
by the range limit instead.
"""

from __future__ import annotations

import math

import numpy as np

from . import values as V
from .limits import MAX_TEXT_LENGTH

#: Functions that read each argument on its own (no broadcast between them).
AGGREGATES = frozenset({
    "SUM", "COUNT", "COUNTA", "COUNTBLANK", "AVERAGE", "AVERAGEA", "MAX", "MAXA", "MIN",
    "MINA", "PRODUCT", "MEDIAN", "STDEV", "STDEV.S", "STDEV.P", "STDEVP", "STDEVA", "VAR",
    "VAR.S", "VAR.P", "VARP", "VARA", "SUMSQ", "GEOMEAN", "HARMEAN", "LARGE", "SMALL", "AVEDEV",
    "DEVSQ", "MODE", "MODE.SNGL", "SUMPRODUCT", "CONCAT", "CONCATENATE", "TEXTJOIN", "AND",
    "OR", "XOR", "NPV", "IRR", "CHOOSE", "INDEX", "MATCH", "LOOKUP", "VLOOKUP", "HLOOKUP",
    "XLOOKUP", "XMATCH", "SUMIF", "SUMIFS", "COUNTIF", "COUNTIFS", "AVERAGEIF", "AVERAGEIFS",
    "MAXIFS", "MINIFS", "TRANSPOSE", "ROWS", "COLUMNS", "SUMX2MY2", "SUMX2PY2", "SUMXMY2",
    "CORREL", "COVAR", "COVARIANCE.P", "COVARIANCE.S", "PEARSON", "RSQ", "SLOPE", "INTERCEPT",
    "FORECAST", "TREND", "GROWTH", "LINEST", "LOGEST", "PERCENTILE", "QUARTILE", "RANK",
    "PERCENTRANK", "FREQUENCY", "MDETERM", "MINVERSE", "SORT", "UNIQUE", "FILTER",
})
#: Text-joining functions whose result length is the sum of their arguments' lengths.
_JOINERS = frozenset({"CONCAT", "CONCATENATE", "TEXTJOIN"})


def _bare(name: str) -> str:
    name = name.upper()
    return name[6:] if name.startswith("_XLFN.") else name


def _shape(value):
    if isinstance(value, np.ndarray):
        arr = V.as_array(value)
        return arr.shape
    return None


def _too_big(env, what: str, rows: int, cols: int):
    limit = env.limits.max_array_cells
    return env.fail("#NUM!", f"{what}: an array of {rows:,} x {cols:,} = {rows * cols:,} "
                             f"elements, over the limit of {limit:,}")


def broadcast_refusal(env, what: str, args):
    shapes = [s for s in map(_shape, args) if s is not None]
    if len(shapes) < 2:
        return None
    rows = max(s[0] for s in shapes)
    cols = max(s[1] for s in shapes)
    if rows * cols > env.limits.max_array_cells:
        return _too_big(env, what, rows, cols)
    return None


def _count(value) -> float:
    """A function's count argument as Excel truncates it, or None if not a number."""
    value = V.scalar(value)
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        try:
            value = float(str(value).strip())
        except (TypeError, ValueError):
            return None
    return math.trunc(value) if math.isfinite(value) else None


def _text_length(value) -> int:
    if isinstance(value, np.ndarray):
        return max((len(v) for v in value.flat if isinstance(v, str)), default=0)
    return len(value) if isinstance(value, str) else 24


def check_call(env, name: str, args):
    """The error value refusing a standard function call, or None to go on."""
    bare = _bare(name)
    if bare == "REPT" and len(args) == 2:
        n = _count(args[1])
        if n is not None and not isinstance(args[0], np.ndarray) and not isinstance(
                args[1], np.ndarray):
            text = V.scalar(args[0])
            length = len(text) if isinstance(text, str) else len(str(text))
            if n > 0 and length * n > MAX_TEXT_LENGTH:
                return env.fail("#VALUE!", f"REPT: the text would have {length * n:,.0f} "
                                           f"characters, over Excel's {MAX_TEXT_LENGTH:,}")
    if bare == "SUBSTITUTE" and len(args) in (3, 4) and not any(
            isinstance(a, np.ndarray) for a in args):
        text, old, new = (str(V.scalar(a)) if V.scalar(a) is not V.EMPTY else ""
                          for a in args[:3])
        if old and len(new) > len(old):
            count = text.count(old) if len(args) == 3 else 1
            length = len(text) + count * (len(new) - len(old))
            if length > MAX_TEXT_LENGTH:
                return env.fail("#VALUE!", f"SUBSTITUTE: the text would have {length:,} "
                                           f"characters, over Excel's {MAX_TEXT_LENGTH:,}")
    if bare == "MUNIT" and args:
        n = _count(args[0])
        if n is not None and n * n > env.limits.max_array_cells:
            return _too_big(env, "MUNIT", n, n)
    if bare == "MMULT" and len(args) == 2:
        a, b = _shape(args[0]), _shape(args[1])
        if a is not None and b is not None and a[0] * b[1] > env.limits.max_array_cells:
            return _too_big(env, "MMULT", a[0], b[1])
    if bare in _JOINERS:
        total = sum(_text_length(a) * (a.size if isinstance(a, np.ndarray) else 1)
                    for a in args)
        if total > 4 * MAX_TEXT_LENGTH and total > MAX_TEXT_LENGTH * 8:
            return env.fail("#VALUE!", f"{bare}: the text would have up to {total:,} "
                                       f"characters, over Excel's {MAX_TEXT_LENGTH:,}")
    if bare in AGGREGATES:
        return None
    return broadcast_refusal(env, bare, args)


def check_operator(env, op: str, a, b):
    refused = broadcast_refusal(env, f"operator {op}", (a, b))
    if refused is not None:
        return refused
    if op == "&":
        n = max(np.size(a) if isinstance(a, np.ndarray) else 1,
                np.size(b) if isinstance(b, np.ndarray) else 1)
        longest = _text_length(a) + _text_length(b)
        if n > 1 and longest * n > 64 * MAX_TEXT_LENGTH * 1024:
            return env.fail("#VALUE!", f"operator &: the texts would total up to "
                                       f"{longest * n:,} characters; refused")
    return None


def check_text(env, what: str, result):
    """A text result over Excel's 32,767 characters is #VALUE! (per element of an array)."""
    if isinstance(result, str):
        if len(result) > MAX_TEXT_LENGTH and not V.is_error(result):
            return env.fail("#VALUE!", f"{what}: a text of {len(result):,} characters, over "
                                       f"Excel's {MAX_TEXT_LENGTH:,}")
        return result
    if isinstance(result, np.ndarray) and result.dtype == object and result.size:
        long = [i for i, v in enumerate(result.flat)
                if isinstance(v, str) and len(v) > MAX_TEXT_LENGTH]
        if long:
            out = np.array(result, dtype=object, copy=True)
            flat = out.reshape(-1)
            for i in long:
                flat[i] = V.VALUE
            env.note("#VALUE!", f"{what}: a text over Excel's {MAX_TEXT_LENGTH:,} characters")
            return out
    return result
