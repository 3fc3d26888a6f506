"""The sheet face, proven through xlwings' own code on a machine without Excel.

Proven against the xlwings version installed by the project's pins (see pyproject.toml).
"""

import datetime as dt
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from joulebook.catalog import CATALOG, FAMILIES
from joulebook.faces.sheet import cells
from joulebook.tools.sheetgen import load_udf_module, paths, udf_source, vba_source

ROOT = Path(__file__).resolve().parents[1]
PY, BAS = paths(ROOT)


def test_udf_module_is_fresh():
    assert PY.read_text(encoding="utf-8") == udf_source(), "stale: run `joulebook sheet`"


def test_golden_bas_is_fresh_and_uses_crlf():
    raw = BAS.read_bytes()
    assert b"\r\n" in raw and b"\n" not in raw.replace(b"\r\n", b"")
    assert raw.decode("utf-8").replace("\r\n", "\n") == vba_source(), "stale: run `joulebook sheet`"


@pytest.fixture(scope="module")
def udfs():
    return load_udf_module()


def test_module_exports_only_the_catalog(udfs):
    public = {n for n in dir(udfs) if not n.startswith("_")}
    assert public == {f.name for f in CATALOG}
    assert set(udfs.__all__) == public


@pytest.mark.parametrize("f", CATALOG, ids=lambda f: f.name)
def test_xlfunc_metadata(udfs, f):
    xl = getattr(udfs, f.name).__xlfunc__
    assert xl["name"] == f.name
    assert xl["category"] == "joulebook · " + FAMILIES[f.family]
    assert xl["ret"]["doc"] == f.help and len(xl["ret"]["doc"]) <= 255
    # the reserved `caller` (filled in by xlwings with the calling range) comes last
    assert [a["name"] for a in xl["args"]] == [a.name for a in f.all_args] + ["caller"]
    for got, want in zip(xl["args"], f.all_args):
        assert len(got["doc"]) <= 255 and got["doc"].startswith(want.help[:40])
        if f.reads_message:  # the referenced range itself, to find its kept message
            assert got["options"]["convert"] == "range"
        else:
            assert got["options"]["ndim"] == 2 and got["options"]["err_to_str"] is True
        if want.optional:
            assert got["optional"] is None
        else:
            assert "optional" not in got
        if want.quantity and want.quantity != "dimensionless":
            assert "by default" in got["doc"]  # the unit is stated in the wizard's help
    assert xl["call_in_wizard"] is (f.family not in ("process", "stored"))


def test_vba_has_one_function_per_catalog_entry():
    text = vba_source()
    names = re.findall(r"^Function (\w+)\(", text, flags=re.M)
    assert sorted(names) == sorted(f.name for f in CATALOG)
    for f in CATALOG:
        sig = re.search(rf"^Function {f.name}\((.*)\)$", text, flags=re.M).group(1)
        for a in f.all_args:
            assert (f"Optional {a.name}" if a.optional else a.name) in sig


def test_xlwings_own_call_path_in_a_subprocess():
    r = subprocess.run(
        [sys.executable, str(ROOT / "tests" / "sheet" / "xl_callpath.py")],
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    out = json.loads(r.stdout.strip().splitlines()[-1])
    assert out["scalar"] == [[pytest.approx(104.92011980935509, rel=1e-12)]]
    assert out["optional_omitted"] == out["units_given"]
    col = out["column_in_column_out"]
    assert len(col) == 3 and col[1] == [""] and col[0][0] < col[2][0]  # blank in, blank out
    assert out["range_argument"] == [[pytest.approx(20.0)]]
    assert len(out["spilled_row"][0]) == 3  # n, C, R² spill as a row
    assert out["error_out_of_range"][0][0].startswith("OutOfRange: water: T = 5000 degC")
    assert out["error_value_in"] == [["BadInput: T is the error value #N/A"]]
    assert out["boolean_in"][0][0].startswith("BadInput: T = True")
    assert out["text_out"] == [["superheated vapor"]]
    assert out["blank_required"] == [[""]]  # blank input, blank result (not an error)


@pytest.mark.parametrize(
    "value, text",
    [
        (dt.datetime(2026, 1, 5), "is a date"),
        (True, "TRUE/FALSE"),
        ("#DIV/0!", "error value"),
        ("abc", "is text"),
    ],
)
def test_cell_conversion_of_odd_inputs(value, text):
    out = cells.cell("JB_GAS_CP", [["air"]], [[value]], None)
    assert out.startswith("BadInput:") and text in out and len(out) < 220


def test_cell_shapes():
    assert cells.cell("JB_GAS_CP", [["air"]], [[300.0]], None) == pytest.approx(1.0047760912939265)
    row = cells.cell("JB_GAS_CP", [["air"]], [[300.0, 400.0, None]], None)
    assert len(row) == 1 and len(row[0]) == 3 and row[0][2] is None
    block = cells.cell("JB_GAS_CP", [["air"]], [[300.0, 400.0], [500.0, 600.0]], None)
    assert len(block) == 2 and all(isinstance(v, float) for r in block for v in r)
    # units must be a single cell
    assert cells.cell("JB_GAS_CP", [["air"]], [[300.0]], [["K-kPa-kJ", "K-Pa-J"]]).startswith(
        "BadInput"
    )


def test_a_library_failure_is_labelled_text_not_a_traceback(monkeypatch):
    import joulebook.catalog.cellvalues as shared
    import joulebook.faces.sheet.cells as c

    def boom(*a):
        raise KeyError("x")

    monkeypatch.setattr(shared, "call", boom)
    assert c.cell("JB_GAS_CP", "air", 300.0).startswith("InternalError: KeyError")
