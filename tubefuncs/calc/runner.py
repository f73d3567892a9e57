"""Run a headless LibreOffice with our extension, in a private profile.

:class:`CalcSession` starts LibreOffice's Python on ``driver.py`` (which
starts ``soffice --headless`` in a fresh profile folder of its own), installs
the extension through the ExtensionManager API, restarts, and then answers
requests (recalculate a workbook, fill and read a sheet).  Every request has a
time limit; on a time-out, a crash or :meth:`CalcSession.close`, the whole
process group (driver, oosplash, soffice.bin) is killed and the profile
folder removed.  Failures are :class:`CalcUnavailable` with one clear line.
"""

from __future__ import annotations

import glob
import json
import os
import shutil
import signal
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

DRIVER = Path(__file__).with_name("driver.py")
START_TIMEOUT = float(os.environ.get("TUBEFUNCS_CALC_START_TIMEOUT", "120"))
REQUEST_TIMEOUT = float(os.environ.get("TUBEFUNCS_CALC_TIMEOUT", "600"))


class CalcUnavailable(RuntimeError):
    """LibreOffice is missing, did not start in time, or failed: one line for the user."""


def find_soffice() -> str | None:
    env = os.environ.get("TUBEFUNCS_SOFFICE")
    if env:
        return env if os.path.isfile(env) else None
    for name in ("soffice", "libreoffice"):
        found = shutil.which(name)
        if found:
            return found
    candidates = ["/usr/lib/libreoffice/program/soffice", "/opt/libreoffice*/program/soffice",
                  "/Applications/LibreOffice.app/Contents/MacOS/soffice",
                  r"C:\Program Files\LibreOffice\program\soffice.exe"]
    for pattern in candidates:
        for c in sorted(glob.glob(pattern)):
            if os.path.isfile(c):
                return c
    return None


def _has_uno(python: str) -> bool:
    try:
        run = subprocess.run([python, "-c", "import uno"], capture_output=True, timeout=30)
    except (OSError, subprocess.TimeoutExpired):
        return False
    return run.returncode == 0


def find_uno_python(soffice: str | None = None) -> str | None:
    """A Python that can ``import uno`` (LibreOffice's own, or the system's with python3-uno)."""
    env = os.environ.get("TUBEFUNCS_UNO_PYTHON")
    if env:
        return env if _has_uno(env) else None
    candidates = []
    if soffice:
        program = Path(os.path.realpath(soffice)).parent
        candidates += [program / "python", program / "python.exe",
                       program.parent / "Resources" / "python"]   # macOS bundle
    candidates += [Path(sys.executable), Path("/usr/bin/python3")]
    for c in candidates:
        if c.is_file() and _has_uno(str(c)):
            return str(c)
    return None


def why_unavailable() -> str | None:
    """None when LibreOffice with Python-UNO is here, else the reason (one line)."""
    soffice = find_soffice()
    if soffice is None:
        return ("LibreOffice not found (install LibreOffice Calc, e.g. apt-get install "
                "libreoffice-calc-nogui python3-uno, or set TUBEFUNCS_SOFFICE)")
    if find_uno_python(soffice) is None:
        return ("LibreOffice's Python-UNO bridge not found (apt-get install python3-uno, or "
                "set TUBEFUNCS_UNO_PYTHON)")
    return None


