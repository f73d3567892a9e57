"""Running a study on dask: chunks, schedulers, chunk files, resume, outputs.

- Local (default): dask's threaded scheduler for vectorised numpy kernels
  (numpy releases the GIL), its multiprocessing scheduler for per-point and
  large-signal kernels (Python-bound).  In a folder, each chunk task writes
  its own chunk file, so memory stays flat however large the sweep.
- A dask.distributed cluster (``scheduler="tcp://host:8786"`` or a
  ``distributed.Client``): chunks are submitted a window at a time, their rows
  come back to this process and are written here (the workers need no shared
  disk); a worker lost mid-sweep has its chunks recomputed by dask
  elsewhere; a chunk whose task fails for good is written with the failure in
  every row's error column and is recomputed on resume.
- A chunk file is written to a temporary name and renamed, so an interrupted
  sweep leaves only whole chunks; run again with the same folder and the same
  study to resume (the folder's ``sweep.json`` holds the study's fingerprint).
"""

from __future__ import annotations

import contextlib
import json
import os
import sys
import time
from dataclasses import dataclass, field

import pyarrow as pa
import pyarrow.parquet as pq

from .kernel import failed_chunk, run_chunk
from .study import Study, StudyError

XLSX_MAX_ROWS = 20_000
MANIFEST = "sweep.json"


class SweepError(RuntimeError):
    """A sweep that cannot run here (folder holds another study, scheduler unreachable)."""


@dataclass
class SweepResult:
    study: Study
    summary: dict
    folder: str | None = None
    table: pa.Table | None = None          # in memory (no folder), else read on demand
    files: dict = field(default_factory=dict)
    resumed_chunks: int = 0
    failed_chunks: list = field(default_factory=list)
    scheduler: str = ""

    def read(self) -> pa.Table:
        """The whole results table (from memory or the folder's Parquet file)."""
        if self.table is not None:
            return self.table
        return pq.read_table(self.files["parquet"])


def default_scheduler(study: Study) -> str:
    """'processes' for per-point and slow (large-signal) kernels, else 'threads'."""
    return "processes" if (study.per_point or study.slow) else "threads"


# ----------------------------------------------------------------------- tasks

def _chunk_path(folder, k, failed=False):
    return os.path.join(folder, "chunks", f"part-{k:06d}{'.failed' if failed else ''}.parquet")


def _write_atomic_table(table: pa.Table, path: str) -> None:
    tmp = f"{path}.{os.getpid()}.tmp"
    pq.write_table(table, tmp)
    os.replace(tmp, path)


def compute_chunk(study: Study, k: int) -> pa.Table:
    """Rows of chunk k; a failure of the chunk as a whole becomes error rows."""
    try:
        return run_chunk(study, k)
    except Exception as exc:  # noqa: BLE001  (never a lost row)
        return failed_chunk(study, k, f"chunk {k} failed: {type(exc).__name__}: {exc}")


def write_chunk(study: Study, k: int, folder: str) -> tuple[int, int]:
    """Compute chunk k and write its file (a local task); returns (k, rows)."""
    table = compute_chunk(study, k)
    _write_atomic_table(table, _chunk_path(folder, k))
    return k, table.num_rows


# ------------------------------------------------------------------ the folder

def _prepare_folder(study: Study, folder: str, fresh: bool) -> list[int]:
    """Chunks still to compute; checks the folder holds this study (or is new)."""
    os.makedirs(os.path.join(folder, "chunks"), exist_ok=True)
    manifest_path = os.path.join(folder, MANIFEST)
    manifest = {"fingerprint": study.fingerprint(), "points": study.n_points,
                "chunk": study.chunk, "chunks": study.n_chunks, "columns": study.columns(),
                "results": [r.name for r in study.results]}
    if os.path.exists(manifest_path) and not fresh:
        try:
            with open(manifest_path, encoding="utf-8") as fh:
                old = json.load(fh)
        except (OSError, ValueError):
            old = {}
        if old.get("fingerprint") != manifest["fingerprint"]:
            raise SweepError(f"{folder} holds the chunks of another study (or of this study "
                             f"with other points, seed or chunk size); use another folder, "
                             f"or --fresh to discard them")
    else:
        for name in os.listdir(os.path.join(folder, "chunks")):
            if name.startswith("part-"):
                os.remove(os.path.join(folder, "chunks", name))
        tmp = manifest_path + ".tmp"
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(manifest, fh, indent=1)
        os.replace(tmp, manifest_path)
    todo = []
    for k in range(study.n_chunks):
        path = _chunk_path(folder, k)
        failed = _chunk_path(folder, k, failed=True)
        if os.path.exists(failed):
            os.remove(failed)
            todo.append(k)
            continue
        a, b = study.chunk_bounds(k)
        try:
            if pq.ParquetFile(path).metadata.num_rows == b - a:
                continue
        except (OSError, pa.ArrowException):
            pass
        todo.append(k)
    return todo


