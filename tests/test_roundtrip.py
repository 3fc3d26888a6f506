"""recalc never loses a cell: the writer patches what the parser found, and every copy is
proved equal to its input outside the recomputed values before it replaces its target.

Each sheet below is written by hand, valid XML a spreadsheet program may write, in the forms
that made the former regular-expression writer drop or misplace cells: single-quoted
attributes, spaces around ``=``, a prefixed namespace with a foreign namespaced attribute, a
reversed array range.  The scenario (a receiver's pressure and volume, invented) is ours.
"""

import hashlib
import time
import zipfile
from pathlib import Path

import pytest

from handmade import SHEET, _book, _sheet
from joulebook.core.errors import BadInput
from joulebook.faces.cli import main
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.roundtrip import CopyMismatch, prove_copy
from wbtools import rewrite_part


def _values(path: Path) -> dict:
    return {(r, c): x.cached for (_s, r, c), x in read_book(path).cells.items()}


def _sha(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


VARIANTS = {
    "plain": {},
    "single quotes": {"q": "'"},
    "spaces around =": {"eq": " = "},
    "prefixed namespace, namespaced attribute": {"prefix": "x", "extra": ' q:r="Z9"'},
}


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_recalc_keeps_every_cell_of_valid_but_unusual_xml(tmp_path, variant, capsys):
    src = _book(tmp_path, "in.xlsx", _sheet(**VARIANTS[variant]))
    before = _values(src)
    assert len(before) == 9  # 4 labels, 2 inputs, 2 formulas, 1 boolean (the blank holds none)
    h = _sha(src)
    out = tmp_path / "out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    assert "2 changed" in capsys.readouterr().out
    after = _values(out)
    # P*V = 250 kPa × 2 m3 = 500 kJ, and 500 > 400: both saved values were stale
    assert after == {**before, (4, 2): 500.0, (5, 2): True}
    assert _sha(src) == h
    # every element the writer does not own is still there, styled blank cell included
    with zipfile.ZipFile(out) as z:
        xml = z.read(SHEET)
    assert xml.count(b"A5") == 1 and b"Z9" in xml or "q:" not in VARIANTS[variant].get("extra", "")
    assert xml.count(b"<" + (b"x:" if "prefix" in VARIANTS[variant] else b"") + b"c ") == 10


def test_a_reversed_array_range_is_normalised_when_it_starts_at_its_cell(tmp_path):
    sheet = _sheet().replace(
        b"<f>B2*B3</f><v>30</v>", b'<f t="array" ref="B4:B4">B2*B3</f><v>30</v>'
    )
    sheet = sheet.replace(b'ref="B4:B4"', b'ref="C4:B4"')  # corners given right to left
    src = _book(tmp_path, "rev.xlsx", sheet)
    book = read_book(src)
    assert book.cells[("Sheet", 4, 2)].array_ref == "B4:C4"
    out = tmp_path / "out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    after = _values(out)
    assert after[(4, 2)] == 500.0 and after[(4, 3)] == 500.0  # one value repeats across
    assert after[(4, 1)] == "P*V in kJ" and after[(1, 1)] == "Receiver R-7 (invented)"


def test_an_array_range_not_starting_at_its_cell_is_refused(tmp_path, capsys):
    # the anchor is B4 but the range B4:A1 (A1:B4) starts at A1: the title and labels
    # would be overwritten by the result
    sheet = _sheet().replace(b"<f>B2*B3</f>", b'<f t="array" ref="B4:A1">B2*B3</f>')
    src = _book(tmp_path, "rev.xlsx", sheet)
    out = tmp_path / "out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "Sheet!B4" in err and "B4:A1" in err and "does not start at its own cell" in err
    assert not out.exists()
    assert main(["check", str(src)]) == 2  # check and recalc agree on what is readable


def test_the_proof_aborts_a_copy_that_lost_a_cell(tmp_path, monkeypatch, capsys):
    """A planted writer fault (a label dropped) must abort the write with exit 3, the
    target untouched; the clean twin passes the same proof."""
    import joulebook.faces.workbook.writer as w

    src = _book(tmp_path, "in.xlsx", _sheet())
    out = tmp_path / "out.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0  # the clean twin
    h = _sha(out)
    real = w.patch_sheet_xml

    def losing(xml, values, part=""):
        return real(xml, values, part).replace(
            b'<c r="A3" t="inlineStr"><is><t>V in m3</t></is></c>', b""
        )

    monkeypatch.setattr(w, "patch_sheet_xml", losing)
    assert main(["recalc", str(src), "-o", str(out), "--force"]) == 3
    err = capsys.readouterr().err
    assert "nothing written" in err and "differs from the input" in err
    assert _sha(out) == h  # the old output stays
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".joulebook-")]


def test_the_proof_refuses_a_value_written_over_a_label(tmp_path):
    src = _book(tmp_path, "in.xlsx", _sheet())
    book = read_book(src)
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    with pytest.raises(CopyMismatch, match="Sheet!A2 holds no formula"):
        prove_copy(book, out, {SHEET: {(2, 1): 1.0}})


