"""The Calc extension's generated files, its adapter and the --engine calc plumbing,
without LibreOffice (the tests in real Calc are in test_calc.py)."""

import hashlib
import json
import os
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
import zipfile
from pathlib import Path

import numpy as np
import pytest

from tubefuncs.calc import IMPLEMENTATION, SAVED_PREFIX, adapter, generate
from tubefuncs.calc.build import PATHS_NAME, build_oxt
from tubefuncs.calc.engine import calc_formula
from tubefuncs.catalogue import CATALOGUE
from tubefuncs.headless.catalogue_bridge import strip_udf_prefix

ROOT = Path(__file__).resolve().parent.parent
OOR = "{http://openoffice.org/2001/registry}"


def test_generated_text_files_are_current():
    stale = generate.stale(with_rdb=False)
    assert not stale, f"stale: {stale}; run python -m tubefuncs.calc.generate"


@pytest.mark.skipif(generate.find_unoidl_write() is None,
                    reason="unoidl-write (LibreOffice SDK, apt-get install libreoffice-dev) "
                           "is not installed: the checked-in type library is not recompiled")
def test_type_library_is_current():
    compiled = generate.compile_rdb(generate.render_idl())
    assert (generate.EXT_DIR / generate.RDB_NAME).read_bytes() == compiled, \
        "XFunctions.rdb is stale; run python -m tubefuncs.calc.generate"
    assert generate.compile_rdb(generate.render_idl()) == compiled  # reproducible


def test_every_catalogue_function_is_declared_with_help_for_each_argument():
    idl = generate.render_idl()
    root = ET.fromstring(generate.render_xcu())
    funcs = {n.get(OOR + "name"): n for n in root.iter("node")
             if n.get(OOR + "name", "").startswith("TUBE_")}
    info = [n for n in root.iter("node") if n.get(OOR + "name") == IMPLEMENTATION]
    assert len(info) == 1
    assert set(funcs) == set(CATALOGUE) | {generate.ERROR_TEXT}
    for fn in CATALOGUE.values():
        assert re.search(rf"\b{fn.name}\(", idl)
        node = funcs[fn.name]
        props = {p.get(OOR + "name"): p.findtext("value") for p in node.findall("prop")}
        assert props["DisplayName"] == fn.name
        assert 0 < len(props["Description"]) <= 255
        params = node.find("node").findall("node")
        assert [p.get(OOR + "name") for p in params] == \
            [generate.idl_name(p.name) for p in fn.worksheet_params]
        for p, xp in zip(fn.worksheet_params, params):
            pprops = {q.get(OOR + "name"): q.findtext("value") for q in xp.findall("prop")}
            assert pprops["DisplayName"] == p.name
            assert 0 < len(pprops["Description"]) <= 255
            assert p.help.split()[0] in pprops["Description"]


def test_idl_parameter_names():
    assert generate.idl_name("beam_radius") == "beamRadius"
    assert generate.idl_name("unit") == "unit"
    assert generate.idl_name("type") == "typeArg"          # a word IDL reserves
    for fn in CATALOGUE.values():
        for p in fn.worksheet_params:
            assert re.fullmatch(r"[a-z][A-Za-z0-9]*", generate.idl_name(p.name)), p.name


def test_oxt_holds_the_extension_and_the_paths_for_libreoffice_python(tmp_path):
    oxt = build_oxt(tmp_path / "t.oxt")
    with zipfile.ZipFile(oxt) as z:
        names = set(z.namelist())
        record = json.loads(z.read(PATHS_NAME))
        manifest = z.read("META-INF/manifest.xml").decode()
    assert {"XFunctions.rdb", "tubefuncs_calc.py", "CalcAddIns.xcu", "description.xml",
            "META-INF/manifest.xml", "tubefuncs.components"} <= names
    for entry in ("XFunctions.rdb", "tubefuncs.components", "CalcAddIns.xcu"):
        assert f'manifest:full-path="{entry}"' in manifest
    assert record["python"] == "{}.{}".format(*sys.version_info[:2])
    import tubefuncs
    assert str(Path(tubefuncs.__file__).resolve().parent.parent) in record["sys_path"]
    again = build_oxt(tmp_path / "u.oxt")
    assert hashlib.sha256(oxt.read_bytes()).digest() == \
        hashlib.sha256(again.read_bytes()).digest()


def test_adapter_arguments_as_calc_passes_them():
    # a range: tuple of row tuples, '' for an empty cell
    assert adapter.from_calc(((1.0,), ("",), ("2 kV",))) == [[1.0], [None], ["2 kV"]]
    assert adapter.from_calc(((5.0,),)) == 5.0
    assert adapter.from_calc(((5.0,),), "table") == [[5.0]]
    assert adapter.from_calc(None) is None