# ---------------------------------------------------------------- the progress

class _Progress:
    """One line on standard error, when it is a terminal."""

    def __init__(self, total: int, label: str, stream=None, enabled=None):
        self.total, self.label = total, label
        self.stream = stream if stream is not None else sys.stderr
        if enabled is None:
            enabled = bool(getattr(self.stream, "isatty", lambda: False)())
        self.enabled = enabled
        self.done = 0
        self.t0 = time.monotonic()
        self._last = 0.0

    def step(self, n: int = 1) -> None:
        self.done += n
        if not self.enabled:
            return
        now = time.monotonic()
        if now - self._last < 0.1 and self.done < self.total:
            return
        self._last = now
        frac = self.done / self.total if self.total else 1.0
        bar = "#" * int(30 * frac)
        eta = (now - self.t0) * (1 - frac) / frac if frac > 0 else 0
        self.stream.write(f"\r{self.label} [{bar:<30}] {self.done}/{self.total} chunks "
                          f"{100 * frac:3.0f}% eta {eta:5.0f} s")
        self.stream.flush()

    def close(self) -> None:
        if self.enabled:
            self.stream.write("\r" + " " * 90 + "\r")
            self.stream.flush()


# -------------------------------------------------------------------- running

def run_sweep(study: Study, folder: str | None = None, *, scheduler=None,
              workers: int | None = None, fresh: bool = False, progress: bool | None = None,
              window: int | None = None, xlsx: bool | None = None,
              summary: bool = True) -> SweepResult:
    """Evaluate a study.

    folder : where chunks and the outputs go (``results.parquet``,
        ``results.csv``, ``summary.json``, ``summary.txt`` and, for at most
        :data:`XLSX_MAX_ROWS` rows, ``results.xlsx``); None keeps the table in
        memory (:attr:`SweepResult.table`).
    scheduler : None (local, chosen by :func:`default_scheduler`), ``"threads"``,
        ``"processes"``, ``"sync"`` (serial, in this thread), a dask.distributed
        address (``"tcp://127.0.0.1:8786"``) or a ``distributed.Client``.
    workers : local threads or processes (default: the machine's cores).
    fresh : discard the chunks of a folder instead of resuming from them.
    progress : a progress bar on standard error (default: when it is a terminal).
    summary : compute the summary of a table kept in memory (a folder's sweep
        always writes its summary).
    """
    if workers is not None and workers < 1:
        raise StudyError(f"workers must be >= 1 (got {workers})")
    if scheduler is None:
        scheduler = default_scheduler(study)
    todo = list(range(study.n_chunks))
    resumed = 0
    if folder is not None:
        todo = _prepare_folder(study, folder, fresh)
        resumed = study.n_chunks - len(todo)
    bar = _Progress(study.n_chunks, "sweep", enabled=progress)
    bar.step(resumed)
    tables: dict[int, pa.Table] = {}
    failed: list[int] = []
    try:
        if isinstance(scheduler, str) and scheduler in ("threads", "processes", "sync"):
            name = scheduler
            _run_local(study, todo, folder, scheduler, workers, bar, tables)
        else:
            name = _run_distributed(study, todo, folder, scheduler, bar, tables, failed, window)
    finally:
        bar.close()
    if folder is None:
        table = pa.concat_tables([tables[k] for k in range(study.n_chunks)]) \
            if tables else None
        from .output import summarise

        stats = summarise(study, [table] if table is not None else []) if summary else {}
        return SweepResult(study, stats, None, table, {}, resumed, failed, name)
    from .output import assemble

    files, summary = assemble(study, folder, xlsx=xlsx)
    for k in range(study.n_chunks):
        if os.path.exists(_chunk_path(folder, k, failed=True)):
            failed.append(k)
    return SweepResult(study, summary, folder, None, files, resumed, sorted(set(failed)), name)


