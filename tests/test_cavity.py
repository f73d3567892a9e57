"""Tests of tubefuncs.physics.cavity and the cavity entries of the catalogue.

Expected values come from outside the library: CODATA constants via
scipy.constants, zeros and values of Bessel functions from scipy.special,
numerical integration of the TM010 fields with scipy.integrate, the exact
plane-wave solution of Maxwell's equations in a conductor, and energy
bookkeeping written out beside each check.  No expected value uses another
library function.
"""

from __future__ import annotations

import inspect
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import constants as sc
from scipy import special
from scipy.integrate import quad

from tubefuncs.catalogue import CATALOGUE, CAUTION_RF
from tubefuncs.physics import cavity

V_REST = sc.m_e * sc.c**2 / sc.e
ETA0 = math.sqrt(sc.mu_0 / sc.epsilon_0)  # impedance of free space from CODATA mu0, eps0
SIGMA_CU = 5.8e7  # annealed copper, 100 % IACS: 1/58 ohm mm^2/m (IEC 60028)


# --- pillbox_freq ------------------------------------------------------------------------------

def test_first_zero_of_j0():
    # A&S Table 9.5: j_{0,1} = 2.4048255577 [from memory]; scipy.special.jn_zeros agrees.
    assert_allclose(special.jn_zeros(0, 1)[0], 2.4048255577, atol=1e-10)


@pytest.mark.parametrize("a", [1e-3, 0.04, 0.0876, 1.5])
def test_pillbox_freq_is_a_zero_of_j0(a):
    # TM010: E_z ~ J0(k r) must vanish on the side wall, k = omega/c: J0(2 pi f a / c) = 0 at
    # the first zero (scipy.special.jn_zeros).
    f = cavity.pillbox_freq(a)
    p01 = special.jn_zeros(0, 1)[0]
    assert_allclose(f, p01 * sc.c / (2 * np.pi * a), rtol=1e-15)
    assert abs(special.j0(2 * np.pi * f * a / sc.c)) < 1e-14


def test_pillbox_freq_array_and_nan():
    out = cavity.pillbox_freq(np.array([0.01, 0.02, 0.0, -0.01, np.nan, np.inf]))
    assert_allclose(out[0], 2 * out[1], rtol=1e-15)
    assert np.isnan(out[2:5]).all()
    assert out[5] == 0.0  # an infinite cylinder has its TM010 cutoff at 0 Hz
    assert isinstance(cavity.pillbox_freq(0.04), np.floating)


# --- skin depth and surface resistance ----------------------------------------------------------

def conductor_wave(f, sigma):
    """Exact plane wave in a conductor (Maxwell, no good-conductor approximation).

    Propagation constant gamma_p = sqrt(j omega mu0 (sigma + j omega eps0)); the field decays as
    exp(-Re(gamma_p) z), so delta = 1/Re(gamma_p); the surface impedance is
    Z_s = j omega mu0 / gamma_p and R_s = Re(Z_s).
    """
    w = 2 * np.pi * f
    gp = np.sqrt(1j * w * sc.mu_0 * (sigma + 1j * w * sc.epsilon_0))
    return 1 / gp.real, (1j * w * sc.mu_0 / gp).real


@pytest.mark.parametrize("f", [1e6, 1e9, 2.998e9, 1e10, 1e11])
@pytest.mark.parametrize("sigma", [SIGMA_CU, 1.0e7])
def test_skin_depth_and_surface_resistance_against_maxwell(f, sigma):
    # The good-conductor forms differ from the exact wave by ~omega eps0/(2 sigma) (5.6e-7
    # at most here): tolerance omega eps0/sigma + 1e-14.
    delta, r_s = conductor_wave(f, sigma)
    tol = 2 * np.pi * f * sc.epsilon_0 / sigma + 1e-14
    assert_allclose(cavity.skin_depth(f, sigma), delta, rtol=tol)
    assert_allclose(cavity.surface_resistance(f, sigma), r_s, rtol=tol)


def test_skin_depth_copper_1ghz():
    # Copper at 1 GHz: about 2.09 um in common handbook tables [from memory]; from
    # delta = 1/sqrt(pi f mu0 sigma) with CODATA mu0 and sigma = 5.8e7 S/m: 2.0898 um
    # [computed, physics notes item 6].
    assert_allclose(cavity.skin_depth(1e9), 2.09e-6, rtol=3e-3)
    assert_allclose(cavity.skin_depth(1e9), 1 / math.sqrt(np.pi * 1e9 * sc.mu_0 * SIGMA_CU),
                    rtol=1e-14)
    # default conductivity is the IEC 60028 copper value
    assert cavity.skin_depth(1e9) == cavity.skin_depth(1e9, SIGMA_CU)


