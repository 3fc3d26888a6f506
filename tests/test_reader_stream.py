"""The sheet reader, streamed element by element: each kind of cell the package can hold reads
as the element tree read it (ECMA-376 Part 1 §18.3.1.4 c, §18.3.1.96 v, §18.4.6 rPh)."""

import pytest

from joulebook.core.errors import BadInput
from joulebook.faces.workbook.reader import read_book
from wbtools import build, rewrite_part

HEAD = (
    b'<?xml version="1.0" encoding="UTF-8"?>'
    b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
)


def _book(tmp_path, rows: bytes, tail: bytes = b""):
    src = build(tmp_path / "src.xlsx", {"S!A1": 1.0})
    sheet = HEAD + b"<sheetData>" + rows + b"</sheetData>" + tail + b"</worksheet>"
    out = rewrite_part(src, tmp_path / "book.xlsx", "xl/worksheets/sheet1.xml", lambda _: sheet)
    return read_book(out)


def test_every_kind_of_saved_value(tmp_path):
    book = _book(
        tmp_path,
        b'<row r="1"><c r="A1"><v>2.5</v></c><c r="B1" t="b"><v>1</v></c>'
        b'<c r="C1" t="e"><v>#DIV/0!</v></c><c r="D1" t="str"><v>a_x000D_b</v></c>'
        b'<c r="E1" t="str"><v></v></c><c r="F1"><v/></c><c r="G1" t="s"><v/></c></row>'
        b'<row r="2"><c r="A2" t="inlineStr"><is><r><t>rich </t></r><r><t>text</t></r>'
        b"<rPh><t>PHONETIC</t></rPh></is></c>"
        b'<c r="B2"><f>A1*2</f><v>5</v></c><c r="C2"><f>A1*3</f></c><c r="D2"><f/><v>1</v></c>'
        b'<c r="E2" t="str"><f>"x"</f><v>x</v></c></row>',
    )
    c = book.cells
    assert (c[("S", 1, 1)].cached, c[("S", 1, 2)].cached) == (2.5, True)
    assert c[("S", 1, 3)].cached == ("error", "#DIV/0!")
    assert c[("S", 1, 4)].cached == "a\rb"  # _x000D_ is a carriage return (§22.9.2.19)
    # an empty <v></v> of a text cell is saved empty text; an empty number is no value
    assert (c[("S", 1, 5)].has_cached, c[("S", 1, 5)].cached) == (True, "")
    assert ("S", 1, 6) not in c and ("S", 1, 7) not in c
    assert c[("S", 2, 1)].cached == "rich text"  # runs joined, the phonetic run left out
    assert (c[("S", 2, 2)].formula, c[("S", 2, 2)].cached) == ("A1*2", 5.0)
    assert (c[("S", 2, 3)].formula, c[("S", 2, 3)].has_cached) == ("A1*3", False)
    assert c[("S", 2, 4)].formula is None and c[("S", 2, 4)].cached == 1.0
    assert (c[("S", 2, 5)].formula, c[("S", 2, 5)].cached) == ('"x"', "x")


def test_shared_and_array_formulas_hidden_rows_and_filters(tmp_path):
    book = _book(
        tmp_path,
        b'<row r="1" hidden="1"><c r="A1"><v>1</v></c>'
        b'<c r="B1"><f t="shared" ref="B1:B3" si="0">A1*2</f><v>2</v></c></row>'
        b'<row r="2"><c r="B2"><f t="shared" si="0"/><v>0</v></c>'
        b'<c r="C2"><f t="array" ref="C2:C3">A1:A2*2</f><v>2</v></c></row>'
        b'<row r="3" hidden="true"><c r="B3"><f t="shared" si="0"/></c></row>',
        b'<autoFilter ref="A1:B3"/>',
    )
    c = book.cells
    assert [c[("S", r, 2)].formula for r in (1, 2, 3)] == ["A1*2", "A2*2", "A3*2"]
    assert c[("S", 2, 3)].array_ref == "C2:C3"
    assert book.hidden_rows["S"] == {1, 3}
    assert "S" in book.filtered


@pytest.mark.parametrize(
    "rows, why",
    [
        (b'<row r="1"><c r="A1"><v>1</v></c>', "is not safe, well-formed XML"),  # not closed
        # a shared-string index that is text
        (b'<row r="1"><c r="A1" t="s"><v>x</v></c></row>', "holds a cell that cannot be read"),
    ],
)
def test_malformed_sheets_are_refused_by_name(tmp_path, rows, why):
    with pytest.raises(BadInput, match=f"sheet 'S' {why}"):
        _book(tmp_path, rows)
