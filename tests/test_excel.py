"""The Excel front end, tested without Excel (Linux CI).

What runs here:

* the generated UDF module imports (xlwings imports on Linux; its decorators
  are no-ops there) and is not stale;
* the module run through xlwings' *Windows* decorators (``xlwings.udfs``,
  imported with stand-ins for pywin32) records, for every catalogue function,
  the worksheet name, parameters, argument help, function help, optional
  defaults and ``ndim=2``; and xlwings' own VBA writer turns it into VBA whose
  names pass the checks of tests/test_names.py;
* calls with Excel-shaped inputs, also through xlwings' real conversion
  pipeline with the value-cleaning rules of its Windows engine, give
  Excel-shaped output;
* ``tubefuncs excel-setup`` writes what the add-in reads.

What does not run here: Excel itself (see addin/README.md).
"""

from __future__ import annotations

import ast
import datetime as dt
import importlib
import importlib.util
import io
import math
import re
import subprocess
import sys
import types
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import tubefuncs
from tubefuncs.catalogue import CATALOGUE
from tubefuncs.errors import EXCEL_ERROR_VALUES, CellError, TubeInputError
from tubefuncs.excel import adapter, generate, names, starter
from tubefuncs.excel import setup as excel_setup

ROOT = Path(__file__).resolve().parents[1]
FUNCTIONS = list(CATALOGUE.values())
IDS = [fn.name for fn in FUNCTIONS]
ERROR_PREFIX = re.compile(r"^(#VALUE!|#NUM!|#NAME\?|#DIV/0!|#N/A|#REF!|#NULL!|#SPILL!|#CALC!) ")


# --- helpers ------------------------------------------------------------------

def is_error_text(x) -> bool:
    return isinstance(x, str) and bool(ERROR_PREFIX.match(x))


def assert_cell(x, function: str | None = None):
    """One cell value a classic xlwings UDF may return."""
    assert type(x) in (float, str, bool), f"{type(x).__name__}: {x!r}"
    if isinstance(x, float):
        assert math.isfinite(x), x
    if isinstance(x, str):
        assert "Traceback" not in x
        if x.startswith("#"):
            assert is_error_text(x), x
            assert len(x) <= 255, len(x)


def assert_excel_shaped(out, function: str | None = None):
    """float, text, or a rectangular list of row lists of floats and texts."""
    if isinstance(out, list):
        assert out and all(isinstance(row, list) for row in out), out
        width = len(out[0])
        assert width > 0
        for row in out:
            assert len(row) == width, "ragged result"
            for x in row:
                assert_cell(x, function)
    else:
        assert_cell(out, function)


def shape_of(out):
    return (len(out), len(out[0])) if isinstance(out, list) else (1, 1)


def sample_number(fn, p) -> float:
    """A value of parameter ``p`` inside its declared domain, in SI."""
    by_name = {"beam_radius": 0.005, "tunnel_radius": 0.007, "gap_length": 0.012,
               "length": 0.02, "radius": 0.038, "drift_length": 0.3, "width": 0.07214,
               "height": 0.03404, "spacing": 0.01, "area": 1e-4, "distance": 4e7,
               "diameter": 3.0, "gap_voltage": 5e3, "harmonic": 1.0, "bunching_param": 1.2,
               "coupling": 0.8, "drive": 0.5, "efficiency": 0.6, "q0": 3000.0,
               "qext": 1000.0, "q_loaded": 750.0, "r_over_q": 100.0}
    by_unit = {"V": 5e4, "A": 10.0, "Hz": 3e9, "m": 0.01, "S/m": 5.8e7, "W": 1e6, "s": 4e-6,
               "K": 8.0, "ohm": 100.0, "A/V**1.5": 1e-6, "m**2": 1e-4, "rad": 1.0, "T": 0.1,
               "S": 1e-3, "": 0.5}
    value = by_name.get(p.name, by_unit.get(p.unit, 1.0))
    if p.domain.ok_scalar(value):
        return value
    low, high = p.domain.low, p.domain.high
    candidates = []
    if math.isfinite(low) and math.isfinite(high):
        candidates.append((low + high) / 2)
    if math.isfinite(low):
        candidates.append(low + 1.0)
    candidates += [1.0, 0.0, -1.0]
    for c in candidates:
        if p.domain.ok_scalar(c):
            return c
    return value


def sample_text(fn, p):
    if p.name == "unit":
        return fn.result_units[0] if fn.result_units else None
    if p.choices:
        return p.choices[0]
    return {"function_name": "TUBE_GAMMA", "from_unit": "m", "to_unit": "mm",
            "name": "TUBE_GAMMA"}.get(p.name, "m")


