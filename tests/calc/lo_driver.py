"""Drive a headless LibreOffice with joulebook's Calc extension installed (test helper).

Run by LibreOffice's own Python (the one with ``uno``), not by joulebook's:

    python3 tests/calc/lo_driver.py EXTENSION WORKDIR BOOK [BOOK ...] > result.json

1. installs EXTENSION with ``unopkg add --shared`` into a shared-extensions folder and a user
   profile of its own under WORKDIR (never the system's: ``-env:`` overrides both, which also
   works as root, where ``unopkg add`` for a user is refused);
2. starts ``soffice --headless`` on that profile and connects over a pipe;
3. opens each BOOK hidden (the extension's job rewrites calls the import left unresolved),
   forces a hard recalculation (``calculateAll``), and exports every formula cell: sheet, row,
   column, formula, result kind, number, text, error code; with ``--save DIR`` it also saves
   each recalculated book as .xlsx into DIR;
4. lists the function wizard's entries of the JB_ functions (name, help, argument names).

Everything goes to standard output as one JSON document; LibreOffice is ended at the end.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time

import uno
from com.sun.star.beans import PropertyValue

RESULT_KIND = {1: "value", 2: "text", 4: "error"}  # com.sun.star.sheet.FormulaResult


def _prop(name, value):
    p = PropertyValue()
    p.Name, p.Value = name, value
    return p


def _env(workdir):
    shared = uno.systemPathToFileUrl(os.path.join(workdir, "shared"))
    return [
        "-env:UserInstallation=" + uno.systemPathToFileUrl(os.path.join(workdir, "profile")),
        "-env:UNO_SHARED_PACKAGES=" + shared,
        "-env:UNO_SHARED_PACKAGES_CACHE=" + shared + "/cache",
    ]


def _program(name):
    found = shutil.which(name)
    if found is None:
        raise SystemExit(f"{name} not found")
    return found


def install(extension, workdir):
    os.makedirs(os.path.join(workdir, "shared"), exist_ok=True)
    cmd = [_program("unopkg"), "add", "--shared", *_env(workdir), os.path.abspath(extension)]
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=300)
    if done.returncode != 0:
        raise SystemExit(f"unopkg add failed: {done.stdout} {done.stderr}")


def start(workdir):
    pipe = f"joulebook{os.getpid()}"
    cmd = [_program("soffice"), *_env(workdir), "--headless", "--invisible", "--norestore",
           "--nologo", f"--accept=pipe,name={pipe};urp;"]  # fmt: skip
    proc = subprocess.Popen(
        cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True
    )
    local = uno.getComponentContext()
    resolver = local.ServiceManager.createInstanceWithContext(
        "com.sun.star.bridge.UnoUrlResolver", local
    )
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline:
        try:
            ctx = resolver.resolve(f"uno:pipe,name={pipe};urp;StarOffice.ComponentContext")
            desktop = ctx.ServiceManager.createInstanceWithContext(
                "com.sun.star.frame.Desktop", ctx
            )
            desktop.getComponents()  # fails while LibreOffice restarts after installing
            return proc, ctx, desktop
        except Exception:
            time.sleep(0.25)
    stop(proc)
    raise SystemExit("LibreOffice did not answer within 120 s")


def stop(proc):
    try:
        os.killpg(proc.pid, signal.SIGKILL)
    except (ProcessLookupError, PermissionError):
        pass
    proc.wait(30)


def cells(doc):
    out = []
    for sheet in doc.getSheets():
        blocks = sheet.queryContentCells(16)  # formulas
        for k in range(blocks.getCount()):
            area = blocks.getByIndex(k).getRangeAddress()
            for row in range(area.StartRow, area.EndRow + 1):
                for col in range(area.StartColumn, area.EndColumn + 1):
                    cell = sheet.getCellByPosition(col, row)
                    kind = RESULT_KIND.get(cell.getPropertyValue("FormulaResultType2"), "?")
                    err = cell.getError()
                    out.append({
                        "sheet": sheet.getName(), "row": row + 1, "col": col + 1,
                        "formula": cell.getFormula(), "kind": "error" if err else kind,
                        "value": cell.getValue(), "text": cell.getString(), "error": err,
                    })  # fmt: skip
    return out


def wizard(ctx):
    fd = ctx.ServiceManager.createInstanceWithContext(
        "com.sun.star.sheet.FunctionDescriptions", ctx
    )
    out = {}
    for i in range(fd.getCount()):
        d = {p.Name: p.Value for p in fd.getByIndex(i)}
        if str(d["Name"]).upper().startswith("JB_"):
            out[d["Name"]] = {
                "help": d["Description"],
                "args": [[a.Name, a.Description] for a in d["Arguments"]],
            }
    return out


def main(argv):
    save = None
    if "--save" in argv:
        i = argv.index("--save")
        save = argv[i + 1]
        argv = argv[:i] + argv[i + 2 :]
    extension, workdir, *books = argv
    workdir = os.path.abspath(workdir)
    install(extension, workdir)
    proc, ctx, desktop = start(workdir)
    result = {"books": {}, "wizard": {}}
    try:
        result["wizard"] = wizard(ctx)
        for book in books:
            url = uno.systemPathToFileUrl(os.path.abspath(book))
            doc = desktop.loadComponentFromURL(url, "_blank", 0, (_prop("Hidden", True),))
            modified = doc.isModified()
            doc.calculateAll()
            result["books"][book] = {"cells": cells(doc), "modified_on_open": modified}
            if save:
                target = os.path.join(save, os.path.basename(book).rsplit(".", 1)[0] + ".xlsx")
                doc.storeToURL(
                    uno.systemPathToFileUrl(os.path.abspath(target)),
                    (_prop("FilterName", "Calc Office Open XML"),),
                )
            doc.close(True)
    finally:
        try:
            desktop.terminate()
        except Exception:
            pass
        stop(proc)
    json.dump(result, sys.stdout)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
