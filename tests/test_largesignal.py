"""Large-signal disk model: checks against outside sources and exact limits.

Every expected value here is computed in the test from a published formula,
scipy.special or an integration written out below, never from another
function of the library (the small-signal comparison is a consistency check
between two models of ours and says so).
"""

import numpy as np
import pytest
from scipy import constants as sc
from scipy import optimize, special

import tubefuncs
from tubefuncs.errors import TubeInputError
from tubefuncs.physics.largesignal import Accuracy, model
from tubefuncs.physics.largesignal import results as ls
from tubefuncs.worksheet import evaluate

REST = sc.m_e * sc.c**2 / sc.e  # electron rest energy in eV (CODATA via scipy)
F = 2.998e9
NAN = np.nan


def kin(v):
    """gamma, beta, u0 of electrons accelerated through v volts (Jackson Sec. 11.5)."""
    g = 1.0 + v / REST
    b = np.sqrt(1.0 - 1.0 / g**2)
    return g, b, b * sc.c


def rms_coupling(f, d, v, b, a):
    """RMS gridless-gap coupling (Branch 1961, flat field at the wall), with scipy.special."""
    g, beta, u = kin(v)
    be = 2 * np.pi * f / u
    gr = be / g
    x = be * d / 2
    return np.sin(x) / x * np.sqrt(special.i0(gr * b) ** 2 - special.i1(gr * b) ** 2) / \
        special.i0(gr * a)


def exact_plasma_wavelength(f, i0, v, b, a):
    """lambda_q = u0 / f_q from the exact lowest space-charge mode of a solid beam in a tunnel.

    Confined flow, quasi-static (Branch and Mihran 1955, from memory): inside the beam
    phi ~ J0(T r), outside I0(g r) K0(g a) - K0(g r) I0(g a), g = beta_e/gamma; matching
    phi'/phi at r = b gives T; R^2 = g^2/(T^2 + g^2); omega_p^2 = e I0/(pi b^2 eps0 m gamma^3 u0).
    """
    gam, beta, u = kin(v)
    g = 2 * np.pi * f / u / gam
    rhs = g * (special.i1(g * b) * special.k0(g * a) + special.k1(g * b) * special.i0(g * a)) / \
        (special.k0(g * b) * special.i0(g * a) - special.i0(g * b) * special.k0(g * a))
    t = optimize.brentq(lambda t: t * special.j1(t * b) / special.j0(t * b) - rhs,
                        1e-9 / b, 2.404825557695773 / b * (1 - 1e-12))
    r = np.sqrt(g**2 / (t**2 + g**2))
    wp = np.sqrt(sc.e * i0 / (np.pi * b**2 * sc.epsilon_0 * sc.m_e * gam**3 * u))
    return u / (r * wp / (2 * np.pi))


def demo_table(n=6, f=F):
    """Invented S-band tubes of 2, 4 and 6 cavities (demo data)."""
    if n == 2:
        return np.array([[0.0, f, 50, 3000, 150, 0.018], [0.25, f, 47.5, 3000, 20, 0.022]])
    if n == 4:
        return np.array([[0.0, f, 50, 3000, 150, 0.018],
                         [0.12, f * 1.012, 50, 3000, NAN, 0.018],
                         [0.30, f * 1.028, 50, 3000, NAN, 0.018],
                         [0.42, f, 47.5, 3000, 20, 0.022]])
    df = 0.018
    return np.array([[0.000, f, 50, 3000, 150, 0.018],
                     [0.100, f * (1 + df), 50, 3000, NAN, 0.018],
                     [0.210, f * (1 + df), 50, 3000, NAN, 0.018],
                     [0.330, f * (1 + df), 50, 3000, NAN, 0.018],
                     [0.450, f * 1.028, 50, 3000, NAN, 0.018],
                     [0.560, f, 47.5, 3000, 20, 0.022]])


V0 = 290e3
I0 = 1.75e-6 * V0**1.5  # 1.75 uperv
B, A = 6.0e-3, 9.5e-3


# ---------------------------------------------------------------------------
# Ballistic limit
# ---------------------------------------------------------------------------

