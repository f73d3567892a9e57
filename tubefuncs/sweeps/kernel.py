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


def _axis(grid: np.ndarray, stride: int, a: int, b: int) -> np.ndarray:
    """Values of one grid axis for points a..b-1 (C order: point // stride % size),
    built by repeating rather than dividing point numbers."""
    size = grid.size
    if stride == 1:
        return np.resize(np.roll(grid, -(a % size)), b - a)
    q0, q1 = a // stride, (b - 1) // stride
    counts = np.full(q1 - q0 + 1, stride, dtype=np.int64)
    counts[0] -= a - q0 * stride
    counts[-1] -= (q1 + 1) * stride - b
    return np.repeat(grid[np.arange(q0, q1 + 1) % size], counts)


def inputs(study: Study, a: int, b: int) -> dict:
    """Values of every variable for points a..b-1.

    Number variables give an (n,) array; a table column over every row gives
    an (n, rows) array; one table cell gives an (n,) array.
    """
    n = b - a
    values = {}
    if study.mode == "grid":
        shape = study.grid_shape
        stride = 1
        for var, size in reversed(list(zip(study.variables, shape))):
            values[var.key] = _axis(study.grid_values(var), stride, a, b)
            stride *= size
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
    """(values (n,), {point: error text}) of one result column (chunk-relative points)."""
    fn = lookup(result.function)
    args = arguments(study, result, values, n)
    per_point = (fn.returns_text or fn.result_kind != "broadcast"
                 or any(isinstance(a, np.ndarray) and a.ndim == 3 for a in args))
    errors: dict[int, str] = {}
    if per_point:
        out = np.full(n, np.nan)
        for i in range(n):
            out[i], err = _one(fn.name, fn, args, i, result.unit)
            if err is not None:
                errors[i] = err
        return out, errors
    out = np.empty(n)
    # grid axes whose every value is inside this parameter's domain need no check per point
    key = ("trusted", result.name)
    trusted = study.cache.get(key)
    if trusted is None:
        trusted = study.cache[key] = frozenset(
            v.param for v in study.variables if study.mode == "grid" and v.col is None
            and v.param not in result.args
            and bool(_param(fn, v.param).domain.ok(study.grid_values(v)).all()))
    _vector(fn, args, result.unit, None, n, out, errors, trusted)
    return out, errors


def _param(fn, name):
    for p in fn.params:
        if p.name == name:
            return p
    raise KeyError(name)


def _vector(fn, args, unit, idx, n, out, errors, trusted=frozenset()):
    """Vector evaluation of the points ``idx`` (None: all n); halves the set when the
    physics raises on it, down to single points through the worksheet layer."""
    if idx is not None and idx.size <= 4:
        for i in idx.tolist():
            _put(out, errors, i, _one(fn.name, fn, args, i, unit))
        return
    m = n if idx is None else idx.size
    call = []
    ok = None
    for p, a in zip(fn.params, args):
        if isinstance(a, np.ndarray) and p.kind == "number":
            col = (a if idx is None else a[idx]).reshape(m, 1)
            if p.name in trusted:
                call.append(col)
                continue
            good = p.domain.ok(col)
            if not good.all():
                col = np.where(good, col, np.nan)
                ok = good if ok is None else ok & good
            call.append(col)
        else:
            call.append(a)
    names = [p.name for p in fn.params]
    for check in fn.checks:
        operands = [call[names.index(a)] for a in check.args]
        if any(op is None for op in operands):
            continue
        mask = worksheet._check_mask(check, operands)
        if not mask.all():
            mask = np.broadcast_to(mask, (m, 1))
            ok = mask if ok is None else ok & mask
    try:
        with np.errstate(all="ignore"):
            res = np.asarray(fn.func(*call), dtype=float)
            if unit:
                res = np.asarray(apply_converter(result_converter(unit, fn.result_unit), res),
                                 dtype=float)
        res = np.broadcast_to(res, (m, 1)).reshape(m)
    except Exception:  # noqa: BLE001  (find the points that make the physics raise)
        idx = np.arange(n) if idx is None else idx
        half = idx.size // 2
        _vector(fn, args, unit, idx[:half], n, out, errors, trusted)
        _vector(fn, args, unit, idx[half:], n, out, errors, trusted)
        return
    if idx is None:
        out[:] = res
    else:
        out[idx] = res
    finite = np.isfinite(res)
    bad = ~finite if ok is None else ~(finite & ok.reshape(m))
    if bad.any():
        where = np.flatnonzero(bad) if idx is None else idx[bad]
        for i in where.tolist():
            _put(out, errors, i, _one(fn.name, fn, args, i, unit))


def _put(out, errors, i, value_error):
    out[i], err = value_error
    if err is not None:
        errors[i] = err


def _result_columns(cols, name, y, errors, n):
    """The value column (null where the point failed) and its error-text column."""
    if not errors:
        cols[name] = pa.array(y)
        cols[f"{name}_error"] = pa.nulls(n, pa.string())
        return
    text = np.full(n, None, dtype=object)
    for i, e in errors.items():
        text[i] = e
    mask = np.zeros(n, dtype=bool)
    mask[list(errors)] = True
    cols[name] = pa.array(y, mask=mask)
    cols[f"{name}_error"] = pa.array(text, type=pa.string())


def _input_columns(study: Study, k: int):
    """Points of chunk k, their input values, and the table columns of the inputs
    (point number, then each variable in SI; a table column per cavity row)."""
    a, b = study.chunk_bounds(k)
    values = inputs(study, a, b)
    cols = {"point": pa.array(np.arange(a, b, dtype=np.int64))}
    for var in study.variables:
        x = values[var.key]
        if x.ndim == 2:
            for r in range(x.shape[1]):
                cols[f"{var.param}[{r + 1}].{_col(var.col)}"] = pa.array(x[:, r])
        else:
            cols[var.key] = pa.array(x)
    return b - a, values, cols


def run_chunk(study: Study, k: int) -> pa.Table:
    """Rows of chunk k: point number, inputs (SI), each result and its error text."""
    n, values, cols = _input_columns(study, k)
    for result in study.results:
        y, err = evaluate_result(study, result, values, n)
        _result_columns(cols, result.name, y, err, n)
    return pa.table(cols)


def failed_chunk(study: Study, k: int, message: str) -> pa.Table:
    """Rows of a chunk whose task itself failed: the inputs, and the message in every
    result's error column (no row is lost)."""
    n, _, cols = _input_columns(study, k)
    text = f"#VALUE! sweep: {message}"[:255]
    for result in study.results:
        cols[result.name] = pa.nulls(n, pa.float64())
        cols[f"{result.name}_error"] = pa.array([text] * n, type=pa.string())
    return pa.table(cols)


def _col(col):
    from .study import _col_name

    return _col_name(col)
