"""Tests of ``tubefuncs plot transfer|applegate`` (tubefuncs.largesignal_plot)."""

from __future__ import annotations

from pathlib import Path

from tubefuncs import cli

EXAMPLE = Path(__file__).resolve().parents[1] / "workbooks" / "examples" / "ulqathor_klystron.csv"
BEAM = ["--voltage", "290 kV", "--current", "272.97", "--beam-radius", "6 mm",
        "--tunnel-radius", "9.5 mm"]
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def test_transfer_and_applegate_pngs(tmp_path, capsys):
    out = tmp_path / "t.png"
    assert cli.main(["plot", "transfer", str(EXAMPLE), *BEAM, "-o", str(out)]) == 0
    assert out.read_bytes()[:8] == PNG_MAGIC
    assert "saturation" in capsys.readouterr().out
    out = tmp_path / "a.png"
    assert cli.main(["plot", "applegate", str(EXAMPLE), *BEAM, "--drive", "300 W",
                     "-o", str(out)]) == 0
    assert out.read_bytes()[:8] == PNG_MAGIC


def test_unusable_inputs_exit_2(tmp_path, capsys):
    out = tmp_path / "x.png"
    bad = ["--voltage", "290 kV", "--current", "272.97", "--beam-radius", "12 mm",
           "--tunnel-radius", "9.5 mm"]
    assert cli.main(["plot", "transfer", str(EXAMPLE), *bad, "-o", str(out)]) == 2
    assert "beam-radius" in capsys.readouterr().err
    # a drive so high that electrons stall: the message names the cavity
    assert cli.main(["plot", "applegate", str(EXAMPLE), *BEAM, "--drive", "1 MW",
                     "-o", str(out)]) == 2
    assert "cavity" in capsys.readouterr().err
    assert not out.exists()
