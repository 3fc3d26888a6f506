"""LibreOffice Calc computes joulebook's functions itself, through the extension.

`joulebook calc-extension` writes the extension; tests/calc/lo_driver.py (run by LibreOffice's
own Python) installs it into a headless LibreOffice of its own, opens each workbook, forces a
hard recalculation and exports every formula cell.  Then:

* every cell of every demo workbook — our functions and the built-ins — equals joulebook's
  engine (rtol 1e-12), also when the calls are written as Excel writes a UDF (``_xludf.``) or
  an add-in's function (``[1]!JB_X`` with the external-link part);
* a workbook built here shows the documented behaviour (docs/calc.md): a copied-down column,
  a blank input, an out-of-range input, a range argument filling an array formula, both error
  styles;
* the function wizard lists every function with its help and argument names;
* a workbook Calc saved reads back in joulebook's engine to the values Calc showed.

Marker ``client``: run by .ci/run, which installs LibreOffice and its Python bridge.
"""

import json
import os
import re
import shutil
import subprocess
import zipfile
from pathlib import Path

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

from joulebook.catalog import CATALOG
from joulebook.catalog.arghelp import arg_doc
from joulebook.catalog.cellvalues import cell
from joulebook.faces.cli import main
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import read_book

pytestmark = pytest.mark.client

ROOT = Path(__file__).resolve().parent.parent
DEMOS = sorted((ROOT / "workbooks").glob("*.xls[xm]"))
DRIVER = Path(__file__).parent / "calc" / "lo_driver.py"
CALC_ERROR = {519: "#VALUE!", 503: "#NUM!", 32767: "#N/A"}  # Calc's codes (FormulaError)


def _lo_python() -> str:
    """LibreOffice's Python: one that imports `uno` (JOULEBOOK_LO_PYTHON to choose)."""
    candidates = [
        os.environ.get("JOULEBOOK_LO_PYTHON"),
        "/usr/bin/python3",
        shutil.which("python3"),
    ]
    for py in filter(None, candidates):
        if subprocess.run([py, "-c", "import uno"], capture_output=True).returncode == 0:
            return py
    raise AssertionError(
        "LibreOffice's Python bridge is needed: apt-get install libreoffice-calc-nogui "
        "python3-uno (as .ci/run does), or set JOULEBOOK_LO_PYTHON"
    )


# ---------------------------------------------------------------------------------------------
# workbooks


T_COLUMN = [20.0, 40.0, None, 5000.0, 60.0]  # degC: a blank and an out-of-range input
WATER = ("water", "h in kJ/kg", "T in degC")


def _column_book(path: Path, style: str | None) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Column"
    ws["A1"], ws["B1"], ws["C1"] = "T in degC", "h, copied down", "h, one array formula"
    for r, t in enumerate(T_COLUMN, start=2):
        if t is not None:
            ws[f"A{r}"] = t
        ws[f"B{r}"] = f'=JB_PROP("water","h in kJ/kg","T in degC",A{r},"P in kPa",101.325)'
    ws["C2"] = ArrayFormula(
        "C2:C6", '=JB_PROP("water","h in kJ/kg","T in degC",A2:A6,"P in kPa",101.325)'
    )
    ws["D2"] = "=ISERROR(B5)"
    ws["D3"] = "=IFERROR(B5,-1)"
    ws["D4"] = "=JB_WHY(B5)"
    ws["D5"] = '=JB_CONVERT(A4,"bar","kPa")'
    ws["D6"] = '=JB_PROP("water","h in kJ/kg","T in degC",20,"P in kPa",101.325,"K-kPa-kJ")'
    ws["E2"] = "=SUM(B2:B3)*2"
    if style:
        wb.defined_names["JB_ERRORS"] = DefinedName("JB_ERRORS", attr_text=f'"{style}"')
    wb.save(path)
    return path


_CALL = re.compile(rb"(?<![A-Za-z0-9_.!\]])(JB_[A-Z0-9_]+)\(")


