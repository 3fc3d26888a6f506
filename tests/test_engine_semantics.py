"""The headless engine on Excel's own semantics, one fixture workbook per rule.

Every workbook here is built with openpyxl in the test.  Expected values are Excel's documented
behaviour of the built-in functions and references (common practice: the function reference of
the spreadsheet programs, and the ECMA-376 Part 1 formula grammar, section 18.17); the same
fixtures are recalculated by LibreOffice in tests/test_libreoffice.py (the second client).
"""

import zipfile
from pathlib import Path

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula
from openpyxl.worksheet.table import Table, TableColumn, TableStyleInfo

from joulebook.faces.cli import main
from joulebook.faces.workbook.check import compare
from joulebook.faces.workbook.engine import ERROR, Engine
from joulebook.faces.workbook.reader import read_book
from wbtools import build, outcomes, rewrite_part, with_saved


def _values(tmp_path: Path, cells: dict, prepare=None, name="b.xlsx") -> dict:
    out = outcomes(build(tmp_path / name, cells, prepare))
    return {k: o.value for k, o in out.items()}


# ---------------------------------------------------------------------------------------------
# references: absolute whole columns, rows, quoted sheets (defects 1, 2, 4)


def test_absolute_whole_columns_copied_down(tmp_path):
    cells = {"S!D1": "a", "S!E1": 1.0, "S!D2": "b", "S!E2": 2.0, "S!D3": "c", "S!E3": 3.0}
    for r, key in enumerate("cab", start=4):
        cells[f"S!A{r}"] = key
        cells[f"S!B{r}"] = f"=VLOOKUP(A{r},$D:$E,2,0)"
        cells[f"S!C{r}"] = f"=MATCH(A{r},$D:$D,0)+SUM($E:$E)"
    v = _values(tmp_path, cells)
    assert [v["S!B4"], v["S!B5"], v["S!B6"]] == [3.0, 1.0, 2.0]
    assert [v["S!C4"], v["S!C5"], v["S!C6"]] == [9.0, 7.0, 8.0]


def test_whole_rows_here_and_on_another_sheet(tmp_path):
    cells = {"S!A3": 1.0, "S!B3": 2.0, "S!C3": 4.0, "T!A1": 10.0, "T!C1": 30.0}
    for c in "ABC":
        cells[f"S!{c}5"] = "=SUM(3:3)"
        cells[f"S!{c}6"] = "=SUM(T!1:1)"
        cells[f"S!{c}7"] = "=SUM($3:$3)*2"
    v = _values(tmp_path, cells)
    assert {v[f"S!{c}5"] for c in "ABC"} == {7.0}
    assert {v[f"S!{c}6"] for c in "ABC"} == {40.0}
    assert {v[f"S!{c}7"] for c in "ABC"} == {14.0}


@pytest.mark.parametrize("sheet", ["123", "Sheet-1", "2024", "Résumé", "O'Brien", "A B"])
def test_absolute_references_to_sheets_that_need_quotes(tmp_path, sheet):
    quoted = "'" + sheet.replace("'", "''") + "'"
    cells = {"S!A1": 1.0, f"{sheet}!B2": 7.0, f"{sheet}!B3": 100.0}
    for r in range(1, 5):
        cells[f"S!B{r}"] = f"={quoted}!$B$2*2+S!A{r}"
        cells[f"S!C{r}"] = f"={quoted}!B$3"
    v = _values(tmp_path, cells)
    assert [v[f"S!B{r}"] for r in range(1, 5)] == [15.0, 14.0, 14.0, 14.0]
    assert {v[f"S!C{r}"] for r in range(1, 5)} == {100.0}


# ---------------------------------------------------------------------------------------------
# a single cell given to a function: reference or value (defect 3)


def test_single_cell_references_skip_text_blanks_and_booleans(tmp_path):
    cells = {
        "S!A1": "text",
        "S!A2": 5.0,
        "S!A3": True,
        "S!A5": 3.0,  # A4 is blank
        "S!B1": "=MAX(A1,A2)",
        "S!B2": "=COUNT(A1)",
        "S!B3": "=MIN(A5,A4)",
        "S!B4": "=ISREF(A1)",
        "S!B5": "=MDETERM(A2)",
        "S!B6": "=SUM(A3,A2)",
        "S!B7": "=COUNTA(A4)",
        "S!B8": "=COUNTBLANK(A4)",
        "S!B9": "=AVERAGE(A1,A2,A5)",
        "S!B10": "=ISREF(1)",
        "S!B11": '=MAX("text",A2)',  # a typed text argument is an error
        "S!B12": "=SUM(TRUE,A2)",  # a typed boolean counts
        "S!B13": "=A4+1",  # a blank read as a value is zero
        "S!B14": '=A4&"|"',  # and as text is empty
        "S!B15": "=AND(A3,A2)",
    }
    v = _values(tmp_path, cells)
    assert v["S!B1"] == 5.0
    assert v["S!B2"] == 0.0
    assert v["S!B3"] == 3.0
    assert v["S!B4"] is True
    assert v["S!B5"] == pytest.approx(5.0)
    assert v["S!B6"] == 5.0
    assert v["S!B7"] == 0.0
    assert v["S!B8"] == 1.0
    assert v["S!B9"] == 4.0
    assert v["S!B10"] is False
    assert v["S!B11"] == ERROR("#VALUE!")
    assert v["S!B12"] == 6.0
    assert v["S!B13"] == 1.0
    assert v["S!B14"] == "|"
    assert v["S!B15"] is True


