"""Every catalogue name must survive Excel's VBA layer (classic xlwings).

xlwings writes each worksheet function as a VBA ``Function`` whose parameters
carry our parameter names.  One VBA reserved word there and the whole module
fails to compile: every =TUBE_ cell in the workbook shows #NAME?.  These tests
check the whole catalogue (whatever it holds today) before a user meets that.
"""

from __future__ import annotations

import inspect
import keyword

import pytest

from tubefuncs.catalogue import CATALOGUE
from tubefuncs.excel import names

FUNCTIONS = list(CATALOGUE.values())
IDS = [fn.name for fn in FUNCTIONS]


# --- the rules themselves -----------------------------------------------------

@pytest.mark.parametrize("word", [
    # the ones that bite in practice
    "input", "name", "stop", "currency", "date", "string", "integer", "type", "print",
    "open", "close", "error", "end", "get", "put", "let", "set", "long", "double", "single",
    "byte", "boolean", "variant", "object", "decimal", "empty", "null", "nothing", "true",
    "false", "me", "new", "not", "and", "or", "xor", "mod", "like", "is", "to", "step",
    "as", "call", "case", "const", "dim", "do", "loop", "each", "else", "elseif", "exit",
    "for", "next", "function", "sub", "property", "if", "then", "select", "with", "while",
    "wend", "until", "redim", "preserve", "optional", "paramarray", "byval", "byref",
    "private", "public", "static", "global", "friend", "enum", "event", "implements",
    "declare", "lib", "alias", "ptrsafe", "resume", "goto", "gosub", "return", "on",
    "option", "explicit", "compare", "binary", "text", "base", "lock", "unlock", "seek",
    "write", "line", "lset", "rset", "mid", "len", "lbound", "ubound", "array", "erase",
    "debug", "typeof", "addressof", "raiseevent", "withevents", "attribute", "rem",
    "spc", "tab", "eqv", "imp", "any", "longlong", "longptr", "cverr", "cdbl", "cint",
    "clng", "cstr", "cvar", "cdate", "doevents", "fix", "int", "abs", "sgn", "scale",
    "access", "append", "output", "random", "read", "shared", "time",
])
def test_vba_reserved_words_are_refused(word):
    assert word in names.VBA_RESERVED
    assert any("VBA reserved" in p for p in names.identifier_problems(word))
    assert names.identifier_problems(word.upper())  # VBA ignores case


@pytest.mark.parametrize("word", ["application", "range", "array", "err", "xlpy",
                                  "thisworkbook", "activeworkbook", "caller", "failed"])
def test_names_used_inside_the_xlwings_wrapper_are_refused(word):
    assert names.identifier_problems(word)


@pytest.mark.parametrize("ref", ["A1", "a1", "Z99", "AA10", "XFD1048576", "xfd1", "B01",
                                 "Q1", "IV65536"])
def test_a1_references_are_refused(ref):
    assert names.looks_like_a1(ref)
    assert any("A1" in p for p in names.identifier_problems(ref))


@pytest.mark.parametrize("name", ["XFE1", "A1048577", "A0", "q0", "ABCD1", "voltage",
                                  "tunnel_radius", "r_over_q", "qext", "width", "f1_a"])
def test_not_a1_references(name):
    # XFE is column 16385 and row 1048577 is past the grid: not references.
    assert not names.looks_like_a1(name)


@pytest.mark.parametrize("ref", ["R1C1", "r1c1", "RC", "rc", "R", "C", "r", "c", "R12",
                                 "C3", "R2C", "RC10"])
def test_r1c1_references_are_refused(ref):
    assert names.looks_like_r1c1(ref)
    assert names.identifier_problems(ref)


@pytest.mark.parametrize("bad", ["_voltage", "2pi", "beam radius", "beam-radius", "λ",
                                 "x" * 256, "class", "lambda", "match", "case", "type"])
def test_other_bad_identifiers(bad):
    assert names.identifier_problems(bad)