def test_the_proof_refuses_a_changed_attribute_and_passes_the_clean_copy(tmp_path):
    src = _book(tmp_path, "in.xlsx", _sheet())
    book = read_book(src)
    outcomes = Engine(book).run()
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    listed = {SHEET: {(r, c): o.value for (_s, r, c), o in outcomes.items()}}
    prove_copy(book, out, listed)  # the clean copy holds
    bad = rewrite_part(
        out, tmp_path / "bad.xlsx", SHEET, lambda x: x.replace(b'r="A5" s="0"', b'r="A5" s="1"')
    )
    with pytest.raises(CopyMismatch, match="outside the recomputed values"):
        prove_copy(book, bad, listed)


def test_cells_without_r_are_placed_as_the_reader_places_them(tmp_path):
    # r is optional on <c> and <row> (ECMA-376 Part 1, §18.3.1.4 and §18.3.1.73)
    sheet = _sheet().replace(b' r="A2"', b"").replace(b' r="3"', b"")
    src = _book(tmp_path, "norefs.xlsx", sheet)
    assert _values(src)[(2, 1)] == "P in kPa" and _values(src)[(3, 2)] == 2.0
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    assert _values(out)[(4, 2)] == 500.0 and _values(out)[(2, 1)] == "P in kPa"


def test_spilled_cells_missing_from_the_file_are_added_in_order(tmp_path):
    # the anchor B7 alone was saved; C7, D7 (an existing row) and B8:D9 (new rows) are added
    sheet = _sheet().replace(
        b"</sheetData>",
        b'<row r="7"><c r="B7"><f t="array" ref="B7:D9">B2*B3</f><v>1</v></c></row>'
        b'<row r="12" hidden="1"><c r="A12" t="inlineStr"><is><t>end</t></is></c></row>'
        b"</sheetData>",
    )
    src = _book(tmp_path, "spill.xlsx", sheet)
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    after = _values(out)
    assert all(after[(r, c)] == 500.0 for r in (7, 8, 9) for c in (2, 3, 4))
    assert after[(12, 1)] == "end" and read_book(out).hidden_rows == {"Sheet": {12}}
    with zipfile.ZipFile(out) as z:
        xml = z.read(SHEET)
    assert xml.index(b'r="B7"') < xml.index(b'r="C7"') < xml.index(b'r="D7"')
    assert xml.index(b'<row r="7">') < xml.index(b'<row r="8">') < xml.index(b'<row r="9">')
    assert xml.index(b'<row r="9">') < xml.index(b'<row r="12"')


@pytest.mark.parametrize(
    "f",
    [
        b'<f t="array" ref="B4:XFD1048576">B2*B3</f>',
        b'<f t="shared" si="0" ref="B4:XFD1048576">B2*B3</f>',
        b'<f t="dataTable" ref="B4:XFD1048576" dt2D="1" r1="B2" r2="B3"/>',
    ],
    ids=["array", "shared", "dataTable"],
)
def test_a_declared_range_over_the_limit_is_refused_before_allocation(tmp_path, f):
    # a 6 KB file declaring 17 billion cells: refused at once, before any list is made
    src = _book(tmp_path, "huge.xlsx", _sheet().replace(b"<f>B2*B3</f>", f))
    t = time.perf_counter()
    with pytest.raises(BadInput, match="declares 17,178,771,459 cells; the limit is 250,000"):
        read_book(src)
    assert time.perf_counter() - t < 2.0


def test_a_merged_range_of_the_whole_sheet_costs_nothing(tmp_path, capsys):
    # merged cells are never expanded (nothing is allocated per merged cell): read at once
    sheet = _sheet().replace(
        b"</sheetData>",
        b'</sheetData><mergeCells count="1"><mergeCell ref="A1:XFD1048576"/></mergeCells>',
    )
    src = _book(tmp_path, "merged.xlsx", sheet)
    t = time.perf_counter()
    assert main(["check", str(src)]) == 1  # its two stale values
    assert time.perf_counter() - t < 10.0


def test_a_row_without_r_is_its_first_cells_row(tmp_path):
    sheet = _sheet().replace(b'<row r="4">', b"<row>").replace(b'<row r="5">', b"<row>")
    src = _book(tmp_path, "rows.xlsx", sheet)
    assert _values(src)[(4, 2)] == 30.0 and _values(src)[(5, 3)] is True
    out = tmp_path / "o.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    assert _values(out)[(4, 2)] == 500.0 and _values(out)[(5, 2)] is True


def test_a_cell_outside_its_row_is_refused(tmp_path, capsys):
    # reader and writer would place it differently: refused, exit 2, by both verbs
    src = _book(tmp_path, "astray.xlsx", _sheet().replace(b'<c r="B3">', b'<c r="B9">'))
    assert main(["check", str(src)]) == 2
    assert main(["recalc", str(src), "-o", str(tmp_path / "o.xlsx")]) == 2
    assert "Sheet!B9 lies in row 3 of the sheet" in capsys.readouterr().err
