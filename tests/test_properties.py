"""Property tests: every catalogue function, through the worksheet-call layer,
on any Excel-shaped input gives a finite result or the library's input error,
never another exception and never a hang.

``TUBEFUNCS_FUZZ=long pytest -m slow tests/test_properties.py`` runs many more
examples (on demand, not in every CI run).
"""

import math
import os

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.errors import EXCEL_ERROR_VALUES, CellError, TubeInputError
from tubefuncs.units import dimension_name
from tubefuncs.worksheet import evaluate

LONG = os.environ.get("TUBEFUNCS_FUZZ") == "long"
EXAMPLES = 2000 if LONG else 60

numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(min_value=-1e12, max_value=1e12),
    st.floats(min_value=1e-9, max_value=1e9),
    st.integers(min_value=-10**6, max_value=10**6),
    st.sampled_from([0, 0.0, -0.0, 1, 1e-300, 1e300, 5e-324]),
)
unit_words = st.sampled_from(["V", "kV", "MV", "A", "mA", "mm", "m", "GHz", "MHz", "Hz", "W",
                              "kW", "dBm", "dBW", "ohm", "S", "T", "uperv", "K", "degC", "deg",
                              "rad", "us", "MS/m", "L/min", "%", "kv", "furlong", "rad/s",
                              "m**2", "**9**9", "", "(", "Mm"])
texts = st.one_of(
    st.text(max_size=20),
    st.builds(lambda x, u: f"{x:g} {u}", st.floats(allow_nan=False, allow_infinity=False,
                                                   min_value=-1e6, max_value=1e6), unit_words),
    st.sampled_from(["", " ", "circuit", "accelerator", "linac", "water", "TUBE_GAMMA",
                     "1e400 m", "nan", "inf", "-inf", "1,5 mm", "3e-3"]),
)
scalars = st.one_of(numbers, texts, st.none(), st.booleans(),
                    st.sampled_from([CellError(code) for code in EXCEL_ERROR_VALUES[:4]]))


def grids(element):
    square = st.integers(1, 4).flatmap(
        lambda rows: st.integers(1, 4).flatmap(
            lambda cols: st.lists(st.lists(element, min_size=cols, max_size=cols),
                                  min_size=rows, max_size=rows)))
    ragged = st.lists(st.lists(element, min_size=0, max_size=3), min_size=1, max_size=3)
    arrays = st.lists(st.floats(allow_nan=True, allow_infinity=True), min_size=1,
                      max_size=6).map(lambda xs: np.array(xs).reshape(-1, 1))
    return st.one_of(square, ragged, arrays)


def valid_number(param):
    """A plausible valid value for a number parameter (a number or unit text)."""
    lo = param.domain.low if math.isfinite(param.domain.low) else -1e3
    hi = param.domain.high if math.isfinite(param.domain.high) else max(lo, 0) + 1e3
    value = st.floats(min_value=lo, max_value=hi, allow_nan=False, allow_infinity=False)
    if param.domain.integer:
        value = st.integers(int(math.ceil(lo)), int(min(hi, 10)))
    _, example = dimension_name(param.unit)
    return st.one_of(value, st.just(example))


def argument(param):
    if param.kind == "number":
        return st.one_of(valid_number(param), scalars, grids(st.one_of(numbers, texts,
                                                                       st.none())))
    if param.kind == "text":
        return st.one_of(st.sampled_from(param.choices) if param.choices else texts, scalars)
    return st.one_of(grids(st.one_of(numbers, st.none(), texts)), scalars)


def argument_lists(fn):
    params = fn.worksheet_params
    return st.integers(0, len(params) + 1).flatmap(
        lambda n: st.tuples(*[argument(p) for p in params[:n]],
                            *([scalars] if n > len(params) else [])))


def check_outcome(fn, args):
    try:
        out = evaluate(fn.name, args)
    except TubeInputError as exc:
        text = exc.cell_text()
        assert len(text) <= 255
        assert text.startswith(exc.error_value)
        assert exc.error_value in EXCEL_ERROR_VALUES
        assert fn.name in text or exc.error_value in text
        for internal in ("NoneType", "unsupported operand", "positional argument",
                         "object has no attribute", "Traceback"):
            assert internal not in text, "a Python error leaked into the message"
        return
    value = out.value
    if isinstance(value, str):
        assert fn.returns_text
    elif isinstance(value, np.ndarray):
        assert value.ndim == 2 and value.dtype == float
        nan_at = {(int(i), int(j)) for i, j in zip(*np.nonzero(~np.isfinite(value)))}
        assert nan_at == set(out.errors), "each non-finite element has its error"
        for err in out.errors.values():
            assert isinstance(err, TubeInputError) and len(err.cell_text()) <= 255
    else:
        assert isinstance(value, float) and math.isfinite(value)


@pytest.mark.parametrize("fn", CATALOGUE.values(), ids=list(CATALOGUE))
def test_any_input_gives_a_result_or_an_input_error(fn):
    @settings(max_examples=EXAMPLES, deadline=2000, derandomize=not LONG,
              suppress_health_check=list(HealthCheck))
    @given(argument_lists(fn))
    def run(args):
        check_outcome(fn, args)

    run()


@pytest.mark.slow
@pytest.mark.parametrize("fn", CATALOGUE.values(), ids=list(CATALOGUE))
def test_long_fuzz(fn):
    @settings(max_examples=5000, deadline=5000, suppress_health_check=list(HealthCheck))
    @given(argument_lists(fn))
    def run(args):
        check_outcome(fn, args)

    run()


def _scalar_outcome(name, args):
    """(value, None) or (None, error value) of a scalar worksheet call."""
    try:
        return evaluate(name, args).value, None
    except TubeInputError as exc:
        return None, exc.error_value


BROADCASTING = [fn for fn in CATALOGUE.values()
                if not fn.returns_text and any(p.kind == "number" for p in fn.params)
                and all(p.kind != "table" for p in fn.params)]


@pytest.mark.parametrize("fn", BROADCASTING, ids=[fn.name for fn in BROADCASTING])
def test_a_range_gives_what_each_cell_gives_alone(fn):
    # The range path (one vectorised call, bad elements marked) and the scalar
    # path (one call per cell) must agree cell by cell: same number, or the
    # same Excel error value.
    numbers_params = [p for p in fn.params if p.kind == "number"]

    @settings(max_examples=EXAMPLES // 2, deadline=4000, derandomize=not LONG,
              suppress_health_check=list(HealthCheck))
    @given(st.lists(st.tuples(*[st.one_of(valid_number(p), numbers, texts)
                                for p in numbers_params]), min_size=1, max_size=4))
    def run(rows):
        columns = [[[row[k]] for row in rows] for k in range(len(numbers_params))]
        args, k = [], 0
        for p in fn.params:
            if p.kind == "number":
                args.append(columns[k])
                k += 1
            else:
                args.append(None)  # text parameters keep their defaults
        try:
            out = evaluate(fn.name, args)
        except TubeInputError:
            return  # a whole-call error (e.g. a text argument): nothing per cell to compare
        for i, row in enumerate(rows):
            scalar_args, k = [], 0
            for p in fn.params:
                if p.kind == "number":
                    scalar_args.append(row[k])
                    k += 1
                else:
                    scalar_args.append(None)
            value, code = _scalar_outcome(fn.name, scalar_args)
            if code is None:
                assert (i, 0) not in out.errors
                assert out.value[i, 0] == pytest.approx(value, rel=1e-12, abs=0.0) or \
                    (value == 0.0 and out.value[i, 0] == 0.0)
            else:
                assert out.errors[(i, 0)].error_value == code

    run()
