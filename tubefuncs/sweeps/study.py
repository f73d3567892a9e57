"""A sweep or tolerance study: what to evaluate, over which points.

A study is read from a small TOML file (or a workbook sheet, see
:mod:`.sheet`) into a plain dict, and :func:`build_study` checks the whole
dict before any work starts: every function, argument, unit, grid and
tolerance is validated, and every message names the key, the value and what
is allowed.

Layout of a study file (our own keys)::

    [sweep]
    mode = "sample"          # "grid": every combination; "sample": random tubes
    points = 5000            # sample size (sample mode)
    seed = 20261202          # sample mode; the same seed gives the same tubes
    chunk = 2000             # points per chunk (optional)

    [results.gain]           # one output column per [results.NAME]
    function = "TUBE_SMALL_SIGNAL_GAIN"
    unit = ""                # optional result unit ("kW", "deg", ...)
    [results.gain_edge]
    function = "TUBE_SMALL_SIGNAL_GAIN"
    args = { frequency = "2.9995 GHz" }   # this result's own fixed arguments

    [fixed]                  # arguments shared by every result function
    frequency = "2.998 GHz"
    voltage = "90 kV"
    cavities = "cavities.csv"            # a table: CSV file beside the study, or rows

    [grid]                   # grid mode: the axes, first key slowest
    voltage = { from = "80 kV", to = "100 kV", steps = 21 }
    "cavities[3].position" = [0.20, 0.21, 0.22]

    [tolerance]              # sample mode: nominal value and spread
    current = { nominal = "27 A", normal = "0.2 A" }       # normal: standard deviation
    "cavities.frequency" = { normal = "0.4 MHz" }          # every cavity, own draw
    "cavities[1].r_over_q" = { uniform = "3 %" }           # uniform: half width

    [limits]                 # the specification, on result columns
    gain = { min = 45 }

    [summary]
    quantiles = [0.01, 0.5, 0.99]

Cavity-table columns are named ``position``, ``frequency``, ``r_over_q``,
``q0``, ``qext`` and ``gap_length`` (or ``col1`` ... for any table);
``cavities[N]`` is the N-th row, first row 1.
"""

from __future__ import annotations

import csv
import hashlib
import json
import math
import os
import re
import zlib
from dataclasses import dataclass, field

import numpy as np

from ..catalogue import lookup
from ..catalogue.spec import Function, Param
from ..errors import TubeInputError
from ..units import UnitTextError, result_converter, to_si

#: Column names of the cavity table (the small- and large-signal models' layout).
CAVITY_COLUMNS = ("position", "frequency", "r_over_q", "q0", "qext", "gap_length")
CAVITY_UNITS = ("m", "Hz", "ohm", "", "", "m")

MAX_POINTS = 100_000_000        # refused beyond this (a typo in `steps` must not hang)
MAX_GRID_AXIS = 10_000_000
MAX_TABLE_ROWS = 1000
DEFAULT_CHUNK = 100_000          # vectorised kernels
DEFAULT_CHUNK_PER_POINT = 200    # per-point kernels (cavity tables that vary, slow models)
DEFAULT_QUANTILES = (0.01, 0.05, 0.25, 0.5, 0.75, 0.95, 0.99)
SECTIONS = ("sweep", "results", "fixed", "grid", "tolerance", "limits", "summary")
#: Functions known to cost a large fraction of a second per point (run in processes);
#: every function of the catalogue's large-signal category counts too (:func:`is_slow`).
SLOW_FUNCTIONS = frozenset({"TUBE_OUTPUT_POWER", "TUBE_EFFICIENCY", "TUBE_SATURATED_POWER",
                            "TUBE_SATURATION_DRIVE"})
SLOW_CATEGORIES = frozenset({"Large signal"})
DEFAULT_CHUNK_SLOW = 8           # slow models: a chunk is seconds of work


def is_slow(name: str) -> bool:
    """True for the large-signal model (a fraction of a second or more per point)."""
    fn = lookup(name)
    return name.upper() in SLOW_FUNCTIONS or (fn is not None and fn.category in SLOW_CATEGORIES)


class StudyError(ValueError):
    """A study description that cannot be run; the message says where and why."""


