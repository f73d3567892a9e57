"""Formulas: text -> tokens -> syntax tree -> Python closure.

Tokens come from openpyxl's formula tokenizer.  A small precedence parser
builds the tree with Excel's operator precedence (reference operators ``:``,
space (intersection) and ``,`` (union); then negation, which binds tighter
than ``^`` so ``=-2^2`` is 4; ``%``; ``^`` (left-associative); ``*`` ``/``;
``+`` ``-``; ``&``; comparisons).  Operators and Excel functions are the
`formulas` package's implementations, so coercions and error propagation are
Excel's.

Compiled code does not depend on where a formula sits: every reference
operand is a numbered slot filled per cell.  Cells whose formulas differ only
in their references (a column of ``=TUBE_TRANSIT_ANGLE(A5, ...)`` rows) share
one compiled closure: :func:`compile_formula` caches by the formula's
skeleton.  A vectorised evaluator can group cells by the same skeleton.
"""

from __future__ import annotations

import functools
import re
import sys
from dataclasses import dataclass, field

import numpy as np
from formulas.functions.operators import OPERATORS
from openpyxl.formula.tokenizer import Token, Tokenizer, TokenizerError

from . import values as V
from .functions import reference_function, resolve
from .intersection import annotate, index_reference, intersect, is_reference_node
from .references import Area


class FormulaSyntaxError(ValueError):
    pass


@dataclass
class Compiled:
    """A compiled formula: ``run(env, slots)`` -> value."""

    run: object
    slots: int                                     # number of reference operands
    unknown: tuple = ()                            # Resolutions of unknown functions
    catalogue: tuple = ()                          # catalogue functions used
    functions: tuple = ()                          # every function name used
    problem: str = ""                              # parse error message, if any
    skeleton: tuple = field(default=(), repr=False)
    #: slots read only for their position (ROW(A1), COLUMNS(A:C)): no dependency
    position_only: frozenset = frozenset()


# --------------------------------------------------------------------------- tokens

def tokenize(text: str) -> list:
    """Tokens of a formula (``text`` starts with ``=``), whitespace folded.

    Whitespace between two operands is Excel's intersection operator and
    becomes an infix ``" "`` operator token; other whitespace is dropped.
    """
    try:
        items = Tokenizer(text).items
    except (TokenizerError, IndexError, ValueError) as exc:
        raise FormulaSyntaxError(str(exc)) from None
    items = _implicit_intersections(_merge_exponents(items))
    out = []
    for i, tok in enumerate(items):
        if tok.type == Token.WSPACE:
            prev = out[-1] if out else None
            nxt = items[i + 1] if i + 1 < len(items) else None
            if (prev is not None and nxt is not None and _ends_operand(prev)
                    and _starts_operand(nxt)):
                out.append(Token(" ", Token.OP_IN))
            continue
        out.append(tok)
    return out


_RE_MANTISSA = re.compile(r"^[0-9]*\.?[0-9]+E$", re.IGNORECASE)


def _merge_exponents(items) -> list:
    """``14.25E+9``: openpyxl's tokenizer only knows one digit before the point
    (the form Excel saves); rejoin other mantissas with their exponent."""
    out = []
    i = 0
    while i < len(items):
        tok = items[i]
        if (tok.type == Token.OPERAND and tok.subtype == Token.RANGE
                and _RE_MANTISSA.match(tok.value) and i + 2 < len(items)
                and items[i + 1].type == Token.OP_IN and items[i + 1].value in "+-"
                and items[i + 2].subtype == Token.NUMBER and items[i + 2].value.isdigit()):
            out.append(Token(tok.value + items[i + 1].value + items[i + 2].value,
                             Token.OPERAND, Token.NUMBER))
            i += 3
            continue
        out.append(tok)
        i += 1
    return out


def _implicit_intersections(items) -> list:
    """``@A1:A3`` -> ``SINGLE(A1:A3)`` (the form Excel saves is ``_xlfn.SINGLE``)."""
    out = []
    for tok in items:
        if tok.type == Token.OPERAND and tok.subtype == Token.RANGE and tok.value.startswith("@"):
            out.append(Token("SINGLE(", Token.FUNC, Token.OPEN))
            out.append(Token(tok.value[1:], Token.OPERAND, Token.RANGE))
            out.append(Token(")", Token.FUNC, Token.CLOSE))
        else:
            out.append(tok)
    return out


