"""Vector values and the Excel operations the fast path runs on them.

A :class:`Vec` holds one value per cell of a group.  Elements that are plain
finite numbers ("clean" elements) live in a float64 array; every other
element (text, an error value, a blank, a boolean in a numeric vector, an
array...) is kept as the engine value itself in an object array beside it.
A vector of booleans (``kind == "b"``, e.g. a comparison) keeps them as 0/1
in the float array.

Every operation computes its clean elements with numpy and hands each other
element, and each element whose numpy result is suspect (not finite, or
outside the region where numpy and the general engine are known to agree),
to exactly the callable the general engine uses for that operator or function
(the `formulas` library's, as :mod:`tubefuncs.headless.formula` compiles it),
one element at a time.  So a vector answer is the general engine's answer,
element by element.

An exception in such a call would end the general engine's evaluation of the
whole cell (``#VALUE!``, "engine error"); the element becomes :data:`CRASH`,
which every later operation passes on, and the plan evaluates that cell again
with the general engine.
"""

from __future__ import annotations

import math

import numpy as np

from .. import values as V


class _Crash:
    """An element whose general evaluation raised: the cell is redone by the general engine."""

    __slots__ = ()

    def __repr__(self) -> str:
        return "CRASH"


CRASH = _Crash()

_EMPTY = V.EMPTY
_XL_ERROR = type(V.NUM)


def is_simple(value) -> bool:
    """True for a value the general engine passes through functions unchanged
    (text, boolean, error value): not a blank, not an array, not a crash."""
    return value is not _EMPTY and isinstance(value, (str, bool))


class Vec:
    """One value per cell: ``x`` (float64) for clean elements, ``o`` for the others.

    ``bad`` is a boolean mask of the elements held in ``o`` (``None``: every
    element is clean, and ``o`` is ``None`` too).  ``kind`` says what a clean
    element is: ``"n"`` a float, ``"b"`` a boolean (0.0/1.0 in ``x``).
    """

    __slots__ = ("x", "kind", "bad", "o", "uniform")

    def __init__(self, x, kind="n", bad=None, o=None, uniform=None):
        self.x = x
        self.kind = kind
        self.bad = bad
        self.o = o
        self.uniform = uniform       # (value,) when every element is this one value

    @property
    def n(self) -> int:
        return self.x.shape[0]

    # ------------------------------------------------------------ building
    @classmethod
    def full(cls, value, n: int) -> Vec:
        """Every element the same engine value."""
        if type(value) is float and math.isfinite(value):
            return cls(np.full(n, value), "n", uniform=(value,))
        if type(value) is bool:
            return cls(np.full(n, 1.0 if value else 0.0), "b", uniform=(value,))
        o = np.empty(n, dtype=object)
        o.fill(value)
        return cls(np.zeros(n), "n", np.ones(n, dtype=bool), o, uniform=(value,))

    @classmethod
    def of_values(cls, values: list) -> Vec:
        """From a list of engine values (cell contents)."""
        n = len(values)
        types = set(map(type, values))
        if types == {float}:
            x = np.array(values, dtype=float)
            if np.isfinite(x).all():
                return cls(x)
        x = np.zeros(n)
        bad = np.ones(n, dtype=bool)
        o = np.empty(n, dtype=object)
        for i, v in enumerate(values):
            if type(v) is float and math.isfinite(v):
                x[i] = v
                bad[i] = False
            else:
                o[i] = v
        if not bad.any():
            return cls(x)
        return cls(x, "n", bad, o)

    @classmethod
    def blank(cls, n: int, kind: str = "n") -> Vec:
        """A vector to be filled element by element (:meth:`put`)."""
        return cls(np.zeros(n), kind, np.zeros(n, dtype=bool), np.empty(n, dtype=object))

    def put(self, i: int, value) -> None:
        """Set element ``i`` to an engine value (after :meth:`blank` or :meth:`writable`)."""
        if self.kind == "n":
            if type(value) is float and math.isfinite(value):
                self.x[i] = value
                self.bad[i] = False
                return
        elif type(value) is bool:
            self.x[i] = 1.0 if value else 0.0
            self.bad[i] = False
            return
        self.bad[i] = True
        self.o[i] = value

    def writable(self) -> Vec:
        """A copy whose elements can be :meth:`put`."""
        n = self.n
        bad = self.bad.copy() if self.bad is not None else np.zeros(n, dtype=bool)
        o = self.o.copy() if self.o is not None else np.empty(n, dtype=object)
        return Vec(self.x.copy(), self.kind, bad, o)

    def tidy(self) -> Vec:
        """Drop the object part when every element turned out clean."""
        if self.bad is not None and not self.bad.any():
            return Vec(self.x, self.kind)
        return self

    # ------------------------------------------------------------ reading
    def element(self, i: int):
        """Engine value of element ``i``."""
        if self.bad is not None and self.bad[i]:
            return self.o[i]
        if self.kind == "n":
            return float(self.x[i])
        return bool(self.x[i])

    def elements(self) -> list:
        """Engine values of all elements."""
        if self.kind == "n":
            out = self.x.tolist()
        else:
            out = [bool(v) for v in self.x.tolist()]
        if self.bad is not None:
            o = self.o
            for i in np.flatnonzero(self.bad).tolist():
                out[i] = o[i]
        return out

    def as_numbers(self) -> Vec:
        """The same values as a numeric vector (booleans become object elements)."""
        if self.kind == "n":
            return self
        n = self.n
        o = np.empty(n, dtype=object)
        xs = self.x
        for i in range(n):
            o[i] = bool(xs[i])
        if self.bad is not None:
            o[self.bad] = self.o[self.bad]
        return Vec(np.zeros(n), "n", np.ones(n, dtype=bool), o)

    def clean(self):
        """Boolean mask of clean elements (``None``: all)."""
        return None if self.bad is None else ~self.bad


def either(*masks):
    """Elementwise OR of masks, ``None`` standing for all-False."""
    out = None
    for m in masks:
        if m is None:
            continue
        out = m.copy() if out is None else (out | m)
    return out


def finish(r, kind: str, slow, compute) -> Vec:
    """A vector from numpy results ``r``, with ``slow`` elements from ``compute(i)``."""
    if slow is None or not slow.any():
        return Vec(r, kind)
    out = Vec(r, kind, np.zeros(r.shape[0], dtype=bool), np.empty(r.shape[0], dtype=object))
    for i in np.flatnonzero(slow).tolist():
        out.put(i, compute(i))
    return out.tidy()


def general(fn, args):
    """One call of a general-engine callable on engine values, as compiled code makes it."""
    for a in args:
        if a is CRASH:
            return CRASH
    try:
        return V.scalar(fn(*args))
    except Exception:
        return CRASH


def guarded(fn, args):
    """A call of an Excel-library function, as the general engine guards it
    (an exception inside the library is ``#VALUE!``)."""
    for a in args:
        if a is CRASH:
            return CRASH
    try:
        return V.scalar(fn(*args))
    except Exception:
        return V.VALUE


def elementwise(fn, vecs, n: int, call=general, kind: str = "n") -> Vec:
    """``fn`` on the elements of ``vecs``, one element at a time."""
    out = Vec.blank(n, kind)
    for i in range(n):
        out.put(i, call(fn, [v.element(i) for v in vecs]))
    return out.tidy()