def _rewrite_calls(src: Path, dst: Path, prefix: bytes, addin_link: bool) -> Path:
    """*src* with each call of ours written as Excel writes a UDF (``_xludf.``) or an add-in's
    function (``[1]!`` and the external-link part naming the add-in)."""

    def calls(xml: bytes) -> bytes:
        return re.sub(
            rb"(<f[^>]*>)(.*?)(</f>)",
            lambda m: m.group(1) + _CALL.sub(prefix + rb"\1(", m.group(2)) + m.group(3),
            xml,
            flags=re.S,
        )

    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        names = {f.name for f in CATALOG}
        for item in zin.infolist():
            data = zin.read(item.filename)
            if item.filename.startswith("xl/worksheets/sheet"):
                data = calls(data)
            if addin_link and item.filename == "xl/workbook.xml":
                refs = (
                    b'<externalReferences><externalReference r:id="rIdJB1"/></externalReferences>'
                )
                data = data.replace(b"</sheets>", b"</sheets>" + refs, 1)
            if addin_link and item.filename == "xl/_rels/workbook.xml.rels":
                rel = (
                    b'<Relationship Id="rIdJB1" Type="http://schemas.openxmlformats.org/'
                    b'officeDocument/2006/relationships/externalLink" '
                    b'Target="externalLinks/externalLink1.xml"/>'
                )
                data = data.replace(b"</Relationships>", rel + b"</Relationships>")
            if addin_link and item.filename == "[Content_Types].xml":
                ct = (
                    b'<Override PartName="/xl/externalLinks/externalLink1.xml" ContentType='
                    b'"application/vnd.openxmlformats-officedocument.spreadsheetml.externalLink+xml"/>'
                )
                data = data.replace(b"</Types>", ct + b"</Types>")
            zout.writestr(item, data)
        if addin_link:
            defined = "".join(f'<definedName name="{n}"/>' for n in sorted(names))
            zout.writestr(
                "xl/externalLinks/externalLink1.xml",
                '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<externalLink '
                'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" '
                'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships">'
                f'<externalBook r:id="rId1"><definedNames>{defined}</definedNames>'
                "</externalBook></externalLink>",
            )
            zout.writestr(
                "xl/externalLinks/_rels/externalLink1.xml.rels",
                '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Relationships '
                'xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
                '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/'
                '2006/relationships/externalLinkPath" Target="file:///C:/Users/me/AppData/'
                'Roaming/Microsoft/AddIns/joulebook.xlam" TargetMode="External"/></Relationships>',
            )
    return dst


# ---------------------------------------------------------------------------------------------
# one LibreOffice session for everything


@pytest.fixture(scope="module")
def calc(tmp_path_factory):
    work = tmp_path_factory.mktemp("calc")
    oxt = work / "joulebook.oxt"
    assert main(["calc-extension", "-o", str(oxt)]) == 0
    books = {p.name: p for p in DEMOS}
    books["column-text.xlsx"] = _column_book(work / "column-text.xlsx", None)
    books["column-values.xlsx"] = _column_book(work / "column-values.xlsx", "values")
    for demo in ("blocked_in_line.xlsx", "wet_steam_vessel.xlsx"):
        books["xludf-" + demo] = _rewrite_calls(
            ROOT / "workbooks" / demo, work / ("xludf-" + demo), b"_xludf.", False
        )
        books["addin-" + demo] = _rewrite_calls(
            ROOT / "workbooks" / demo, work / ("addin-" + demo), b"[1]!", True
        )
    saved = work / "saved"
    saved.mkdir()
    run = subprocess.run(
        [_lo_python(), str(DRIVER), "--save", str(saved), str(oxt), str(work / "lo"),
         *map(str, books.values())],
        capture_output=True, text=True, timeout=900,
    )  # fmt: skip
    assert run.returncode == 0, run.stderr[-3000:]
    result = json.loads(run.stdout)
    cells = {
        name: {(c["sheet"], c["row"], c["col"]): c for c in result["books"][str(path)]["cells"]}
        for name, path in books.items()
    }
    modified = {
        name: result["books"][str(path)]["modified_on_open"] for name, path in books.items()
    }
    return {"cells": cells, "wizard": result["wizard"], "saved": saved, "modified": modified}


def _shown(c: dict):
    """What Calc shows in a cell, in the engine's terms."""
    if c["error"]:
        return ("error", CALC_ERROR.get(c["error"], f"Err:{c['error']}"))
    if c["kind"] == "text" or c["text"] == "":  # an empty result shows as an empty cell
        return c["text"]
    return c["value"]


def _same(shown, expected) -> bool:
    if isinstance(expected, bool):
        return shown == float(expected)
    if isinstance(expected, float | int) and isinstance(shown, float):
        return shown == pytest.approx(float(expected), rel=1e-12, abs=0.0)
    if expected is None:
        return shown == ""
    return shown == expected


def _disagreements(shown: dict, expected: dict) -> list:
    out = []
    for key, want in sorted(expected.items()):
        got = _shown(shown[key]) if key in shown else "(no formula in Calc)"
        if not _same(got, want):
            out.append((key, shown.get(key, {}).get("formula"), want, got))
    return out