def _probe_table(length, gap=0.018, rq_in=50.0):
    # input cavity driven, a far "probe" cavity of negligible R/Q (its voltage ~ 0)
    return np.array([[0.0, F, rq_in, 3000, 150, gap], [length, F, 1e-9, 3000, 20, gap]])


def test_ballistic_current_follows_webster_bessel_law():
    # Webster 1939 (from memory): I1 = 2 I0 J1(X), X = theta0 * (delta v / u0) with small
    # velocity modulation; the peak is 1.164 I0 at X = 1.841 (2 J1 max), the 58.2 % ideal
    # two-cavity efficiency. Tiny current: no space charge.
    i0, v, b, a = 1e-6, V0, B, A
    g, beta, u = kin(v)
    length = 5.0
    acc = Accuracy(drift_steps_wave=0.25)
    # drive chosen so that X reaches ~2.2 by the end of the drift
    r = model.solve(F, v, i0, b, a, _probe_table(length), 1.3e3, accuracy=acc, record=True)
    assert r.status == model.OK
    v1 = abs(r.gap_voltage[0])
    m = rms_coupling(F, 0.018, v, b, a)
    dvv = m * v1 / (v * g * (g + 1))  # relativistic velocity modulation (Jackson 11.5)
    assert dvv < 0.01, "small modulation"
    z = r.z
    drift = (z > 0.1) & (z < length - 0.1)
    x = 2 * np.pi * F * z[drift] / u * dvv
    i1 = r.harmonic_current[drift, 0]
    assert x.max() > 2.0
    np.testing.assert_allclose(i1 / i0, 2 * np.abs(special.j1(x)), atol=0.02)
    # peak value and position: 2 max J1 = 1.1638 at X = 1.8412 (Abramowitz & Stegun table 9.5)
    k = np.argmax(i1)
    assert i1[k] / i0 == pytest.approx(1.1638, abs=0.01)
    assert x[k] == pytest.approx(1.8412, abs=0.05)
    assert i1[k] / (2 * i0) == pytest.approx(0.582, abs=0.005)


def test_exact_ballistic_push_past_saturation():
    # Thin gap, large modulation (delta v/u0 ~ 0.1) and a drift past the bunching peak:
    # compare with an exact relativistic push written out here: each electron gains
    # e M V cos(phi + psi) at the gap, then drifts at its exact velocity, arriving at
    # t = t0 + L / v. The current harmonic is (2 I0/N) |sum exp(-j omega t)|.
    i0, v, b, a, d = 1e-6, V0, 1.5e-4, 2e-4, 2e-4
    n = 64
    acc = Accuracy(disks=n, harmonics=8, gap_steps=400.0)
    length = 0.6
    table = np.array([[0.0, F, 50, 3000, 150, d], [length, F, 1e-9, 3000, 20, d]])
    r = model.solve(F, v, i0, b, a, table, 1e5, accuracy=acc, record=True)
    assert r.status == model.OK
    volt = r.gap_voltage[0]
    m = rms_coupling(F, d, v, b, a)
    g0, _, u0 = kin(v)
    omega = 2 * np.pi * F
    phi0 = 2 * np.pi * (np.arange(n) + 0.5) / n  # the model's disks at its first plane
    z_start = r.z[0] - (r.z[1] - r.z[0]) / 2
    # phase at the gap centre (unmodulated flight from z_start)
    phi_gap = phi0 + omega * (0.0 - z_start) / u0
    g = g0 + m * np.real(volt * np.exp(1j * phi_gap)) / REST
    vel = sc.c * np.sqrt(1 - 1 / g**2)
    dvv = (vel.max() - vel.min()) / (2 * u0)
    assert dvv > 0.05, "large modulation"
    for zz in (0.2, 0.35, 0.5):
        k = np.argmin(np.abs(r.z - zz))
        phi = phi_gap + omega * r.z[k] / vel
        expected = 2 * i0 / n * abs(np.sum(np.exp(-1j * phi)))
        assert r.harmonic_current[k, 0] == pytest.approx(expected, abs=3e-3 * i0)
    # past saturation: the current has gone through its maximum and fallen
    i1 = r.harmonic_current[:, 0]
    assert i1[-1] < 0.8 * i1.max()


# ---------------------------------------------------------------------------
# Space charge
# ---------------------------------------------------------------------------

