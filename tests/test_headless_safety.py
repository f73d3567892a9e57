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


# ----------------------------------------------------------------------------- hostile inputs, II
# Each family below was found by feeding small hand-made files to the three
# commands under a time limit and a memory cap; the inputs here are our own.

NS = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'


def sheet_xml(rows: str, head: str = "") -> bytes:
    return (f'<?xml version="1.0" encoding="UTF-8"?><worksheet {NS}>{head}<sheetData>{rows}'
            f'</sheetData></worksheet>').encode()


def refused_by_all(capsys, path, *words, limit_s=10, limit_mib=200):
    """check, recalc and snapshot each give one line on stderr and exit 2, fast and small."""
    folder = os.path.dirname(str(path))
    for command in ("check", "recalc", "snapshot"):
        args = [command, path]
        if command == "recalc":
            args += ["-o", os.path.join(folder, "out.xlsx")]
        if command == "snapshot":
            args += ["-o", os.path.join(folder, "out.tsv")]
        code, out, err, elapsed, peak = run_cli(capsys, *args)
        assert code == 2, (command, out, err)
        assert len(err.strip().splitlines()) == 1 and "Traceback" not in err + out, err
        for word in words:
            assert word.lower() in err.lower(), err
        assert elapsed < limit_s, (command, elapsed)
        assert peak < limit_mib, f"{command}: peak {peak:.0f} MiB"
        assert not os.path.exists(os.path.join(folder, "out.xlsx"))
        assert not os.path.exists(os.path.join(folder, "out.tsv"))


def test_array_block_over_the_whole_sheet_is_refused_before_listing_cells(tmp_path, book, capsys):
    bad = tmp_path / "block.xlsx"
    rewrite_part(book, "xl/worksheets/sheet1.xml", sheet_xml(
        '<row r="1"><c r="A1"><f t="array" ref="A1:XFD1048576">1+1</f></c></row>'), out=bad)
    refused_by_all(capsys, str(bad), "array formula", "A1:XFD1048576", "limit")


def test_array_blocks_count_toward_the_cell_limit(tmp_path, book, capsys):
    bad = tmp_path / "blocks.xlsx"
    rows = "".join(f'<row r="{r}"><c r="A{r}"><f t="array" ref="A{r}:J{r}">1</f></c></row>'
                   for r in range(1, 11))
    rewrite_part(book, "xl/worksheets/sheet1.xml", sheet_xml(rows), out=bad)
    code, *_ = run_cli(capsys, "check", bad, "--max-cells", "99")
    assert code == 2


def test_one_row_of_millions_of_cells_is_refused_within_its_first_bytes(tmp_path, book, capsys):
    bad = tmp_path / "row.xlsx"
    cells = "".join(f'<c r="{_col(i)}1"><v>1</v></c>' for i in range(1, 16385))
    rows = '<row r="1">' + cells * 190 + "</row>"     # 3.1 million cells in one row
    rewrite_part(book, "xl/worksheets/sheet1.xml", sheet_xml(rows), out=bad)
    p, elapsed = run_capped("check", bad, cap_mib=1000)
    assert p.returncode == 2 and "more than 2,000,000 cells" in p.stderr, p.stderr
    assert elapsed < 10, elapsed


def run_capped(*argv, cap_mib=1000, timeout=60):
    """The command line in a fresh interpreter under an address-space cap (as a user
    would run it under prlimit): (completed process, seconds)."""
    import resource
    import subprocess
    import sys

    def cap():
        resource.setrlimit(resource.RLIMIT_AS, (cap_mib * MiB, cap_mib * MiB))

    env = dict(os.environ, PYTHONPATH=os.path.dirname(os.path.dirname(os.path.abspath(
        __file__))))
    t = time.perf_counter()
    p = subprocess.run([sys.executable, "-m", "tubefuncs", *map(str, argv)], capture_output=True,
                       text=True, env=env, timeout=timeout, preexec_fn=cap)
    return p, time.perf_counter() - t


def _col(i: int) -> str:
    from openpyxl.utils import get_column_letter

    return get_column_letter(i)


