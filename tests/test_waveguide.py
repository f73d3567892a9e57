"""Tests of the rectangular-waveguide functions (TE10 cutoff and conductor loss).

Guide sizes are the EIA RS-261 standard inside dimensions: WR-284 is
2.840 in x 1.340 in, WR-90 is 0.900 in x 0.400 in (inch = 25.4 mm exactly).

The loss is checked against an independent calculation: the TE10 fields of
D. M. Pozar, Microwave Engineering, 4th ed., Wiley, 2012, Sec. 3.3, the wall
loss and power flow integrated numerically (scipy.integrate.quad), and the
perturbation method alpha = P_loss / (2 P) (Pozar, Sec. 2.7).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import constants as sc
from scipy.integrate import quad

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.physics.waveguide import waveguide_cutoff, waveguide_loss

INCH = 25.4e-3
WR284 = (2.840 * INCH, 1.340 * INCH)
WR90 = (0.900 * INCH, 0.400 * INCH)
SIGMA_CU = 5.8e7  # IEC 60028 annealed copper, 1/58 ohm mm^2/m


def loss_by_field_integration(f, a, b, sigma, length):
    """TE10 conductor loss [dB] from the fields, integrated numerically.

    Fields of TE10 (Pozar Sec. 3.3, amplitude A = 1, e^{-j beta z} dropped):
        H_z = cos(pi x / a)
        H_x = j (beta a / pi) sin(pi x / a)
        E_y = -j (omega mu0 a / pi) sin(pi x / a)
    Power flow P = 1/2 Re int int (-E_y H_x^*) dx dy, wall loss per metre
    P_l = R_s/2 * (sum over the four walls of int |H_tangential|^2 dl), with
    R_s = sqrt(omega mu0 / (2 sigma)) for a good conductor, and
    alpha = P_l / (2 P) [Np/m] (perturbation method).
    """
    omega = 2 * math.pi * f
    k = omega / sc.c
    beta = math.sqrt(k**2 - (math.pi / a) ** 2)
    rs = math.sqrt(omega * sc.mu_0 / (2 * sigma))

    def hx2(x):
        return (beta * a / math.pi * math.sin(math.pi * x / a)) ** 2

    def hz2(x):
        return math.cos(math.pi * x / a) ** 2

    def sz(x):
        return ((omega * sc.mu_0 * a / math.pi) * (beta * a / math.pi)
                * math.sin(math.pi * x / a) ** 2)

    opts = {"epsabs": 0, "epsrel": 1e-13, "limit": 200}
    power = 0.5 * b * quad(sz, 0, a, **opts)[0]
    # side walls x = 0 and x = a: tangential H is H_z (= 1 there), over the height b
    side = 2 * quad(lambda y: hz2(0.0), 0, b, **opts)[0]
    # top and bottom walls y = 0 and y = b: tangential H_x and H_z, over the width a
    broad = 2 * quad(lambda x: hx2(x) + hz2(x), 0, a, **opts)[0]
    p_loss = 0.5 * rs * (side + broad)
    alpha = p_loss / (2 * power)
    # power ratio after `length`: exp(-2 alpha length); loss in dB = -10 log10 of it
    return -10 * math.log10(math.exp(-2 * alpha * length))


def loss_pozar_closed_form(f, a, b, sigma, length):
    """Pozar Sec. 3.3 closed form alpha_c = R_s (2 b pi^2 + a^3 k^2) / (a^3 b beta k eta)."""
    k = 2 * math.pi * f / sc.c
    beta = math.sqrt(k**2 - (math.pi / a) ** 2)
    eta = math.sqrt(sc.mu_0 / sc.epsilon_0)
    rs = math.sqrt(math.pi * f * sc.mu_0 / sigma)
    alpha = rs * (2 * b * math.pi**2 + a**3 * k**2) / (a**3 * b * beta * k * eta)
    return 20 * math.log10(math.e) * alpha * length


# ------------------------------------------------------------------------ cutoff

def test_cutoff_is_half_wavelength_across_broad_wall():
    # TE10 cuts off when the broad wall is half a free-space wavelength (Pozar 3.3):
    # lambda_c = 2a, so f_c = c / lambda_c.
    a = WR284[0]
    assert_allclose(waveguide_cutoff(a), sc.c / (2 * a), rtol=1e-14)


@pytest.mark.parametrize("size, ghz", [(WR284, 2.078), (WR90, 6.557)])
def test_cutoff_standard_guides(size, ghz):
    # Cutoff frequencies of the EIA sizes as printed in waveguide tables, 4 digits
    # (WR-284: 2.078 GHz, WR-90: 6.557 GHz) [from memory].
    assert_allclose(waveguide_cutoff(size[0]), ghz * 1e9, rtol=1e-3)


def test_cutoff_array_and_nan():
    out = waveguide_cutoff(np.array([WR284[0], WR90[0], 0.0, -0.01, np.nan]))
    assert_allclose(out[:2], sc.c / (2 * np.array([WR284[0], WR90[0]])), rtol=1e-14)
    assert np.isnan(out[2:]).all()


def test_cutoff_scalar_type():
    out = waveguide_cutoff(0.1)
    assert isinstance(out, np.floating) and np.ndim(out) == 0


# -------------------------------------------------------------------------- loss

@pytest.mark.parametrize("f", [2.6e9, 2.856e9, 3.0e9, 3.5e9, 3.95e9])
def test_loss_wr284_copper_against_field_integration(f):
    a, b = WR284
    expected = loss_by_field_integration(f, a, b, SIGMA_CU, 100.0)
    # quad converges to ~1e-13; the two methods differ only by rounding
    assert_allclose(waveguide_loss(f, a, b, 100.0), expected, rtol=1e-9)


def test_loss_wr90_copper_10ghz_against_field_integration():
    a, b = WR90
    expected = loss_by_field_integration(10e9, a, b, SIGMA_CU, 1.0)
    assert_allclose(waveguide_loss(10e9, a, b, 1.0), expected, rtol=1e-9)
    # plausibility: copper X-band guide loses about 0.11 dB/m [from memory]
    assert 0.09 < expected < 0.13


def test_loss_against_pozar_closed_form_array():
    a, b = WR284
    f = np.linspace(2.3e9, 4.1e9, 7)
    expected = [loss_pozar_closed_form(fi, a, b, SIGMA_CU, 30.0) for fi in f]
    assert_allclose(waveguide_loss(f, a, b, 30.0), expected, rtol=1e-12)


def test_loss_high_frequency_limit():
    # Derivation: for f >> f_c the bracket (1 + (2b/a)(f_c/f)^2)/sqrt(1 - (f_c/f)^2) -> 1,
    # so alpha -> R_s / (b eta0): the loss of the two broad walls alone.
    a, b = WR284
    f = 1e4 * sc.c / (2 * a)
    rs = math.sqrt(math.pi * f * sc.mu_0 / SIGMA_CU)
    alpha = rs / (b * sc.mu_0 * sc.c)
    assert_allclose(waveguide_loss(f, a, b, 1.0), 20 * math.log10(math.e) * alpha, rtol=1e-7)


def test_loss_default_conductivity_is_annealed_copper():
    a, b = WR284
    assert waveguide_loss(3e9, a, b, 10.0) == waveguide_loss(3e9, a, b, 10.0, 5.8e7)


def test_loss_scales_as_inverse_root_conductivity():
    # R_s = sqrt(pi f mu0 / sigma): a quarter of the conductivity doubles the loss.
    a, b = WR284
    assert_allclose(waveguide_loss(3e9, a, b, 10.0, SIGMA_CU / 4),
                    2 * waveguide_loss(3e9, a, b, 10.0, SIGMA_CU), rtol=1e-13)


@given(length=st.floats(0.0, 1e4), k=st.floats(0.0, 100.0))
def test_loss_in_db_is_additive_in_length(length, k):
    a, b = WR90
    assert_allclose(waveguide_loss(9.3e9, a, b, k * length),
                    k * waveguide_loss(9.3e9, a, b, length), rtol=1e-12, atol=1e-300)


def test_loss_zero_length_is_zero():
    assert waveguide_loss(3e9, *WR284, 0.0) == 0.0


def test_loss_grows_towards_cutoff():
    a, b = WR284
    fc = sc.c / (2 * a)
    out = waveguide_loss(fc * np.array([1.001, 1.01, 1.1, 1.5]), a, b, 1.0)
    assert np.all(np.diff(out) < 0)


@pytest.mark.parametrize("args", [
    (sc.c / (2 * WR284[0]), *WR284, 1.0),   # exactly at cutoff
    (2.0e9, *WR284, 1.0),                   # below cutoff (f_c = 2.078 GHz)
    (3e9, WR284[1], WR284[0], 1.0),         # height > width (swapped)
    (3e9, *WR284, -1.0),                    # negative length
    (-3e9, *WR284, 1.0),
    (3e9, 0.0, 0.0, 1.0),
    (np.nan, *WR284, 1.0),
])
def test_loss_out_of_domain_is_nan(args):
    assert np.isnan(waveguide_loss(*args))


def test_loss_nonpositive_conductivity_is_nan():
    assert np.isnan(waveguide_loss(3e9, *WR284, 1.0, 0.0))
    assert np.isnan(waveguide_loss(3e9, *WR284, 1.0, -5.8e7))


def test_loss_array_marks_only_bad_elements():
    out = waveguide_loss(np.array([3e9, 1e9, 3.5e9]), *WR284, 10.0)
    assert np.isfinite(out[[0, 2]]).all() and np.isnan(out[1])


def test_square_guide_is_allowed():
    # b = a is the edge of the domain (TE10 and TE01 degenerate): still computed.
    a = WR284[0]
    expected = loss_by_field_integration(3e9, a, a, SIGMA_CU, 1.0)
    assert_allclose(waveguide_loss(3e9, a, a, 1.0), expected, rtol=1e-9)


# --------------------------------------------------------------------- catalogue

def test_catalogue_cutoff_check_message_and_mask():
    fn = CATALOGUE["TUBE_WAVEGUIDE_LOSS"]
    cutoff = next(c for c in fn.checks if c.args == ("frequency", "width"))
    assert "below the TE10 cutoff" in cutoff.message
    a = WR284[0]
    fc = sc.c / (2 * a)
    mask = cutoff.test(np.array([0.5 * fc, fc, 1.01 * fc]), a)
    assert list(mask) == [False, False, True]


def test_catalogue_loss_result_is_db():
    fn = CATALOGUE["TUBE_WAVEGUIDE_LOSS"]
    assert fn.result_unit == "" and "dB" in fn.help
    assert [p.name for p in fn.params] == ["frequency", "width", "height", "length",
                                           "conductivity"]