def test_surface_resistance_is_dc_resistance_of_one_skin_depth():
    # R_s = 1/(sigma delta): a conductor sheet one skin depth thick, per square.
    f = np.array([1e9, 3e9, 1e10])
    delta = 1 / np.sqrt(np.pi * f * sc.mu_0 * SIGMA_CU)
    assert_allclose(cavity.surface_resistance(f), 1 / (SIGMA_CU * delta), rtol=1e-14)


def test_skin_effect_nan_and_broadcast():
    for fn in (cavity.skin_depth, cavity.surface_resistance):
        out = fn(np.array([1e9, 0.0, -1e9, np.nan, 1e9]), np.array([SIGMA_CU] * 4 + [0.0]))
        assert np.isfinite(out[0]) and np.isnan(out[1:]).all()
        assert fn(np.array([[1e9], [4e9]]), np.array([1e7, 4e7])).shape == (2, 2)
    # scaling: delta ~ f^-1/2, R_s ~ f^1/2
    assert_allclose(cavity.skin_depth(4e9) / cavity.skin_depth(1e9), 0.5, rtol=1e-15)
    assert_allclose(cavity.surface_resistance(4e9) / cavity.surface_resistance(1e9), 2.0,
                    rtol=1e-15)


# --- TM010 fields, integrated numerically -------------------------------------------------------

def tm010_integrals(a, length, sigma, u0=None):
    """Stored energy W, wall loss P, omega and on-axis gap voltage V for E0 = 1 V/m.

    E_z = J0(k r), H_phi = J1(k r)/eta0, k = p01/a, omega = k c (Jackson Sec. 8.7 form of the
    TM010 mode; from memory).  W = (eps0/4) int |E|^2 dV + (mu0/4) int |H|^2 dV (time average,
    both terms integrated); P = (R_s/2) int |H_t|^2 dA over the side wall and both end plates,
    with R_s = sqrt(omega mu0 / (2 sigma)).  V = |int E_z(0) exp(j omega z/u0) dz| over the gap
    (u0 None: V = E0 L).
    """
    p01 = special.jn_zeros(0, 1)[0]
    k = p01 / a
    w = k * sc.c
    r_s = math.sqrt(w * sc.mu_0 / (2 * sigma))
    opts = {"epsabs": 0, "epsrel": 1e-13, "limit": 200}
    ie, _ = quad(lambda r: special.j0(k * r)**2 * r, 0, a, **opts)
    ih, _ = quad(lambda r: special.j1(k * r)**2 * r, 0, a, **opts)
    vol_e = 2 * np.pi * length * ie
    vol_h = 2 * np.pi * length * ih / ETA0**2
    energy = sc.epsilon_0 / 4 * vol_e + sc.mu_0 / 4 * vol_h
    side = special.j1(k * a)**2 / ETA0**2 * 2 * np.pi * a * length
    ends = 2 * (2 * np.pi * ih / ETA0**2)
    loss = r_s / 2 * (side + ends)
    if u0 is None:
        v = length
    else:
        # oscillatory weight cos(omega z/u0) handled by QUADPACK's QAWO rule
        v, _ = quad(lambda z: 1.0, -length / 2, length / 2, weight="cos", wvar=w / u0,
                    epsabs=0, epsrel=1e-12)
    return energy, loss, w, abs(v)


def test_tm010_electric_and_magnetic_energies_are_equal():
    # Sanity of the field pair used below: at resonance the time-averaged electric and magnetic
    # energies are equal (Poynting theorem for a lossless cavity).
    a = 0.04
    k = special.jn_zeros(0, 1)[0] / a
    ie, _ = quad(lambda r: special.j0(k * r)**2 * r, 0, a, epsabs=0, epsrel=1e-13)
    ih, _ = quad(lambda r: special.j1(k * r)**2 * r, 0, a, epsabs=0, epsrel=1e-13)
    assert_allclose(sc.epsilon_0 * ie, sc.mu_0 * ih / ETA0**2, rtol=1e-12)


@pytest.mark.parametrize("a, length, sigma", [
    (0.040, 0.020, SIGMA_CU), (0.0876, 0.15, SIGMA_CU), (0.012, 0.002, 1.0e7),
    (0.3, 0.3, 3.0e7),
])
def test_pillbox_q_by_integration(a, length, sigma):
    energy, loss, w, _ = tm010_integrals(a, length, sigma)
    assert_allclose(cavity.pillbox_q(a, length, sigma), w * energy / loss, rtol=1e-10)


