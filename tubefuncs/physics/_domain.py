"""Domain masks shared by the physics modules.

Physics functions return NaN where an input is outside the function's domain.
These helpers keep that cheap: when every element is valid (the usual case)
the check costs a reduction, not a temporary array.
"""

from __future__ import annotations

import numpy as np


def _masked(ok, value):
    """``value`` with NaN where ``ok`` is False, as a numpy scalar for 0-d input.

    The common case (all valid) costs one pass over a boolean array, so the
    domain check stays cheap against the formula itself.
    """
    if not ok.all():
        value = np.where(ok, value, np.nan)
    return value[()]


def _lowest(x) -> float:
    """Smallest element of ``x`` (NaN if any is NaN; +inf when empty).

    A single value is read as a Python float: cheaper than a numpy reduction,
    which matters for the per-cell calls of a worksheet.
    """
    if x.ndim == 0:
        return float(x)
    return x.min() if x.size else np.inf


def _domain_ok(nonnegative=(), positive=()):
    """Mask: every array of ``nonnegative`` is >= 0 and every one of ``positive`` > 0.

    Returns ``np.True_`` when all elements pass, found through reductions
    (no temporary arrays); NaN elements fail.
    """
    if (all(_lowest(x) >= 0 for x in nonnegative)
            and all(_lowest(x) > 0 for x in positive)):
        return np.True_
    ok = np.True_
    for x in nonnegative:
        ok = ok & (x >= 0)
    for x in positive:
        ok = ok & (x > 0)
    return ok


def _nan_where_invalid(y, ok):
    """``y`` with NaN wherever ``ok`` is False, as a numpy scalar or array.

    Cheaper than ``np.where`` for large arrays: nothing is copied when every
    element is valid, and otherwise the fresh result array ``y`` is patched in
    place.  ``y`` must be a new array of this call (never a caller's input).
    """
    if ok is np.True_ or np.all(ok):
        return y[()]
    if (isinstance(y, np.ndarray) and y.flags.writeable
            and np.broadcast_shapes(y.shape, np.shape(ok)) == y.shape):
        np.copyto(y, np.nan, where=~ok)
        return y[()]
    return np.where(ok, y, np.nan)[()]
