"""Worksheet-call layer: Excel-shaped inputs, broadcasting, errors.

The physics values here are the relativistic velocity at 80 kV worked from
CODATA constants (scipy.constants) in the test itself.
"""

import math

import numpy as np
import pytest
from scipy import constants as sc

from tubefuncs.errors import CellError, TubeInputError
from tubefuncs.worksheet import call, evaluate


def u0(volts):
    # beta = sqrt(1 - 1/gamma^2), gamma = 1 + eV/(m c^2) (Jackson, Sec. 11.5)
    g = 1 + sc.e * volts / (sc.m_e * sc.c**2)
    return sc.c * math.sqrt(1 - 1 / g**2)


def test_scalar_number_text_and_unit():
    assert call("TUBE_VELOCITY", 80e3) == pytest.approx(u0(80e3), rel=1e-12)
    assert call("TUBE_VELOCITY", "80 kV") == pytest.approx(u0(80e3), rel=1e-12)
    assert call("tube_velocity", 80_000, "km/s") == pytest.approx(u0(80e3) / 1e3, rel=1e-12)
    assert isinstance(call("TUBE_VELOCITY", 80e3), float)


def test_ranges_broadcast_and_bad_elements_are_nan():
    out = evaluate("TUBE_VELOCITY", [[[1e3], ["10 kV"], [-5.0], [None], ["3 kv"]]])
    assert out.value.shape == (5, 1)
    assert out.value[0, 0] == pytest.approx(u0(1e3), rel=1e-12)
    assert out.value[1, 0] == pytest.approx(u0(1e4), rel=1e-12)
    assert np.isnan(out.value[2:, 0]).all()
    assert set(out.errors) == {(2, 0), (3, 0), (4, 0)}
    assert out.errors[(2, 0)].error_value == "#NUM!"
    assert "voltage must be >= 0 V (got -5 V)" in out.errors[(2, 0)].message
    assert out.errors[(3, 0)].error_value == "#VALUE!"
    assert "unknown unit 'kv'" in out.errors[(4, 0)].message


def test_numpy_and_1d_inputs():
    out = call("TUBE_VELOCITY", np.array([1e3, 1e4]))
    assert out.shape == (1, 2)  # 1-D is a row, as numpy broadcasting reads it
    out = call("TUBE_VELOCITY", np.array([[1e3], [1e4]]), "km/s")
    assert out.shape == (2, 1)
    assert out[1, 0] == pytest.approx(u0(1e4) / 1e3)


@pytest.mark.parametrize("args, code, fragment", [
    ((-1,), "#NUM!", "TUBE_VELOCITY: voltage must be >= 0 V (got -1 V)"),
    ((None,), "#VALUE!", "voltage is required (got an empty cell)"),
    (("",), "#VALUE!", "voltage is required"),
    ((True,), "#VALUE!", "got TRUE"),
    (("3 A",), "#VALUE!", "not a unit of voltage"),
    ((float("nan"),), "#NUM!", "got nan"),
    ((1e3, "kHz"), "#VALUE!", "unit 'kHz'"),
    ((1e3, "m/s", 3), "#VALUE!", "takes at most 2 arguments"),
    ((CellError("#DIV/0!"),), "#DIV/0!", "TUBE_VELOCITY"),
    (([[1, 2], [3]],), "#VALUE!", "ragged"),
])
def test_scalar_errors_name_function_argument_and_value(args, code, fragment):
    with pytest.raises(TubeInputError) as info:
        call("TUBE_VELOCITY", *args)
    assert info.value.error_value == code
    assert fragment in info.value.message
    assert len(info.value.cell_text()) <= 255
    assert info.value.cell_text().startswith(code)


def test_unknown_function_is_name_error():
    with pytest.raises(TubeInputError) as info:
        call("TUBE_NOT_A_FUNCTION", 1)
    assert info.value.error_value == "#NAME?"


def test_error_value_inside_a_range_propagates_per_element():
    out = evaluate("TUBE_VELOCITY", [[[1e3, CellError("#N/A")]]])
    assert out.errors[(0, 1)].error_value == "#N/A"
    assert out.value[0, 0] == pytest.approx(u0(1e3))


def test_mismatched_ranges():
    with pytest.raises(TubeInputError, match="does not match"):
        call("TUBE_BEAM_POWER", [[1, 2, 3]], [[1, 2]])


def test_text_results_and_convert():
    assert call("TUBE_VERSION").startswith("tubefuncs ")
    assert "TUBE_VELOCITY(voltage, [unit])" in call("TUBE_HELP", "tube_velocity")
    # functions that size HV, RF power or cooling repeat their caution (design.md)
    assert "local codes" in call("TUBE_HELP", "TUBE_COOLANT_FLOW")
    assert call("TUBE_IN", "30 dBm", "W") == pytest.approx(1.0)   # 1 mW * 10^3
    with pytest.raises(TubeInputError) as info:
        call("TUBE_HELP", "TUBE_NOPE")
    assert info.value.error_value == "#VALUE!"


