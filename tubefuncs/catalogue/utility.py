"""Catalogue: unit conversion, help and version."""

from __future__ import annotations

from .. import __version__
from ..units import in_unit
from .spec import Function, Param


def help(function_name):  # the twin of TUBE_HELP; shadows the builtin here only
    """One-line help of a catalogue function: signature, what it returns, caution.

    Parameters
    ----------
    function_name : str
        Worksheet name, e.g. "TUBE_TRANSIT_ANGLE" (case-insensitive; the
        "TUBE_" prefix may be left out).
    """
    from . import CATALOGUE

    key = str(function_name).strip().upper()
    fn = CATALOGUE.get(key) or CATALOGUE.get("TUBE_" + key)
    if fn is None:
        raise LookupError(f"no catalogue function named '{function_name}' "
                         f"(try e.g. 'TUBE_TRANSIT_ANGLE')")
    args = ", ".join(p.name if p.required else f"[{p.name}]" for p in fn.worksheet_params)
    unit = f" [{fn.result_unit}]" if fn.result_unit else ""
    caution = f" Caution: {fn.caution}" if fn.caution else ""
    return f"{fn.name}({args}){unit}: {fn.help}{caution}"


def version():
    """Version of tubefuncs, e.g. "tubefuncs 0.1.0"."""
    return f"tubefuncs {__version__}"


FUNCTIONS = [
    Function(
        name="TUBE_IN", func=in_unit,
        params=(Param("quantity", "A number in SI, or text with a number and a unit, e.g. "
                      "'4.5 us', '2 kW', '43 dBm'."),
                Param("unit", "Unit wanted, e.g. 'ns', 'dBm', 'MHz'; omitted: the SI unit "
                      "(a plain number quantity is read in the SI unit of this unit's "
                      "dimension).", kind="text", default=None)),
        result_unit="",
        help="A quantity as a number in the unit wanted (omitted: SI), so that text such as "
             "'4.5 us' can be used in arithmetic; dBm and dBW work for power (plain tested "
             "conversions). A unit of another dimension is #VALUE! naming both units.",
        references=("BIPM, The International System of Units (SI Brochure), 9th ed., 2019.",),
        category="Utilities", extra={"raw_args": ("quantity",)},
    ),
    Function(
        name="TUBE_HELP", func=help,
        params=(Param("function_name", "Worksheet name of a tubefuncs function, e.g. "
                      "'TUBE_TRANSIT_ANGLE'.", kind="text"),),
        result_unit="", returns_text=True,
        help="One-line help of a tubefuncs worksheet function: its arguments and what it "
             "returns.", category="Utilities",
    ),
    Function(
        name="TUBE_VERSION", func=version, params=(), result_unit="", returns_text=True,
        help="Version of the tubefuncs library that computes this workbook.",
        category="Utilities",
    ),
]
