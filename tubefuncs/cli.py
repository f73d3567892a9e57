"""The ``tubefuncs`` command line.

Subcommands:

``recalc BOOK -o OUT``
    write a copy of BOOK whose formula cells hold computed values.
``check BOOK [--expected FILE]``
    recalculate and compare with the values a spreadsheet application cached
    in BOOK, or with an expected-values file; exit 0 when they match, 1 on a
    difference, 2 when the input cannot be used.
``snapshot BOOK``
    write BOOK's expected-values file (``BOOK.expected.tsv`` beside it).
``demo``
    recalculate the bundled RF-station workbook and print its budget.
``plot``, ``excel-setup``, ``sweep``
    handed to :mod:`tubefuncs.gain_plot`, :mod:`tubefuncs.excel.setup` and
    :mod:`tubefuncs.sweeps.cli`.

Exit status: 0 success/match, 1 mismatch, 2 unusable input or usage error,
3 internal error (set ``TUBEFUNCS_DEBUG=1`` for the traceback).
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

EXIT_OK, EXIT_MISMATCH, EXIT_UNUSABLE, EXIT_INTERNAL = 0, 1, 2, 3


def _limits_options(parser: argparse.ArgumentParser) -> None:
    from .headless.limits import DEFAULT_LIMITS, MiB

    group = parser.add_argument_group("safety limits")
    group.add_argument("--max-file-mb", type=float, metavar="MB",
                       default=DEFAULT_LIMITS.max_file_bytes / MiB,
                       help="refuse larger files (default %(default)g)")
    group.add_argument("--max-cells", type=int, metavar="N", default=DEFAULT_LIMITS.max_cells,
                       help="refuse workbooks with more cells (default %(default)d)")
    group.add_argument("--max-range-cells", type=int, metavar="N",
                       default=DEFAULT_LIMITS.max_range_cells,
                       help="refuse formulas reading larger ranges (default %(default)d)")


def _engine_option(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--engine", choices=("fast", "general", "calc"), default="fast",
                        help="fast: evaluate same-shape formula cells together as vectors, "
                             "the rest cell by cell (default); general: every cell on its "
                             "own. Both give the same values. calc: the whole workbook "
                             "recalculated by LibreOffice Calc (headless, private profile, "
                             "our extension installed; needs LibreOffice).")


# --- option values and outputs (checked before any work) ---------------------

def _tolerance(text: str) -> float:
    import math

    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: {text!r}") from None
    if not (math.isfinite(value) and value >= 0):
        raise argparse.ArgumentTypeError(f"must be a finite number >= 0 (got {text})")
    return value


def _row_count(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a whole number: {text!r}") from None
    if value < 0:
        raise argparse.ArgumentTypeError(f"must be >= 0 (0 for all; got {value})")
    return value


def _limits(args):
    from dataclasses import replace

    from .headless.limits import DEFAULT_LIMITS, MiB

    return replace(DEFAULT_LIMITS, max_file_bytes=int(args.max_file_mb * MiB),
                   max_cells=args.max_cells, max_range_cells=args.max_range_cells)


def build_parser() -> argparse.ArgumentParser:
    from . import __version__
    from .headless.compare import DEFAULT_ATOL, DEFAULT_RTOL

    parser = argparse.ArgumentParser(
        prog="tubefuncs",
        description="RF-tube worksheet functions: recalculate and regress workbooks headless.")
    parser.add_argument("--version", action="version", version=f"tubefuncs {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = sub.add_parser("recalc", help="write a copy of a workbook with computed values")
    p.add_argument("book", metavar="BOOK", help="workbook (.xlsx or .xlsm); never modified")
    p.add_argument("-o", "--output", required=True, metavar="OUT",
                   help="where to write the recalculated copy")
    p.add_argument("--max-rows", type=_row_count, default=20, metavar="N",
                   help="error cells to list, 0 for all (default %(default)d)")
    _limits_options(p)
    _engine_option(p)
    p.add_argument("--dask", nargs="?", const="local", metavar="ADDRESS",
                   help="hand the catalogue calls of large filled-down columns to dask "
                        "(tubefuncs.sweeps; same values): this machine, or the address of "
                        "a dask.distributed scheduler")

    p = sub.add_parser("check", help="recalculate and compare with expected values")
    p.add_argument("book", metavar="BOOK")
    p.add_argument("--expected", metavar="FILE",
                   help="expected-values file (default: values cached in BOOK by a "
                        "spreadsheet application, else BOOK.expected.tsv beside it)")
    p.add_argument("--rtol", type=_tolerance, default=DEFAULT_RTOL,
                   help="relative tolerance for numbers, >= 0 (default %(default)g)")
    p.add_argument("--atol", type=_tolerance, default=DEFAULT_ATOL,
                   help="absolute tolerance for numbers, >= 0 (default %(default)g)")
    p.add_argument("--max-rows", type=_row_count, default=50, metavar="N",
                   help="rows of the difference table to print, 0 for all (default %(default)d)")
    p.add_argument("--accept-name", action="append", default=[], metavar="WHAT",
                   help="do not fail on the #NAME? of this cell (Sheet!B7 or B7), function "
                        "(INDIRECT) or defined name; repeat for more. Every other #NAME? "
                        "fails the check.")
    _limits_options(p)
    _engine_option(p)

    p = sub.add_parser("snapshot", help="write the expected-values file of a workbook")
    p.add_argument("book", metavar="BOOK")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="expected-values file (default: BOOK.expected.tsv beside BOOK)")
    _limits_options(p)
    _engine_option(p)

    p = sub.add_parser("demo", help="recalculate the bundled RF-station budget and print it")
    p.add_argument("-o", "--output", default="tubefuncs-demo-out.xlsx", metavar="OUT",
                   help="where to write the recalculated copy (default %(default)s)")

    sub.add_parser("plot", help="gain plot (tubefuncs.gain_plot); 'plot transfer' and 'plot "
                   "applegate': large-signal plots (tubefuncs.largesignal_plot)", add_help=False)
    sub.add_parser("excel-setup", help="set up the Excel add-in (tubefuncs.excel.setup)",
                   add_help=False)
    sub.add_parser("calc-setup", help="build and install the LibreOffice Calc extension "
                   "(tubefuncs.calc.setup)", add_help=False)
    sub.add_parser("sweep", help="grid or tolerance study on dask (tubefuncs.sweeps)",
                   add_help=False)
    return parser


def _progress(label):
    from .headless.progress import Progress

    return Progress(label)


def _say_name_errors(recalc, out) -> None:
    if recalc.name_errors:
        print(f"#NAME? met in {len(recalc.name_errors)} place(s):", file=out)
        for key, message in recalc.name_errors:
            print(f"  {recalc.cell_name(key)}: {message}", file=out)


def _cells(recalc) -> str:
    """The count every command reports: each cell a formula fills (array blocks cell by cell)."""
    return f"{recalc.formula_cells} formula cells"


def _say_error_cells(recalc, limit, out) -> None:
    """Each error cell with its reason: the first ``limit`` (None: all), then how many more."""
    from .headless import values as V

    errors = [(k, v) for k, v in sorted(recalc.values.items()) if V.is_error(v)]
    if not errors:
        return
    print(f"{len(errors)} error value(s):", file=out)
    for key, value in errors if limit is None else errors[:limit]:
        reason = recalc.messages.get(key) or "(from a standard spreadsheet function)"
        print(f"  {recalc.cell_name(key)}  {value}  {reason}", file=out)
    if limit is not None and len(errors) > limit:
        print(f"  ... and {len(errors) - limit} more (--max-rows 0 lists them all)", file=out)


def cmd_recalc(args) -> int:
    from .headless import recalculate, write_recalculated
    from .headless.writer import check_output

    check_output(args.output, [args.book])   # (refused before any work)
    with _progress(os.path.basename(args.book)) as progress, _on_dask(args.dask):
        recalc = recalculate(args.book, limits=_limits(args), progress=progress,
                             engine=args.engine)
        progress.phase("writing")
        out = write_recalculated(recalc, args.output)
    errors = _count_errors(recalc)
    print(f"recalculated {_cells(recalc)} of {args.book} "
          f"({errors} error value(s)); wrote {out}")
    _say_error_cells(recalc, args.max_rows or None, sys.stdout)
    _say_name_errors(recalc, sys.stdout)
    return EXIT_OK


def _on_dask(address):
    """Context of ``recalc --dask``: large catalogue groups on dask (tubefuncs.sweeps)."""
    if address is None:
        import contextlib

        return contextlib.nullcontext()
    from .sweeps.recalc import dask_groups

    return dask_groups(address)


def _count_errors(recalc) -> int:
    """Error values among the computed values (one C-level pass, no call per cell)."""
    from .headless import values as V

    return sum(map(V.is_error, recalc.values.values()))


def cmd_check(args) -> int:
    from .headless import check, format_table, snapshot_path

    with _progress(os.path.basename(args.book)) as progress:
        recalc, result, source = check(args.book, expected=args.expected, rtol=args.rtol,
                                       atol=args.atol, limits=_limits(args), progress=progress,
                                       fallback=snapshot_path(args.book), engine=args.engine,
                                       accept_names=args.accept_name)
    _say_name_errors(recalc, sys.stdout)
    if result.ok:
        accepted = (f"; {len(result.accepted_names)} #NAME? accepted"
                    if result.accepted_names else "")
        print(f"OK: {_cells(recalc)} of {args.book} match {source} "
              f"(rtol={args.rtol:g}, atol={args.atol:g}{accepted})")
        return EXIT_OK
    if result.differences:
        print(f"MISMATCH: {len(result.differences)} of {_cells(recalc)} of "
              f"{args.book} differ from {source} (rtol={args.rtol:g}, atol={args.atol:g})")
        print(format_table(result.differences, limit=args.max_rows or None))
    if result.name_errors:
        print(f"FAILED: #NAME? in {len(result.name_errors)} place(s) of {args.book} (a "
              f"misspelt or unsupported function, or an undefined name; listed above). "
              f"Accept one with --accept-name CELL|FUNCTION|NAME.")
    return EXIT_MISMATCH


def cmd_snapshot(args) -> int:
    from .headless import recalculate, snapshot_path, write_snapshot
    from .headless.snapshot import name_warnings
    from .headless.writer import check_output

    check_output(args.output or snapshot_path(args.book), [args.book])   # (before any work)
    with _progress(os.path.basename(args.book)) as progress:
        recalc = recalculate(args.book, limits=_limits(args), progress=progress,
                             engine=args.engine)
    path = write_snapshot(recalc, args.output)
    print(f"wrote the expected values of {_cells(recalc)} of {args.book} to {path}")
    _say_name_errors(recalc, sys.stdout)
    for line in name_warnings(recalc):
        print(f"tubefuncs snapshot: warning: wrote #NAME? for {line} ('check' fails on it "
              f"unless accepted with --accept-name)", file=sys.stderr)
    return EXIT_OK


def cmd_demo(args) -> int:
    from .headless.demo import run_demo

    return run_demo(args.output, sys.stdout)


def _delegate(module: str, argv) -> int:
    try:
        mod = importlib.import_module(module)
    except ImportError as exc:
        print(f"tubefuncs: this command needs {module}, which is not available here "
              f"({exc}).", file=sys.stderr)
        return EXIT_UNUSABLE
    main = getattr(mod, "main", None)
    if main is None:
        print(f"tubefuncs: {module} has no main()", file=sys.stderr)
        return EXIT_UNUSABLE
    return int(main(list(argv)) or 0)


COMMANDS = {"recalc": cmd_recalc, "check": cmd_check, "snapshot": cmd_snapshot,
            "demo": cmd_demo}
DELEGATED = {"plot": "tubefuncs.gain_plot", "excel-setup": "tubefuncs.excel.setup",
             "calc-setup": "tubefuncs.calc.setup", "sweep": "tubefuncs.sweeps.cli"}


def main(argv=None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    if argv[:1] == ["plot"] and argv[1:2] and argv[1] in ("transfer", "applegate"):
        return _delegate("tubefuncs.largesignal_plot", argv[1:])
    if argv and argv[0] in DELEGATED:
        return _delegate(DELEGATED[argv[0]], argv[1:])
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_UNUSABLE
    from .headless.problems import WorkbookError

    try:
        return COMMANDS[args.command](args)
    except WorkbookError as exc:
        print(f"tubefuncs {args.command}: {exc.message}", file=sys.stderr)
        return EXIT_UNUSABLE
    except MemoryError:
        print(f"tubefuncs {args.command}: out of memory; the workbook needs more memory than "
              f"this machine gives (lower the limits, e.g. --max-cells)", file=sys.stderr)
        return EXIT_UNUSABLE
    except KeyboardInterrupt:
        print("tubefuncs: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:
        if os.environ.get("TUBEFUNCS_DEBUG"):
            raise
        first = str(exc).splitlines()[0] if str(exc) else ""
        print(f"tubefuncs {args.command}: internal error {type(exc).__name__}: {first} "
              f"(set TUBEFUNCS_DEBUG=1 for details; please report it)", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
