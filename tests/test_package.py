"""The calculation package: copied-down formulas grouped, the title block read from the
workbook, the sections a checker files, the PDF.

Fixture workbooks are invented scenarios built here with openpyxl and recalculated by
``joulebook recalc`` so they carry saved values.  A grouped column is checked both ways: a
clean column is one entry with every row passing, and the same column with one saved value
planted wrong lists that row on its own, red.
"""

import re
from datetime import date
from pathlib import Path

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula

from joulebook.faces.cli import main
from joulebook.faces.workbook.audit import build_audit
from joulebook.faces.workbook.groups import relative_form, runs
from joulebook.faces.workbook.package import ROW_LIMIT, build_package, render_package
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.titleblock import read_title_block
from wbtools import chromium, with_saved

N = 500


def _recalc(src: Path) -> Path:
    out = src.with_name(src.stem + "-r.xlsx")
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    return out


def _record(path: Path) -> Path:
    """A compressor's indicator record: crank angle down column A, the cylinder volume of a
    slider-crank down B (one joulebook call, filled down), and a scaled copy down C."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Record"
    ws["A1"], ws["B1"], ws["C1"] = "Crank angle (deg)", "Cylinder volume (m3)", "Volume (L)"
    ws["E1"], ws["F1"] = "Bore (m)", 0.1
    for i in range(2, N + 2):
        ws[f"A{i}"] = (i - 2) * 360 / N
        ws[f"B{i}"] = f"=JB_ENGINE_VOLUME(A{i},$F$1,0.12,0.25,0.0001)"
        ws[f"C{i}"] = f"=B{i}*1000"
    wb.save(path)
    return _recalc(path)


@pytest.fixture(scope="module")
def record(tmp_path_factory):
    return _record(tmp_path_factory.mktemp("pkg") / "record.xlsx")


def test_relative_form_and_runs():
    # the same formula filled down and across is one form; a pinned reference stays pinned
    assert relative_form("S", "=A2+$F$1", 2, 2) == relative_form("S", "=A9+$F$1", 9, 2)
    assert relative_form("S", "=A2+F1", 2, 2) != relative_form("S", "=A9+F1", 9, 2)
    cells = [(("S", 2, c), f"={chr(64 + c - 1)}2*2") for c in range(2, 6)]
    cells += [(("S", r, 8), "=1") for r in range(2, 4)] + [(("S", 5, 8), "=1")]
    assert [(r.span, r.size) for r in runs(cells)] == [("B2:E2", 4), ("H2:H3", 2), ("H5", 1)]


def test_500_row_column_is_one_entry_every_row_passing(record):
    a = build_audit(read_book(record), figures=False)
    assert len(a.entries) == 2 * N
    p = build_package(a)
    assert [(it.entry.cell, it.span, it.size) for it in p.items] == [
        ("B2", f"B2:B{N + 1}", N),
        ("C2", f"C2:C{N + 1}", N),
    ]
    vol = p.items[0]
    assert vol.good and not vol.own and vol.failing == 0
    assert vol.columns == ["crank_angle · Crank angle (deg)"]  # the only input that changes
    # past ROW_LIMIT the first and last rows are shown and the passing rows between counted
    assert N > ROW_LIMIT and vol.elided == N - len(vol.rows) and vol.rows[-1].cell == f"B{N + 1}"
    html = render_package(p)
    assert html.count('<div class="entry') == 2
    assert f"({N} copied-down cells, one formula" in html and f"all {N} pass" in html
    assert f"Every row ({N})" in html and f"{vol.elided} more rows" in html
    # the flag a row shares with the first (a constant typed in the formula) is raised once
    typed = [f for _, _, f in p.flags if "stroke = 0.12 m is typed" in f]
    assert typed == [
        f"stroke = 0.12 m is typed into the formula: put inputs in labelled cells a "
        f"checker can see (on each of the {N} rows)"
    ]
    # the map draws each group as one node and the input column as one node
    ((heading, svg),) = p.maps
    assert heading == "Record" and f"B2:B{N + 1} ×{N}" in svg and "column A" in svg
    assert ">F1<" in svg  # the pinned bore stays one cell


def test_a_planted_wrong_row_is_listed_on_its_own(record, tmp_path):
    bad = with_saved(record, tmp_path / "record-bad.xlsx", {"Record!B251": 0.5})
    p = build_package(build_audit(read_book(bad), figures=False))
    vol = p.items[0]
    assert vol.size == N and not vol.good and vol.failing == 1
    assert p.items[1].good  # C251 recomputes from the right volume: its saved value holds
    assert [m.cell for m in vol.own] == ["B251"] and vol.own[0].status == "differs"
    row = next(r for r in vol.rows if r.cell == "B251")
    assert row.own and not row.good and row.status == "differs"
    html = render_package(p)
    assert "Rows listed on their own (1)" in html and f"1 of {N} do not pass" in html


def _titled(path: Path, names: bool = True) -> Path:
    """A receiver calculation whose cover carries the title block two ways: defined names
    (revision, checked by) and labelled cells (calc number, title, project, date), a
    revision table and the file's document properties."""
    wb = openpyxl.Workbook()
    cover = wb.active
    cover.title = "Cover"
    rows = [
        ("Calc no.:", "CN-0042"),
        ("Title", "Air receiver blowdown energy"),
        ("Project", "Job 7731, workshop air"),
        # a date serial: days from 1899-12-30 in the 1900 date system (ECMA-376 Part 1,
        # 18.17.4.1)
        ("Date", (date(2026, 10, 4) - date(1899, 12, 30)).days),
        ("Rev", "B"),
        ("Checked by", "R. Second"),
        ("Scope", "Stored energy of the 2 m3 workshop receiver at its relief set pressure."),
    ]
    for r, (label, value) in enumerate(rows, start=2):
        cover[f"B{r}"], cover[f"C{r}"] = label, value
    cover["B12"], cover["C12"], cover["D12"], cover["E12"] = "Rev", "Date", "Description", "By"
    cover["B13"], cover["C13"], cover["D13"], cover["E13"] = "A", "2026-09-01", "First issue", "AE"
    cover["B14"], cover["C14"], cover["D14"], cover["E14"] = "B", "2026-10-04", "Relief set", "AE"
    cover["B17"] = "References"
    cover["B18"] = "Owner's receiver data sheet RD-12 (invented)"
    calc = wb.create_sheet("Receiver")
    calc["A1"], calc["B1"] = "Receiver volume (m3)", 2
    calc["A2"], calc["B2"] = "Receiver pressure, absolute [kPa]", 1100
    calc["A3"], calc["B3"] = "Stored energy (kJ)", "=JB_STORED_IDEAL_ISENTROPIC(B2,B1,1.4)"
    calc["A4"], calc["B4"] = "In MJ", "=B3/1000"
    if names:
        wb.defined_names["REVISION"] = DefinedName("REVISION", attr_text="Cover!$C$6")
        wb.defined_names["CHECKED_BY"] = DefinedName("CHECKED_BY", attr_text="Cover!$C$7")
        wb.defined_names["RESULT_ENERGY"] = DefinedName("RESULT_ENERGY", attr_text="Receiver!$B$3")
        cover["B6"] = "Issue status"  # the label no longer names the field: the name does
        cover["B7"] = "Second pair of eyes"
    wb.properties.creator = "A. Engineer"
    wb.save(path)
    return _recalc(path)