def test_spaces_around_arguments_change_nothing(tmp_path):
    cells = {f"S!A{r}": float(r) for r in range(1, 4)}
    cells |= {f"S!B{r}": 10.0 * r for r in range(1, 4)}
    cells |= {f"S!C{r}": "abc"[r - 1] for r in range(1, 4)}
    cells |= {
        "S!D1": '=SUMIFS(B1:B3, A1:A3, ">1")',
        "S!D2": "=NPV(0.1, B1:B3, -9000)",
        "S!D3": "= SUM(A1:A3)",
        "S!D4": "=_xlfn.CONCAT( C1:C3 )",
        "S!D5": '=COUNTIFS(A1:A3, ">=2", B1:B3, "<30")',
        "S!D6": "=SUM(A1:A3 A2:B2)",  # the space between two references: intersection
        "S!D7": "=SUM(OFFSET(A1,0,1):B3)",
    }
    v = _values(tmp_path, cells)
    assert v["S!D1"] == 50.0
    npv = 10 / 1.1 + 20 / 1.1**2 + 30 / 1.1**3 - 9000 / 1.1**4
    assert v["S!D2"] == pytest.approx(npv, rel=1e-12)
    assert v["S!D3"] == 6.0
    assert v["S!D4"] == "abc"
    assert v["S!D5"] == 1.0
    assert v["S!D6"] == 2.0
    assert v["S!D7"] == 60.0


# ---------------------------------------------------------------------------------------------
# defined names (defect 5)


def test_defined_names_of_every_kind(tmp_path):
    cells = {"S!A1": 2.0, "S!A2": 3.0, "T!A1": 50.0}
    cells |= {
        "S!B1": "=Vol_T2*10",
        "S!B2": "=H2O+NR_B2",
        "S!B3": "=half*4",
        "S!B4": "=twice",
        "S!B5": "=SUM(pair)",
        "S!B6": "=here",  # sheet-local on S
        "T!B1": "=here",  # sheet-local on T
        "S!B7": "=nosuchname+1",
    }

    def names(wb):
        dn = wb.defined_names
        dn["Vol_T2"] = DefinedName("Vol_T2", attr_text="S!$A$1")
        dn["H2O"] = DefinedName("H2O", attr_text="S!$A$2")
        dn["NR_B2"] = DefinedName("NR_B2", attr_text="S!$A$1")
        dn["half"] = DefinedName("half", attr_text="0.5")
        dn["twice"] = DefinedName("twice", attr_text="S!$A$1*2")
        dn["pair"] = DefinedName("pair", attr_text="S!$A$1:$A$2")
        wb["S"].defined_names["here"] = DefinedName("here", attr_text="S!$A$2")
        wb["T"].defined_names["here"] = DefinedName("here", attr_text="T!$A$1")

    out = outcomes(build(tmp_path / "n.xlsx", cells, names))
    v = {k: o.value for k, o in out.items()}
    assert v["S!B1"] == 20.0
    assert v["S!B2"] == 5.0
    assert v["S!B3"] == 2.0
    assert v["S!B4"] == 4.0
    assert v["S!B5"] == 5.0
    assert v["S!B6"] == 3.0
    assert v["T!B1"] == 50.0
    # a name the workbook does not define: Excel shows #NAME?; the engine does not decide that
    # a name it could not find is missing, it keeps the saved value and names the name
    assert out["S!B7"].kept and "undefined name nosuchname" in out["S!B7"].problem


# ---------------------------------------------------------------------------------------------
# external links: the values the file carries (defect 6)

_LINK = """<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<externalLink xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"
 xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships">
<externalBook r:id="rId1"><sheetNames><sheetName val="Sheet1"/></sheetNames>
<sheetDataSet><sheetData sheetId="0"><row r="1"><cell r="A1"><v>42.5</v></cell>
<cell r="B1" t="str"><v>steel</v></cell></row></sheetData></sheetDataSet></externalBook>
</externalLink>"""
_LINK_RELS = """<?xml version="1.0" encoding="UTF-8" standalone="yes"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">
<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/externalLinkPath"
 Target="inputs.xlsx" TargetMode="External"/></Relationships>"""
