"""Points of a study and the evaluation of one chunk of them.

Points are never listed whole: a chunk computes its own inputs from the point
numbers (grid: the mixed-radix digits of the number; sample: draws from
random streams keyed by the seed, the variable and a block of
:data:`BLOCK` points, so a point's draw does not depend on the chunk size,
the scheduler or the other variables).

Each result is evaluated through the catalogue: one vectorised call of the
physics function over the chunk (domains and cross-argument checks as the
worksheet layer applies them), then every point that is out of domain or has
no finite result is called again alone through :func:`tubefuncs.worksheet.evaluate`,
so its row carries the worksheet's own error value and message.  A result
whose cavity table varies from point to point, or a function that does not
broadcast, is called point by point through the worksheet layer.
"""

from __future__ import annotations

import numpy as np
import pyarrow as pa

from .. import worksheet
from ..catalogue import lookup
from ..units import apply_converter, result_converter
from .study import Study, error_text

BLOCK = 4096


def _draws(study: Study, var, a: int, b: int, width: int) -> np.ndarray:
    """Standard draws (normal N(0,1) or uniform on [-1, 1]) for points a..b-1."""
    out = np.empty((b - a, width))
    first, last = a // BLOCK, (b - 1) // BLOCK
    for blk in range(first, last + 1):
        rng = np.random.default_rng([study.seed, var.stream, blk])
        if var.law == "normal":
            z = rng.standard_normal((BLOCK, width))
        else:
            z = rng.uniform(-1.0, 1.0, (BLOCK, width))
        lo, hi = max(a, blk * BLOCK), min(b, (blk + 1) * BLOCK)
        out[lo - a:hi - a] = z[lo - blk * BLOCK:hi - blk * BLOCK]
    return out


def inputs(study: Study, a: int, b: int) -> dict:
    """Values of every variable for points a..b-1.

    Number variables give an (n,) array; a table column over every row gives
    an (n, rows) array; one table cell gives an (n,) array.
    """
    n = b - a
    values = {}
    if study.mode == "grid":
        digits = np.unravel_index(np.arange(a, b, dtype=np.int64), study.grid_shape)
        for var, d in zip(study.variables, digits):
            values[var.key] = np.asarray(var.grid, dtype=float)[d]
        return values
    for var in study.variables:
        if var.col is None:
            nominal = np.full((n, 1), var.nominal)
        else:
            column = study.fixed[var.param][:, var.col]
            nominal = np.broadcast_to(column if var.row is None else column[var.row:var.row + 1],
                                      (n, study.tables[var.param] if var.row is None else 1))
        width = nominal.shape[1]
        z = _draws(study, var, a, b, width)
        spread = var.spread * np.abs(nominal) if var.relative else var.spread
        x = nominal + spread * z
        values[var.key] = x[:, 0] if (var.col is None or var.row is not None) else x
    return values


def arguments(study: Study, result, values: dict, n: int) -> list:
    """Arguments of one result function, per parameter: SI float, text, None
    (default), an (n,) column, a fixed table or an (n, rows, cols) stack of tables."""
    fn = lookup(result.function)
    by_param = {}
    for var in study.variables:
        by_param.setdefault(var.param, []).append(var)
    args = []
    for p in fn.params:
        if p.name in result.args:
            args.append(result.args[p.name])
            continue
        vars_ = by_param.get(p.name)
        if p.kind == "table" and vars_:
            base = study.fixed[p.name]
            stack = np.repeat(base[None, :, :], n, axis=0)
            for var in vars_:
                x = values[var.key]
                if var.row is None:
                    stack[:, :, var.col] = x
                else:
                    stack[:, var.row, var.col] = x
            args.append(stack)
        elif vars_:
            args.append(values[vars_[0].key])
        else:
            args.append(study.fixed.get(p.name, p.default if not p.required else None))
    return args


def _point_args(fn, args, i):
    out = []
    for p, a in zip(fn.params, args):
        if isinstance(a, np.ndarray) and p.kind == "number":
            out.append(float(a[i]))
        elif isinstance(a, np.ndarray) and p.kind == "table" and a.ndim == 3:
            out.append(_table_for_worksheet(a[i]))
        elif isinstance(a, np.ndarray) and p.kind == "table":
            out.append(_table_for_worksheet(a))
        else:
            out.append(a)
    return out


def _table_for_worksheet(table):
    """A table as the worksheet layer reads a range (NaN cells become empty cells)."""
    if not np.isnan(table).any():
        return table
    return [[None if x != x else float(x) for x in row] for row in table.tolist()]