def test_pillbox_q_closed_form_limits():
    # Derived from the integrals: Q0 = (a/delta)/(1 + a/L).  Long cavity (L >> a): the end
    # plates vanish and Q0 -> a/delta; L = a: half of that.
    a = 0.05
    f = special.jn_zeros(0, 1)[0] * sc.c / (2 * np.pi * a)
    a_over_delta = a * math.sqrt(np.pi * f * sc.mu_0 * SIGMA_CU)
    assert_allclose(cavity.pillbox_q(a, a), a_over_delta / 2, rtol=1e-14)
    assert_allclose(cavity.pillbox_q(a, 1e6 * a), a_over_delta, rtol=2e-6)


def test_pillbox_q_nan_and_broadcast():
    out = cavity.pillbox_q(np.array([0.04, 0.0, 0.04, 0.04, -0.04]),
                           np.array([0.02, 0.02, -0.02, 0.02, 0.02]),
                           np.array([SIGMA_CU, SIGMA_CU, SIGMA_CU, 0.0, SIGMA_CU]))
    assert np.isfinite(out[0]) and np.isnan(out[1:]).all()
    assert cavity.pillbox_q(np.array([[0.03], [0.04]]), np.array([0.01, 0.02, 0.03])).shape == \
        (2, 3)
    # Q0 ~ sqrt(sigma)
    assert_allclose(cavity.pillbox_q(0.04, 0.02, 4 * SIGMA_CU) / cavity.pillbox_q(0.04, 0.02),
                    2.0, rtol=1e-15)


# --- pillbox_r_over_q --------------------------------------------------------------------------

@pytest.mark.parametrize("a, length", [(0.040, 0.020), (0.0876, 0.15), (0.012, 0.002)])
def test_pillbox_r_over_q_geometric_by_integration(a, length):
    # No voltage: V = E0 L (T = 1).  Circuit R/Q = V^2/(2 omega W), accelerator V^2/(omega W).
    energy, _, w, v = tm010_integrals(a, length, SIGMA_CU)
    assert_allclose(cavity.pillbox_r_over_q(a, length), v**2 / (2 * w * energy), rtol=1e-10)
    assert_allclose(cavity.pillbox_r_over_q(a, length, None, "accelerator"),
                    v**2 / (w * energy), rtol=1e-10)


@pytest.mark.parametrize("a, length, v0", [
    (0.040, 0.020, 5e4), (0.040, 0.020, 1e3), (0.0876, 0.15, 5e5), (0.012, 0.002, 2e4),
    (0.02, 0.05, 3e3),  # transit angle beyond 2 pi: T < 0, T^2 > 0
])
def test_pillbox_r_over_q_with_transit_time_by_integration(a, length, v0):
    # With the beam voltage: V = |int E0 exp(j omega z/u0) dz|, u0 relativistic from CODATA:
    # u0 = c sqrt(t(t+2))/(1+t), t = V0/V_rest.
    t = v0 / V_REST
    u0 = sc.c * math.sqrt(t * (t + 2)) / (1 + t)
    energy, _, w, v = tm010_integrals(a, length, SIGMA_CU, u0)
    assert_allclose(cavity.pillbox_r_over_q(a, length, v0), v**2 / (2 * w * energy),
                    rtol=1e-9)
    assert_allclose(cavity.pillbox_r_over_q(a, length, v0, "linac"), v**2 / (w * energy),
                    rtol=1e-9)


def test_pillbox_r_over_q_conventions_differ_by_exactly_two():
    a = np.array([0.03, 0.04, 0.05])
    for v0 in (None, 1e5):
        circ = cavity.pillbox_r_over_q(a, 0.02, v0, "circuit")
        acc = cavity.pillbox_r_over_q(a, 0.02, v0, "accelerator")
        lin = cavity.pillbox_r_over_q(a, 0.02, v0, " LINAC ")
        assert_allclose(acc, 2 * circ, rtol=1e-15)
        assert_allclose(lin, acc, rtol=0)


