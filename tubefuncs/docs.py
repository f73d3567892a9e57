"""Function reference generated from the catalogue.

``python -m tubefuncs.docs`` rewrites ``tubefuncs/functions.md``; a test fails when
the checked-in file differs from what this module generates.
"""

from __future__ import annotations

import sys
from pathlib import Path

from .catalogue import CATALOGUE
from .catalogue.spec import REQUIRED, Function

DOC_PATH = Path(__file__).resolve().parent / "functions.md"

HEADER = """# tubefuncs function reference

Generated from the catalogue by `python -m tubefuncs.docs`; do not edit by hand.

Every numeric argument takes a number in the SI unit shown, or text holding a
number and a unit (`"80 kV"`, `"2.998 GHz"`, `"12 mm"`). Ranges broadcast. The
optional last argument `unit` converts the result. Bad input gives `#VALUE!`
(wrong type or unit) or `#NUM!` (outside the domain or the model's validity)
with a message naming the argument.

Results are design estimates, not ratings. High voltage, X-rays, RF power and
pressurised cooling water can kill or injure: follow the tube maker's data,
local codes and licensed practice.
"""


def _default_text(value) -> str:
    if value is REQUIRED:
        return "required"
    if value is None:
        return "optional"
    return f"optional, default {value!r}" if isinstance(value, str) else \
        f"optional, default {value:g}"


def function_section(fn: Function) -> str:
    args = ", ".join(p.name if p.required else f"[{p.name}]" for p in fn.worksheet_params)
    lines = [f"### {fn.name}", "", f"`={fn.name}({args})`", "", fn.help, ""]
    lines.append(f"Python: `tubefuncs.{fn.python_name}`. Result unit: "
                 f"{fn.result_unit or ('text' if fn.returns_text else 'dimensionless')}"
                 + (f" (e.g. {', '.join(fn.result_units)})" if fn.result_units else "") + ".")
    lines.append("")
    if fn.worksheet_params:
        lines += ["| argument | unit | | meaning |", "|---|---|---|---|"]
        for p in fn.worksheet_params:
            unit = p.unit if p.kind == "number" else p.kind
            extra = p.help
            if p.choices:
                extra += " One of: " + ", ".join(f"`{c}`" for c in p.choices) + "."
            lines.append(f"| `{p.name}` | {unit or '-'} | {_default_text(p.default)} | "
                         f"{extra} |")
        lines.append("")
    if fn.notes:
        lines += [fn.notes, ""]
    if fn.caution:
        lines += [f"**Caution.** {fn.caution}", ""]
    if fn.references:
        lines.append("References:")
        lines += [f"{i}. {ref}" for i, ref in enumerate(fn.references, 1)]
        lines.append("")
    return "\n".join(lines)


def generate() -> str:
    parts = [HEADER]
    category = None
    for fn in CATALOGUE.values():
        if fn.category != category:
            category = fn.category
            parts.append(f"## {category or 'Other'}\n")
        parts.append(function_section(fn))
    return "\n".join(parts).rstrip() + "\n"


def main(argv=None) -> int:
    DOC_PATH.parent.mkdir(exist_ok=True)
    DOC_PATH.write_text(generate(), encoding="utf-8")
    print(f"wrote {DOC_PATH}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
