"""Pausing the cyclic garbage collector while a workbook's objects are built."""

from __future__ import annotations

import contextlib
import gc


@contextlib.contextmanager
def gc_paused():
    """Pause the cyclic garbage collector while large object graphs are built.

    Building a workbook's cells, compiled formulas and graph otherwise triggers
    collections over everything built so far (which find nothing to free:
    cells hold no reference cycles).  Their number grows with what is already
    built, so the cost per cell grows with the workbook: 300,000 formula cells
    took twice as long per cell as 10,000 in the general engine.  Cycles are
    still collected: later, by the collections of the oldest generation.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        # What was built goes to the oldest generation without a scan (freeze and
        # unfreeze move lists; they also reset the young generation's count, which
        # would otherwise make the next allocation scan everything built here).
        gc.freeze()
        gc.unfreeze()
        if was_enabled:
            gc.enable()