def _engine(path: Path) -> dict:
    out = Engine(read_book(path)).run()
    assert not [k for k, o in out.items() if o.problem]
    return {k: o.value for k, o in out.items()}


# ---------------------------------------------------------------------------------------------
# the demo workbooks: every cell as joulebook computes it


@pytest.mark.parametrize("demo", [p.name for p in DEMOS])
def test_calc_recomputes_every_cell_of_the_demo_workbooks(calc, demo):
    shown = calc["cells"][demo]
    expected = _engine(ROOT / "workbooks" / demo)
    ours = [k for k in expected if "JB_" in shown[k]["formula"].upper()]
    assert ours, "the demo calls our functions"
    assert all("_XLUDF.JB_" in shown[k]["formula"] for k in ours)  # Calc's add-in, not #NAME?
    assert _disagreements(shown, expected) == []
    assert not calc["modified"][demo]  # opening rewrote nothing the user must save


@pytest.mark.parametrize("form", ["xludf", "addin"])
@pytest.mark.parametrize("demo", ["blocked_in_line.xlsx", "wet_steam_vessel.xlsx"])
def test_calls_written_as_excel_writes_udfs_and_add_ins(calc, form, demo):
    shown = calc["cells"][f"{form}-{demo}"]
    expected = _engine(ROOT / "workbooks" / demo)
    assert _disagreements(shown, expected) == []
    assert all("[1]!" not in c["formula"] for c in shown.values())


# ---------------------------------------------------------------------------------------------
# the documented behaviour (docs/calc.md), on a workbook built here


def _column_expected(style: str) -> dict:
    def text_or_value(v):
        if style == "values" and isinstance(v, str) and v.startswith("OutOfRange: "):
            return ("error", "#NUM!")
        return v

    at = lambda t: cell("JB_PROP", *WATER, t, "P in kPa", 101.325)  # noqa: E731
    failure = at(5000.0)
    assert failure.startswith("OutOfRange: ") and "5000" in failure
    out = {}
    for r, t in enumerate(T_COLUMN, start=2):
        # copied down: a single empty cell reaches an add-in as 0 (Calc's rule)
        out[("Column", r, 2)] = text_or_value(at(0.0 if t is None else t))
        # one array formula over the column: the blank gives a blank, the rest per row
        out[("Column", r, 3)] = None if t is None else text_or_value(at(t))
    if style == "values":
        out[("Column", 2, 4)] = True
        out[("Column", 3, 4)] = -1.0
        out[("Column", 4, 4)] = ("error", "#NUM!")  # Calc passes no error value to a function
    else:
        out[("Column", 2, 4)] = False
        out[("Column", 3, 4)] = failure
        out[("Column", 4, 4)] = cell("JB_WHY", failure)
    out[("Column", 5, 4)] = 0.0
    out[("Column", 6, 4)] = at(20.0)
    out[("Column", 2, 5)] = (at(20.0) + at(40.0)) * 2
    return out


@pytest.mark.parametrize("style", ["text", "values"])
def test_copied_down_column_blank_and_out_of_range_inputs(calc, style):
    shown = calc["cells"][f"column-{style}.xlsx"]
    expected = _column_expected(style)
    assert _disagreements(shown, expected) == []
    assert set(shown) == set(expected)


def test_function_wizard_lists_every_function_with_its_arguments(calc):
    wizard = calc["wizard"]
    assert sorted(wizard) == sorted(f.name for f in CATALOG)
    for f in CATALOG:
        assert wizard[f.name]["help"] == f.help
        assert wizard[f.name]["args"] == [[a.name, arg_doc(a)] for a in f.all_args]


def test_a_workbook_calc_saved_reads_back_in_joulebook(calc):
    # Calc writes its add-in calls as "_XLUDF.JB_X(" (the extension's service name), which
    # joulebook's reader takes as ours, as Excel takes "_xludf." for a user-defined function
    for demo in ("blocked_in_line.xlsx", "wet_steam_vessel.xlsx", "fire_exposed_drum.xlsx"):
        saved = calc["saved"] / demo
        shown = calc["cells"][demo]
        again = Engine(read_book(saved)).run()
        ours = {k: o for k, o in again.items() if "JB_" in shown[k]["formula"].upper()}
        assert ours and not [k for k, o in ours.items() if o.problem]
        assert _disagreements(shown, {k: o.value for k, o in ours.items()}) == []
