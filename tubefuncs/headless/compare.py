"""Comparing computed values with expected ones, and the table of differences.

Numbers match when ``|got - expected| <= atol + rtol * |expected|``.  Text,
booleans and error values match exactly (error values are values: ``#NUM!``
expected and ``#NUM!`` computed is a match).  A blank expected value (a cell
the application left empty) matches an empty text.

A ``#NAME?`` computed anywhere fails the comparison even when the expected
value is ``#NAME?`` too (a snapshot taken of a misspelt function must not
vouch for it), unless its cell, its function or its defined name is
accepted (``accept_names``: ``Budget!B7``, ``B7``, ``INDIRECT``, ``Rate``).

The text an Excel front end of ours leaves in a cell for an error
(``#NUM! TUBE_...: message``, as classic xlwings functions cannot return an
error value) is that error value: a workbook saved by Excel with one of our
errors cached in it matches the headless engine's real error value.
"""

from __future__ import annotations

import math
import re
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
    name_errors: list = field(default_factory=list)     # [(cell, message, sheet index)]
    accepted_names: list = field(default_factory=list)  # the same, accepted by the caller

    @property
    def ok(self) -> bool:
        return not self.differences and not self.name_errors

    def for_sheet(self, sheet_index: int) -> Comparison:
        return Comparison([d for d in self.differences if d.key and d.key[0] == sheet_index],
                          self.compared,
                          [n for n in self.name_errors if n[2] == sheet_index],
                          [n for n in self.accepted_names if n[2] == sheet_index])


#: Our Excel front end's text for an error: "#NUM! TUBE_NAME: message".
_FRONT_END_ERROR = re.compile(r"^(#[A-Z0-9/]+[!?A]?) (TUBE_[A-Z0-9_]+\b.*)$", re.DOTALL)


def front_end_error(value):
    """The error value that a cached text of our Excel front end stands for
    (``"#NUM! TUBE_X: ..."`` -> ``#NUM!``), else None."""
    if not isinstance(value, str) or not value.startswith("#"):
        return None
    m = _FRONT_END_ERROR.match(value)
    if m is None or m.group(1).upper() not in V.ERRORS:
        return None
    return V.error(m.group(1))


_SUBJECT = (re.compile(r"^([A-Za-z0-9_.\\]+) is (?:an Excel function|not a tubefuncs function)"),
            re.compile(r"^unknown function ([A-Za-z0-9_.\\]+)"),
            re.compile(r"^undefined name ([A-Za-z0-9_.\\?]+)"),
            re.compile(r"^name ([A-Za-z0-9_.\\?]+) refers to itself"))


def name_error_subject(message: str) -> str:
    """The function or defined name a #NAME? message is about ('' if none)."""
    for pattern in _SUBJECT:
        m = pattern.match(message)
        if m:
            return m.group(1).upper()
    return ""


def _accepted(cell: str, message: str, accept) -> bool:
    if not accept:
        return False
    subject = name_error_subject(message)
    bare_cell = cell.rpartition("!")[2].replace("$", "").upper()
    for item in accept:
        want = item.strip().replace("$", "").upper()
        if want and (want == cell.replace("$", "").upper() or want == bare_cell
                     or want == subject):
            return True
    return False


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
            missing_is_difference: bool = True, accept_names=()) -> Comparison:
    """Differences between ``recalc.values`` and ``expected`` (same keys), and
    the ``#NAME?`` places not in ``accept_names``."""
    check_tolerances(rtol, atol)
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
        wanted = expected[key]
        as_error = front_end_error(wanted)
        if as_error is not None:
            wanted = as_error
        same, rel = _same(wanted, got, rtol, atol)
        if not same:
            result.differences.append(Difference(cell, V.display(expected[key]), V.display(got),
                                                 rel, message, key))
    for k, m in recalc.name_errors:
        cell = recalc.cell_name(k)
        target = result.accepted_names if _accepted(cell, m, accept_names) else result.name_errors
        target.append((cell, m, k[0]))
    return result


def check_tolerances(rtol, atol) -> None:
    """Refuse a negative or non-finite tolerance (ValueError naming it)."""
    for name, value in (("rtol", rtol), ("atol", atol)):
        if not (isinstance(value, (int, float)) and math.isfinite(value) and value >= 0):
            raise ValueError(f"{name} must be a finite number >= 0 (got {value!r})")


def format_table(differences, limit: int | None = 50,
                 show_all: str = "--max-rows 0 shows them all") -> str:
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
        lines.append(f"... and {len(differences) - limit} more ({show_all})")
    return "\n".join(lines)