_LINK_CT = (
    b'<Override PartName="/xl/externalLinks/externalLink1.xml" ContentType="application/'
    b'vnd.openxmlformats-officedocument.spreadsheetml.externalLink+xml"/></Types>'
)


def _add_link(src: Path, dst: Path) -> Path:
    """Add an externalLink part ([1] = inputs.xlsx, Sheet1!A1 = 42.5, B1 = "steel")."""
    tmp = dst.with_suffix(".a.xlsx")
    rewrite_part(
        src,
        tmp,
        "xl/workbook.xml",
        lambda b: b.replace(
            b"</sheets>",
            b'</sheets><externalReferences><externalReference r:id="rIdX1"/></externalReferences>',
        ),
    )
    tmp2 = dst.with_suffix(".b.xlsx")
    rewrite_part(
        tmp,
        tmp2,
        "xl/_rels/workbook.xml.rels",
        lambda b: b.replace(
            b"</Relationships>",
            b'<Relationship Id="rIdX1" Type="http://schemas.openxmlformats.org/officeDocument/'
            b'2006/relationships/externalLink" Target="externalLinks/externalLink1.xml"/>'
            b"</Relationships>",
        ),
    )
    rewrite_part(tmp2, dst, "[Content_Types].xml", lambda b: b.replace(b"</Types>", _LINK_CT))
    with zipfile.ZipFile(dst, "a") as z:
        z.writestr("xl/externalLinks/externalLink1.xml", _LINK)
        z.writestr("xl/externalLinks/_rels/externalLink1.xml.rels", _LINK_RELS)
    return dst


def test_external_link_values_come_from_the_link_cache(tmp_path):
    src = build(
        tmp_path / "a.xlsx",
        {"S!A1": "=[1]Sheet1!$A$1*2", "S!A2": "=[1]Sheet1!B1", "S!A3": "=A1+1"},
    )
    book_path = _add_link(src, tmp_path / "linked.xlsx")
    openpyxl.load_workbook(book_path)  # a valid package
    out = outcomes(book_path)
    assert out["S!A1"].value == 85.0
    assert out["S!A2"].value == "steel"
    assert out["S!A3"].value == 86.0
    assert "link" in out["S!A1"].note and "inputs.xlsx" in out["S!A1"].note


# ---------------------------------------------------------------------------------------------
# refused cells and what depends on them (defects 7, 11, 14)


def test_unknown_function_is_a_name_error_that_names_it(tmp_path, capsys):
    cells = {
        "S!A1": "=NOSUCHFUNC(1)+1",
        "S!A2": "=IF(TRUE,1,NOSUCHFUNC(1))",
        "S!A3": "=A1*2",
        "S!A4": "=A3+1",
    }
    out = outcomes(build(tmp_path / "u.xlsx", cells))
    assert out["S!A1"].value == ERROR("#NAME?")
    assert "NOSUCHFUNC" in out["S!A1"].problem and out["S!A1"].kept
    assert out["S!A2"].value == 1.0 and out["S!A2"].problem == ""
    assert out["S!A3"].problem.startswith("not checked: depends on S!A1 (unsupported")
    assert "NOSUCHFUNC" in out["S!A3"].problem
    assert out["S!A4"].problem.startswith("not checked: depends on S!A1")
    err = capsys.readouterr().err
    assert err == ""


def test_refused_cell_keeps_its_saved_value_and_check_says_why(tmp_path):
    cells = {"S!A1": "=NOSUCHFUNC(1)", "S!A2": "=A1*2", "S!A3": "=1+1"}
    saved = with_saved(
        build(tmp_path / "r.xlsx", cells),
        tmp_path / "rs.xlsx",
        {"S!A1": 21.0, "S!A2": 42.0, "S!A3": 2.0},
    )
    book = read_book(saved)
    rows = {r.cell: r for r in compare(book, Engine(book).run())}
    assert rows["A1"].status == "unsupported" and "NOSUCHFUNC" in rows["A1"].note
    assert rows["A2"].status == "not checked" and "S!A1" in rows["A2"].note
    assert rows["A3"].status == "pass"
    out = tmp_path / "copy.xlsx"
    assert main(["recalc", str(saved), "-o", str(out)]) == 0
    ws = openpyxl.load_workbook(out, data_only=True)["S"]
    assert ws["A1"].value == 21.0 and ws["A2"].value == 42.0


def test_volatile_functions_and_their_dependents(tmp_path):
    cells = {
        "S!A1": "=NOW()",
        "S!A2": "=TODAY()+1",
        "S!A3": "=RAND()",
        "S!A4": "=RANDBETWEEN(1,6)",
        "S!B1": "=A1*0",
        "S!B2": "=1+1",
    }
    saved = with_saved(
        build(tmp_path / "v.xlsx", cells),
        tmp_path / "vs.xlsx",
        {"S!A1": 1.0, "S!A2": 2.0, "S!A3": 0.5, "S!A4": 3.0, "S!B1": 0.0, "S!B2": 2.0},
    )
    book = read_book(saved)
    rows = {r.cell: r for r in compare(book, Engine(book).run())}
    for c in ("A1", "A2", "A3", "A4"):
        assert rows[c].status == "volatile", c
    assert rows["B1"].status == "volatile" and "S!A1" in rows["B1"].note
    assert rows["B2"].status == "pass"
    assert 1.0 <= rows["A4"].recomputed <= 6.0


