"""Sweeps and tolerance studies (tubefuncs.sweeps): studies, points, kernel, outputs.

The cluster tests (dask.distributed LocalCluster) are in test_sweeps_cluster.py.
"""

from __future__ import annotations

import csv
import math
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("dask")
pa = pytest.importorskip("pyarrow")
import pyarrow.parquet as pq  # noqa: E402
from scipy import constants as C  # noqa: E402

from tubefuncs import worksheet  # noqa: E402
from tubefuncs.sweeps import StudyError, SweepError, build_study, load_study, run_sweep  # noqa: E402
from tubefuncs.sweeps.kernel import BLOCK, inputs  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "workbooks" / "examples"

# The invented 6-cavity klystron of workbooks/examples/klystron_cavities.csv (demo data).
CAVITIES = [[0.000, 3.000e9, 95, 3200, 150, 0.011],
            [0.060, 2.975e9, 100, 600, None, 0.010],
            [0.120, 3.018e9, 100, 600, None, 0.010],
            [0.185, 3.037e9, 105, 2500, None, 0.010],
            [0.275, 3.050e9, 110, 3000, None, 0.010],
            [0.350, 3.000e9, 90, 3500, 30, 0.013]]
BEAM = {"frequency": "3.0 GHz", "beam_radius": "4 mm", "tunnel_radius": "6 mm"}


def transit_angle_deg(f, length, v):
    """theta = omega L / v, v = c beta, beta = sqrt(1 - 1/gamma^2), gamma = 1 + eV/(m c^2):
    relativistic kinematics of an electron through potential V (any textbook;
    constants from CODATA via scipy.constants)."""
    gamma = 1.0 + C.e * v / (C.m_e * C.c ** 2)
    u = C.c * np.sqrt(1.0 - 1.0 / gamma ** 2)
    return np.degrees(2 * np.pi * f * length / u)


def grid_study(**extra):
    raw = {"sweep": {"mode": "grid"},
           "results": {"angle": {"function": "TUBE_TRANSIT_ANGLE", "unit": "deg"}},
           "fixed": {"length": "12 mm"},
           "grid": {"frequency": {"from": "2.9 GHz", "to": "3.1 GHz", "steps": 7},
                    "voltage": ["80 kV", "0 kV", "100 kV", "-3 kV"]},
           "limits": {"angle": {"max": 85}}}
    raw.update(extra)
    return raw


def gain_study(points=300, chunk=None, seed=7):
    raw = {"sweep": {"mode": "sample", "points": points, "seed": seed},
           "results": {"gain": {"function": "TUBE_SMALL_SIGNAL_GAIN"},
                       "angle": {"function": "TUBE_TRANSIT_ANGLE",
                                 "args": {"length": "11 mm"}}},
           "fixed": dict(BEAM, cavities=CAVITIES),
           "tolerance": {"voltage": {"nominal": "90 kV", "normal": "0.3 kV"},
                         "current": {"nominal": "27 A", "uniform": "0.2 A"},
                         "cavities.frequency": {"normal": "1 MHz"},
                         "cavities[1].r_over_q": {"uniform": "3 %"}},
           "limits": {"gain": {"min": 60.5}}}
    if chunk:
        raw["sweep"]["chunk"] = chunk
    return raw


# ------------------------------------------------------------------ the grid

def test_grid_rows_match_independent_formula_and_keep_error_rows():
    study = build_study(grid_study())
    assert study.n_points == 28
    t = run_sweep(study, scheduler="sync").table
    assert t.column("point").to_pylist() == list(range(28))
    f = np.array(t.column("frequency").to_pylist())
    v = np.array(t.column("voltage").to_pylist())
    # first key slowest: frequency changes every 4 rows
    assert np.allclose(f[::4], np.linspace(2.9e9, 3.1e9, 7)) and np.all(f[:4] == 2.9e9)
    assert v[:4].tolist() == [80e3, 0.0, 100e3, -3e3]
    y = t.column("angle").to_pylist()
    err = t.column("angle_error").to_pylist()
    for fi, vi, yi, ei in zip(f, v, y, err):
        if vi <= 0:
            assert yi is None and ei.startswith("#NUM! TUBE_TRANSIT_ANGLE: voltage must be > 0")
        else:
            assert ei is None
            assert yi == pytest.approx(transit_angle_deg(fi, 12e-3, vi), rel=1e-12)


