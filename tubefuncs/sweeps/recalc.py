"""``tubefuncs recalc --dask``: the catalogue calls of large same-shape formula groups
on dask, with the same answers as the default path.

The fast headless path evaluates a filled-down column of catalogue calls as
one :func:`tubefuncs.worksheet.evaluate` call
(:func:`tubefuncs.headless.vector.program.catalogue_vector`).  Inside
:func:`dask_groups` that call is split into row chunks, each chunk evaluated
by the same ``worksheet.evaluate`` in a dask task (threads, processes for the
large-signal model, or a dask.distributed cluster) and the chunks joined
again: values and per-row error values are those of the one call, row for row.
"""

from __future__ import annotations

import contextlib
import os

import numpy as np

from .. import worksheet
from ..errors import TubeInputError
from .study import is_slow

MIN_ROWS = 20_000          # closed-form groups smaller than this stay in one call
CHUNK_ROWS = 10_000


def _call_chunk(name, args):
    """worksheet.evaluate on one chunk; errors as plain tuples (they cross processes)."""
    try:
        ev = worksheet.evaluate(name, args)
    except TubeInputError as exc:
        return ("raise", (exc.message, exc.error_value, exc.function, exc.argument))
    errors = {k: (e.message, e.error_value, e.function, e.argument)
              for k, e in ev.errors.items()}
    return ("ok", (ev.value, errors))


def _split(args, n, size):
    for a in range(0, n, size):
        b = min(n, a + size)
        yield a, [x[a:b] if isinstance(x, np.ndarray) and x.ndim == 2 and x.shape == (n, 1)
                  else x for x in args]


class _GroupEvaluator:
    def __init__(self, scheduler, workers, min_rows, chunk_rows):
        self.scheduler = scheduler
        self.workers = workers or os.cpu_count() or 1
        self.min_rows = min_rows
        self.chunk_rows = chunk_rows
        self.client = None
        self.dispatched = 0        # groups handed to dask (for tests and reports)

    def __call__(self, name, args):
        n = 0
        for x in args:
            if isinstance(x, np.ndarray) and x.ndim == 2 and x.shape[1] == 1:
                n = max(n, x.shape[0])
        slow = is_slow(name)
        if n < (2 if slow else self.min_rows):
            return worksheet.evaluate(name, args)
        size = max(1, -(-n // (4 * self.workers))) if slow else self.chunk_rows
        parts = list(_split(args, n, size))
        outs = self._run(name, parts, slow)
        value = np.empty((n, 1))
        errors = {}
        for (a, _), (status, payload) in zip(parts, outs):
            if status == "raise":
                raise TubeInputError(*payload)
            v, errs = payload
            v = np.asarray(v, dtype=float)
            value[a:a + v.shape[0]] = v.reshape(-1, 1)
            for (r, c), e in errs.items():
                errors[(r + a, c)] = TubeInputError(*e)
        self.dispatched += 1
        return worksheet.Evaluation(value, errors)

    def _run(self, name, parts, slow):
        if self.client is not None:
            futures = self.client.map(_call_chunk, [name] * len(parts), [p for _, p in parts],
                                      pure=False)
            return self.client.gather(futures)
        import dask

        scheduler = self.scheduler or ("processes" if slow else "threads")
        tasks = [dask.delayed(_call_chunk, pure=False)(name, p) for _, p in parts]
        from .runner import _one_thread_per_process

        kwargs = {} if scheduler == "sync" else {"num_workers": self.workers}
        with _one_thread_per_process(scheduler == "processes"):
            return dask.compute(*tasks, scheduler=scheduler, **kwargs)


@contextlib.contextmanager
def dask_groups(scheduler: str | None = None, workers: int | None = None,
                min_rows: int = MIN_ROWS, chunk_rows: int = CHUNK_ROWS):
    """Within this block, the fast path hands large catalogue groups to dask.

    scheduler : None or ``"local"`` (threads; processes for the large-signal
        functions), ``"threads"``, ``"processes"``, ``"sync"``, or the address of a
        dask.distributed scheduler.
    """
    from ..headless.vector import program

    local = scheduler in (None, "local", "threads", "processes", "sync")
    ev = _GroupEvaluator(None if scheduler == "local" else scheduler if local else None,
                         workers, min_rows, chunk_rows)
    if not local:
        from distributed import Client

        from ..headless.problems import WorkbookError

        try:
            ev.client = Client(scheduler, timeout=10)
        except (OSError, TimeoutError, ValueError) as exc:   # (recalc exits 2 with this)
            raise WorkbookError(f"cannot reach the dask scheduler at {scheduler!r}: "
                                f"{exc}") from None
    previous = program.group_evaluator
    program.group_evaluator = ev
    try:
        yield ev
    finally:
        program.group_evaluator = previous
        if ev.client is not None:
            ev.client.close()
