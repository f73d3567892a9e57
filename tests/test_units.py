"""Units layer: text parsing, result conversion, dB levels.

Expected values are unit definitions (SI Brochure, 9th ed., BIPM 2019) worked by
hand, not values computed by the code under test.
"""

import math

import numpy as np
import pytest

from tubefuncs import units


@pytest.mark.parametrize("text, unit, expected", [
    ("80 kV", "V", 80e3),              # SI prefix kilo = 1e3
    ("2.998 GHz", "Hz", 2.998e9),
    ("12 mm", "m", 12e-3),
    ("12 Mm", "m", 12e6),              # case matters: mega, not milli
    ("1.8 uperv", "A/V**1.5", 1.8e-6),  # perv = A/V^1.5 (trade unit), micro prefix
    ("1.8 µperv", "A/V**1.5", 1.8e-6),
    ("350", "V", 350.0),               # a bare number is in the argument's SI unit
    ("-3.5e-2", "m", -0.035),
    ("5 us", "s", 5e-6),
    ("58 MS/m", "S/m", 58e6),
    ("90 deg", "rad", math.pi / 2),    # degree = pi/180 rad
    ("50 %", "", 0.5),
    ("120 L/min", "m**3/s", 120e-3 / 60),
    ("2 cm**2", "m**2", 2e-4),
    ("1 mT", "T", 1e-3),
])
def test_to_si(text, unit, expected):
    assert units.to_si(text, unit) == pytest.approx(expected, rel=1e-12)


def test_power_text_in_dbm_and_dbw():
    # dBm: P = 1 mW * 10^(L/10); dBW: P = 1 W * 10^(L/10) (definition)
    assert units.to_si("30 dBm", "W") == pytest.approx(1.0, rel=1e-12)
    assert units.to_si("60 dBW", "W") == pytest.approx(1e6, rel=1e-12)
    with pytest.raises(units.UnitTextError):
        units.to_si("30 dBm", "V")


def test_gauss_is_read_as_1e_4_tesla():
    # 1 G = 1e-4 T (SI Brochure, 9th ed., Table 9, non-SI units)
    assert units.to_si("1200 G", "T") == pytest.approx(0.12)
    assert units.to_si("1.2 kG", "T") == pytest.approx(0.12)
    assert units.apply_converter(units.result_converter("G", "T"), 0.12) == pytest.approx(1200)


def test_temperature_difference_takes_degc_as_kelvin_steps():
    # a rise of 10 degC is a rise of 10 K (ISO 80000-5: Celsius interval = kelvin)
    assert units.to_si("10 degC", "K", difference=True) == pytest.approx(10.0)
    assert units.to_si("18 degF", "K", difference=True) == pytest.approx(10.0)


@pytest.mark.parametrize("text, unit, fragment", [
    ("3 kv", "V", "unknown unit 'kv'"),
    ("3 A", "V", "not a unit of voltage"),
    ("10 rad/s", "Hz", "angular frequency"),
    ("abc", "m", "write a number and a unit"),
    ("9**9**9 m", "m", "cannot read"),            # would hang pint's evaluator
    ("3 m**999", "m", "cannot read"),
    ("1" * 80 + " m", "m", "too long"),
    ("3 m; import os", "m", "cannot read"),
])
def test_bad_text_is_a_unit_text_error(text, unit, fragment):
    with pytest.raises(units.UnitTextError, match=None) as info:
        units.to_si(text, unit)
    assert fragment in str(info.value)


def test_parse_results_are_cached():
    units.to_si("7.5 kV", "V")
    assert ("7.5 kV", "V", False, None) in units._PARSED
    # errors are cached too: the message comes back without re-parsing
    with pytest.raises(units.UnitTextError):
        units.to_si("7.5 kv", "V")
    assert isinstance(units._PARSED[("7.5 kv", "V", False, None)], str)


def test_result_converter():
    assert units.result_converter("mm", "m") == pytest.approx(1e3)
    assert units.result_converter("deg", "rad") == pytest.approx(180 / math.pi)
    assert units.result_converter("uperv", "A/V**1.5") == pytest.approx(1e6)
    dbm = units.result_converter("dBm", "W")
    assert units.apply_converter(dbm, 1.0) == pytest.approx(30.0)
    with pytest.raises(units.UnitTextError):
        units.result_converter("kg", "m")
    with pytest.raises(units.UnitTextError):
        units.result_converter("rad/s", "Hz")


def test_db_functions():
    # 10 log10 for power, 20 log10 for amplitude (IEC 60027-3 level definitions)
    assert units.watts_to_dbm(1e-3) == pytest.approx(0.0, abs=1e-12)
    assert units.watts_to_dbw(2.0) == pytest.approx(3.0103, abs=1e-4)
    assert units.dbw_to_watts(-3.0103) == pytest.approx(0.5, rel=1e-5)
    assert units.dbm_to_watts(43.0) == pytest.approx(19.9526, rel=1e-5)
    assert units.power_ratio_to_db(100.0) == pytest.approx(20.0)
    assert units.amplitude_ratio_to_db(-10.0) == pytest.approx(20.0)
    assert np.isnan(units.watts_to_dbm(0.0)) and np.isnan(units.watts_to_dbw(-1.0))
    np.testing.assert_allclose(units.watts_to_dbm([1e-3, 1.0]), [0.0, 30.0])


def test_in_unit():
    assert units.in_unit("30 dBm", "W") == pytest.approx(1.0)
    assert units.in_unit("1 kW", "dBm") == pytest.approx(60.0)
    assert units.in_unit("100 degC", "K") == pytest.approx(373.15)   # ITS-90 offset
    assert units.in_unit("25 degC", "degF") == pytest.approx(77.0)
    assert units.in_unit("1 in", "mm") == pytest.approx(25.4)        # exact by definition
    np.testing.assert_allclose(units.in_unit(["1 GHz", "2 GHz"], "MHz"), [1000, 2000])
    with pytest.raises(units.UnitTextError):
        units.in_unit("1 dBm", "m")


def test_unit_text_caches_are_bounded_and_keep_no_long_keys():
    before = len(units._PARSED)
    for i in range(200):
        with pytest.raises(units.UnitTextError, match="too long"):
            units.to_si("x" * 32_000 + str(i), "V")
    assert len(units._PARSED) == before                 # long texts never become keys
    assert all(len(k[0]) <= units.MAX_TEXT for k in units._PARSED)
    for i in range(units.MAX_CACHED + 10):
        units._PARSED[(f"{i} V", "V", False, None)] = float(i)
    units.to_si("7 kV", "V")
    assert len(units._PARSED) <= units.MAX_CACHED
    with pytest.raises(units.UnitTextError, match="too long"):
        units.result_converter("m" * 1000, "m")


@pytest.mark.parametrize("text, unit", [("30 deg", ""), ("5 deg*m", "m"), ("5 mm%", "m"),
                                        ("30 dB", ""), ("1 Np", ""), ("1 V dB", "V")])
def test_angles_levels_and_percents_are_not_plain_ratios_or_factors(text, unit):
    with pytest.raises(units.UnitTextError):
        units.to_si(text, unit)


def test_decimal_comma_hint():
    with pytest.raises(units.UnitTextError, match="decimal point"):
        units.to_si("1,5 mm", "m")
