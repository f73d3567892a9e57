"""Tests of tubefuncs.physics.gap and the gap entries of the catalogue.

Expected values come from outside the library: CODATA constants via
scipy.constants, scipy.special / scipy.integrate / mpmath, exact limiting
cases with their derivation written beside them, and a direct relativistic
trajectory integration written in this file.  No expected value is computed
with another function of the library.
"""

from __future__ import annotations

import inspect
import math

import mpmath
import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import constants as sc
from scipy import special
from scipy.integrate import quad

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.physics import gap, loading

V_REST = sc.m_e * sc.c**2 / sc.e  # m_e c^2 / e = 510998.95 V (CODATA via scipy)


def u0_exact(v0):
    """Relativistic velocity from CODATA constants: gamma = 1 + t, t = V/V_rest,
    u = c sqrt(1 - 1/gamma^2) = c sqrt(t (t + 2))/(1 + t) (the second form has no
    cancellation at low voltage)."""
    t = np.asarray(v0, dtype=float) / V_REST
    return sc.c * np.sqrt(t * (t + 2.0)) / (1.0 + t)


def gamma_exact(v0):
    return 1.0 + np.asarray(v0, dtype=float) / V_REST


def length_for_angle(theta, frequency, v0):
    """Gap length giving transit angle theta: d = theta u0 / omega."""
    return theta * u0_exact(v0) / (2.0 * np.pi * frequency)


# --- transit_angle --------------------------------------------------------------------------

@pytest.mark.parametrize("f, d, v0", [(3e9, 1e-3, 1e3), (1.3e9, 0.02, 1.2e5),
                                      (11.4e9, 2e-3, 4.5e5), (700e6, 0.5, 1e6)])
def test_transit_angle_definition(f, d, v0):
    # theta = omega d / u0 with the relativistic u0 from CODATA constants.
    assert_allclose(gap.transit_angle(f, d, v0), 2 * np.pi * f * d / u0_exact(v0), rtol=1e-13)


@pytest.mark.parametrize("v0", [1.0, 30.0, 300.0, 3000.0])
def test_transit_angle_nonrelativistic_limit(v0):
    # Derivation: with t = V0/V_rest, u_rel^2 = c^2 t(t+2)/(t+1)^2 and u_NR^2 = 2 e V0/m = 2 t c^2,
    # so u_NR/u_rel = (1+t)/sqrt(1+t/2) = 1 + 3t/4 + O(t^2): theta_rel/theta_NR - 1 = 3t/4 + O(t^2).
    f, d = 2.0e9, 4e-3
    t = v0 / V_REST
    theta_nr = 2 * np.pi * f * d / math.sqrt(2 * sc.e * v0 / sc.m_e)
    ratio = gap.transit_angle(f, d, v0) / theta_nr
    assert_allclose(ratio - 1.0, 0.75 * t, rtol=2 * t + 1e-6)


def test_transit_angle_arrays_broadcast():
    f = np.array([[1e9], [2e9], [4e9]])
    d = np.array([1e-3, 2e-3])
    out = gap.transit_angle(f, d, 1e4)
    assert out.shape == (3, 2)
    assert_allclose(out, 2 * np.pi * f * d / u0_exact(1e4), rtol=1e-13)
    # linear in frequency and length
    assert_allclose(out[2, 1], 8 * out[0, 0], rtol=1e-14)


def test_transit_angle_scalar_type_and_zero():
    out = gap.transit_angle(3e9, 1e-3, 1e3)
    assert isinstance(out, np.floating) and np.ndim(out) == 0
    assert gap.transit_angle(0.0, 1e-3, 1e3) == 0.0
    assert gap.transit_angle(3e9, 0.0, 1e3) == 0.0


def test_transit_angle_out_of_domain_is_nan():
    out = gap.transit_angle([3e9, -1.0, 3e9, 3e9, 3e9, np.nan],
                            [1e-3, 1e-3, -1e-3, 1e-3, 1e-3, 1e-3],
                            [1e3, 1e3, 1e3, 0.0, -5.0, 1e3])
    assert np.isfinite(out[0])
    assert np.isnan(out[1:]).all()