def _ends_operand(tok) -> bool:
    return (tok.type == Token.OPERAND and tok.subtype == Token.RANGE) or (
        tok.type in (Token.PAREN, Token.FUNC) and tok.subtype == Token.CLOSE)


def _starts_operand(tok) -> bool:
    return (tok.type == Token.OPERAND and tok.subtype == Token.RANGE) or (
        tok.type in (Token.PAREN, Token.FUNC) and tok.subtype == Token.OPEN)


def skeleton(tokens) -> tuple:
    """The formula's shape with every reference operand replaced by a slot."""
    return tuple(("\x00", "", "") if (t.type == Token.OPERAND and t.subtype == Token.RANGE)
                 else (t.value, t.type, t.subtype) for t in tokens)


def operand_texts(tokens) -> list:
    return [t.value for t in tokens if t.type == Token.OPERAND and t.subtype == Token.RANGE]


# --------------------------------------------------------------------------- parser

_INFIX = {":": 8, " ": 7, ",": 6, "^": 3, "*": 2, "/": 2, "+": 1, "-": 1, "&": 0,
          "=": -1, "<>": -1, "<": -1, ">": -1, "<=": -1, ">=": -1}
_PREFIX_PREC = 5
_POSTFIX_PREC = 4
_REF_OPS = (":", " ", ",")


class _Parser:
    def __init__(self, tokens):
        self.tokens = tokens
        self.pos = 0
        self.slot = 0

    def peek(self):
        return self.tokens[self.pos] if self.pos < len(self.tokens) else None

    def next(self):
        tok = self.peek()
        if tok is None:
            raise FormulaSyntaxError("formula ends unexpectedly")
        self.pos += 1
        return tok

    def parse(self):
        if not self.tokens:
            raise FormulaSyntaxError("empty formula")
        node = self.expr(-10)
        if self.peek() is not None:
            raise FormulaSyntaxError(f"unexpected {self.peek().value!r}")
        return node

    def expr(self, min_prec):
        left = self.prefix()
        while True:
            tok = self.peek()
            if tok is None:
                return left
            if tok.type == Token.OP_POST:
                if _POSTFIX_PREC < min_prec:
                    return left
                self.pos += 1
                left = ("post", tok.value, left)
                continue
            if tok.type == Token.OP_IN and tok.value in _INFIX:
                prec = _INFIX[tok.value]
                if prec < min_prec:
                    return left
                self.pos += 1
                right = self.expr(prec + 1)
                left = ("bin", tok.value, left, right)
                continue
            return left

    def prefix(self):
        tok = self.next()
        if tok.type == Token.OP_PRE:
            if tok.value == "@":
                return self.expr(_PREFIX_PREC)
            return ("un", tok.value, self.expr(_PREFIX_PREC))
        if tok.type == Token.OPERAND:
            return self.operand(tok)
        if tok.type == Token.PAREN and tok.subtype == Token.OPEN:
            node = self.expr(-10)
            close = self.next()
            if not (close.type == Token.PAREN and close.subtype == Token.CLOSE):
                raise FormulaSyntaxError("unbalanced parentheses")
            return node
        if tok.type == Token.FUNC and tok.subtype == Token.OPEN:
            return self.call(tok.value[:-1])
        if tok.type == Token.ARRAY and tok.subtype == Token.OPEN:
            return self.array()
        raise FormulaSyntaxError(f"unexpected {tok.value!r}")

    def operand(self, tok):
        sub = tok.subtype
        if sub == Token.NUMBER:
            return ("const", float(tok.value))
        if sub == Token.TEXT:
            return ("const", tok.value[1:-1].replace('""', '"'))
        if sub == Token.LOGICAL:
            return ("const", tok.value.upper() == "TRUE")
        if sub == Token.ERROR:
            return ("const", V.error(tok.value))
        slot = self.slot
        self.slot += 1
        return ("ref", slot)

    def call(self, name):
        args = []
        tok = self.peek()
        if tok is not None and tok.type == Token.FUNC and tok.subtype == Token.CLOSE:
            self.pos += 1
            return ("call", name, args)
        while True:
            tok = self.peek()
            if tok is not None and (tok.type == Token.SEP and tok.subtype == Token.ARG or
                                    tok.type == Token.FUNC and tok.subtype == Token.CLOSE):
                args.append(("missing",))
            else:
                args.append(self.expr(-10))
            tok = self.next()
            if tok.type == Token.SEP and tok.subtype == Token.ARG:
                continue
            if tok.type == Token.FUNC and tok.subtype == Token.CLOSE:
                return ("call", name, args)
            raise FormulaSyntaxError(f"unexpected {tok.value!r} in arguments of {name}")

    def array(self):
        rows, row = [], []
        while True:
            tok = self.next()
            if tok.type == Token.OP_PRE and tok.value == "-":
                tok = self.next()
                row.append(-float(tok.value))
            elif tok.type == Token.OPERAND:
                row.append(self.operand(tok)[1])
            else:
                raise FormulaSyntaxError("bad array constant")
            tok = self.next()
            if tok.type == Token.SEP and tok.subtype == Token.ROW:
                rows.append(row)
                row = []
            elif tok.type == Token.SEP:
                continue
            elif tok.type == Token.ARRAY and tok.subtype == Token.CLOSE:
                rows.append(row)
                break
            else:
                raise FormulaSyntaxError("bad array constant")
        if len({len(r) for r in rows}) != 1:
            raise FormulaSyntaxError("array constant rows differ in length")
        arr = np.empty((len(rows), len(rows[0])), dtype=object)
        for i, r in enumerate(rows):
            for j, v in enumerate(r):
                arr[i, j] = v
        return ("const", arr)