def sample_table(fn, p):
    # position (m), frequency (Hz), R/Q (ohm), Q0, Qext, gap length (m)
    return [[0.0, 2.998e9, 100.0, 3000.0, 300.0, 0.012],
            [0.25, 3.010e9, 100.0, 3000.0, 1e6, 0.012],
            [0.50, 2.998e9, 100.0, 3000.0, 40.0, 0.012]]


def sample_args(fn, optional: bool = False) -> list:
    """Valid arguments in plain Python form; optional ones omitted (None) unless asked."""
    args = []
    for p in fn.worksheet_params:
        if not p.required and not optional:
            args.append(None)
        elif p.kind == "number":
            args.append(sample_number(fn, p))
        elif p.kind == "table":
            args.append(sample_table(fn, p))
        else:
            args.append(sample_text(fn, p))
    return args


def first_number(fn):
    for i, p in enumerate(fn.worksheet_params):
        if p.kind == "number" and p.required:
            return i, p
    return None, None


def as_xlwings(value, kind="number"):
    """What xlwings passes with ndim=2 for a typed-in value or a range."""
    if value is None:
        return None                       # an omitted optional argument
    if isinstance(value, list):
        return value
    return [[value]]


# --- the Excel adapter's worksheet layer --------------------------------------

@pytest.fixture
def fake_evaluate(monkeypatch):
    """Replace tubefuncs.worksheet.evaluate (module created if not there yet)."""
    try:
        module = importlib.import_module("tubefuncs.worksheet")
    except ImportError:
        module = types.ModuleType("tubefuncs.worksheet")
        monkeypatch.setitem(sys.modules, "tubefuncs.worksheet", module)
        monkeypatch.setattr(tubefuncs, "worksheet", module, raising=False)
    calls = []

    def install(result=None, raises=None):
        def evaluate(name, args):
            calls.append((name, list(args)))
            if raises is not None:
                raise raises
            return result

        monkeypatch.setattr(module, "evaluate", evaluate, raising=False)
        return calls

    return install


class Ev:
    def __init__(self, value, errors=None):
        self.value = value
        self.errors = errors or {}


@pytest.fixture(scope="module")
def worksheet():
    """The real worksheet layer (tubefuncs.worksheet.evaluate)."""
    return pytest.importorskip("tubefuncs.worksheet")


# --- xlwings as on Windows ----------------------------------------------------

@pytest.fixture(scope="module")
def xlwings_windows():
    """``xlwings.udfs`` (the Windows decorators and VBA writer), imported with
    stand-ins for pywin32's modules; removed again afterwards."""
    stubs = {}
    pythoncom = types.ModuleType("pythoncom")
    pythoncom.CoInitialize = lambda: None
    pywintypes = types.ModuleType("pywintypes")
    pywintypes.com_error = type("com_error", (Exception,), {})
    win32com = types.ModuleType("win32com")
    client = types.ModuleType("win32com.client")
    client.Dispatch = lambda obj: obj
    win32com.client = client
    stubs.update({"pythoncom": pythoncom, "pywintypes": pywintypes,
                  "win32com": win32com, "win32com.client": client})
    saved = {k: sys.modules.get(k) for k in [*stubs, "xlwings.udfs"]}
    sys.modules.update(stubs)
    try:
        udfs = importlib.import_module("xlwings.udfs")
        yield udfs
    finally:
        for key, old in saved.items():
            if old is None:
                sys.modules.pop(key, None)
            else:
                sys.modules[key] = old
        import xlwings

        if hasattr(xlwings, "udfs") and saved["xlwings.udfs"] is None:
            delattr(xlwings, "udfs")


def load_with_windows_decorators(xl_udfs, path: Path, module_name: str):
    """Execute a UDF module with xw.func/xw.arg/xw.ret bound to xlwings' Windows versions."""
    import xlwings

    saved = (xlwings.func, xlwings.arg, xlwings.ret)
    xlwings.func, xlwings.arg, xlwings.ret = xl_udfs.xlfunc, xl_udfs.xlarg, xl_udfs.xlret
    try:
        spec = importlib.util.spec_from_file_location(module_name, path)
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
    finally:
        xlwings.func, xlwings.arg, xlwings.ret = saved
    return module


@pytest.fixture(scope="module")
def win_udfs(xlwings_windows):
    return load_with_windows_decorators(xlwings_windows, generate.UDF_PATH, "_tubefuncs_udfs_win")


