"""Safety of the headless engine: inputs untouched, atomic outputs, no macros,
and a clear one-line error (exit 2), fast and in bounded memory, for every kind
of unusable or hostile file."""

from __future__ import annotations

import os
import time
import tracemalloc
import zipfile

import pytest
from headless_support import make_book, read_part, rewrite_part, sha256

from tubefuncs import cli
from tubefuncs.headless import WorkbookError, recalculate, write_recalculated
from tubefuncs.headless.limits import OLE_SIGNATURE

MiB = 1024 * 1024


@pytest.fixture
def book(tmp_path):
    return make_book(tmp_path / "book.xlsx",
                     {"S": {"A1": 2, "A2": "=A1*3", "A3": "=TUBE_BEAM_POWER(A1, 2)"},
                      "T": {"A1": "=S!A2+1"}})


def run_cli(capsys, *argv):
    """Run the CLI in-process: (exit code, stdout, stderr, seconds, peak MiB)."""
    tracemalloc.start()
    t = time.perf_counter()
    try:
        code = cli.main([str(a) for a in argv])
    finally:
        elapsed = time.perf_counter() - t
        peak = tracemalloc.get_traced_memory()[1] / MiB
        tracemalloc.stop()
    out, err = capsys.readouterr()
    return code, out, err, elapsed, peak


def assert_refused(capsys, path, *words, extra=()):
    for command in ("check", "recalc"):
        args = [command, path, *extra]
        if command == "recalc":
            args += ["-o", os.path.join(os.path.dirname(path), "out.xlsx")]
        code, out, err, elapsed, peak = run_cli(capsys, *args)
        assert code == 2, (out, err)
        lines = err.strip().splitlines()
        assert len(lines) == 1, err
        assert "Traceback" not in err + out
        for word in words:
            assert word.lower() in err.lower(), err
        assert elapsed < 10, elapsed
        assert peak < 200, f"peak {peak:.0f} MiB"
        assert not os.path.exists(os.path.join(os.path.dirname(path), "out.xlsx"))


# ----------------------------------------------------------------------------- inputs

def test_openpyxl_parses_through_defusedxml():
    import openpyxl

    assert openpyxl.DEFUSEDXML is True


def test_input_bytes_never_change(tmp_path, book, capsys):
    before, mtime = sha256(book), os.stat(book).st_mtime_ns
    run_cli(capsys, "recalc", book, "-o", tmp_path / "out.xlsx")
    run_cli(capsys, "snapshot", book)
    run_cli(capsys, "check", book)
    run_cli(capsys, "check", book, "--expected", str(book) + ".expected.tsv")
    assert sha256(book) == before
    assert os.stat(book).st_mtime_ns == mtime


def test_recalc_refuses_to_overwrite_its_input(book, capsys):
    before = sha256(book)
    code, _, err, *_ = run_cli(capsys, "recalc", book, "-o", book)
    assert code == 2 and "overwrite the input" in err
    assert sha256(book) == before


def test_outputs_are_written_atomically(tmp_path, book, monkeypatch):
    out = tmp_path / "out.xlsx"
    out.write_bytes(b"previous output")
    recalc = recalculate(book)

    def broken_replace(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(WorkbookError, match="cannot write"):
        write_recalculated(recalc, out)
    assert out.read_bytes() == b"previous output"           # old file intact
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".tubefuncs-")] == []


def test_snapshot_is_written_atomically(tmp_path, book, monkeypatch):
    from tubefuncs.headless import write_snapshot

    target = tmp_path / "snap.tsv"
    target.write_text("old\n")
    recalc = recalculate(book)
    monkeypatch.setattr(os, "replace", lambda a, b: (_ for _ in ()).throw(OSError("full")))
    with pytest.raises(WorkbookError, match="cannot write"):   # (one line, exit 2)
        write_snapshot(recalc, target)
    assert target.read_text() == "old\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".tubefuncs-")] == []


# ----------------------------------------------------------------------------- macros

def _xlsm(tmp_path, book):
    xlsm = tmp_path / "macro.xlsm"
    ct = read_part(book, "[Content_Types].xml").decode()
    ct = ct.replace("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml",
                    "application/vnd.ms-excel.sheet.macroEnabled.main+xml")
    ct = ct.replace("<Default Extension=\"xml\"",
                    "<Default Extension=\"bin\" ContentType=\"application/vnd.ms-office."
                    "vbaProject\"/><Default Extension=\"xml\"")
    rels = read_part(book, "xl/_rels/workbook.xml.rels").decode().replace(
        "</Relationships>",
        '<Relationship Id="rIdVba" Type="http://schemas.microsoft.com/office/2006/relationships/'
        'vbaProject" Target="vbaProject.bin"/></Relationships>')
    tmp = tmp_path / "step.xlsx"
    rewrite_part(book, "[Content_Types].xml", ct.encode(), out=tmp)
    rewrite_part(tmp, "xl/_rels/workbook.xml.rels", rels.encode(), out=xlsm,
                 extra={"xl/vbaProject.bin": VBA})
    return xlsm