# --- gap_coupling, gridded ---------------------------------------------------------------------

@pytest.mark.parametrize("theta, m", [
    (1.0, math.sin(0.5) / 0.5),          # sin(x)/x at x = 1/2: 0.958851077...
    (np.pi, 2.0 / np.pi),                # x = pi/2: sin = 1
    (2.0 * np.pi, 0.0),                  # x = pi: first zero
    (3.0 * np.pi, -2.0 / (3.0 * np.pi)),  # x = 3 pi/2: sin = -1, M < 0
])
def test_gridded_coupling_exact_values(theta, m):
    f, v0 = 2.5e9, 4.0e4
    d = length_for_angle(theta, f, v0)
    assert_allclose(gap.gap_coupling(f, d, v0), m, rtol=1e-12, atol=1e-14)


def test_gridded_coupling_small_angle_series():
    # sin(x)/x = 1 - x^2/6 + x^4/120 - ...; with x = theta/2 and theta = 1e-3 the
    # truncation error is x^6/5040 ~ 3e-21.
    f, v0 = 2.5e9, 4.0e4
    theta = 1e-3
    x = theta / 2
    assert_allclose(gap.gap_coupling(f, length_for_angle(theta, f, v0), v0),
                    1 - x**2 / 6 + x**4 / 120, rtol=1e-15)
    assert gap.gap_coupling(f, 0.0, v0) == 1.0


def test_gridded_coupling_nan_and_arrays():
    out = gap.gap_coupling([3e9, 3e9, -3e9], [1e-3, -1e-3, 1e-3], 1e4)
    assert np.isfinite(out[0]) and np.isnan(out[1:]).all()
    cols = gap.gap_coupling(np.array([[1e9], [2e9]]), np.array([1e-3, 2e-3, 3e-3]), 1e4)
    assert cols.shape == (2, 3)


# --- gap_coupling, gridless --------------------------------------------------------------------

def m_rms_by_quadrature(f, d, v0, b, a):
    """RMS of M(r) = M_grid I0(g r)/I0(g a) over a uniform disc of radius b, by quadrature.

    g = omega/(u0 gamma) (relativistic radial constant, beta_e/gamma), written here from
    CODATA constants; M_grid = sin(x)/x, x = omega d/(2 u0).
    """
    u0 = u0_exact(v0)
    g = 2 * np.pi * f / (u0 * gamma_exact(v0))
    x = np.pi * f * d / u0
    m_grid = math.sin(x) / x
    mean_sq, _ = quad(lambda r: (special.iv(0, g * r) / special.iv(0, g * a))**2 * r, 0, b,
                      epsabs=0, epsrel=1e-13)
    return m_grid * math.sqrt(2.0 * mean_sq / b**2)


@pytest.mark.parametrize("f, d, v0, b, a", [
    (5.2e9, 3e-3, 6.0e4, 2.5e-3, 4.0e-3),   # an X-band-ish medium-voltage gap
    (1.3e9, 2e-2, 4.0e5, 1.5e-2, 2.4e-2),   # an L-band high-voltage gap
    (9.0e9, 1.5e-3, 2.0e4, 1.0e-3, 1.0e-3),  # filled tunnel, b = a
])
def test_gridless_coupling_equals_rms_over_beam(f, d, v0, b, a):
    # Independent: the RMS of M(r) over the beam by numerical integration, unscaled Bessel.
    assert_allclose(gap.gap_coupling(f, d, v0, b, a), m_rms_by_quadrature(f, d, v0, b, a),
                    rtol=1e-10)


@pytest.mark.parametrize("kb", [0.05, 0.3, 1.7, 5.0, 20.0])
def test_rms_identity_by_quadrature(kb):
    # (2/b^2) int_0^b I0^2(k r) r dr = I0^2(kb) - I1^2(kb)  (Lommel-type integral; with b = 1).
    lhs, _ = quad(lambda r: special.iv(0, kb * r)**2 * r, 0, 1, epsabs=0, epsrel=1e-13)
    assert_allclose(2 * lhs, special.iv(0, kb)**2 - special.iv(1, kb)**2, rtol=1e-11)