def _one(name, fn, args, i, unit):
    """Value and error text of point i, called alone through the worksheet layer."""
    call = _point_args(fn, args, i)
    if fn.takes_unit:
        call.append(unit or None)
    try:
        value = worksheet.evaluate(name, call).value
        if isinstance(value, np.ndarray):
            value = float(value.reshape(-1)[0]) if value.size == 1 else float("nan")
        value = float(value)
        if not np.isfinite(value):
            return float("nan"), f"#NUM! {name}: no finite result"
        return value, None
    except Exception as exc:  # noqa: BLE001  (a failed point is an error in its row)
        return float("nan"), error_text(exc)


def evaluate_result(study: Study, result, values: dict, n: int):
    """(values (n,), errors: object array of text or None) of one result column."""
    fn = lookup(result.function)
    args = arguments(study, result, values, n)
    per_point = (fn.returns_text or fn.result_kind != "broadcast"
                 or any(isinstance(a, np.ndarray) and a.ndim == 3 for a in args))
    out = np.full(n, np.nan)
    errors = np.full(n, None, dtype=object)
    if per_point:
        for i in range(n):
            out[i], errors[i] = _one(fn.name, fn, args, i, result.unit)
        return out, errors
    _vector(fn, args, result.unit, np.arange(n), out, errors)
    return out, errors


def _vector(fn, args, unit, idx, out, errors):
    """Vector evaluation of the points ``idx``; halves the set when the physics
    raises on it, down to single points through the worksheet layer."""
    n = idx.size
    if n <= 4:
        for i in idx.tolist():
            out[i], errors[i] = _one(fn.name, fn, args, i, unit)
        return
    call = []
    ok = np.ones((n, 1), dtype=bool)
    for p, a in zip(fn.params, args):
        if isinstance(a, np.ndarray) and p.kind == "number":
            col = a[idx].reshape(n, 1)
            good = p.domain.ok(col)
            ok &= good
            call.append(np.where(good, col, np.nan))
        else:
            call.append(a)
    names = [p.name for p in fn.params]
    for check in fn.checks:
        operands = [call[names.index(a)] for a in check.args]
        if any(op is None for op in operands):
            continue
        ok &= np.broadcast_to(worksheet._check_mask(check, operands), (n, 1))
    try:
        with np.errstate(all="ignore"):
            res = fn.func(*call)
            res = np.asarray(res, dtype=float)
            if unit:
                res = np.asarray(apply_converter(result_converter(unit, fn.result_unit), res),
                                 dtype=float)
        res = np.broadcast_to(res, (n, 1)).reshape(n)
    except Exception:  # noqa: BLE001  (find the points that make the physics raise)
        half = n // 2
        _vector(fn, args, unit, idx[:half], out, errors)
        _vector(fn, args, unit, idx[half:], out, errors)
        return
    out[idx] = res
    bad = ~ok.reshape(n) | ~np.isfinite(res)
    for i in idx[bad].tolist():
        out[i], errors[i] = _one(fn.name, fn, args, i, unit)


def run_chunk(study: Study, k: int) -> pa.Table:
    """Rows of chunk k: point number, inputs (SI), each result and its error text."""
    a, b = study.chunk_bounds(k)
    n = b - a
    values = inputs(study, a, b)
    cols = {"point": pa.array(np.arange(a, b, dtype=np.int64))}
    for var in study.variables:
        x = values[var.key]
        if x.ndim == 2:
            for r in range(x.shape[1]):
                cols[f"{var.param}[{r + 1}].{_col(var.col)}"] = pa.array(x[:, r])
        else:
            cols[var.key] = pa.array(x)
    for result in study.results:
        y, err = evaluate_result(study, result, values, n)
        cols[result.name] = pa.array(y, mask=np.not_equal(err, None).astype(bool))
        cols[f"{result.name}_error"] = pa.array(err, type=pa.string())
    return pa.table(cols)


def failed_chunk(study: Study, k: int, message: str) -> pa.Table:
    """Rows of a chunk whose task itself failed: the inputs, and the message in every
    result's error column (no row is lost)."""
    a, b = study.chunk_bounds(k)
    n = b - a
    values = inputs(study, a, b)
    cols = {"point": pa.array(np.arange(a, b, dtype=np.int64))}
    for var in study.variables:
        x = values[var.key]
        if x.ndim == 2:
            for r in range(x.shape[1]):
                cols[f"{var.param}[{r + 1}].{_col(var.col)}"] = pa.array(x[:, r])
        else:
            cols[var.key] = pa.array(x)
    text = f"#VALUE! sweep: {message}"[:255]
    for result in study.results:
        cols[result.name] = pa.nulls(n, pa.float64())
        cols[f"{result.name}_error"] = pa.array([text] * n, type=pa.string())
    return pa.table(cols)


def _col(col):
    from .study import _col_name

    return _col_name(col)