@pytest.mark.parametrize("address", ["XFE1", "A0", "B99999999999", "AAAA1"])
def test_cells_outside_the_sheet_are_refused_at_read(tmp_path, book, capsys, address):
    bad = tmp_path / "outside.xlsx"
    rewrite_part(book, "xl/worksheets/sheet1.xml", sheet_xml(
        f'<row r="1"><c r="A1"><v>2</v></c><c r="{address}"><f>A1+1</f></c></row>'), out=bad)
    code, out, err, *_ = run_cli(capsys, "recalc", bad, "-o", tmp_path / "o.xlsx")
    assert code == 2 and len(err.strip().splitlines()) == 1, err
    assert "outside" in err or "corrupt" in err, err


def test_negative_shared_string_index_is_refused(tmp_path, book, capsys):
    bad = tmp_path / "sst.xlsx"
    rewrite_part(book, "xl/worksheets/sheet1.xml", sheet_xml(
        '<row r="1"><c r="A1" t="s"><v>-1</v></c><c r="B1"><f>A1</f></c></row>'), out=bad)
    refused_by_all(capsys, str(bad), "shared-string index")


def test_sheets_differing_only_in_case_are_refused(tmp_path, capsys):
    good = make_book(tmp_path / "g.xlsx", {"Yarrow": {"A1": 1}, "Ysk": {"A1": "=Yarrow!A1"}})
    bad = tmp_path / "case.xlsx"
    wb = read_part(good, "xl/workbook.xml").replace(b'name="Ysk"', b'name="YARROW"')
    rewrite_part(good, "xl/workbook.xml", wb, out=bad)
    refused_by_all(capsys, str(bad), "case")


def _raw_zip(path, members):
    """A zip written member by member (duplicates and odd methods allowed)."""
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with zipfile.ZipFile(path, "w") as z:
            for name, data, method in members:
                info = zipfile.ZipInfo(name)
                info.compress_type = method
                z.writestr(info, data)
    return path


def _members(book):
    with zipfile.ZipFile(book) as z:
        return [(i.filename, z.read(i.filename), zipfile.ZIP_DEFLATED) for i in z.infolist()]


def test_duplicate_zip_members_are_refused_without_python_warnings(tmp_path, book, capsys):
    members = _members(book)
    sheet = next(m for m in members if m[0] == "xl/worksheets/sheet1.xml")
    bad = _raw_zip(tmp_path / "dup.xlsx", members + [sheet])
    refused_by_all(capsys, str(bad), "twice")


def test_unknown_compression_of_a_non_xml_part_is_refused_by_every_command(tmp_path, book, capsys):
    members = _members(book) + [("xl/media/image1.png", b"\x89PNG" + b"x" * 100,
                                 zipfile.ZIP_BZIP2)]
    bad = _raw_zip(tmp_path / "bz.xlsx", members)
    refused_by_all(capsys, str(bad), "compression method")


def test_corrupt_deflate_stream_of_a_non_xml_part_is_refused_by_every_command(tmp_path, book,
                                                                              capsys):
    members = _members(book) + [("xl/media/image1.png", os.urandom(3000), zipfile.ZIP_DEFLATED)]
    bad = _raw_zip(tmp_path / "bad.xlsx", members)
    data = bytearray(bad.read_bytes())
    at = data.find(b"xl/media/image1.png") + len("xl/media/image1.png")   # local header end
    for i in range(at + 40, at + 400):
        data[i] ^= 0x5A
    bad.write_bytes(bytes(data))
    refused_by_all(capsys, str(bad), "corrupt")


def test_dtd_in_a_utf16_document_properties_part_is_refused(tmp_path, book, capsys):
    props = ('<?xml version="1.0" encoding="UTF-16"?><!DOCTYPE p [<!ENTITY e "zzz">]>'
             '<Properties xmlns="http://schemas.openxmlformats.org/officeDocument/2006/'
             'extended-properties"><Application>&e;</Application></Properties>')
    bad = tmp_path / "props.xlsx"
    rewrite_part(book, "docProps/app.xml", props.encode("utf-16"), out=bad)
    refused_by_all(capsys, str(bad), "DTD")


def test_fifo_and_device_inputs_are_refused_before_open(tmp_path, book, capsys):
    fifo = tmp_path / "pipe.xlsx"
    os.mkfifo(fifo)
    refused_by_all(capsys, str(fifo), "not a regular file", "FIFO")
    for expected in ("/dev/zero", str(_link(tmp_path, "/dev/zero"))):
        code, _, err, elapsed, peak = run_cli(capsys, "check", book, "--expected", expected)
        assert code == 2 and "not a regular file" in err and elapsed < 5 and peak < 50, err