def test_gridless_on_axis_value():
    # b = 0: the electron on the axis sees M_grid / I0(g a).
    f, d, v0, a = 5.2e9, 3e-3, 6.0e4, 4e-3
    u0 = u0_exact(v0)
    g = 2 * np.pi * f / (u0 * gamma_exact(v0))
    x = np.pi * f * d / u0
    assert_allclose(gap.gap_coupling(f, d, v0, 0.0, a), math.sin(x) / x / special.iv(0, g * a),
                    rtol=1e-13)


def test_gridless_reduces_to_gridded_for_small_radii():
    # g a -> 0: I0 -> 1, I1 -> 0, so M -> M_grid; the correction is O((g a)^2) < 1e-12 here.
    f, d, v0 = 5.2e9, 3e-3, 6.0e4
    x = np.pi * f * d / u0_exact(v0)
    assert_allclose(gap.gap_coupling(f, d, v0, 0.5e-9, 1e-9), math.sin(x) / x, rtol=1e-12)


def test_gridless_reduces_to_gridded_at_ultra_relativistic_voltage():
    # g = beta_e / gamma -> 0 as gamma -> infinity (the field of a beam at c is not shielded
    # radially).  At 5 GV, gamma ~ 1e4, g a ~ 1e-2: M/M_grid = 1 - O((g a)^2) = 1 - ~3e-5.
    f, d, v0, b, a = 3e9, 1e-2, 5e9, 4e-3, 5e-3
    g = 2 * np.pi * f / (u0_exact(v0) * gamma_exact(v0))
    x = np.pi * f * d / u0_exact(v0)
    m = gap.gap_coupling(f, d, v0, b, a)
    assert_allclose(m, math.sin(x) / x, rtol=(g * a)**2)
    assert m < math.sin(x) / x


def test_gridless_radial_constant_is_relativistic():
    # At 500 kV the radial constant is beta_e/gamma (gamma = 1.978); with beta_e instead the
    # coupling would be markedly lower.  Both variants written out here.
    f, d, v0, b, a = 1.3e9, 2e-2, 5e5, 1.5e-2, 2.4e-2
    u0 = u0_exact(v0)
    x = np.pi * f * d / u0
    m_grid = math.sin(x) / x

    def rms(g):
        return m_grid * math.sqrt(special.iv(0, g * b)**2 - special.iv(1, g * b)**2) / \
            special.iv(0, g * a)

    beta_e = 2 * np.pi * f / u0
    m = gap.gap_coupling(f, d, v0, b, a)
    assert_allclose(m, rms(beta_e / gamma_exact(v0)), rtol=1e-12)
    assert abs(m - rms(beta_e)) / m > 0.05


@pytest.mark.parametrize("v0", [2.0, 20.0, 200.0])
def test_gridless_nonrelativistic_limit(v0):
    # Textbook NR form: g = beta_e = omega/sqrt(2 e V0/m), no gamma.  The relativistic result
    # differs by O(t), t = V0/V_rest <= 4e-4: tolerance 3t.
    f, b, a = 1e8, 2e-3, 3e-3
    d = 1e-3
    u_nr = math.sqrt(2 * sc.e * v0 / sc.m_e)
    g = 2 * np.pi * f / u_nr
    x = np.pi * f * d / u_nr
    m_nr = math.sin(x) / x * math.sqrt(special.iv(0, g * b)**2 - special.iv(1, g * b)**2) / \
        special.iv(0, g * a)
    assert_allclose(gap.gap_coupling(f, d, v0, b, a), m_nr, rtol=3 * v0 / V_REST)