def test_rf_current_peaks_at_quarter_plasma_wavelength():
    # Small modulation, strong space charge: |I1(z)| ~ sin(2 pi z / lambda_q), peak at
    # lambda_q/4 from the gap (Ramo 1939; exact lambda_q computed above with scipy).
    lq = exact_plasma_wavelength(F, I0, V0, B, A)
    acc = Accuracy(drift_steps_plasma=400.0)
    r = model.solve(F, V0, I0, B, A, _probe_table(0.6 * lq), 1e-6, accuracy=acc, record=True)
    assert r.status == model.OK
    drift = (r.z > 0.05) & (r.z < 0.55 * lq)
    z, i1 = r.z[drift], r.harmonic_current[drift, 0]
    k = np.argmax(i1)
    # parabola through the peak samples
    c = np.polyfit(z[k - 3:k + 4], i1[k - 3:k + 4], 2)
    z_peak = -c[1] / (2 * c[0])
    assert z_peak == pytest.approx(lq / 4, rel=0.01)


def test_periodic_green_function_is_the_image_sum():
    # The closed form sinh(k(L/2 - x))/sinh(kL/2) equals the explicit sum over images.
    from tubefuncs.physics.largesignal import spacecharge as scf
    lam, b, a, g = 0.05, 3e-3, 5e-3, 1.4
    x = np.array([0.001, 0.01, 0.025, 0.04, 0.049])
    explicit = sum(scf.green(x - m * lam, b, a, g) for m in range(-30, 31))
    np.testing.assert_allclose(scf.periodic_green(x, lam, b, a, g), explicit, rtol=1e-10,
                               atol=1e-12 * np.abs(explicit).max())


def test_disk_field_next_to_the_disk_is_the_sheet_field():
    # Gauss: the averaged field jumps by sigma/eps0 across a charged disk and is odd in z,
    # so next to it it is sigma/(2 eps0) = q/(2 eps0 pi b^2) for any tunnel radius.
    from tubefuncs.physics.largesignal import spacecharge as scf
    for b, a in ((6e-3, 9.5e-3), (1e-2, 3e-2)):
        e = scf.green(np.array([1e-7 * a]), b, a)[0]
        assert e == pytest.approx(1.0 / (2 * sc.epsilon_0 * np.pi * b**2), rel=2e-3)


# ---------------------------------------------------------------------------
# Small-signal limit (consistency of our two models)
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("n", [2, 4, 6])
def test_low_drive_gain_is_the_small_signal_gain(n):
    table = demo_table(n)
    f = F + np.linspace(-4e6, 4e6, 5)
    ss = tubefuncs.small_signal_gain(f, V0, I0, B, A, table)
    p = 1e-3 * 10 ** (-(ss.max() - 50) / 10)  # far below saturation
    r = model.solve(f, V0, I0, B, A, table, p)
    assert np.all(r.status == model.OK)
    g = 10 * np.log10(r.load_power[-1] / p)
    np.testing.assert_allclose(g, ss, atol=0.1)


# ---------------------------------------------------------------------------
# Energy, convergence, trends
# ---------------------------------------------------------------------------

def test_energy_balance_at_and_past_saturation():
    # beam power lost + generator power into the input gap = wall + load powers
    table = demo_table(6)
    p = np.array([100.0, 400.0, 1000.0])
    r = model.solve(F, V0, I0, B, A, table, p)
    assert np.all(r.status == model.OK)
    v = r.gap_voltage
    rq, q0, qe = table[:, 2:3], table[:, 3:4], table[:, 4:5]
    wall = 0.5 * np.abs(v) ** 2 / (rq * q0)
    load = 0.5 * np.abs(v) ** 2 * np.where(np.isnan(qe), 0, 1 / qe) / rq
    balance = r.kinetic_loss + r.input_power - wall.sum(0) - load.sum(0)
    assert np.all(np.abs(balance) < 1e-3 * V0 * I0)
    assert np.all(r.load_power[-1] < V0 * I0)


def test_converges_with_disks_and_steps():
    table = demo_table(6)
    p = 400.0
    base = model.solve(F, V0, I0, B, A, table, p).load_power[-1]
    fine = model.solve(F, V0, I0, B, A, table, p,
                       accuracy=Accuracy(disks=96, harmonics=24, gap_steps=64.0,
                                         drift_steps_plasma=96.0)).load_power[-1]
    assert base == pytest.approx(fine, rel=0.02)


