"""``tubefuncs excel-setup [DIR]``: xlwings configuration and a starter workbook.

Writes into DIR (default: the current directory)

* ``xlwings.conf``: the directory configuration the xlwings add-in reads for
  every workbook in DIR: ``UDF MODULES`` = ``tubefuncs.excel.udfs`` and, on
  Windows, the Python that runs the functions (``INTERPRETER_WIN``, or
  ``CONDA PATH`` / ``CONDA ENV`` for a conda environment).  An existing file
  is updated in place: other settings in it are kept.
* ``tubefuncs-starter.xlsx``: a starter workbook (never overwritten without
  ``--force``).

Then prints the clicks that remain to be done in Excel.  Run it with the
Python in which tubefuncs and xlwings are installed: that is the interpreter
it writes into the configuration.
"""

from __future__ import annotations

import argparse
import os
import re
import sys
from pathlib import Path

from .generate import UDF_MODULE

CONF_NAME = "xlwings.conf"
STARTER_NAME = "tubefuncs-starter.xlsx"

# The add-in reads this file with VBA's ``Input #``: one ``"KEY","value"``
# pair a line, keys compared without regard to case.
_CONF_LINE = re.compile(r'^\s*"([^"]*)"\s*,\s*"([^"]*)"\s*$')


def conf_line(key: str, value: str) -> str:
    if '"' in key or '"' in value:
        raise ValueError(f"xlwings.conf cannot hold a double quote: {key}={value!r}")
    return f'"{key}","{value}"'


def parse_conf(text: str) -> dict[str, str]:
    """Settings of an xlwings.conf text, keys upper-cased (as the add-in compares them)."""
    out = {}
    for line in text.splitlines():
        m = _CONF_LINE.match(line)
        if m:
            out.setdefault(m.group(1).upper(), m.group(2))
    return out


def merge_conf(old_text: str, settings: dict[str, str]) -> str:
    """``old_text`` with ``settings`` set (replaced in place or appended), CRLF lines."""
    wanted = {k.upper(): (k, v) for k, v in settings.items()}
    done: set[str] = set()
    lines = []
    for line in old_text.splitlines():
        m = _CONF_LINE.match(line)
        key = m.group(1).upper() if m else None
        if key in wanted:
            if key not in done:
                lines.append(conf_line(*wanted[key]))
                done.add(key)
            continue
        if line.strip():
            lines.append(line)
    for key, (name, value) in wanted.items():
        if key not in done:
            lines.append(conf_line(name, value))
    return "\r\n".join(lines) + "\r\n"


# addin/xlwings.conf.example holds exactly this text (a test keeps it so).
EXAMPLE_INTERPRETER = r"%LOCALAPPDATA%\Programs\Python\Python311\pythonw.exe"


def example_conf() -> str:
    """The xlwings.conf template shipped in addin/ (the add-in expands %VARIABLES%)."""
    return merge_conf("", {"UDF MODULES": UDF_MODULE, "INTERPRETER_WIN": EXAMPLE_INTERPRETER})


def _in_site_packages(path: Path) -> bool:
    return any(part in ("site-packages", "dist-packages") for part in path.parts)


def python_settings(interpreter: str | None = None, conda_path: str | None = None,
                    conda_env: str | None = None,
                    platform: str = sys.platform) -> tuple[dict, list]:
    """Settings naming the Python that runs the functions, and notes for the user."""
    settings: dict[str, str] = {}
    notes: list[str] = []
    if conda_path or conda_env:
        if not (conda_path and conda_env):
            raise SystemExit("excel-setup: give both --conda-path and --conda-env")
        settings["CONDA PATH"] = conda_path
        settings["CONDA ENV"] = conda_env
        settings["INTERPRETER_WIN"] = ""
        return settings, notes
    if interpreter:
        settings["INTERPRETER_WIN"] = interpreter
        return settings, notes
    if not platform.startswith("win"):
        notes.append("Not on Windows: no interpreter written. Run excel-setup on the Windows "
                     "PC that runs Excel, or pass --interpreter C:\\path\\to\\pythonw.exe.")
        return settings, notes
    prefix = Path(sys.prefix)
    conda_exe = os.environ.get("CONDA_EXE")
    if (prefix / "conda-meta").is_dir() and conda_exe:
        base = Path(conda_exe).resolve().parents[1]
        settings["CONDA PATH"] = str(base)
        settings["CONDA ENV"] = "base" if prefix.resolve() == base else str(prefix)
        settings["INTERPRETER_WIN"] = ""   # the add-in wants it empty with conda
        notes.append("conda environment found: Conda Path and Conda Env written "
                     "(Interpreter left empty, as the add-in expects with conda).")
        return settings, notes
    exe = Path(sys.executable)
    windowless = exe.with_name("pythonw.exe")
    settings["INTERPRETER_WIN"] = str(windowless if windowless.is_file() else exe)
    return settings, notes