@dataclass(frozen=True)
class Variable:
    """One swept quantity.

    key : as written (``voltage``, ``cavities[3].position``, ``cavities.frequency``).
    param : argument name; row/col : cavity-table cell (row None = every row).
    grid : grid values (SI), or None in sample mode.
    nominal, law, spread, relative : sample mode (nominal None = the table's value).
    """

    key: str
    param: str
    row: int | None = None
    col: int | None = None
    grid: tuple | None = None
    nominal: float | None = None
    law: str = ""
    spread: float = 0.0
    relative: bool = False

    @property
    def stream(self) -> int:
        """Random-stream number of this variable (stable when others are added)."""
        return zlib.crc32(self.key.encode())


@dataclass(frozen=True)
class Result:
    name: str
    function: str
    unit: str
    args: dict = field(default_factory=dict)     # param -> SI value, table or text


@dataclass
class Study:
    mode: str
    n_points: int
    seed: int
    chunk: int
    results: tuple[Result, ...]
    fixed: dict                       # param -> SI float, 2-D table (ndarray) or text
    variables: tuple[Variable, ...]
    limits: dict                      # result name -> (low or None, high or None)
    quantiles: tuple[float, ...]
    tables: dict                      # table param -> number of rows
    per_point: bool                   # some result needs one worksheet call per point
    slow: bool                        # some result is a slow (large-signal) model
    description: dict = field(default_factory=dict, repr=False)
    cache: dict = field(default_factory=dict, repr=False, compare=False)

    def grid_values(self, var: Variable) -> np.ndarray:
        """A grid axis's values as an array (made once)."""
        key = ("grid", var.key)
        if key not in self.cache:
            self.cache[key] = np.asarray(var.grid, dtype=float)
        return self.cache[key]

    @property
    def grid_shape(self) -> tuple[int, ...]:
        return tuple(len(v.grid) for v in self.variables)

    @property
    def n_chunks(self) -> int:
        return -(-self.n_points // self.chunk)

    def chunk_bounds(self, k: int) -> tuple[int, int]:
        return k * self.chunk, min((k + 1) * self.chunk, self.n_points)

    def columns(self) -> list[str]:
        """Input columns of the output table, in order (one per cavity row for
        a tolerance on every row)."""
        cols = []
        for v in self.variables:
            if v.param in self.tables and v.row is None:
                cols.extend(f"{v.param}[{r + 1}].{_col_name(v.col)}"
                            for r in range(self.tables[v.param]))
            else:
                cols.append(v.key)
        return cols

    def fingerprint(self) -> str:
        """Hash of everything that decides the rows (resume only on a match)."""
        text = json.dumps(self.description, sort_keys=True, default=_json_default)
        return hashlib.sha256(text.encode()).hexdigest()


def _json_default(obj):
    if isinstance(obj, np.ndarray):
        return obj.tolist()
    return str(obj)


def _col_name(col: int) -> str:
    return CAVITY_COLUMNS[col] if col < len(CAVITY_COLUMNS) else f"col{col + 1}"


# --------------------------------------------------------------------- reading

def load_study(path, sheet: str | None = None) -> Study:
    """Read and check a study file: ``.toml``, or a workbook (``.xlsx``) sheet."""
    path = os.fspath(path)
    if not os.path.isfile(path):
        raise StudyError(f"study file {path!r} not found")
    if path.lower().endswith((".xlsx", ".xlsm")):
        from .sheet import read_sheet

        raw = read_sheet(path, sheet)
    else:
        import tomllib

        if os.path.getsize(path) > 10 * 2**20:
            raise StudyError(f"study file {path!r} is larger than 10 MB")
        try:
            with open(path, "rb") as fh:
                raw = tomllib.load(fh)
        except tomllib.TOMLDecodeError as exc:
            raise StudyError(f"study file {path!r} is not valid TOML: {exc}") from None
    return build_study(raw, base_dir=os.path.dirname(os.path.abspath(path)))


def build_study(raw: dict, base_dir: str = ".", chunk: int | None = None) -> Study:
    """Check a study description (a dict laid out as a study file) and resolve it."""
    if not isinstance(raw, dict):
        raise StudyError("a study is a table of sections")
    unknown = sorted(set(raw) - set(SECTIONS))
    if unknown:
        raise StudyError(f"unknown section(s) {', '.join(map(repr, unknown))}; allowed: "
                         f"{', '.join(SECTIONS)}")
    sweep = _section(raw, "sweep")
    _only(sweep, "sweep", ("mode", "points", "seed", "chunk"))
    grid_raw, tol_raw = _section(raw, "grid"), _section(raw, "tolerance")
    mode = sweep.get("mode", "grid" if grid_raw else "sample")
    if mode not in ("grid", "sample"):
        raise StudyError(f"sweep.mode must be 'grid' or 'sample' (got {mode!r})")
    if mode == "grid" and tol_raw:
        raise StudyError("a grid study takes no [tolerance] section (use mode = 'sample')")
    if mode == "sample" and grid_raw:
        raise StudyError("a sample study takes no [grid] section (use mode = 'grid')")

    results = _results(_section(raw, "results"))
    params = _params_of(results)
    fixed = {}
    for key, value in _section(raw, "fixed").items():
        fixed[key] = _argument(key, value, params, base_dir, "fixed")
    resolved_results = []
    for res in results:
        fn = lookup(res.function)
        args = {}
        for key, value in res.args.items():
            if key not in {p.name for p in fn.params}:
                raise StudyError(f"results.{res.name}.args: {key!r} is not an argument of "
                                 f"{fn.name} ({_names(fn)})")
            args[key] = _argument(key, value, {key: _param(fn, key)}, base_dir,
                                  f"results.{res.name}.args")
        resolved_results.append(Result(res.name, res.function, res.unit, args))
    results = tuple(resolved_results)

    tables = {}
    for source in [fixed] + [r.args for r in results]:
        for key, value in source.items():
            if isinstance(value, np.ndarray):
                tables[key] = max(tables.get(key, 0), value.shape[0])

    variables = []
    if mode == "grid":
        for key, spec in grid_raw.items():
            variables.append(_grid_variable(key, spec, params, fixed, results))
    else:
        for key, spec in tol_raw.items():
            variables.append(_tolerance_variable(key, spec, params, fixed, results))
    if not variables:
        raise StudyError(f"a {mode} study needs at least one entry in "
                         f"[{'grid' if mode == 'grid' else 'tolerance'}]")
    if len({v.key for v in variables}) != len(variables):
        raise StudyError("a variable is listed twice")

    if mode == "grid":
        n_points = 1
        for v in variables:
            n_points *= len(v.grid)
        if n_points > MAX_POINTS:
            raise StudyError(f"the grid has {n_points:,} points; at most {MAX_POINTS:,} allowed")
        if "points" in sweep or "seed" in sweep:
            raise StudyError("sweep.points and sweep.seed belong to sample studies")
        seed = 0
    else:
        n_points = _int(sweep.get("points"), "sweep.points", 1, MAX_POINTS, required=True)
        seed = _int(sweep.get("seed"), "sweep.seed", 0, 2**63 - 1, required=True)

    # every required argument of every result must have a value
    varied = {v.param for v in variables}
    for res in results:
        fn = lookup(res.function)
        for p in fn.params:
            if p.required and p.name not in res.args and p.name not in fixed \
                    and p.name not in varied:
                raise StudyError(f"results.{res.name}: {fn.name} needs {p.name!r}; give it "
                                 f"in [fixed], in results.{res.name}.args or as a variable")
    for v in variables:
        if not any(v.param in {p.name for p in lookup(r.function).params} for r in results):
            raise StudyError(f"{v.key!r} is not an argument of any result function")

    per_point = False
    for res in results:
        fn = lookup(res.function)
        table_varies = any(v.param in tables and v.param not in res.args
                           and p.kind == "table" for v in variables for p in fn.params
                           if p.name == v.param)
        if table_varies or fn.returns_text or fn.result_kind != "broadcast":
            per_point = True
    slow = any(is_slow(r.function) for r in results)
    default_chunk = (DEFAULT_CHUNK_SLOW if slow else DEFAULT_CHUNK_PER_POINT if per_point
                     else DEFAULT_CHUNK)
    chunk_size = chunk if chunk is not None else sweep.get("chunk", default_chunk)
    chunk_size = _int(chunk_size, "sweep.chunk", 1, 10_000_000)

    limits = _limits(_section(raw, "limits"), results)
    summary = _section(raw, "summary")
    _only(summary, "summary", ("quantiles",))
    qs = summary.get("quantiles", list(DEFAULT_QUANTILES))
    if not isinstance(qs, list) or not qs or not all(
            isinstance(q, (int, float)) and not isinstance(q, bool) and 0 <= q <= 1 for q in qs):
        raise StudyError(f"summary.quantiles must be a list of numbers in [0, 1] (got {qs!r})")
    description = {"mode": mode, "points": n_points, "seed": seed, "chunk": chunk_size,
                   "results": [(r.name, r.function, r.unit, sorted(r.args.items()))
                               for r in results],
                   "fixed": sorted(fixed.items()),
                   "variables": [v.__dict__ for v in variables]}
    return Study(mode, n_points, seed, chunk_size, results, fixed, tuple(variables), limits,
                 tuple(float(q) for q in qs), tables, per_point, slow, description)


def _section(raw, name) -> dict:
    value = raw.get(name, {})
    if not isinstance(value, dict):
        raise StudyError(f"[{name}] must be a table of keys (got {value!r})")
    return value


def _only(table, where, keys):
    extra = sorted(set(table) - set(keys))
    if extra:
        raise StudyError(f"{where}: unknown key(s) {', '.join(map(repr, extra))}; allowed: "
                         f"{', '.join(keys)}")


def _int(value, where, low, high, required=False):
    if value is None:
        if required:
            raise StudyError(f"{where} is required")
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or value != int(value):
        raise StudyError(f"{where} must be a whole number (got {value!r})")
    value = int(value)
    if not low <= value <= high:
        raise StudyError(f"{where} must be between {low:,} and {high:,} (got {value:,})")
    return value


def _names(fn: Function) -> str:
    return ", ".join(p.name for p in fn.params)


def _results(section) -> list[Result]:
    if not section:
        raise StudyError("[results] is empty: name at least one result, e.g. "
                         "[results.gain] function = \"TUBE_SMALL_SIGNAL_GAIN\"")
    out = []
    for name, spec in section.items():
        where = f"results.{name}"
        if not re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]{0,62}", name):
            raise StudyError(f"{where}: a result name is letters, digits and _ (got {name!r})")
        if isinstance(spec, str):
            spec = {"function": spec}
        if not isinstance(spec, dict):
            raise StudyError(f"{where} must be a table with 'function' (got {spec!r})")
        _only(spec, where, ("function", "unit", "args"))
        fname = spec.get("function")
        fn = lookup(fname) if isinstance(fname, str) else None
        if fn is None:
            raise StudyError(f"{where}.function: {fname!r} is not a catalogue function")
        unit = spec.get("unit", "") or ""
        if not isinstance(unit, str):
            raise StudyError(f"{where}.unit must be text (got {unit!r})")
        if unit:
            if not fn.takes_unit:
                raise StudyError(f"{where}.unit: {fn.name} takes no result unit")
            try:
                result_converter(unit, fn.result_unit)
            except UnitTextError as exc:
                raise StudyError(f"{where}.unit {unit!r}: {exc}") from None
        args = spec.get("args", {})
        if not isinstance(args, dict):
            raise StudyError(f"{where}.args must be a table (got {args!r})")
        out.append(Result(name, fn.name, unit, dict(args)))
    return out


