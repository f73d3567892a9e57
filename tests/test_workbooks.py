"""The demo workbooks: key numbers checked by independent formulas, snapshots current.

The snapshots (``workbooks/*.expected.tsv``) come from the tubefuncs engine,
since no spreadsheet application is at hand; the checks here recompute the
numbers an engineer checks first from textbook formulas written out in the
test, so that the snapshots are not merely self-consistent.
"""

from __future__ import annotations

import math
import os

import numpy as np
import openpyxl
import pytest
from numpy.testing import assert_allclose

from tubefuncs.headless import check, recalculate, snapshot_path
from tubefuncs.headless import values as V
from tubefuncs.headless.demo_books import BUILDERS

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
WB = os.path.join(ROOT, "workbooks")

C = 299_792_458.0                    # speed of light, exact [m/s]
MU0 = 4e-7 * math.pi                 # vacuum permeability (to 1e-10 relative) [H/m]
REST_VOLTAGE = 510_998.95            # m_e c^2 / e, CODATA 2018 [V]
BOLTZMANN_DB = -228.5991             # 10 log10(k), k = 1.380649e-23 J/K (exact)


def beta(voltage):
    gamma = 1 + voltage / REST_VOLTAGE
    return math.sqrt(1 - 1 / gamma**2)


def te10_loss_db(f, a, b, length, sigma):
    """Conductor loss of TE10 in a rectangular guide, Pozar, Microwave
    Engineering, 4th ed., Eq. (3.96), times 20 log10(e) dB/Np."""
    k = 2 * math.pi * f / C
    eta = MU0 * C
    kc = math.pi / a
    beta_g = math.sqrt(k**2 - kc**2)
    rs = math.sqrt(2 * math.pi * f * MU0 / (2 * sigma))
    alpha = rs / (a**3 * b * beta_g * k * eta) * (2 * b * math.pi**2 + a**3 * k**2)
    return 20 * math.log10(math.e) * alpha * length


@pytest.fixture(scope="module")
def station():
    return recalculate(os.path.join(WB, "station_budget.xlsx"))


@pytest.fixture(scope="module")
def uplink():
    return recalculate(os.path.join(WB, "uplink_budget.xlsx"))


@pytest.fixture(scope="module")
def sweep():
    return recalculate(os.path.join(WB, "frequency_sweep.xlsx"))


@pytest.mark.parametrize("name", sorted(BUILDERS))
def test_checked_in_workbook_matches_its_snapshot(name):
    path = os.path.join(WB, name)
    recalc, comparison, source = check(path, expected=snapshot_path(path))
    assert source.endswith(".expected.tsv")
    assert comparison.ok, comparison.differences[:5]
    assert recalc.name_errors == []
    assert not any(V.is_error(v) for v in recalc.values.values())


@pytest.mark.parametrize("name", sorted(BUILDERS))
def test_checked_in_workbook_is_what_the_generator_builds(name):
    built = BUILDERS[name]()
    saved = openpyxl.load_workbook(os.path.join(WB, name))
    assert saved.sheetnames == built.sheetnames
    for ws in built.worksheets:
        other = saved[ws.title]
        for row in ws.iter_rows():
            for cell in row:
                mine = getattr(cell.value, "text", cell.value)
                theirs = getattr(other[cell.coordinate].value, "text",
                                 other[cell.coordinate].value)
                assert mine == theirs, f"{ws.title}!{cell.coordinate}: run make_workbooks.py"
    assert set(saved.defined_names) == set(built.defined_names)


def test_station_beam(station):
    v, i = 285e3, 265.0
    assert station.value("Station", "B18") == pytest.approx(v * i, rel=1e-12)
    assert station.value("Station", "B16") == pytest.approx(i / v**1.5 * 1e6, rel=1e-9)
    assert station.value("Station", "B17") == pytest.approx(beta(v), rel=1e-7)
    assert station.value("Station", "B20") == pytest.approx(v, rel=1e-12)


