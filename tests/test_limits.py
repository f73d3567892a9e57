"""Validity limits of the cavity-table models: error values, never numbers (issue 12).

Each case is checked three ways: the physics (NaN and the reusable
`gain.cavity_limits`), the worksheet layer (`tubefuncs.worksheet.evaluate`
raises or marks the element with #NUM! and a message naming the row or the
argument and the limit), and headless (a tiny workbook through
`tubefuncs.headless.recalculate`).
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.constants as sc
from headless_support import make_book
from numpy.testing import assert_allclose

from tubefuncs.errors import TubeInputError
from tubefuncs.headless import recalculate
from tubefuncs.headless import values as V
from tubefuncs.physics import gain
from tubefuncs.worksheet import evaluate

# The overlapping table of issue 12: gaps 5 cm long, 2 cm apart.
OVERLAP = [[0, 3e9, 60, 4e3, 250, .05], [.02, 3e9, 60, 4e3, 40, .05]]
# An invented S-band beam (demo numbers): 90 kV, 27 A, b = 4 mm, a = 6 mm, 3 GHz.
V0, I0, B, A, F = 90e3, 27.0, 4e-3, 6e-3, 3e9


def u0_exact(v):
    """Relativistic velocity, written out (Jackson Sec. 11.5)."""
    g = 1 + sc.e * v / (sc.m_e * sc.c**2)
    return sc.c * np.sqrt(1 - 1 / g**2)


def idler_table():
    """Three cavities, the idler a long gridless gap with transit angle 2.5 pi.

    theta = omega d/u0 = 2.5 pi: d = 2.5 pi u0/omega.  Kinematically (gridded) the
    loading conductance G_B/G0 = kappa M (M - cos(theta/2)) is negative between 2 pi
    and about 2.86 pi (M = sin(x)/x < 0 and M - cos x < 0 there); the idler's
    1/Q0 = 3.3e-4 is smaller than (R/Q)|G_B|.
    """
    d = 2.5 * np.pi * u0_exact(V0) / (2 * np.pi * F)
    return [[0.0, F, 100, 3000, 200, 0.01], [0.15, F + 5e6, 100, 3000, np.nan, d],
            [0.35, F, 100, 3000, 40, 0.01]]


def fine_table():
    return [[0.0, F, 100, 3000, 200, 0.01], [0.15, F + 5e6, 100, 3000, np.nan, 0.01],
            [0.35, F, 100, 3000, 40, 0.01]]


# Tunnel radius at which 2 pi f a/c = j01 = 2.404826 (TM01 cutoff; zero of J0,
# Abramowitz & Stegun Table 9.5) at 3 GHz: 38.27 mm.
A_CUTOFF = 2.404826 * sc.c / (2 * np.pi * F)


def test_limit_kinds_and_the_fine_table():
    assert gain.LIMIT_KINDS == ("overlap", "cutoff", "current", "conductance")
    limits = gain.cavity_limits(F, V0, I0, B, A, fine_table())
    assert limits.ok and limits.problems == []
    assert np.isfinite(gain.small_signal_gain(F, V0, I0, B, A, fine_table()))


def test_overlapping_gaps_are_an_error():
    limits = gain.cavity_limits(F, V0, I0, B, A, OVERLAP)
    assert not limits.ok
    (kind, text), = limits.problems
    assert kind == "overlap" and "rows 1 and 2 overlap" in text and "0.05 m" in text
    assert np.isnan(gain.small_signal_gain(F, V0, I0, B, A, OVERLAP))
    # the fringing margin is one tunnel radius between the gap edges: spacing
    # (d1 + d2)/2 + a is allowed, a little less is not
    d = 0.01
    for spacing, ok in ((d + A, True), (d + 0.99 * A, False)):
        cav = [[0, F, 100, 3000, 200, d], [spacing, F, 100, 3000, 40, d]]
        assert bool(gain.cavity_limits(F, V0, I0, B, A, cav).ok) is ok


def test_negative_net_conductance_idler_is_an_error():
    cav = idler_table()
    limits = gain.cavity_limits(F, V0, I0, B, A, cav)
    kinds = [k for k, _ in limits.problems]
    assert kinds == ["conductance"]
    text = limits.problems[0][1]
    assert "row 2" in text and "<= 0" in text and "oscillation" in text
    assert np.isnan(gain.small_signal_gain(F, V0, I0, B, A, cav))
    assert np.isnan(gain.small_signal_phase(F, V0, I0, B, A, cav))


def test_tunnel_above_cutoff_is_an_error():
    a = 1.001 * A_CUTOFF
    limits = gain.cavity_limits(F, V0, I0, 0.5 * a, a, fine_table())
    assert "cutoff" in [k for k, _ in limits.problems]
    assert np.isnan(gain.small_signal_gain(F, V0, I0, 0.5 * a, a, fine_table()))
    a = 0.95 * A_CUTOFF
    assert "cutoff" not in [k for k, _ in gain.cavity_limits(F, V0, I0, 0.5 * a, a,
                                                              fine_table()).problems]


def test_current_above_limiting_current_is_an_error():
    # I_L = I_A (gamma^(2/3) - 1)^(3/2)/(1 + 2 ln(a/b)) (Bogdankevich & Rukhadze 1971),
    # written out here: about 370 A for this beam.
    g = 1 + sc.e * V0 / (sc.m_e * sc.c**2)
    i_a = 4 * np.pi * sc.epsilon_0 * sc.m_e * sc.c**3 / sc.e
    i_l = i_a * (g ** (2 / 3) - 1) ** 1.5 / (1 + 2 * np.log(A / B))
    ok = gain.cavity_limits(F, V0, np.array([0.99 * i_l, 1.01 * i_l]), B, A, fine_table()).ok
    assert list(ok) == [True, False]
    text = dict(gain.cavity_limits(F, V0, 1.01 * i_l, B, A, fine_table()).problems)["current"]
    assert "limiting current" in text and f"{i_l:.4g} A" in text


def test_half_plasma_wavelength_spacing_is_not_a_limit():
    # lambda_q/2 for this beam is about 0.5 m; 0.9 m apart is a poor design, not an error
    cav = [[0.0, F, 100, 3000, 200, 0.01], [0.9, F, 100, 3000, 40, 0.01]]
    assert not np.all(gain.cavity_spacing_ok(F, V0, I0, B, A, cav))
    assert gain.cavity_limits(F, V0, I0, B, A, cav).ok
    assert np.isfinite(gain.small_signal_gain(F, V0, I0, B, A, cav))


# --- worksheet layer ----------------------------------------------------------------------

CASES = {
    "overlap": (dict(cavities=OVERLAP), "overlap"),
    "idler": (dict(cavities=idler_table()), "net conductance"),
    "cutoff": (dict(cavities=fine_table(), beam_radius=0.02, tunnel_radius=0.04), "TM01"),
    "current": (dict(cavities=fine_table(), current=500.0), "limiting current"),
}


def worksheet_args(**over):
    args = dict(frequency=F, voltage=V0, current=I0, beam_radius=B, tunnel_radius=A,
                cavities=fine_table(), **{})
    args.update(over)
    cav = [[("" if isinstance(x, float) and np.isnan(x) else x) for x in row]
           for row in args["cavities"]]
    return [args["frequency"], args["voltage"], args["current"], args["beam_radius"],
            args["tunnel_radius"], cav]


@pytest.mark.parametrize("name", ["TUBE_SMALL_SIGNAL_GAIN", "TUBE_SMALL_SIGNAL_PHASE",
                                  "TUBE_PHASE_PER_VOLT", "TUBE_PHASE_PER_AMPERE"])
@pytest.mark.parametrize("case", list(CASES))
def test_worksheet_gives_num_error_with_the_limit(name, case):
    over, words = CASES[case]
    with pytest.raises(TubeInputError) as info:
        evaluate(name, worksheet_args(**over))
    assert info.value.error_value == "#NUM!"
    assert words in str(info.value) and len(str(info.value)) <= 255 + len(name) + 2


def test_worksheet_range_marks_only_the_bad_frequencies():
    # a tunnel of 37 mm is below cutoff at 3.0 GHz and above it at 3.2 GHz
    a = 0.037
    freqs = [[3.0e9], [3.2e9]]
    args = worksheet_args(beam_radius=0.01, tunnel_radius=a)
    args[0] = freqs
    ev = evaluate("TUBE_SMALL_SIGNAL_GAIN", args)
    assert np.isfinite(ev.value[0, 0]) and np.isnan(ev.value[1, 0])
    assert list(ev.errors) == [(1, 0)] and "TM01" in str(ev.errors[(1, 0)])


def test_bandwidth_checks_the_limits_at_the_centre():
    with pytest.raises(TubeInputError, match="overlap"):
        evaluate("TUBE_SMALL_SIGNAL_BANDWIDTH", worksheet_args(cavities=OVERLAP)[1:])


# --- headless -----------------------------------------------------------------------------

def test_headless_workbook_shows_the_error_values(tmp_path):
    cells = {"B1": V0, "B2": I0, "B3": B, "B4": A}
    tables = {"H": OVERLAP, "N": idler_table(), "T": fine_table()}
    for col, table in tables.items():
        for r, row in enumerate(table, 1):
            for c, x in enumerate(row):
                if not (isinstance(x, float) and np.isnan(x)):
                    cells[f"{chr(ord(col) + c)}{r}"] = x
    cells.update({
        "C1": "=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, B3, B4, H1:M2)",
        "C2": "=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, B3, B4, N1:S3)",
        "C3": "=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, 0.02, 0.04, T1:Y3)",
        "C4": "=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, 500, B3, B4, T1:Y3)",
        "C5": "=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, B3, B4, T1:Y3)",
        "C6": "=IFERROR(TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, B3, B4, H1:M2), -999)",
        "C7": '=TUBE_SMALL_SIGNAL_GAIN(3E9, B1, B2, B3, B4, T1:Y3, "circuit", "hot", "none")',
    })
    path = make_book(tmp_path / "limits.xlsx", {"S": cells})
    r = recalculate(path)
    for cell, words in (("C1", "overlap"), ("C2", "net conductance"), ("C3", "TM01"),
                        ("C4", "limiting current")):
        assert r.value("S", cell) is V.NUM, cell
        assert words in r.messages[r.key("S", cell)]
    assert np.isfinite(r.value("S", "C5"))
    assert r.value("S", "C6") == -999
    assert_allclose(r.value("S", "C7"), r.value("S", "C5"), rtol=1e-12)