def test_title_block_from_defined_names_and_labelled_cells(tmp_path):
    tb = read_title_block(read_book(_titled(tmp_path / "receiver.xlsx")))
    got = {k: (f.value, f.source) for k, f in tb.fields.items()}
    assert got["calc_number"] == ("CN-0042", "label 'Calc no.:' (Cover!C2)")
    assert got["title"] == ("Air receiver blowdown energy", "label 'Title' (Cover!C3)")
    assert got["project"][0] == "Job 7731, workshop air"
    assert got["date"] == ("2026-10-04", "label 'Date' (Cover!C5)")
    assert got["revision"] == ("B", "defined name REVISION (Cover!C6)")
    assert got["checked_by"] == ("R. Second", "defined name CHECKED_BY (Cover!C7)")
    assert got["prepared_by"] == ("A. Engineer", "document properties (creator)")
    assert got["scope"][0].startswith("Stored energy of the 2 m3")
    assert tb.missing == ["approved by"]
    assert tb.revisions == [
        ["Rev", "Date", "Description", "By"],
        ["A", "2026-09-01", "First issue", "AE"],
        ["B", "2026-10-04", "Relief set", "AE"],
    ]


def test_no_title_block_is_titled_by_the_file_name_with_the_missing_fields(record):
    p = build_package(build_audit(read_book(record), figures=False))
    assert p.title.title == record.name and "calc number" in p.title.missing
    html = render_package(p)
    assert f"<h1>{record.name}</h1>" in html
    assert "Not found in the workbook: calc number, title, project / job, revision" in html


