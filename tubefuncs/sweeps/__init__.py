"""Sweeps and tolerance studies of catalogue functions, on dask.

>>> from tubefuncs.sweeps import load_study, run_sweep
>>> result = run_sweep(load_study("study.toml"), "out/")        # doctest: +SKIP
>>> print(result.summary["meeting_all_limits"])                  # doctest: +SKIP

A study is a grid of arguments or a seeded random sample of tubes (normal or
uniform tolerances per argument or per cavity-table column), described in a
TOML file or a workbook sheet (:mod:`.study`, :mod:`.sheet`); it runs chunk by
chunk on dask (:mod:`.runner`): local threads or processes by default, or a
dask.distributed cluster.  Needs the ``sweeps`` extra (dask, distributed, pyarrow).
"""

from .runner import SweepError, SweepResult, default_scheduler, run_sweep
from .study import Study, StudyError, build_study, load_study

__all__ = ["Study", "StudyError", "SweepError", "SweepResult", "build_study", "default_scheduler",
           "load_study", "run_sweep"]