VBA = (b"Attribute VB_Name = \"Module1\"\r\nSub Auto_Open()\r\n"
       b"    Shell \"touch /tmp/tubefuncs-macro-ran\"\r\nEnd Sub\r\n")


def test_macros_are_never_run_and_vba_is_copied_through(tmp_path, book, monkeypatch):
    import subprocess

    def forbidden(*a, **k):
        raise AssertionError("the engine tried to start a process")

    monkeypatch.setattr(subprocess, "Popen", forbidden)
    monkeypatch.setattr(os, "system", forbidden)
    from tubefuncs.headless import limits as limits_module

    opened, inspecting = [], []
    real_open = zipfile.ZipFile.open
    real_scan = limits_module._scan_whole

    def spy(self, name, *a, **k):
        if not inspecting:
            opened.append(getattr(name, "filename", name))
        return real_open(self, name, *a, **k)

    def scan(*a, **k):   # the inspection checks the part's bytes (CRC, no DTD) as opaque data
        inspecting.append(1)
        try:
            return real_scan(*a, **k)
        finally:
            inspecting.pop()

    xlsm = _xlsm(tmp_path, book)
    monkeypatch.setattr(zipfile.ZipFile, "open", spy)
    monkeypatch.setattr(limits_module, "_scan_whole", scan)
    recalc = recalculate(xlsm)
    assert "xl/vbaProject.bin" not in opened            # evaluation never reads the VBA
    assert recalc.value("S", "A2") == 6.0
    monkeypatch.setattr(zipfile.ZipFile, "open", real_open)
    out = write_recalculated(recalc, tmp_path / "out.xlsm")
    assert read_part(out, "xl/vbaProject.bin") == VBA   # copied byte for byte, not run
    out2 = write_recalculated(recalc, tmp_path / "out.xlsx")
    assert "xl/vbaProject.bin" not in zipfile.ZipFile(out2).namelist()
    assert not os.path.exists("/tmp/tubefuncs-macro-ran")


# ----------------------------------------------------------------------------- hostile files

