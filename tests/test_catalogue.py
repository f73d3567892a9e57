"""The catalogue is the one source of truth: check its declarations."""

import inspect

import pytest

import tubefuncs
from tubefuncs import docs
from tubefuncs.catalogue import CATALOGUE
from tubefuncs.catalogue.spec import REQUIRED
from tubefuncs.units import ureg

# The first-release list of ../shared/design.md ("Catalogue, first release").
DESIGN_FUNCTIONS = """
TUBE_GAMMA TUBE_BETA TUBE_VELOCITY TUBE_PERVEANCE TUBE_BEAM_CURRENT TUBE_BEAM_POWER
TUBE_PLASMA_FREQ TUBE_REDUCTION_FACTOR TUBE_REDUCED_PLASMA_FREQ TUBE_PLASMA_WAVELENGTH
TUBE_OPTIMUM_DRIFT TUBE_BRILLOUIN_FIELD TUBE_CHILD_LANGMUIR TUBE_TRANSIT_ANGLE
TUBE_GAP_COUPLING TUBE_BEAM_LOADING TUBE_BUNCHING_PARAM TUBE_HARMONIC_CURRENT
TUBE_PILLBOX_FREQ TUBE_SKIN_DEPTH TUBE_SURFACE_RESISTANCE TUBE_PILLBOX_Q
TUBE_PILLBOX_R_OVER_Q TUBE_LOADED_Q TUBE_GAP_VOLTAGE TUBE_SMALL_SIGNAL_GAIN
TUBE_SMALL_SIGNAL_PHASE TUBE_AVERAGE_POWER TUBE_COLLECTOR_POWER TUBE_COOLANT_FLOW
TUBE_WAVEGUIDE_CUTOFF TUBE_WAVEGUIDE_LOSS TUBE_FSPL TUBE_DISH_GAIN TUBE_CN0
TUBE_SALEH_AMPLITUDE TUBE_SALEH_PHASE TUBE_CONVERT TUBE_HELP TUBE_VERSION
""".split()

# Functions whose results size HV, RF power or cooling carry a caution (design.md).
NEED_CAUTION = ["TUBE_BEAM_POWER", "TUBE_GAP_VOLTAGE", "TUBE_AVERAGE_POWER",
                "TUBE_COLLECTOR_POWER", "TUBE_COOLANT_FLOW"]

# Design.md: argument order of the first release (unit appended where it applies).
DESIGN_SIGNATURES = {
    "TUBE_TRANSIT_ANGLE": ["frequency", "length", "voltage"],
    "TUBE_GAP_COUPLING": ["frequency", "gap_length", "voltage", "beam_radius", "tunnel_radius"],
    "TUBE_REDUCTION_FACTOR": ["frequency", "voltage", "beam_radius", "tunnel_radius"],
    "TUBE_BUNCHING_PARAM": ["gap_voltage", "frequency", "drift_length", "voltage", "coupling"],
    "TUBE_PILLBOX_R_OVER_Q": ["radius", "length", "voltage", "convention"],
    "TUBE_GAP_VOLTAGE": ["power", "r_over_q", "q_loaded", "convention"],
    "TUBE_CN0": ["eirp_dbw", "path_loss_db", "g_over_t_dbk", "other_losses_db"],
    "TUBE_SMALL_SIGNAL_GAIN": ["frequency", "voltage", "current", "beam_radius",
                               "tunnel_radius", "cavities"],
    "TUBE_COOLANT_FLOW": ["power", "temperature_rise", "fluid"],
    "TUBE_WAVEGUIDE_LOSS": ["frequency", "width", "height", "length", "conductivity"],
}


def test_every_design_function_is_declared():
    missing = [n for n in DESIGN_FUNCTIONS if n not in CATALOGUE]
    assert not missing


@pytest.mark.parametrize("name, order", DESIGN_SIGNATURES.items())
def test_design_argument_order(name, order):
    # the design's arguments first, in its order; later additions optional and after them
    params = CATALOGUE[name].params
    assert [p.name for p in params][:len(order)] == order
    assert all(not p.required for p in params[len(order):])


@pytest.mark.parametrize("fn", CATALOGUE.values(), ids=list(CATALOGUE))
def test_declaration_is_consistent(fn):
    assert fn.name.startswith("TUBE_") and fn.name == fn.name.upper()
    assert fn.python_name == fn.name[5:].lower(), "Python twin is the snake-case name"
    assert getattr(tubefuncs, fn.python_name) is fn.func
    assert 0 < len(fn.help) <= 255
    # Parameters of the twin match the catalogue: same names, order and defaults.
    signature = inspect.signature(fn.func)
    assert [p.name for p in fn.params] == list(signature.parameters)
    for param in fn.params:
        default = signature.parameters[param.name].default
        if param.default is REQUIRED:
            assert default is inspect.Parameter.empty, param.name
        else:
            assert default == param.default, param.name
        assert 0 < len(param.help) <= 255
        if param.kind == "number":
            ureg.parse_units(param.unit or "dimensionless")
    if fn.result_unit and not fn.returns_text:
        ureg.parse_units(fn.result_unit)
        for alt in fn.result_units:
            if alt not in ("dBm", "dBW"):
                assert ureg.parse_units(alt).dimensionality == \
                    ureg.parse_units(fn.result_unit).dimensionality, alt
    if fn.category != "Utilities":
        assert fn.references, "every physics function names its published source"


@pytest.mark.parametrize("name", NEED_CAUTION)
def test_cautions_where_people_can_get_hurt(name):
    assert "local codes" in CATALOGUE[name].caution


def test_function_reference_is_not_stale():
    # Regenerate with: python -m tubefuncs.docs
    assert docs.DOC_PATH.read_text(encoding="utf-8") == docs.generate()
