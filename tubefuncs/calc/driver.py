"""Drive a headless LibreOffice from LibreOffice's own Python (the one with ``uno``).

Run by :mod:`tubefuncs.calc.runner` as ``PYTHON-WITH-UNO driver.py SOFFICE PROFILE_URL``;
it reads one JSON request per line on standard input and answers one JSON line
on standard output.  It starts ``soffice`` itself (headless, the private
profile given, listening on a pipe of its own), so the runner can stop the
whole process group at once.  Requests:

``{"op": "install", "oxt": PATH}``
    add the extension for the profile's user through the ExtensionManager API
    (``unopkg`` refuses per-user installs as root), then restart soffice:
    extension functions answer only after a restart.
``{"op": "recalc", "input": PATH, "output": PATH}``
    load a workbook hidden, without macros, recalculate everything and save an
    Office Open XML copy; the input is never written.
``{"op": "cells", "cells": [[ADDRESS, KIND, CONTENT], ...], "read": [ADDRESS, ...]}``
    fill a new sheet (KIND ``value``, ``text``, ``formula`` or ``array``,
    ADDRESS of a range for ``array``), recalculate, read back values and
    error values.
``{"op": "describe", "prefix": "TUBE_"}``
    names, descriptions and argument help as Calc's Function Wizard shows them.
``{"op": "quit"}``

This file imports nothing of tubefuncs: it runs in a Python that may not see it.
"""

import json
import os
import subprocess
import sys
import time

import uno
from com.sun.star.beans import PropertyValue

ERROR_CODES = {503: "#NUM!", 519: "#VALUE!", 32767: "#N/A", 525: "#NAME?", 532: "#DIV/0!",
               524: "#REF!", 526: "#NULL!", 522: "#VALUE!", 504: "#VALUE!", 511: "#VALUE!"}


class _Env:
    """Command environment that approves every interaction and keeps the messages."""

    def __init__(self):
        import unohelper
        from com.sun.star.task import XInteractionHandler
        from com.sun.star.ucb import XCommandEnvironment, XProgressHandler

        outer = self
        self.messages = []

        class Handler(unohelper.Base, XInteractionHandler):
            def handle(self, request):
                try:
                    outer.messages.append(repr(request.getRequest())[:500])
                except Exception as exc:
                    outer.messages.append(f"(request unreadable: {exc})")
                approve = uno.getTypeByName("com.sun.star.task.XInteractionApprove")
                for cont in request.getContinuations():
                    try:
                        if cont.queryInterface(approve) is not None:
                            cont.select()
                            return
                    except Exception:
                        pass

        class Progress(unohelper.Base, XProgressHandler):
            def push(self, status):
                pass

            def update(self, status):
                pass

            def pop(self):
                pass

        class Env(unohelper.Base, XCommandEnvironment):
            def getInteractionHandler(self):
                return Handler()

            def getProgressHandler(self):
                return Progress()

        self.env = Env()


def prop(name, value):
    p = PropertyValue()
    p.Name = name
    p.Value = value
    return p


