"""Implicit intersection: which arguments see a whole range, which one cell.

One table, used by both engines (the general compiler in :mod:`.formula`
and the vector compiler in :mod:`.vector.program`), so the answer never
depends on which path ran.

Excel classifies every operand position (the operand classes of the file
format's formula grammar, [MS-XLS] 2.2.2 "Formulas", and Excel's help on
implicit intersection and on array formulas):

``V`` value
    One value is expected: operators, the arguments of ``SQRT``, ``ROUND``,
    ``IF``'s condition, the criteria of ``SUMIF``...  In a plain (non-array)
    formula a *reference* given here is intersected with the formula's own
    row or column (``=A3:A7*2`` in row 5 is ``=A5*2``; in row 50 it is
    ``#VALUE!``).  A 2-D range gives the cell in the formula's row *and*
    column; a range of another sheet is intersected by row and column
    numbers all the same.  Arrays that are values (``{1,2,3}``, a function's
    array result) are not references and are not intersected.
``R`` reference
    The argument takes a reference whole (``SUM``, ``COUNT``, ``MAX``, the
    ranges of ``SUMIF``/``COUNTIF``, ``MATCH``'s lookup range, ``VLOOKUP``'s
    table...).  An *expression* given here is still evaluated in the
    formula's mode: ``=SUM(A3:A7*2)`` entered as a plain formula is
    ``=SUM(A5*2)``.
``A`` array
    The argument is evaluated as an array whatever the formula's mode:
    nothing below it is intersected (``SUMPRODUCT``, ``INDEX``'s array,
    ``LOOKUP``'s vectors, ``MMULT``, the regression functions...).
``I`` inherit
    The branches of ``IF`` and ``CHOOSE`` take the class of the place where
    the ``IF`` itself stands (``=SUM(IF(1, A3:A7))`` sums the range; a plain
    ``=IF(1, A3:A7)`` in row 5 shows A5).

An array formula (``{=...}``, and every dynamic-array formula that Excel 365
saves: those are written as array formulas over the spill range) evaluates
every position as ``A``; its result fills its block.  A plain formula whose
result is an array shows the array's top-left element.

Catalogue functions (``TUBE_...``) follow Excel's rule for user-defined
functions: Excel hands a UDF a reference argument as the range itself (the
xlwings layer then reads the whole block), never intersected, so every
worksheet parameter is ``R``; a cavity table (kind ``"table"``) is ``A``.
So ``=TUBE_GAMMA(A3:A7)`` as a plain formula computes the column and shows
its first element, exactly as Excel shows a UDF's array result in one cell,
while ``=TUBE_GAMMA(A3:A7*1)`` intersects the range inside the expression.
"""

from __future__ import annotations

import functools

from . import values as V
from .catalogue_bridge import strip_udf_prefix
from .references import Area

V_, R_, A_, I_ = "V", "R", "A", "I"

#: Standard functions whose arguments are not all ``V``.  Each entry lists the
#: classes of the arguments in order; the last one repeats for further
#: arguments, or the group after ``|`` repeats (the range/criteria pairs of
#: ``COUNTIFS``).  Functions not listed take values in every position.
_TABLE_TEXT = """
SUM R; AVERAGE R; AVERAGEA R; COUNT R; COUNTA R; COUNTBLANK R; MAX R; MAXA R; MIN R;
MINA R; PRODUCT R; MEDIAN R; MODE R; MODE.SNGL R; MODE.MULT R; STDEV R; STDEV.S R;
STDEV.P R; STDEVA R; STDEVP R; STDEVPA R; VAR R; VAR.S R; VAR.P R; VARA R; VARP R;
VARPA R; SUMSQ R; GEOMEAN R; HARMEAN R; AVEDEV R; DEVSQ R; KURT R; SKEW R; SKEW.P R;
AND R; OR R; XOR R; CONCAT R; NPV V R; TEXTJOIN V V R;
LARGE R V; SMALL R V; PERCENTILE R V; PERCENTILE.INC R V; PERCENTILE.EXC R V;
QUARTILE R V; QUARTILE.INC R V; QUARTILE.EXC R V; RANK V R V; RANK.EQ V R V;
RANK.AVG V R V; PERCENTRANK R V V; TRIMMEAN R V;
COUNTIF R V; SUMIF R V R; AVERAGEIF R V R; COUNTIFS | R V; SUMIFS R | R V;
AVERAGEIFS R | R V; MAXIFS R | R V; MINIFS R | R V;
VLOOKUP V R V V; HLOOKUP V R V V; MATCH V R V; INDEX A V V V; AREAS R;
ROW R; COLUMN R; ROWS R; COLUMNS R; SUBTOTAL V R;
IF V I; CHOOSE V I;
SUMPRODUCT A; LOOKUP V A A; MMULT A; TRANSPOSE A; MINVERSE A; MDETERM A;
FREQUENCY A; LINEST A; LOGEST A; TREND A A A V; GROWTH A A A V; FORECAST V A A;
FORECAST.LINEAR V A A; SLOPE A; INTERCEPT A; CORREL A; PEARSON A; RSQ A; STEYX A;
COVAR A; COVARIANCE.P A; COVARIANCE.S A; SUMX2MY2 A; SUMX2PY2 A; SUMXMY2 A;
TTEST A A V V; T.TEST A A V V; CHITEST A; CHISQ.TEST A; PROB A A V V; IRR A V;
MIRR A V V; XNPV V A A; XIRR A A V;
FILTER A A V; SORT A V V V; SORTBY A A V; UNIQUE A V V; XLOOKUP V A A V V V;
XMATCH V A V V
"""