def test_package_sections(tmp_path):
    p = build_package(build_audit(read_book(_titled(tmp_path / "receiver.xlsx"))))
    ins = {i.where: i for i in p.inputs}
    assert ins["Receiver!B2"].unit == "kPa" and ins["Receiver!B2"].unit_from == "its label"
    assert ins["Receiver!B1"].label == "Receiver volume (m3)"
    # the workbook names its result: the summary is that cell, not the chain's last
    assert [r.where for r in p.results] == ["Receiver!B3"] and "names RESULT" in p.results_from
    assert p.listed_references == ["Owner's receiver data sheet RD-12 (invented)"]
    assert p.references and all(n <= len(p.references) for _, _, ns in p.models for n in ns)
    assert [f for f, _ in p.cautions] == ["JB_STORED_IDEAL_ISENTROPIC"]
    html = render_package(p)
    for part in (
        "CN-0042 — Air receiver blowdown energy",
        "Sign-off",
        "Checked by (name)",
        "Calculation map",
        "Inputs",
        "Results",
        "Assumptions and references",
        "Cautions",
        "Revisions",
        "CN-0042 · rev B",
    ):
        assert part in html, part


@pytest.mark.client
def test_pdf_pages_header_and_page_numbers(tmp_path):
    """Printed through WeasyPrint and read back with pypdf: the page count, the running
    header with calc number and revision, "page N of M", the paper size."""
    from pypdf import PdfReader

    src = _titled(tmp_path / "receiver.xlsx")
    for paper, size in (("a4", (595, 842)), ("letter", (612, 792))):
        html, pdf = tmp_path / f"calc-{paper}.html", tmp_path / f"calc-{paper}.pdf"
        args = ["audit", str(src), "-o", str(html), "--pdf", str(pdf), "--paper", paper]
        assert main(args) == 0
        reader = PdfReader(pdf)
        n = len(reader.pages)
        assert n >= 2
        box = reader.pages[0].mediabox
        assert (round(float(box.width)), round(float(box.height))) == size  # PDF points
        for i, page in enumerate(reader.pages, start=1):
            text = page.extract_text()
            assert "CN-0042 · rev B" in text and f"page {i} of {n}" in text, (paper, i)
        whole = "\n".join(page.extract_text() for page in reader.pages)
        for part in ("Title block and document control", "Calculation map", "Sign-off"):
            assert part in whole


@pytest.mark.client
def test_grouped_pdf_stays_short(record, tmp_path):
    from pypdf import PdfReader

    html, pdf = tmp_path / "record.html", tmp_path / "record.pdf"
    assert main(["audit", str(record), "-o", str(html), "--pdf", str(pdf)]) == 0
    reader = PdfReader(pdf)
    assert len(reader.pages) <= 15  # 1000 formula cells, two entries
    whole = "\n".join(page.extract_text() for page in reader.pages)
    assert f"Every row ({N})" in whole and f"page 1 of {len(reader.pages)}" in whole


@pytest.mark.client
def test_package_renders_in_chromium(record, tmp_path):
    """A grouped entry, the title block, the sign-off block and the map, as a browser shows
    them."""
    src = _titled(tmp_path / "receiver.xlsx")
    out = tmp_path / "receiver.html"
    assert main(["audit", str(src), "-o", str(out)]) == 0
    shot, dom = chromium(out, tmp_path, "1000,2400")
    assert shot.stat().st_size > 20_000
    for part in (
        "Title block and document control",
        "CN-0042",
        "Checked by (name)",
        'class="calcmap"',
    ):
        assert part in dom, part
    out2 = tmp_path / "record.html"
    assert main(["audit", str(record), "-o", str(out2)]) == 0
    shot2, dom2 = chromium(out2, tmp_path, "1000,2400")
    assert shot2.stat().st_size > 20_000
    assert f"Every row ({N})" in dom2 and f"×{N}" in dom2 and "Sign-off" in dom2


