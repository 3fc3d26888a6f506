"""The checker's audit on fixture workbooks with planted mistakes (built with openpyxl here).

A clean workbook must raise no flag; each planted mistake must be flagged where it is.
"""

import zipfile
from pathlib import Path

import openpyxl
import pytest

from joulebook.faces.cli import main
from joulebook.faces.workbook.audit import build_audit, render_html
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.writer import patch_sheet_xml
from wbtools import chromium, rewrite_part


def _clean(ws):
    ws["A1"] = "Receiver <b>R-7</b> — invented scenario"
    ws["A3"], ws["B3"] = "Charge pressure (absolute)", 11.0
    ws["A4"], ws["B4"] = "Gas temperature", 20.0
    ws["A5"], ws["B5"] = "Volume", 2.5
    ws["A6"], ws["B6"] = (
        "Stored energy",
        '=JB_STORED_ISENTROPIC(JB_STATE("nitrogen","P in bar",B3,"T in degC",B4),B5)',
    )
    ws["A7"], ws["B7"] = "Compression work", "=JB_WORK_POLYTROPIC(D3,D4,D5,D6)"
    ws["A8"], ws["B8"] = (
        "Water enthalpy",
        '=JB_PROP("water","h in kJ/kg","T in degC",B4,"P in kPa",D7)',
    )
    for r, (lab, v) in enumerate(
        [
            ("P_1 (kPa)", 100),
            ("V_1 (m3)", 0.8),
            ("P_2 (kPa)", 900),
            ("V_2 (m3)", 0.15),
            ("Water pressure (kPa)", 500),
        ],
        start=3,
    ):
        ws[f"C{r}"], ws[f"D{r}"] = lab, v
    ws["A10"], ws["B10"] = "dU", 120.0
    ws["A11"], ws["B11"] = "W", 30.0
    ws["A12"], ws["B12"] = "Q", "=B10+B11"
    ws["A13"], ws["B13"] = "balance gap", "=JB_BALANCE_GAP(B12,B11,B10)"


def _build(path: Path, mistakes: bool) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Vessel"
    _clean(ws)
    if mistakes:
        ws["A3"] = "Charge pressure (gauge)"  # gauge value read as absolute
        ws["A15"], ws["B15"] = "Air temperature <script>alert(1)</script>", 20.0
        ws["A16"], ws["B16"] = "cp of air", '=JB_GAS_CP("air",B15)'  # °C value fed as K
        ws["B12"] = "=B10-B11"  # sign slip in the hand-typed first law
    wb.save(path)
    return path


def _recalc(src: Path, tmp: Path) -> Path:
    out = tmp / (src.stem + "-r.xlsx")
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    return out


def test_clean_workbook_raises_no_flag(tmp_path):
    book = read_book(_recalc(_build(tmp_path / "clean.xlsx", False), tmp_path))
    a = build_audit(book, figures=False)
    # every formula cell: B6, B7, B8, B13 and the plain arithmetic of B12
    assert [e.cell for e in a.entries] == ["B6", "B7", "B8", "B12", "B13"]
    assert [f for e in a.entries for f in e.flags] == []
    assert all(e.row.status == "pass" for e in a.entries)


def test_planted_mistakes_are_flagged(tmp_path):
    src = _recalc(_build(tmp_path / "bad.xlsx", True), tmp_path)
    # and a stale saved value: the stored energy as if computed before an input changed
    stale = rewrite_part(
        src,
        tmp_path / "bad-stale.xlsx",
        "xl/worksheets/sheet1.xml",
        lambda x: patch_sheet_xml(x, {(8, 2): 12.5}),  # Vessel!B8
    )
    a = build_audit(read_book(stale), figures=False)
    flags = {(e.sheet, e.cell): " | ".join(e.flags) for e in a.entries}
    assert "labelled as a gauge pressure" in flags[("Vessel", "B6")]
    assert "looks like a °C or °F value fed as absolute" in flags[("Vessel", "B16")]
    assert "sign slip" in flags[("Vessel", "B12")]
    assert "does not close" in flags[("Vessel", "B13")]
    assert "differs from the recomputed" in flags[("Vessel", "B8")]
    assert flags[("Vessel", "B7")] == ""  # nothing wrong there


def test_html_is_self_contained_escaped_and_has_the_parts(tmp_path):
    src = _recalc(_build(tmp_path / "bad.xlsx", True), tmp_path)
    out = tmp_path / "audit.html"
    assert main(["audit", str(src), "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert "<script>alert" not in text and "&lt;script&gt;alert(1)&lt;/script&gt;" in text
    assert "http://" not in text.replace("http://www.w3.org", "") and "https://" not in text
    for part in (
        "Summary",
        "Caution.",
        "Vessel!B6",
        "=JB_STORED_ISENTROPIC(",
        "Span et al.",
        "<svg",
        "W = (P2·V2 − P1·V1)/(1 − n)",
        'class="calcmap"',
    ):
        assert part in text, part
    assert main(["audit", str(src), "-o", str(out)]) == 2  # refuses to overwrite without --force


def test_report_lists_inputs_with_units_and_sources(tmp_path):
    a = build_audit(read_book(_recalc(_build(tmp_path / "c.xlsx", False), tmp_path)), figures=False)
    prop = next(e for e in a.entries if e.function == "JB_PROP")
    byname = {i.name: i for i in prop.inputs}
    assert byname["value1"].unit == "degC" and byname["value1"].value == 20.0
    assert "Vessel!B4 (Gas temperature)" in byname["value1"].source
    assert prop.result_unit == "kJ/kg" and "IAPWS-95" in prop.model
    assert render_html(a).count('class="entry"') == len(a.entries)
    b12 = next(e for e in a.entries if e.cell == "B12")
    assert b12.function == "" and b12.substituted == "=120+30"
    assert [i.source for i in b12.inputs] == ["cell Vessel!B10 (dU)", "cell Vessel!B11 (W)"]


@pytest.mark.client
def test_report_renders_in_chromium(tmp_path):
    src = _recalc(_build(tmp_path / "bad.xlsx", True), tmp_path)
    out = tmp_path / "audit.html"
    assert main(["audit", str(src), "-o", str(out)]) == 0
    shot, dom = chromium(out, tmp_path, "900,1400")
    assert shot.stat().st_size > 10_000
    for part in ("Audit of bad-r.xlsx", "Vessel!B6", "sign slip", "fed as absolute", "Caution."):
        assert part in dom, part


def test_audit_sheet_copy(tmp_path):
    import hashlib

    src = _recalc(_build(tmp_path / "bad.xlsx", True), tmp_path)
    before = hashlib.sha256(src.read_bytes()).hexdigest()
    out_html, out_xlsx = tmp_path / "a.html", tmp_path / "audited.xlsx"
    assert main(["audit", str(src), "-o", str(out_html), "--xlsx", str(out_xlsx)]) == 0
    assert hashlib.sha256(src.read_bytes()).hexdigest() == before
    wb = openpyxl.load_workbook(out_xlsx)
    assert wb.sheetnames == ["Vessel", "joulebook audit"]
    ws = wb["joulebook audit"]
    rows = list(ws.iter_rows(values_only=True))
    assert rows[3][:2] == ("sheet", "cell")
    cells = {r[1]: r for r in rows[4:]}
    assert "sign slip" in cells["B12"][9] and cells["B7"][8] == "pass"
    # the original sheet is untouched: same formulas, same saved values
    with zipfile.ZipFile(src) as a, zipfile.ZipFile(out_xlsx) as b:
        assert a.read("xl/worksheets/sheet1.xml") == b.read("xl/worksheets/sheet1.xml")
