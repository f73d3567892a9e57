"""What the headless package imports, and when.

- No import circle inside ``tubefuncs.headless``: every import counts, those
  inside functions too (the fast path builds on the general engine's types;
  the general engine never reaches back into the fast path).
- A cold command-line run imports only what the workbook needs: no
  ``scipy.stats`` / ``scipy.interpolate`` (pulled in by the formula library's
  statistics module) unless a function uses them, no pint without unit text.
- The statistics functions whose scipy import is deferred still compute the
  right numbers (checked against scipy and numpy directly).
"""

from __future__ import annotations

import ast
import json
import os
import subprocess
import sys

import numpy as np
import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
PACKAGE = os.path.join(ROOT, "tubefuncs", "headless")


def _module_name(path: str) -> str:
    rel = os.path.relpath(path, os.path.join(ROOT))[:-3].replace(os.sep, ".")
    return rel[:-9] if rel.endswith(".__init__") else rel


def _imports(path: str, name: str) -> set[str]:
    """Modules of tubefuncs.headless that ``path`` imports anywhere in its code."""
    is_package = path.endswith("__init__.py")
    base = name.split(".") if is_package else name.split(".")[:-1]
    found = set()
    for node in ast.walk(ast.parse(open(path, encoding="utf-8").read())):
        targets = []
        if isinstance(node, ast.ImportFrom):
            if node.level:
                stem = base[:len(base) - (node.level - 1)]
                mod = ".".join(stem + ([node.module] if node.module else []))
            else:
                mod = node.module or ""
            targets = [mod] + [f"{mod}.{a.name}" for a in node.names]
        elif isinstance(node, ast.Import):
            targets = [a.name for a in node.names]
        for t in targets:
            if t.startswith("tubefuncs.headless"):
                found.add(t)
    return found


def _graph() -> dict[str, set[str]]:
    modules = {}
    for folder, _, files in os.walk(PACKAGE):
        for f in files:
            if f.endswith(".py"):
                path = os.path.join(folder, f)
                modules[_module_name(path)] = path
    graph = {}
    for name, path in modules.items():
        # an import of a package's member resolves to the member module when it is one
        graph[name] = {t for t in _imports(path, name) if t in modules and t != name}
    return graph


