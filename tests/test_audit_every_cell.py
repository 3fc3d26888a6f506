"""The audit explains every formula cell and shows nothing green that is not.

Fixture workbooks are built here with openpyxl (invented scenarios), recalculated by
``joulebook recalc`` so they carry saved values, then audited.  Each planted slip must raise
its flag on its cell; the clean demo workbooks must raise none.
"""

import json
import re
from pathlib import Path

import openpyxl
import pytest
from openpyxl.worksheet.formula import ArrayFormula

from joulebook.faces.cli import main
from joulebook.faces.workbook.audit import build_audit, render_html, to_json
from joulebook.faces.workbook.reader import read_book
from wbtools import chromium

WORKBOOKS = Path(__file__).resolve().parents[1] / "workbooks"
AUDIT_CODE = Path(__file__).resolve().parents[1] / "funcs" / "joulebook" / "faces" / "workbook"


def _planted(path: Path) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Checks"
    ws["A1"] = "Planted slips for the audit (invented scenario)"
    rows = [
        ("A3", "Inlet temperature (°F)", "B3", 68),
        ("A4", "cp of air", "B4", '=JB_GAS_CP("air",B3,"degC-bar-kJ")'),
        ("A5", "Design pressure (barg)", "B5", 10),
        ("A6", "Start state", "B6", '=JB_STATE("nitrogen","T in degC",20,"P in bar",B8)'),
        (
            "A7",
            "Pressure after heating",
            "B7",
            '=JB_PROCESS(B6,"rigid","T2 in degC",90,"P2 in bar")',
        ),
        ("A8", "Fill pressure (bar, absolute)", "B8", 8),
        ("A9", "Check against design", "B9", '=IF(B7>B5,"exceeds design","ok")'),
        ("A10", "Relief set pressure (kPa)", "B10", 950),
        ("A11", "Check against relief", "B11", '=IF(B7>B10,"lifts","holds")'),
        ("A12", "Gas temperature (K)", "B12", 300),
        ("A13", "Isentropic temperature ratio", "B13", '=1-B14^(1-JB_GAS_K("air",B12))'),
        ("A14", "Pressure ratio", "B14", 0.25),
        ("A15", "Expansion work, typed pressure", "B15", "=JB_WORK_ISOBARIC(200,B16,B17)"),
        ("A16", "V_1 (m3)", "B16", 0.1),
        ("A17", "V_2 (m3)", "B17", 0.3),
        ("A18", "Hot check", "B18", '=IF(B7>15,"high","ok")'),
        ("A19", "Water far too hot", "B19", '=JB_PROP("water","h","T in K",5000,"P in kPa",B10)'),
        ("A20", "A function that does not exist", "B20", "=JB_NOT_A_FUNCTION(1)"),
        ("A21", "Gas cp at a °C value fed as K", "B21", '=JB_GAS_CP("air",B22)'),
        ("A22", "Air temperature", "B22", 25),
    ]
    for la, label, vb, value in rows:
        ws[la], ws[vb] = label, value
    # measured points, and the fit spilled as a row (no header row above it)
    for i, (p, v) in enumerate([(100, 0.8), (189.8, 0.5), (378.7, 0.3)], start=25):
        ws[f"A{i}"], ws[f"B{i}"] = p, v
    ws["A29"] = "Fit"
    ws["B29"] = ArrayFormula("B29:D29", '=JB_POLY_FIT(A25:A27,B25:B27,"all")')
    ws["A31"] = "End state in full"
    ws["B32"] = ArrayFormula("B32:D44", '=JB_PROCESS_TABLE(B6,"rigid","T2 in degC",90)')
    wb.save(path)
    out = path.with_name(path.stem + "-r.xlsx")
    assert main(["recalc", str(path), "-o", str(out)]) == 0
    return out


@pytest.fixture(scope="module")
def planted(tmp_path_factory):
    src = _planted(tmp_path_factory.mktemp("audit") / "planted.xlsx")
    return src, build_audit(read_book(src), figures=True)


def _e(a, cell):
    return next(e for e in a.entries if e.cell == cell)