def _params_of(results) -> dict[str, Param]:
    params: dict[str, Param] = {}
    for res in results:
        for p in lookup(res.function).params:
            params.setdefault(p.name, p)
    return params


def _param(fn: Function, name: str) -> Param:
    for p in fn.params:
        if p.name == name:
            return p
    raise KeyError(name)


def _argument(key, value, params, base_dir, where):
    """A fixed argument in SI: float, 2-D table (ndarray) or text."""
    p = params.get(key)
    if p is None:
        raise StudyError(f"{where}.{key}: not an argument of any result function "
                         f"(arguments: {', '.join(params)})")
    if p.kind == "table":
        return _table(key, value, base_dir, where)
    if p.kind == "text":
        if not isinstance(value, str):
            raise StudyError(f"{where}.{key} must be text (got {value!r})")
        text = value.strip()
        if p.choices:
            match = [c for c in p.choices if c.lower() == text.lower()]
            if not match:
                raise StudyError(f"{where}.{key} must be one of "
                                 f"{', '.join(map(repr, p.choices))} (got {value!r})")
            text = match[0]
        return text
    x = _quantity(value, p, f"{where}.{key}")
    if not p.domain.ok_scalar(x):
        raise StudyError(f"{where}.{key} must be {p.domain.describe(p.unit)} (got {x:g}"
                         f"{' ' + p.unit if p.unit else ''})")
    return x