def test_corrupt_zip_truncated(tmp_path, book, capsys):
    data = open(book, "rb").read()
    bad = tmp_path / "truncated.xlsx"
    bad.write_bytes(data[: len(data) // 2])
    assert_refused(capsys, str(bad), "corrupt")


def test_corrupt_zip_damaged_member(tmp_path, book, capsys):
    bad = tmp_path / "damaged.xlsx"
    with zipfile.ZipFile(book) as z:
        info = z.getinfo("xl/worksheets/sheet1.xml")
        offset = info.header_offset
    data = bytearray(open(book, "rb").read())
    start = offset + 30 + len(info.filename) + len(info.extra)
    for i in range(start, start + min(info.compress_size, 40)):
        data[i] ^= 0xFF
    bad.write_bytes(bytes(data))
    assert_refused(capsys, str(bad), "corrupt")


def test_not_a_workbook_text_file(tmp_path, capsys):
    bad = tmp_path / "notes.xlsx"
    bad.write_text("beam voltage 80 kV\n")
    assert_refused(capsys, str(bad), "not a workbook")


def test_not_a_workbook_other_zip(tmp_path, capsys):
    bad = tmp_path / "archive.xlsx"
    with zipfile.ZipFile(bad, "w") as z:
        z.writestr("[Content_Types].xml", "<Types/>")
        z.writestr("word/document.xml", "<document/>")
    assert_refused(capsys, str(bad), "not a workbook")


def test_encrypted_workbook(tmp_path, capsys):
    bad = tmp_path / "locked.xlsx"
    bad.write_bytes(OLE_SIGNATURE + b"\0" * 504 + "EncryptionInfo".encode("utf-16-le")
                    + b"\0" * 2048)
    assert_refused(capsys, str(bad), "encrypted")


def test_legacy_xls_container(tmp_path, capsys):
    bad = tmp_path / "old.xlsx"
    bad.write_bytes(OLE_SIGNATURE + b"\0" * 504 + "Workbook".encode("utf-16-le") + b"\0" * 2048)
    assert_refused(capsys, str(bad), "legacy .xls")


def test_missing_sheet_part(tmp_path, book, capsys):
    bad = tmp_path / "missing.xlsx"
    rewrite_part(book, "xl/worksheets/sheet2.xml", None, out=bad)
    assert_refused(capsys, str(bad), "sheet 'T'", "missing")


BOMB = b"""<?xml version="1.0"?>
<!DOCTYPE lolz [
 <!ENTITY lol "lol">
 <!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">
 <!ENTITY lol3 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">
 <!ENTITY lol4 "&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;">
 <!ENTITY lol5 "&lol4;&lol4;&lol4;&lol4;&lol4;&lol4;&lol4;&lol4;&lol4;&lol4;">
 <!ENTITY lol6 "&lol5;&lol5;&lol5;&lol5;&lol5;&lol5;&lol5;&lol5;&lol5;&lol5;">
 <!ENTITY lol7 "&lol6;&lol6;&lol6;&lol6;&lol6;&lol6;&lol6;&lol6;&lol6;&lol6;">
 <!ENTITY lol8 "&lol7;&lol7;&lol7;&lol7;&lol7;&lol7;&lol7;&lol7;&lol7;&lol7;">
 <!ENTITY lol9 "&lol8;&lol8;&lol8;&lol8;&lol8;&lol8;&lol8;&lol8;&lol8;&lol8;">
]>
<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>
<row r="1"><c r="A1" t="inlineStr"><is><t>&lol9;</t></is></c></row></sheetData></worksheet>"""


def test_xml_entity_bomb_refused_before_parsing(tmp_path, book, capsys):
    bad = tmp_path / "bomb.xlsx"
    rewrite_part(book, "xl/worksheets/sheet1.xml", BOMB, out=bad)
    assert_refused(capsys, str(bad), "DTD")


def test_xml_entity_bomb_hidden_past_the_prescan_is_stopped_by_defusedxml(tmp_path, book, capsys):
    bad = tmp_path / "bomb2.xlsx"
    hidden = BOMB.replace(b"<!DOCTYPE", b"<!--" + b" " * (80 * 1024) + b"-->\n<!DOCTYPE", 1)
    rewrite_part(book, "xl/worksheets/sheet1.xml", hidden, out=bad)
    assert_refused(capsys, str(bad), "unsafe XML")


def test_zip_bomb_refused_from_the_directory(tmp_path, book, capsys):
    bad = tmp_path / "zipbomb.xlsx"
    rewrite_part(book, "xl/sharedStrings.xml", None, out=bad,
                 extra={"xl/media/padding.xml": b"\0" * (40 * MiB)})
    assert_refused(capsys, str(bad), "compression ratio")


HUGE_SHEET = (b'<?xml version="1.0"?><worksheet xmlns="http://schemas.openxmlformats.org/'
              b'spreadsheetml/2006/main"><dimension ref="A1:XFD1048576"/><sheetData>'
              b'<row r="1"><c r="A1"><v>1</v></c></row></sheetData></worksheet>')


def test_workbook_claiming_huge_dimensions(tmp_path, book, capsys):
    bad = tmp_path / "huge.xlsx"
    rewrite_part(book, "xl/worksheets/sheet1.xml", HUGE_SHEET, out=bad)
    assert_refused(capsys, str(bad), "claims dimensions", "A1:XFD1048576")


def test_formula_reading_an_enormous_range(tmp_path, capsys):
    bad = make_book(tmp_path / "range.xlsx", {"S": {"A1": "=SUM(A2:XFD1048576)"}})
    assert_refused(capsys, str(bad), "over the limit", "range")


def test_whole_rows_over_a_far_corner_cell(tmp_path, capsys):
    bad = make_book(tmp_path / "corner.xlsx", {"S": {"A1": "=SUM(2:1048576)", "XFD1048576": 1}})
    assert_refused(capsys, str(bad), "over the limit")


def test_circular_reference(tmp_path, capsys):
    bad = make_book(tmp_path / "loop.xlsx", {"S": {"A1": "=B1", "B1": "=A1*2"}})
    assert_refused(capsys, str(bad), "circular reference", "S!A1", "S!B1")


def test_over_size_file(tmp_path, capsys):
    big = tmp_path / "big.xlsx"
    with open(big, "wb") as fh:                # sparse: 101 MiB at no cost
        fh.write(b"PK\x03\x04")
        fh.truncate(101 * MiB)
    assert_refused(capsys, str(big), "over the limit of 100.0 MiB")


def test_over_size_file_with_a_lowered_limit(tmp_path, book, capsys):
    assert_refused(capsys, str(book), "over the limit", extra=("--max-file-mb", "0.001"))


def test_too_many_cells(tmp_path, capsys):
    bad = make_book(tmp_path / "cells.xlsx", {"S": {f"A{i}": i for i in range(1, 50)}})
    assert_refused(capsys, str(bad), "cells", "over the limit", extra=("--max-cells", "20"))


def test_missing_file_and_directory(tmp_path, capsys):
    assert_refused(capsys, str(tmp_path / "nope.xlsx"), "no such file")
    assert_refused(capsys, str(tmp_path), "directory")


def test_outputs_get_ordinary_file_permissions(tmp_path, book):
    from tubefuncs.headless import write_snapshot

    mask = os.umask(0o022)
    try:
        out = write_recalculated(recalculate(book), tmp_path / "out.xlsx")
        snap = write_snapshot(recalculate(book), tmp_path / "snap.tsv")
    finally:
        os.umask(mask)
    assert os.stat(out).st_mode & 0o777 == 0o644
    assert os.stat(snap).st_mode & 0o777 == 0o644