@pytest.fixture(scope="module")
def vba_text(xlwings_windows, win_udfs):
    class Book:
        Name = "Bench.xlsm"

    out = io.StringIO()
    xlwings_windows.generate_vba_wrapper(generate.UDF_MODULE, win_udfs, out, Book())
    return out.getvalue()


@pytest.fixture(scope="module")
def excel_engine():
    """An 'excel' engine for xlwings' conversion pipeline, whose value cleaning is
    the code of xlwings' Windows engine (taken from _xlwindows.py, which cannot
    be imported off Windows)."""
    import xlwings
    from xlwings.main import Engine

    source_path = Path(xlwings.__file__).with_name("_xlwindows.py")
    tree = ast.parse(source_path.read_text(encoding="utf-8"))
    wanted_funcs = {"_clean_value_data_element", "_com_time_to_datetime"}
    body = []
    engine_methods = {}
    for node in tree.body:
        is_table = isinstance(node, ast.Assign) and any(
            isinstance(t, ast.Name) and t.id == "cell_errors" for t in node.targets)
        if is_table or (isinstance(node, ast.FunctionDef) and node.name in wanted_funcs):
            body.append(node)
        elif isinstance(node, ast.ClassDef) and node.name == "Engine":
            for item in node.body:
                if isinstance(item, ast.FunctionDef) and item.name in (
                        "prepare_xl_data_element", "clean_value_data"):
                    engine_methods[item.name] = item
    if len(body) < 3 or len(engine_methods) < 2:
        pytest.skip("xlwings' Windows engine code changed shape; cannot mirror it")
    for method in engine_methods.values():
        method.decorator_list = []          # @staticmethod: plain functions here
        body.append(method)
    namespace = {"np": np, "pd": None, "dt": dt, "time_types": (dt.date, dt.datetime)}
    exec(compile(ast.Module(body=body, type_ignores=[]), str(source_path), "exec"), namespace)
    impl = types.SimpleNamespace(
        name="excel", type="desktop",
        prepare_xl_data_element=namespace["prepare_xl_data_element"],
        clean_value_data=namespace["clean_value_data"])
    engines = xlwings.engines
    saved = engines.engines_by_name.get("excel")
    engines.engines_by_name["excel"] = Engine(impl=impl)
    try:
        yield namespace["cell_errors"]
    finally:
        if saved is None:
            engines.engines_by_name.pop("excel", None)
        else:
            engines.engines_by_name["excel"] = saved


MISSING = -2147352572  # what COM passes for an omitted optional argument


def call_like_excel(func, *com_args):
    """What xlwings' call_udf does with a cell's arguments and the result."""
    from xlwings import conversion

    info = func.__xlfunc__
    args = []
    for i, arg in enumerate(com_args):
        arg_info = info["args"][min(i, len(info["args"]) - 1)]
        if isinstance(arg, int) and arg == MISSING:
            args.append(arg_info.get("optional", None))
        else:
            args.append(conversion.read(None, arg, arg_info["options"]))
    ret = func(*args)
    return ret, conversion.write(ret, None, info["ret"]["options"])


# --- the generated module -----------------------------------------------------

def test_generated_module_is_current():
    current = generate.UDF_PATH.read_text(encoding="utf-8")
    assert current == generate.render(), (
        f"tubefuncs/excel/udfs.py is stale: run `{generate.REGENERATE}` and commit the result")


def test_generate_check_command(tmp_path, capsys):
    out = tmp_path / "udfs.py"
    assert generate.main(["--check", "--output", str(out)]) == 1
    assert generate.main(["--output", str(out)]) == 0
    assert generate.main(["--check", "--output", str(out)]) == 0
    assert out.read_text(encoding="utf-8") == generate.render()


def test_udf_module_imports_on_linux():
    import xlwings  # noqa: F401 - xlwings itself imports on Linux

    udfs = importlib.import_module("tubefuncs.excel.udfs")
    for fn in FUNCTIONS:
        assert callable(getattr(udfs, fn.name))
    assert sorted(udfs.__all__) == sorted(CATALOGUE)


def test_only_the_generated_module_imports_xlwings():
    offenders = []
    for path in (ROOT / "tubefuncs").rglob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            mods = []
            if isinstance(node, ast.Import):
                mods = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
                mods = [node.module]
            if any(m == "xlwings" or m.startswith("xlwings.") for m in mods):
                offenders.append(path.relative_to(ROOT).as_posix())
    assert sorted(set(offenders)) == ["tubefuncs/excel/udfs.py"]