def test_station_rf_and_waveguide(station):
    # the saturated power and drive come from the large-signal model of the Tube sheet:
    # plausible figures for an invented 285 kV, 1.74 uperv S-band tube (40-55 % efficiency,
    # 45-55 dB gain: common practice), and the budget's arithmetic on them
    v, i = 285e3, 265.0
    p_rf, drive = station.value("Station", "B8"), station.value("Station", "B9")
    assert 0.40 < p_rf / (v * i) < 0.55
    assert 45 < 10 * math.log10(p_rf / drive) < 55
    assert station.value("Station", "B23") == pytest.approx(p_rf / (v * i), rel=1e-12)
    assert station.value("Tube", "B17") == pytest.approx(p_rf / (v * i), rel=1e-9)
    assert station.value("Station", "B24") == pytest.approx(10 * math.log10(p_rf / drive),
                                                            rel=1e-12)
    assert station.value("Tube", "B18") == pytest.approx(10 * math.log10(p_rf / drive),
                                                         rel=1e-9)
    # the fastest spent electrons exceed e V0, the slowest are far below it
    assert station.value("Tube", "B22") > 285.0 > station.value("Tube", "B21") > 0
    segments = [(3.2, 5.8e7), (1.5, 5.8e7), (18.0, 3.5e7), (24.5, 3.5e7), (2.1, 5.8e7)]
    losses = [te10_loss_db(2.998e9, 72.14e-3, 34.04e-3, L, s) for L, s in segments]
    got = [station.value("Waveguide", f"F{r}") for r in range(5, 10)]
    assert_allclose(got, losses, rtol=1e-6)   # mu0 and c to better than 1e-9
    total = sum(losses) + 0.15 + 0.08 + 0.05
    assert station.value("Station", "B28") == pytest.approx(total, rel=1e-6)
    assert station.value("Station", "B29") == pytest.approx(p_rf * 10 ** (-total / 10), rel=1e-6)
    assert station.value("Station", "B31") == "Tunnel run (aluminium)"
    assert station.value("Waveguide", "B16") == pytest.approx(C / (2 * 72.14e-3) / 1e9, rel=1e-12)


def test_station_collector_and_cooling(station):
    p_beam = 285e3 * 265.0 * 4.5e-6 * 50
    p_rf = station.value("Station", "B8") * 4.5e-6 * 50
    body = 0.02 * p_beam
    assert station.value("Station", "B26") == pytest.approx(p_beam, rel=1e-12)
    assert station.value("Station", "B35") == pytest.approx(p_beam - p_rf - body, rel=1e-12)
    assert station.value("Station", "B36") == pytest.approx(p_beam - body, rel=1e-12)
    # Water near 25 degC: rho ~ 997 kg/m^3, cp ~ 4181 J/(kg K) (steam tables, from memory)
    flow_lpm = (p_beam - body) / (997.0 * 4181.0 * 12.0) * 60_000
    assert station.value("Station", "B38") == pytest.approx(flow_lpm, rel=5e-3)
    assert station.value("Station", "B40") == "OK"
    assert station.value("Cooling", "B8") == 42.0