@pytest.mark.parametrize("frac", [1.0, 0.9, 0.5])
def test_gridless_large_argument_is_finite_and_right(frac):
    # g a ~ 1000: I0(1000) ~ 1e432 overflows doubles; the scaled form must stay finite.
    # Reference: mpmath at 50 digits with the same closed form (RMS identity above).
    # A 1 V beam in a 9 mm tunnel at 10 GHz: below the TM01 cutoff (2 pi f a/c = 1.89).
    f, v0, a = 1e10, 1.0, 0.009
    d = 1e-7
    b = frac * a
    u0 = u0_exact(v0)
    g = 2 * np.pi * f / (u0 * gamma_exact(v0))
    assert 900 < g * a < 1100
    x = np.pi * f * d / u0
    with mpmath.workdps(50):
        gb, ga = mpmath.mpf(g * b), mpmath.mpf(g * a)
        ratio = mpmath.sqrt(mpmath.besseli(0, gb)**2 - mpmath.besseli(1, gb)**2) / \
            mpmath.besseli(0, ga)
        expected = float(ratio) * math.sin(x) / x
    m = gap.gap_coupling(f, d, v0, b, a)
    assert np.isfinite(m) and m > 0
    # I0 - I1 ~ I0/(2 g b) cancels ~3 digits at g b = 1000; and M ~ exp(-g (a - b)) has
    # condition number g (a - b) <= 500 with respect to g, which the library and this test
    # round differently (a few ulps): rtol 1e-10.
    assert_allclose(m, expected, rtol=1e-10)


def test_gridless_large_argument_on_axis_underflows_to_zero():
    # On axis, 1/I0(1000) ~ 1e-433 is below the smallest double: 0, not NaN or an overflow.
    m = gap.gap_coupling(1e10, 1e-7, 1.0, 0.0, 0.009)  # g a ~ 950, below TM01 cutoff
    assert m == 0.0


def test_gridless_out_of_domain_is_nan_and_broadcasts():
    f, d, v0 = 5.2e9, 3e-3, 6.0e4
    out = gap.gap_coupling(f, d, v0, [2e-3, 5e-3, -1e-3, 1e-3, 1e-3], [4e-3, 4e-3, 4e-3, 0.0,
                                                                       np.nan])
    assert np.isfinite(out[0]) and np.isnan(out[1:]).all()
    grid = gap.gap_coupling(np.array([[4e9], [5e9], [6e9]]), d, v0, np.array([1e-3, 2e-3]), 4e-3)
    assert grid.shape == (3, 2)
    # a thicker beam reaches nearer the wall, where the field is stronger: M grows with b
    assert (np.diff(grid, axis=1) > 0).all()


def test_gridless_needs_both_radii():
    with pytest.raises(ValueError, match="both beam_radius and tunnel_radius"):
        gap.gap_coupling(3e9, 1e-3, 1e4, beam_radius=1e-3)
    with pytest.raises(ValueError, match="both beam_radius and tunnel_radius"):
        gap.gap_coupling(3e9, 1e-3, 1e4, None, 2e-3)


@settings(max_examples=60, deadline=None)
@given(f=st.floats(1e8, 2e10), d=st.floats(1e-4, 3e-2), v0=st.floats(1e3, 1e6),
       frac=st.floats(0.0, 1.0), a=st.floats(1e-4, 5e-2))
def test_gridless_never_exceeds_gridded(f, d, v0, frac, a):
    # 0 <= I0^2(gb) - I1^2(gb) <= I0^2(gb) <= I0^2(ga) for 0 <= b <= a: |M| <= |M_grid|.
    # Only below the tunnel's TM01 cutoff (2 pi f a/c < 2.405), where the model applies.
    assume(2 * np.pi * f * a / 299792458.0 < 2.4)
    x = np.pi * f * d / u0_exact(v0)
    m_grid = math.sin(x) / x
    m = gap.gap_coupling(f, d, v0, frac * a, a)
    assert np.isfinite(m)
    assert abs(m) <= abs(m_grid) * (1 + 1e-12)
    assert m * m_grid >= 0  # same sign as the gridded factor


# --- beam_loading ------------------------------------------------------------------------------