@pytest.mark.parametrize("good", ["voltage", "beam_radius", "tunnel_radius", "frequency",
                                  "q0", "qext", "r_over_q", "gap_length", "width", "height",
                                  "length", "unit", "convention", "conductivity", "value"])
def test_good_names_pass(good):
    assert names.identifier_problems(good) == []


def test_column_numbers():
    assert names.column_number("A") == 1
    assert names.column_number("Z") == 26
    assert names.column_number("AA") == 27
    assert names.column_number("XFD") == names.MAX_COLUMN == 16384


def test_function_rules_catch_duplicates_and_order():
    from tubefuncs.catalogue import Function, Param

    def twin(a, b=1):
        return a

    dup = Function(name="TUBE_DEMO", func=twin, result_unit="",
                   params=(Param("a", "x"), Param("A", "y")), help="demo")
    assert any("twice" in p for p in names.function_problems(dup))
    order = Function(name="TUBE_DEMO", func=twin, result_unit="",
                     params=(Param("a", "x", default=1.0), Param("b", "y")), help="demo")
    assert any("follows an optional" in p for p in names.function_problems(order))
    lower = Function(name="tube_demo", func=twin, result_unit="", params=(), help="demo")
    assert names.function_problems(lower)
    same = Function(name="TUBE_DEMO", func=twin, result_unit="",
                    params=(Param("tube_demo", "x"),), help="demo")
    assert any("own name" in p for p in names.function_problems(same))


# --- the catalogue ------------------------------------------------------------

def test_catalogue_is_not_empty():
    assert FUNCTIONS


def test_whole_catalogue_passes():
    problems = names.catalogue_problems(CATALOGUE)
    assert problems == [], "\n".join(problems)


@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_function_and_parameter_names(fn):
    assert names.function_problems(fn) == []
    for p in fn.worksheet_params:
        assert p.name.lower() not in names.VBA_RESERVED, p.name
        assert not names.looks_like_a1(p.name), p.name
        assert not names.looks_like_r1c1(p.name), p.name
        assert not p.name.startswith("_"), p.name
        assert not keyword.iskeyword(p.name) and not keyword.issoftkeyword(p.name), p.name


def test_no_duplicate_function_names_ignoring_case():
    lowered = [fn.name.lower() for fn in FUNCTIONS]
    assert len(lowered) == len(set(lowered))
    twins = [fn.python_name for fn in FUNCTIONS]
    assert len(twins) == len(set(twins)), "two worksheet functions share a Python twin name"


@pytest.mark.parametrize("fn", FUNCTIONS, ids=IDS)
def test_python_twin_takes_positional_parameters_in_catalogue_order(fn):
    sig = inspect.signature(fn.func)
    kinds = {p.kind for p in sig.parameters.values()}
    assert inspect.Parameter.KEYWORD_ONLY not in kinds, (
        f"{fn.python_name} has keyword-only parameters")
    assert inspect.Parameter.VAR_KEYWORD not in kinds, f"{fn.python_name} takes **kwargs"
    positional = [p.name for p in sig.parameters.values()
                  if p.kind in (p.POSITIONAL_ONLY, p.POSITIONAL_OR_KEYWORD)]
    expected = [p.name for p in fn.params]
    assert positional[: len(expected)] == expected, (
        f"{fn.name}: twin {fn.python_name}{sig} does not start with {expected}")


def test_generated_wrappers_have_no_keyword_only_parameters():
    # xlwings refuses keyword-only parameters and **kwargs at import time.
    from tubefuncs.excel.generate import render

    namespace: dict = {}
    exec(compile(render(), "<generated udfs>", "exec"), namespace)
    for fn in FUNCTIONS:
        sig = inspect.signature(namespace[fn.name])
        assert [p.name for p in sig.parameters.values()] == [p.name for p in fn.worksheet_params]
        for p in sig.parameters.values():
            assert p.kind is p.POSITIONAL_OR_KEYWORD, f"{fn.name}.{p.name}"
