"""Which names survive Excel's VBA layer, and which do not.

Classic xlwings turns each Python function into a VBA ``Function`` whose
parameters carry the Python parameter names.  A VBA reserved word there stops
the module from compiling, and Excel then shows ``#NAME?`` in every cell that
uses *any* of our functions.  A name that looks like a cell reference (``A1``,
``XFD1048576``, ``R1C1``, ``rc``) confuses Excel's formula parser and its
names.  This module holds the rules; the generator refuses a catalogue that
breaks them and ``tests/test_names.py`` checks the whole catalogue.

No xlwings import here: the rules are plain data.
"""

from __future__ import annotations

import keyword
import re

# --- VBA reserved identifiers -------------------------------------------------
# The reserved-identifier classes of the VBA language specification (MS-VBAL,
# section 3.3.5.2): statement keywords, marker keywords, operator identifiers,
# reserved names, special forms, reserved type identifiers, literal
# identifiers, Rem, names reserved for the implementation and future use.
_VBA_STATEMENT_KEYWORDS = """
call case close const declare defbool defbyte defcur defdate defdbl defint deflng
deflnglng deflngptr defobj defsng defstr defvar dim do else elseif end endif enum
erase event exit for friend function get global gosub goto if implements input let
lock loop lset next on open option print private public put raiseevent redim resume
return rset seek select set static stop sub type unlock wend while with write
"""
_VBA_MARKER_KEYWORDS = """
any as byref byval each in new optional paramarray preserve shared spc tab then to
until withevents
"""
_VBA_OPERATOR_IDENTIFIERS = "addressof and eqv imp is like mod not or typeof xor"
_VBA_RESERVED_NAMES = """
abs cbool cbyte ccur cdate cdbl cdec cint clng clnglng clngptr csng cstr cvar cverr
date debug doevents fix int len lenb me pset scale sgn string
"""
_VBA_SPECIAL_FORMS = "array circle input inputb lbound scale ubound"
_VBA_TYPE_IDENTIFIERS = """
boolean byte currency date decimal double integer long longlong longptr object
single string variant
"""
_VBA_LITERALS = "true false nothing empty null"
_VBA_IMPLEMENTATION = "rem attribute lineinput cdecl defdec"
# Words that are keywords only in context (Open ... For Binary Access Read,
# Option Compare Text, Declare PtrSafe ... Lib ... Alias, Line Input, Property
# Get, Name ... As, Error n, Mid$ ...) and statement names of the VBA library.
# Legal as identifiers in some places, refused here: a parameter list is not
# the place to find out which.  (``width`` stays allowed: Excel's object model
# uses it as a property name everywhere, e.g. ``Range.Width``.)
_VBA_CONTEXTUAL = """
access alias append base binary compare database error explicit lib line module
name output property ptrsafe random read reset step text mid midb time
load unload beep kill mkdir rmdir chdir chdrive filecopy sendkeys setattr randomize
appactivate savesetting deletesetting
"""

VBA_RESERVED: frozenset[str] = frozenset(
    " ".join((_VBA_STATEMENT_KEYWORDS, _VBA_MARKER_KEYWORDS, _VBA_OPERATOR_IDENTIFIERS,
              _VBA_RESERVED_NAMES, _VBA_SPECIAL_FORMS, _VBA_TYPE_IDENTIFIERS,
              _VBA_LITERALS, _VBA_IMPLEMENTATION, _VBA_CONTEXTUAL)).split()
)

# Identifiers that the VBA wrapper written by xlwings' "Import Functions" uses
# inside every function body (Application.Caller, Array(...), ThisWorkbook,
# ActiveWorkbook, XLPy.CallUDF, Err.Description, TypeOf ... Is Range, the
# label ``failed``, the ``App`` compilation constant).  A parameter with one of
# these names would shadow it and break the wrapper.  ``caller`` and ``vba``
# are special to xlwings itself (``caller`` is replaced by the calling range).
XLWINGS_WRAPPER_NAMES: frozenset[str] = frozenset((
    "application", "thisworkbook", "activeworkbook", "xlpy", "calludf", "err", "range",
    "failed", "app", "caller", "vba", "argsarray",
))