def test_every_formula_cell_has_an_entry(planted):
    src, a = planted
    book = read_book(src)
    assert {(c.sheet, c.ref) for c in book.formula_cells()} == {
        (e.sheet, e.cell) for e in a.entries
    }
    html = render_html(a)
    for e in a.entries:
        assert f'id="{e.anchor}"' in html
    # the unknown function is listed, not left out, and never green
    bad = _e(a, "B20")
    assert bad.status == "unsupported" and "JB_NOT_A_FUNCTION" in " ".join(bad.flags)


def test_ordinary_formula_resolves_precedents_and_substitutes(planted):
    _, a = planted
    e = _e(a, "B9")
    assert e.function == ""
    assert e.substituted.startswith("=IF(") and '"exceeds design"' in e.substituted
    srcs = {i.name: i for i in e.inputs}
    assert srcs["Checks!B7"].unit == "bar"  # the unit the joulebook cell returns
    assert "Design pressure (barg)" in srcs["Checks!B5"].source


def test_nested_call_is_a_sub_call_and_the_outer_result_is_the_formulas(planted):
    _, a = planted
    e = _e(a, "B13")
    assert e.function == "" and len(e.calls) == 1
    sc = e.calls[0]
    assert sc.function == "JB_GAS_K"
    assert sc.result == pytest.approx(1.4, abs=0.01)  # k of air near 300 K (common practice)
    assert e.result == pytest.approx(1 - 0.25 ** (1 - sc.result), rel=1e-12)
    html = render_html(a)
    block = html[html.index(f'id="{e.anchor}"') :]
    block = block[: block.index('class="entry"', 10)]
    assert "joulebook call 1" in block and "Result of the formula:" in block
    assert "Result of JB_GAS_K" not in block


def test_error_cells_are_never_green(planted):
    _, a = planted
    e = _e(a, "B19")
    assert e.status == "error"
    assert any("outside the model" in f or "returns an error" in f for f in e.flags)
    html = render_html(a)
    head = html[html.index(f'id="{e.anchor}"') :][:400]
    assert 'class="badge bad"' in head and 'class="badge pass"' not in head


def test_spilled_results_in_full(planted):
    _, a = planted
    fit = _e(a, "B29")
    assert fit.table_head[-3:] == ["n", "C", "R²"]  # the catalog's column names
    assert len(fit.table) == 1 and len(fit.table[0]) >= 3
    tab = _e(a, "B32")
    assert len(tab.table) == 13
    assert [r[0] for r in tab.table][:2] == ["P2", "T2"]
    html = render_html(a)
    assert html.count('class="spill"') >= 2


def test_flags_a_checker_raises_by_eye(planted):
    _, a = planted
    flags = {e.cell: " | ".join(e.flags) for e in a.entries}
    assert "labelled 'Inlet temperature (°F)'" in flags["B4"] and "degC" in flags["B4"]
    assert "gauge pressure" in flags["B9"] and "absolute" in flags["B9"]
    assert "different units" in flags["B11"] and "bar" in flags["B11"]
    assert "typed into the formula" in flags["B15"]
    assert "limit 15 " in flags["B18"]
    assert "looks like a °C or °F value" in flags["B21"]
    assert "end_value = 90 degC is typed" in flags["B7"]
    assert flags["B13"] == ""


def test_flag_index_links_every_flag(planted):
    _, a = planted
    html = render_html(a)
    index = html[html.index('id="flags"') : html.index("<h2", html.index('id="flags"') + 5)]
    for e, _f in a.flags:
        assert f'href="#{e.anchor}"' in index
    assert index.count("<li>") == len(a.flags)


def test_calculation_map_per_sheet(planted):
    _, a = planted
    svg = a.maps["Checks"]
    assert svg.startswith("<svg") and "B7" in svg and "Pressure after heating" in svg
    assert svg.count("<line") >= 5  # precedents drawn as arrows
    assert 'href="#c-Checks-B9"' in svg


def test_figures_in_workbook_units_once_per_path(planted):
    _, a = planted
    b7, b32 = _e(a, "B7"), _e(a, "B32")
    assert "P [bar]" in b7.calls[0].figure and "T [degC]" in b7.calls[0].figure
    assert b32.calls[0].figure_ref == "Checks!B7" and b32.calls[0].figure == ""


