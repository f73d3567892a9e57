"""Our functions inside real LibreOffice Calc (headless, private profile, extension installed).

One LibreOffice for the whole module (the ``calc`` fixture): every catalogue
function is called from Calc with numbers, text with units, a range (array
formula) and bad input, and compared with its Python twin and with what the
headless engine gives; the demo workbooks are recalculated by Calc and
compared cell by cell with our headless engine.  Skipped, with the reason,
where LibreOffice or its Python-UNO bridge is not installed
(``apt-get install libreoffice-calc-nogui python3-uno``).
"""

import math
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

from tubefuncs.calc.runner import CalcSession, CalcUnavailable, why_unavailable
from tubefuncs.catalogue import CATALOGUE
from tubefuncs.errors import TubeInputError
from tubefuncs.worksheet import evaluate

sys.path.insert(0, str(Path(__file__).parent))
from test_excel import sample_args  # noqa: E402  (one list of valid sample arguments)

ROOT = Path(__file__).resolve().parent.parent
REASON = why_unavailable()
pytestmark = pytest.mark.skipif(REASON is not None, reason=f"LibreOffice Calc: {REASON}")

# A prefixed unit for text arguments: (unit text, factor to SI).
PREFIXED = {"V": ("kV", 1e3), "Hz": ("GHz", 1e9), "m": ("mm", 1e-3), "W": ("kW", 1e3),
            "A": ("mA", 1e-3), "s": ("us", 1e-6), "S/m": ("MS/m", 1e6), "ohm": ("kohm", 1e3)}
TABLE = "AA1:AF3"


@pytest.fixture(scope="module")
def calc():
    try:
        session = CalcSession()
    except CalcUnavailable as exc:
        pytest.fail(f"LibreOffice is installed but did not start: {exc}")
    yield session
    session.close()


def lit(value) -> str:
    if isinstance(value, str):
        return '"' + value.replace('"', '""') + '"'
    return repr(float(value))


def formula(name, args) -> str:
    parts = []
    for a in args:
        if isinstance(a, list):
            parts.append(TABLE)
        elif a is None:
            parts.append("")
        else:
            parts.append(lit(a))
    while parts and parts[-1] == "":
        parts.pop()
    return f"={name}({';'.join(parts)})"


def headless(name, args):
    """(value, error value, message) of the same call in the worksheet layer."""
    try:
        ev = evaluate(name, args)
    except TubeInputError as exc:
        return None, exc.error_value, exc.message
    if ev.errors:
        err = next(iter(ev.errors.values()))
        return None, err.error_value, err.message
    value = ev.value
    if isinstance(value, np.ndarray):
        value = float(value.reshape(-1)[0])
    return value, None, ""


ALONE_DIFFERS: list = []


def headless_range(name, args, n):
    """[(value, error value)] of a column call in the worksheet layer, element by element."""
    try:
        ev = evaluate(name, args)
    except TubeInputError as exc:
        return [(None, exc.error_value)] * n
    flat = np.asarray(ev.value, dtype=float).reshape(-1)
    out = []
    for j in range(n):
        err = ev.errors.get((j, 0))
        out.append((None, err.error_value) if err is not None else (float(flat[j]), None))
    return out


def twin(fn, args):
    """The Python twin on SI values, omitted optional arguments at their defaults."""
    params = fn.params
    si = []
    for p, a in zip(params, args):
        if a is None:
            si.append(p.default)
        elif isinstance(a, list):
            si.append(np.asarray(a, dtype=float))
        else:
            si.append(a)
    with np.errstate(all="ignore"):
        out = fn.func(*si)
    return out if isinstance(out, str) else float(np.asarray(out).reshape(-1)[0])


def with_units(fn, args):
    out = []
    for p, a in zip(fn.worksheet_params, args):
        if p.kind == "number" and isinstance(a, float) and p.unit in PREFIXED:
            unit, factor = PREFIXED[p.unit]
            out.append(f"{a / factor!r} {unit}")
        else:
            out.append(a)
    return out


def first_number(fn):
    for i, p in enumerate(fn.worksheet_params):
        if p.kind == "number" and p.required:
            return i, p
    return None, None


