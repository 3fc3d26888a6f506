"""Drive xlwings' own UDF call path (xlwings.udfs.call_udf) headless.

Run as a script in a subprocess: it installs stand-ins for the Windows-only modules, an
"excel" engine built from xlwings' own Windows value-cleaning code (lifted from
xlwings/_xlwindows.py with ast, not rewritten), calls a sample of UDFs the way the COM server
does, and prints the results as JSON.
"""

import ast
import datetime as dt
import json
import sys
import types
from pathlib import Path

from joulebook.tools.sheetgen import load_xlwings_udfs, windows_stubs

for name, mod in windows_stubs().items():
    sys.modules.setdefault(name, mod)

import xlwings  # noqa: E402

XLWIN = Path(xlwings.__file__).with_name("_xlwindows.py")
WANT = {"cell_errors", "_clean_value_data_element", "_com_time_to_datetime", "Engine"}


def _windows_engine_namespace():
    tree = ast.parse(XLWIN.read_text(encoding="utf-8"))
    keep = []
    for node in tree.body:
        names = set()
        if isinstance(node, (ast.FunctionDef, ast.ClassDef)):
            names = {node.name}
        elif isinstance(node, ast.Assign):
            names = {t.id for t in node.targets if isinstance(t, ast.Name)}
        if names & WANT:
            keep.append(node)
    ns = {"dt": dt, "np": None, "pd": None, "time_types": (dt.date, dt.datetime)}
    exec(compile(ast.Module(body=keep, type_ignores=[]), str(XLWIN), "exec"), ns)
    return ns


class _FakeComRange:
    """A calling range with no workbook behind it (the caller of a UDF called from VBA)."""

    def __init__(self, xl=None):
        self.xl = xl
        self.api = types.SimpleNamespace(CLSID=None)


# what xlwings' ComRange (the `caller` argument) asks of COM to pass a range between threads
pythoncom = sys.modules["pythoncom"]
pythoncom.IID_IDispatch = None
pythoncom.CoMarshalInterThreadInterfaceInStream = lambda iid, api: None


ns = _windows_engine_namespace()
fake_xlwindows = types.ModuleType("xlwings._xlwindows")
fake_xlwindows.Range = _FakeComRange
fake_xlwindows.is_range_instance = lambda arg: False  # values only: no live Excel ranges here
fake_xlwindows.BOOK_CALLER = None
sys.modules["xlwings._xlwindows"] = fake_xlwindows
xlwings._xlwindows = fake_xlwindows
sys.modules["xlwings.com_server"] = types.ModuleType("xlwings.com_server")
sys.modules["xlwings.com_server"].loop = None

engine_impl = ns["Engine"]()
xlwings.engines.add(xlwings.main.Engine(impl=engine_impl))

udfs = load_xlwings_udfs()
MISSING = -2147352572  # what COM passes for an omitted optional argument
NA = -2146826246  # the #N/A cell error as COM delivers it

cases = {
    "scalar": ("JB_PROP", ("water", "h in kJ/kg", "T in degC", 25.0, "P in kPa", 101.325, MISSING)),
    "optional_omitted": ("JB_GAS_CP", ("air", 300.0, MISSING)),
    "units_given": ("JB_GAS_CP", ("air", 26.85, "degC-kPa-kJ")),
    "column_in_column_out": (
        "JB_PROP",
        (
            "water",
            "h in kJ/kg",
            "T in degC",
            ((20.0,), (None,), (60.0,)),
            "P in kPa",
            101.325,
            MISSING,
        ),
    ),
    "range_argument": (
        "JB_WORK_PV",
        (
            ((100.0,), (200.0,), (200.0,), (100.0,), (100.0,)),
            ((0.1,), (0.1,), (0.3,), (0.3,), (0.1,)),
            MISSING,
            MISSING,
        ),
    ),
    "spilled_row": (
        "JB_POLY_FIT",
        (((100.0,), (189.8,), (378.7,)), ((0.8,), (0.5,), (0.3,)), "all", MISSING),
    ),
    "error_out_of_range": (
        "JB_PROP",
        ("water", "h", "T in degC", 5000.0, "P in kPa", 100.0, MISSING),
    ),
    "error_value_in": ("JB_GAS_CP", ("air", NA, MISSING)),
    "boolean_in": ("JB_GAS_CP", ("air", True, MISSING)),
    "blank_required": ("JB_GAS_CP", ("air", None, MISSING)),  # a row not filled in yet
    "text_out": ("JB_PHASE", ("water", "T in degC", 120.0, "P in kPa", 101.325, MISSING)),
}
out = {}
for key, (fname, args) in cases.items():
    # the VBA wrapper passes Nothing in the slot of the reserved `caller` argument
    res = udfs.call_udf("joulebook.faces.sheet.udfs", fname, (*args, None))
    out[key] = res
print(json.dumps(out))