def _run_local(study, todo, folder, scheduler, workers, bar, tables):
    import dask
    from dask.callbacks import Callback

    if not todo:
        return
    # the study goes into the graph once, as one opaque value (not traversed)
    held = dask.delayed(study, traverse=False)
    if folder is None:
        tasks = [dask.delayed(compute_chunk, pure=False)(held, k) for k in todo]
    else:
        tasks = [dask.delayed(write_chunk, pure=False)(held, k, folder) for k in todo]

    def posttask(key, result, dsk, state, worker_id):
        bar.step()

    kwargs = {"scheduler": scheduler}
    if scheduler != "sync":
        kwargs["num_workers"] = workers or os.cpu_count() or 1
    from concurrent.futures.process import BrokenProcessPool

    try:
        with Callback(posttask=posttask), _one_thread_per_process(scheduler == "processes"):
            out = dask.compute(*tasks, **kwargs)
    except BrokenProcessPool as exc:
        raise SweepError(f"a worker process died ({exc}); the chunks written so far stay, "
                         f"run again to resume. (From a Python script, start sweeps under "
                         f"`if __name__ == \"__main__\":`, which worker processes need.)"
                         ) from None
    if folder is None:
        tables.update(zip(todo, out))


#: Thread-pool sizes of numpy's linear algebra in worker processes: one each, as
#: dask.distributed's nanny sets them, so that N processes use N cores, not N x cores.
_THREAD_VARIABLES = ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


@contextlib.contextmanager
def _one_thread_per_process(active: bool):
    """Worker processes started inside get one linear-algebra thread (unless the user
    chose a number); this process's own environment is restored afterwards."""
    saved = {k: os.environ.get(k) for k in _THREAD_VARIABLES}
    try:
        if active:
            for k in _THREAD_VARIABLES:
                os.environ.setdefault(k, "1")
        yield
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v


def _run_distributed(study, todo, folder, scheduler, bar, tables, failed, window):
    try:
        from distributed import Client, as_completed
    except ImportError as exc:  # pragma: no cover
        raise SweepError(f"a cluster needs dask.distributed ({exc}); install "
                         f"tubefuncs[sweeps]") from None
    own = not isinstance(scheduler, Client)
    if own:
        try:
            client = Client(scheduler, timeout=10)
        except (OSError, TimeoutError, ValueError) as exc:
            raise SweepError(f"cannot reach the dask scheduler at {scheduler!r}: "
                             f"{exc}") from None
    else:
        client = scheduler
    try:
        if window is None:
            threads = sum(client.nthreads().values()) or 1
            window = 2 * threads
        fp = study.fingerprint()[:12]
        pending = list(todo)
        queue = as_completed()
        futures = {}

        def submit():
            k = pending.pop(0)
            f = client.submit(compute_chunk, study, k, key=f"tubefuncs-sweep-{fp}-{k}",
                              pure=False)
            futures[f.key] = k
            queue.add(f)

        for _ in range(min(window, len(pending))):
            submit()
        for fut in queue:
            k = futures.pop(fut.key)
            try:
                table = fut.result()
                ok = True
            except Exception as exc:  # noqa: BLE001  (a chunk lost for good: error rows)
                table = failed_chunk(study, k, f"chunk {k} failed on the cluster: "
                                     f"{type(exc).__name__}: {exc}")
                ok = False
                failed.append(k)
            fut.release()
            if folder is None:
                tables[k] = table
            else:
                _write_atomic_table(table, _chunk_path(folder, k, failed=not ok))
            bar.step()
            if pending:
                submit()
        return f"dask.distributed {client.scheduler.address}"
    finally:
        if own:
            client.close()
