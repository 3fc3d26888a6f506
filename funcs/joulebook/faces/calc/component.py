"""joulebook's worksheet functions in LibreOffice Calc: the extension's component.

``joulebook calc-extension`` copies this file into the extension as ``joulebook_calc.py``,
beside ``joulebook_calc.json`` (the catalog's function names, one-line help and arguments, and
the Python joulebook is installed in).  LibreOffice's own Python runs it, so it uses the
standard library and ``uno`` only; joulebook's package never imports it.

Each worksheet function is a method of ``org.joulebook.calc.XFunctions`` (the extension's
type library): a hidden first argument (the calling document, from which the ``JB_ERRORS``
name is read), then one ``any`` per argument, returning a 2-D array.  A call is handed to a
worker process — ``python -m joulebook.faces.calc.worker`` with joulebook's Python — which answers
with joulebook's cell-call path, so Calc shows what Excel and the headless engine show.

What Calc hands an add-in, and what this file does with it:

* a number, a text, an omitted argument (``None``), or a range/array as rows of values in
  which an empty cell is ``""`` (read here as a blank).  A reference to a *single empty cell*
  arrives as 0: Calc's rule for add-in arguments, as for its own ``=A1+0``;
* a result is always a 2-D array (a single value is 1×1, which a plain formula shows as the
  value; an array formula fills its range); a blank result is an empty cell;
* a failure in the ``"values"`` error style is returned as Calc's error value (``#VALUE!``,
  ``#NUM!``, ``#N/A``): Calc keeps an error value as a NaN carrying the error's code.

When a workbook saved by Excel opens, the calls that Calc's import left unresolved — the
``_xludf.`` prefix, an add-in link ``[1]!JB_X``, or plain names it did not match — are
rewritten to the add-in's functions (the ``OpenedWorkbook`` job), and the document is left
unmodified.
"""

from __future__ import annotations

import json
import os
import struct
import subprocess
import sys
import threading

HERE = os.path.dirname(os.path.abspath(globals().get("__file__", ".")))
META_FILE = "joulebook_calc.json"
ERRORS_NAME = "JB_ERRORS"
PYTHON_ENV = "JOULEBOOK_PYTHON"

#: Calc's codes for the error values a failure may show (FormulaError)
CALC_ERRORS = {"#VALUE!": 519, "#NUM!": 503, "#N/A": 32767}


def load_meta(folder: str = HERE) -> dict:
    """The extension's metadata (empty when the file is missing)."""
    try:
        with open(os.path.join(folder, META_FILE), encoding="utf-8") as fh:
            return json.load(fh)
    except (OSError, ValueError):
        return {"functions": [], "python": "", "service": "_xludf"}


META = load_meta()
FUNCTIONS = {f["name"]: f for f in META.get("functions", [])}


def error_value(code: str) -> float:
    """Calc's error value *code* ("#NUM!") as the NaN that carries it."""
    bits = 0x7FF8000000000000 | CALC_ERRORS.get(code, CALC_ERRORS["#VALUE!"])
    return struct.unpack("<d", struct.pack("<Q", bits))[0]


def _element(v):
    if v is None or v == "":
        return None
    if isinstance(v, bool):
        return 1.0 if v else 0.0
    if isinstance(v, (int, float)):
        return float(v)
    return v if isinstance(v, str) else str(v)


def to_request(value):
    """An argument as Calc hands it, as a cell value of the worker's request."""
    if isinstance(value, (tuple, list)):
        return [[_element(v) for v in row] for row in value]
    if value is None:
        return None
    if isinstance(value, bool):
        return 1.0 if value else 0.0
    if isinstance(value, (int, float)):
        return float(value)
    return value if isinstance(value, str) else str(value)


def _out(v):
    if isinstance(v, dict):
        return error_value(v.get("error", "#VALUE!"))
    if isinstance(v, bool):
        return 1.0 if v else 0.0
    if isinstance(v, (int, float)):
        return float(v)
    return v  # a text or None (an empty cell)


def to_calc(value) -> tuple:
    """A worker's answer as the 2-D array Calc takes."""
    if isinstance(value, list):
        return tuple(tuple(_out(v) for v in row) for row in value) or ((None,),)
    return ((_out(value),),)


def python_path(meta: dict | None = None) -> str:
    """The Python joulebook is installed in: ``JOULEBOOK_PYTHON``, else the recorded one."""
    return os.environ.get(PYTHON_ENV) or (meta if meta is not None else META).get("python", "")


class WorkerError(Exception):
    """The worker could not be started or stopped while answering."""


