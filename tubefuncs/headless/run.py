"""Which engine recalculates a workbook: the fast path or the general engine.

The general engine (:mod:`.engine`) knows nothing of the fast path; the fast
path (:mod:`.vector`) builds on the general engine's data types and hands it
what it does not cover.  This module, above both, picks one.
"""

from __future__ import annotations

from .engine import Recalculation, recalculate_general
from .limits import DEFAULT_LIMITS, Limits

ENGINES = ("fast", "general")


def recalculate(path, limits: Limits = DEFAULT_LIMITS, progress=None,
                evaluator=None, engine: str = "fast") -> Recalculation:
    """Load, compile and evaluate every formula of a workbook (the file is only read).

    ``engine``: ``"fast"`` (default) evaluates same-shape formula cells together
    as numpy vectors (:mod:`tubefuncs.headless.vector`) and hands everything
    else to the general engine; ``"general"`` evaluates every cell on its own.
    Both give the same values.  An explicit ``evaluator`` runs the general plan.
    """
    if engine not in ENGINES:
        raise ValueError(f"engine must be one of {', '.join(ENGINES)} (got {engine!r})")
    if engine == "fast" and evaluator is None:
        from .vector import recalculate_fast

        return recalculate_fast(path, limits=limits, progress=progress)
    return recalculate_general(path, limits=limits, progress=progress, evaluator=evaluator)