def _cycles(graph) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan)."""
    index, low, stack, on, out = {}, {}, [], set(), []
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in graph[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_no_import_circles_in_the_headless_package():
    graph = _graph()
    # package __init__ modules re-export their members: leave the package-to-member
    # edges out (importing a member runs its package first, not the reverse)
    for name in graph:
        graph[name] = {t for t in graph[name] if not name.startswith(t + ".")}
    pruned = {n: {t for t in deps if not (n in ("tubefuncs.headless", "tubefuncs.headless.vector")
                                          and t.startswith(n + "."))}
              for n, deps in graph.items()}
    assert _cycles(pruned) == []


def test_the_general_engine_does_not_import_the_fast_path():
    graph = _graph()
    for general in ("tubefuncs.headless.engine", "tubefuncs.headless.writer",
                    "tubefuncs.headless.evaluate", "tubefuncs.headless.loader"):
        assert not any(t.startswith("tubefuncs.headless.vector") for t in graph[general]), general


def test_the_cycle_finder_finds_a_cycle():
    assert _cycles({"a": {"b"}, "b": {"a"}, "c": set()}) == [["a", "b"]]


def _cold(code: str) -> dict:
    env = dict(os.environ, PYTHONPATH=ROOT + os.pathsep + os.environ.get("PYTHONPATH", ""))
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          cwd=ROOT, env=env, timeout=120)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


HEAVY = ("scipy.stats", "scipy.interpolate", "scipy.linalg", "pint", "dask")


def test_cold_recalc_of_a_numbers_only_book_imports_nothing_heavy(tmp_path):
    import openpyxl

    book = tmp_path / "plain.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    for r in range(1, 6):
        ws.cell(r, 1, 2.9e9 + r * 1e6)
        ws.cell(r, 2, f"=TUBE_TRANSIT_ANGLE(A{r}, 0.012, 80000)")
        ws.cell(r, 3, f"=MAX(B{r}, 1) + SUM(A{r}:B{r})")
    wb.save(book)
    seen = _cold(
        "import json, sys\n"
        "from tubefuncs.cli import main\n"
        f"rc = main(['recalc', {str(book)!r}, '-o', {str(tmp_path / 'out.xlsx')!r}])\n"
        f"print(json.dumps({{'rc': rc, 'heavy': [m for m in {HEAVY!r} "
        f"if isinstance(sys.modules.get(m), type(sys))]}}))")
    assert seen == {"rc": 0, "heavy": []}


def test_unit_text_loads_pint_without_dask():
    seen = _cold(
        "import json, sys\n"
        "from tubefuncs.units import to_si\n"
        "v = to_si('80 kV', 'V')\n"
        "print(json.dumps({'v': v, 'pint': 'pint' in sys.modules, "
        "'dask': 'dask' in sys.modules}))")
    assert seen == {"v": 80e3, "pint": True, "dask": False}


def test_deferred_statistics_functions_still_compute():
    """KURT and FORECAST need the scipy modules whose import is deferred."""
    seen = _cold(
        "import json, sys\n"
        "import numpy as np\n"
        "from tubefuncs.headless.functions import excel_library\n"
        "lib = excel_library()\n"
        "loaded_before = 'scipy.stats' in sys.modules\n"
        "x = np.array([[1.0, 2.0, 3.0, 4.0, 9.0, 4.5]], dtype=object)\n"
        "y = np.array([[2.0, 4.1, 5.9, 8.2, 18.5, 9.0]], dtype=object)\n"
        "k = float(lib['KURT'](x))\n"
        "f = float(lib['FORECAST'](5.0, y, x))\n"
        "print(json.dumps({'before': loaded_before, 'kurt': k, 'forecast': f}))")
    assert seen["before"] is False
    from scipy import stats

    xs = np.array([1.0, 2.0, 3.0, 4.0, 9.0, 4.5])
    ys = np.array([2.0, 4.1, 5.9, 8.2, 18.5, 9.0])
    # Excel's KURT is the bias-corrected excess kurtosis (scipy: fisher=True, bias=False)
    assert seen["kurt"] == pytest.approx(stats.kurtosis(xs, fisher=True, bias=False), rel=1e-12)
    slope, intercept = np.polyfit(xs, ys, 1)          # least-squares line
    assert seen["forecast"] == pytest.approx(intercept + slope * 5.0, rel=1e-12)


# ----------------------------------------------------------------------------- catalogue index

def _catalogue_run(cache: str, code: str) -> dict:
    env = dict(os.environ, XDG_CACHE_HOME=cache,
               PYTHONPATH=ROOT + os.pathsep + os.environ.get("PYTHONPATH", ""))
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          cwd=ROOT, env=env, timeout=120)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


LOOKUP = (
    "import json, sys\n"
    "from tubefuncs.catalogue import lookup, names\n"
    "from tubefuncs.headless.functions import resolve\n"
    "fn = lookup('tube_beta')\n"
    "kinds = [resolve(n).kind for n in ('TUBE_BETA', '_xludf.TUBE_FSPL', 'SUM')]\n"
    "topics = sorted(m for m in sys.modules if m.startswith('tubefuncs.catalogue.'))\n"
    "kinds.append(resolve('TUBE_NOPE').kind)   # (confirmed against the whole catalogue)\n"
    "print(json.dumps({'name': fn.name, 'n': len(names()), 'kinds': kinds,\n"
    "                  'topics': topics}))")


def test_catalogue_index_imports_only_the_topics_a_workbook_calls(tmp_path):
    from tubefuncs.catalogue import CATALOGUE

    first = _catalogue_run(str(tmp_path), LOOKUP)        # no index yet: everything
    second = _catalogue_run(str(tmp_path), LOOKUP)       # the index written by the first
    for seen in (first, second):
        assert seen["name"] == "TUBE_BETA" and seen["n"] == len(CATALOGUE)
        assert seen["kinds"] == ["catalogue", "catalogue", "excel", "unknown"]
    assert len(first["topics"]) > 3
    assert "tubefuncs.catalogue.beam" in second["topics"]
    assert "tubefuncs.catalogue.gap" not in second["topics"]


def test_catalogue_index_that_does_not_match_is_not_used(tmp_path):
    from tubefuncs.catalogue import CATALOGUE

    _catalogue_run(str(tmp_path), LOOKUP)
    path = tmp_path / "tubefuncs" / "catalogue-index.json"
    data = json.loads(path.read_text())
    # a damaged index: a name dropped, under the right fingerprint
    dropped = dict(data, names={k: v for k, v in data["names"].items() if k != "TUBE_BETA"})
    path.write_text(json.dumps(dropped))
    seen = _catalogue_run(str(tmp_path), LOOKUP)
    assert seen["name"] == "TUBE_BETA"                   # found all the same
    assert seen["kinds"][0] == "catalogue"
    # an index of other sources (fingerprint differs), or not JSON: ignored
    for text in (json.dumps(dict(data, fingerprint="0" * 64, names={"TUBE_BETA": "gap"})),
                 "not json", json.dumps({"fingerprint": data["fingerprint"],
                                         "names": {"TUBE_BETA": "../../evil"}})):
        path.write_text(text)
        seen = _catalogue_run(str(tmp_path), LOOKUP)
        assert seen["name"] == "TUBE_BETA" and seen["n"] == len(CATALOGUE)