def test_library_and_setup_do_not_load_xlwings():
    code = ("import sys, tubefuncs, tubefuncs.catalogue, tubefuncs.excel, "
            "tubefuncs.excel.adapter, tubefuncs.excel.generate, tubefuncs.excel.names, "
            "tubefuncs.excel.setup, tubefuncs.excel.starter\n"
            "tubefuncs.excel.generate.render()\n"
            "assert 'xlwings' not in sys.modules, 'xlwings was imported'\n")
    done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True,
                          check=False)
    assert done.returncode == 0, done.stderr


def test_render_refuses_bad_names():
    from tubefuncs.catalogue import Function, Param

    def twin(voltage):
        return voltage

    bad = Function(name="TUBE_BAD", func=twin, params=(Param("input", "x"),),
                   result_unit="", help="bad")
    with pytest.raises(ValueError, match="VBA reserved"):
        generate.render({"TUBE_BAD": bad})


# --- what Excel's function wizard gets ----------------------------------------

@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_help_texts_fit_excel_limits(fn):
    text = generate.function_help(fn)
    assert 0 < len(text) <= 255
    assert text.startswith(" ".join(fn.help.split())), "function help was cut"
    for p in fn.worksheet_params:
        arg = generate.argument_help(fn, p)
        assert 0 < len(arg) <= 255, (p.name, len(arg))
        assert arg.startswith(" ".join(p.help.split())), f"{p.name}: argument help was cut"


@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_windows_decorators_record_the_catalogue_entry(win_udfs, fn):
    func = getattr(win_udfs, fn.name)
    xlf = func.__xlfunc__
    assert xlf["name"] == fn.name
    assert xlf["sub"] is False
    assert xlf["category"] == generate.CATEGORY
    assert xlf["ret"]["doc"] == generate.function_help(fn)
    assert len(xlf["ret"]["doc"]) <= 255
    assert "expand" not in xlf["ret"]["options"], "no legacy dynamic arrays"
    params = fn.worksheet_params
    assert [a["name"] for a in xlf["args"]] == [p.name for p in params]
    for arg, p in zip(xlf["args"], params):
        assert arg["doc"] == generate.argument_help(fn, p)
        assert len(arg["doc"]) <= 255
        assert arg["options"] == {"ndim": 2, "err_to_str": True}
        assert not arg["vararg"]
        assert arg["vba"] is None
        if p.required:
            assert "optional" not in arg, p.name
        else:
            assert arg["optional"] is None, p.name


def test_vba_written_by_xlwings_compiles_in_principle(vba_text):
    """Signatures in the VBA module that Import Functions would create."""
    sigs = re.findall(r"^Function (\w+)\(([^)]*)\)$", vba_text, flags=re.MULTILINE)
    assert sorted(name for name, _ in sigs) == sorted(CATALOGUE)
    for name, arglist in sigs:
        fn = CATALOGUE[name]
        declared = [a.strip() for a in arglist.split(",")] if arglist.strip() else []
        expected = [p.name if p.required else f"Optional {p.name}" for p in fn.worksheet_params]
        assert declared == expected
        for a in declared:
            assert names.identifier_problems(a.replace("Optional ", "")) == []
    assert "ParamArray" not in vba_text
    assert vba_text.count(f'XLPy.CallUDF("{generate.UDF_MODULE}"') == 2 * len(CATALOGUE)


def test_macro_options_get_untruncated_help(win_udfs):
    # xlwings' import_udfs passes doc[:255] to Application.MacroOptions: nothing may be cut.
    for fn in FUNCTIONS:
        xlf = getattr(win_udfs, fn.name).__xlfunc__
        assert xlf["ret"]["doc"][:255] == xlf["ret"]["doc"]
        assert all(a["doc"][:255] == a["doc"] for a in xlf["args"])


# --- the adapter, with a stand-in worksheet layer ------------------------------

def test_arguments_from_xlwings():
    assert adapter.from_excel([[2.5]]) == 2.5
    assert adapter.from_excel([[None]]) is None
    assert adapter.from_excel(None) is None
    assert adapter.from_excel([[1.0], [2.0]]) == [[1.0], [2.0]]
    assert adapter.from_excel([[1.0, "350 kV"]]) == [[1.0, "350 kV"]]
    assert adapter.from_excel([[1.0]], kind="table") == [[1.0]]
    err = adapter.from_excel([["#DIV/0!"]])
    assert isinstance(err, CellError) and err.code == "#DIV/0!"
    mixed = adapter.from_excel([[1.0], ["#N/A"], [None]])
    assert isinstance(mixed[1][0], CellError) and mixed[2][0] is None
    assert type(adapter.from_excel(np.float64(3.0))) is float
    arr = np.ones((2, 2))
    assert adapter.from_excel(arr) is arr
    assert adapter.from_excel(np.array(4.0)) == 4.0
    assert adapter.from_excel([1.0, 2.0]) == [[1.0, 2.0]]