# ---------------------------------------------------------------------------------------------
# implicit intersection, text escapes, array results (defects 8, 9, 10)


def test_implicit_intersection_of_whole_columns(tmp_path):
    cells = {f"S!A{r}": f"a{r}" for r in range(1, 15)}
    cells |= {f"S!B{r}": float(r) for r in range(1, 15)}
    cells["S!C12"] = '=A:A&"/"&B:B'
    cells["S!C13"] = "=B1:B14*2"
    cells["S!C14"] = "=SUM(B:B)"  # a whole argument of SUM: all of it
    v = _values(tmp_path, cells)
    assert v["S!C12"] == "a12/12"
    assert v["S!C13"] == 26.0
    assert v["S!C14"] == 105.0


def test_control_characters_are_escaped_when_written_and_decoded_when_read(tmp_path):
    cells = {"S!A1": '=CHAR(1)&"x"', "S!A2": "=LEN(A1)", "S!B1": '="_x"&"0041_ literal"'}
    src = build(tmp_path / "c.xlsx", cells)
    out = tmp_path / "c_out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    wb = openpyxl.load_workbook(out, data_only=True)  # every part is valid XML
    assert wb["S"]["A2"].value == 2
    book = read_book(out)
    assert book.cells[("S", 1, 1)].cached == "\x01x"
    assert book.cells[("S", 1, 2)].cached == "_x0041_ literal"


def test_escaped_text_in_saved_strings_is_decoded(tmp_path):
    src = build(tmp_path / "e.xlsx", {"S!A1": "AB", "S!B1": "=LEN(A1)&A1"})

    def change(b: bytes) -> bytes:
        return b.replace(b"<t>AB</t>", b"<t>_x0041__x0009_B</t>")

    p = rewrite_part(src, tmp_path / "e2.xlsx", "xl/worksheets/sheet1.xml", change)
    out = outcomes(p)
    assert out["S!B1"].value == "3A\tB"


def test_array_results_are_numbers_not_text(tmp_path):
    cells = {"S!A1": 2.0, "S!B1": 0.0, "S!A2": 0.0, "S!B2": 4.0, "S!C1": "=MINVERSE(A1:B2)"}

    def arrays(wb):
        wb["S"]["D1"] = ArrayFormula("D1:E2", "=MINVERSE(A1:B2)")
        wb["S"]["F1"] = ArrayFormula("F1:F3", "=A1:A2*10")  # larger than its result

    src = build(tmp_path / "m.xlsx", cells, arrays)
    v = {k: o.value for k, o in outcomes(src).items()}
    assert v["S!C1"] == pytest.approx(0.5)
    assert [v["S!D1"], v["S!E1"], v["S!D2"], v["S!E2"]] == pytest.approx([0.5, 0, 0, 0.25])
    assert v["S!F1"] == 20.0 and v["S!F2"] == 0.0 and v["S!F3"] == ERROR("#N/A")
    out = tmp_path / "m_out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    ws = openpyxl.load_workbook(out, data_only=True)["S"]
    assert ws["C1"].value == pytest.approx(0.5) and ws["E2"].value == pytest.approx(0.25)


# ---------------------------------------------------------------------------------------------
# positions, 3-D references, tables, INDIRECT and OFFSET (defects 12, 13)


def test_row_column_rows_columns(tmp_path):
    cells = {
        "S!C4": "=ROW()",
        "S!D4": "=COLUMN()",
        "S!C5": "=ROW(B7)",
        "S!D5": "=COLUMN(AB1)",
        "S!C6": "=ROWS(A1:C5)",
        "S!D6": "=COLUMNS(A1:C5)",
        "S!C7": "=ROW()*10",
        "S!C8": "=ROW()*10",
        "S!C9": "=SUMPRODUCT(ROW(A1:A3))",
    }
    v = _values(tmp_path, cells)
    assert [v["S!C4"], v["S!D4"], v["S!C5"], v["S!D5"]] == [4, 4, 7, 28]
    assert [v["S!C6"], v["S!D6"], v["S!C7"], v["S!C8"], v["S!C9"]] == [5, 3, 70, 80, 6]