class Worker:
    """One worker process per LibreOffice session, started on the first call."""

    def __init__(self, python: str):
        self.python = python
        self.proc = None
        self.lock = threading.Lock()

    def _start(self) -> None:
        env = dict(os.environ)
        for key in ("PYTHONHOME", "PYTHONPATH", "PYTHONSTARTUP", "PYTHONEXECUTABLE"):
            env.pop(key, None)  # LibreOffice's own Python settings are not joulebook's
        if not self.python or not os.path.exists(self.python):
            raise WorkerError(
                f"joulebook's Python {self.python!r} was not found; set {PYTHON_ENV} or "
                "rebuild the extension with `joulebook calc-extension`"
            )
        try:
            self.proc = subprocess.Popen(
                [self.python, "-m", "joulebook.faces.calc.worker"],
                stdin=subprocess.PIPE,
                stdout=subprocess.PIPE,
                stderr=subprocess.DEVNULL,
                env=env,
                creationflags=getattr(subprocess, "CREATE_NO_WINDOW", 0),
            )
        except OSError as e:
            raise WorkerError(f"joulebook's Python {self.python!r} could not start: {e}") from e

    def stop(self) -> None:
        proc, self.proc = self.proc, None
        if proc is not None:
            try:
                proc.kill()
                proc.wait(5)
            except Exception:
                pass

    def ask(self, request: dict):
        """The worker's answer to *request* (started or restarted as needed)."""
        line = (json.dumps(request, allow_nan=False) + "\n").encode("utf-8")
        with self.lock:
            for _ in range(2):
                if self.proc is None or self.proc.poll() is not None:
                    self._start()
                try:
                    self.proc.stdin.write(line)
                    self.proc.stdin.flush()
                    reply = self.proc.stdout.readline()
                    if reply:
                        return json.loads(reply.decode("utf-8"))["v"]
                except (OSError, ValueError, KeyError):
                    pass
                self.stop()
        raise WorkerError(f"joulebook's worker stopped while computing {request.get('f')}")


_WORKER = None


def worker() -> Worker:
    global _WORKER
    if _WORKER is None:
        _WORKER = Worker(python_path())
    return _WORKER


def errors_text(caller):
    """The content of the calling document's ``JB_ERRORS`` name (None when absent)."""
    try:
        names = caller.getPropertyValue("NamedRanges")
        if names.hasByName(ERRORS_NAME):
            return names.getByName(ERRORS_NAME).getContent()
    except Exception:  # the function wizard's caller has no names
        pass
    return None


def compute(name: str, caller, args) -> tuple:
    """One worksheet call: Calc's arguments in, Calc's 2-D array out."""
    values = [to_request(a) for a in args]
    while values and values[-1] is None:
        values.pop()  # omitted trailing arguments
    errors = errors_text(caller) if caller is not None else None
    try:
        return to_calc(worker().ask({"f": name, "a": values, "e": errors}))
    except WorkerError as e:
        style = "values" if str(errors or "").strip().strip('"=').lower() == "values" else ""
        return ((error_value("#VALUE!") if style else f"InternalError: {e}",),)


# --- rewriting the calls Calc's import left unresolved -------------------------------------


def _string_end(text: str, i: int) -> int:
    j = i + 1
    while j < len(text):
        if text[j] == '"':
            if j + 1 < len(text) and text[j + 1] == '"':
                j += 2
                continue
            return j + 1
        j += 1
    return j


_RUN = set("_.!$[]") | set("0123456789")


def fix_formula(text: str, names, resolved_prefix: str) -> str | None:
    """*text* with each call of one of *names* written plainly (``JB_X(``), when any was
    written otherwise (``_xludf.jb_x(``, ``[1]!JB_X(``, ``[1]!SERVICE.JB_X(``); None when
    nothing needs rewriting.  Text inside string literals is left alone."""
    out = []
    i, n, changed = 0, len(text), False
    while i < n:
        ch = text[i]
        if ch == '"':
            j = _string_end(text, i)
            out.append(text[i:j])
            i = j
            continue
        if ch.isalpha() or ch in "_[":
            j = i
            while j < n and (text[j].isalpha() or text[j] in _RUN):
                j += 1
            run = text[i:j]
            if j < n and text[j] == "(":
                tail = run.rsplit("!", 1)[-1].rsplit(".", 1)[-1].upper()
                if tail in names and run != resolved_prefix + tail:
                    out.append(tail)
                    changed = True
                    i = j
                    continue
            out.append(run)
            i = j
            continue
        out.append(ch)
        i += 1
    return "".join(out) if changed else None


