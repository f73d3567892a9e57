"""Comparing computed values with expected ones, and the table of differences.

Numbers match when ``|got - expected| <= atol + rtol * |expected|``.  Text,
booleans and error values match exactly (error values are values: ``#NUM!``
expected and ``#NUM!`` computed is a match).  A blank expected value (a cell
the application left empty) matches an empty text.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from . import values as V

DEFAULT_RTOL = 1e-7
DEFAULT_ATOL = 1e-12


@dataclass
class Difference:
    cell: str
    expected: str
    got: str
    rel: str
    message: str
    key: tuple = ()


@dataclass
class Comparison:
    differences: list = field(default_factory=list)
    compared: int = 0
    name_errors: list = field(default_factory=list)     # [(cell, message)]

    @property
    def ok(self) -> bool:
        return not self.differences

    def for_sheet(self, sheet_index: int) -> Comparison:
        return Comparison([d for d in self.differences if d.key and d.key[0] == sheet_index],
                          self.compared,
                          [n for n in self.name_errors if n[2] == sheet_index])


def _same(expected, got, rtol: float, atol: float) -> tuple[bool, str]:
    if isinstance(expected, bool) or isinstance(got, bool):
        return (type(expected) is type(got) and expected == got), ""
    if isinstance(expected, float) and isinstance(got, float):
        diff = abs(got - expected)
        rel = diff / abs(expected) if expected else (0.0 if diff == 0 else math.inf)
        return diff <= atol + rtol * abs(expected), (f"{rel:.2e}" if rel != math.inf else "inf")
    if V.is_error(expected) or V.is_error(got):
        return expected is got, ""
    if expected is V.EMPTY:
        return got == "" or got is V.EMPTY, ""
    if isinstance(expected, str) and isinstance(got, str):
        return expected == got, ""
    return False, ""


def compare(recalc, expected: dict, rtol: float = DEFAULT_RTOL, atol: float = DEFAULT_ATOL,
            missing_is_difference: bool = True) -> Comparison:
    """Differences between ``recalc.values`` and ``expected`` (same keys)."""
    result = Comparison()
    for key in sorted(set(recalc.values) | set(expected)):
        cell = recalc.cell_name(key)
        got = recalc.values.get(key)
        message = recalc.messages.get(key, "")
        if got is None:
            result.differences.append(Difference(cell, V.display(expected[key]), "(no formula)",
                                                 "", "cell has no formula any more", key))
            continue
        if key not in expected:
            if missing_is_difference:
                result.differences.append(Difference(cell, "(none)", V.display(got), "",
                                                     "no expected value for this cell", key))
            continue
        result.compared += 1
        same, rel = _same(expected[key], got, rtol, atol)
        if not same:
            result.differences.append(Difference(cell, V.display(expected[key]), V.display(got),
                                                 rel, message, key))
    result.name_errors = [(recalc.cell_name(k), m, k[0]) for k, m in recalc.name_errors]
    return result


def format_table(differences, limit: int | None = 50) -> str:
    """A fixed-width table: cell, expected, got, relative difference, message."""
    rows = [("cell", "expected", "got", "rel. diff", "message")]
    shown = differences if limit is None else differences[:limit]
    for d in shown:
        rows.append((d.cell, d.expected, d.got, d.rel, d.message))
    widths = [min(max(len(r[i]) for r in rows), 40) for i in range(4)]
    lines = []
    for n, r in enumerate(rows):
        cols = [r[i][:40].ljust(widths[i]) for i in range(4)]
        message = r[4] if len(r[4]) <= 120 else r[4][:117] + "..."
        lines.append("  ".join(cols + [message]).rstrip())
        if n == 0:
            lines.append("  ".join("-" * w for w in widths) + "  -------")
    if limit is not None and len(differences) > limit:
        lines.append(f"... and {len(differences) - limit} more")
    return "\n".join(lines)