# --------------------------------------------------------------------------- compiler

_UNARY = {"-": OPERATORS["U-"], "+": OPERATORS["U+"]}
_PERCENT = OPERATORS["%"]


#: Functions that read only the position and size of a reference, never its values.
POSITION_FUNCTIONS = frozenset({"ROW", "COLUMN", "ROWS", "COLUMNS"})


def nesting_depth(tokens) -> int:
    """Deepest nesting of parentheses, function calls, array constants and signs
    in a token list: each opening nests one level, and so does each prefix sign
    stacked before an operand or an opening (``--A1`` is two levels)."""
    depth = deepest = signs = 0
    stack = []
    for tok in tokens:
        if tok.subtype == Token.OPEN:
            stack.append(signs)
            depth += 1 + signs
            signs = 0
        elif tok.subtype == Token.CLOSE:
            depth -= 1 + (stack.pop() if stack else 0)
            signs = 0
        elif tok.type == Token.OP_PRE:
            signs += 1
        else:
            signs = 0
        deepest = max(deepest, depth + signs)
    return deepest


def _ref_slots(node, out: set) -> None:
    """Slot numbers of the reference operands of a reference expression."""
    if node[0] == "ref":
        out.add(node[1])
    elif node[0] == "bin" and node[1] in _REF_OPS:
        _ref_slots(node[2], out)
        _ref_slots(node[3], out)