def _quantity(value, p: Param | None, where, unit: str | None = None) -> float:
    """A number (in the SI unit) or text with a unit, as an SI float."""
    unit = p.unit if unit is None else unit
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise StudyError(f"{where} must be a number or text with a unit (got {value!r})")
    if isinstance(value, str):
        try:
            return float(to_si(value, unit, p.difference if p is not None else False))
        except UnitTextError as exc:
            raise StudyError(f"{where} {value!r}: {exc}") from None
    x = float(value)
    if not math.isfinite(x):
        raise StudyError(f"{where} must be finite (got {value!r})")
    return x


def _table(key, value, base_dir, where) -> np.ndarray:
    if isinstance(value, str):
        path = value if os.path.isabs(value) else os.path.join(base_dir, value)
        if not os.path.isfile(path):
            raise StudyError(f"{where}.{key}: table file {value!r} not found")
        if os.path.getsize(path) > 2**20:
            raise StudyError(f"{where}.{key}: table file {value!r} is larger than 1 MB")
        with open(path, newline="", encoding="utf-8-sig") as fh:
            rows = [r for r in csv.reader(fh) if any(c.strip() for c in r)
                    and not r[0].lstrip().startswith("#")]
        if rows and not _is_number(rows[0][0]):
            rows = rows[1:]          # a header row
        value = rows
    if not isinstance(value, list) or not value or not all(isinstance(r, list) for r in value):
        raise StudyError(f"{where}.{key} must be a table: a CSV file name or a list of rows")
    if len(value) > MAX_TABLE_ROWS:
        raise StudyError(f"{where}.{key}: at most {MAX_TABLE_ROWS} rows (got {len(value)})")
    width = {len(r) for r in value}
    if len(width) != 1:
        raise StudyError(f"{where}.{key}: rows of different lengths")
    table = np.full((len(value), width.pop()), np.nan)
    for i, row in enumerate(value):
        for j, cell in enumerate(row):
            if cell is None or (isinstance(cell, str) and cell.strip() == ""):
                continue                   # an empty cell (e.g. Qext of an idle cavity)
            try:
                unit = CAVITY_UNITS[j] if j < len(CAVITY_UNITS) else ""
                table[i, j] = (to_si(cell, unit) if isinstance(cell, str)
                               and not _is_number(cell) else float(cell))
            except (UnitTextError, ValueError, TypeError):
                raise StudyError(f"{where}.{key}: row {i + 1}, column {j + 1} is not a "
                                 f"number (got {cell!r})") from None
    return table


