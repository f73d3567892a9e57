"""Recalculating workbooks with LibreOffice, for differential tests.

Not a test module.  One ``soffice --headless --convert-to xlsx`` call for
every file given (LibreOffice computes formula cells that have no cached
value when it loads them), in a private user profile that is removed
afterwards, with a timeout that ends the whole process group.
"""

from __future__ import annotations

import os
import shutil
import signal
import subprocess
import tempfile
from pathlib import Path


def soffice() -> str | None:
    """Path of the LibreOffice binary, or None where it is not installed."""
    return shutil.which("soffice") or shutil.which("libreoffice")


def recalc_with_libreoffice(paths, outdir, timeout: float = 300.0) -> list[Path]:
    """Recalculated copies (``outdir/<name>.xlsx``) of ``paths``, in one run."""
    binary = soffice()
    if binary is None:
        raise FileNotFoundError("LibreOffice (soffice) is not installed")
    outdir = Path(outdir)
    outdir.mkdir(parents=True, exist_ok=True)
    profile = Path(tempfile.mkdtemp(prefix="tubefuncs-lo-profile-"))
    cmd = [binary, f"-env:UserInstallation={profile.as_uri()}", "--headless", "--norestore",
           "--convert-to", "xlsx:Calc MS Excel 2007 XML", "--outdir", str(outdir)]
    cmd += [str(p) for p in paths]
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            start_new_session=True)
    try:
        out, err = proc.communicate(timeout=timeout)
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.communicate()
        raise
    finally:
        shutil.rmtree(profile, ignore_errors=True)
    made = [outdir / (Path(p).stem + ".xlsx") for p in paths]
    missing = [str(m) for m in made if not m.exists()]
    if missing:
        raise RuntimeError(f"LibreOffice did not write {missing}: {err.decode(errors='replace')}")
    return made