def pythonpath_setting(platform: str = sys.platform) -> dict[str, str]:
    """PYTHONPATH for a source checkout that is not installed (Windows only)."""
    import tubefuncs

    root = Path(tubefuncs.__file__).resolve().parent.parent
    if platform.startswith("win") and not _in_site_packages(root):
        return {"PYTHONPATH": str(root)}
    return {}


def write_conf(directory: Path, settings: dict[str, str]) -> tuple[Path, bool]:
    path = directory / CONF_NAME
    old = ""
    if path.is_file():
        old = path.read_bytes().decode("utf-8", errors="replace")
    new = merge_conf(old, settings)
    # The add-in reads the file with VBA, in the Windows ANSI code page.
    encoding = "mbcs" if sys.platform.startswith("win") else "utf-8"
    changed = new != old
    if changed:
        path.write_bytes(new.encode(encoding, errors="replace"))
    return path, changed


NEXT_STEPS = """\
Next, in Excel on Windows (once per PC, then once per workbook; details in addin/README.md):
  1. Command prompt, with Excel closed:  xlwings addin install
  2. Excel: File > Options > Trust Center > Trust Center Settings > Macro Settings >
     tick "Trust access to the VBA project object model".
  3. Open {starter} and save it as an Excel Macro-Enabled Workbook (.xlsm) in {directory}.
  4. Alt+F11 (VBA editor) > Tools > References > tick "xlwings" > OK; close the editor.
  5. xlwings tab > Import Functions.  Then Ctrl+Alt+F9 recalculates every cell.
Cells show "#NAME?" until step 5 is done in that workbook."""


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="tubefuncs excel-setup",
        description="Write the xlwings configuration for the tubefuncs worksheet functions "
                    "and a starter workbook into DIR.")
    parser.add_argument("directory", nargs="?", default=".", metavar="DIR",
                        help="folder for xlwings.conf and the starter workbook (default: .)")
    parser.add_argument("--interpreter", metavar="PATH",
                        help="Python for Excel to run (default: this Python; pythonw.exe "
                             "beside it when present)")
    parser.add_argument("--conda-path", metavar="PATH",
                        help="conda installation folder (use with --conda-env instead of "
                             "--interpreter)")
    parser.add_argument("--conda-env", metavar="NAME",
                        help="conda environment name or folder")
    parser.add_argument("--no-workbook", action="store_true",
                        help="write the configuration only")
    parser.add_argument("--force", action="store_true",
                        help="overwrite an existing starter workbook")
    args = parser.parse_args(argv)

    directory = Path(args.directory)
    directory.mkdir(parents=True, exist_ok=True)
    settings = {"UDF MODULES": UDF_MODULE}
    python, notes = python_settings(args.interpreter, args.conda_path, args.conda_env)
    settings.update(python)
    settings.update(pythonpath_setting())
    try:
        conf, changed = write_conf(directory, settings)
    except ValueError as exc:
        print(f"excel-setup: {exc}", file=sys.stderr)
        return 2
    print(f"{conf}: {'written' if changed else 'unchanged'}")
    for key, value in settings.items():
        print(f"    {key} = {value if value else '(empty)'}")

    starter = directory / STARTER_NAME
    if args.no_workbook:
        pass
    elif starter.exists() and not args.force:
        print(f"{starter}: exists, left alone (--force overwrites it)")
    else:
        from .starter import build  # openpyxl only when a workbook is wanted

        report = build(starter)
        print(f"{starter}: written ({len(report['placed'])} example formulas)")
        for problem in report["broken"]:
            print(f"    example left out: {problem}", file=sys.stderr)
    for note in notes:
        print(f"Note: {note}")
    print(NEXT_STEPS.format(starter=STARTER_NAME, directory=directory.resolve()))
    return 0


if __name__ == "__main__":
    sys.exit(main())