def gb_over_g0_formula(theta, v0):
    """(M^2 - M cos x)/(gamma(gamma+1)), x = theta/2, written from the Notes' formula."""
    x = np.asarray(theta) / 2
    m = np.sin(x) / x
    g = gamma_exact(v0)
    return (m * m - m * np.cos(x)) / (g * (g + 1))


@pytest.mark.parametrize("v0", [1.0, 1e4, 1e5, 5e5, 1e6])
@pytest.mark.parametrize("theta", [1e-6, 1e-3, 1e-2, 0.1, 0.6])
def test_beam_loading_small_angle_limit(v0, theta):
    # Series (derived): M = 1 - x^2/6 + x^4/120, cos x = 1 - x^2/2 + x^4/24, so
    # M^2 = 1 - x^2/3 + 2x^4/45 and M cos x = 1 - 2x^2/3 + 2x^4/15, hence
    # M^2 - M cos x = x^2/3 - 4x^4/45 = (theta^2/12)(1 - theta^2/15) + O(theta^6).
    # Non-relativistically (gamma(gamma+1) = 2) G_B/G0 -> theta^2/24.
    f, current = 2e9, 3.0
    d = length_for_angle(theta, f, v0)
    g = gamma_exact(v0)
    expected = theta**2 / 12 * (1 - theta**2 / 15) / (g * (g + 1))
    # The library evaluates M - cos x without cancellation (series for small theta), so
    # only a few ulps of rounding; the remainder of the two-term series is
    # (x^6 term) ~ theta^4/1000 relative.
    tol = 1e-14 + theta**4 / 500
    assert_allclose(gap.beam_loading(f, d, v0, current) * v0 / current, expected, rtol=tol)


def test_beam_loading_theta_squared_over_24_at_low_voltage():
    # NR limit: at V0 = 1 V (t = 2e-6) the relativistic factor 2/(gamma(gamma+1)) = 1 - 3t/2.
    f, v0, theta = 1e7, 1.0, 1e-2
    d = length_for_angle(theta, f, v0)
    assert_allclose(gap.beam_loading(f, d, v0, 1.0) * v0, theta**2 / 24, rtol=1e-5)


@pytest.mark.parametrize("v0, factor", [
    # 2/(gamma(gamma+1)) from gamma = 1 + V0/V_rest (CODATA); printed values in the physics
    # notes [computed]: 0.97130, 0.76179, 0.33939, 0.17093.
    (1e4, 0.97130), (1e5, 0.76179), (5e5, 0.33939), (1e6, 0.17093),
])
def test_beam_loading_relativistic_factor(v0, factor):
    g = gamma_exact(v0)
    assert_allclose(2 / (g * (g + 1)), factor, atol=6e-6)
    theta = 2.0
    f = 3e9
    d = length_for_angle(theta, f, v0)
    x = theta / 2
    m = math.sin(x) / x
    nr = 0.5 * (m * m - m * math.cos(x))  # textbook NR G_B/G0 at the same transit angle
    assert_allclose(gap.beam_loading(f, d, v0, 1.0) * v0 / nr, factor, atol=6e-6)


@pytest.mark.parametrize("theta", [0.3, 1.0, 2.0, 3.5, 5.0, 7.0])
def test_beam_loading_equals_minus_theta_over_4_dm2_dtheta(theta):
    # Identity (derived): with M = sin(x)/x, x = theta/2, d(M^2)/d(theta) = M (cos x - M)/x,
    # so -(theta/4) d(M^2)/d(theta) = (M^2 - M cos x)/2.  Checked here by central differences
    # of M^2 = (sin(x)/x)^2 (step 1e-5: truncation ~1e-10, rounding ~1e-11).
    v0, f = 1.2e5, 2e9
    h = 1e-5

    def m2(t):
        return (math.sin(t / 2) / (t / 2))**2

    deriv = (m2(theta + h) - m2(theta - h)) / (2 * h)
    g = gamma_exact(v0)
    expected = -(theta / 4) * deriv * 2 / (g * (g + 1))
    d = length_for_angle(theta, f, v0)
    assert_allclose(gap.beam_loading(f, d, v0, 1.0) * v0, expected, rtol=1e-8, atol=1e-12)