def test_grid_points_follow_numpy_c_order_in_any_chunk():
    raw = grid_study()
    raw["grid"] = {"frequency": [1e9, 2e9, 3e9], "voltage": [1e3, 2e3, 3e3, 4e3, 5e3],
                   "length": [1e-3, 2e-3]}
    raw["fixed"] = {}
    study = build_study(raw)
    digits = np.unravel_index(np.arange(30), (3, 5, 2))     # numpy's own C order
    for a in range(30):
        for b in range(a + 1, 31):
            x = inputs(study, a, b)
            for key, d in zip(("frequency", "voltage", "length"), digits):
                assert np.array_equal(x[key], np.asarray(raw["grid"][key])[d[a:b]])


def test_every_row_equals_the_worksheet_call_of_that_point_alone():
    t = run_sweep(build_study(grid_study()), scheduler="threads").table
    for row in t.to_pylist():
        try:
            expected = worksheet.evaluate("TUBE_TRANSIT_ANGLE",
                                          [row["frequency"], "12 mm", row["voltage"], "deg"])
            assert row["angle"] == expected.value and row["angle_error"] is None
        except worksheet.TubeInputError as exc:
            assert row["angle"] is None and row["angle_error"] == exc.cell_text()


def test_summary_quantiles_and_fraction_meeting_the_limits():
    r = run_sweep(build_study(grid_study()), scheduler="sync")
    y = np.array([x for x in r.table.column("angle").to_pylist() if x is not None])
    s = r.summary["results"]["angle"]
    assert s["valid"] == 14 and s["errors"] == 14
    assert s["quantiles"]["0.5"] == pytest.approx(np.quantile(y, 0.5))
    assert s["min"] == y.min() and s["max"] == y.max()
    # errors never meet a specification: counted over all 28 points
    assert r.summary["meeting_all_limits"] == pytest.approx((y <= 85).sum() / 28)


def test_table_columns_of_the_cavity_table_and_log_spacing():
    raw = {"sweep": {"mode": "grid"},
           "results": {"gain": "TUBE_SMALL_SIGNAL_GAIN"},
           "fixed": {"voltage": "90 kV", "current": "27 A", "beam_radius": "4 mm",
                     "tunnel_radius": "6 mm", "cavities": CAVITIES},
           "grid": {"cavities[6].position": [0.34, 0.35, 0.36],
                    "frequency": {"from": "2.99 GHz", "to": "3.01 GHz", "steps": 3,
                                  "spacing": "log"}}}
    study = build_study(raw)
    t = run_sweep(study, scheduler="sync").table
    assert t.num_rows == 9
    rows = t.to_pylist()
    assert rows[4]["cavities[6].position"] == 0.35
    assert rows[4]["frequency"] == pytest.approx(math.sqrt(2.99e9 * 3.01e9))
    for row in rows:
        table = [list(r) for r in CAVITIES]
        table[5][0] = row["cavities[6].position"]
        expected = worksheet.evaluate("TUBE_SMALL_SIGNAL_GAIN", [
            row["frequency"], "90 kV", "27 A", "4 mm", "6 mm", table]).value
        assert row["gain"] == pytest.approx(expected, rel=1e-12, abs=0)


# ------------------------------------------------------------------ samples

def test_sample_does_not_depend_on_chunk_size_or_scheduler():
    a = run_sweep(build_study(gain_study(points=300, chunk=300)), scheduler="sync").table
    b = run_sweep(build_study(gain_study(points=300, chunk=37)), scheduler="threads").table
    assert a.equals(b)
    c = run_sweep(build_study(gain_study(points=300, seed=8)), scheduler="sync").table
    assert not a.column("voltage").equals(c.column("voltage"))