def test_pillbox_r_over_q_transit_time_limit():
    # Short gap: theta = omega L/u0 -> 0, T = sin(theta/2)/(theta/2) -> 1 - theta^2/24, so
    # R/Q(V0)/R/Q(geometric) = T^2 -> 1 - theta^2/12 (derived).
    a, v0, length = 0.04, 1e5, 1e-5
    t = v0 / V_REST
    u0 = sc.c * math.sqrt(t * (t + 2)) / (1 + t)
    theta = special.jn_zeros(0, 1)[0] * sc.c / a * length / u0
    ratio = cavity.pillbox_r_over_q(a, length, v0) / cavity.pillbox_r_over_q(a, length)
    assert_allclose(ratio, 1 - theta**2 / 12, rtol=1e-12)


def test_pillbox_r_over_q_errors_nan_and_broadcast():
    with pytest.raises(ValueError, match="'circuit' or 'accelerator'"):
        cavity.pillbox_r_over_q(0.04, 0.02, None, "shunt")
    with pytest.raises(ValueError, match="got 2"):
        cavity.pillbox_r_over_q(0.04, 0.02, None, 2)
    out = cavity.pillbox_r_over_q(np.array([0.04, 0.0, 0.04, 0.04]),
                                  np.array([0.02, 0.02, -0.02, 0.02]),
                                  np.array([1e4, 1e4, 1e4, 0.0]))
    assert np.isfinite(out[0]) and np.isnan(out[1:]).all()
    assert np.isnan(cavity.pillbox_r_over_q(-0.04, 0.02))
    grid = cavity.pillbox_r_over_q(np.array([[0.03], [0.04]]), 0.02, np.array([1e4, 1e5, 1e6]))
    assert grid.shape == (2, 3)
    assert isinstance(cavity.pillbox_r_over_q(0.04, 0.02), np.floating)


# --- loaded_q and gap_voltage -------------------------------------------------------------------

def test_loaded_q_values():
    # 1/QL = 1/Q0 + 1/Qext, exact rational cases.
    assert_allclose(cavity.loaded_q(10000.0, 5000.0), 10000.0 / 3.0, rtol=1e-15)
    assert_allclose(cavity.loaded_q(2000.0, 2000.0), 1000.0, rtol=1e-15)  # critical coupling
    assert cavity.loaded_q(3000.0, np.inf) == 3000.0  # idler cavity, no external load
    out = cavity.loaded_q(np.array([[1000.0], [4000.0]]), np.array([250.0, 1000.0]))
    assert_allclose(out, [[200.0, 500.0], [235.29411764705881, 800.0]], rtol=1e-15)
    out = cavity.loaded_q(np.array([0.0, -5.0, 100.0, np.nan]), np.array([1.0, 1.0, 0.0, 1.0]))
    assert np.isnan(out).all()


@settings(max_examples=60, deadline=None)
@given(q0=st.floats(1.0, 1e6), qext=st.floats(1.0, 1e6))
def test_loaded_q_properties(q0, qext):
    ql = cavity.loaded_q(q0, qext)
    assert ql <= min(q0, qext) * (1 + 1e-15)
    assert_allclose(ql, cavity.loaded_q(qext, q0), rtol=1e-15)
    # coupling beta_c = Q0/Qext: QL = Q0/(1 + beta_c)
    assert_allclose(ql, q0 / (1 + q0 / qext), rtol=1e-14)


def test_gap_voltage_from_energy_bookkeeping():
    # Q_L = omega W / P and (circuit) R/Q = V^2/(2 omega W) give V^2 = 2 (R/Q) Q_L P.
    # R/Q = 100 ohm, Q_L = 1000, P = 50 kW: V = sqrt(1e10) = 100 kV exactly.
    assert_allclose(cavity.gap_voltage(5e4, 100.0, 1000.0), 1e5, rtol=1e-15)
    # Same cavity in the accelerator convention: R/Q = 200 ohm, V = sqrt((R/Q) Q_L P), same V.
    assert_allclose(cavity.gap_voltage(5e4, 200.0, 1000.0, "accelerator"), 1e5, rtol=1e-15)
    assert_allclose(cavity.gap_voltage(5e4, 200.0, 1000.0, "Linac"), 1e5, rtol=1e-15)


def test_gap_voltage_critically_coupled_cavity():
    # A cavity (R/Q = 50 ohm circuit, Q0 = Qext = 2000) fed 1 kW at critical coupling takes it
    # all in its walls: P_wall = V^2/(2 (R/Q) Q0) = 1 kW, so V = sqrt(2 * 50 * 2000 * 1000)
    # = 14142.1 V; the loss rate through Q_L = 1000 is then twice the incident power.
    ql = 1000.0
    assert_allclose(cavity.gap_voltage(2 * 1000.0, 50.0, ql), math.sqrt(2e8), rtol=1e-15)