def same(calc_value, value, error, rel=1e-12):
    if error is not None:
        return isinstance(calc_value, dict) and calc_value.get("error") == error
    if isinstance(value, str):
        return calc_value == value
    return isinstance(calc_value, float) and math.isclose(calc_value, value, rel_tol=rel,
                                                          abs_tol=1e-300)


@pytest.fixture(scope="module")
def battery(calc):
    """Every catalogue function called from Calc in five ways, in one recalculation."""
    cells = []
    table = sample_args(CATALOGUE["TUBE_SMALL_SIGNAL_GAIN"])[5]
    cols = "AA AB AC AD AE AF".split()
    for r, row in enumerate(table):
        for c, x in enumerate(row):
            cells.append([f"{cols[c]}{r + 1}", "value", x])
    cases = []   # (function, kind, address, expected value, expected error, message)
    for i, fn in enumerate(CATALOGUE.values()):
        row = 3 * i + 10
        args = sample_args(fn, optional=False)
        unit_args = with_units(fn, sample_args(fn, optional=True))
        value, err, _ = headless(fn.name, args)
        cells.append([f"B{row}", "formula", formula(fn.name, args)])
        cases.append((fn, "numbers", f"B{row}", value, err, ""))
        if err is None:   # the twin itself, outside every front end
            expected = twin(fn, args)
            assert expected == value or math.isclose(expected, value, rel_tol=1e-12), fn.name
        uvalue, uerr, _ = headless(fn.name, unit_args)
        cells.append([f"C{row}", "formula", formula(fn.name, unit_args)])
        cases.append((fn, "text with units", f"C{row}", uvalue, uerr, ""))
        k, p = first_number(fn)
        if p is None:
            continue
        bad = list(args)
        bad[k] = "abc"
        bvalue, berr, bmsg = headless(fn.name, bad)
        cells.append([f"D{row}", "formula", formula(fn.name, bad)])
        cases.append((fn, "bad text", f"D{row}", bvalue, berr, bmsg))
        cells.append([f"F{row}", "formula",
                      formula("TUBE_ERROR_TEXT", [fn.name] + bad)])
        cases.append((fn, "message of bad text", f"F{row}", bmsg, None, ""))
        if math.isfinite(p.domain.low):
            out = list(args)
            out[k] = p.domain.low - 1.0
            ovalue, oerr, omsg = headless(fn.name, out)
            cells.append([f"E{row}", "formula", formula(fn.name, out)])
            cases.append((fn, "out of domain", f"E{row}", ovalue, oerr, omsg))
            cells.append([f"G{row}", "formula", formula("TUBE_ERROR_TEXT", [fn.name] + out)])
            cases.append((fn, "message out of domain", f"G{row}", omsg, None, ""))
        if fn.result_kind == "broadcast" and fn.name != "TUBE_HELP":
            column = [args[k], args[k] * 1.25, "abc"]
            for j, x in enumerate(column):
                cells.append([f"J{row + j}", "value" if isinstance(x, float) else "text", x])
            ranged = list(args)
            ranged[k] = f"__RANGE__J{row}:J{row + 2}"
            text = formula(fn.name, ranged).replace(f'"__RANGE__J{row}:J{row + 2}"',
                                                    f"J{row}:J{row + 2}")
            cells.append([f"K{row}:K{row + 2}", "array", text])
            whole = list(args)
            whole[k] = [[x] for x in column]
            for j, (value_j, err_j) in enumerate(headless_range(fn.name, whole, 3)):
                cases.append((fn, f"range element {j + 1}", f"K{row + j}", value_j, err_j, ""))
                one = list(args)
                one[k] = column[j]
                alone, alone_err = headless(fn.name, one)[:2]
                if err_j != alone_err or (err_j is None and not math.isclose(
                        value_j, alone, rel_tol=1e-9)):
                    # a range element that differs from the same call alone is a finding
                    # of the library, not of the front end: listed, not failed here
                    ALONE_DIFFERS.append(f"{fn.name} element {j + 1}")
    answer = calc.cells(cells, [c[2] for c in cases])
    got = {c[2]: v[0][0] for c, v in zip(cases, answer["values"])}
    return cases, got


