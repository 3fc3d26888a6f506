"""The bundled demo: workbooks are fresh, hold their saved values, and `joulebook demo` runs."""

from pathlib import Path

import openpyxl
import pytest

from joulebook.faces.cli import main
from joulebook.tools.demo import WORKBOOKS, build_workbooks

ROOT = Path(__file__).resolve().parents[1]


def _cells(path: Path) -> dict:
    wb = openpyxl.load_workbook(path)
    out = {}
    for ws in wb.worksheets:
        for row in ws.iter_rows():
            for c in row:
                v = c.value
                if v is not None:
                    out[(ws.title, c.coordinate)] = getattr(v, "text", v)
    return out


@pytest.fixture(scope="module")
def rebuilt(tmp_path_factory):
    return build_workbooks(tmp_path_factory.mktemp("demo"), recalculate=True)


def test_macro_enabled_copy_carries_the_vba_wrappers():
    # independent reader of VBA projects: oletools' olevba (PyPI)
    from oletools.olevba import VBA_Parser

    from joulebook.tools.demo import XLSM
    from joulebook.tools.sheetgen import vba_source

    path = ROOT / "workbooks" / XLSM
    modules = {name: code for _f, _s, name, code in VBA_Parser(str(path)).extract_macros()}
    assert set(modules) == {
        "ThisWorkbook.cls",
        "Sheet1.cls",
        "Sheet2.cls",
        "xlwings.bas",
        "xlwings_udfs.bas",
    }
    # the module may end in blank lines: the writer pads a source whose last 4096-byte
    # chunk would not fit literal tokens (sheet/vbaproject.py, MS-OVBA 2.4.1)
    got = modules["xlwings_udfs.bas"].replace("\r\n", "\n")
    assert got.rstrip("\n") == vba_source().rstrip("\n")
    assert modules["xlwings.bas"].startswith('Attribute VB_Name = "xlwings"')
    wb = openpyxl.load_workbook(path, keep_vba=True)
    assert wb["xlwings.conf"]["B1"].value == "joulebook.faces.sheet.udfs"
    assert main(["check", str(path)]) == 0


def test_at_least_five_workbooks_are_committed():
    assert len(WORKBOOKS) >= 5
    for name in WORKBOOKS:
        assert (ROOT / "workbooks" / name).exists(), f"run `joulebook workbooks` ({name} missing)"


@pytest.mark.parametrize("name", [*WORKBOOKS, "receiver_pneumatic_test_with_macros.xlsm"])
def test_committed_workbook_is_fresh(rebuilt, name):
    fresh = next(p for p in rebuilt if p.name == name)
    committed, new = _cells(ROOT / "workbooks" / name), _cells(fresh)
    assert committed.keys() == new.keys(), "stale: run `joulebook workbooks`"
    for k, v in new.items():  # formulas and inputs exactly; saved results to round-off
        if isinstance(v, float):
            assert committed[k] == pytest.approx(v, rel=1e-9, abs=1e-12), k
        else:
            assert committed[k] == v, k


@pytest.mark.parametrize("name", list(WORKBOOKS))
def test_committed_workbook_saved_values_hold(name):
    assert main(["check", str(ROOT / "workbooks" / name)]) == 0


def test_every_function_family_is_exercised():
    import re

    from joulebook.catalog import CATALOG

    used = set()
    for name in WORKBOOKS:
        for v in _cells(ROOT / "workbooks" / name).values():
            if isinstance(v, str):
                used |= set(re.findall(r"JB_[A-Z0-9_]+", v))
    families = {f.family for f in CATALOG if f.name in used}
    assert families >= {
        "state",
        "gas",
        "solid",
        "work",
        "poly",
        "balance",
        "process",
        "cycle",
        "stored",
        "util",
    }


def test_demo_command_writes_a_report_per_workbook(tmp_path, capsys):
    assert main(["demo", str(tmp_path / "d"), "--no-pdf"]) == 0
    reports = sorted((tmp_path / "d" / "reports").glob("*.html"))
    assert len(reports) == len(WORKBOOKS)
    assert "Open the reports" in capsys.readouterr().out
