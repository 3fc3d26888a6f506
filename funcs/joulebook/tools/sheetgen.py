"""Generate the xlwings UDF module and the by-hand VBA module from the catalog.

``joulebook sheet`` writes ``funcs/joulebook/faces/sheet/udfs.py`` (the module users list in
xlwings' "UDF Modules") and ``workbooks/joulebook_udfs.bas`` (VBA wrappers written by xlwings'
own generator, for importing by hand).  Tests regenerate both and fail when the committed
copies are stale.
"""

from __future__ import annotations

import importlib
import io
import sys
import types
from pathlib import Path

from joulebook.catalog.arghelp import arg_doc

from ..catalog import CATALOG, FAMILIES, Func

UDF_MODULE = "joulebook.faces.sheet.udfs"
HEAVY_FAMILIES = ("process", "stored")  # not evaluated live in Excel's function wizard

_HEADER = '''"""joulebook worksheet functions for Excel (xlwings UDF module).

GENERATED from joulebook's catalog by `joulebook sheet` -- do not edit by hand.
Put `joulebook.faces.sheet.udfs` in xlwings' "UDF Modules" and click "Import Functions".
Each wrapper hands its cells to joulebook.catalog.call, the same path as the Python face;
`caller` (filled in by xlwings, not an Excel argument) is the calling range, whose workbook's
JB_ERRORS name sets the error style.
"""

import xlwings as _xw

from joulebook.faces.sheet.cells import cell as _cell
from joulebook.faces.sheet.cells import why as _why
'''


_arg_doc = arg_doc  # shared with the Calc face


def _py(s: str) -> str:
    return repr(s)


def _wrapper(f: Func) -> str:
    args = f.all_args
    params = ", ".join([*(f"{a.name}=None" if a.optional else a.name for a in args), "caller=None"])
    lines = []
    opts = f"category={_py('joulebook · ' + FAMILIES[f.family])}"
    if f.family in HEAVY_FAMILIES:
        opts += ", call_in_wizard=False"
    lines.append(f"@_xw.func({opts})")
    for a in args:
        how = "'range'" if f.reads_message else "ndim=2, err_to_str=True"
        lines.append(f"@_xw.arg({_py(a.name)}, {how}, doc={_py(_arg_doc(a))})")
    lines.append(f"def {f.name}({params}):")
    lines.append(f"    {_py(f.help)}")
    call_args = ", ".join([_py(f.name), *(a.name for a in args), "caller=caller"])
    lines.append(f"    return {'_why' if f.reads_message else '_cell'}({call_args})")
    return "\n".join(lines)


def udf_source() -> str:
    """The complete text of the generated UDF module."""
    names = ", ".join(_py(f.name) for f in CATALOG)
    parts = [_HEADER, f"__all__ = [{names}]", *(_wrapper(f) for f in CATALOG)]
    return "\n\n\n".join(parts).rstrip() + "\n"


# ---------------------------------------------------------------------------------------
# xlwings' own UDF machinery on a machine without Excel


def _stub(name: str, **attrs) -> types.ModuleType:
    mod = types.ModuleType(name)
    mod.__dict__.update(attrs)
    return mod


def windows_stubs() -> dict[str, types.ModuleType]:
    """Minimal stand-ins for the Windows-only modules xlwings.udfs imports at top level."""

    class _ComError(Exception):
        pass

    def _dispatch(*_a, **_k):  # pragma: no cover - never called headless
        raise RuntimeError("no COM on this machine")

    class _Variant:  # win32com.client.VARIANT: a typed COM value
        def __init__(self, vartype, value):
            self.varianttype, self.value = vartype, value

        def __repr__(self):
            return f"VARIANT({self.varianttype}, {self.value})"

    win32com = _stub("win32com")
    client = _stub("win32com.client", Dispatch=_dispatch, VARIANT=_Variant)
    win32com.client = client
    return {
        "pythoncom": _stub("pythoncom", CoInitialize=lambda: None, VT_ERROR=10),
        "pywintypes": _stub("pywintypes", com_error=_ComError, TimeType=type(None)),
        "win32com": win32com,
        "win32com.client": client,
    }


def load_xlwings_udfs():
    """Import the real ``xlwings.udfs`` with the Windows-only modules stubbed.

    Returns the module; afterwards ``xlwings.func/arg/ret`` are its real decorators (as on
    Windows), so importing a UDF module records the ``__xlfunc__`` metadata Excel receives.
    """
    for name, mod in windows_stubs().items():
        sys.modules.setdefault(name, mod)
    import xlwings

    udfs = importlib.import_module("xlwings.udfs")
    xlwings.func, xlwings.arg, xlwings.ret = udfs.xlfunc, udfs.xlarg, udfs.xlret
    return udfs


def load_udf_module():
    """(Re)import our UDF module under the real xlwings decorators."""
    load_xlwings_udfs()
    if UDF_MODULE in sys.modules:
        return importlib.reload(sys.modules[UDF_MODULE])
    return importlib.import_module(UDF_MODULE)


class _Workbook:
    """What xlwings' VBA generator reads of a workbook: its name."""

    def __init__(self, name: str):
        self.Name = name


def vba_source(workbook_name: str = "joulebook.xlsm") -> str:
    """VBA wrappers written by xlwings' own generator, with import_udfs' module header."""
    udfs = load_xlwings_udfs()
    module = load_udf_module()
    buf = io.StringIO()
    vba = udfs.VBAWriter(buf)
    vba.writeln('Attribute VB_Name = "xlwings_udfs"')
    vba.writeln("'Autogenerated code by xlwings - changes will be lost with next import!")
    vba.writeln("""#Const App = "Microsoft Excel" 'Adjust when using outside of Excel""")
    udfs.generate_vba_wrapper(UDF_MODULE, module, buf, _Workbook(workbook_name))
    return buf.getvalue()


def paths(root: Path) -> tuple[Path, Path]:
    return (
        root / "funcs" / "joulebook" / "faces" / "sheet" / "udfs.py",
        root / "workbooks" / "joulebook_udfs.bas",
    )


def write(root: Path) -> list[Path]:
    """Write the UDF module and the .bas under project *root*."""
    py, bas = paths(root)
    py.write_text(udf_source(), encoding="utf-8")
    # the module must be importable from the new text before xlwings writes the VBA
    importlib.invalidate_caches()
    bas.parent.mkdir(parents=True, exist_ok=True)
    with open(bas, "w", encoding="utf-8", newline="\r\n") as fh:
        fh.write(vba_source())
    return [py, bas]