@pytest.mark.client
def test_demo_writes_an_html_and_a_pdf_package_per_workbook(tmp_path):
    from pypdf import PdfReader

    from joulebook.tools.demo import WORKBOOKS, run_demo

    results = run_demo(tmp_path / "d", echo=lambda *a: None)
    assert len(results) == len(WORKBOOKS)
    for name, r in results.items():
        assert r["report"].exists() and r["pdf"] == r["report"].with_suffix(".pdf"), name
        pages = PdfReader(r["pdf"]).pages
        assert 1 <= len(pages) <= 40, (name, len(pages))
        assert f"page 1 of {len(pages)}" in pages[0].extract_text()


def _two_sheets(path: Path) -> Path:
    """Inputs on one sheet, the calculation on another: a state, its end state spilled as a
    table, a cell reading one value of the spill, an input with no label."""
    wb = openpyxl.Workbook()
    data = wb.active
    data.title = "Data"
    data["A1"], data["B1"] = "Fill temperature (degC)", 25
    data["A2"], data["B2"] = "Mass [kg]", 2
    data["D5"] = 3  # no label: named by its address
    calc = wb.create_sheet("Calc")
    calc["A1"], calc["B1"] = (
        "Start state",
        '=JB_STATE("water","T in degC",Data!B1,"x",0.0005)',
    )
    calc["A3"] = "End state"
    calc["B4"] = ArrayFormula("B4:D16", '=JB_PROCESS_TABLE(B1,"rigid","P2 in bar",Data!D5,Data!B2)')
    calc["A18"], calc["B18"] = "End temperature, plus 1 K", "=C5+1"
    wb.save(path)
    return _recalc(path)


def test_map_and_inputs_across_sheets_with_a_spilled_result(tmp_path):
    p = build_package(build_audit(read_book(_two_sheets(tmp_path / "two.xlsx")), figures=False))
    svg = dict(p.maps)["Calc"]
    assert ">Data!B1<" in svg and "Fill temperature (degC)" in svg  # a cross-sheet input
    assert ">Data!D5<" in svg and "cell Data!D5" in svg  # no label: named by its address
    assert ">B4:D16<" in svg  # the spilled result, as its range
    assert ">C5<" not in svg  # the spilled cell B18 reads is the table's node, not an input
    ins = [i.where for i in p.inputs]
    assert ins == ["Data!B1", "Data!B2", "Data!D5"]  # no spilled cell among the inputs
    b18 = next(it for it in p.items if it.entry.cell == "B18")
    b4 = next(it for it in p.items if it.entry.cell == "B4")
    node = {n: None for n in re.findall(r'href="#([^"]+)"', svg)}
    assert b18.entry.anchor in node and b4.entry.anchor in node


def test_copies_false_works_out_the_first_row_and_the_failing_rows_only(record, tmp_path):
    bad = with_saved(record, tmp_path / "record-bad.xlsx", {"Record!B251": 0.5})
    a = build_audit(read_book(bad), figures=False, copies=False, maps=False)
    by = {e.cell: e for e in a.entries}
    assert by["B2"].calls[0].working  # the group's working, with the first row's numbers
    assert by["B251"].calls[0].working  # a failing row is shown in full
    assert by["B3"].calls[0].working == [] and by["B3"].status == "pass"
    # the verdicts and flags of every row are the full audit's
    full = {e.cell: (e.status, e.flags) for e in build_audit(read_book(bad), figures=False).entries}
    assert {c: (e.status, e.flags) for c, e in by.items()} == full
    assert a.maps == {}


@pytest.mark.parametrize("name", ["air_standard_cycle.xlsx", "wet_steam_vessel.xlsx"])
def test_maps_stay_legible_on_a4(name):
    """A long chain wraps into bands of three columns: no map wider than about 1.5 times the
    printed column (A4 less margins, 182 mm ≈ 690 px), so its 10-11 px text prints at 7 px or
    more (common practice: 6-7 pt is the smallest legible print)."""
    root = Path(__file__).resolve().parents[1] / "workbooks"
    p = build_package(build_audit(read_book(root / name), figures=False, maps=False))
    widths = [int(re.search(r'width="(\d+)"', svg).group(1)) for _, svg in p.maps]
    assert widths and max(widths) <= 1040, widths


