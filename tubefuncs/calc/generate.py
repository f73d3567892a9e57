"""Write the Calc extension's files from the catalogue.

    python -m tubefuncs.calc.generate           # rewrite tubefuncs/calc/extension/
    python -m tubefuncs.calc.generate --check   # exit 1 when a file is stale

Files (all generated, all checked in):

``XFunctions.idl`` / ``XFunctions.rdb``
    the interface of our functions in UNO IDL and its compiled type library
    (``unoidl-write`` from LibreOffice's SDK, package ``libreoffice-dev``);
    every parameter is ``any`` (a number, a text or a range can be given, an
    argument can be omitted) and every result ``sequence< sequence< any > >``
    (the one type through which Calc takes an array from a Python component).
``tubefuncs_calc.py``
    the Python UNO component: one method per catalogue function, each only
    calling :func:`tubefuncs.calc.adapter.call`, plus ``TUBE_ERROR_TEXT``.
``CalcAddIns.xcu``
    names, descriptions and argument help as Calc's Function Wizard shows them.
``description.xml``, ``META-INF/manifest.xml``, ``tubefuncs.components``
    the extension's description, manifest and passive component registration.

The ``.oxt`` itself is packed by :mod:`tubefuncs.calc.build` (it adds where
LibreOffice's Python finds numpy and tubefuncs on the user's machine).
"""

from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path
from xml.sax.saxutils import escape

from .. import __version__
from ..catalogue import CATALOGUE
from ..excel.generate import argument_help, function_help
from . import EXTENSION_ID, IMPLEMENTATION, INTERFACE, SERVICE

EXT_DIR = Path(__file__).with_name("extension")
REGENERATE = "python -m tubefuncs.calc.generate"
CATEGORY = "Add-In"   # Calc's own category for extension functions
IDL_NAME = "XFunctions.idl"
RDB_NAME = "XFunctions.rdb"
COMPONENT_NAME = "tubefuncs_calc.py"
COMPONENTS_NAME = "tubefuncs.components"

#: Words that UNO IDL reserves: a parameter so named gets a trailing underscore in the IDL.
IDL_RESERVED = frozenset("""
any attribute boolean bound byte char const constants constrained double enum exception
false float get hyper in inout interface long maybeambiguous maybedefault maybevoid module
needs observes oneway optional out property published raises readonly removable sequence
service set short singleton string struct transient true type typedef unsigned void
""".split())

#: Our Calc-only companion: the message of a call's error.
ERROR_TEXT = "TUBE_ERROR_TEXT"
ERROR_TEXT_HELP = ("Message of the error (#VALUE!, #NUM!) that a tubefuncs call gives for "
                   "these arguments, or empty text when it has none. Give the function name "
                   "and then the same arguments as the call.")


#: Result type of every function: Calc takes an array result only when the method
#: is declared so (pyuno cannot hand it over through ``any``); a single value is a
#: 1 x 1 array, which Calc shows as that value.
RESULT = "sequence< sequence< any > >"


def idl_name(name: str) -> str:
    """Parameter name in the IDL: camel case (unoidl-write refuses '_' before a small
    letter), with a trailing 'Arg' for a word IDL reserves.  Calc shows the catalogue's
    own name (the xcu's DisplayName)."""
    head, *rest = name.split("_")
    camel = head + "".join(w[:1].upper() + w[1:] for w in rest)
    return camel + "Arg" if camel.lower() in IDL_RESERVED else camel


def _functions():
    return list(CATALOGUE.values())


def render_idl() -> str:
    module, _, iface = INTERFACE.rpartition(".")
    parts = module.split(".")
    lines = ["// GENERATED FILE: do not edit. Regenerate with: " + REGENERATE,
             f"// {len(CATALOGUE)} tubefuncs {__version__} functions from tubefuncs.catalogue.",
             " ".join(f"module {p} {{" for p in parts),
             f"  interface {iface} : com::sun::star::uno::XInterface {{"]
    for fn in _functions():
        args = ", ".join(f"[in] any {idl_name(p.name)}" for p in fn.worksheet_params)
        lines.append(f"    {RESULT} {fn.name}({args});")
    lines.append(f"    {RESULT} {ERROR_TEXT}([in] any functionName, "
                 "[in] sequence< any > arguments);")
    lines.append("  };")
    lines.append(" ".join("};" for _ in parts))
    return "\n".join(lines) + "\n"


