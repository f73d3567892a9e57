"""Write the xlwings UDF module from the catalogue.

    python -m tubefuncs.excel.generate           # rewrite tubefuncs/excel/udfs.py
    python -m tubefuncs.excel.generate --check   # exit 1 when the file is stale

Each catalogue function becomes one thin xlwings function: the worksheet name,
the parameter names, a per-argument help and the one-line function help that
Excel's function wizard shows (each at most 255 characters, Excel's limit for
``Application.MacroOptions``), optional arguments defaulting to ``None``, and
every argument declared ``ndim=2`` with Excel errors passed as text.  The body
only calls :func:`tubefuncs.excel.adapter.call`.

This module does not import xlwings; only the generated module does.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..catalogue import CATALOGUE
from .names import catalogue_problems

UDF_MODULE = "tubefuncs.excel.udfs"
UDF_PATH = Path(__file__).with_name("udfs.py")
CATEGORY = "tubefuncs"
REGENERATE = "python -m tubefuncs.excel.generate"
MAX_HELP = 255  # Excel: function description and each argument description

SHORT_CAUTION = " Caution: design estimate, not a rating (see TUBE_HELP / docs)."


def _clip(text: str, limit: int = MAX_HELP) -> str:
    text = " ".join(text.split())
    if len(text) <= limit:
        return text
    cut = text[: limit - 3]
    if " " in cut[limit // 2:]:
        cut = cut[: cut.rfind(" ")]
    return cut.rstrip(" ,;:.") + "..."


def _fmt_default(value, unit: str) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, (int, float)):
        text = f"{value:g}"
        return f"{text} {unit}" if unit else text
    if isinstance(value, str):
        return f'"{value}"'
    return str(value)


def argument_help(fn, param) -> str:
    """Text of one argument in Excel's function wizard (<= 255 characters)."""
    parts = [param.help.strip()]
    spreads = " A range gives a range." if fn.result_kind == "broadcast" else ""
    if param.kind == "number":
        if param.unit:
            parts.append(f"Number in {param.unit}, or text with a unit.{spreads}")
        else:
            parts.append(f"Number.{spreads}")
    elif param.kind == "table":
        parts.append("Used whole, not cell by cell.")
    if param.choices:
        parts.append("One of: " + ", ".join(f'"{c}"' for c in param.choices) + ".")
    if not param.required:
        if param.default is None or "default" in param.help.lower():
            parts.append("Optional.")
        else:
            parts.append(f"Optional, default {_fmt_default(param.default, param.unit)}.")
    if param.name == "unit" and fn.result_units:
        parts.append("E.g. " + ", ".join(f'"{u}"' for u in fn.result_units[:3]) + ".")
    # Drop trailing extras that do not fit rather than cut the help itself.
    text = parts[0]
    for extra in parts[1:]:
        if len(text) + 1 + len(extra) <= MAX_HELP:
            text = f"{text} {extra}"
    return _clip(text)


def function_help(fn) -> str:
    """Function description in Excel's function wizard (<= 255 characters)."""
    text = " ".join(fn.help.split())
    if fn.caution and len(text) + len(SHORT_CAUTION) <= MAX_HELP:
        text += SHORT_CAUTION
    return _clip(text)


def _py_str(text: str) -> str:
    return repr(text)


def _render_function(fn) -> str:
    params = fn.worksheet_params
    lines = [f'@xw.func(category="{CATEGORY}")']
    for p in params:
        lines.append(f'@xw.arg("{p.name}", ndim=2, err_to_str=True,')
        lines.append(f"        doc={_py_str(argument_help(fn, p))})")
    sig = ", ".join(p.name if p.required else f"{p.name}=None" for p in params)
    lines.append(f"def {fn.name}({sig}):")
    lines.append(f"    {_py_str(function_help(fn))}")
    names = [p.name for p in params]
    args_tuple = f"({names[0]},)" if len(names) == 1 else "(" + ", ".join(names) + ")"
    lines.append(f'    return _call("{fn.name}", {args_tuple})')
    return "\n".join(lines)


HEADER = '''\
"""Excel worksheet functions of tubefuncs, as classic xlwings user-defined functions.

GENERATED FILE: do not edit.  Regenerate after any catalogue change with

    {regenerate}

then click Import Functions on Excel's xlwings tab (see addin/README.md).
{count} functions, generated from tubefuncs.catalogue.  This is the only module
of tubefuncs that imports xlwings.  Every argument is declared ndim=2 (a cell
arrives as [[x]], a column keeps its orientation) with err_to_str=True (an
error cell arrives as its text, e.g. "#DIV/0!", never as a number); optional
arguments default to None.  The bodies only call tubefuncs.excel.adapter.call.
"""

# ruff: noqa: E501  (help texts are long lines)

import xlwings as xw

from tubefuncs.excel.adapter import call as _call

__all__ = [
{names}
]
'''


def render(catalogue=None) -> str:
    """Source text of the UDF module for ``catalogue`` (default: the catalogue)."""
    catalogue = CATALOGUE if catalogue is None else catalogue
    problems = catalogue_problems(catalogue)
    if problems:
        raise ValueError("catalogue names would break Excel's VBA import:\n  "
                         + "\n  ".join(problems))
    names = "\n".join(f'    "{name}",' for name in sorted(catalogue))
    out = [HEADER.format(regenerate=REGENERATE, count=len(catalogue), names=names)]
    for fn in catalogue.values():
        out.append("\n\n" + _render_function(fn) + "\n")
    return "".join(out)


def is_current(path: Path = UDF_PATH) -> bool:
    return path.is_file() and path.read_text(encoding="utf-8") == render()


def write(path: Path = UDF_PATH) -> bool:
    """Write the module; return True when the file changed."""
    text = render()
    if path.is_file() and path.read_text(encoding="utf-8") == text:
        return False
    path.write_text(text, encoding="utf-8", newline="\n")
    return True


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m tubefuncs.excel.generate",
        description="Write the xlwings UDF module (tubefuncs/excel/udfs.py) from the catalogue.")
    parser.add_argument("--check", action="store_true",
                        help="do not write; exit 1 when the checked-in module is stale")
    parser.add_argument("--output", type=Path, default=UDF_PATH,
                        help="where to write (default: the package's udfs.py)")
    args = parser.parse_args(argv)
    if args.check:
        if is_current(args.output):
            print(f"{args.output}: up to date ({len(CATALOGUE)} functions)")
            return 0
        print(f"{args.output}: stale; run: {REGENERATE}", file=sys.stderr)
        return 1
    changed = write(args.output)
    print(f"{args.output}: {'written' if changed else 'unchanged'} ({len(CATALOGUE)} functions)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
