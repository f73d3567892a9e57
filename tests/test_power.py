"""Tests of the power budget: average power, collector power, coolant flow.

Expected values come from outside the library: energy bookkeeping written out
by hand (each derivation in a comment) and water properties from the iapws
package (IAPWS-95, W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 31, 387,
2002), a test-only dependency.
"""

from __future__ import annotations

import math
from pathlib import Path

import iapws
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.physics import water
from tubefuncs.physics.power import average_power, collector_power, coolant_flow

ATM_MPA = 0.101325  # standard atmosphere, the pressure of the water table [MPa]

finite_power = st.floats(min_value=0.0, max_value=1e9)


def iapws_water(celsius):
    """Density [kg/m^3] and c_p [J/(kg K)] of water at 1 atm from the iapws package."""
    state = iapws.IAPWS95(T=273.15 + celsius, P=ATM_MPA)
    return state.rho, state.cp * 1e3  # iapws gives c_p in kJ/(kg K)


# ---------------------------------------------------------------- average power

def test_average_power_radar_example():
    # Hand arithmetic (common practice, P_avg = P_peak * tau * PRF): a 50 MW
    # klystron with 3.5 us pulses at 100 Hz has duty 3.5e-4 and averages 17.5 kW.
    assert_allclose(average_power(50e6, 3.5e-6, 100.0), 17.5e3, rtol=1e-12)


def test_average_power_cw_limit():
    # Duty cycle 1 (1 ms pulses at 1 kHz) is CW: the average equals the peak.
    assert_allclose(average_power(2.5e5, 1e-3, 1e3), 2.5e5, rtol=1e-12)


def test_average_power_zero_edges():
    assert average_power(0.0, 3e-6, 50.0) == 0.0
    assert average_power(10e6, 0.0, 50.0) == 0.0
    assert average_power(10e6, 3e-6, 0.0) == 0.0


def test_average_power_returns_numpy_scalar_for_scalars():
    out = average_power(1e6, 1e-6, 100.0)
    assert isinstance(out, np.floating) and np.ndim(out) == 0


def test_average_power_broadcasts_column_against_row():
    prf = np.array([[50.0], [100.0], [200.0]])
    tau = np.array([1e-6, 2e-6])
    out = average_power(30e6, tau, prf)
    assert out.shape == (3, 2)
    # 30 MW * 2 us * 200 Hz = 12 kW (hand arithmetic)
    assert_allclose(out[2, 1], 12e3, rtol=1e-12)
    assert_allclose(out, 30e6 * tau * prf, rtol=1e-12)


@pytest.mark.parametrize("args", [
    (1e6, 2e-3, 1e3),        # duty 2 > 1
    (-1e6, 1e-6, 100.0),     # negative peak power
    (1e6, -1e-6, 100.0),     # negative pulse width
    (1e6, 1e-6, -100.0),     # negative prf
    (1e6, -1e-6, -100.0),    # both negative: positive product, still invalid
    (np.nan, 1e-6, 100.0),
])
def test_average_power_out_of_domain_is_nan(args):
    assert np.isnan(average_power(*args))


def test_average_power_array_marks_only_bad_elements():
    out = average_power(np.array([1e6, 1e6, -1.0, 1e6]), np.array([1e-6, 2e-3, 1e-6, np.nan]),
                        1e3)
    assert_allclose(out[0], 1e3, rtol=1e-12)
    assert np.isnan(out[1:]).all()


def test_average_power_does_not_modify_inputs():
    tau = np.array([1e-6, 2e-6])
    prf = np.array([100.0, 100.0])
    average_power(np.array([1e6, 1e6]), tau, prf)
    assert_allclose(tau, [1e-6, 2e-6], rtol=0)
    assert_allclose(prf, [100.0, 100.0], rtol=0)


@given(peak=finite_power, duty=st.floats(min_value=0.0, max_value=1.0))
def test_average_power_never_exceeds_peak(peak, duty):
    # Energy: the average of a pulse train with duty D <= 1 cannot exceed its peak.
    out = average_power(peak, duty, 1.0)
    assert 0.0 <= out <= peak * (1 + 1e-15)


# --------------------------------------------------------------- collector power