COMPONENT_HEADER = '''\
"""tubefuncs worksheet functions for LibreOffice Calc: the extension's UNO component.

GENERATED FILE: do not edit.  Regenerate with: {regenerate}
{count} catalogue functions plus {error_text}.  Each method only calls
tubefuncs.calc.adapter; this file runs inside LibreOffice's own Python, which
finds numpy and tubefuncs through tubefuncs_paths.json (written beside this
file by `tubefuncs calc-setup`) or the TUBEFUNCS_PYTHONPATH environment
variable (entries separated like PATH).
"""

import json
import os
import sys

import unohelper
from com.sun.star.lang import XServiceInfo, XServiceName
from {module} import {iface}

IMPLEMENTATION = "{implementation}"
SERVICE = "{service}"
SERVICES = (SERVICE, "com.sun.star.sheet.AddIn")
_STATE = {{"adapter": None, "problem": None}}


def _paths():
    here = os.path.dirname(os.path.abspath(globals().get("__file__", "") or "."))
    found = []
    try:
        with open(os.path.join(here, "tubefuncs_paths.json"), encoding="utf-8") as f:
            recorded = json.load(f)
        found += list(recorded.get("sys_path", []))
    except (OSError, ValueError):
        recorded = {{}}
    found += [p for p in os.environ.get("TUBEFUNCS_PYTHONPATH", "").split(os.pathsep) if p]
    return found, recorded


def _adapter():
    if _STATE["adapter"] is not None:
        return _STATE["adapter"]
    paths, recorded = _paths()
    for p in reversed(paths):
        if p not in sys.path:
            sys.path.insert(0, p)
    want = recorded.get("python", "")
    have = "{{}}.{{}}".format(*sys.version_info[:2])
    try:
        from tubefuncs.calc import adapter
    except Exception as exc:
        hint = ""
        if want and want != have:
            hint = (f" The recorded Python is {{want}} but LibreOffice runs Python {{have}}: "
                    f"install tubefuncs for a Python {{have}}.")
        _STATE["problem"] = (f"tubefuncs cannot be imported in LibreOffice's Python {{have}} "
                             f"({{type(exc).__name__}}: {{exc}}).{{hint}} Run `tubefuncs "
                             f"calc-setup` again or set TUBEFUNCS_PYTHONPATH.")
        raise RuntimeError(_STATE["problem"]) from None
    _STATE["adapter"] = adapter
    return adapter


def _out(value):
    # every method is declared to return sequence<sequence<any>> (see the IDL): a
    # single value goes back as a 1 x 1 array, which Calc shows as that value
    if isinstance(value, tuple):
        return value
    return ((value,),)


class Functions(unohelper.Base, {iface}, XServiceName, XServiceInfo):
    def __init__(self, ctx=None):
        self.ctx = ctx

    # XServiceName, XServiceInfo
    def getServiceName(self):
        return SERVICE

    def getImplementationName(self):
        return IMPLEMENTATION

    def supportsService(self, name):
        return name in SERVICES

    def getSupportedServiceNames(self):
        return SERVICES

    def _call(self, name, args):
        adapter = _adapter()
        try:
            return _out(adapter.call(name, args))
        except adapter.CalcCallError as exc:
            raise RuntimeError(exc.message) from None
        except Exception:
            import traceback

            if sys.stderr is not None:  # LibreOffice's standard error, where there is one
                traceback.print_exc()
            raise

    def {error_text}(self, functionName, arguments):
        try:
            adapter = _adapter()
        except RuntimeError as exc:
            return _out(str(exc)[:255])
        return _out(adapter.error_text(functionName, tuple(arguments)))
'''

COMPONENT_FOOTER = '''

g_ImplementationHelper = unohelper.ImplementationHelper()
g_ImplementationHelper.addImplementation(Functions, IMPLEMENTATION, SERVICES)
'''


def render_component() -> str:
    module, _, iface = INTERFACE.rpartition(".")
    out = [COMPONENT_HEADER.format(regenerate=REGENERATE, count=len(CATALOGUE),
                                   error_text=ERROR_TEXT, module=module, iface=iface,
                                   implementation=IMPLEMENTATION, service=SERVICE)]
    for fn in _functions():
        names = [idl_name(p.name) for p in fn.worksheet_params]
        sig = ", ".join(["self"] + names)
        tup = "(" + "".join(n + ", " for n in names).rstrip(" ") + ")" if names else "()"
        out.append(f"\n    def {fn.name}({sig}):\n"
                   f"        return self._call(\"{fn.name}\", {tup})\n")
    out.append(COMPONENT_FOOTER)
    return "".join(out)


def _x(text: str) -> str:
    return escape(" ".join(text.split()), {'"': "&quot;"})


def _prop(name: str, value: str, lang: bool = True) -> str:
    attr = ' xml:lang="en"' if lang else ""
    return f'<prop oor:name="{name}"><value{attr}>{_x(value)}</value></prop>'