def _is_number(text) -> bool:
    try:
        float(text)
        return True
    except (TypeError, ValueError):
        return False


_KEY = re.compile(r"^([a-z_][a-z0-9_]*)(?:\[(\d+)\])?(?:\.([a-z_][a-z0-9_]*))?$")


def _parse_key(key, params, fixed, results, where):
    """(param, row, col, unit) of a variable key."""
    m = _KEY.match(key)
    if not m:
        raise StudyError(f"{where}: {key!r} is not an argument name or a table cell like "
                         f"'cavities[2].frequency'")
    name, row, col = m.group(1), m.group(2), m.group(3)
    p = params.get(name)
    if p is None:
        raise StudyError(f"{where}: {name!r} is not an argument of any result function "
                         f"(arguments: {', '.join(params)})")
    if p.kind == "text":
        raise StudyError(f"{where}: {name!r} is a text argument; give it in [fixed]")
    if p.kind == "number":
        if row is not None or col is not None:
            raise StudyError(f"{where}: {name!r} is a number, not a table")
        if name in fixed:
            raise StudyError(f"{where}: {name!r} is also in [fixed]")
        return p, None, None, p.unit
    if col is None:
        raise StudyError(f"{where}: name a column of table {name!r}, e.g. "
                         f"'{name}[1].frequency' or '{name}.frequency' (every row)")
    if name not in fixed:
        raise StudyError(f"{where}: table {name!r} must be given in [fixed]")
    table = fixed[name]
    if col in CAVITY_COLUMNS:
        j = CAVITY_COLUMNS.index(col)
    elif re.fullmatch(r"col\d+", col):
        j = int(col[3:]) - 1
    else:
        raise StudyError(f"{where}: column {col!r} of {name!r} must be one of "
                         f"{', '.join(CAVITY_COLUMNS)} or col1, col2, ...")
    if not 0 <= j < table.shape[1]:
        raise StudyError(f"{where}: table {name!r} has {table.shape[1]} columns (got {col!r})")
    r = None
    if row is not None:
        r = int(row) - 1
        if not 0 <= r < table.shape[0]:
            raise StudyError(f"{where}: table {name!r} has rows 1 to {table.shape[0]} "
                             f"(got row {row})")
    unit = CAVITY_UNITS[j] if j < len(CAVITY_UNITS) else ""
    return p, r, j, unit