def test_three_d_references(tmp_path):
    cells = {"S1!A1": 1.0, "S2!A1": 2.0, "S3!A1": 4.0, "S1!A2": 10.0, "S3!A2": 20.0}
    cells |= {
        "Sum!A1": "=SUM(S1:S3!A1)",
        "Sum!A2": "=SUM(S1:S3!A1:A2)",
        "Sum!A3": "=COUNT(S1:S3!A2)",
    }
    v = _values(tmp_path, cells)
    assert [v["Sum!A1"], v["Sum!A2"], v["Sum!A3"]] == [7.0, 37.0, 2.0]


def test_structured_references_to_a_table(tmp_path):
    cells = {"S!A1": "Item", "S!B1": "Qty", "S!C1": "Amount", "S!D1": "Line"}
    for r, (item, qty, amount) in enumerate([("bolt", 4, 2.5), ("nut", 10, 0.5)], start=2):
        cells |= {f"S!A{r}": item, f"S!B{r}": qty, f"S!C{r}": amount}
        cells[f"S!D{r}"] = "=[@Qty]*Parts[[#This Row],[Amount]]"
    cells |= {"S!A4": "Total", "S!C4": "=SUBTOTAL(109,[Amount])", "S!D4": "=SUM(Parts[Line])"}
    cells |= {
        "T!A1": "=SUM(Parts[Amount])",
        "T!A2": "=Parts[[#Totals],[Amount]]",
        "T!A3": "=ROWS(Parts[#All])",
        "T!A4": "=COUNTA(Parts[#Headers])",
        "T!A5": "=SUM(Parts[[Qty]:[Amount]])",
        "T!A6": "=ROWS(Parts)",
    }

    def table(wb):
        t = Table(displayName="Parts", ref="A1:D4", totalsRowCount=1)
        t.tableColumns = [
            TableColumn(id=i + 1, name=n) for i, n in enumerate(["Item", "Qty", "Amount", "Line"])
        ]
        t.tableStyleInfo = TableStyleInfo(name="TableStyleLight1")
        wb["S"].add_table(t)

    v = _values(tmp_path, cells, table)
    assert [v["S!D2"], v["S!D3"]] == [10.0, 5.0]
    assert v["S!C4"] == 3.0 and v["S!D4"] == 15.0
    assert v["T!A1"] == 3.0 and v["T!A2"] == 3.0
    assert v["T!A3"] == 4 and v["T!A4"] == 4.0
    assert v["T!A5"] == 17.0 and v["T!A6"] == 2


def test_indirect_and_offset(tmp_path):
    cells = {"S!A1": 1.0, "S!A2": 2.0, "S!A3": 3.0, "S!B1": 10.0, "S!B2": 20.0}
    cells |= {"Q 1!B2": 99.0}
    cells |= {
        "S!C1": '=INDIRECT("B"&ROW())',
        "S!C2": '=INDIRECT("B"&ROW())*2',
        "S!C3": "=SUM(OFFSET(A1,0,0,3,1))",
        "S!C4": "=OFFSET(A1,1,1)",
        "S!C5": "=INDIRECT(\"'Q 1'!B2\")",
        "S!C6": '=SUM(INDIRECT("A1:A"&A3))',
        "S!C7": '=INDIRECT("A"&C4)',  # a reference that reads a computed cell
        "S!C8": "=C7+1",  # downstream of a run-time reference
        "S!C9": '=INDIRECT("no such place")',
    }
    v = _values(tmp_path, cells)
    assert [v["S!C1"], v["S!C2"], v["S!C3"], v["S!C4"]] == [10.0, 40.0, 6.0, 20.0]
    assert [v["S!C5"], v["S!C6"]] == [99.0, 6.0]
    assert v["S!C7"] == 0.0 and v["S!C8"] == 1.0  # A20 is blank: read as a value, 0
    assert v["S!C9"] == ERROR("#REF!")


def test_no_traceback_or_log_on_stderr(tmp_path, capsys):
    cells = {"S!A1": "=1/0", "S!A2": "=NOSUCH(A1)", "S!A3": "=SQRT(-1)", "S!A4": "=A1+A2"}
    cells["S!A5"] = "=INDIRECT(A9)"
    outcomes(build(tmp_path / "q.xlsx", cells))
    captured = capsys.readouterr()
    assert captured.err == "" and "Traceback" not in captured.out


def test_error_values_propagate_as_errors(tmp_path):
    v = _values(
        tmp_path,
        {
            "S!A1": "=1/0",
            "S!A2": "=SQRT(-1)",
            "S!A3": "=A1+1",
            "S!A4": "=IFERROR(A1,7)",
            "S!A5": "=ISERROR(A2)",
        },
    )
    assert v["S!A1"] == ERROR("#DIV/0!") and v["S!A2"] == ERROR("#NUM!")
    assert v["S!A3"] == ERROR("#DIV/0!") and v["S!A4"] == 7.0 and v["S!A5"] is True