def calc_function_help(fn) -> str:
    text = function_help(fn)
    tail = f" Error message: {ERROR_TEXT}(\"{fn.name}\"; same arguments)."
    return text + tail if len(text) + len(tail) <= 255 else text


def render_xcu() -> str:
    lines = ['<?xml version="1.0" encoding="UTF-8"?>',
             "<!-- GENERATED FILE: do not edit. Regenerate with: " + REGENERATE + " -->",
             '<oor:component-data xmlns:oor="http://openoffice.org/2001/registry" '
             'xmlns:xs="http://www.w3.org/2001/XMLSchema" oor:name="CalcAddIns" '
             'oor:package="org.openoffice.Office">',
             ' <node oor:name="AddInInfo">',
             f'  <node oor:name="{IMPLEMENTATION}" oor:op="replace">',
             '   <node oor:name="AddInFunctions">']

    def function(name, display, description, params):
        lines.append(f'    <node oor:name="{name}" oor:op="replace">')
        lines.append("     " + _prop("DisplayName", display))
        lines.append("     " + _prop("Description", description))
        lines.append("     " + _prop("Category", CATEGORY, lang=False))
        lines.append("     " + _prop("CompatibilityName", display, lang=False).replace(
            '<value>', '<value xml:lang="en-US">'))
        lines.append('     <node oor:name="Parameters">')
        for pname, shown, phelp in params:
            lines.append(f'      <node oor:name="{pname}" oor:op="replace">')
            lines.append("       " + _prop("DisplayName", shown))
            lines.append("       " + _prop("Description", phelp))
            lines.append("      </node>")
        lines.append("     </node>")
        lines.append("    </node>")

    for fn in _functions():
        function(fn.name, fn.name, calc_function_help(fn),
                 [(idl_name(p.name), p.name, argument_help(fn, p)) for p in fn.worksheet_params])
    function(ERROR_TEXT, ERROR_TEXT, ERROR_TEXT_HELP,
             [("functionName", "function_name", 'Name of a tubefuncs function, e.g. "TUBE_GAMMA".'),
              ("arguments", "arguments", "The arguments of the call whose error message you want, "
                            "in the same order.")])
    lines += ["   </node>", "  </node>", " </node>", "</oor:component-data>"]
    return "\n".join(lines) + "\n"


def render_description() -> str:
    return f'''<?xml version="1.0" encoding="UTF-8"?>
<!-- GENERATED FILE: do not edit. Regenerate with: {REGENERATE} -->
<description xmlns="http://openoffice.org/extensions/description/2006"
             xmlns:xlink="http://www.w3.org/1999/xlink">
  <identifier value="{EXTENSION_ID}"/>
  <version value="{__version__}"/>
  <display-name><name lang="en">tubefuncs: RF-tube worksheet functions</name></display-name>
  <dependencies>
    <OpenOffice.org-minimal-version xmlns:d="http://openoffice.org/extensions/description/2006"
        d:name="LibreOffice 7.0" value="3.4"/>
  </dependencies>
</description>
'''


def render_manifest() -> str:
    return f'''<?xml version="1.0" encoding="UTF-8"?>
<!-- GENERATED FILE: do not edit. Regenerate with: {REGENERATE} -->
<manifest:manifest xmlns:manifest="http://openoffice.org/2001/manifest">
  <manifest:file-entry manifest:media-type="application/vnd.sun.star.uno-typelibrary;type=RDB"
                       manifest:full-path="{RDB_NAME}"/>
  <manifest:file-entry manifest:media-type="application/vnd.sun.star.uno-components"
                       manifest:full-path="{COMPONENTS_NAME}"/>
  <manifest:file-entry manifest:media-type="application/vnd.sun.star.configuration-data"
                       manifest:full-path="CalcAddIns.xcu"/>
</manifest:manifest>
'''


def render_components() -> str:
    return f'''<?xml version="1.0" encoding="UTF-8"?>
<!-- GENERATED FILE: do not edit. Regenerate with: {REGENERATE} -->
<!-- Passive registration: an active one would run before our own types are loaded. -->
<components xmlns="http://openoffice.org/2010/uno-components">
  <component loader="com.sun.star.loader.Python" uri="./{COMPONENT_NAME}">
    <implementation name="{IMPLEMENTATION}">
      <service name="{SERVICE}"/>
      <service name="com.sun.star.sheet.AddIn"/>
    </implementation>
  </component>
</components>
'''