# Excel limits (column XFD = 16384, row 1048576) and VBA limits.
MAX_COLUMN = 16384
MAX_ROW = 1048576
MAX_IDENTIFIER = 255    # VBA identifiers and Excel function names
MAX_VBA_PARAMETERS = 60  # VBA procedures take at most 60 declared parameters

_IDENTIFIER = re.compile(r"[A-Za-z][A-Za-z0-9_]*\Z")
_A1 = re.compile(r"([A-Za-z]{1,3})([0-9]+)\Z")
_R1C1 = re.compile(r"(?:[Rr][0-9]*[Cc][0-9]*|[Rr][0-9]*|[Cc][0-9]*)\Z")
FUNCTION_NAME = re.compile(r"TUBE_[A-Z0-9]+(?:_[A-Z0-9]+)*\Z")


def column_number(letters: str) -> int:
    """Excel column number of column letters (``A`` -> 1, ``XFD`` -> 16384)."""
    n = 0
    for ch in letters.upper():
        n = n * 26 + (ord(ch) - ord("A") + 1)
    return n


def looks_like_a1(name: str) -> bool:
    """True when ``name`` is an A1-style cell reference in Excel's grid."""
    m = _A1.match(name)
    if not m:
        return False
    return column_number(m.group(1)) <= MAX_COLUMN and 1 <= int(m.group(2)) <= MAX_ROW


def looks_like_r1c1(name: str) -> bool:
    """True for R1C1-style references and their parts (``R``, ``C``, ``RC``, ``R2C3``)."""
    return bool(_R1C1.match(name))


def is_python_keyword(name: str) -> bool:
    return keyword.iskeyword(name) or keyword.issoftkeyword(name)


def identifier_problems(name: str) -> list[str]:
    """Reasons why ``name`` cannot be a worksheet function or parameter name."""
    problems = []
    if name.startswith("_"):
        problems.append("starts with an underscore")
    if not _IDENTIFIER.match(name):
        problems.append("is not a plain ASCII identifier (letter first, then letters, "
                        "digits, underscores)")
    if len(name) > MAX_IDENTIFIER:
        problems.append(f"is longer than {MAX_IDENTIFIER} characters")
    low = name.lower()
    if low in VBA_RESERVED:
        problems.append("is a VBA reserved word")
    if low in XLWINGS_WRAPPER_NAMES:
        problems.append("is used inside xlwings' VBA wrapper")
    if looks_like_a1(name):
        problems.append("looks like an A1 cell reference")
    if looks_like_r1c1(name):
        problems.append("looks like an R1C1 cell reference")
    if is_python_keyword(name):
        problems.append("is a Python keyword")
    return problems


def function_problems(fn) -> list[str]:
    """Every naming problem of one catalogue function, as readable sentences."""
    out = []
    for why in identifier_problems(fn.name):
        out.append(f"{fn.name}: function name {why}")
    if not FUNCTION_NAME.match(fn.name):
        out.append(f"{fn.name}: function name is not TUBE_<QUANTITY> in upper case")
    params = fn.worksheet_params
    if len(params) > MAX_VBA_PARAMETERS:
        out.append(f"{fn.name}: {len(params)} parameters, VBA allows {MAX_VBA_PARAMETERS}")
    seen: set[str] = set()
    for p in params:
        for why in identifier_problems(p.name):
            out.append(f"{fn.name}: parameter {p.name!r} {why}")
        low = p.name.lower()
        if low in seen:
            out.append(f"{fn.name}: parameter {p.name!r} appears twice (VBA ignores case)")
        seen.add(low)
        if low == fn.name.lower():
            out.append(f"{fn.name}: parameter {p.name!r} has the function's own name")
    required_after_optional = False
    optional_seen = False
    for p in params:
        if not p.required:
            optional_seen = True
        elif optional_seen:
            required_after_optional = True
    if required_after_optional:
        out.append(f"{fn.name}: a required parameter follows an optional one")
    return out


def catalogue_problems(catalogue) -> list[str]:
    """Naming problems of a whole catalogue (a mapping name -> Function)."""
    out = []
    seen: dict[str, str] = {}
    for fn in catalogue.values():
        out.extend(function_problems(fn))
        low = fn.name.lower()
        if low in seen:
            out.append(f"{fn.name}: duplicate of {seen[low]} (Excel ignores case)")
        seen[low] = fn.name
    return out