def test_json_carries_entries_and_flags_and_cli_fails_on_flags(planted, tmp_path):
    src, a = planted
    data = json.loads(to_json(a))
    assert len(data["entries"]) == len(a.entries)
    assert len(data["flags"]) == len(a.flags) > 5
    out, js = tmp_path / "a.html", tmp_path / "a.json"
    assert main(["audit", str(src), "-o", str(out), "--json", str(js), "--fail-on-flags"]) == 1
    assert json.loads(js.read_text())["flags"]


@pytest.mark.parametrize("book", sorted(WORKBOOKS.glob("*.xls*")), ids=lambda p: p.name)
def test_demo_workbooks_are_explained_and_raise_no_flag(book, tmp_path):
    a = build_audit(read_book(book), figures=False)
    assert len(a.entries) == len(read_book(book).formula_cells())
    assert a.flags == []
    assert all(e.status == "pass" for e in a.entries)
    out = tmp_path / "r.html"
    assert main(["audit", str(book), "-o", str(out), "--fail-on-flags"]) == 0


def test_the_audit_has_no_function_names_in_its_code():
    """The working comes from the catalog: no `if name == "JB_…"` in the audit's code."""
    for p in [*AUDIT_CODE.glob("audit*.py"), AUDIT_CODE / "calcmap.py"]:
        code = p.read_text(encoding="utf-8")
        assert not re.findall(r"JB_[A-Z][A-Z0-9_]+", code), p.name
    tpl = (AUDIT_CODE / "templates" / "audit.html").read_text(encoding="utf-8")
    assert not re.findall(r"JB_[A-Z][A-Z0-9_]+", tpl)


@pytest.mark.client
def test_planted_report_renders_in_chromium(planted, tmp_path):
    """A nested call, a spilled table and the calculation map, as a browser shows them."""
    _, a = planted
    out = tmp_path / "audit.html"
    out.write_text(render_html(a), encoding="utf-8")
    shot, dom = chromium(out, tmp_path)
    assert shot.stat().st_size > 20_000
    for part in (
        "joulebook call 1",  # the nested call of B13
        'class="spill"',  # the spilled end state
        "R²",
        'class="calcmap"',
        "Flags (",
        "a gauge pressure is not an absolute one",  # the B9 comparison, a unit clash
    ):
        assert part in dom, part


def test_review_findings_own_label_cut_off_range_omitted_mass_and_no_false_comparison(tmp_path):
    """Slips a reviewer planted: a cell labelled in K that returns degC, an array range too
    small for its table, a mass left out (results per unit mass), and a comparison whose
    right side is a product (not one cell: no unit verdict on it)."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"], ws["B1"] = "Start", '=JB_STATE("nitrogen","T in degC",B7,"P in bar",B2)'
    ws["A2"], ws["B2"] = "Fill pressure (bar)", 8
    ws["A3"], ws["B3"] = (
        "Final temperature, K",
        '=JB_PROCESS(B1,"rigid","P2 in bar",B4,"T2 in degC")',
    )
    ws["A4"], ws["B4"] = "End pressure (psia)", 12
    ws["A5"], ws["B5"] = "Factor", 14.5
    ws["A6"], ws["B6"] = "Check", '=IF(B4>B2*B5,"hi","ok")'
    ws["A7"], ws["B7"] = "Fill temperature", 20
    ws["A8"] = "Table"
    ws["B8"] = ArrayFormula("B8:C11", '=JB_PROCESS_TABLE(B1,"rigid","P2 in bar",B2)')
    src = tmp_path / "r.xlsx"
    wb.save(src)
    out = tmp_path / "r2.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    a = build_audit(read_book(out), figures=False)
    flags = {e.cell: " | ".join(e.flags) for e in a.entries}
    assert "names K but the formula returns degC" in flags["B3"]
    assert "labelled 'End pressure (psia)'" in flags["B3"]
    assert "shows 4 × 2 of the 13 × 3 values" in flags["B8"]
    assert flags["B6"] == ""
    b3 = _e(a, "B3")
    mass = next(i for i in b3.inputs if i.name == "mass")
    assert mass.source.startswith("omitted: mass of the system (default 1")