def test_collector_power_saturated_tube():
    # Energy balance P_coll = P_beam - P_out (drive and wall losses neglected):
    # 100 kV, 31.6228 A beam = 3.16228 MW; 70 % efficiency -> 2.213596 MW out;
    # the collector takes the remaining 30 %.
    p_beam = 100e3 * 100.0 / math.sqrt(10.0)
    p_out = 0.70 * p_beam
    assert_allclose(collector_power(p_beam, p_out), 0.30 * p_beam, rtol=1e-12)


def test_collector_power_no_drive_takes_full_beam_power():
    # With no RF output all the beam power ends on the collector (energy conservation).
    assert collector_power(3.16e6, 0.0) == 3.16e6


def test_collector_power_with_body_loss():
    # 1.2 MW beam, 650 kW out, 30 kW body interception -> 520 kW (hand arithmetic).
    assert_allclose(collector_power(1.2e6, 650e3, 30e3), 520e3, rtol=1e-12)


def test_collector_power_edge_everything_converted():
    assert collector_power(1e6, 0.8e6, 0.2e6) == 0.0


@pytest.mark.parametrize("args", [
    (1e6, 1.1e6, 0.0),      # more RF out than beam in
    (1e6, 0.9e6, 0.2e6),    # rf + body > beam
    (1e6, -1e5, 0.0),
    (1e6, 1e5, -1e3),
    (-1e6, 0.0, 0.0),
    (1e6, np.nan, 0.0),
])
def test_collector_power_out_of_domain_is_nan(args):
    assert np.isnan(collector_power(*args))


def test_collector_power_array():
    out = collector_power(np.array([2e6, 2e6, 2e6]), np.array([0.0, 1e6, 3e6]))
    assert_allclose(out[:2], [2e6, 1e6], rtol=1e-12)
    assert np.isnan(out[2])


@given(beam=finite_power, f_rf=st.floats(0, 1), f_body=st.floats(0, 1))
def test_collector_power_closes_energy_balance(beam, f_rf, f_body):
    rf = beam * f_rf
    body = (beam - rf) * f_body
    pc = collector_power(beam, rf, body)
    assert pc >= 0 or np.isnan(pc)
    if not np.isnan(pc):
        assert_allclose(pc + rf + body, beam, rtol=1e-12, atol=1e-6)


# ------------------------------------------------------------------- water table

@pytest.mark.parametrize("celsius", sorted(water.WATER_TABLE))
def test_water_table_matches_iapws95(celsius):
    rho, cp = water.WATER_TABLE[celsius]
    rho_ref, cp_ref = iapws_water(celsius)
    # The table is rounded to 1e-4 kg/m^3 and 0.01 J/(kg K): half a unit of that.
    assert abs(rho - rho_ref) <= 0.5e-4 + 1e-9
    assert abs(cp - cp_ref) <= 0.5e-2 + 1e-9


def test_water_table_pressure_is_one_atmosphere():
    assert water.PRESSURE == pytest.approx(ATM_MPA * 1e6, rel=1e-15)


def test_fluid_choices_cover_table_and_default():
    assert water.FLUID_CHOICES[0] == "water"
    assert set(water.FLUID_CHOICES[1:]) == {f"water {t}C" for t in water.WATER_TABLE}
    assert water.fluid_properties("water") == water.WATER_TABLE[25]


@pytest.mark.parametrize("text", ["WATER 40C", "  water   40c ", "Water 40 C"])
def test_fluid_names_ignore_case_and_blanks(text):
    assert water.fluid_properties(text) == water.WATER_TABLE[40]


@pytest.mark.parametrize("text", ["glycol", "water 45C", "", "water 40 K"])
def test_unknown_fluid_raises(text):
    with pytest.raises(ValueError, match="unknown fluid"):
        water.fluid_properties(text)
    with pytest.raises(ValueError, match="water 40C"):
        coolant_flow(1e3, 10.0, text)


def test_water_module_does_not_import_iapws():
    # iapws is a test-only dependency: the library must run without it.
    root = Path(__file__).resolve().parents[1] / "tubefuncs"
    for path in root.rglob("*.py"):
        assert "import iapws" not in path.read_text(encoding="utf-8"), path


# ------------------------------------------------------------------- coolant flow