def trajectory_beam_loading(theta, v0, v1_over_v0=1e-4, n_phase=32, n_step=1000):
    """G_B/G0 of a gridded uniform-field gap by integrating relativistic electron motion.

    Electrons enter at u0 at uniformly spaced phases phi of the gap voltage V1 sin(omega t + phi)
    and gain energy at the rate dW/dz = e (V1/d) sin(omega t + phi) over 0 < z < d (the field
    only exists inside the gap).  Independent variable z (RK4); state per electron: the
    time lag tau = t - z/u0 and dg = gamma - gamma0.  The mean energy taken from the field,
    <dW> = V_rest <dg> e, gives the power P = I0 <dW>/e = G_B V1^2/2, so
    G_B/G0 = 2 V0 V_rest <dg> / V1^2.  Odd orders in V1 cancel in the phase average; the
    error is O((V1/V0)^2).
    """
    g0 = gamma_exact(v0)
    b0 = math.sqrt(1 - 1 / g0**2)
    u0 = b0 * sc.c
    omega = 1.0  # scale-free: lengths in units of u0/omega
    d = theta * u0 / omega
    v1 = v1_over_v0 * v0
    k = v1 / (d * V_REST)  # d(gamma)/dz per unit sin
    phi = 2 * np.pi * np.arange(n_phase) / n_phase

    def rhs(z, tau, dg):
        g = g0 + dg
        b = np.sqrt(1 - 1 / g**2)
        # 1/(beta c) - 1/(beta0 c) = (beta0 - beta)/(beta beta0 c), without cancellation:
        # beta0 - beta = (1/g^2 - 1/g0^2)/(beta0 + beta) = -dg (g + g0)/(g^2 g0^2 (beta0 + beta))
        dtau = -dg * (g + g0) / (g**2 * g0**2 * (b0 + b)) / (b * b0 * sc.c)
        ddg = k * np.sin(omega * (z / u0 + tau) + phi)
        return dtau, ddg

    h = d / n_step
    tau = np.zeros(n_phase)
    dg = np.zeros(n_phase)
    z = 0.0
    for _ in range(n_step):
        k1 = rhs(z, tau, dg)
        k2 = rhs(z + h / 2, tau + h / 2 * k1[0], dg + h / 2 * k1[1])
        k3 = rhs(z + h / 2, tau + h / 2 * k2[0], dg + h / 2 * k2[1])
        k4 = rhs(z + h, tau + h * k3[0], dg + h * k3[1])
        tau = tau + h / 6 * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0])
        dg = dg + h / 6 * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1])
        z += h
    return 2 * v0 * V_REST * dg.mean() / v1**2


@pytest.mark.parametrize("v0", [1e3, 1e5, 5e5])
@pytest.mark.parametrize("theta", [1.0, 2.0, 4.0])
def test_beam_loading_against_trajectory_integration(v0, theta):
    # Independent physics: relativistic equations of motion, no small-signal algebra.
    # Agreement to O((V1/V0)^2) = 1e-8 and the RK4 error (step theta/1000): rtol 1e-6.
    f = 3e9
    d = length_for_angle(theta, f, v0)
    assert_allclose(gap.beam_loading(f, d, v0, 1.0) * v0, trajectory_beam_loading(theta, v0),
                    rtol=1e-6)


def test_beam_loading_negative_between_2pi_and_2_86pi():
    # Just past theta = 2 pi, M < 0 and M - cos x > 0 (cos x ~ -1): G_B < 0.  At theta = 3.5 pi,
    # M = sin(1.75 pi)/(1.75 pi) < 0 and M - cos x < 0: G_B > 0.
    f, v0 = 3e9, 2e4
    thetas = np.array([2.4 * np.pi, 3.5 * np.pi])
    out = gap.beam_loading(f, length_for_angle(thetas, f, v0), v0, 1.0)
    assert out[0] < 0 < out[1]