def test_results_to_cells():
    err = TubeInputError("TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)", "#NUM!")
    value = np.array([[1.0, np.nan], [np.float64(3.0), np.inf]])
    out = adapter.to_excel(Ev(value, {(0, 1): err}), "TUBE_PILLBOX_FREQ")
    assert out[0][0] == 1.0 and type(out[0][0]) is float
    assert out[0][1] == "#NUM! TUBE_PILLBOX_FREQ: radius must be > 0 m (got 0)"
    assert out[1][0] == 3.0 and type(out[1][0]) is float
    assert out[1][1].startswith("#NUM! TUBE_PILLBOX_FREQ")
    assert_excel_shaped(out)
    assert adapter.to_excel(Ev(np.array([[np.nan]])), "TUBE_X").startswith("#NUM! TUBE_X")
    assert adapter.to_excel(Ev(np.array([[2.0]])), "TUBE_X") == 2.0
    assert type(adapter.to_excel(Ev(np.float64(2.0)), "TUBE_X")) is float
    assert type(adapter.to_excel(Ev(np.array(2.0)), "TUBE_X")) is float
    assert adapter.to_excel(Ev(7), "TUBE_X") == 7.0
    assert adapter.to_excel(Ev("text result"), "TUBE_X") == "text result"
    assert adapter.to_excel(Ev(np.array([1.0, 2.0])), "TUBE_X") == [[1.0], [2.0]]


def test_call_returns_error_text_for_input_errors(fake_evaluate):
    fake_evaluate(raises=TubeInputError("TUBE_GAMMA: voltage must be >= 0 V (got -1)", "#NUM!"))
    assert adapter.call("TUBE_GAMMA", ([[-1.0]],)) == (
        "#NUM! TUBE_GAMMA: voltage must be >= 0 V (got -1)")
    fake_evaluate(raises=TubeInputError("TUBE_GAMMA: " + "x" * 400, "#VALUE!"))
    text = adapter.call("TUBE_GAMMA", ([["x"]],))
    assert text.startswith("#VALUE! TUBE_GAMMA:") and len(text) == 255


def test_call_never_shows_a_traceback(fake_evaluate):
    fake_evaluate(raises=ZeroDivisionError("division by zero " + "y" * 400))
    text = adapter.call("TUBE_GAMMA", ([[1.0]],))
    assert text.startswith("#VALUE! TUBE_GAMMA: internal error (ZeroDivisionError")
    assert len(text) <= 255 and "Traceback" not in text


def test_call_unwraps_single_cells_and_keeps_ranges(fake_evaluate):
    calls = fake_evaluate(result=Ev(np.array([[1.0], [2.0]])))
    out = adapter.call("TUBE_GAMMA", ([[5.0], [6.0]],))
    assert out == [[1.0], [2.0]]
    assert calls[-1] == ("TUBE_GAMMA", [[[5.0], [6.0]]])
    adapter.call("TUBE_GAMMA", ([["95 kV"]],))
    assert calls[-1] == ("TUBE_GAMMA", ["95 kV"])


def test_call_unknown_function():
    text = adapter.call("TUBE_NO_SUCH_THING", ())
    assert text.startswith("#NAME? TUBE_NO_SUCH_THING")


cell_values = st.one_of(
    st.floats(allow_nan=False, allow_infinity=False), st.integers(-10**6, 10**6), st.none(),
    st.sampled_from(["95 kV", "2.998 GHz", "abc", "", *EXCEL_ERROR_VALUES]), st.booleans())


@settings(max_examples=200, deadline=None)
@given(st.integers(1, 4), st.integers(1, 4), st.data())
def test_any_range_converts_with_its_shape(rows, cols, data):
    grid = [[data.draw(cell_values) for _ in range(cols)] for _ in range(rows)]
    out = adapter.from_excel(grid)
    if rows == cols == 1:
        out = [[out]]
    assert len(out) == rows and all(len(r) == cols for r in out)
    for r in range(rows):
        for c in range(cols):
            x = grid[r][c]
            if isinstance(x, str) and x in EXCEL_ERROR_VALUES:
                assert isinstance(out[r][c], CellError) and out[r][c].code == x
            else:
                assert out[r][c] == x