class _Compiler:
    def __init__(self):
        self.unknown = []
        self.catalogue = []
        self.functions = []
        self.position_only = set()

    def value(self, node):
        kind = node[0]
        if kind == "const":
            const = node[1]
            return lambda env, slots: const
        if kind == "missing":
            return lambda env, slots: V.EMPTY
        if kind == "ref":
            i = node[1]
            return lambda env, slots: slots[i].value(env)
        if kind == "isect":       # a reference where a plain formula wants one value
            ref = self.reference(node[1])
            return lambda env, slots: intersect(ref(env, slots), env, env.host)
        if kind == "un":
            op = _UNARY[node[1]]
            x = self.value(node[2])
            return lambda env, slots: V.scalar(op(x(env, slots)))
        if kind == "post":
            x = self.value(node[2])
            return lambda env, slots: V.scalar(_PERCENT(x(env, slots)))
        if kind == "bin":
            op = node[1]
            if op in _REF_OPS:
                ref = self.reference(node)
                return lambda env, slots: env.read_reference(ref(env, slots))
            if node[2][0] == "bin" and node[2][1] not in _REF_OPS:
                return self.chain(node)
            fn = OPERATORS[op]
            a, b = self.value(node[2]), self.value(node[3])
            return lambda env, slots: V.scalar(fn(a(env, slots), b(env, slots)))
        if kind == "call":
            if _is_index_of_reference(node):
                ref = self.index_reference(node)
                return lambda env, slots: env.read_reference(ref(env, slots))
            return self.call(node[1], node[2])
        raise FormulaSyntaxError(f"cannot compile {kind}")  # pragma: no cover

    def chain(self, node):
        """``a+b-c*d+...``: a left-nested run of operators compiled into one loop
        (no recursion: a formula of thousands of terms within Excel's length
        limit compiles and runs without Python's recursion limit)."""
        steps = []
        while node[0] == "bin" and node[1] not in _REF_OPS:
            steps.append((OPERATORS[node[1]], node[3]))
            node = node[2]
        first = self.value(node)
        steps = [(fn, self.value(right)) for fn, right in reversed(steps)]

        def run(env, slots):
            acc = first(env, slots)
            for fn, right in steps:
                acc = V.scalar(fn(acc, right(env, slots)))
            return acc
        return run

    def reference(self, node):
        """Closure giving an Area, a list of Areas (union), or an error value."""
        kind = node[0]
        if kind == "ref":
            i = node[1]
            return lambda env, slots: slots[i].reference(env)
        if kind == "bin" and node[1] in _REF_OPS:
            op = node[1]
            a, b = self.reference(node[2]), self.reference(node[3])
            return lambda env, slots: combine_references(op, a(env, slots), b(env, slots))
        if kind == "call" and _is_index_of_reference(node):
            return self.index_reference(node)
        value = self.value(node)
        return lambda env, slots: value(env, slots)

    def index_reference(self, node):
        """INDEX of a reference, as a reference (its value form when that fails)."""
        fallback = self.call(node[1], node[2])
        area_of = self.reference(node[2][0])
        numbers = [self.value(a) for a in node[2][1:]]

        def run(env, slots):
            area = area_of(env, slots)
            if not isinstance(area, Area):
                return fallback(env, slots)
            return index_reference(area, [n(env, slots) for n in numbers])
        return run

    def call(self, written, arg_nodes):
        res = resolve(written)
        self.functions.append(res.name)
        if res.kind == "unknown":
            self.unknown.append(res)
            message = res.message
            return lambda env, slots: env.fail("#NAME?", message)
        if res.kind == "reference":
            name = res.target
            if name in POSITION_FUNCTIONS:
                for a in arg_nodes:
                    _ref_slots(a, self.position_only)
            refs = [self.reference(a) if a[0] in ("ref", "bin") else self.value(a)
                    for a in arg_nodes]
            return lambda env, slots: reference_function(
                name, [r(env, slots) for r in refs], env.host, env)
        args = [self.value(a) for a in arg_nodes]
        if res.kind == "catalogue":
            self.catalogue.append(res.target)
            name = res.target
            return lambda env, slots: env.call_catalogue(name, [a(env, slots) for a in args])
        fn = res.target
        name = res.name
        if len(args) == 1:
            a0 = args[0]
            return lambda env, slots: _guard(env, name, fn, a0(env, slots))
        return lambda env, slots: _guard(env, name, fn, *[a(env, slots) for a in args])


def _is_index_of_reference(node) -> bool:
    """``INDEX(reference, row, [column])``: answered in Excel's reference form."""
    return (resolve(node[1]).name == "INDEX" and len(node[2]) in (2, 3)
            and is_reference_node(node[2][0]))


def _guard(env, name, fn, *args):
    try:
        return V.scalar(fn(*args))
    except Exception as exc:  # formulas raises its own errors for some inputs
        return env.fail("#VALUE!", f"{name}: {type(exc).__name__} in the Excel function library")