def test_gap_voltage_nan_errors_and_broadcast():
    out = cavity.gap_voltage(np.array([0.0, -1.0, 1.0, 1.0, np.nan]),
                             np.array([10.0, 10.0, 0.0, 10.0, 10.0]),
                             np.array([100.0, 100.0, 100.0, -1.0, 100.0]))
    assert out[0] == 0.0 and np.isnan(out[1:]).all()
    with pytest.raises(ValueError, match="'circuit' or 'accelerator'.*'linac'"):
        cavity.gap_voltage(1.0, 1.0, 1.0, "tube")
    grid = cavity.gap_voltage(np.array([[1e3], [4e3]]), np.array([50.0, 100.0]), 500.0)
    assert grid.shape == (2, 2)
    assert_allclose(grid[1] / grid[0], 2.0, rtol=1e-15)


# --- catalogue ---------------------------------------------------------------------------------

CAVITY_NAMES = ["TUBE_PILLBOX_FREQ", "TUBE_SKIN_DEPTH", "TUBE_SURFACE_RESISTANCE",
                "TUBE_PILLBOX_Q", "TUBE_PILLBOX_R_OVER_Q", "TUBE_LOADED_Q", "TUBE_GAP_VOLTAGE"]


@pytest.mark.parametrize("name", CAVITY_NAMES)
def test_catalogue_entry_matches_python_twin(name):
    fn = CATALOGUE[name]
    assert fn.python_name == name[len("TUBE_"):].lower()
    assert fn.func is getattr(cavity, fn.python_name)
    sig = inspect.signature(fn.func).parameters
    assert list(sig) == [p.name for p in fn.params]
    for p in fn.params:  # worksheet defaults equal the Python defaults
        if not p.required:
            assert sig[p.name].default == p.default


@pytest.mark.parametrize("name", ["TUBE_PILLBOX_R_OVER_Q", "TUBE_GAP_VOLTAGE"])
def test_convention_argument(name):
    fn = CATALOGUE[name]
    conv = fn.params[-1]
    assert conv.name == "convention" and conv.kind == "text" and conv.default == "circuit"
    assert set(conv.choices) == {"circuit", "accelerator", "linac"}
    assert "convention" in fn.help and "accelerator" in fn.help


def test_catalogue_units_and_caution():
    assert CATALOGUE["TUBE_PILLBOX_FREQ"].result_unit == "Hz"
    assert CATALOGUE["TUBE_SKIN_DEPTH"].result_unit == "m"
    assert CATALOGUE["TUBE_SURFACE_RESISTANCE"].result_unit == "ohm"
    assert CATALOGUE["TUBE_PILLBOX_R_OVER_Q"].result_unit == "ohm"
    assert CATALOGUE["TUBE_GAP_VOLTAGE"].result_unit == "V"
    assert CATALOGUE["TUBE_GAP_VOLTAGE"].caution == CAUTION_RF
    for name in ("TUBE_PILLBOX_Q", "TUBE_LOADED_Q"):
        assert CATALOGUE[name].result_unit == ""
    for name in CAVITY_NAMES:
        assert len(CATALOGUE[name].help) <= 255


# --- output-circuit efficiency and coupling factor ----------------------------

def test_circuit_efficiency_and_coupling_beta():
    # Power divides by loss rates 1/Q0 (walls) and 1/Qext (load): the load gets
    # (1/Qext)/(1/Q0 + 1/Qext) = Q0/(Q0 + Qext) (energy balance, Jackson Sec. 8.8).
    # Worked by hand: Q0 = 10000, Qext = 5000 -> eta_c = 2/3, beta_c = 2.
    from tubefuncs.physics.cavity import circuit_efficiency, coupling_beta
    assert circuit_efficiency(10000.0, 5000.0) == pytest.approx(2.0 / 3.0, rel=1e-15)
    assert coupling_beta(10000.0, 5000.0) == pytest.approx(2.0, rel=1e-15)
    # Critical coupling (Qext = Q0) sends half the power to the load.
    assert circuit_efficiency(3000.0, 3000.0) == pytest.approx(0.5, rel=1e-15)
    # A heavily loaded output cavity (Q0 = 5000, Qext = 250): 5000/5250.
    np.testing.assert_allclose(circuit_efficiency(np.array([5000.0, 5000.0]), [250.0, 1e12]),
                               [5000.0 / 5250.0, 5000.0 / (5000.0 + 1e12)], rtol=1e-15)
    assert np.isnan(circuit_efficiency(0.0, 100.0)) and np.isnan(coupling_beta(100.0, -1.0))