def test_efficiency_falls_with_perveance():
    # Common practice: the saturated efficiency of conventional klystrons falls as the
    # perveance rises (stronger space-charge debunching). One design scaled to each
    # perveance: drifts in proportion to the exact plasma wavelength (computed above),
    # output loading in proportion to V0/I0.
    base = demo_table(6)
    lq0 = exact_plasma_wavelength(F, I0, V0, B, A)
    eff = []
    for k in (1.0, 1.75, 2.6):
        cur = k * 1e-6 * V0**1.5
        t = base.copy()
        t[:, 0] *= exact_plasma_wavelength(F, cur, V0, B, A) / lq0
        t[-1, 4] *= I0 / cur
        eff.append(float(tubefuncs.saturated_efficiency(F, V0, cur, B, A, t)))
    assert eff[0] > eff[1] > eff[2]
    assert 0.35 < eff[1] < 0.6


def test_demo_tube_is_plausible():
    table = demo_table(6)
    p_sat = tubefuncs.saturated_power(F, V0, I0, B, A, table)
    drive = tubefuncs.saturation_drive(F, V0, I0, B, A, table)
    assert 25e6 < p_sat < 45e6
    gain_sat = 10 * np.log10(p_sat / drive)
    assert 45 < gain_sat < 55
    # the transfer curve at the saturation drive is a maximum
    around = tubefuncs.output_power(F, V0, I0, B, A, table, drive * np.array([0.8, 1.0, 1.25]))
    assert around[1] >= around[0] and around[1] >= around[2]
    # the fastest spent electrons exceed the beam voltage at saturation (Webber 1958)
    assert tubefuncs.spent_beam_max_energy(F, V0, I0, B, A, table, drive) > V0


# ---------------------------------------------------------------------------
# Validity and the worksheet layer
# ---------------------------------------------------------------------------

def _ws_args(table):
    return ["2.998 GHz", "290 kV", I0, "6 mm", "9.5 mm", table.tolist()]


def test_stalled_electrons_give_an_error_naming_the_cavity():
    table = demo_table(6)
    with pytest.raises(TubeInputError) as err:
        evaluate("TUBE_OUTPUT_POWER", _ws_args(table) + ["100 kW"])
    assert err.value.error_value == "#NUM!"
    assert "cavity" in err.value.message
    out = evaluate("TUBE_OUTPUT_POWER",
                   _ws_args(table) + [[[10.0], [1e5]], "circuit", "hot", "none", "MW"])
    assert np.isfinite(out.value[0, 0]) and np.isnan(out.value[1, 0])
    assert "cavity" in out.errors[(1, 0)].message


def test_propagating_tunnel_and_limiting_current_are_errors():
    table = demo_table(2)
    r = model.solve(F, V0, I0, 0.02, 0.04, table, 1.0)  # 2 pi f a / c = 2.51 > 2.405
    assert r.status == model.PROPAGATING
    # limiting current 17.05 kA (gamma^(2/3) - 1)^1.5 / (1 + 2 ln(a/b)) (Bogdankevich and
    # Rukhadze 1971, from memory): about 1.1 kA here
    g = 1 + V0 / REST
    i_lim = 4 * np.pi * sc.epsilon_0 * sc.m_e * sc.c**3 / sc.e * (g ** (2 / 3) - 1) ** 1.5 / \
        (1 + 2 * np.log(A / B))
    r = model.solve(F, V0, 1.01 * i_lim, B, A, table, 1.0)
    assert r.status == model.LIMITING
    r = model.solve(F, V0, 0.99 * i_lim, B, A, table, 1.0)
    assert r.status != model.LIMITING


def test_twins_and_worksheet_agree():
    table = demo_table(6)
    ws = evaluate("TUBE_EFFICIENCY", _ws_args(table) + ["300 W"]).value
    py = tubefuncs.efficiency(F, 290e3, I0, 6e-3, 9.5e-3, table, 300.0)
    assert ws == pytest.approx(py, rel=1e-12)
    sat = evaluate("TUBE_SATURATED_POWER", _ws_args(table) + ["circuit", "hot", "none", "MW"]).value
    assert sat == pytest.approx(tubefuncs.saturated_power(F, 290e3, I0, 6e-3, 9.5e-3, table)
                                / 1e6, rel=1e-12)