def combine_references(op, a, b):
    if V.is_error(a):
        return a
    if V.is_error(b):
        return b
    if not isinstance(a, (Area, list)) or not isinstance(b, (Area, list)):
        return V.VALUE
    if op == ",":
        return (a if isinstance(a, list) else [a]) + (b if isinstance(b, list) else [b])
    if isinstance(a, list) or isinstance(b, list) or a.sheet.upper() != b.sheet.upper():
        return V.VALUE if op == ":" else V.NULL
    if op == ":":
        return Area(a.sheet, min(a.r1, b.r1), min(a.c1, b.c1), max(a.r2, b.r2), max(a.c2, b.c2))
    r1, c1, r2, c2 = max(a.r1, b.r1), max(a.c1, b.c1), min(a.r2, b.r2), min(a.c2, b.c2)
    if r1 > r2 or c1 > c2:
        return V.NULL
    return Area(a.sheet, r1, c1, r2, c2)


def _failing(problem: str):
    return lambda env, slots: env.fail("#NAME?", problem)


def parse_tree(tokens_for_parse: tuple, array: bool = False):
    """Syntax tree of a formula shape, with the implicit intersections of a
    plain formula marked (:func:`.intersection.annotate`); raises
    :class:`FormulaSyntaxError`."""
    from .limits import MAX_NESTING

    tokens = [Token(v, t, s) for v, t, s in tokens_for_parse]
    depth = nesting_depth(tokens)
    if depth > MAX_NESTING:     # (checked before the recursive parser runs)
        raise FormulaSyntaxError(
            f"nested {depth} levels deep; the limit is {MAX_NESTING} levels of nested "
            f"functions, parentheses and signs (Excel's own limit of nested functions)")
    tree = _Parser(tokens).parse()
    # A run of operators (``A1+A2+...``, thousands of terms within the length
    # limit) is a tree as deep as it is long, while nesting is bounded above:
    # the tree walks get the depth the length limit allows (pure Python calls,
    # which take no C stack in Python 3.11+).
    old = sys.getrecursionlimit()
    sys.setrecursionlimit(max(old, 20_000))
    try:
        return annotate(tree, array)
    finally:
        sys.setrecursionlimit(old)


@functools.lru_cache(maxsize=20_000)
def compile_skeleton(key: tuple, tokens_for_parse: tuple, array: bool = False) -> Compiled:
    """Compiled closure of a formula shape; ``array``: an array formula (whole
    ranges everywhere), else a plain one (implicit intersection)."""
    tokens = [Token(v, t, s) for v, t, s in tokens_for_parse]
    try:
        tree = parse_tree(tokens_for_parse, array)
        comp = _Compiler()
        run = comp.value(tree)
    except RecursionError:
        problem = "cannot parse formula: nested too deeply"
        return Compiled(_failing(problem), 0, problem=problem, skeleton=key)
    except (FormulaSyntaxError, KeyError, IndexError, ValueError) as exc:
        problem = f"cannot parse formula: {exc}"
        return Compiled(_failing(problem), 0, problem=problem, skeleton=key)
    slots = sum(1 for t in tokens if t.type == Token.OPERAND and t.subtype == Token.RANGE)
    return Compiled(run, slots, tuple(comp.unknown), tuple(comp.catalogue),
                    tuple(comp.functions), skeleton=key,
                    position_only=frozenset(comp.position_only))


def compile_formula(text: str, array: bool = False):
    """``(Compiled, operand_texts)`` for a formula; never raises.

    ``array``: the formula is an array formula (``{=...}``, or a dynamic
    array Excel saved over its spill range): ranges are seen whole.
    """
    try:
        tokens = tokenize(text)
    except FormulaSyntaxError as exc:
        problem = f"cannot parse formula: {exc}"
        return Compiled(_failing(problem), 0, problem=problem), []
    key = skeleton(tokens)
    # The parser needs real operand texts only to tell slots apart, so the
    # skeleton (slots blanked) is parsed; operand texts are returned per cell.
    compiled = compile_skeleton(key, tuple((v if v != "\x00" else "A1", t or Token.OPERAND,
                                            s or Token.RANGE) for v, t, s in key), array)
    return compiled, operand_texts(tokens)