def test_subtotal_leaves_out_nested_subtotals_and_hidden_rows(tmp_path):
    cells = {"S!A1": 1.0, "S!A2": 2.0, "S!A3": "=SUBTOTAL(9,A1:A2)", "S!A4": 10.0, "S!A5": 20.0}
    cells |= {
        "S!B1": "=SUBTOTAL(9,A1:A5)",  # 33: the nested subtotal A3 is left out
        "S!B2": "=SUBTOTAL(109,A1:A5)",  # 13: row 5 hidden
        "S!B3": "=SUBTOTAL(1,A1:A2,A4)",
        "S!B4": "=SUBTOTAL(2,A:A)",
        "S!B5": "=SUBTOTAL(4,A1:A5)",
        "S!B6": "=SUBTOTAL(7,A1:A2)",
        "S!B7": "=SUBTOTAL(12,A1:A2)",
        "S!B8": "=SUM(A1:A5)",  # SUM does not leave anything out
    }

    def hide(wb):
        wb["S"].row_dimensions[5].hidden = True

    v = _values(tmp_path, cells, hide)
    assert v["S!B1"] == 33.0 and v["S!B2"] == 13.0
    assert v["S!B3"] == pytest.approx(13 / 3) and v["S!B4"] == 4.0 and v["S!B5"] == 20.0
    assert v["S!B6"] == pytest.approx(0.5**0.5) and v["S!B7"] == ERROR("#VALUE!")
    assert v["S!B8"] == 36.0


def test_double_minus_turns_booleans_and_text_into_numbers(tmp_path):
    cells = {"S!A1": True, "S!A2": "3", "S!A3": False, "S!A4": True, "S!A5": "abc"}
    cells |= {
        "S!B1": "=--A1",
        "S!B2": "=--A2+1",
        "S!B3": "=SUMPRODUCT(--(A1:A4=TRUE))",
        "S!B4": "=----A1",
        "S!B5": "=-- -A1",
        "S!B6": "=--2^2",  # negation binds tighter than ^ in spreadsheet formulas
        "S!B7": "=-2^2",
        "S!B8": "=+A1",  # unary plus leaves a value as it is
        "S!B9": "=--A5",  # text that is not a number: #VALUE! (the library as-is gives "abc")
        "S!B10": "=--'S'!A5&\"x\"",
    }
    v = _values(tmp_path, cells)
    assert [v[f"S!B{i}"] for i in range(1, 8)] == [1.0, 4.0, 2.0, 1.0, -1.0, 4.0, 4.0]
    assert v["S!B8"] is True
    # Excel's rule (from memory; LibreOffice agrees, tests/test_libreoffice.py): each minus
    # converts its operand to a number, so a run of signs is not folded away by parity
    assert v["S!B9"] == ERROR("#VALUE!") and v["S!B10"] == ERROR("#VALUE!")


def test_found_by_the_differential_tests(tmp_path):
    cells = {"S!A1": 0.0, "S!A2": 5.0, "S!B2": 0.0}
    cells |= {
        "S!G1": "=B2&ISNUMBER(A1)",  # a boolean in text is TRUE/FALSE
        "S!G2": "=INDEX(A1:E10,7,1)",  # a box larger than the used part keeps its size
        "S!G3": "=ROWS(A2:A30)",
        "S!G4": "=MATCH(5,A1:A30,0)",
    }
    v = _values(tmp_path, cells)
    assert v["S!G1"] == "0TRUE"
    assert v["S!G2"] == 0.0 and v["S!G3"] == 29 and v["S!G4"] == 2
    cells = {"S!A1": 1.0, "S!A2": 2.0, "S!B1": "=SUM(A2:A1)", "S!B2": "=E8"}
    cells["S!E8"] = '=""'
    v = _values(tmp_path, cells, name="c.xlsx")
    assert v["S!B1"] == 3.0 and v["S!B2"] == ""  # a reversed box is the same box


def test_a_cell_that_reads_itself_is_circular(tmp_path):
    cells = {"S!A3": 1.0, "S!B3": "=SUM(3:3)", "S!C1": "=C1+1", "S!D3": "=ROW(3:3)+COLUMNS(3:3)"}
    cells |= {"S!E1": "=ROWS(E:E)", "S!F1": "=B3+1"}
    out = outcomes(build(tmp_path / "self.xlsx", cells))
    assert out["S!B3"].problem.startswith("circular") and out["S!C1"].problem.startswith("circular")
    assert out["S!D3"].problem == "" and out["S!E1"].problem == ""  # only their places are read
    assert out["S!F1"].problem.startswith("not checked: depends on S!B3 (circular")