def _link(tmp_path, target):
    link = tmp_path / "book.xlsx.expected.tsv"
    link.symlink_to(target)
    return link


def test_expected_values_file_beside_the_book_linking_to_a_device(tmp_path, book, capsys):
    _link(tmp_path, "/dev/zero")
    code, _, err, elapsed, peak = run_cli(capsys, "check", book)
    assert code == 2 and "not a regular file" in err and peak < 50, err


def test_expected_values_file_over_its_size_limit(tmp_path, book, capsys, monkeypatch):
    from tubefuncs.headless import limits as limits_module
    from tubefuncs.headless import snapshot

    big = tmp_path / "big.tsv"
    big.write_text("# x\n" * 1000)
    monkeypatch.setattr(limits_module.DEFAULT_LIMITS.__class__, "max_expected_bytes", 100)
    with pytest.raises(WorkbookError, match="over the limit"):
        snapshot.read_snapshot(big, recalculate(book).book, max_bytes=100)


@pytest.mark.parametrize("target", ["same", "link", "dir", "missing", "fifo", "device"])
def test_output_paths_that_cannot_take_the_output(tmp_path, book, capsys, target):
    before = sha256(book)
    if target == "same":
        out = book
    elif target == "link":
        out = tmp_path / "alias.xlsx"
        out.symlink_to(book)
    elif target == "dir":
        out = tmp_path
    elif target == "missing":
        out = tmp_path / "no" / "such" / "x.tsv"
    elif target == "fifo":
        out = tmp_path / "fifo.tsv"
        os.mkfifo(out)
    else:
        out = "/dev/null"
    for command in ("snapshot", "recalc"):
        code, _, err, elapsed, _ = run_cli(capsys, command, book, "-o", out)
        assert code == 2 and len(err.strip().splitlines()) == 1, (command, err)
        assert elapsed < 5
    assert sha256(book) == before
    if target == "fifo":
        import stat

        assert stat.S_ISFIFO(os.stat(out).st_mode)        # not replaced by a regular file


def test_read_only_folder_and_full_disk_are_one_line_refusals(tmp_path, book, capsys, monkeypatch):
    from tubefuncs.headless import writer

    def full(*_a, **_k):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(writer.tempfile, "mkstemp", full)
    for command in ("snapshot", "recalc"):
        code, _, err, *_ = run_cli(capsys, command, book, "-o", tmp_path / "o.out")
        assert code == 2 and "No space left on device" in err, err
        assert len(err.strip().splitlines()) == 1


def test_stale_temporary_file_of_a_killed_process_is_cleaned_up(tmp_path, book):
    import subprocess
    import sys

    from tubefuncs.headless import write_snapshot

    dead = subprocess.Popen([sys.executable, "-c", "pass"])
    dead.wait()
    stale = tmp_path / f".tubefuncs-{dead.pid}-abc123.tmp"
    stale.write_bytes(b"half")
    mine = tmp_path / f".tubefuncs-{os.getpid()}-zzz999.tmp"   # a live process's: kept
    mine.write_bytes(b"busy")
    other = tmp_path / ".tubefuncs-notes.txt"                  # not our pattern: kept
    other.write_bytes(b"keep")
    write_snapshot(recalculate(book), tmp_path / "snap.tsv")
    assert not stale.exists() and mine.exists() and other.exists()


def test_control_characters_are_written_as_the_format_allows(tmp_path, capsys):
    src = make_book(tmp_path / "ctl.xlsx", {"S": {"A1": '=CHAR(1)&"x_x0041_"&CHAR(31)'}})
    for engine in ("fast", "general"):
        out = tmp_path / f"o-{engine}.xlsx"
        code, _, err, *_ = run_cli(capsys, "recalc", src, "-o", out, "--engine", engine)
        assert code == 0, err
        xml = read_part(out, "xl/worksheets/sheet1.xml")
        # ECMA-376 Part 1, 22.9.2.19: control characters as _xHHHH_, a literal
        # "_x0041_" escaped as "_x005F_x0041_".
        assert b"_x0001_x_x005F_x0041__x001F_" in xml, xml