def fix_document(doc, names=None) -> int:
    """Rewrite the unresolved joulebook calls of a spreadsheet document; the count."""
    names = set(FUNCTIONS) if names is None else set(names)
    prefix = META.get("service", "_xludf").upper() + "."
    was_modified = doc.isModified()
    count = 0
    for sheet in doc.getSheets():
        blocks = sheet.queryContentCells(16)  # CellFlags.FORMULA
        for k in range(blocks.getCount()):
            block = blocks.getByIndex(k)
            area = block.getRangeAddress()
            done = set()
            for r, row in enumerate(block.getFormulaArray()):
                for c, text in enumerate(row):
                    fixed = fix_formula(text, names, prefix)
                    col, line = area.StartColumn + c, area.StartRow + r
                    if fixed is None or (col, line) in done:
                        continue
                    cell = sheet.getCellByPosition(col, line)
                    if fixed.startswith("{") and fixed.endswith("}"):
                        cursor = sheet.createCursorByRange(cell)
                        cursor.collapseToCurrentArray()
                        a = cursor.getRangeAddress()
                        for rr in range(a.StartRow, a.EndRow + 1):
                            for cc in range(a.StartColumn, a.EndColumn + 1):
                                done.add((cc, rr))
                        cursor.setArrayFormula(fixed[1:-1])
                    else:
                        cell.setFormula(fixed)
                    count += 1
    if count and not was_modified:
        doc.setModified(False)
    return count


# --- the UNO side ----------------------------------------------------------------------------

try:
    import unohelper
    from com.sun.star.lang import Locale, XLocalizable, XServiceInfo, XServiceName
    from com.sun.star.sheet import LocalizedName, XAddIn, XCompatibilityNames
    from com.sun.star.task import XJob
    from org.joulebook.calc import XFunctions
except ImportError:  # outside LibreOffice (joulebook's tests read the helpers above)
    unohelper = None

IMPLEMENTATION = "org.joulebook.calc.Functions"
JOB = "org.joulebook.calc.OpenedWorkbook"
ADDIN_SERVICE = "com.sun.star.sheet.AddIn"


def _argument(name: str, index: int) -> dict | None:
    f = FUNCTIONS.get(name)
    if f is None or index < 1 or index > len(f["args"]):
        return None
    return f["args"][index - 1]  # index 0 is the hidden caller


if unohelper is not None:

    class Functions(unohelper.Base, XFunctions, XAddIn, XCompatibilityNames, XServiceName,
                    XServiceInfo, XLocalizable):  # fmt: skip
        """The add-in: one method per worksheet function (attached below)."""

        def __init__(self, ctx=None):
            self.ctx = ctx
            self.locale = Locale("en", "US", "")

        # XAddIn
        def getProgrammaticFuntionName(self, display):
            name = str(display).upper()
            return name if name in FUNCTIONS else ""

        def getDisplayFunctionName(self, name):
            return name

        def getFunctionDescription(self, name):
            f = FUNCTIONS.get(name)
            return f["help"] if f else ""

        def getDisplayArgumentName(self, name, index):
            a = _argument(name, index)
            return a["name"] if a else ""

        def getArgumentDescription(self, name, index):
            a = _argument(name, index)
            if a is None:
                return ""
            return a["help"]

        def getProgrammaticCategoryName(self, name):
            return "Add-In"

        def getDisplayCategoryName(self, name):
            return "Add-In"

        # XCompatibilityNames: the name in Excel files
        def getCompatibilityNames(self, name):
            return (LocalizedName(Locale("en", "US", ""), name),)

        # XLocalizable
        def setLocale(self, locale):
            self.locale = locale

        def getLocale(self):
            return self.locale

        # XServiceName: the prefix of the functions' stored names ("_xludf.JB_X" in files)
        def getServiceName(self):
            return META.get("service", "_xludf")

        # XServiceInfo
        def getImplementationName(self):
            return IMPLEMENTATION

        def supportsService(self, name):
            return name in (ADDIN_SERVICE, IMPLEMENTATION)

        def getSupportedServiceNames(self):
            return (ADDIN_SERVICE,)

    def _method(name):
        def method(self, caller, *args):
            return compute(name, caller, args)

        method.__name__ = name
        return method

    for _name in FUNCTIONS:
        setattr(Functions, _name, _method(_name))

    class OpenedWorkbook(unohelper.Base, XJob, XServiceInfo):
        """A job run when a document is opened: rewrites unresolved joulebook calls."""

        def __init__(self, ctx=None):
            self.ctx = ctx

        def execute(self, arguments):
            model = None
            for arg in arguments:
                if arg.Name == "Environment":
                    for item in arg.Value:
                        if item.Name == "Model":
                            model = item.Value
            try:
                if model is not None and model.supportsService(
                    "com.sun.star.sheet.SpreadsheetDocument"
                ):
                    fix_document(model)
            except Exception as e:  # never break opening a document
                print(f"joulebook: calls not rewritten: {e}", file=sys.stderr)
            return None

        def getImplementationName(self):
            return JOB

        def supportsService(self, name):
            return name == JOB

        def getSupportedServiceNames(self):
            return (JOB,)

    g_ImplementationHelper = unohelper.ImplementationHelper()
    g_ImplementationHelper.addImplementation(Functions, IMPLEMENTATION, (ADDIN_SERVICE,))
    g_ImplementationHelper.addImplementation(OpenedWorkbook, JOB, (JOB,))
