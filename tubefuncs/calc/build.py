"""Pack the Calc extension (``.oxt``) from the generated files.

The package holds the checked-in files of ``tubefuncs/calc/extension/`` and one
file made here, ``tubefuncs_paths.json``: the folders LibreOffice's Python must
put on ``sys.path`` to import numpy, scipy, pint and tubefuncs (those of the
Python running this build), and that Python's version (the component says so
when LibreOffice's Python has another minor version).
"""

from __future__ import annotations

import json
import os
import sys
import sysconfig
import zipfile
from pathlib import Path

from .generate import EXT_DIR, stale

PATHS_NAME = "tubefuncs_paths.json"
#: Fixed time stamp of the archive members: the same inputs give the same bytes.
_STAMP = (2024, 1, 1, 0, 0, 0)


def python_paths() -> list[str]:
    """Folders that let another Python import tubefuncs and its dependencies from here."""
    import numpy

    import tubefuncs

    wanted = [str(Path(tubefuncs.__file__).resolve().parent.parent)]
    for key in ("purelib", "platlib"):
        wanted.append(sysconfig.get_paths()[key])
    wanted.append(str(Path(numpy.__file__).resolve().parent.parent))
    out: list[str] = []
    for p in wanted:
        if p and os.path.isdir(p) and p not in out:
            out.append(p)
    return out


def paths_record(extra: list[str] | None = None) -> dict:
    return {"python": "{}.{}".format(*sys.version_info[:2]), "executable": sys.executable,
            "sys_path": list(extra or []) + python_paths()}


def build_oxt(output: str | os.PathLike, extra_paths: list[str] | None = None,
              check_current: bool = True) -> Path:
    """Write the ``.oxt`` to ``output`` and return its path."""
    if check_current:
        bad = stale(with_rdb=False)
        if bad:
            raise RuntimeError(f"the Calc extension's files are stale ({', '.join(bad)}): "
                               "run python -m tubefuncs.calc.generate")
    output = Path(output)
    output.parent.mkdir(parents=True, exist_ok=True)
    tmp = output.with_name(output.name + ".part")
    files = sorted(p for p in EXT_DIR.rglob("*") if p.is_file() and "__pycache__" not in p.parts)
    with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as z:
        for path in files:
            info = zipfile.ZipInfo(path.relative_to(EXT_DIR).as_posix(), _STAMP)
            info.compress_type = zipfile.ZIP_DEFLATED
            z.writestr(info, path.read_bytes())
        info = zipfile.ZipInfo(PATHS_NAME, _STAMP)
        info.compress_type = zipfile.ZIP_DEFLATED
        z.writestr(info, json.dumps(paths_record(extra_paths), indent=1))
    os.replace(tmp, output)
    return output
