"""Beam loading of a gap: G_B, B_B, the resonance shift, and the gain options they feed.

Outside references:
- a direct relativistic particle integration written out below (Ramo-Shockley
  induced current of electrons crossing a gridless gap, with the one-mode
  space-charge restoring force m gamma^3 omega_q^2 xi), as an independent
  check of the two-wave G_B and B_B;
- closed textbook forms of the gridded kinematic gap (Liao Ch. 9 for G_B,
  Beck 1958 for B_B; both from memory) derived again in comments;
- the parallel-resonator algebra (Pozar Ch. 6) for the resonance shift.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.constants as sc
from numpy.testing import assert_allclose
from scipy import special

from tubefuncs.errors import TubeInputError
from tubefuncs.physics import gain, loading
from tubefuncs.worksheet import evaluate

V_REST = sc.m_e * sc.c**2 / sc.e


def kinematics(v0):
    g = 1 + v0 / V_REST
    return g, sc.c * np.sqrt(1 - 1 / g**2)


# --- a direct particle integration of the gap ------------------------------------------

def field_profiles(z, radii, f, d, a):
    """E_z(r, z) per volt of a gridless gap: flat field 1/d at r = a over |z| < d/2.

    Helmholtz in the tunnel: the Fourier component k of the wall field varies as
    I0(sqrt(k^2 - k0^2) r)/I0(sqrt(k^2 - k0^2) a) (J0 for k < k0), so
    E(r, z) = (1/pi) int_0^inf sinc(kd/2) ratio(k, r) cos(kz) dk; the integrand is
    even and analytic in k, so the trapezoid rule is spectrally accurate.
    """
    k0 = 2 * np.pi * f / sc.c
    dk = 10.0
    k = np.arange(0.0, 3e4, dk)
    w = np.full(k.size, dk)
    w[0] = dk / 2
    x2 = k * k - k0 * k0
    kap = np.sqrt(np.abs(x2))
    rows = [np.where(x2 >= 0, special.i0e(kap * r) / special.i0e(kap * a) * np.exp(kap * (r - a)),
                     special.j0(kap * r) / special.j0(kap * a)) for r in radii]
    spec = np.sinc(k * d / (2 * np.pi))[None, :] * np.array(rows) * w[None, :] / np.pi
    out = np.empty((len(radii), z.size))
    for lo in range(0, z.size, 500):
        out[:, lo:lo + 500] = spec @ np.cos(np.outer(k, z[lo:lo + 500]))
    return out


def particle_admittance(f, v0, i0, profiles, z, omega_q, n_phase=8, v1_rel=1e-3,
                        steps_per_period=400):
    """I_induced/V per radius from relativistic trajectories (RK4 in time).

    Electrons enter at z[0] with the beam velocity at n_phase phases of the RF;
    dp/dt = e V1 f_r(z) cos(omega t) - m gamma0^3 omega_q^2 (z - z_unperturbed);
    the Ramo-Shockley current of each is q v f_r(z), whose first-harmonic phasor,
    summed over one period of electrons (charge I0 T/n_phase each), is I1.
    Y = I1/V1 from +/- V1 (cancels the even orders of V1).
    """
    m, e, c = sc.m_e, sc.e, sc.c
    g0, u0 = kinematics(v0)
    w = 2 * np.pi * f
    period = 1 / f
    tau = np.arange(n_phase) * period / n_phase
    nr = profiles.shape[0]

    def field(zq):
        return np.array([np.interp(zq[n], z, profiles[n], left=0, right=0) for n in range(nr)])

    def rhs(t, zq, pq, v1):
        vel = pq / (np.sqrt(1 + (pq / (m * c))**2) * m)
        fz = field(zq)
        xi = zq - (z[0] + u0 * t)
        return (vel, e * v1 * fz * np.cos(w * (t + tau)) - m * g0**3 * omega_q**2 * xi,
                vel * fz * np.exp(-1j * w * (t + tau)))

    def run(v1):
        zz = np.full((nr, n_phase), z[0])
        p = np.full((nr, n_phase), g0 * m * u0)
        acc = np.zeros((nr, n_phase), complex)
        dt = period / steps_per_period
        t = 0.0
        for _ in range(int(np.ceil((z[-1] - z[0]) / u0 / dt))):
            k1 = rhs(t, zz, p, v1)
            k2 = rhs(t + dt / 2, zz + dt / 2 * k1[0], p + dt / 2 * k1[1], v1)
            k3 = rhs(t + dt / 2, zz + dt / 2 * k2[0], p + dt / 2 * k2[1], v1)
            k4 = rhs(t + dt, zz + dt * k3[0], p + dt * k3[1], v1)
            zz = zz + dt / 6 * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0])
            p = p + dt / 6 * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1])
            acc = acc + dt / 6 * (k1[2] + 2 * k2[2] + 2 * k3[2] + k4[2])
            t += dt
        return (2 * i0 / n_phase) * acc.sum(axis=1)

    v1 = v1_rel * v0
    return (run(v1) - run(-v1)) / (2 * v1)


@pytest.fixture(scope="module")
def particle_case():
    # The notes' relativistic S-band beam (physics_notes item 2): 100 kV, 30 A, b = 5 mm,
    # a = 7 mm, 2.856 GHz, f_q = 204.57 MHz [computed, rel tol 1e-4]; a 15 mm gridless gap.
    f, v0, i0, b, a, d = 2.856e9, 1e5, 30.0, 5e-3, 7e-3, 15e-3
    s, ws = np.polynomial.legendre.leggauss(6)
    s, ws = (s + 1) / 2, ws / 2          # uniform beam: uniform weight in r^2
    z = np.linspace(-0.06, 0.06, 4001)   # the gap field is below 1e-7 beyond +/- 60 mm
    prof = field_profiles(z, b * np.sqrt(s), f, d, a)
    y = particle_admittance(f, v0, i0, prof, z, 2 * np.pi * 204.57e6)
    return (f, d, v0, i0, b, a), complex((ws * y).sum())


def test_gridless_loading_matches_particle_integration(particle_case):
    args, y_particles = particle_case
    y = loading.beam_admittance(*args)
    # G_B and B_B both positive here (capacitive); agreement within the f_q input's
    # precision (1e-4) and the integration's discretisation
    assert y_particles.real > 0 and y_particles.imag > 0
    assert_allclose(y.real, y_particles.real, rtol=1e-3)
    assert_allclose(y.imag, y_particles.imag, rtol=1e-3)
    assert_allclose(loading.beam_loading(*args), y_particles.real, rtol=1e-3)
    assert_allclose(loading.beam_susceptance(*args), y_particles.imag, rtol=1e-3)


def test_gridless_loading_is_the_gain_models_loading(particle_case):
    # the same G_B enters the gain model's cavities (internal consistency)
    args, _ = particle_case
    f, d, v0, i0, b, a = args
    cav = [[0, f, 50, 3000, 200, d], [0.2, f, 50, 3000, 40, d]]
    setup = gain._prepare(f, v0, i0, b, a, np.array(cav), resonance="cold")
    assert_allclose(setup.y_beam[0], loading.beam_admittance(*args), rtol=1e-12)


def test_gridless_loading_exceeds_the_gridded_value(particle_case):
    # the gridded formula underestimates a gridless gap's loading (1.6x in this case;
    # the radial field and space charge both add to it)
    args, y_particles = particle_case
    ratio = y_particles.real / loading.beam_loading(*args[:4])
    assert ratio > 1.4


def test_gridded_kinematic_closed_forms():
    # Gridded uniform field 1/d, no space charge.  With H(theta) =
    # int int_{z'<z} f f' e^{-j theta (z - z')/d} = -j/theta + (1 - e^{-j theta})/theta^2,
    # Y/(kappa G0) = -theta dH/dtheta:
    #   G: 2(1 - cos theta)/theta^2 - sin(theta)/theta = M^2 - M cos(theta/2) (Liao Ch. 9),
    #   B: [2 sin theta - theta (1 + cos theta)]/theta^2 (Beck 1958), theta/6 for small theta.
    f, v0, i0 = 3e9, 10e3, 1.0
    g, u0 = kinematics(v0)
    kg0 = i0 / v0 / (g * (g + 1))
    d = np.array([1e-6, 1e-4, 1e-3, 5e-3, 1e-2, 2e-2])
    th = 2 * np.pi * f * d / u0
    g_expected = kg0 * (2 * (1 - np.cos(th)) / th**2 - np.sin(th) / th)
    b_expected = kg0 * (2 * np.sin(th) - th * (1 + np.cos(th))) / th**2
    small = th < 1e-3
    b_expected[small] = kg0 * th[small] / 6
    g_expected[small] = kg0 * th[small]**2 / 12
    assert_allclose(loading.beam_loading(f, d, v0, i0), g_expected, rtol=1e-7)
    assert_allclose(loading.beam_susceptance(f, d, v0, i0), b_expected, rtol=1e-7)


def test_hilbert_quadrature_reaches_the_gridded_closed_form():
    # A gridless gap with vanishing radii has the gridded field: its two-wave Y_B at a
    # tiny current must give the closed forms above (checks the Hilbert quadrature).
    f, v0 = 3e9, 10e3
    g, u0 = kinematics(v0)
    d = np.array([1e-5, 1e-3, 1e-2, 3e-2])      # transit angles 3e-4 to 9.7 rad
    th = 2 * np.pi * f * d / u0
    kg0 = 1e-6 / v0 / (g * (g + 1))
    b_expected = kg0 * (2 * np.sin(th) - th * (1 + np.cos(th))) / th**2
    b_expected[0] = kg0 * th[0] / 6
    y = loading.beam_admittance(f, d, v0, 1e-6, 1e-8, 1e-8)
    assert_allclose(y.imag, b_expected, rtol=1e-5)


def test_resonance_shift_of_a_parallel_resonator():
    # Pozar Ch. 6: Y = (1/(R/Q)) [1/Q + j (f/fc - fc/f)] + j B; resonance where the
    # imaginary part vanishes.  Gridded gap: B_B is the closed form above, evaluated
    # at the loaded frequency (solved here by bisection).
    fc, rq, d, v0, i0 = 3e9, 100.0, 8e-3, 10e3, 2.0
    g, u0 = kinematics(v0)
    kg0 = i0 / v0 / (g * (g + 1))

    def b_of(f):
        th = 2 * np.pi * f * d / u0
        return kg0 * (2 * np.sin(th) - th * (1 + np.cos(th))) / th**2

    lo, hi = 0.99 * fc, 1.01 * fc
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        if (mid / fc - fc / mid) / rq + b_of(mid) > 0:
            hi = mid
        else:
            lo = mid
    got = loading.beam_loaded_freq(fc, rq, d, v0, i0)
    assert_allclose(got, 0.5 * (lo + hi), rtol=1e-12)
    assert got < fc  # capacitive beam lowers the resonance
    # accelerator-convention R/Q is twice the circuit one: same cavity, same answer
    assert_allclose(loading.beam_loaded_freq(fc, 2 * rq, d, v0, i0, convention="accelerator"),
                    got, rtol=1e-14)


def test_worksheet_loading_functions():
    gb = evaluate("TUBE_BEAM_LOADING", [2.856e9, "15 mm", "100 kV", 30, "5 mm", "7 mm",
                                        "uS"]).value
    assert_allclose(gb, 1e6 * loading.beam_loading(2.856e9, 15e-3, 1e5, 30, 5e-3, 7e-3))
    # gridded as before without the radii
    assert evaluate("TUBE_BEAM_LOADING", [3e9, 1e-3, 1e3, 0.025]).value > 0
    with pytest.raises(TubeInputError, match="TM01"):
        evaluate("TUBE_BEAM_SUSCEPTANCE", [3e9, 1e-2, 1e5, 30, 0.02, 0.04])
    with pytest.raises(TubeInputError, match="give both"):
        evaluate("TUBE_BEAM_SUSCEPTANCE", [3e9, 1e-2, 1e5, 30, 0.002])
    f_hot = evaluate("TUBE_BEAM_LOADED_FREQ", ["2.856 GHz", 50, "15 mm", "100 kV", 30,
                                               "5 mm", "7 mm", "circuit", "MHz"]).value
    assert 2850 < f_hot < 2856


# --- the gain functions' options ----------------------------------------------------------

BEAM = dict(voltage=90e3, current=27.0, beam_radius=4e-3, tunnel_radius=6e-3)
HOT = np.array([[0.0, 3.0e9, 100, 3000, 200, 0.015], [0.15, 3.006e9, 100, 3000, np.nan, 0.015],
                [0.30, 3.0e9, 100, 3000, 40, 0.015]])


def test_accelerator_convention_is_twice_circuit():
    # design.md: accelerator R/Q = V^2/(omega W) = 2 x circuit V^2/(2 omega W)
    f = np.linspace(2.98e9, 3.02e9, 9)
    acc = HOT.copy()
    acc[:, gain.RQ] *= 2
    ref = gain.small_signal_gain(f, cavities=HOT, **BEAM)
    assert_allclose(gain.small_signal_gain(f, cavities=acc, convention="accelerator", **BEAM),
                    ref, rtol=1e-12)
    assert_allclose(gain.small_signal_gain(f, cavities=acc, convention="linac", **BEAM), ref,
                    rtol=1e-12)
    # entering the accelerator value as circuit changes the gain by many dB
    assert np.max(np.abs(gain.small_signal_gain(f, cavities=acc, **BEAM) - ref)) > 3


def test_cold_frequencies_give_the_hot_result_at_the_hot_resonance():
    # Each cavity's admittance is (1/(R/Q))[1/Q + j(f/fc - fc/f)] + G_B + j B_B(f).  With
    # fc chosen so that the susceptance vanishes at the hot frequency fh
    # (fh/fc - fc/fh = -(R/Q) B_B(fh)), the cavity equals the hot-table cavity
    # (1/(R/Q))[1/Q + j(f/fh - fh/f)] + G_B exactly at f = fh.  All three cavities
    # are tuned to one fh here, so the gain agrees there.
    fh = 3.0e9
    hot = HOT.copy()
    hot[:, gain.F0] = fh
    cold = hot.copy()
    for n in range(3):
        b_b = loading.beam_susceptance(fh, hot[n, gain.GAP], BEAM["voltage"], BEAM["current"],
                                       BEAM["beam_radius"], BEAM["tunnel_radius"])
        x = -hot[n, gain.RQ] * b_b          # fh/fc - fc/fh = x
        cold[n, gain.F0] = fh / (0.5 * (x + np.sqrt(x * x + 4)))
    assert np.all(cold[:, gain.F0] > fh)    # capacitive beam: the cold cavity sits higher
    g_hot = gain.small_signal_gain(fh, cavities=hot, **BEAM)
    g_cold = gain.small_signal_gain(fh, cavities=cold, resonance="cold", **BEAM)
    assert_allclose(g_cold, g_hot, atol=1e-9)
    # entering cold frequencies as hot ones costs gain at the design frequency
    assert gain.small_signal_gain(fh, cavities=cold, **BEAM) < g_hot - 0.3


def test_depressed_voltage_option_moves_the_gain():
    f = 3.0e9
    plain = gain.small_signal_gain(f, cavities=HOT, **BEAM)
    depressed = gain.small_signal_gain(f, cavities=HOT, depression="mean", **BEAM)
    assert np.isfinite(depressed) and abs(depressed - plain) > 0.05
    # the option is the same as entering the depressed kinetic voltage by hand
    from tubefuncs.physics import optics
    v_k = optics.depressed_voltage(BEAM["current"], BEAM["voltage"], BEAM["beam_radius"],
                                   BEAM["tunnel_radius"])
    by_hand = gain.small_signal_gain(f, BEAM["voltage"] * 0 + v_k, BEAM["current"],
                                     BEAM["beam_radius"], BEAM["tunnel_radius"], HOT)
    assert_allclose(depressed, by_hand, rtol=1e-12)


def test_worksheet_options_and_the_former_unit_position():
    cav = [[("" if np.isnan(x) else x) for x in row] for row in HOT.tolist()]
    base = [3e9, 90e3, 27.0, 4e-3, 6e-3, cav]
    deg = evaluate("TUBE_SMALL_SIGNAL_PHASE", base).value
    # the unit right after the table (its place before the options) is still the unit
    assert_allclose(evaluate("TUBE_SMALL_SIGNAL_PHASE", base + ["rad"]).value, np.radians(deg))
    assert_allclose(evaluate("TUBE_SMALL_SIGNAL_PHASE", base + ["", "", "", "rad"]).value,
                    np.radians(deg))
    assert_allclose(evaluate("TUBE_SMALL_SIGNAL_PHASE", base + ["Circuit", "HOT"]).value, deg)
    with pytest.raises(TubeInputError, match="resonance must be one of"):
        evaluate("TUBE_SMALL_SIGNAL_GAIN", base + ["circuit", "warm"])