def test_coolant_flow_100kw_10k_against_iapws():
    # Heat balance V = P / (rho c_p dT), water at 25 degC from IAPWS-95 (iapws).
    rho, cp = iapws_water(25.0)
    expected = 100e3 / (rho * cp * 10.0)
    out = coolant_flow(100e3, 10.0)
    # table rounding: <= 1.2e-6 relative in c_p, 5e-8 in rho
    assert_allclose(out, expected, rtol=2e-6)
    # In the trade's unit: about 143.92 L/min (1 m^3/s = 60000 L/min).
    assert_allclose(out * 60e3, 143.92, rtol=1e-4)


@pytest.mark.parametrize("celsius", sorted(water.WATER_TABLE))
def test_coolant_flow_each_named_water_against_iapws(celsius):
    rho, cp = iapws_water(celsius)
    power = np.array([5e3, 250e3, 1.5e6])
    rise = np.array([4.0, 10.0, 15.0])
    assert_allclose(coolant_flow(power, rise, f"water {celsius}C"),
                    power / (rho * cp * rise), rtol=2e-6)


def test_coolant_flow_no_drive_collector_case():
    # A 3.16 MW beam with no drive dumps 3.16 MW in the collector; at dT = 10 K
    # the flow is rho c_p dT times smaller (iapws, 25 degC).
    rho, cp = iapws_water(25.0)
    assert_allclose(coolant_flow(3.16e6, 10.0), 3.16e6 / (rho * cp * 10.0), rtol=2e-6)


def test_coolant_flow_zero_power_is_zero_flow():
    assert coolant_flow(0.0, 10.0) == 0.0


@pytest.mark.parametrize("args", [(1e3, 0.0), (1e3, -5.0), (-1e3, 10.0), (np.nan, 10.0),
                                  (1e3, np.nan)])
def test_coolant_flow_out_of_domain_is_nan(args):
    assert np.isnan(coolant_flow(*args))


def test_coolant_flow_array_marks_only_bad_elements():
    out = coolant_flow(np.array([1e4, 1e4, -1.0]), np.array([10.0, 0.0, 10.0]))
    assert np.isfinite(out[0]) and np.isnan(out[1:]).all()


@given(power=st.floats(1.0, 1e8), rise=st.floats(0.5, 60.0), k=st.floats(0.1, 10.0))
def test_coolant_flow_scales_as_power_over_rise(power, rise, k):
    # V is proportional to P and inversely proportional to dT (heat balance).
    base = coolant_flow(power, rise)
    assert_allclose(coolant_flow(k * power, rise), k * base, rtol=1e-12)
    assert_allclose(coolant_flow(power, k * rise), base / k, rtol=1e-12)


# ------------------------------------------------------------------- catalogue

NAMES = ("TUBE_AVERAGE_POWER", "TUBE_COLLECTOR_POWER", "TUBE_COOLANT_FLOW",
         "TUBE_WAVEGUIDE_CUTOFF", "TUBE_WAVEGUIDE_LOSS")


def test_catalogue_cautions_on_sizing_functions():
    for name in ("TUBE_AVERAGE_POWER", "TUBE_COLLECTOR_POWER", "TUBE_COOLANT_FLOW"):
        assert CATALOGUE[name].caution


def test_catalogue_collector_help_warns_about_no_drive():
    assert "no RF drive" in CATALOGUE["TUBE_COLLECTOR_POWER"].help
    assert "no RF drive" in collector_power.__doc__


def test_catalogue_coolant_flow_fluid_and_temperature_rise():
    fn = CATALOGUE["TUBE_COOLANT_FLOW"]
    fluid = fn.params[2]
    assert fluid.kind == "text" and fluid.default == "water"
    assert fluid.choices == water.FLUID_CHOICES
    assert fn.params[1].difference
    assert "L/min" in fn.result_units


def test_catalogue_checks_cross_arguments():
    duty = CATALOGUE["TUBE_AVERAGE_POWER"].checks[0]
    assert list(duty.test(np.array([1e-6, 2e-3]), np.array([100.0, 1e3]))) == [True, False]
    coll = CATALOGUE["TUBE_COLLECTOR_POWER"].checks[0]
    assert list(coll.test(np.array([1.0, 1.0]), np.array([0.5, 0.9]),
                          np.array([0.5, 0.2]))) == [True, False]