class CalcSession:
    """One headless LibreOffice with the extension installed; use as a context manager."""

    def __init__(self, oxt: str | os.PathLike | None = None, start_timeout: float = START_TIMEOUT,
                 request_timeout: float = REQUEST_TIMEOUT, profile: Path | None = None):
        self.start_timeout = start_timeout
        self.request_timeout = request_timeout
        self.soffice = find_soffice()
        reason = why_unavailable()
        if reason:
            raise CalcUnavailable(reason)
        self.python = find_uno_python(self.soffice)
        self.tmp = Path(tempfile.mkdtemp(prefix="tubefuncs-calc-"))
        self.profile = profile or self.tmp / "profile"  # private unless one is given
        self.proc = None
        self._lines: list[str] = []
        self._cond = threading.Condition()
        self._reader = None
        try:
            self._start()
            if oxt is None:
                from .build import build_oxt

                oxt = build_oxt(self.tmp / "tubefuncs.oxt")
            self.request({"op": "install", "oxt": str(oxt)}, self.start_timeout * 2)
        except BaseException:
            self.close()
            raise

    # -- process ------------------------------------------------------------

    def _start(self):
        profile = Path(self.profile).resolve().as_uri()
        self._log = open(self.tmp / "soffice.log", "w")
        env = dict(os.environ)
        env.pop("PYTHONPATH", None)       # LibreOffice's Python must not see ours
        env.pop("PYTHONHOME", None)
        # LibreOffice's embedded Python finds its standard library through the
        # `python3` first on PATH: another Python there (an activated venv, pyenv)
        # makes it load a foreign standard library and fail.  Its own folder goes first.
        env["PATH"] = os.pathsep.join([str(Path(self.python).parent)]
                                      + [p for p in env.get("PATH", "").split(os.pathsep)
                                         if p and not _foreign_python_dir(p, self.python)])
        extra = os.environ.get("PYTHONPATH")
        if extra and not env.get("TUBEFUNCS_PYTHONPATH"):
            env["TUBEFUNCS_PYTHONPATH"] = extra  # a checkout first on the path stays first
        kwargs = {}
        if os.name == "posix":
            kwargs["start_new_session"] = True
        else:  # pragma: no cover - Windows
            kwargs["creationflags"] = subprocess.CREATE_NEW_PROCESS_GROUP
        self.proc = subprocess.Popen(
            [self.python, str(DRIVER), self.soffice, profile], stdin=subprocess.PIPE,
            stdout=subprocess.PIPE, stderr=self._log, text=True, env=env,
            cwd=str(self.tmp), **kwargs)
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()
        first = self._answer(self.start_timeout, "start-up")
        if not first.get("ok"):
            raise CalcUnavailable(f"LibreOffice did not start: {first.get('error')}")

    def _read(self):
        for line in self.proc.stdout:
            with self._cond:
                self._lines.append(line)
                self._cond.notify_all()
        with self._cond:
            self._lines.append("")  # end of output: the driver has gone
            self._cond.notify_all()

    def _answer(self, timeout: float, what: str) -> dict:
        deadline = time.monotonic() + timeout
        with self._cond:
            while not self._lines:
                left = deadline - time.monotonic()
                if left <= 0:
                    self.close()
                    raise CalcUnavailable(f"LibreOffice did not finish {what} within "
                                          f"{timeout:g} s (stopped it)")
                self._cond.wait(left)
            line = self._lines.pop(0)
        if not line:
            code = self.proc.poll() if self.proc else None
            self.close()
            raise CalcUnavailable(f"LibreOffice stopped during {what} (exit status {code})")
        return json.loads(line)

    def request(self, req: dict, timeout: float | None = None) -> dict:
        if self.proc is None:
            raise CalcUnavailable("LibreOffice session is closed")
        try:
            self.proc.stdin.write(json.dumps(req) + "\n")
            self.proc.stdin.flush()
        except (BrokenPipeError, OSError):
            self.close()
            raise CalcUnavailable("LibreOffice stopped (its driver is gone)") from None
        answer = self._answer(timeout or self.request_timeout, req.get("op", "request"))
        if not answer.get("ok"):
            raise CalcUnavailable(f"LibreOffice failed: {answer.get('error')}")
        return answer

    def close(self):
        proc, self.proc = self.proc, None
        if proc is not None:
            try:
                if proc.poll() is None:
                    try:
                        proc.stdin.write(json.dumps({"op": "quit"}) + "\n")
                        proc.stdin.flush()
                        proc.wait(timeout=20)
                    except (OSError, subprocess.TimeoutExpired, ValueError):
                        pass
            finally:
                _kill_group(proc)
        log = getattr(self, "_log", None)
        if log is not None:
            log.close()
        if os.environ.get("TUBEFUNCS_CALC_KEEP") and self.tmp is not None:
            return
        if self.tmp is not None and self.tmp.exists():
            shutil.rmtree(self.tmp, ignore_errors=True)

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def __del__(self):  # pragma: no cover - last resort
        try:
            self.close()
        except Exception:
            pass

    # -- requests ------------------------------------------------------------

    def recalc(self, src, dst) -> dict:
        return self.request({"op": "recalc", "input": str(Path(src).resolve()),
                             "output": str(Path(dst).resolve())})

    def cells(self, cells, read, repeat: int = 1) -> dict:
        return self.request({"op": "cells", "cells": cells, "read": read, "repeat": repeat})


def _foreign_python_dir(folder: str, uno_python: str) -> bool:
    """True for a PATH folder whose python3 is another Python than LibreOffice's."""
    for name in ("python3", "python"):
        exe = Path(folder) / name
        if exe.is_file():
            try:
                return exe.resolve() != Path(uno_python).resolve()
            except OSError:
                return True
    return "pyenv" in folder and "shims" in folder


def _kill_group(proc):
    if os.name == "posix":
        try:
            os.killpg(proc.pid, signal.SIGKILL)
        except (ProcessLookupError, PermissionError):
            pass
    else:  # pragma: no cover - Windows
        subprocess.run(["taskkill", "/F", "/T", "/PID", str(proc.pid)], capture_output=True)
    try:
        proc.wait(timeout=10)
    except subprocess.TimeoutExpired:  # pragma: no cover
        pass