def _runs_book(path: Path, rows: int) -> Path:
    """A copied-down check of a gauge pressure against a relief set in absolute (a planted
    slip the audit flags on each row whose headings it reads)."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Runs"
    ws["A1"], ws["B1"], ws["C1"] = "Gauge pressure (barg)", "Relief set (bar)", "Lifts?"
    for r in range(2, rows + 2):
        ws[f"A{r}"], ws[f"B{r}"] = 4 + r, 10
        ws[f"C{r}"] = f'=IF(A{r}>B{r},"lifts","holds")'
    wb.save(path)
    return _recalc(path)


@pytest.mark.parametrize("rows", [3, 5])
def test_a_flag_of_the_first_row_says_how_many_rows_raise_it(tmp_path, rows):
    """A group's flag is raised once, with the number of its rows that raise it, counted
    from the audit's own verdicts: never claimed for every row when some do not raise it."""
    a = build_audit(read_book(_runs_book(tmp_path / "runs.xlsx", rows)), figures=False)
    # the slip is each row's status too (unit clash, workbook/verdict.py), one flag per row
    raising = sum(
        any("a gauge pressure is not an absolute one" in f for f in e.flags) for e in a.entries
    )
    assert raising >= 1
    p = build_package(a)
    (it,) = p.items
    assert it.size == rows and it.span == f"C2:C{rows + 1}"
    (note,) = [f for _, _, f in p.flags]
    if raising == rows:
        assert note.endswith(f"(on each of the {rows} rows)"), note
    else:
        assert note.endswith(f"(on {raising} of the {rows} rows, the first among them)"), note
    # the inputs each row reads from its own cells, by their labels
    assert it.columns == ["Gauge pressure (barg)", "Relief set (bar)"]


@pytest.mark.client
def test_pdf_keeps_each_figure_on_its_entrys_page(tmp_path):
    """An entry and its P–V / T–s figures print on one page (they fit on one)."""
    from pypdf import PdfReader

    root = Path(__file__).resolve().parents[1] / "workbooks"
    html, pdf = tmp_path / "piston.html", tmp_path / "piston.pdf"
    assert (
        main(["audit", str(root / "piston_on_stops.xlsx"), "-o", str(html), "--pdf", str(pdf)]) == 0
    )
    pages = [p.extract_text() for p in PdfReader(pdf).pages]
    for heading in ("Piston!B19 — Heat until the piston lifts", "Piston!B20 — "):
        (page,) = [t for t in pages if heading in t]
        assert "P [bar]" in page and "T [degC]" in page, heading


def test_weasyprint_is_imported_only_for_a_pdf(record, tmp_path):
    import subprocess
    import sys

    code = (
        "import sys; from joulebook.faces.cli import main; "
        f"main(['audit', {str(record)!r}, '-o', {str(tmp_path / 'r.html')!r}]); "
        "print('weasyprint' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip().splitlines()[-1] == "False"
    assert (tmp_path / "r.html").exists()


def test_labelled_inputs_in_a_column_stay_rows_of_their_own(tmp_path):
    # five inputs one under the other, each with its own label and unit (the way engineers
    # lay out a calc): five rows; the clean twin, a table column under one heading, is one row
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    rows = [
        ("Fill temperature", 15, "degC"),
        ("Fill pressure", 4, "bar"),
        ("Wall temperature", 45, "degC"),
        ("Water mass", 312, "kg"),
        ("Design pressure", 16, "barg"),
    ]
    for i, (label, value, unit) in enumerate(rows, start=1):
        ws.cell(i, 1, label), ws.cell(i, 2, value), ws.cell(i, 3, unit)
    ws["B7"] = "=B1+B2+B3+B4+B5"
    ws["E1"] = "P [kPa]"
    for r in range(2, 8):
        ws.cell(r, 5, 100.0 * r)
        ws.cell(r, 6, f"=E{r}*2")  # copied down: reads the column cell by cell
    path = tmp_path / "layout.xlsx"
    wb.save(path)
    p = build_package(build_audit(read_book(path)))
    ins = {i.where: i for i in p.inputs}
    assert [ins[f"Calc!B{r}"].label for r in range(1, 6)] == [r[0] for r in rows]
    assert ins["Calc!B5"].unit == "barg" and ins["Calc!B2"].unit == "bar"
    assert ins["Calc!E2:E7"].value.startswith("6 values")
