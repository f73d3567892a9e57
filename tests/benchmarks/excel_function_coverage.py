"""Which Excel worksheet functions the headless engine does not evaluate (on demand).

    python tests/benchmarks/excel_function_coverage.py

The list of Excel's functions is taken from the function-information table
that the `pycel` package ships (Excel 2019/365 era), when it is installed;
newer dynamic-array functions are checked from a short list here.
"""

from __future__ import annotations

import os
import sys

sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))

from tubefuncs.headless.functions import resolve  # noqa: E402

NEWER = ("XLOOKUP XMATCH FILTER SORT SORTBY UNIQUE SEQUENCE RANDARRAY LET LAMBDA TEXTSPLIT "
         "TEXTBEFORE TEXTAFTER VSTACK HSTACK TAKE DROP CHOOSECOLS CHOOSEROWS TOCOL TOROW WRAPROWS "
         "WRAPCOLS EXPAND MAP REDUCE SCAN MAKEARRAY BYROW BYCOL ISOMITTED").split()


def main() -> int:
    try:
        from pycel.lib.function_info_data import function_info
    except ImportError:
        print("pycel is not installed: checking only the newer functions")
        names = []
    else:
        names = [f.name for f in function_info]
    names = sorted(set(names) | set(NEWER))
    missing = [n for n in names if resolve(n).kind == "unknown"]
    print(f"{len(names) - len(missing)} of {len(names)} Excel functions evaluated; "
          f"not supported ({len(missing)}):")
    print(", ".join(missing))
    return 0


if __name__ == "__main__":
    sys.exit(main())