@settings(max_examples=200, deadline=None)
@given(st.integers(1, 4), st.integers(1, 4), st.data())
def test_any_result_array_becomes_cells(rows, cols, data):
    values = np.array([[data.draw(st.one_of(st.floats(), st.just(np.nan)))
                        for _ in range(cols)] for _ in range(rows)], dtype=float)
    errors = {}
    for r in range(rows):
        for c in range(cols):
            if data.draw(st.booleans()):
                values[r, c] = np.nan
                errors[(r, c)] = TubeInputError(f"TUBE_X: element {r},{c} bad", "#NUM!")
    out = adapter.to_excel(Ev(values, errors), "TUBE_X")
    assert_excel_shaped(out)
    if rows * cols > 1:
        assert shape_of(out) == (rows, cols)
        for (r, c), err in errors.items():
            assert out[r][c] == err.cell_text()


# --- every catalogue function, real worksheet layer ---------------------------

@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_every_function_gives_excel_shaped_output(worksheet, fn):
    from tubefuncs.excel import udfs

    func = getattr(udfs, fn.name, None)
    if func is None:
        pytest.fail(f"{fn.name} missing from udfs.py: run {generate.REGENERATE}")
    plain = sample_args(fn)

    # typed-in numbers, optional arguments omitted
    out = func(*[as_xlwings(a) for a in plain])
    assert_excel_shaped(out, fn.name)

    # all optional arguments given
    assert_excel_shaped(func(*[as_xlwings(a) for a in sample_args(fn, optional=True)]))

    i, p = first_number(fn)
    if p is None:
        return

    def with_arg(value):
        args = [as_xlwings(a) for a in plain]
        args[i] = value
        return func(*args)

    # ints, text with a unit, a column, a row, a numpy array
    v = plain[i]
    if float(v).is_integer():
        assert_excel_shaped(with_arg([[int(v)]]))
    if p.unit:
        assert_excel_shaped(with_arg([[f"{v!r} {p.unit}"]]))
    col = with_arg([[v], [v], [v]])
    assert_excel_shaped(col)
    assert shape_of(col) in ((3, 1), (1, 1)), shape_of(col)  # (1, 1): one error text
    row = with_arg([[v, v]])
    assert shape_of(row) in ((1, 2), (1, 1))
    assert_excel_shaped(with_arg(np.array([[v], [v]])))

    # an empty cell for a required argument is an error, not a zero
    empty = with_arg([[None]])
    assert is_error_text(empty), empty
    assert fn.name in empty
    # an error cell, unparsable text, a wrong-dimension unit
    assert is_error_text(with_arg([["#DIV/0!"]]))
    bad = with_arg([["not a number"]])
    assert is_error_text(bad) and bad.startswith("#VALUE!"), bad
    if p.unit and p.unit not in ("m", "s"):
        wrong = with_arg([["3 s" if p.unit != "s" else "3 m"]])
        assert is_error_text(wrong) and wrong.startswith("#VALUE!"), wrong
    # a column with one bad element: the others are still computed
    mixed = with_arg([[v], ["not a number"], [v]])
    if isinstance(mixed, list):
        assert shape_of(mixed) == (3, 1)
        assert is_error_text(mixed[1][0])


@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_through_xlwings_conversion_like_excel(worksheet, excel_engine, win_udfs, fn):
    """COM values in, xlwings' read/write pipeline with the Windows cleaning rules."""
    func = getattr(win_udfs, fn.name)
    com_args = []
    for a in sample_args(fn):
        if a is None:
            com_args.append(MISSING)
        elif isinstance(a, list):
            com_args.append(tuple(tuple(r) for r in a))   # a range arrives as tuples
        else:
            com_args.append(a)                             # a single cell: a scalar
    ret, written = call_like_excel(func, *com_args)
    assert_excel_shaped(ret, fn.name)
    # what reaches the cells: nothing turned into "" by the NaN rule
    expected = ret if isinstance(ret, list) else [[ret]]
    assert written == expected

    i, p = first_number(fn)
    if p is None:
        return
    error_code = next(k for k, v in excel_engine.items() if v == "#DIV/0!")
    col = list(com_args)
    col[i] = ((sample_args(fn)[i],), (None,), (error_code,))  # value, empty cell, #DIV/0!
    ret, written = call_like_excel(func, *col)
    assert_excel_shaped(ret, fn.name)
    if isinstance(ret, list):
        assert shape_of(ret) == (3, 1)
        assert is_error_text(ret[1][0]) and is_error_text(ret[2][0])
        assert written == ret


# --- excel-setup --------------------------------------------------------------

WIN_PYTHON = r"C:\Users\engineer\AppData\Local\Programs\Python\Python311\pythonw.exe"


def read_conf_like_xlwings(path: Path, monkeypatch) -> dict:
    """Parse a config file with xlwings' own reader of its config format."""
    import xlwings
    from xlwings import utils

    monkeypatch.setattr(xlwings, "USER_CONFIG_FILE", str(path))
    return utils.read_user_config()