def test_beam_loading_proportional_to_current_and_nan():
    f, d, v0 = 3e9, 2e-3, 5e4
    out = gap.beam_loading(f, d, v0, np.array([0.0, 1.0, 2.0, -1.0, np.nan]))
    assert out[0] == 0.0
    assert_allclose(out[2], 2 * out[1], rtol=1e-15)
    assert np.isnan(out[3:]).all()
    assert np.isnan(gap.beam_loading(f, d, 0.0, 1.0))
    assert np.isnan(gap.beam_loading(f, -d, v0, 1.0))
    assert np.isnan(gap.beam_loading(-f, d, v0, 1.0))
    assert gap.beam_loading(f, d, v0, np.array([[1.0], [2.0]])).shape == (2, 1)


# --- catalogue ---------------------------------------------------------------------------------

GAP_NAMES = ["TUBE_TRANSIT_ANGLE", "TUBE_GAP_COUPLING", "TUBE_BEAM_LOADING"]


@pytest.mark.parametrize("name", GAP_NAMES)
def test_catalogue_entry_matches_python_twin(name):
    fn = CATALOGUE[name]
    assert fn.python_name == name[len("TUBE_"):].lower()
    # the worksheet beam loading (gridded or gridless) lives with the susceptance
    module = loading if name == "TUBE_BEAM_LOADING" else gap
    assert fn.func is getattr(module, fn.python_name)
    sig = list(inspect.signature(fn.func).parameters)
    assert sig == [p.name for p in fn.params]


def test_catalogue_design_signatures():
    # design.md, "Gap and bunching"
    assert [p.name for p in CATALOGUE["TUBE_GAP_COUPLING"].params] == [
        "frequency", "gap_length", "voltage", "beam_radius", "tunnel_radius"]
    # issue 12: the radii follow the design's arguments, optional (gridless with space charge)
    assert [p.name for p in CATALOGUE["TUBE_BEAM_LOADING"].params] == [
        "frequency", "gap_length", "voltage", "current", "beam_radius", "tunnel_radius"]
    assert CATALOGUE["TUBE_TRANSIT_ANGLE"].result_unit == "rad"
    assert CATALOGUE["TUBE_BEAM_LOADING"].result_unit == "S"
    assert CATALOGUE["TUBE_GAP_COUPLING"].result_unit == ""


def test_catalogue_radii_check():
    check = CATALOGUE["TUBE_GAP_COUPLING"].checks[0]
    assert check.args == ("beam_radius", "tunnel_radius")
    assert bool(check.test(None, None))
    assert not bool(check.test(1e-3, None))
    assert not bool(check.test(None, 1e-3))
    assert list(check.test(np.array([1e-3, 3e-3]), 2e-3)) == [True, False]
    assert "beam_radius must be <= tunnel_radius" in check.message


def test_gridless_coupling_needs_a_cut_off_tunnel():
    # TM01 cutoff of a round guide: 2 pi f a / c = j01 = 2.404826 (zero of J0,
    # Abramowitz & Stegun Table 9.5).  Just below it the gridless model applies,
    # at and above it the tunnel propagates and the result is NaN (an error value
    # through the worksheet layer, with the limit in its message).
    import scipy.constants as sc

    from tubefuncs.errors import TubeInputError
    from tubefuncs.worksheet import evaluate

    a = 7e-3
    f_cut = 2.404826 * sc.c / (2 * np.pi * a)
    m = gap.gap_coupling(np.array([0.999 * f_cut, 1.001 * f_cut]), 5e-3, 100e3, 5e-3, a)
    assert np.isfinite(m[0]) and np.isnan(m[1])
    with pytest.raises(TubeInputError) as info:
        evaluate("TUBE_GAP_COUPLING", [1.001 * f_cut, 5e-3, 100e3, 5e-3, a])
    assert info.value.error_value == "#NUM!"
    assert "TM01 cutoff" in str(info.value) and "tunnel_radius" in str(info.value)
    # the gridded gap has no tunnel and no such limit
    assert np.isfinite(evaluate("TUBE_GAP_COUPLING", [1.001 * f_cut, 5e-3, 100e3]).value)