def test_uplink_link_budget(uplink):
    f, d_dish, eff, rng = 14.25e9, 9.0, 0.65, 38_500e3
    saleh = lambda r: 2.1587 * r / (1 + 1.1517 * r**2)          # noqa: E731
    r_sat = 1 / math.sqrt(1.1517)
    r4 = r_sat * 10 ** (-4 / 20)
    obo = -20 * math.log10(saleh(r4) / saleh(r_sat))
    assert uplink.value("Amplifier", "B2") == pytest.approx(r_sat, rel=1e-12)
    assert uplink.value("Uplink", "B17") == pytest.approx(obo, rel=1e-9)
    gain = 10 * math.log10(eff * (math.pi * d_dish * f / C) ** 2)
    fspl = 20 * math.log10(4 * math.pi * rng * f / C)
    eirp = 10 * math.log10(1500) - obo - 1.2 + gain
    cn0 = eirp - fspl + 3.5 - 0.9 - BOLTZMANN_DB
    assert uplink.value("Uplink", "B20") == pytest.approx(gain, abs=1e-9)
    assert uplink.value("Uplink", "B22") == pytest.approx(fspl, abs=1e-9)
    assert uplink.value("Uplink", "B27") == pytest.approx(fspl, abs=1e-9)
    assert uplink.value("Uplink", "B21") == pytest.approx(eirp, abs=1e-9)
    assert uplink.value("Uplink", "D21") == pytest.approx(eirp, abs=1e-9)
    assert uplink.value("Uplink", "B23") == pytest.approx(cn0, abs=1e-3)
    phase = lambda r: 4.0033 * r**2 / (1 + 9.104 * r**2)        # noqa: E731
    assert uplink.value("Uplink", "B26") == pytest.approx(math.degrees(phase(r4)), rel=1e-9)


def test_sweep(sweep):
    f = 2.9e9 + np.arange(201) * 1e6
    got_f = [sweep.value("Sweep", f"A{r}") for r in range(5, 206)]
    assert_allclose(got_f, f, rtol=1e-12)
    assert sweep.value("Setup", "B15") == 201.0
    theta = 2 * math.pi * f * 0.010 / (beta(80e3) * C)
    transit = [sweep.value("Sweep", f"B{r}") for r in range(5, 206)]
    assert_allclose(transit, np.degrees(theta), rtol=1e-7)
    gridded = [sweep.value("Sweep", f"D{r}") for r in range(5, 206)]     # the array formula
    assert_allclose(gridded, np.sin(theta / 2) / (theta / 2), rtol=1e-7)
    gridless = np.array([sweep.value("Sweep", f"C{r}") for r in range(5, 206)])
    assert np.all((gridless > 0) & (gridless < gridded))    # a gridless gap couples less
    loss = [sweep.value("Sweep", f"E{r}") for r in (5, 105, 205)]
    want = [te10_loss_db(x, 72.14e-3, 34.04e-3, 10, 5.8e7) for x in (f[0], f[100], f[200])]
    assert_allclose(loss, want, rtol=1e-6)
    gain = np.array([sweep.value("Sweep", f"G{r}") for r in range(5, 206)])
    assert sweep.value("Setup", "B20") == pytest.approx(gain.max())
    assert sweep.value("Setup", "B21") == pytest.approx(f[int(gain.argmax())])
    assert 30 < gain.max() < 80      # a four-cavity tube's small-signal gain, dB


def test_sweep_transfer_curve(sweep):
    # the Transfer sheet: 21 drives in one batch (array formulas); the curve rises to the
    # saturation found by TUBE_SATURATED_POWER and the efficiency is P_out / (V0 I0)
    drives = np.round(0.1 * 10 ** (np.arange(21) / 10), 6)  # the sheet's constants
    p_kw = np.array([sweep.value("Transfer", f"B{r}") for r in range(8, 29)])
    eff = np.array([sweep.value("Transfer", f"C{r}") for r in range(8, 29)])
    gain_db = np.array([sweep.value("Transfer", f"D{r}") for r in range(8, 29)])
    assert_allclose(eff, p_kw * 1e3 / (80e3 * 28), rtol=1e-9)
    assert_allclose(gain_db, 10 * np.log10(p_kw * 1e3 / drives), rtol=1e-9)
    p_sat_kw, d_sat = sweep.value("Transfer", "B4"), sweep.value("Transfer", "B5")
    assert np.all(p_kw <= p_sat_kw * 1.001)
    assert np.all(np.diff(p_kw[drives < d_sat]) > 0)  # monotonic below saturation
    assert 0.25 < sweep.value("Transfer", "B6") < 0.6