def test_sample_laws_and_cavity_rows():
    study = build_study(gain_study(points=2 * BLOCK + 100))
    x = inputs(study, 0, study.n_points)
    v, i = x["voltage"], x["current"]
    # normal, sigma 300 V: the sample mean within 4 standard errors, the std within 5 %
    assert abs(v.mean() - 90e3) < 4 * 300 / math.sqrt(v.size)
    assert v.std() == pytest.approx(300, rel=0.05)
    # uniform half width 0.2 A: inside the interval, std = h/sqrt(3)
    assert np.all(np.abs(i - 27) <= 0.2) and i.std() == pytest.approx(0.2 / math.sqrt(3),
                                                                       rel=0.05)
    f = x["cavities.frequency"]                       # every row its own draw
    assert f.shape == (study.n_points, 6)
    nominal = np.array([r[1] for r in CAVITIES])
    assert np.allclose((f - nominal).std(axis=0), 1e6, rtol=0.05)
    assert abs(np.corrcoef(f[:, 0], f[:, 1])[0, 1]) < 0.05
    rq = x["cavities[1].r_over_q"]                    # 3 % of 95 ohm
    assert np.all(np.abs(rq - 95) <= 0.03 * 95 + 1e-12)
    # a chunk starting inside a block draws what the whole run draws there
    part = inputs(study, BLOCK - 5, BLOCK + 7)
    assert np.array_equal(part["voltage"], v[BLOCK - 5:BLOCK + 7])


def test_per_point_tables_match_the_worksheet():
    study = build_study(gain_study(points=20))
    assert study.per_point
    t = run_sweep(study, scheduler="sync").table
    for row in t.to_pylist()[:8]:
        table = [list(r) for r in CAVITIES]
        for k in range(6):
            table[k][1] = row[f"cavities[{k + 1}].frequency"]
        table[0][2] = row["cavities[1].r_over_q"]
        expected = worksheet.evaluate("TUBE_SMALL_SIGNAL_GAIN", [
            "3.0 GHz", row["voltage"], row["current"], "4 mm", "6 mm", table]).value
        assert row["gain"] == expected


def test_a_failing_point_keeps_its_row_with_the_message():
    raw = gain_study(points=50)
    raw["tolerance"]["cavities[2].position"] = {"uniform": "0.2 m"}   # sometimes out of order
    t = run_sweep(build_study(raw), scheduler="sync").table
    assert t.num_rows == 50
    err = t.column("gain_error").to_pylist()
    bad = [e for e in err if e]
    assert bad and all(e.startswith(("#NUM!", "#VALUE!")) for e in bad)
    assert all((g is None) == (e is not None) for g, e in zip(t.column("gain").to_pylist(), err))


# ---------------------------------------------------------- study checking

@pytest.mark.parametrize("change, words", [
    ({"results": {"x": {"function": "TUBE_NOPE"}}}, "not a catalogue function"),
    ({"grid": {"voltage": {"from": 1, "to": 2, "steps": 0}}}, "steps must be between"),
    ({"grid": {"voltage": {"from": 1, "to": 2, "steps": 10**5}, "frequency":
               {"from": 1, "to": 2, "steps": 10**5}}}, "at most 100,000,000"),
    ({"fixed": {"length": "12 kg"}}, "length"),
    ({"fixed": {"length": -1}}, "fixed.length must be >= 0 m (got -1 m)"),
    ({"grid": {"beam_voltage": [1]}}, "not an argument"),
    ({"tolerance": {"voltage": {"normal": 1, "nominal": 2}}}, "takes no [tolerance]"),
    ({"limits": {"nope": {"min": 1}}}, "no result named"),
    ({"limits": {"angle": {"min": 3, "max": 1}}}, "above max"),
    ({"bogus": {}}, "unknown section"),
])
def test_bad_studies_are_refused_with_a_clear_message(change, words):
    raw = grid_study()
    raw.update(change)
    with pytest.raises(StudyError, match=None) as info:
        build_study(raw)
    assert words in str(info.value)


def test_missing_argument_and_bad_sample_settings():
    raw = gain_study()
    del raw["fixed"]["beam_radius"]
    with pytest.raises(StudyError, match="needs 'beam_radius'"):
        build_study(raw)
    raw = gain_study()
    del raw["sweep"]["seed"]
    with pytest.raises(StudyError, match="sweep.seed is required"):
        build_study(raw)
    raw = gain_study()
    raw["tolerance"]["cavities[9].q0"] = {"normal": 1}
    with pytest.raises(StudyError, match="rows 1 to 6"):
        build_study(raw)


# ---------------------------------------------------------------- outputs