def test_every_function_from_calc_equals_its_python_twin(battery):
    cases, got = battery
    wrong = [f"{fn.name} ({kind}, {addr}): Calc {got[addr]!r}, expected "
             f"{err or value!r}" for fn, kind, addr, value, err, _ in cases
             if not same(got[addr], value, err)]
    assert not wrong, "\n".join(wrong)
    kinds = {kind.split(" element")[0] for _, kind, *_ in cases}
    assert {"numbers", "text with units", "bad text", "out of domain", "range"} <= kinds
    assert len({fn.name for fn, *_ in cases}) == len(CATALOGUE)
    if ALONE_DIFFERS:
        print("\nrange elements that differ from the same call alone (library, headless and "
              "Calc alike): " + ", ".join(ALONE_DIFFERS))


def test_bad_input_gives_real_error_values_with_the_message_reachable(battery):
    cases, got = battery
    seen = {}
    for fn, kind, addr, *_ in cases:
        if kind in ("bad text", "out of domain"):
            assert isinstance(got[addr], dict), (fn.name, kind, got[addr])
            seen.setdefault(got[addr]["error"], 0)
            seen[got[addr]["error"]] += 1
    assert set(seen) == {"#VALUE!", "#NUM!"}, seen


def test_function_wizard_shows_help_for_every_function_and_argument(calc):
    from tubefuncs.calc.generate import ERROR_TEXT
    from tubefuncs.excel.generate import argument_help

    shown = calc.request({"op": "describe", "prefix": "TUBE_"})["functions"]
    assert set(shown) == set(CATALOGUE) | {ERROR_TEXT}
    for fn in CATALOGUE.values():
        entry = shown[fn.name]
        assert entry["description"].startswith(" ".join(fn.help.split())[:60]), fn.name
        assert [a[0] for a in entry["arguments"]] == [p.name for p in fn.worksheet_params]
        for p, (_, text, _optional) in zip(fn.worksheet_params, entry["arguments"]):
            assert text == argument_help(fn, p), (fn.name, p.name)


def test_messages_name_function_argument_and_value(calc):
    out = calc.cells([["B1", "formula", '=TUBE_ERROR_TEXT("TUBE_PILLBOX_FREQ";-0.5)'],
                      ["B2", "formula", '=TUBE_ERROR_TEXT("TUBE_PILLBOX_FREQ";"3 kg")'],
                      ["B3", "formula", '=TUBE_ERROR_TEXT("TUBE_PILLBOX_FREQ";0.038)'],
                      ["C1", "formula", "=TUBE_PILLBOX_FREQ(-0.5)"],
                      ["C2", "formula", '=TUBE_PILLBOX_FREQ("x")'],
                      ["B4", "formula", "=ERROR.TYPE(C1)"],
                      ["B5", "formula", "=ERROR.TYPE(C2)"],
                      ["B6", "formula", "=IFERROR(TUBE_PILLBOX_FREQ(-0.5);-1)"],
                      ["B7", "formula", '=ISERROR(TUBE_PILLBOX_FREQ("x"))']],
                     ["B1", "B2", "B3", "B4", "B5", "B6", "B7"])["values"]
    first, second, fine, t_num, t_value, caught, is_error = (v[0][0] for v in out)
    assert "TUBE_PILLBOX_FREQ" in first and "radius" in first and "-0.5" in first
    assert "radius" in second and "kg" in second
    assert fine == ""
    # ERROR.TYPE: 3 for #VALUE!, 6 for #NUM! (the same numbers in Excel and Calc)
    assert (t_num, t_value, caught, is_error) == (6.0, 3.0, -1.0, 1.0)