def _grid_variable(key, spec, params, fixed, results) -> Variable:
    where = f"grid.{key}"
    p, row, col, unit = _parse_key(key, params, fixed, results, "grid")
    if col is not None and row is None:
        raise StudyError(f"{where}: a grid axis names one cavity row, e.g. "
                         f"'{p.name}[2].{_col_name(col)}'")
    if isinstance(spec, list):
        if not spec:
            raise StudyError(f"{where}: the list of values is empty")
        if len(spec) > MAX_GRID_AXIS:
            raise StudyError(f"{where}: at most {MAX_GRID_AXIS:,} values")
        values = [_quantity(x, p, f"{where}[{i}]", unit) for i, x in enumerate(spec)]
    elif isinstance(spec, dict):
        _only(spec, where, ("from", "to", "steps", "spacing"))
        for k in ("from", "to", "steps"):
            if k not in spec:
                raise StudyError(f"{where} needs 'from', 'to' and 'steps' (or a list)")
        a = _quantity(spec["from"], p, f"{where}.from", unit)
        b = _quantity(spec["to"], p, f"{where}.to", unit)
        n = _int(spec["steps"], f"{where}.steps", 1, MAX_GRID_AXIS)
        spacing = spec.get("spacing", "linear")
        if spacing == "linear":
            values = np.linspace(a, b, n).tolist()
        elif spacing == "log":
            if a <= 0 or b <= 0:
                raise StudyError(f"{where}: log spacing needs from and to > 0")
            values = np.geomspace(a, b, n).tolist()
        else:
            raise StudyError(f"{where}.spacing must be 'linear' or 'log' (got {spacing!r})")
    else:
        raise StudyError(f"{where} must be a list of values or {{from, to, steps}}")
    return Variable(key, p.name, row, col, grid=tuple(values))


def _tolerance_variable(key, spec, params, fixed, results) -> Variable:
    where = f"tolerance.{key}"
    p, row, col, unit = _parse_key(key, params, fixed, results, "tolerance")
    if not isinstance(spec, dict):
        raise StudyError(f"{where} must be a table like {{nominal = ..., normal = ...}}")
    _only(spec, where, ("nominal", "normal", "uniform"))
    laws = [k for k in ("normal", "uniform") if k in spec]
    if len(laws) != 1:
        raise StudyError(f"{where} needs exactly one of 'normal' (standard deviation) or "
                         f"'uniform' (half width)")
    law = laws[0]
    nominal = None
    if col is None:
        if "nominal" not in spec:
            raise StudyError(f"{where} needs a 'nominal' value")
        nominal = _quantity(spec["nominal"], p, f"{where}.nominal", unit)
    elif "nominal" in spec:
        raise StudyError(f"{where}: a table column's nominal is the table's own value")
    spread_raw = spec[law]
    relative = isinstance(spread_raw, str) and spread_raw.strip().endswith("%")
    if relative:
        try:
            spread = float(spread_raw.strip()[:-1]) / 100.0
        except ValueError:
            raise StudyError(f"{where}.{law} {spread_raw!r} is not a percentage") from None
    else:
        spread = _quantity(spread_raw, p, f"{where}.{law}", unit)
    if not (math.isfinite(spread) and spread >= 0):
        raise StudyError(f"{where}.{law} must be >= 0 (got {spread_raw!r})")
    return Variable(key, p.name, row, col, nominal=nominal, law=law, spread=spread,
                    relative=relative)


def _limits(section, results) -> dict:
    names = {r.name for r in results}
    out = {}
    for name, spec in section.items():
        where = f"limits.{name}"
        if name not in names:
            raise StudyError(f"{where}: no result named {name!r} (results: "
                             f"{', '.join(sorted(names))})")
        if not isinstance(spec, dict) or not spec:
            raise StudyError(f"{where} must be a table like {{min = ..., max = ...}}")
        _only(spec, where, ("min", "max"))
        lo, hi = spec.get("min"), spec.get("max")
        for k, v in (("min", lo), ("max", hi)):
            if v is not None and (isinstance(v, bool) or not isinstance(v, (int, float))
                                  or not math.isfinite(v)):
                raise StudyError(f"{where}.{k} must be a number in the result's unit "
                                 f"(got {v!r})")
        if lo is not None and hi is not None and lo > hi:
            raise StudyError(f"{where}: min {lo} is above max {hi}")
        out[name] = (None if lo is None else float(lo), None if hi is None else float(hi))
    return out


def error_text(exc: BaseException) -> str:
    """The error value and message of a failed point, as its row shows them."""
    if isinstance(exc, TubeInputError):
        return exc.cell_text()
    return f"#VALUE! {type(exc).__name__}: {exc}"[:255]