def _payload(x: float) -> int:
    import struct
    return struct.unpack("<Q", struct.pack("<d", x))[0] & 0xFFFF


def test_adapter_results_and_error_values():
    # LibreOffice's FormulaError codes: 503 = #NUM! (IllegalFPOperation), 519 = #VALUE!
    # (NoValue); Calc reads them from a NaN's payload
    assert _payload(adapter.error_nan("#NUM!")) == 503
    assert _payload(adapter.error_nan("#VALUE!")) == 519
    out = adapter.call("TUBE_PILLBOX_FREQ", ("38 mm",))
    # TM010 of a pillbox: f = j01 c / (2 pi a), j01 = 2.404825557695773 (first zero of
    # J0, Abramowitz & Stegun Table 9.5); e.g. Pozar, Microwave Engineering, sec. 6.7
    assert out == pytest.approx(2.404825557695773 * 299792458.0 / (2 * np.pi * 0.038),
                                rel=1e-9)
    assert _payload(adapter.call("TUBE_PILLBOX_FREQ", (-1.0,))) == 503
    assert _payload(adapter.call("TUBE_PILLBOX_FREQ", ("abc",))) == 519
    col = adapter.call("TUBE_PILLBOX_FREQ", (((0.038,), (-1.0,), ("x",)),))
    assert isinstance(col, tuple) and len(col) == 3
    assert np.isfinite(col[0][0]) and _payload(col[1][0]) == 503 and _payload(col[2][0]) == 519
    assert adapter.call("TUBE_VERSION", ()).startswith("tubefuncs ")


def test_error_text_names_argument_and_value():
    text = adapter.error_text("TUBE_PILLBOX_FREQ", (-1.0,))
    assert "radius" in text and "-1" in text
    assert adapter.error_text("PILLBOX_FREQ", (0.038,)) == ""
    texts = adapter.error_text("TUBE_PILLBOX_FREQ", (((0.038,), ("",)),))
    assert texts[0] == ("",) and "required" in texts[1][0]
    assert "function_name" in adapter.error_text("", ())


def test_formulas_renamed_for_calc_outside_strings():
    assert calc_formula("TUBE_GAMMA(A1)+_xludf.tube_beta(B1)") == \
        f"{SAVED_PREFIX}TUBE_GAMMA(A1)+{SAVED_PREFIX}TUBE_BETA(B1)"
    assert calc_formula('TUBE_HELP("TUBE_GAMMA(")') == f'{SAVED_PREFIX}TUBE_HELP("TUBE_GAMMA(")'
    assert calc_formula("MY_TUBE_GAMMA(1)+XTUBE_A(1)") == "MY_TUBE_GAMMA(1)+XTUBE_A(1)"


def test_calc_saved_names_read_back_as_catalogue_names():
    assert strip_udf_prefix(f"{SAVED_PREFIX}TUBE_GAMMA") == "TUBE_GAMMA"
    assert strip_udf_prefix(f"{SAVED_PREFIX.lower()}tube_gamma") == "TUBE_GAMMA"


def _run_cli(*args, env_extra=None):
    env = dict(os.environ, PYTHONPATH=str(ROOT), **(env_extra or {}))
    return subprocess.run([sys.executable, "-m", "tubefuncs", *args], capture_output=True,
                          text=True, env=env, timeout=300, cwd=str(ROOT))


@pytest.mark.parametrize("command", ["recalc", "check"])
def test_engine_calc_without_libreoffice_is_one_line_and_nonzero(tmp_path, command):
    book = ROOT / "workbooks" / "station_budget.xlsx"
    before = book.read_bytes()
    extra = ["-o", str(tmp_path / "out.xlsx")] if command == "recalc" else []
    run = _run_cli(command, str(book), "--engine", "calc", *extra,
                   env_extra={"TUBEFUNCS_SOFFICE": str(tmp_path / "no-soffice")})
    assert run.returncode == 2
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1 and "LibreOffice not found" in lines[0], run.stderr
    assert "Traceback" not in run.stderr
    assert book.read_bytes() == before
    assert not (tmp_path / "out.xlsx").exists()


def test_engine_calc_soffice_that_dies_is_one_line(tmp_path):
    from tubefuncs.calc.runner import find_uno_python
    if find_uno_python() is None:
        pytest.skip("no Python with the UNO bridge (apt-get install python3-uno)")
    fake = tmp_path / "soffice"
    fake.write_text("#!/bin/sh\nexit 3\n")
    fake.chmod(0o755)
    run = _run_cli("check", str(ROOT / "workbooks" / "station_budget.xlsx"), "--engine",
                   "calc", env_extra={"TUBEFUNCS_SOFFICE": str(fake),
                                      "TUBEFUNCS_CALC_START_TIMEOUT": "20"})
    assert run.returncode == 2
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1 and "LibreOffice" in lines[0] and "status 3" in lines[0], run.stderr
