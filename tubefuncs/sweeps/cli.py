"""``tubefuncs sweep STUDY -o FOLDER``: run a sweep or tolerance study on dask.

Exit status: 0 done (error values in rows included), 2 unusable study or
folder, 130 interrupted (the written chunks stay; run again to resume).
"""

from __future__ import annotations

import argparse
import sys

EXIT_OK, EXIT_UNUSABLE, EXIT_INTERRUPTED = 0, 2, 130


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="tubefuncs sweep",
        description="Evaluate catalogue functions over a grid or a seeded random sample of "
                    "their arguments (a study file: TOML, or a workbook sheet), chunk by "
                    "chunk on dask. Writes results.parquet, results.csv, summary.json, "
                    "summary.txt and, for small sweeps, results.xlsx into FOLDER.")
    p.add_argument("study", metavar="STUDY", help="study file (.toml, or .xlsx with a sheet "
                   "laid out as a study)")
    p.add_argument("-o", "--output", required=True, metavar="FOLDER",
                   help="folder for the chunks and the outputs; running again with the same "
                        "study resumes from the chunks written there")
    p.add_argument("--sheet", metavar="NAME", help="sheet of a workbook study (default: the "
                   "sheet named 'study')")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="address of a running dask.distributed scheduler, e.g. "
                        "tcp://127.0.0.1:8786 (default: this machine)")
    p.add_argument("--local", choices=("threads", "processes", "sync"),
                   help="local scheduler (default: threads for vectorised functions, "
                        "processes for per-point and large-signal ones)")
    p.add_argument("--workers", type=int, metavar="N",
                   help="local threads or processes (default: the number of cores)")
    p.add_argument("--chunk", type=int, metavar="N", help="points per chunk (overrides the "
                   "study's sweep.chunk)")
    p.add_argument("--fresh", action="store_true",
                   help="discard chunks already in FOLDER instead of resuming")
    p.add_argument("--no-xlsx", action="store_true", help="never write results.xlsx")
    p.add_argument("--no-progress", action="store_true", help="no progress bar")
    return p


def main(argv=None) -> int:
    args = build_parser().parse_args(argv)
    from .output import summary_text
    from .runner import SweepError, run_sweep
    from .study import StudyError, load_study

    if args.scheduler and args.local:
        print("tubefuncs sweep: give --scheduler or --local, not both", file=sys.stderr)
        return EXIT_UNUSABLE
    try:
        study = load_study(args.study, sheet=args.sheet)
        if args.chunk is not None:
            if not 1 <= args.chunk <= 10_000_000:
                raise StudyError(f"--chunk must be between 1 and 10,000,000 (got {args.chunk})")
            study = _with_chunk(study, args.chunk)
        result = run_sweep(study, args.output, scheduler=args.scheduler or args.local,
                           workers=args.workers, fresh=args.fresh,
                           progress=False if args.no_progress else None,
                           xlsx=False if args.no_xlsx else None)
    except (StudyError, SweepError) as exc:
        print(f"tubefuncs sweep: {exc}", file=sys.stderr)
        return EXIT_UNUSABLE
    except KeyboardInterrupt:
        print(f"tubefuncs sweep: interrupted; the chunks written in {args.output} stay, run "
              f"the same command again to resume", file=sys.stderr)
        return EXIT_INTERRUPTED
    print(summary_text(result.summary))
    if result.resumed_chunks:
        print(f"resumed: {result.resumed_chunks} of {study.n_chunks} chunks were already "
              f"written")
    if result.failed_chunks:
        print(f"{len(result.failed_chunks)} chunk(s) failed as a whole (their rows carry the "
              f"message); run again to retry them")
    print(f"on {result.scheduler}; wrote " + ", ".join(sorted(result.files.values())))
    return EXIT_OK


def _with_chunk(study, chunk):
    from dataclasses import replace

    description = dict(study.description, chunk=chunk)
    return replace(study, chunk=chunk, description=description)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
