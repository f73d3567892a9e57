"""``tubefuncs calc-setup``: build the LibreOffice Calc extension and install it.

    tubefuncs calc-setup                 # build, then install for this user (unopkg)
    tubefuncs calc-setup --no-install    # build only; print what to do
    tubefuncs calc-setup --profile DIR   # install into that LibreOffice profile folder

The ``.oxt`` (default: a per-user data folder, or ``--dir``) records where
LibreOffice's Python finds numpy, scipy, pint and tubefuncs: the folders of
the Python that runs this command.  LibreOffice's Python must therefore have
the same minor version (3.11 with 3.11): the command checks that and says
what to do otherwise.  Run it again after upgrading tubefuncs.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
from pathlib import Path

from .. import __version__
from ..catalogue import CATALOGUE

NEXT_STEPS = """\
Next, in LibreOffice:
  1. Quit LibreOffice completely (also the quick starter), then start Calc again:
     new functions answer only after a restart.
  2. In a cell type  =TUBE_VERSION()  -> it shows "tubefuncs {version}".
  3. Try  =TUBE_TRANSIT_ANGLE("2.998 GHz"; "12 mm"; "80 kV"; "deg")
     (Calc separates arguments with ';' or ',' depending on your locale).
A cell showing #VALUE! or #NUM!: =TUBE_ERROR_TEXT("TUBE_...", same arguments) says why.
A cell showing #NAME?: see addin/CALC.md ("What to do on #NAME?")."""

MANUAL = """\
To install by hand: Tools > Extension Manager > Add..., choose
  {oxt}
("Only for me"), close the dialog and restart LibreOffice."""


def default_dir() -> Path:
    if sys.platform.startswith("win"):
        base = Path(os.environ.get("APPDATA") or Path.home() / "AppData" / "Roaming")
    elif sys.platform == "darwin":
        base = Path.home() / "Library" / "Application Support"
    else:
        base = Path(os.environ.get("XDG_DATA_HOME") or Path.home() / ".local" / "share")
    return base / "tubefuncs"


def _uno_python_version(python: str) -> str | None:
    try:
        run = subprocess.run([python, "-c", "import sys; print('%d.%d' % sys.version_info[:2])"],
                             capture_output=True, text=True, timeout=30)
    except (OSError, subprocess.TimeoutExpired):
        return None
    return run.stdout.strip() or None


def find_unopkg(soffice: str | None) -> str | None:
    if not soffice:
        return None
    program = Path(os.path.realpath(soffice)).parent
    for name in ("unopkg", "unopkg.exe", "unopkg.com"):
        if (program / name).is_file():
            return str(program / name)
    return None


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="tubefuncs calc-setup",
        description="Build the tubefuncs extension for LibreOffice Calc and install it.")
    parser.add_argument("--dir", type=Path, default=None,
                        help=f"where to write tubefuncs.oxt (default {default_dir()})")
    parser.add_argument("--no-install", action="store_true",
                        help="only build the .oxt and print how to install it")
    parser.add_argument("--profile", type=Path, default=None,
                        help="install into this LibreOffice user-profile folder (through the "
                             "ExtensionManager API; works as root, where unopkg refuses)")
    args = parser.parse_args(argv)

    from .build import build_oxt
    from .runner import find_soffice, find_uno_python

    out_dir = args.dir or default_dir()
    try:
        oxt = build_oxt(out_dir / "tubefuncs.oxt")
    except (OSError, RuntimeError) as exc:
        print(f"tubefuncs calc-setup: cannot build the extension: {exc}", file=sys.stderr)
        return 2
    here = "{}.{}".format(*sys.version_info[:2])
    print(f"built {oxt} ({len(CATALOGUE)} functions, tubefuncs {__version__}); it tells "
          f"LibreOffice's Python to import numpy and tubefuncs from this Python {here} "
          f"({sys.executable})")

    soffice = find_soffice()
    if soffice is None:
        print("LibreOffice not found on this machine (install it from your system's packages "
              "or libreoffice.org; set TUBEFUNCS_SOFFICE to its soffice program).")
        print(MANUAL.format(oxt=oxt))
        return 0 if args.no_install else 1
    uno_python = find_uno_python(soffice)
    lo_version = _uno_python_version(uno_python) if uno_python else None
    if uno_python is None:
        print("LibreOffice's Python (UNO bridge) not found: on Debian/Ubuntu "
              "apt-get install python3-uno; elsewhere it comes with LibreOffice.")
    elif lo_version != here:
        print(f"WARNING: LibreOffice runs Python {lo_version} ({uno_python}) but this is Python "
              f"{here}: numpy compiled for {here} will not load there. Install tubefuncs into "
              f"a Python {lo_version} and run its `tubefuncs calc-setup` (see addin/CALC.md).")
    else:
        print(f"LibreOffice's Python: {uno_python} (Python {lo_version}, matches)")

    if args.no_install:
        print(MANUAL.format(oxt=oxt))
        print(NEXT_STEPS.format(version=__version__))
        return 0
    if args.profile is not None:
        from .runner import CalcSession, CalcUnavailable

        try:
            CalcSession(oxt, profile=args.profile.resolve()).close()
        except CalcUnavailable as exc:
            print(f"tubefuncs calc-setup: {exc}", file=sys.stderr)
            print(MANUAL.format(oxt=oxt))
            return 1
        print(f"installed into the LibreOffice profile {args.profile}")
        print(NEXT_STEPS.format(version=__version__))
        return 0
    if os.name == "posix" and os.geteuid() == 0:
        print("running as root: unopkg refuses to install for one user. Run this command as "
              "the user who runs LibreOffice, give --profile DIR, or install by hand.")
        print(MANUAL.format(oxt=oxt))
        return 1
    unopkg = find_unopkg(soffice)
    if unopkg is None:
        print("unopkg (LibreOffice's extension tool) not found beside soffice.")
        print(MANUAL.format(oxt=oxt))
        return 1
    try:
        run = subprocess.run([unopkg, "add", "--force", "--suppress-license", str(oxt)],
                             capture_output=True, text=True, timeout=300)
    except (OSError, subprocess.TimeoutExpired) as exc:
        print(f"unopkg failed ({exc}); is LibreOffice running? Quit it and try again.")
        print(MANUAL.format(oxt=oxt))
        return 1
    if run.returncode != 0:
        first = (run.stderr or run.stdout).strip().splitlines()[:1]
        print(f"unopkg failed: {first[0] if first else run.returncode}; quit LibreOffice "
              "and try again, or install by hand.")
        print(MANUAL.format(oxt=oxt))
        return 1
    print("installed for this user with unopkg")
    print(NEXT_STEPS.format(version=__version__))
    return 0


if __name__ == "__main__":
    sys.exit(main())