def _parse_table(text: str) -> dict:
    out = {}
    for entry in text.replace("\n", " ").split(";"):
        words = entry.split()
        if words:
            classes = words[1:]
            if "|" not in classes:
                classes = classes[:-1] + ["|"] + classes[-1:]
            k = classes.index("|")
            out[words[0]] = (tuple(classes[:k]), tuple(classes[k + 1:]))
    return out


STANDARD: dict = _parse_table(_TABLE_TEXT)


@functools.lru_cache(maxsize=4096)
def param_class(name: str, index: int) -> str:
    """Class (``"V"``, ``"R"``, ``"A"``, ``"I"``) of argument ``index`` of a
    function (its resolved name: ``SUM``, ``TUBE_GAIN``...)."""
    from .catalogue_bridge import catalogue_names

    bare = name.upper()
    if bare.startswith("_XLFN."):
        bare = bare[len("_XLFN."):]
    if bare in catalogue_names():
        from ..catalogue import lookup

        spec = lookup(bare)
        params = spec.worksheet_params if spec is not None else ()
        if index < len(params) and params[index].kind == "table":
            return A_
        return R_
    if bare == "SINGLE":            # the @ operator: it intersects its reference itself
        return R_
    entry = STANDARD.get(bare)
    if entry is None:
        return V_
    fixed, cycle = entry
    if index < len(fixed):
        return fixed[index]
    return cycle[(index - len(fixed)) % len(cycle)]


_REF_OPS = (":", " ", ",")


def is_reference_node(node) -> bool:
    return node[0] == "ref" or (node[0] == "bin" and node[1] in _REF_OPS)


def annotate(tree, array: bool):
    """The syntax tree with ``("isect", node)`` wrapped around every reference
    that a plain formula intersects; an array formula's tree is unchanged."""
    if array:
        return tree
    return _walk(tree, V_)


def _walk(node, position: str):
    kind = node[0]
    if is_reference_node(node):
        return ("isect", node) if position == V_ else node
    if kind == "un" or kind == "post":
        return (kind, node[1], _walk(node[2], V_))
    if kind == "bin":
        return ("bin", node[1], _walk(node[2], V_), _walk(node[3], V_))
    if kind == "call":
        name = node[1]
        target = strip_udf_prefix(name.upper())     # _xlfn., _xludf., add-in paths
        args = []
        for i, arg in enumerate(node[2]):
            cls = param_class(target, i)
            if cls == I_:
                cls = position
            if cls == A_:
                args.append(arg)          # evaluated as an array: nothing below intersects
            else:
                args.append(_walk(arg, cls))
        if (target == "INDEX" and position == V_ and len(args) in (2, 3)
                and is_reference_node(args[0])):
            return ("isect", ("call", name, args))   # INDEX of a reference is a reference
        return ("call", name, args)
    return node


def intersect_area(area: Area, row: int, col: int):
    """The single cell of ``area`` in row ``row`` and column ``col`` of the
    formula's own cell (any sheet), or None when there is none."""
    if area.r1 == area.r2:
        r = area.r1
    elif area.r1 <= row <= area.r2:
        r = row
    else:
        return None
    if area.c1 == area.c2:
        c = area.c1
    elif area.c1 <= col <= area.c2:
        c = col
    else:
        return None
    return Area(area.sheet, r, c, r, c)


def intersect(ref, env, host):
    """Value of a reference in a value position of a plain formula at ``host``
    (``(sheet, row, col)``): the intersected cell, ``#VALUE!`` when there is
    none or for a union of areas; values (arrays included) pass unchanged."""
    if isinstance(ref, Area):
        if ref.is_cell:
            return env.read(ref)
        if host is None:
            return V.VALUE
        cell = intersect_area(ref, host[1], host[2])
        if cell is None:
            return env.fail("#VALUE!", f"{ref} has no cell in the formula's own row or "
                                       f"column (implicit intersection); enter it as an array "
                                       f"formula to use the whole range")
        return env.read(cell)
    if isinstance(ref, list):
        return env.fail("#VALUE!", "a union of ranges where one value is expected")
    return ref


def _index_number(value):
    value = V.scalar(value)
    if V.is_error(value):
        return value
    if value is V.EMPTY:
        return 0
    if isinstance(value, (bool, float, int)):
        return int(value)
    try:
        return int(float(str(value).strip()))
    except ValueError:
        return V.VALUE


def index_reference(area: Area, numbers: list):
    """``INDEX(reference, row_num, [column_num])`` as a reference (Excel's
    reference form: row or column 0 is the whole column or row); an error
    value for an index out of the area."""
    rows, cols = area.shape
    picked = [_index_number(n) for n in numbers]
    for p in picked:
        if V.is_error(p):
            return p
    if len(picked) == 1:
        if rows == 1 and cols > 1:
            r, c = 1, picked[0]          # one row: the number picks a column
        else:
            r, c = picked[0], 0 if cols > 1 else 1
    else:
        r, c = picked
    if not (0 <= r <= rows and 0 <= c <= cols):
        return V.REF
    r1, r2 = (area.r1, area.r2) if r == 0 else (area.r1 + r - 1,) * 2
    c1, c2 = (area.c1, area.c2) if c == 0 else (area.c1 + c - 1,) * 2
    return Area(area.sheet, r1, c1, r2, c2, area.whole_rows and c == 0,
                area.whole_cols and r == 0)