def test_folder_outputs_agree_and_resume_skips_written_chunks(tmp_path):
    study = build_study(grid_study(sweep={"mode": "grid", "chunk": 5}))
    r = run_sweep(study, str(tmp_path / "out"), scheduler="threads")
    table = pq.read_table(r.files["parquet"])
    assert table.equals(run_sweep(study, scheduler="sync").table)
    with open(r.files["csv"], newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == 28 and float(rows[0]["angle"]) == table.column("angle")[0].as_py()
    import openpyxl

    wb = openpyxl.load_workbook(r.files["xlsx"])
    assert wb["results"].max_row == 29
    assert wb["results"]["D2"].value == float(rows[0]["angle"])
    # remove two chunks, as an interruption would leave them; the rerun computes only those
    os.remove(tmp_path / "out" / "chunks" / "part-000001.parquet")
    os.remove(tmp_path / "out" / "chunks" / "part-000004.parquet")
    again = run_sweep(study, str(tmp_path / "out"), scheduler="threads")
    assert again.resumed_chunks == study.n_chunks - 2
    assert pq.read_table(again.files["parquet"]).equals(table)
    other = build_study(grid_study(sweep={"mode": "grid", "chunk": 6}))
    with pytest.raises(SweepError, match="another study"):
        run_sweep(other, str(tmp_path / "out"))


def test_processes_give_the_rows_of_a_serial_run():
    study = build_study(gain_study(points=120, chunk=30))
    a = run_sweep(study, scheduler="sync").table
    b = run_sweep(study, scheduler="processes", workers=2).table
    assert a.equals(b)


def test_example_study_and_command_line(tmp_path):
    study = load_study(EXAMPLES / "gain_tolerance.toml")
    assert study.n_points == 2000 and study.tables == {"cavities": 6}
    small = tmp_path / "small.toml"
    text = (EXAMPLES / "gain_tolerance.toml").read_text().replace("points = 2000", "points = 40")
    small.write_text(text.replace('"klystron_cavities.csv"',
                                  repr(str(EXAMPLES / "klystron_cavities.csv"))))
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = subprocess.run([sys.executable, "-m", "tubefuncs", "sweep", str(small), "-o",
                          str(tmp_path / "o"), "--local", "sync"], capture_output=True,
                         text=True, env=env, timeout=120)
    assert out.returncode == 0, out.stderr
    assert "meeting every limit" in out.stdout and (tmp_path / "o" / "results.parquet").exists()
    bad = subprocess.run([sys.executable, "-m", "tubefuncs", "sweep", str(tmp_path / "no.toml"),
                          "-o", str(tmp_path / "o2")], capture_output=True, text=True, env=env,
                         timeout=60)
    assert bad.returncode == 2 and "not found" in bad.stderr
    nobody = subprocess.run([sys.executable, "-m", "tubefuncs", "sweep", str(small), "-o",
                             str(tmp_path / "o3"), "--scheduler", "tcp://127.0.0.1:1"],
                            capture_output=True, text=True, env=env, timeout=120)
    assert nobody.returncode == 2 and "cannot reach the dask scheduler" in nobody.stderr


def test_workbook_sheet_study(tmp_path):
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "study"
    for row in [("section", "key", "field", "value"),
                ("sweep", "mode", None, "grid"),
                ("results", "angle", "function", "TUBE_TRANSIT_ANGLE"),
                ("results", "angle", "unit", "deg"),
                ("fixed", "length", None, "12 mm"),
                ("grid", "frequency", "from", "2.9 GHz"),
                ("grid", "frequency", "to", "3.1 GHz"),
                ("grid", "frequency", "steps", 7),
                ("grid", "voltage", "values", "80 kV; 0 kV; 100 kV; -3 kV"),
                ("limits", "angle", "max", 85)]:
        ws.append(row)
    path = tmp_path / "study.xlsx"
    wb.save(path)
    from_sheet = run_sweep(load_study(path), scheduler="sync")
    from_dict = run_sweep(build_study(grid_study()), scheduler="sync")
    assert from_sheet.table.equals(from_dict.table)


# ------------------------------------------------------------ recalc --dask

def test_recalc_on_dask_gives_the_default_answers(tmp_path):
    from headless_support import make_book

    from tubefuncs.headless import recalculate
    from tubefuncs.sweeps.recalc import dask_groups

    n = 3000
    cells = {}
    for r in range(1, n + 1):
        cells[f"A{r}"] = 2.9e9 + r * 1e5
        cells[f"B{r}"] = -5.0 if r % 97 == 0 else 80e3 + r
        cells[f"C{r}"] = f'=TUBE_TRANSIT_ANGLE(A{r},"12 mm",B{r},"deg")'
        cells[f"D{r}"] = f'=TUBE_BEAM_POWER(B{r},"27 A","kW")'
    path = make_book(tmp_path / "sweep.xlsx", {"Sweep": cells})
    default = recalculate(path)
    with dask_groups(min_rows=500, chunk_rows=700) as ev:
        on_dask = recalculate(path)
    assert ev.dispatched == 2
    assert default.values.keys() == on_dask.values.keys()
    assert all(repr(default.values[k]) == repr(on_dask.values[k]) for k in default.values)
    assert default.messages == on_dask.messages


def test_large_signal_functions_default_to_processes_and_small_chunks():
    from tubefuncs.catalogue import CATALOGUE
    from tubefuncs.sweeps import default_scheduler

    slow = [name for name, fn in CATALOGUE.items() if fn.category == "Large signal"]
    if not slow:
        pytest.skip("the large-signal model is not in this catalogue")
    raw = gain_study(points=100)
    raw["results"] = {"p": {"function": "TUBE_OUTPUT_POWER"}}
    raw["fixed"]["drive_power"] = "1 W"
    del raw["limits"]
    study = build_study(raw)
    assert default_scheduler(study) == "processes" and study.chunk == 8
    assert default_scheduler(build_study(grid_study())) == "threads"


def test_workbook_sheet_with_a_cavity_range_and_per_result_arguments(tmp_path):
    import openpyxl

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Tolerances"
    for row in [("sweep", "mode", None, "sample"), ("sweep", "points", None, 30),
                ("sweep", "seed", None, 7),
                ("results", "gain", "function", "TUBE_SMALL_SIGNAL_GAIN"),
                ("results", "angle", "function", "TUBE_TRANSIT_ANGLE"),
                ("results", "angle", "args.length", "11 mm"),
                ("fixed", "frequency", None, "3.0 GHz"), ("fixed", "beam_radius", None, "4 mm"),
                ("fixed", "tunnel_radius", None, "6 mm"),
                ("fixed", "cavities", "range", "Cavities!A2:F7"),
                ("tolerance", "voltage", "nominal", "90 kV"),
                ("tolerance", "voltage", "normal", "0.3 kV"),
                ("tolerance", "current", "nominal", "27 A"),
                ("tolerance", "current", "uniform", "0.2 A"),
                ("tolerance", "cavities.frequency", "normal", "1 MHz"),
                ("tolerance", "cavities[1].r_over_q", "uniform", "3 %"),
                ("limits", "gain", "min", 60.5)]:
        ws.append(row)
    cav = wb.create_sheet("Cavities")
    cav.append(["position", "frequency", "R/Q", "Q0", "Qext", "gap"])
    for row in CAVITIES:
        cav.append(row)
    path = tmp_path / "study.xlsx"
    wb.save(path)
    with pytest.raises(StudyError, match="no sheet 'study'"):
        load_study(path)
    from_sheet = run_sweep(load_study(path, sheet="Tolerances"), scheduler="sync").table
    from_dict = run_sweep(build_study(gain_study(points=30)), scheduler="sync").table
    assert from_sheet.equals(from_dict)


def test_recalc_command_with_dask_option(tmp_path):
    from headless_support import make_book

    cells = {f"A{r}": f'=TUBE_TRANSIT_ANGLE("3 GHz","12 mm",{70e3 + r},"deg")'
             for r in range(1, 40)}
    path = make_book(tmp_path / "b.xlsx", {"S": cells})
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    outs = []
    for extra in ([], ["--dask"]):
        out = tmp_path / f"out{len(extra)}.xlsx"
        run = subprocess.run([sys.executable, "-m", "tubefuncs", "recalc", str(path), "-o",
                              str(out)] + extra, capture_output=True, text=True, env=env,
                             timeout=120)
        assert run.returncode == 0, run.stderr
        import openpyxl

        outs.append([c.value for c in openpyxl.load_workbook(out)["S"]["A"]])
    assert outs[0] == outs[1] and outs[0][0] == pytest.approx(
        transit_angle_deg(3e9, 12e-3, 70e3 + 1), rel=1e-12)