def test_empty_cells_as_calc_passes_them(calc):
    """What Calc 7.4 hands an extension for empty cells (addin/CALC.md says so).

    A reference to ONE empty cell arrives as the number 0: for an argument whose
    domain excludes 0 that is #NUM! naming the argument; where 0 is allowed it
    is computed as 0 (Calc's own rule; nothing in an extension can tell).
    An empty cell inside a range is an error, as in our other front ends.
    """
    out = calc.cells([["A2", "value", 0.038],
                      ["B1", "formula", "=TUBE_PILLBOX_FREQ(Z99)"],
                      ["B2", "formula", '=TUBE_ERROR_TEXT("TUBE_PILLBOX_FREQ";Z99)'],
                      ["B3", "formula", "=TUBE_GAMMA(Z99)"],
                      ["C1:C2", "array", "=TUBE_PILLBOX_FREQ(A1:A2)"],
                      ["D1:D2", "array", '=TUBE_ERROR_TEXT("TUBE_PILLBOX_FREQ";A1:A2)'],
                      ["B4", "formula", "=TUBE_SKIN_DEPTH(3E9)"]],
                     ["B1", "B2", "B3", "C1:C2", "D1:D2", "B4"])["values"]
    assert out[0][0][0] == {"error": "#NUM!", "code": 503}
    assert "radius" in out[1][0][0] and "got 0" in out[1][0][0]
    assert out[2][0][0] == 1.0                      # gamma at 0 V: Calc passed 0
    assert out[3][0][0]["error"] == "#VALUE!" and isinstance(out[3][1][0], float)
    assert "empty" in out[4][0][0] and out[4][1][0] == ""
    # an omitted optional argument takes its default (copper), as headless
    assert out[5][0][0] == pytest.approx(headless("TUBE_SKIN_DEPTH", [3e9])[0], rel=1e-12)


def _workbooks():
    return sorted((ROOT / "workbooks").glob("*.xlsx"))


@pytest.mark.parametrize("book", _workbooks(), ids=lambda p: p.name)
def test_demo_workbook_in_calc_equals_headless_engine(calc, book, tmp_path):
    """Differential test: every formula cell, Calc against our engine (standard
    functions included).  Every difference is listed in the failure."""
    from tubefuncs.calc.engine import recalculate_calc
    from tubefuncs.headless import check, recalculate, write_recalculated
    from tubefuncs.headless import values as V

    before = book.read_bytes()
    ours = recalculate(book)
    theirs = recalculate_calc(book, session=calc)
    assert book.read_bytes() == before
    assert set(theirs.values) == set(ours.values)
    diffs = []
    for key, mine in ours.values.items():
        other = theirs.values[key]
        if V.is_error(mine) or V.is_error(other):
            ok = str(mine) == str(other)
        elif isinstance(mine, (int, float)) and isinstance(other, (int, float)) \
                and not isinstance(mine, bool):
            ok = math.isclose(float(mine), float(other), rel_tol=1e-9, abs_tol=1e-12)
        else:
            ok = mine == other
        if not ok:
            diffs.append(f"{ours.cell_name(key)}: headless {mine!r}, Calc {other!r}")
    assert not diffs, f"{len(diffs)} difference(s):\n" + "\n".join(diffs[:50])
    # the copy Calc saved names our functions its own way; our engine reads it back
    out = write_recalculated(theirs, tmp_path / "calc.xlsx")
    recalc, result, source = check(out)
    assert result.ok and source == "values cached in the workbook", result.differences[:5]
    assert not recalc.name_errors


def test_cli_recalc_and_check_with_engine_calc(tmp_path):
    book = ROOT / "workbooks" / "station_budget.xlsx"
    before = book.read_bytes()
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = tmp_path / "out.xlsx"
    run = subprocess.run([sys.executable, "-m", "tubefuncs", "recalc", str(book), "--engine",
                          "calc", "-o", str(out)], capture_output=True, text=True, env=env,
                         timeout=300)
    assert run.returncode == 0, run.stderr
    assert out.is_file() and book.read_bytes() == before
    run = subprocess.run([sys.executable, "-m", "tubefuncs", "check", str(out)],
                         capture_output=True, text=True, env=env, timeout=300)
    assert run.returncode == 0 and run.stdout.startswith("OK"), run.stdout + run.stderr


def test_start_up_timeout_is_one_line_and_leaves_no_process():
    started = time.monotonic()
    with pytest.raises(CalcUnavailable) as info:
        CalcSession(start_timeout=0.3)
    assert "within 0.3 s" in str(info.value) and "\n" not in str(info.value)
    assert time.monotonic() - started < 60


def test_session_kills_its_process_group(calc):
    session = CalcSession()
    pid = session.proc.pid
    session.close()
    with pytest.raises(ProcessLookupError):
        os.killpg(pid, signal.SIG_DFL or 0)