def test_recalc_lists_every_changed_cell_and_every_cell_left_as_saved(tmp_path, capsys):
    import json

    cells = {"S!A1": 2.0, "S!B1": "=A1*2", "S!B2": "=NOSUCHFUNC(A1)", "S!B3": "=B2+1"}
    cells |= {f"S!C{r}": f"=A1+{r}" for r in range(1, 16)}  # all changed
    saved = {"S!B1": 4.0, "S!B2": 9.0, "S!B3": 10.0} | {f"S!C{r}": 0.0 for r in range(1, 16)}
    src = with_saved(build(tmp_path / "l.xlsx", cells), tmp_path / "ls.xlsx", saved)
    out, rep = tmp_path / "out.xlsx", tmp_path / "reports" / "recalc.json"
    assert main(["recalc", str(src), "-o", str(out), "--json", str(rep)]) == 0
    text = capsys.readouterr().out
    assert "15 changed from the saved values" in text and "2 left as saved" in text
    assert "S!B2" in text and "NOSUCHFUNC" in text and "… and 5 more changed" in text
    report = json.loads(rep.read_text())
    assert sorted(c["cell"] for c in report["changed"]) == sorted(f"S!C{r}" for r in range(1, 16))
    assert {c["cell"]: c["saved"] for c in report["left_as_saved"]} == {"S!B2": 9.0, "S!B3": 10.0}
    assert all(c["note"] for c in report["left_as_saved"])
    ws = openpyxl.load_workbook(out, data_only=True)["S"]
    assert (ws["B2"].value, ws["B3"].value, ws["C3"].value) == (9, 10, 5)


def test_whole_rows_and_columns_keep_their_full_size(tmp_path):
    cells = {"S!A1": 1.0, "S!A2": 2.0, "S!B1": 10.0, "S!B2": 20.0, "S!D1": "x", "S!D2": "y"}
    cells |= {f"T!A{r}": float(r) for r in range(1, 6)}
    cells |= {
        "S!F1": "=ROWS(A:A)",
        "S!F2": "=COLUMNS(1:1)",
        "S!F3": "=COUNTBLANK(A:A)",
        "S!F4": "=INDEX(A:A,100)",  # past the used part: a blank cell
        "S!F5": "=INDEX(A1:B2,2,2)",
        "S!F6": "=SUM(INDEX(A1:B2,0,2))",
        "S!F7": "=INDEX(A1:A2,3)",
        "S!F8": '=INDEX(D1:D2,MATCH("y",D1:D2,0))',
        "S!F9": "=SUM(A1:INDEX(A:A,2))",
        "S!F10": "=INDEX({1,2;3,4},2,1)",
        "S!F11": "=INDEX((A1:A2,B1:B2),1,1,2)",
        "S!F12": "=SUMPRODUCT(A:A,T!A:A)",  # sheets used to different depths
        "S!F13": "=COUNTBLANK(A1:B5)",
        "S!G1": "=1+1",
        "S!F14": "=OFFSET(A1,G1-1,1)",  # OFFSET reads its row count: a dependency
    }
    v = _values(tmp_path, cells)
    assert v["S!F1"] == 1048576 and v["S!F2"] == 16384 and v["S!F3"] == 1048574
    assert v["S!F4"] == 0.0 and v["S!F5"] == 20.0 and v["S!F6"] == 30.0
    assert v["S!F7"] == ERROR("#REF!") and v["S!F8"] == "y" and v["S!F9"] == 3.0
    assert v["S!F10"] == 3 and v["S!F11"] == 10.0 and v["S!F12"] == 5.0
    assert v["S!F13"] == 6.0 and v["S!F14"] == 20.0


def test_criteria_tell_true_from_one(tmp_path):
    cells = {"S!A1": True, "S!A2": 1.0, "S!A3": 2.0, "S!B1": 5.0, "S!B2": 7.0, "S!B3": 11.0}
    cells |= {
        "S!C1": '=SUMIF(A1:A3,">0")',  # logical values never meet a numeric criterion
        "S!C2": "=COUNTIF(A1:A3,1)",
        "S!C3": "=COUNTIF(A1:A3,TRUE)",
        "S!C4": "=SUMIFS(B1:B3,A1:A3,1)",
    }
    v = _values(tmp_path, cells)
    assert [v["S!C1"], v["S!C2"], v["S!C3"], v["S!C4"]] == [3.0, 1.0, 1.0, 7.0]


def _data_table_book(tmp_path, saved):
    """A sheet with a one-input table down a column (input A1, formula B2 = A1^2 + C1, values
    2, 3, 4 in A3:A5, results B3:B5), a two-input table (row input A1, column input C1,
    formula E2 = A1^2 + C1, row values F2:G2, column values E3:E4, results F3:G4) and a cell
    reading a result (H5 = B5 + 1)."""
    from openpyxl.worksheet.formula import DataTableFormula

    from wbtools import build, with_saved

    def tables(wb):
        ws = wb["S"]
        ws["B3"] = DataTableFormula(ref="B3:B5", r1="A1")
        ws["B4"], ws["B5"] = 0.0, 0.0
        ws["F3"] = DataTableFormula(ref="F3:G4", dt2D=True, r1="A1", r2="C1")
        ws["G3"], ws["F4"], ws["G4"] = 0.0, 0.0, 0.0

    cells = {"S!A1": 1.0, "S!C1": 10.0, "S!B2": "=A1^2+C1", "S!D1": "=C1*2",
             "S!A3": 2.0, "S!A4": 3.0, "S!A5": 4.0,
             "S!E2": "=A1^2+C1", "S!F2": 5.0, "S!G2": 6.0, "S!E3": 100.0, "S!E4": 200.0,
             "S!H5": "=B5+1"}  # fmt: skip
    src = build(tmp_path / "t.xlsx", cells, tables)
    return with_saved(src, tmp_path / "t2.xlsx", saved)


