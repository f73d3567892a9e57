"""Which engine recalculates a workbook, which writer writes it: fast or general.

The general engine (:mod:`.engine`, :mod:`.writer`) knows nothing of the fast
path; the fast path (:mod:`.vector`) builds on the general engine's data types
and hands it what it does not cover.  This module, above both, picks one.
"""

from __future__ import annotations

from .engine import Recalculation, recalculate_general
from .limits import DEFAULT_LIMITS, Limits
from .problems import WorkbookError
from .writer import check_output, write_openpyxl

ENGINES = ("fast", "general", "calc")


def recalculate(path, limits: Limits = DEFAULT_LIMITS, progress=None,
                evaluator=None, engine: str = "fast") -> Recalculation:
    """Load, compile and evaluate every formula of a workbook (the file is only read).

    ``engine``: ``"fast"`` (default) evaluates same-shape formula cells together
    as numpy vectors (:mod:`tubefuncs.headless.vector`) and hands everything
    else to the general engine; ``"general"`` evaluates every cell on its own.
    Both give the same values.  ``"calc"`` hands the whole recalculation to
    real LibreOffice Calc with our extension (:mod:`tubefuncs.calc.engine`).
    An explicit ``evaluator`` runs the general plan.
    """
    if engine not in ENGINES:
        raise ValueError(f"engine must be one of {', '.join(ENGINES)} (got {engine!r})")
    if engine == "calc":  # real LibreOffice Calc (tubefuncs.calc.engine)
        from ..calc.engine import recalculate_calc

        return recalculate_calc(path, limits=limits, progress=progress)
    if engine == "fast" and evaluator is None:
        from .vector import recalculate_fast

        return recalculate_fast(path, limits=limits, progress=progress)
    return recalculate_general(path, limits=limits, progress=progress, evaluator=evaluator)


def write_recalculated(recalc, out_path) -> str:
    """Copy of the workbook in which every formula cell holds its computed value.

    A fast-path recalculation is written by rewriting the formula cells of the
    worksheet parts in place (:mod:`.vector.writer`); anything that writer
    cannot do, and every general-engine recalculation, by openpyxl
    (:func:`.writer.write_openpyxl`: formatting, names and other sheets' content
    as openpyxl keeps them; VBA copied through, never run, into an ``.xlsm``).
    The output is written atomically; the input is never written.
    """
    if getattr(recalc, "engine", "general") == "calc":  # Calc's own saved copy
        from ..calc.engine import write_calc_output

        return write_calc_output(recalc, out_path)
    if getattr(recalc, "engine", "general") == "fast":
        from .vector.writer import write_fast

        out_path = check_output(out_path, [recalc.book.path])
        try:
            if write_fast(recalc, out_path) is not None:
                return out_path
        except OSError as exc:
            raise WorkbookError(f"{out_path}: cannot write ({exc.strerror or exc})") from None
    return write_openpyxl(recalc, out_path)