def test_setup_writes_config_and_starter(tmp_path, monkeypatch, capsys):
    assert excel_setup.main([str(tmp_path), "--interpreter", WIN_PYTHON]) == 0
    conf = tmp_path / "xlwings.conf"
    settings = read_conf_like_xlwings(conf, monkeypatch)
    assert settings["udf modules"] == "tubefuncs.excel.udfs"
    assert settings["interpreter_win"] == WIN_PYTHON
    raw = conf.read_bytes()
    assert raw.endswith(b"\r\n")
    for line in raw.decode().splitlines():
        # VBA's Input # reads exactly two quoted fields a line
        assert re.fullmatch(r'"[^"]*","[^"]*"', line), line
    module = importlib.import_module(settings["udf modules"])
    assert all(hasattr(module, name) for name in CATALOGUE)
    assert (tmp_path / excel_setup.STARTER_NAME).is_file()
    printed = capsys.readouterr().out
    assert "Import Functions" in printed and "References" in printed


def test_setup_keeps_other_settings_and_the_starter(tmp_path, monkeypatch):
    conf = tmp_path / "xlwings.conf"
    conf.write_bytes(b'"SHOW CONSOLE","True"\r\n"udf modules","old_module"\r\n')
    assert excel_setup.main([str(tmp_path), "--no-workbook"]) == 0
    settings = read_conf_like_xlwings(conf, monkeypatch)
    assert settings["show console"] == "True"
    assert settings["udf modules"] == "tubefuncs.excel.udfs"
    assert conf.read_text().lower().count("udf modules") == 1
    assert not (tmp_path / excel_setup.STARTER_NAME).exists()

    starter_path = tmp_path / excel_setup.STARTER_NAME
    starter_path.write_bytes(b"user's edits")
    assert excel_setup.main([str(tmp_path)]) == 0
    assert starter_path.read_bytes() == b"user's edits"
    assert excel_setup.main([str(tmp_path), "--force"]) == 0
    assert starter_path.read_bytes() != b"user's edits"


def test_setup_interpreter_choice(tmp_path, monkeypatch):
    settings, notes = excel_setup.python_settings(platform="linux")
    assert "INTERPRETER_WIN" not in settings and notes
    # plain Windows Python: the windowless pythonw.exe beside python.exe
    (tmp_path / "python.exe").write_bytes(b"")
    (tmp_path / "pythonw.exe").write_bytes(b"")
    monkeypatch.setattr(sys, "executable", str(tmp_path / "python.exe"))
    monkeypatch.setattr(sys, "prefix", str(tmp_path))
    monkeypatch.delenv("CONDA_EXE", raising=False)
    settings, _ = excel_setup.python_settings(platform="win32")
    assert settings == {"INTERPRETER_WIN": str(tmp_path / "pythonw.exe")}
    # conda environment: Conda Path and Conda Env, Interpreter empty
    base = tmp_path / "miniconda3"
    env = base / "envs" / "rf"
    (env / "conda-meta").mkdir(parents=True)
    (base / "Scripts").mkdir(parents=True)
    monkeypatch.setattr(sys, "prefix", str(env))
    monkeypatch.setenv("CONDA_EXE", str(base / "Scripts" / "conda.exe"))
    settings, _ = excel_setup.python_settings(platform="win32")
    assert settings["CONDA PATH"] == str(base.resolve())
    assert settings["CONDA ENV"] == str(env)
    assert settings["INTERPRETER_WIN"] == ""
    explicit, _ = excel_setup.python_settings(conda_path="C:\\conda", conda_env="rf")
    assert explicit["CONDA ENV"] == "rf"


def test_config_refuses_quotes():
    with pytest.raises(ValueError):
        excel_setup.conf_line("INTERPRETER_WIN", 'C:\\"odd"\\python.exe')


def test_addin_config_example_is_current():
    example = (ROOT / "addin" / "xlwings.conf.example").read_text(encoding="utf-8")
    assert example.splitlines() == excel_setup.example_conf().splitlines()


STANDARD_EXCEL_FUNCTIONS = {"SUM", "IF", "MAX", "MIN", "ROUND", "AVERAGE", "SQRT", "PI",
                            "IFERROR", "ISERROR", "LEFT", "CONCAT", "TEXT"}


def formula_texts(ws):
    from openpyxl.worksheet.formula import ArrayFormula

    for row in ws.iter_rows():
        for cell in row:
            if isinstance(cell.value, ArrayFormula):
                yield cell, cell.value.text, cell.value.ref
            elif cell.data_type == "f":
                yield cell, cell.value, None