def test_sheet_names_with_tab_or_line_feed_survive_snapshot_and_check(tmp_path, capsys):
    good = make_book(tmp_path / "g.xlsx", {"Qa": {"A1": 3}, "Qb": {"A1": "=Qa!A1*2"}})
    bad = tmp_path / "tabs.xlsx"
    wb = read_part(good, "xl/workbook.xml").replace(b'name="Qb"', b'name="Q&#9;b&#10;c\\d"')
    rewrite_part(good, "xl/workbook.xml", wb, out=bad)
    code, _, err, *_ = run_cli(capsys, "snapshot", bad)
    assert code == 0, err
    code, out, err, *_ = run_cli(capsys, "check", bad)
    assert code == 0 and "OK: 1 formula cells" in out, (out, err)


def test_no_traceback_reaches_stderr_on_refused_inputs(tmp_path, book):
    """Run as a user does, in a fresh interpreter (warnings and "Exception ignored"
    messages from finalisers would show here)."""
    import subprocess
    import sys

    members = _members(book)
    bad = _raw_zip(tmp_path / "dup.xlsx", members + [members[-1]])
    trunc = tmp_path / "trunc.xlsx"
    trunc.write_bytes(book.read_bytes()[:-30])
    env = dict(os.environ, PYTHONPATH=os.path.dirname(os.path.dirname(__file__)))
    for path in (bad, trunc):
        for command in (["check"], ["snapshot"], ["recalc", "-o", str(tmp_path / "o.xlsx")]):
            p = subprocess.run([sys.executable, "-W", "default", "-m", "tubefuncs", command[0],
                                str(path), *command[1:]], capture_output=True, text=True,
                               env=env, timeout=60)
            assert p.returncode == 2, p.stderr
            assert len(p.stderr.strip().splitlines()) == 1, p.stderr
            assert "Traceback" not in p.stderr and "Exception ignored" not in p.stderr


# ------------------------------------------------------------ names, position, depth

def _values(capsys, path, tmp_path, engine):
    import openpyxl

    out = tmp_path / f"v-{engine}.xlsx"
    code = cli.main(["recalc", str(path), "-o", str(out), "--engine", engine])
    assert code == 0, capsys.readouterr()
    ws = openpyxl.load_workbook(out).active
    return {c.coordinate: c.value for row in ws.iter_rows() for c in row if c.value is not None}


@pytest.mark.parametrize("engine", ["fast", "general"])
def test_names_referring_to_each_other_are_a_circular_reference_at_once(tmp_path, capsys,
                                                                         engine):
    bad = make_book(tmp_path / "names.xlsx", {"S": {"A1": "=Vexa"}},
                    names={"Vexa": "Wumbo+Wumbo+Wumbo+Wumbo", "Wumbo": "Vexa+Vexa+Vexa+Vexa"})
    code, _, err, elapsed, _ = run_cli(capsys, "check", bad, "--engine", engine)
    assert code == 2 and "circular reference through defined names" in err, err
    assert elapsed < 5


def test_a_long_chain_of_distinct_names_resolves_once_each(tmp_path, capsys):
    names = {f"Nm{i}x": f"Nm{i + 1}x+Nm{i + 1}x+Nm{i + 1}x" for i in range(30)}
    names["Nm30x"] = "1"
    book = make_book(tmp_path / "chain.xlsx", {"S": {"A1": "=Nm0x"}}, names=names)
    t = time.perf_counter()
    assert _values(capsys, book, tmp_path, "general")["A1"] == 3.0 ** 30   # exact: 3^30
    assert time.perf_counter() - t < 5


@pytest.mark.parametrize("engine", ["fast", "general"])
def test_names_are_evaluated_in_the_calling_cells_context(tmp_path, capsys, engine):
    cells = {f"A{r}": "=Here" for r in range(1, 6)}
    cells.update({f"B{r}": "=Dice" for r in range(1, 6)})
    cells["C1"] = "=Dice-Dice"
    book = make_book(tmp_path / "ctx.xlsx", {"S": cells},
                     names={"Here": "ROW()*10", "Dice": "RAND()"})
    got = _values(capsys, book, tmp_path, engine)
    assert [got[f"A{r}"] for r in range(1, 6)] == [10, 20, 30, 40, 50]   # ROW() of the caller
    rands = [got[f"B{r}"] for r in range(1, 6)]
    assert len(set(rands)) == 5 and all(0 <= x < 1 for x in rands)     # a fresh RAND() per use
    assert got["C1"] != 0


