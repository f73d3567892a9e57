"""The worksheet-call layer: Excel-shaped arguments in, Excel-shaped results out.

Every front end (xlwings add-in, headless engine) calls catalogue functions
through :func:`evaluate`.  It

1. converts each argument (number in the parameter's SI unit, text with a
   unit, empty cell, 2-D range, numpy array, error value) to SI floats,
2. checks each element against the parameter's domain and the function's
   cross-argument checks,
3. calls the physics function once on the broadcast arrays,
4. converts the result to the requested ``unit``.

A scalar call with a bad argument raises :class:`TubeInputError`; inside a
range, a bad element becomes NaN with its error kept in
:attr:`Evaluation.errors`, while the valid elements are computed.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .catalogue import lookup
from .catalogue.spec import Function, Param
from .errors import NAME, NUM, VALUE, CellError, TubeInputError, show_value
from .units import UnitTextError, apply_converter, result_converter, to_si

_NUMBER_TYPES = (float, int, np.floating, np.integer)


@dataclass
class Evaluation:
    """Result of a worksheet call.

    value : float, str or 2-D float ndarray (NaN where an element is invalid).
    errors : {(row, col): TubeInputError} for invalid elements of an array.
    """

    value: Any
    errors: dict = field(default_factory=dict)

    @property
    def is_array(self) -> bool:
        return isinstance(self.value, np.ndarray)


def call(name: str, *args):
    """Call a worksheet function; scalar or 2-D array out (NaN for bad elements)."""
    return evaluate(name, args).value


def evaluate(name: str, args: Sequence) -> Evaluation:
    """Evaluate worksheet function ``name`` on Excel-shaped ``args``."""
    fn = lookup(name) if isinstance(name, str) else None
    if fn is None:
        raise TubeInputError(f"{name}: unknown function", NAME, function=str(name))
    params = fn.worksheet_params
    slot = fn.extra.get("former_unit_slot")
    if slot is not None and len(args) == slot + 1:
        args = _former_unit_position(params, args, slot)
    if len(args) > len(params):
        raise TubeInputError(
            f"{fn.name}: takes at most {len(params)} arguments (got {len(args)})", VALUE,
            function=fn.name)
    return _Call(fn, params, args).run()


def _former_unit_position(params, args, slot):
    """Arguments with a unit text in its former slot moved to the last (``unit``) slot.

    A function that gained optional text options between its last argument and
    ``unit`` still reads a call written for the old order: a text in the first
    option's slot that is none of that option's choices is the unit.
    """
    raw = args[slot]
    if isinstance(raw, str) and raw.strip() and params[slot].choices and \
            raw.strip().lower() not in {c.lower() for c in params[slot].choices}:
        return tuple(args[:slot]) + (None,) * (len(params) - 1 - slot) + (raw,)
    return args


class _Call:
    """State of one evaluation (kept small: the scalar path must be fast)."""

    __slots__ = ("fn", "params", "args", "values", "array_errors", "shape", "unit")

    def __init__(self, fn: Function, params: tuple[Param, ...], args: Sequence):
        self.fn = fn
        self.params = params
        self.args = args
        self.values: list = []
        self.array_errors: list = []  # (position, object array of errors or None)
        self.shape = None             # broadcast shape once an array argument is seen
        self.unit = None

    # -- errors -------------------------------------------------------------

    def error(self, param: Param | None, text: str, code: str = VALUE) -> TubeInputError:
        where = f"{self.fn.name}: {param.name} " if param is not None else f"{self.fn.name}: "
        return TubeInputError(where + text, code, function=self.fn.name,
                              argument=param.name if param is not None else None)

    # -- arguments ----------------------------------------------------------

    def run(self) -> Evaluation:
        fn = self.fn
        n_args = len(self.args)
        for i, param in enumerate(self.params):
            raw = self.args[i] if i < n_args else None
            if param.name == "unit" and fn.takes_unit and i == len(self.params) - 1:
                self.unit = self.text_argument(param, raw)
                continue
            if param.kind == "number":
                self.values.append(self.number_argument(param, raw))
            elif param.kind == "text":
                self.values.append(self.text_argument(param, raw))
            else:
                self.values.append(self.table_argument(param, raw))
        converter = None
        if self.unit:
            try:
                converter = result_converter(self.unit, fn.result_unit)
            except UnitTextError as exc:
                raise self.error(self.params[-1], f"'{self.unit}': {exc}") from None
        if self.shape is None:
            return Evaluation(self.scalar_result(converter))
        return self.array_result(converter)

    def number_argument(self, param: Param, raw):
        if isinstance(raw, (list, tuple, np.ndarray)):
            return self.number_range(param, raw)
        value = self.number_scalar(param, raw)
        if isinstance(value, TubeInputError):
            raise value
        return value

    def number_scalar(self, param: Param, raw):
        """SI float, None (optional omitted), or a TubeInputError (not raised)."""
        if raw is None or (isinstance(raw, str) and raw.strip() == ""):
            if param.required:
                return self.error(param, "is required (got an empty cell)")
            return param.default
        if isinstance(raw, (bool, np.bool_)):
            return self.error(param, f"must be a number or a number with a unit (got "
                              f"{'TRUE' if raw else 'FALSE'})")
        if isinstance(raw, _NUMBER_TYPES):
            value = float(raw)
        elif isinstance(raw, str):
            try:
                value = to_si(raw, param.unit, param.difference)
            except UnitTextError as exc:
                return self.error(param, f"{show_value(raw)}: {exc}")
        elif isinstance(raw, CellError):
            return TubeInputError(raw.message or f"{self.fn.name}: {param.name} is {raw.code}",
                                  raw.code, function=self.fn.name, argument=param.name)
        else:
            return self.error(param, f"must be a number or text (got {type(raw).__name__})")
        if not param.domain.ok_scalar(value):
            unit = param.unit
            allowed = param.domain.describe(unit)
            if not math.isfinite(value):
                allowed = "a finite number" + ("" if allowed == "finite" else f" ({allowed})")
            return self.error(param, f"must be {allowed} (got "
                              f"{show_value(value)}{' ' + unit if unit else ''})", NUM)
        return value

    def number_range(self, param: Param, raw):
        grid = _as_grid(raw)
        if isinstance(grid, str):
            raise self.error(param, grid)
        if grid.dtype.kind in "fiu":
            values = grid.astype(float)
            bad = ~param.domain.ok(values)
            errors = None
            if bad.any():
                errors = np.full(values.shape, None, dtype=object)
                for idx in zip(*np.nonzero(bad)):
                    errors[idx] = self.number_scalar(param, float(values[idx]))
                values = np.where(bad, np.nan, values)
        else:
            values = np.empty(grid.shape, dtype=float)
            errors = np.full(grid.shape, None, dtype=object)
            any_bad = False
            for idx, item in np.ndenumerate(grid):
                out = self.number_scalar(param, item)
                if isinstance(out, TubeInputError):
                    errors[idx] = out
                    values[idx] = np.nan
                    any_bad = True
                elif out is None:  # empty cell in an optional argument's range
                    errors[idx] = self.error(param, "has an empty cell in its range")
                    values[idx] = np.nan
                    any_bad = True
                else:
                    values[idx] = out
            if not any_bad:
                errors = None
        self.broadcast_with(param, values.shape)
        if errors is not None:
            self.array_errors.append(errors)
        return values

    def broadcast_with(self, param: Param, shape):
        try:
            self.shape = shape if self.shape is None else np.broadcast_shapes(self.shape, shape)
        except ValueError:
            raise self.error(param, f"range of shape {shape[0]}x{shape[1]} does not match the "
                             f"other ranges ({self.shape[0]}x{self.shape[1]})") from None

    def text_argument(self, param: Param, raw):
        if raw is None or (isinstance(raw, str) and raw.strip() == ""):
            if param.required:
                raise self.error(param, "is required (got an empty cell)")
            return param.default
        if isinstance(raw, CellError):
            raise TubeInputError(raw.message or f"{self.fn.name}: {param.name} is {raw.code}",
                                 raw.code, function=self.fn.name, argument=param.name)
        if isinstance(raw, np.ndarray) and raw.size == 1:
            raw = raw.reshape(-1)[0]
        if isinstance(raw, (list, tuple)) and len(raw) == 1:
            raw = raw[0][0] if isinstance(raw[0], (list, tuple)) and len(raw[0]) == 1 else raw[0]
        if not isinstance(raw, str):
            raise self.error(param, f"must be text (got {show_value(raw)})")
        text = raw.strip()
        if param.choices:
            for choice in param.choices:
                if text.lower() == choice.lower():
                    return choice
            allowed = ", ".join(f"'{c}'" for c in param.choices)
            raise self.error(param, f"must be one of {allowed} (got {show_value(raw)})")
        return text

    def table_argument(self, param: Param, raw):
        if raw is None:
            if param.required:
                raise self.error(param, "is required (got an empty cell)")
            return param.default
        grid = _as_grid(raw if isinstance(raw, (list, tuple, np.ndarray)) else [[raw]])
        if isinstance(grid, str):
            raise self.error(param, grid)
        if grid.dtype.kind in "fiu":
            return grid.astype(float)
        table = np.empty(grid.shape, dtype=float)
        for idx, item in np.ndenumerate(grid):
            if item is None or (isinstance(item, str) and item.strip() == ""):
                table[idx] = np.nan
            elif isinstance(item, _NUMBER_TYPES) and not isinstance(item, (bool, np.bool_)):
                table[idx] = float(item)
            elif isinstance(item, CellError):
                raise TubeInputError(f"{self.fn.name}: {param.name} contains {item.code} at "
                                     f"row {idx[0] + 1}, column {idx[1] + 1}", item.code,
                                     function=self.fn.name, argument=param.name)
            else:
                try:
                    table[idx] = to_si(item, "") if isinstance(item, str) else float("x")
                except (UnitTextError, ValueError):
                    raise self.error(param, f"must hold numbers; row {idx[0] + 1}, column "
                                     f"{idx[1] + 1} is {show_value(item)}") from None
        return table

    # -- results -------------------------------------------------------------

    def checks_failed(self, values) -> tuple[str, str] | None:
        """Message of the first failing cross-argument check (scalar path)."""
        names = [p.name for p in self.params]
        for check in self.fn.checks:
            operands = [values[names.index(a)] for a in check.args]
            if any(op is None for op in operands):
                continue
            if not _check_passes(check, operands):
                return _check_text(check, operands), check.error_value
        return None

    def call_physics(self, values):
        try:
            with np.errstate(all="ignore"):
                return self.fn.func(*values)
        except (UnitTextError, LookupError, TypeError) as exc:
            raise self.error(None, str(exc).strip("'\""), VALUE) from None
        except (ValueError, ZeroDivisionError, OverflowError, ArithmeticError) as exc:
            raise self.error(None, str(exc), NUM) from None

    def scalar_result(self, converter):
        values = self.values
        failed = self.checks_failed(values)
        if failed:
            raise self.error(None, failed[0], failed[1])
        result = self.call_physics(values)
        if self.fn.returns_text:
            return str(result)
        if isinstance(result, np.ndarray) and result.size != 1:
            return self.as_grid_result(result, converter)
        value = float(result)
        if converter is not None:
            value = float(apply_converter(converter, value))
        if not math.isfinite(value):
            raise self.error(None, f"no finite result: {self.fn.invalid_result} "
                             f"({self.describe_args(values)})", NUM)
        return value

    def as_grid_result(self, result, converter):
        grid = np.asarray(apply_converter(converter, np.asarray(result, dtype=float)),
                          dtype=float)
        return grid.reshape(-1, 1) if grid.ndim == 1 else grid

    def array_result(self, converter) -> Evaluation:
        shape = self.shape
        errors = np.full(shape, None, dtype=object)
        for err in self.array_errors:
            err = np.broadcast_to(err, shape)
            take = np.equal(errors, None) & np.not_equal(err, None)
            errors[take] = err[take]
        names = [p.name for p in self.params]
        kinds = {p.name: p.kind for p in self.params}
        for check in self.fn.checks:
            operands = [self.values[names.index(a)] for a in check.args]
            if any(op is None for op in operands):
                continue
            ok = np.broadcast_to(_check_mask(check, operands), shape)
            whole = [kinds[a] == "table" for a in check.args]  # tables are never indexed
            for idx in zip(*np.nonzero(~ok & np.equal(errors, None))):
                errors[idx] = self.error(None, _check_text(
                    check, [op if w else _element(op, idx) for op, w in zip(operands, whole)]),
                    check.error_value)
        result = self.call_physics(self.values)
        with np.errstate(all="ignore"):
            out = np.array(apply_converter(converter, np.asarray(result, dtype=float)),
                           dtype=float)
        out = np.broadcast_to(out, shape).copy() if out.shape != shape else out
        invalid = np.not_equal(errors, None)
        out[invalid] = np.nan
        for idx in zip(*np.nonzero(~np.isfinite(out) & ~invalid)):
            args = [_element(v, idx) for v in self.values]
            errors[idx] = self.error(None, f"no finite result: {self.fn.invalid_result} "
                                     f"({self.describe_args(args)})", NUM)
        rows, cols = np.nonzero(np.not_equal(errors, None))
        return Evaluation(out, {(int(r), int(c)): errors[r, c] for r, c in zip(rows, cols)})

    def describe_args(self, values) -> str:
        parts = []
        for p, v in zip(self.params, values):
            if p.kind == "number" and v is not None:
                parts.append(f"{p.name}={show_value(float(v))}")
        return ", ".join(parts)


def _check_mask(check, operands):
    """Run a check with numpy's arithmetic: a boolean (array) of where it passes.

    Python floats raise OverflowError where numpy gives inf (``(1/1e-300)**2``),
    so single values become numpy floats; a check that cannot be evaluated
    fails everywhere (its message then says what is allowed).
    """
    numeric = [np.float64(op) if isinstance(op, float) else op for op in operands]
    try:
        with np.errstate(all="ignore"):
            return np.asarray(check.test(*numeric), dtype=bool)
    except (ArithmeticError, ValueError, TypeError):
        return np.asarray(False)


def _check_passes(check, operands) -> bool:
    """True when a check passes on single values (see `_check_mask`)."""
    return bool(np.all(_check_mask(check, operands)))


def _check_text(check, operands) -> str:
    """Message of a failed check: its own text (fixed or built from the operands)."""
    if callable(check.message):
        return check.message(*operands)
    got = ", ".join(f"{a}={show_value(op)}" for a, op in zip(check.args, operands)
                    if not isinstance(op, np.ndarray) or op.size == 1)
    return f"{check.message} (got {got})" if got else check.message


def _element(value, idx):
    if isinstance(value, np.ndarray) and value.ndim == 2:
        return value[tuple(i if n > 1 else 0 for i, n in zip(idx, value.shape))]
    return value


def _as_grid(raw) -> np.ndarray | str:
    """2-D array (float or object) from an Excel-shaped range, or a message."""
    if isinstance(raw, np.ndarray):
        arr = raw
    else:
        rows = list(raw)
        if rows and all(isinstance(r, (list, tuple, np.ndarray)) for r in rows):
            widths = {len(r) for r in rows}
            if len(widths) != 1:
                return "range is ragged (rows of different lengths)"
            arr = np.empty((len(rows), widths.pop()), dtype=object)
            for i, r in enumerate(rows):
                for j, item in enumerate(r):
                    arr[i, j] = item
        elif any(isinstance(r, (list, tuple, np.ndarray)) for r in rows):
            return "range mixes single values and rows"
        else:
            arr = np.empty((1, len(rows)), dtype=object)
            for j, item in enumerate(rows):
                arr[0, j] = item
        if arr.size and all(isinstance(x, _NUMBER_TYPES) and not isinstance(x, (bool, np.bool_))
                            for x in arr.flat):
            arr = arr.astype(float)
    if arr.ndim == 0:
        arr = arr.reshape(1, 1)
    elif arr.ndim == 1:
        arr = arr.reshape(1, -1)
    elif arr.ndim > 2:
        return f"range must be 2-D (got {arr.ndim} dimensions)"
    if arr.size == 0:
        return "range is empty"
    if arr.dtype.kind == "b":
        arr = arr.astype(object)
    elif arr.dtype.kind not in "fiuO":
        arr = arr.astype(object)
    return arr
