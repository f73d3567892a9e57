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

FIXED_TIME = (2026, 1, 1, 0, 0, 0)


def reproducible(data: bytes) -> bytes:
    """The same workbook bytes on every run: fixed zip timestamps and document dates."""
    import io
    import re
    import zipfile

    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as zin, \
            zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            body = zin.read(info.filename)
            if info.filename == "docProps/core.xml":
                body = re.sub(rb"(<dcterms:(?:created|modified)[^>]*>)[^<]*",
                              rb"\g<1>2026-01-01T00:00:00Z", body)
            zout.writestr(zipfile.ZipInfo(info.filename, FIXED_TIME), body,
                          compress_type=zipfile.ZIP_DEFLATED)
    return out.getvalue()


def save(wb, path) -> None:
    import io

    buf = io.BytesIO()
    wb.save(buf)
    atomic_write_bytes(path, reproducible(buf.getvalue()))


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