@pytest.mark.parametrize("engine", ["fast", "general"])
def test_position_only_functions_do_not_depend_on_values(tmp_path, capsys, engine):
    cells = {"A1": "=ROW(A1)", "B1": "=SUM(ROW(B:B))", "C1": "=COLUMNS(A1:E1)+C2", "C2": 4,
             **{f"D{r}": f"=ROW(D{r})*2" for r in range(1, 6)}}
    got = _values(capsys, make_book(tmp_path / "pos.xlsx", {"S": cells}), tmp_path, engine)
    assert got["A1"] == 1
    assert got["B1"] == 1_048_576 * 1_048_577 // 2        # sum of 1..n = n(n+1)/2
    assert got["C1"] == 9
    assert [got[f"D{r}"] for r in range(1, 6)] == [2, 4, 6, 8, 10]


@pytest.mark.parametrize("engine", ["fast", "general"])
def test_deep_nesting_is_refused_per_cell_and_long_chains_compute(tmp_path, capsys, engine):
    cells = {"A1": 1,
             "A2": "=" + "(" * 500 + "A1" + ")" * 500,            # 500 levels
             "A3": "=" + "SUM(" * 65 + "1" + ")" * 65,            # one over Excel's 64
             "A4": "=" + "SUM(" * 64 + "1" + ")" * 64,            # at the limit
             "A5": "=" + "-" * 3000 + "A1",
             "A6": "=" + "+".join(["A1"] * 2700)}                 # a long run, no nesting
    book = make_book(tmp_path / "deep.xlsx", {"S": cells})
    got = _values(capsys, book, tmp_path, engine)
    text = capsys.readouterr().out
    assert "nested 500 levels deep" in text and "nested 65 levels deep" in text
    assert got["A2"] == got["A3"] == got["A5"] == "#NAME?"
    assert got["A4"] == 1 and got["A6"] == 2700


# ------------------------------------------------- arrays and texts built by formulas

@pytest.mark.parametrize("engine", ["fast", "general"])
def test_standard_function_bombs_are_error_values_before_the_work(tmp_path, capsys, engine):
    cells = {"A1": '=LEN(REPT("qwertyuiop",2.5E8))',                 # 2.5e9 characters
             "B1": "=SUM(MUNIT(20000))",                              # 4e8 elements
             "C1": "=SUM(SEQUENCE(20000)+TRANSPOSE(SEQUENCE(20000)))",
             "D1": '=LEN(SUBSTITUTE(REPT("a",32767),"a",REPT("b",32767)))',
             "E1": '=LEN(REPT("x",32767)&"y")',                       # one over 32,767
             "F1": '=LEN(REPT("ab",10))',                             # ordinary use: 20
             "G1": "=SUM(TUBE_BEAM_POWER(H1:H3000,TRANSPOSE(H1:H3000)))"}
    cells.update({f"H{r}": r for r in range(1, 3001)})
    book = make_book(tmp_path / "bombs.xlsx", {"S": cells})
    t = time.perf_counter()
    got = _values(capsys, book, tmp_path, engine)
    assert time.perf_counter() - t < 30
    text = capsys.readouterr().out
    assert got["A1"] == got["D1"] == got["E1"] == "#VALUE!"
    assert got["B1"] == got["C1"] == got["G1"] == "#NUM!"
    assert got["F1"] == 20
    assert "over Excel's 32,767" in text and "over the limit of 5,000,000" in text


def test_bomb_under_an_address_space_cap(tmp_path):
    book = make_book(tmp_path / "cap.xlsx", {"S": {"A1": '=LEN(REPT("abcdefghij",2.5E8))',
                                                   "B1": "=SUM(MUNIT(20000))"}})
    p, elapsed = run_capped("recalc", book, "-o", tmp_path / "o.xlsx", cap_mib=1000)
    assert p.returncode == 0, p.stderr
    assert elapsed < 20
