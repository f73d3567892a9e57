"""Tests of the link-budget functions and the Saleh amplifier model.

Sources beside each check: Recommendation ITU-R P.525 (free-space loss, exact
and rounded forms), the aperture-antenna relation G = 4 pi A_e / lambda^2, the
exact SI value of the Boltzmann constant (BIPM, The International System of
Units, 9th ed., 2019, Table 1: k = 1.380649e-23 J/K), and A. A. M. Saleh,
IEEE Trans. Commun. 29(11), 1715-1720, 1981 (model functions), with limiting
cases derived in comments.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import constants as sc
from scipy.optimize import minimize_scalar

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.physics.link import (
    cn0,
    dish_gain,
    eirp,
    fspl,
    g_over_t,
    saleh_amplitude,
    saleh_phase,
)

K_BOLTZMANN_SI = 1.380649e-23   # exact, SI Brochure 9th ed. (2019), Table 1 [J/K]
C_LIGHT = 299792458.0           # exact, SI Brochure 9th ed. (2019), Table 1 [m/s]
DB_6 = 20 * math.log10(2)       # a factor 2 in amplitude, 6.0206 dB

# ------------------------------------------------------------------------ FSPL


def p525_exact(f_hz, d_m):
    """ITU-R P.525 exact free-space loss 20 log10(4 pi d / lambda)."""
    return 20 * math.log10(4 * math.pi * d_m * f_hz / C_LIGHT)


def p525_rounded(f_hz, d_m):
    """ITU-R P.525 rounded form 32.4 + 20 log10 f[MHz] + 20 log10 d[km]."""
    return 32.4 + 20 * math.log10(f_hz / 1e6) + 20 * math.log10(d_m / 1e3)


CASES = [(1e9, 1e3), (2.4e9, 1e3), (2.856e9, 50e3), (12e9, 35786e3), (4e9, 38000e3),
         (30e9, 5.0)]


@pytest.mark.parametrize("f, d", CASES)
def test_fspl_matches_p525_exact_form(f, d):
    assert_allclose(fspl(f, d), p525_exact(f, d), rtol=1e-13)


@pytest.mark.parametrize("f, d", CASES)
def test_fspl_within_005_db_of_p525_rounded_form(f, d):
    # P.525's 32.4 is 20 log10(4 pi (1e6 Hz)(1e3 m) / c) = 32.4478 rounded down, so
    # the exact result is 0.0478 dB above the rounded one, everywhere.
    diff = fspl(f, d) - p525_rounded(f, d)
    assert 0.0 < diff < 0.05
    assert_allclose(diff, 20 * math.log10(4 * math.pi * 1e9 / C_LIGHT) - 32.4, rtol=1e-9)


def test_fspl_geostationary_value():
    # 12 GHz over 35786 km: 205.1057 dB (P.525 exact form evaluated by hand; 4 decimals)
    assert_allclose(fspl(12e9, 35786e3), 205.1057, atol=5e-5)


def test_fspl_zero_db_point():
    # Derivation: 4 pi d / lambda = 1 at d = lambda / (4 pi), so the loss is 0 dB there.
    f = 3e9
    assert abs(fspl(f, C_LIGHT / f / (4 * math.pi))) < 1e-12


@given(f=st.floats(1e6, 1e12), d=st.floats(1.0, 1e9))
def test_fspl_inverse_square_law(f, d):
    # Doubling the distance or the frequency costs 20 log10 2 = 6.0206 dB.
    assert_allclose(fspl(f, 2 * d) - fspl(f, d), DB_6, atol=1e-9)
    assert_allclose(fspl(2 * f, d) - fspl(f, d), DB_6, atol=1e-9)


def test_fspl_broadcast_and_nan():
    f = np.array([[1e9], [10e9]])
    d = np.array([1e3, 0.0, -1e3, np.nan])
    out = fspl(f, d)
    assert out.shape == (2, 4)
    assert_allclose(out[:, 0], [p525_exact(1e9, 1e3), p525_exact(10e9, 1e3)], rtol=1e-13)
    assert np.isnan(out[:, 1:]).all()
    assert np.isnan(fspl(0.0, 1e3)) and np.isnan(fspl(-1e9, 1e3))


def test_fspl_scalar_type():
    out = fspl(1e9, 1e3)
    assert isinstance(out, np.floating) and np.ndim(out) == 0


# ------------------------------------------------------------------- dish gain

def aperture_gain_dbi(f, diameter, efficiency):
    """G = 4 pi A_e / lambda^2 with A_e = efficiency * pi D^2 / 4 (aperture antenna)."""
    lam = C_LIGHT / f
    area = efficiency * math.pi * diameter**2 / 4
    return 10 * math.log10(4 * math.pi * area / lam**2)


@pytest.mark.parametrize("f, dia, eff", [(12e9, 3.0, 0.6), (10e9, 1.0, 0.55),
                                         (12e9, 0.6, 0.65), (2.856e9, 13.0, 0.7)])
def test_dish_gain_against_aperture_formula(f, dia, eff):
    assert_allclose(dish_gain(f, dia, eff), aperture_gain_dbi(f, dia, eff), rtol=1e-13)


def test_dish_gain_default_efficiency_and_value():
    # 3 m at 12 GHz, 60 %: 49.3141 dBi (aperture formula, hand-evaluated to 4 decimals)
    assert dish_gain(12e9, 3.0) == dish_gain(12e9, 3.0, 0.6)
    assert_allclose(dish_gain(12e9, 3.0), 49.3141, atol=5e-5)


def test_dish_gain_uniform_aperture_limit():
    # Efficiency 1: the directivity of a uniformly lit circular aperture, (pi D / lambda)^2.
    f, dia = 10e9, 2.0
    assert_allclose(dish_gain(f, dia, 1.0), 20 * math.log10(math.pi * dia * f / C_LIGHT),
                    rtol=1e-13)


@given(f=st.floats(1e9, 1e11), dia=st.floats(0.3, 70.0))
def test_dish_gain_doubles_per_diameter_doubling(f, dia):
    # Area goes as D^2: doubling D adds 6.0206 dB.
    assert_allclose(dish_gain(f, 2 * dia) - dish_gain(f, dia), DB_6, atol=1e-9)


@pytest.mark.parametrize("args", [(12e9, 3.0, 0.0), (12e9, 3.0, 1.01), (12e9, 3.0, -0.5),
                                  (12e9, 0.0, 0.6), (12e9, -1.0, 0.6), (0.0, 3.0, 0.6),
                                  (12e9, np.nan, 0.6)])
def test_dish_gain_out_of_domain_is_nan(args):
    assert np.isnan(dish_gain(*args))


def test_dish_gain_array():
    out = dish_gain(np.array([4e9, 12e9, -1.0]), 2.4, np.array([0.6, 1.0, 0.6]))
    assert_allclose(out[:2], [aperture_gain_dbi(4e9, 2.4, 0.6),
                              aperture_gain_dbi(12e9, 2.4, 1.0)], rtol=1e-13)
    assert np.isnan(out[2])


# --------------------------------------------------------------- EIRP and G/T

def test_eirp_definition():
    # 100 W = 20 dBW exactly; + 49.3141 dBi - 1 dB feed loss = 68.3141 dBW.
    assert_allclose(eirp(100.0, 49.3141, 1.0), 68.3141, rtol=1e-13)
    assert_allclose(eirp(1.0, 30.0), 30.0, rtol=1e-15)   # 1 W is 0 dBW


@pytest.mark.parametrize("args", [(0.0, 40.0, 0.0), (-5.0, 40.0, 0.0), (100.0, 40.0, -1.0),
                                  (np.nan, 40.0, 0.0)])
def test_eirp_out_of_domain_is_nan(args):
    assert np.isnan(eirp(*args))


def test_eirp_array():
    out = eirp(np.array([1e3, 10e3, 100e3]), 45.0, 0.5)
    assert_allclose(out, [74.5, 84.5, 94.5], rtol=1e-13)   # 30, 40, 50 dBW + 44.5 dB


def test_gt_definition():
    # G/T = G - 10 log10(T / 1 K): 35.6824 dBi with 150 K.
    assert_allclose(g_over_t(35.6824, 150.0), 35.6824 - 10 * math.log10(150.0), rtol=1e-13)
    assert g_over_t(40.0, 1.0) == 40.0           # T = 1 K leaves the gain unchanged
    assert_allclose(g_over_t(40.0, 100.0), 20.0, rtol=1e-15)


@pytest.mark.parametrize("t", [0.0, -10.0, np.nan])
def test_gt_out_of_domain_is_nan(t):
    assert np.isnan(g_over_t(40.0, t))


# ------------------------------------------------------------------------ C/N0

def test_cn0_worked_link():
    # EIRP 68.3141 dBW, path 205.1057 dB, G/T 13.9215 dB/K and
    # -10 log10 k = 228.59916 (k exact in the SI) -> 105.7291 dB-Hz.
    expected = 68.3141 - 205.1057 + 13.9215 - 10 * math.log10(K_BOLTZMANN_SI)
    assert_allclose(cn0(68.3141, 205.1057, 13.9215), expected, rtol=1e-13)
    assert_allclose(cn0(68.3141, 205.1057, 13.9215), 105.7291, atol=1e-4)


def test_cn0_boltzmann_term():
    # With everything else zero the result is -10 log10 k: 228.5992 dB(K Hz / W),
    # 0.0008 dB below the rounded 228.6 of many sheets.
    out = cn0(0.0, 0.0, 0.0)
    assert_allclose(out, -10 * math.log10(K_BOLTZMANN_SI), rtol=1e-14)
    assert_allclose(out, 228.5992, atol=5e-5)
    assert 0.0 < 228.6 - out < 0.001


def test_cn0_other_losses_subtract_and_broadcast():
    out = cn0(50.0, 200.0, np.array([10.0, 20.0]), np.array([[0.0], [3.0]]))
    assert out.shape == (2, 2)
    assert_allclose(out[1] - out[0], [-3.0, -3.0], rtol=1e-12)
    assert_allclose(out[0, 1] - out[0, 0], 10.0, rtol=1e-12)


@pytest.mark.parametrize("args", [(50.0, -200.0, 10.0, 0.0), (50.0, 200.0, 10.0, -1.0),
                                  (np.nan, 200.0, 10.0, 0.0)])
def test_cn0_out_of_domain_is_nan(args):
    assert np.isnan(cn0(*args))


def test_boltzmann_constant_of_scipy_is_the_si_value():
    assert sc.k == K_BOLTZMANN_SI


# ------------------------------------------------------------------------ Saleh

def saleh_a(r, alpha, beta):
    """Saleh (1981) amplitude function alpha r / (1 + beta r^2)."""
    return alpha * r / (1 + beta * r**2)


def saleh_p(r, alpha, beta):
    """Saleh (1981) phase function alpha r^2 / (1 + beta r^2) [rad]."""
    return alpha * r**2 / (1 + beta * r**2)


SET_A = (2.1587, 1.1517, 4.0033, 9.1040)   # defaults, the most quoted set [from memory]
SET_B = (1.9638, 0.9945, 2.5293, 2.8168)   # the second set in circulation [from memory]


@pytest.mark.parametrize("coeffs", [SET_A, SET_B])
def test_saleh_against_model_functions(coeffs):
    aa, ba, ap, bp = coeffs
    r = np.array([0.0, 0.1, 0.5, 1.0, 1.5, 3.0])
    assert_allclose(saleh_amplitude(r, aa, ba), [saleh_a(x, aa, ba) for x in r], rtol=1e-14)
    assert_allclose(saleh_phase(r, ap, bp), [saleh_p(x, ap, bp) for x in r], rtol=1e-14)


def test_saleh_defaults_are_set_a():
    assert_allclose(saleh_amplitude(1.0), saleh_a(1.0, *SET_A[:2]), rtol=1e-15)
    assert_allclose(saleh_phase(1.0), saleh_p(1.0, *SET_A[2:]), rtol=1e-15)
    # r = 1: A = 1.003253, Phi = 22.7011 deg (model functions evaluated by hand)
    assert_allclose(saleh_amplitude(1.0), 1.003253, atol=5e-7)
    assert_allclose(math.degrees(saleh_phase(1.0)), 22.7011, atol=5e-5)


def test_saleh_small_signal_gain_is_alpha():
    # Derivation: A(r) = alpha r (1 - beta r^2 + ...), so A(r)/r -> alpha as r -> 0.
    r = 1e-7
    assert_allclose(saleh_amplitude(r) / r, SET_A[0], rtol=1e-12)


@pytest.mark.parametrize("coeffs", [SET_A, SET_B])
def test_saleh_saturation_point(coeffs):
    # Derivation: dA/dr = alpha (1 - beta r^2) / (1 + beta r^2)^2 = 0 at r = 1/sqrt(beta),
    # where A = alpha / (2 sqrt(beta)). Find the maximum of the library function numerically.
    aa, ba = coeffs[:2]
    best = minimize_scalar(lambda r: -saleh_amplitude(r, aa, ba), bounds=(0.0, 5.0),
                           method="bounded", options={"xatol": 1e-10})
    assert_allclose(best.x, 1 / math.sqrt(ba), rtol=1e-6)
    assert_allclose(-best.fun, aa / (2 * math.sqrt(ba)), rtol=1e-12)


def test_saleh_phase_limits():
    ap, bp = SET_A[2:]
    # Derivation: Phi -> alpha/beta for r -> infinity (relative error 1/(beta r^2)).
    assert_allclose(saleh_phase(1e6), ap / bp, rtol=1e-11)
    # At r = 1/sqrt(beta), beta r^2 = 1 and Phi = alpha / (2 beta) exactly.
    assert_allclose(saleh_phase(1 / math.sqrt(bp)), ap / (2 * bp), rtol=1e-14)
    # Small drive: Phi ~ alpha r^2.
    assert_allclose(saleh_phase(1e-6) / 1e-12, ap, rtol=1e-10)
    assert saleh_phase(0.0) == 0.0 and saleh_amplitude(0.0) == 0.0


@given(r=st.floats(0.0, 1e3))
def test_saleh_bounds(r):
    aa, ba, ap, bp = SET_A
    assert 0.0 <= saleh_amplitude(r) <= aa / (2 * math.sqrt(ba)) * (1 + 1e-12)
    assert 0.0 <= saleh_phase(r) < ap / bp


def test_saleh_linear_when_beta_zero():
    # beta = 0 removes compression: an ideal linear amplifier of gain alpha.
    assert_allclose(saleh_amplitude(np.array([0.5, 2.0]), 3.0, 0.0), [1.5, 6.0], rtol=1e-15)


@pytest.mark.parametrize("args", [(-0.1,), (1.0, 0.0, 1.0), (1.0, -2.0, 1.0), (1.0, 2.0, -1.0),
                                  (np.nan,)])
def test_saleh_amplitude_out_of_domain_is_nan(args):
    assert np.isnan(saleh_amplitude(*args))


@pytest.mark.parametrize("args", [(-0.1,), (1.0, 4.0, -1.0), (np.nan,)])
def test_saleh_phase_out_of_domain_is_nan(args):
    assert np.isnan(saleh_phase(*args))


def test_saleh_array_marks_only_bad_elements():
    out = saleh_amplitude(np.array([0.5, -0.5, 2.0]))
    assert np.isnan(out[1]) and np.isfinite(out[[0, 2]]).all()


# -------------------------------------------------------------------- catalogue

NAMES = ("TUBE_FSPL", "TUBE_DISH_GAIN", "TUBE_EIRP", "TUBE_G_OVER_T", "TUBE_CN0",
         "TUBE_SALEH_AMPLITUDE", "TUBE_SALEH_PHASE")


def test_catalogue_db_results_and_units():
    for name in ("TUBE_FSPL", "TUBE_DISH_GAIN", "TUBE_EIRP", "TUBE_G_OVER_T", "TUBE_CN0"):
        assert CATALOGUE[name].result_unit == ""
    assert "dBi" in CATALOGUE["TUBE_DISH_GAIN"].help
    assert "dB-Hz" in CATALOGUE["TUBE_CN0"].help
    assert "dBW" in CATALOGUE["TUBE_EIRP"].help
    assert "dB/K" in CATALOGUE["TUBE_G_OVER_T"].help
    phase = CATALOGUE["TUBE_SALEH_PHASE"]
    assert phase.result_unit == "rad" and "deg" in phase.result_units
    assert CATALOGUE["TUBE_SALEH_AMPLITUDE"].result_unit == ""