def text_files() -> dict[str, str]:
    """Relative path -> text of every generated text file."""
    return {IDL_NAME: render_idl(), COMPONENT_NAME: render_component(),
            "CalcAddIns.xcu": render_xcu(), "description.xml": render_description(),
            "META-INF/manifest.xml": render_manifest(), COMPONENTS_NAME: render_components()}


# --- the compiled type library -------------------------------------------------

def find_unoidl_write() -> str | None:
    """Path of LibreOffice SDK's ``unoidl-write``, or None."""
    env = os.environ.get("TUBEFUNCS_UNOIDL_WRITE")
    candidates = [env] if env else []
    candidates += [shutil.which("unoidl-write") or "",
                   "/usr/lib/libreoffice/sdk/bin/unoidl-write",
                   "/opt/libreoffice/sdk/bin/unoidl-write",
                   "/Applications/LibreOffice.app/Contents/MacOS/unoidl-write"]
    for c in candidates:
        if c and os.path.isfile(c) and os.access(c, os.X_OK):
            return c
    return None


def _types_rdb(tool: str) -> str | None:
    sdk = Path(tool).resolve().parent.parent  # .../sdk/bin/unoidl-write -> .../sdk
    for c in (sdk.parent / "program" / "types.rdb", Path("/usr/lib/libreoffice/program/types.rdb"),
              sdk.parent / "Resources" / "ure" / "share" / "misc" / "types.rdb"):
        if c.is_file():
            return str(c)
    return None


def compile_rdb(idl_text: str, tool: str | None = None, timeout: float = 60.0) -> bytes:
    """The type library of ``idl_text``, compiled with unoidl-write."""
    tool = tool or find_unoidl_write()
    if tool is None:
        raise RuntimeError("unoidl-write not found (LibreOffice SDK: apt-get install "
                           "libreoffice-dev, or set TUBEFUNCS_UNOIDL_WRITE)")
    types = _types_rdb(tool)
    if types is None:
        raise RuntimeError("LibreOffice's types.rdb not found next to unoidl-write")
    with tempfile.TemporaryDirectory(prefix="tubefuncs-idl-") as tmp:
        idl = Path(tmp, IDL_NAME)
        idl.write_text(idl_text, encoding="utf-8")
        out = Path(tmp, RDB_NAME)
        run = subprocess.run([tool, types, str(idl), str(out)], capture_output=True,
                             text=True, timeout=timeout)
        if run.returncode != 0 or not out.is_file():
            raise RuntimeError(f"unoidl-write failed: {(run.stderr or run.stdout).strip()}")
        return out.read_bytes()


def stale(ext_dir: Path = EXT_DIR, with_rdb: bool = True) -> list[str]:
    """Generated files that differ from what the catalogue gives (empty: all current)."""
    bad = []
    for rel, text in text_files().items():
        path = ext_dir / rel
        if not path.is_file() or path.read_text(encoding="utf-8") != text:
            bad.append(rel)
    if with_rdb:
        rdb = ext_dir / RDB_NAME
        if not rdb.is_file() or rdb.read_bytes() != compile_rdb(text_files()[IDL_NAME]):
            bad.append(RDB_NAME)
    return bad


def write(ext_dir: Path = EXT_DIR) -> list[str]:
    """Write every generated file; return those that changed."""
    changed = []
    files = text_files()
    for rel, text in files.items():
        path = ext_dir / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        if not path.is_file() or path.read_text(encoding="utf-8") != text:
            path.write_text(text, encoding="utf-8", newline="\n")
            changed.append(rel)
    rdb = ext_dir / RDB_NAME
    data = compile_rdb(files[IDL_NAME])
    if not rdb.is_file() or rdb.read_bytes() != data:
        rdb.write_bytes(data)
        changed.append(RDB_NAME)
    return changed


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(
        prog="python -m tubefuncs.calc.generate",
        description="Write the Calc extension's files (tubefuncs/calc/extension/) from the "
                    "catalogue.")
    parser.add_argument("--check", action="store_true",
                        help="do not write; exit 1 when a checked-in file is stale")
    args = parser.parse_args(argv)
    if args.check:
        bad = stale(with_rdb=find_unoidl_write() is not None)
        if bad:
            print(f"stale: {', '.join(bad)}; run: {REGENERATE}", file=sys.stderr)
            return 1
        print(f"{EXT_DIR}: up to date ({len(CATALOGUE)} functions)")
        return 0
    try:
        changed = write()
    except RuntimeError as exc:
        print(f"tubefuncs.calc.generate: {exc}", file=sys.stderr)
        return 2
    print(f"{EXT_DIR}: {'wrote ' + ', '.join(changed) if changed else 'unchanged'} "
          f"({len(CATALOGUE)} functions)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