def test_starter_workbook_contents(tmp_path):
    import openpyxl

    path = tmp_path / "starter.xlsx"
    report = starter.build(path)
    assert report["broken"] == [], report["broken"]
    # every example whose function (and whose input rows) exist is in the workbook
    available = {i.key for i in starter.INPUTS}
    for res in starter.RESULTS:
        usable = res.function in CATALOGUE and all(
            isinstance(v, starter.Literal) or v in available for v in res.args.values())
        if usable:
            available.add(res.key)
            assert res.key in report["placed"], res.key
        else:
            assert res.key in report["missing"], res.key

    wb = openpyxl.load_workbook(path)
    assert wb.sheetnames == [starter.STARTER_SHEET, starter.FUNCTIONS_SHEET, "xlwings.conf"]

    # the config sheet, read as the add-in reads it: keys from A1 down to the first
    # empty cell (upper-cased), values in column B
    conf = wb["xlwings.conf"]
    keys = {}
    r = 1
    while conf.cell(r, 1).value not in (None, ""):
        keys[str(conf.cell(r, 1).value).upper()] = conf.cell(r, 2).value
        r += 1
    assert keys == {"UDF MODULES": "tubefuncs.excel.udfs"}

    # every formula calls catalogue functions or standard Excel functions only
    ws = wb[starter.STARTER_SHEET]
    found = list(formula_texts(ws))
    assert len(found) == len(report["placed"])
    for cell, text, ref in found:
        assert text.startswith("=")
        for name in re.findall(r"([A-Z][A-Z0-9_.]*)\(", text):
            assert name in CATALOGUE or name in STANDARD_EXCEL_FUNCTIONS, (cell.coordinate, text)
        for address in re.findall(r"\$([A-Z]+)\$(\d+)", text):
            target = ws[f"{address[0]}{address[1]}"].value
            assert target is not None, (cell.coordinate, text, address)
        if ref is not None:
            first, last = ref.split(":")
            assert int(re.sub(r"\D", "", last)) - int(re.sub(r"\D", "", first)) + 1 == len(
                starter.SWEEP_VOLTAGES)

    # the functions sheet lists the whole catalogue
    listed = [c.value for c in wb[starter.FUNCTIONS_SHEET]["A"][1:]]
    assert listed == list(CATALOGUE)


def test_starter_formula_builder_checks_the_catalogue():
    refs = {"voltage": "$B$7", "cavity_radius": "$B$13", "cavity_length": "$B$14"}
    if "TUBE_VELOCITY" in CATALOGUE:
        assert starter.formula("TUBE_VELOCITY", {"voltage": "voltage"}, "km/s", refs) == (
            '=TUBE_VELOCITY($B$7,"km/s")')
        with pytest.raises(starter.ExampleError):
            starter.formula("TUBE_VELOCITY", {"volts": "voltage"}, None, refs)
    if "TUBE_GAMMA" in CATALOGUE:
        with pytest.raises(starter.ExampleError):
            starter.formula("TUBE_GAMMA", {}, None, refs)
        with pytest.raises(starter.ExampleError):
            starter.formula("TUBE_GAMMA", {"voltage": "voltage"}, "deg", refs)


def test_starter_workbook_computes_headlessly(worksheet, tmp_path):
    """The starter's formulas, evaluated by `tubefuncs recalc` (no Excel): every
    example gives a number except the error shown on purpose."""
    import openpyxl

    from tubefuncs import cli

    path = tmp_path / "starter.xlsx"
    out = tmp_path / "out.xlsx"
    starter.build(path)
    assert cli.main(["recalc", str(path), "-o", str(out)]) == 0
    before = openpyxl.load_workbook(path)[starter.STARTER_SHEET]
    after = openpyxl.load_workbook(out)[starter.STARTER_SHEET]
    demo_row = next(r for r in range(1, before.max_row + 1)
                    if before.cell(r, 2).value == "=TUBE_PILLBOX_FREQ(0)")
    checked = 0
    for cell, _text, ref in formula_texts(before):
        cells = [cell.coordinate] if ref is None else [
            c.coordinate for row in before[ref] for c in row]
        for coordinate in cells:
            value = after[coordinate].value
            if before[coordinate].row == demo_row:
                assert value == "#NUM!", value
            else:
                assert isinstance(value, (int, float)) and math.isfinite(value), (
                    coordinate, before.cell(before[coordinate].row, 1).value, value)
            checked += 1
    assert checked >= len(starter.SWEEP_VOLTAGES)