def test_what_if_data_table_cells_are_the_formula_recomputed_per_input(tmp_path):
    """A data table stores only its range and input cells; each result cell is the formula
    cell recomputed with the input cell holding that row's (and column's) value [1]; the
    inputs keep their own values for every other cell.
    [1] hand: B3 = 2² + 10; F3 = 5² + 100 (row value in A1, column value in C1)."""
    from wbtools import outcomes

    path = _data_table_book(tmp_path, {"S!B3": 14.0, "S!B4": 19.0, "S!B5": 0.0, "S!H5": 27.0,
                                       "S!F3": 125.0})  # fmt: skip
    out = outcomes(path)
    assert [out[f"S!B{r}"].value for r in (3, 4, 5)] == [14.0, 19.0, 26.0]  # hand
    assert [out[k].value for k in ("S!F3", "S!G3", "S!F4", "S!G4")] == [125.0, 136.0, 225.0, 236.0]
    assert out["S!B2"].value == 11.0 and out["S!D1"].value == 20.0  # inputs put back
    assert out["S!H5"].value == 27.0 and not out["S!H5"].problem  # reads the table's result
    assert all(not out[k].problem for k in ("S!B3", "S!B5", "S!G4"))


def test_data_table_recalc_writes_the_results_and_check_tells_a_stale_one(tmp_path):
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book
    from joulebook.faces.workbook.writer import write_copy

    path = _data_table_book(tmp_path, {"S!B5": 0.0})
    book = read_book(path)
    outcomes = Engine(book).run()
    assert outcomes[("S", 5, 2)].value == 26.0  # the saved 0 is stale: recomputed
    out = write_copy(book, outcomes, tmp_path / "re.xlsx")
    import openpyxl

    ws = openpyxl.load_workbook(out, data_only=True)["S"]
    assert ws["B5"].value == 26.0 and ws["G4"].value == 236.0


def test_data_table_sweeps_a_joulebook_formula(tmp_path):
    """A sensitivity table over a joulebook cell: boundary work of an isobaric expansion from
    0.1 to 0.3 m³ for pressures 100, 200 and 350 kPa (hand: W = P·ΔV = 20, 40, 70 kJ)."""
    from openpyxl.worksheet.formula import DataTableFormula

    from wbtools import build, outcomes

    def table(wb):
        wb["S"]["B3"] = DataTableFormula(ref="B3:B5", r1="A1")

    cells = {"S!A1": 500.0, "S!B2": "=JB_WORK_ISOBARIC(A1,0.1,0.3)",
             "S!A3": 100.0, "S!A4": 200.0, "S!A5": 350.0, "S!B4": 0.0, "S!B5": 0.0}  # fmt: skip
    out = outcomes(build(tmp_path / "w.xlsx", cells, table))
    got = [out[f"S!B{r}"].value for r in (3, 4, 5)]
    assert got == pytest.approx([20.0, 40.0, 70.0], rel=1e-12)  # hand
    assert out["S!B2"].value == pytest.approx(100.0)  # the input's own value: 500 kPa


def test_an_omitted_argument_of_our_function_is_missing_not_zero(tmp_path):
    """JB_X(a,,b) hands the sheet face None for the omitted argument (xlwings); headless the
    formula library would hand over 0 (a P_amb of 0 kPa, a wall of 0 m).  Source: the sheet
    face's own rule (tests/test_sheet.py), common practice for spreadsheet add-ins."""
    from joulebook import call
    from wbtools import build, outcomes

    cells = {
        "S!A1": "water | T = 15 degC | P = 4 bar",
        "S!B1": '=JB_BLOCKED_IN_P2(A1,318.15,"rigid",,,,,,"K-kPa-kJ")',
        "S!B2": "=JB_TEST_PNEUMATIC_ENERGY(1200,2,)",
        "S!B3": "=JB_TEST_PNEUMATIC_ENERGY(1200, 2, )",
    }
    out = outcomes(build(tmp_path / "o.xlsx", cells))
    assert out["S!B1"].value == call("JB_BLOCKED_IN_P2", "water | T = 15 degC | P = 4 bar", 318.15)
    assert out["S!B2"].value == call("JB_TEST_PNEUMATIC_ENERGY", 1200, 2)
    assert out["S!B3"].value == out["S!B2"].value
