"""Tests of tubefuncs.physics.beam and the Beam entries of the catalogue.

Expected values come from outside the library: CODATA constants via
scipy.constants, formulas written out here with their derivation, and the
computed check values of the project's physics notes (labelled "[computed]",
not published).  No test uses another library function for its expected value.
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
from scipy.integrate import quad

from tubefuncs.catalogue import CATALOGUE, CAUTION_HV
from tubefuncs.physics import beam

# CODATA (scipy.constants) values used to build expected values in this file.
V_REST = sc.m_e * sc.c**2 / sc.e          # electron rest energy in volts, 510998.95 V
ETA = sc.e / sc.m_e                       # e/m_e


# --- gamma, beta, velocity -------------------------------------------------------------------

# Physics notes, item 1, table [computed: gamma = 1 + V/V_rest, beta = sqrt(1 - 1/gamma^2)],
# printed to 7 significant digits (gamma, beta) and 7 (u0): tolerance half a printed unit.
KINEMATICS_TABLE = [
    # V0 [V], gamma, beta, u0 [m/s]
    (1e3, 1.001957, 0.062470, 1.872790e7),
    (1e4, 1.019570, 0.194986, 5.845521e7),
    (1e5, 1.195695, 0.548221, 1.643525e8),
    (5e5, 1.978476, 0.862862, 2.586795e8),
]


@pytest.mark.parametrize("v0, g, b, u0", KINEMATICS_TABLE)
def test_kinematics_table(v0, g, b, u0):
    assert_allclose(beam.gamma(v0), g, atol=5e-7)
    assert_allclose(beam.beta(v0), b, atol=5e-7)
    assert_allclose(beam.velocity(v0), u0, rtol=5e-7)


def test_kinematics_codata_exact_points():
    # At V0 = m_e c^2/e the kinetic energy equals the rest energy: gamma = 2 exactly,
    # beta = sqrt(3)/2, gamma*beta = sqrt(3) (Jackson Eq. 11.55, E = gamma m c^2).
    assert_allclose(beam.gamma(V_REST), 2.0, rtol=1e-15)
    assert_allclose(beam.beta(V_REST), math.sqrt(3.0) / 2.0, rtol=1e-15)
    assert_allclose(beam.beta_gamma(V_REST), math.sqrt(3.0), rtol=1e-15)
    assert_allclose(beam.velocity(V_REST), sc.c * math.sqrt(3.0) / 2.0, rtol=1e-15)
    # At rest: gamma = 1, beta = 0.
    assert beam.gamma(0.0) == 1.0 and beam.beta(0.0) == 0.0 and beam.velocity(0.0) == 0.0


@pytest.mark.parametrize("v0", [1e-3, 1.0, 10.0, 100.0])
def test_velocity_nonrelativistic_limit(v0):
    # NR limit: u0 = sqrt(2 e V0 / m_e) (1 - 3t/4 + 23t^2/32 + O(t^3)), t = V0/V_rest
    # [series of beta = sqrt(2t) sqrt(1 + t/2)/(1 + t)].  Check the first-order form to
    # t^2 and the bare NR form to (3/4) t.
    t = v0 / V_REST
    u_nr = math.sqrt(2.0 * ETA * v0)
    assert_allclose(beam.velocity(v0), u_nr * (1.0 - 0.75 * t), rtol=t * t + 1e-15)
    assert_allclose(beam.velocity(v0), u_nr, rtol=0.76 * t + 1e-15)
    # gamma*beta = sqrt(2t) sqrt(1 + t/2) = sqrt(2t) (1 + t/4 - t^2/32 + ...)
    assert_allclose(beam.beta_gamma(v0), math.sqrt(2.0 * t) * (1.0 + 0.25 * t),
                    rtol=t * t / 16 + 1e-15)


def test_nr_rule_error_at_100kv():
    # Physics notes, item 1 [computed]: the NR rule 5.93097e5 sqrt(V) is 14.1 % high at 100 kV.
    assert_allclose(5.93097e5 * math.sqrt(1e5) / beam.velocity(1e5) - 1.0, 0.141, atol=5e-4)


def test_kinematics_arrays_and_nan():
    v = np.array([[0.0], [1e3], [-1.0], [np.nan]])
    g = beam.gamma(v)
    assert g.shape == (4, 1)
    assert np.isnan(g[2, 0]) and np.isnan(g[3, 0])
    assert np.isnan(beam.beta(-5.0)) and np.isnan(beam.velocity(-5.0))
    assert np.isnan(beam.beta_gamma(-1e3))
    assert isinstance(beam.gamma(1e3), np.floating)
    assert isinstance(beam.beta_gamma(1e3), np.floating)


# --- perveance, beam current, beam power -----------------------------------------------------

def test_perveance_values():
    # Physics notes, item 1 [computed]: 100 A at 100 kV -> 3.16228e-6 A/V^1.5.
    assert_allclose(beam.perveance(100.0, 1e5), 3.16228e-6, rtol=2e-6)
    # Exact: 8 A at 4 V is 8/4^1.5 = 1 A/V^1.5; 1 A at 10 kV is 1e-6 (1 uperv).
    assert beam.perveance(8.0, 4.0) == 1.0
    assert_allclose(beam.perveance(1.0, 1e4), 1e-6, rtol=1e-15)
    assert beam.perveance(0.0, 1e4) == 0.0


def test_beam_current_values():
    # Exact: K = 1e-6 A/V^1.5 at 10 kV gives (1e4)^1.5 * 1e-6 = 1 A; at 100 kV, 31.6228 A
    # (physics notes item 8 [computed]: uK = 1 at 100 kV -> 31.6228 A).
    assert_allclose(beam.beam_current(1e-6, 1e4), 1.0, rtol=1e-15)
    assert_allclose(beam.beam_current(1e-6, 1e5), 31.6228, rtol=2e-6)
    assert beam.beam_current(2e-6, 0.0) == 0.0


def test_beam_power_values():
    # P = V I; physics notes item 8 [computed]: 100 kV, 31.6228 A -> 3.16228 MW.
    assert_allclose(beam.beam_power(1e5, 31.6228), 3.16228e6, rtol=1e-12)
    assert beam.beam_power(2.0, 3.0) == 6.0


@settings(max_examples=60, deadline=None)
@given(st.floats(1e-9, 1e4), st.floats(1.0, 1e7))
def test_perveance_current_roundtrip(k, v):
    # beam_current inverts perveance: I = K V^1.5 and K = I / V^1.5 (definition).
    i = beam.beam_current(k, v)
    assert_allclose(i, k * v**1.5, rtol=1e-13)
    assert_allclose(beam.perveance(i, v), k, rtol=1e-13)


def test_perveance_power_out_of_domain():
    assert np.isnan(beam.perveance(1.0, 0.0))
    assert np.isnan(beam.perveance(-1.0, 1e4))
    assert np.isnan(beam.perveance(1.0, -1e4))
    assert np.isnan(beam.beam_current(-1e-6, 1e4))
    assert np.isnan(beam.beam_current(1e-6, -1.0))
    assert np.isnan(beam.beam_power(-1.0, 1.0))
    assert np.isnan(beam.beam_power(1.0, -1.0))
    assert np.isnan(beam.beam_power(np.nan, 1.0))


def test_perveance_broadcasting():
    i = np.array([1.0, 2.0, -1.0])
    v = np.array([[1e4], [4e4]])
    k = beam.perveance(i, v)
    assert k.shape == (2, 3)
    assert_allclose(k[:, :2], np.array([[1e-6, 2e-6], [1.25e-7, 2.5e-7]]), rtol=1e-14)
    assert np.all(np.isnan(k[:, 2]))
    p = beam.beam_power(v, i)
    assert p.shape == (2, 3) and np.all(np.isnan(p[:, 2]))
    assert isinstance(beam.perveance(1.0, 1e4), np.floating)


# --- Child-Langmuir ----------------------------------------------------------------------------

CHILD = 4.0 * sc.epsilon_0 / 9.0 * math.sqrt(2.0 * sc.e / sc.m_e)  # (4 eps0/9) sqrt(2e/m)


def test_child_langmuir_constant_and_example():
    # Physics notes item 1 [computed]: the constant is 2.33395e-6 A/V^1.5 and
    # V = 10 kV, d = 1 cm gives J = 2.33395e4 A/m^2 (2.334 A/cm^2).
    assert_allclose(CHILD, 2.33395e-6, rtol=3e-6)
    assert_allclose(beam.child_langmuir(1e4, 1e-2, 1.0), 2.33395e4, rtol=3e-6)
    # 1 cm^2 area -> 2.334 A
    assert_allclose(beam.child_langmuir(1e4, 1e-2, 1e-4), 2.334, rtol=2e-4)
    # Child's law with CODATA constants, written out.
    assert_allclose(beam.child_langmuir(2.5e4, 3e-3, 2e-4), CHILD * 2.5e4**1.5 * 2e-4 / 9e-6,
                    rtol=1e-13)


def test_child_langmuir_vs_nonrelativistic_quadrature():
    # Independent check by integrating the 1-D space-charge-limited diode directly
    # (non-relativistic): with phi(0) = phi'(0) = 0, Poisson eps0 phi'' = J / v(phi),
    # v = sqrt(2 eta phi), gives phi'^2 = (4 J / eps0) sqrt(phi / (2 eta)), so
    # d = int_0^V dphi / phi'.  Solve for J at given V, d by this quadrature.
    v0, d = 5e3, 2e-3
    integral = quad(lambda p: (p / (2.0 * ETA)) ** -0.25, 0.0, v0)[0]  # = int (phi/2eta)^(-1/4)
    j = integral**2 * sc.epsilon_0 / (4.0 * d**2)                   # d = integral / sqrt(4J/eps0)
    assert_allclose(beam.child_langmuir(v0, d, 1.0), j, rtol=1e-8)


def test_child_langmuir_relativistic_deviation_as_documented():
    # The docstring says the NR law is high by about 2 % at 100 kV and 9 % at 500 kV.
    # Relativistic 1-D diode [derived]: phi'^2 = (2 J m c / (e eps0)) sqrt(gamma^2 - 1), so
    # J = (e eps0 V_rest^2 / (2 m c d^2)) [int_1^gamma (g^2 - 1)^(-1/4) dg]^2.
    for v0, excess in ((1e5, 0.02), (5e5, 0.09)):
        g = 1.0 + v0 / V_REST
        integral = quad(lambda gg: (gg * gg - 1.0) ** -0.25, 1.0, g)[0]
        j_rel = sc.e * sc.epsilon_0 * V_REST**2 / (2.0 * sc.m_e * sc.c) * integral**2
        assert_allclose(beam.child_langmuir(v0, 1.0, 1.0) / j_rel - 1.0, excess, atol=0.005)


@settings(max_examples=50, deadline=None)
@given(st.floats(1.0, 1e6), st.floats(1e-4, 1e-1), st.floats(1e-6, 1.0), st.floats(0.1, 10.0))
def test_child_langmuir_scaling(v, d, s, k):
    # V^1.5, 1/d^2 and linear-in-area scaling of the planar law.
    base = beam.child_langmuir(v, d, s)
    assert_allclose(beam.child_langmuir(k * v, d, s), base * k**1.5, rtol=1e-12)
    assert_allclose(beam.child_langmuir(v, k * d, s), base / k**2, rtol=1e-12)
    assert_allclose(beam.child_langmuir(v, d, k * s), base * k, rtol=1e-12)


def test_child_langmuir_domain():
    assert np.isnan(beam.child_langmuir(-1.0, 1e-2, 1.0))
    assert np.isnan(beam.child_langmuir(1e3, 0.0, 1.0))
    assert np.isnan(beam.child_langmuir(1e3, 1e-2, -1.0))
    assert beam.child_langmuir(0.0, 1e-2, 1.0) == 0.0
    out = beam.child_langmuir(np.array([1e3, -1.0]), np.array([[1e-2], [2e-2]]), 1.0)
    assert out.shape == (2, 2) and np.all(np.isnan(out[:, 1]))
    assert_allclose(out[1, 0], out[0, 0] / 4.0, rtol=1e-14)


# --- Brillouin field ---------------------------------------------------------------------------

def test_brillouin_notes_values():
    # Physics notes item 7 [computed, rel 1e-5]: relativistic formula
    # I0 = 1 A, V0 = 10 kV, b = 1 mm -> 0.0828199 T; I0 = 30 A, 100 kV, b = 5 mm -> 0.0499629 T.
    assert_allclose(beam.brillouin_field(1.0, 1e4, 1e-3), 0.0828199, rtol=1e-6)
    assert_allclose(beam.brillouin_field(30.0, 1e5, 5e-3), 0.0499629, rtol=1e-6)


def test_brillouin_nonrelativistic_limit():
    # NR textbook form B = K sqrt(I)/(b V^0.25) with K = sqrt(sqrt(2)/(pi eps0 eta^1.5))
    # = 8.30218e-4 (physics notes item 7 [computed]).  The relativistic formula differs by
    # the factor (gamma u0 / sqrt(2 eta V))^(-1/2) = (1 + t/2)^(-1/4) = 1 - t/8 + 5t^2/128 ...,
    # t = V/V_rest [gamma u0 = c sqrt(t(t+2)) = sqrt(2 eta V) sqrt(1 + t/2)].
    k_nr = math.sqrt(math.sqrt(2.0) / (math.pi * sc.epsilon_0 * ETA**1.5))
    assert_allclose(k_nr, 8.30218e-4, rtol=1e-6)
    for i0, v0, b in ((1.0, 1.0, 1e-3), (5.0, 100.0, 2e-3), (0.1, 1000.0, 5e-4)):
        t = v0 / V_REST
        nr = k_nr * math.sqrt(i0) / (b * v0**0.25)
        assert_allclose(beam.brillouin_field(i0, v0, b), nr * (1.0 - t / 8.0),
                        rtol=0.04 * t * t + 1e-15)


def test_brillouin_radial_force_balance():
    # Independent check: radial force balance of the edge electron in relativistic Brillouin
    # flow (derived).  Larmor rotation omega_L = e B / (2 gamma m) (Busch, zero cathode flux).
    # Forces on the electron at r = b, outward positive:
    #   electric  + e E_r,           E_r = rho b / (2 eps0), rho = I / (pi b^2 u0)
    #   self-magnetic pinch  - e u0 B_theta,  B_theta = mu0 I / (2 pi b)
    #   rotation in B_z      - e omega_L b B
    #   centripetal requirement: net force = - gamma m omega_L^2 b
    for i0, v0, b in ((1.0, 1e4, 1e-3), (30.0, 1e5, 5e-3), (200.0, 5e5, 1e-2)):
        field = beam.brillouin_field(i0, v0, b)
        g = 1.0 + v0 / V_REST
        u0 = sc.c * math.sqrt(1.0 - 1.0 / g**2)
        e_r = i0 / (math.pi * b**2 * u0) * b / (2.0 * sc.epsilon_0)
        b_theta = sc.mu_0 * i0 / (2.0 * math.pi * b)
        w_l = sc.e * field / (2.0 * g * sc.m_e)
        net = sc.e * e_r - sc.e * u0 * b_theta - sc.e * w_l * b * field
        assert_allclose(net, -g * sc.m_e * w_l**2 * b, rtol=1e-9)


def test_brillouin_larmor_equals_plasma_over_root_two():
    # The Brillouin condition omega_L = omega_p/sqrt(2) (NR textbook form), relativistically:
    # omega_L = eta B/(2 gamma) and omega_L^2 = eta rho/(2 eps0 gamma^3) (derived from
    # e E_r / gamma^2 = gamma m omega_L^2 r with E_r = rho r/(2 eps0)).
    i0, v0, b = 1.0, 1e4, 1e-3
    g = 1.0 + v0 / V_REST
    u0 = sc.c * math.sqrt(1.0 - 1.0 / g**2)
    rho = i0 / (math.pi * b**2 * u0)
    w_l = ETA * beam.brillouin_field(i0, v0, b) / (2.0 * g)
    assert_allclose(w_l**2, ETA * rho / (2.0 * sc.epsilon_0 * g**3), rtol=1e-12)


def test_brillouin_domain_and_arrays():
    assert np.isnan(beam.brillouin_field(-1.0, 1e4, 1e-3))
    assert np.isnan(beam.brillouin_field(1.0, 0.0, 1e-3))
    assert np.isnan(beam.brillouin_field(1.0, 1e4, 0.0))
    assert np.isnan(beam.brillouin_field(1.0, np.nan, 1e-3))
    assert beam.brillouin_field(0.0, 1e4, 1e-3) == 0.0
    out = beam.brillouin_field(np.array([1.0, 4.0]), 1e4, np.array([[1e-3], [2e-3]]))
    assert out.shape == (2, 2)
    # B ~ sqrt(I)/b
    assert_allclose(out[0, 1] / out[0, 0], 2.0, rtol=1e-14)
    assert_allclose(out[1, 0] / out[0, 0], 0.5, rtol=1e-14)
    assert isinstance(beam.brillouin_field(1.0, 1e4, 1e-3), np.floating)


# --- catalogue entries -------------------------------------------------------------------------

BEAM_ENTRIES = {
    "TUBE_PERVEANCE": ("current", "voltage"),
    "TUBE_BEAM_CURRENT": ("perveance", "voltage"),
    "TUBE_BEAM_POWER": ("voltage", "current"),
    "TUBE_CHILD_LANGMUIR": ("voltage", "spacing", "area"),
    "TUBE_BRILLOUIN_FIELD": ("current", "voltage", "beam_radius"),
}


@pytest.mark.parametrize("name, params", BEAM_ENTRIES.items())
def test_catalogue_beam_entries(name, params):
    fn = CATALOGUE[name]
    # design.md: twin name is the worksheet name minus TUBE_, lower case, same parameters
    assert fn.python_name == name[len("TUBE_"):].lower()
    assert tuple(p.name for p in fn.params) == params
    assert tuple(inspect.signature(fn.func).parameters) == params
    assert len(fn.help) <= 255 and fn.category == "Beam"
    assert fn.result_unit


def test_catalogue_units_and_cautions():
    assert CATALOGUE["TUBE_PERVEANCE"].result_unit == "A/V**1.5"
    assert "uperv" in CATALOGUE["TUBE_PERVEANCE"].result_units
    for name in ("TUBE_BEAM_POWER", "TUBE_BEAM_CURRENT", "TUBE_CHILD_LANGMUIR"):
        assert CATALOGUE[name].caution == CAUTION_HV
    assert "non-relativistic" in CATALOGUE["TUBE_CHILD_LANGMUIR"].help