class Office:
    def __init__(self, soffice, profile_url):
        self.soffice = soffice
        self.profile_url = profile_url
        self.pipe = f"tubefuncs_{os.getpid()}_{int(time.time() * 1000)}"
        self.proc = None
        self.ctx = None
        self.desktop = None

    def start(self, timeout=90.0):
        self.pipe = f"tubefuncs_{os.getpid()}_{int(time.time() * 1000)}"
        args = [self.soffice, f"-env:UserInstallation={self.profile_url}", "--headless",
                "--invisible", "--nologo", "--norestore", "--nodefault", "--nolockcheck",
                "--nofirststartwizard",
                f"--accept=pipe,name={self.pipe};urp;StarOffice.ComponentContext"]
        self.proc = subprocess.Popen(args, stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
                                     stderr=None)
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext(
            "com.sun.star.bridge.UnoUrlResolver", local)
        deadline = time.monotonic() + timeout
        while True:
            try:
                self.ctx = resolver.resolve(
                    f"uno:pipe,name={self.pipe};urp;StarOffice.ComponentContext")
                break
            except Exception:
                if self.proc.poll() is not None and self.proc.returncode not in (0, 81):
                    raise RuntimeError(f"soffice exited with status {self.proc.returncode} "
                                       "during start-up") from None
                if time.monotonic() > deadline:
                    raise RuntimeError(f"soffice did not answer within {timeout:g} s") from None
                time.sleep(0.2)
        self.desktop = self.ctx.ServiceManager.createInstanceWithContext(
            "com.sun.star.frame.Desktop", self.ctx)

    def stop(self):
        if self.desktop is not None:
            try:
                self.desktop.terminate()
            except Exception:
                pass
        self.desktop = None
        self.ctx = None
        if self.proc is not None:
            try:
                self.proc.wait(timeout=30)
            except subprocess.TimeoutExpired:
                self.proc.kill()
                self.proc.wait()
        self.proc = None

    def install(self, oxt):
        manager = self.ctx.getValueByName("/singletons/com.sun.star.deployment.ExtensionManager")
        url = uno.systemPathToFileUrl(os.path.abspath(oxt))
        for ext in manager.getDeployedExtensions("user", None, None):
            if ext is not None and ext.getIdentifier().Value == self._identifier(oxt):
                manager.removeExtension(ext.getIdentifier().Value, ext.getName(), "user",
                                        None, None)
        env = _Env()
        try:
            manager.addExtension(url, (), "user", None, env.env)
        except Exception as exc:
            raise RuntimeError(f"{exc}; {' | '.join(env.messages)[:2000]}") from None
        self.stop()
        self.start()

    @staticmethod
    def _identifier(oxt):
        import re
        import zipfile

        with zipfile.ZipFile(oxt) as z:
            text = z.read("description.xml").decode("utf-8")
        m = re.search(r'<identifier value="([^"]+)"', text)
        return m.group(1) if m else ""

    def load(self, path):
        url = uno.systemPathToFileUrl(os.path.abspath(path))
        # MacroExecutionMode 0 = NEVER_EXECUTE; ReadOnly: the input is never written
        doc = self.desktop.loadComponentFromURL(
            url, "_blank", 0, (prop("Hidden", True), prop("MacroExecutionMode", 0),
                               prop("ReadOnly", True), prop("UpdateDocMode", 0)))
        if doc is None:
            raise RuntimeError(f"LibreOffice could not open {path}")
        return doc

    def recalc(self, src, dst):
        doc = self.load(src)
        try:
            start = time.perf_counter()
            doc.calculateAll()
            seconds = time.perf_counter() - start
            url = uno.systemPathToFileUrl(os.path.abspath(dst))
            doc.storeToURL(url, (prop("FilterName", "Calc Office Open XML"),))
        finally:
            doc.close(True)
        return {"seconds": seconds}

    def cells(self, cells, read, repeat=1):
        doc = self.desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0,
                                                (prop("Hidden", True),))
        try:
            sheet = doc.Sheets.getByIndex(0)
            for address, kind, content in cells:
                if kind == "array":
                    sheet.getCellRangeByName(address).setArrayFormula(content)
                    continue
                cell = sheet.getCellRangeByName(address)
                if kind == "value":
                    cell.setValue(float(content))
                elif kind == "text":
                    cell.setString(content)
                else:
                    cell.setFormula(content)
            start = time.perf_counter()
            for _ in range(max(1, int(repeat))):
                doc.calculateAll()
            seconds = (time.perf_counter() - start) / max(1, int(repeat))
            out = []
            for address in read:
                rng = sheet.getCellRangeByName(address)
                rows = []
                for r in range(rng.Rows.Count):
                    row = []
                    for c in range(rng.Columns.Count):
                        row.append(read_cell(rng.getCellByPosition(c, r)))
                    rows.append(row)
                out.append(rows)
            formulas = [sheet.getCellRangeByName(a).getCellByPosition(0, 0).getFormula()
                        for a in read]
        finally:
            doc.close(True)
        return {"values": out, "formulas": formulas, "seconds": seconds}


def describe(ctx, prefix):
    """What Calc's Function Wizard shows of every function whose name starts with prefix."""
    fd = ctx.ServiceManager.createInstanceWithContext(
        "com.sun.star.sheet.FunctionDescriptions", ctx)
    out = {}
    for i in range(fd.getCount()):
        props = {p.Name: p.Value for p in fd.getByIndex(i)}
        name = props.get("Name", "")
        if not name.upper().startswith(prefix):
            continue
        out[name] = {"description": props.get("Description", ""),
                     "category": props.get("Category", 0),
                     "arguments": [[a.Name, a.Description, bool(a.IsOptional)]
                                   for a in (props.get("Arguments") or ())]}
    return out


def read_cell(cell):
    from com.sun.star.table.CellContentType import EMPTY, TEXT

    code = cell.getError()
    if code:
        return {"error": ERROR_CODES.get(code, f"Err:{code}"), "code": code}
    kind = cell.getType()
    if kind == EMPTY:
        return None
    if kind == TEXT:
        return cell.getString()
    # formula or value: FormulaResultType2 tells text from number (2 = TEXT)
    try:
        if kind.value == "FORMULA" and cell.getPropertyValue("FormulaResultType2") == 2:
            return cell.getString()
    except Exception:
        pass
    return cell.getValue()


def main():
    soffice, profile_url = sys.argv[1], sys.argv[2]
    office = Office(soffice, profile_url)
    out = sys.stdout
    try:
        office.start()
        out.write(json.dumps({"ok": True, "ready": True}) + "\n")
        out.flush()
        for line in sys.stdin:
            if not line.strip():
                continue
            req = json.loads(line)
            op = req.get("op")
            try:
                if op == "quit":
                    answer = {"ok": True}
                elif op == "install":
                    office.install(req["oxt"])
                    answer = {"ok": True}
                elif op == "recalc":
                    answer = {"ok": True, **office.recalc(req["input"], req["output"])}
                elif op == "describe":
                    answer = {"ok": True,
                              "functions": describe(office.ctx, req.get("prefix", "TUBE_"))}
                elif op == "cells":
                    answer = {"ok": True, **office.cells(req["cells"], req["read"],
                                                         req.get("repeat", 1))}
                else:
                    answer = {"ok": False, "error": f"unknown request {op!r}"}
            except Exception as exc:
                answer = {"ok": False, "error": f"{type(exc).__name__}: {exc}"}
            out.write(json.dumps(answer) + "\n")
            out.flush()
            if op == "quit":
                break
    except Exception as exc:
        out.write(json.dumps({"ok": False, "error": f"{type(exc).__name__}: {exc}"}) + "\n")
        out.flush()
    finally:
        office.stop()


if __name__ == "__main__":
    main()