def test_checks_use_numpy_arithmetic_on_single_values():
    # Found by the long fuzz: (c/2 / (width*1e-300))**2 overflows a Python float
    # (OverflowError) where numpy gives inf; the cutoff check must simply fail.
    with pytest.raises(TubeInputError, match="below the TE10 cutoff"):
        call("TUBE_WAVEGUIDE_LOSS", 1e-300, 1.0, 1.0, 0.0)
    out = evaluate("TUBE_WAVEGUIDE_LOSS", [1e-300, 1.0, 1.0, [[0.0], [1.0]]])
    assert set(out.errors) == {(0, 0), (1, 0)}


# --- TUBE_IN (figures of the issue; dBm = 10 log10(P / 1 mW), common practice) ----------

def test_tube_in_figures():
    assert call("TUBE_IN", "1 ms") == pytest.approx(0.001)
    assert call("TUBE_IN", "2 kW", "dBm") == pytest.approx(63.0103, abs=5e-5)  # 10 log10(2e6)
    assert call("TUBE_IN", 2000, "dBm") == pytest.approx(63.0103, abs=5e-5)    # a number: SI (W)
    assert call("TUBE_IN", "43 dBm", "W") == pytest.approx(19.95, abs=5e-3)    # 10^4.3 mW
    assert call("TUBE_IN", "4.5 us", "ns") == pytest.approx(4500)
    assert call("TUBE_IN", "20 degC", "K") == pytest.approx(293.15)            # ITS-90 offset
    np.testing.assert_allclose(call("TUBE_IN", [["1 ms", "2 s"]], "ms"), [[1.0, 2000.0]])


@pytest.mark.parametrize("args, words", [
    (("2 kW", "m"), ["'kW'", "'m'", "different dimensions"]),
    (("1 GHz", "rad/s"), ["2 pi"]),            # an angular frequency is not a plain scale
    (("1 Np", "dB"), ["logarithmic"]),          # no plain tested conversion
    (("1,5 mm", "m"), ["decimal point"]),
])
def test_tube_in_refusals(args, words):
    with pytest.raises(TubeInputError) as info:
        call("TUBE_IN", *args)
    assert info.value.error_value == "#VALUE!"
    for word in words:
        assert word in str(info.value)


def test_no_former_conversion_name():
    from tubefuncs.catalogue import lookup

    assert lookup("TUBE_CONVERT") is None


def test_python_api_inputs_are_our_input_errors_or_right_answers():
    from tubefuncs.errors import CellError

    with pytest.raises(TubeInputError, match="401 digits"):
        call("TUBE_GAMMA", 10**400)
    # 0-d arrays in a list are values: gamma = 1 + eV/(m c^2), 5 V (CODATA via scipy)
    from scipy.constants import e, electron_mass, speed_of_light
    expected = 1 + e * 5.0 / (electron_mass * speed_of_light ** 2)
    np.testing.assert_allclose(call("TUBE_GAMMA", [np.array(5.0)]), [[expected]])
    with pytest.raises(TubeInputError, match="logarithmic"):
        call("TUBE_GAMMA", "1 V dB")
    with pytest.raises(TubeInputError, match="not an error value"):
        call("TUBE_GAMMA", CellError("#BOGUS"))
    with pytest.raises(TubeInputError, match="masked"):
        call("TUBE_GAMMA", np.ma.array([5.0, 6.0], mask=[False, True]))
    with pytest.raises(TubeInputError) as info:
        call("TUBE_SMALL_SIGNAL_GAIN", "3 GHz", "90 kV", "27 A", "4 mm", "6 mm", [[1, 2, 3]],
             "circuit", 5)
    assert info.value.error_value == "#VALUE!"


def test_db_valued_arguments_read_db_text_as_the_number():
    # EIRP [dBW] = 10 log10(P/1 W) + G - L (common practice): 1 kW, 30 dBi -> 60 dBW
    assert call("TUBE_EIRP", "1 kW", "30 dB") == pytest.approx(60.0)
    assert call("TUBE_EIRP", "1 kW", "30 dBi", "3 dB") == pytest.approx(57.0)
    # G/T = G - 10 log10(T): 40 dB, 100 K -> 20 dB/K
    assert call("TUBE_G_OVER_T", "40 dB", 100) == pytest.approx(20.0)
    with pytest.raises(TubeInputError, match="dBm"):
        call("TUBE_EIRP", "1 kW", "30 dBm")        # a power level where a ratio is meant


@pytest.mark.parametrize("text", ["30 deg", "30 dB", "5 mm%"])
def test_a_ratio_is_not_an_angle_a_level_or_a_percent_of_a_length(text):
    with pytest.raises(TubeInputError):
        call("TUBE_LOADED_Q", text, 1000)


def test_lost_quote_in_lookup_messages():
    with pytest.raises(TubeInputError) as info:
        call("TUBE_HELP", "TUBE_NOPE")
    text = str(info.value)
    assert text.count("'") % 2 == 0, text


def test_catalogue_broadcast_is_bounded_before_it_is_computed():
    with pytest.raises(TubeInputError, match="over the limit") as info:
        call("TUBE_BEAM_POWER", np.ones((10_000, 1)), np.ones((1, 10_000)))
    assert info.value.error_value == "#NUM!"
