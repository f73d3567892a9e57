"""Build the demo workbooks and their expected-values snapshots.

    python workbooks/make_workbooks.py            # workbooks and snapshots
    python workbooks/make_workbooks.py --no-snapshots

The workbooks are written by openpyxl, so they carry no cached values: their
expected values come from the tubefuncs engine (``*.expected.tsv``), and
``tests/test_workbooks.py`` checks their key numbers against independent
formulas so that the snapshots are not merely self-consistent.
"""

from __future__ import annotations

import argparse
import os
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.dirname(HERE))

from tubefuncs.headless import recalculate, write_snapshot  # noqa: E402
from tubefuncs.headless.demo_books import BUILDERS  # noqa: E402
from tubefuncs.headless.writer import atomic_write_bytes  # noqa: E402


def save(wb, path) -> None:
    import io

    buf = io.BytesIO()
    wb.save(buf)
    atomic_write_bytes(path, buf.getvalue())


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--no-snapshots", action="store_true")
    parser.add_argument("--out", default=HERE, help="folder (default: this one)")
    args = parser.parse_args(argv)
    for filename, build in BUILDERS.items():
        path = os.path.join(args.out, filename)
        save(build(), path)
        line = f"wrote {path}"
        if not args.no_snapshots:
            recalc = recalculate(path)
            snap = write_snapshot(recalc)
            line += f" and {os.path.basename(snap)} ({len(recalc.values)} values)"
            for key, message in recalc.name_errors:
                line += f"\n  #NAME? {recalc.cell_name(key)}: {message}"
        print(line)
    return 0


if __name__ == "__main__":
    sys.exit(main())