def test_help_carries_the_cautions():
    from tubefuncs.catalogue import CATALOGUE
    for name in ("TUBE_OUTPUT_POWER", "TUBE_SATURATED_POWER", "TUBE_SPENT_BEAM_MAX_ENERGY"):
        caution = CATALOGUE[name].caution
        assert "X-ray" in caution and "local codes" in caution and "estimate" in caution


def test_too_many_points_is_refused_before_work():
    with pytest.raises(ValueError):
        model.solve(F, V0, I0, B, A, demo_table(2), np.ones(model.MAX_POINTS + 1))
    assert ls  # module imported for its cache


@pytest.mark.parametrize("resonance, depression", [("cold", "none"), ("hot", "mean")])
def test_options_agree_with_the_small_signal_model(resonance, depression):
    # The options of TUBE_SMALL_SIGNAL_GAIN mean the same here (consistency of our two
    # models): cold-test frequencies and the depressed beam, at low drive.
    table = demo_table(4)
    f = F + np.linspace(-3e6, 3e6, 4)
    ss = tubefuncs.small_signal_gain(f, V0, I0, B, A, table, "circuit", resonance, depression)
    p = 1e-3 * 10 ** (-(ss.max() - 50) / 10)
    r = model.solve(f, V0, I0, B, A, table, p, "circuit", resonance, depression)
    assert np.all(r.status == model.OK)
    np.testing.assert_allclose(10 * np.log10(r.load_power[-1] / p), ss, atol=0.1)


def test_accelerator_convention_is_twice_the_circuit_r_over_q():
    # design.md: accelerator R/Q = V^2/(omega W) = 2 x circuit R/Q
    table = demo_table(6)
    acc = table.copy()
    acc[:, 2] *= 2
    a = tubefuncs.output_power(F, V0, I0, B, A, table, 300.0)
    b = tubefuncs.output_power(F, V0, I0, B, A, acc, 300.0, "accelerator")
    assert b == pytest.approx(a, rel=1e-12)


def test_a_chain_that_does_not_amplify_has_no_saturation_point():
    # Three cavities 0.25 m apart on a 50 kV, 10 A beam with an idler far off tune: the
    # small-signal gain is about -0.2 dB.  Exact property of the definition (not a
    # number): a chain with no gain has no saturation point of an amplifier, and the
    # answer must not depend on what else is in the range (the overdriven curve of such
    # a chain is erratic, so a maximum found on it changed with the batch's step grid).
    table = [[0.0, 2.998e9, 100.0, 3000.0, 300.0, 0.012],
             [0.25, 3.010e9, 100.0, 3000.0, 1e6, 0.012],
             [0.5, 2.998e9, 100.0, 3000.0, 40.0, 0.012]]
    beam = [50e3, 10.0, 0.005, 0.007, table]
    with pytest.raises(TubeInputError) as err:
        evaluate("TUBE_SATURATED_POWER", [3e9] + beam)
    assert err.value.error_value == "#NUM!"
    assert "does not amplify" in err.value.message
    out = evaluate("TUBE_SATURATED_POWER", [[[3e9], [3.75e9]]] + beam)
    assert np.all(np.isnan(out.value))
    assert "does not amplify" in out.errors[(0, 0)].message


def test_unit_in_the_place_design_md_gives_it_is_read_as_the_unit():
    # design.md: TUBE_OUTPUT_POWER(..., drive_power, [unit]) and
    # TUBE_SATURATED_POWER(..., cavities, [unit]); the options came later, before the unit
    table = demo_table(2)
    args = _ws_args(table)
    short = evaluate("TUBE_OUTPUT_POWER", args + [1.0, "kW"]).value
    full = evaluate("TUBE_OUTPUT_POWER", args + [1.0, "circuit", "hot", "none", "kW"]).value
    watts = evaluate("TUBE_OUTPUT_POWER", args + [1.0]).value
    assert short == full and np.isclose(short, watts / 1e3, rtol=1e-12)
