"""References read from the formula tokenizer (joulebook.faces.workbook.refs).

Expected readings follow the A1 reference grammar of ECMA-376 Part 1, §18.17 (common
practice: what the spreadsheet programs write in saved files).
"""

import pytest

from joulebook.faces.workbook.refs import (
    MAX_COL,
    MAX_ROW,
    calls_ours,
    cell_refs,
    normalise,
    parse_ref,
    quote_sheet,
    split_sheet,
)


@pytest.mark.parametrize(
    "text, kind, sheet, book, box",
    [
        ("B2", "cell", None, None, (2, 2, 2, 2)),
        ("$D:$E", "cols", None, None, (1, 4, MAX_ROW, 5)),
        ("3:3", "rows", None, None, (3, 1, 3, MAX_COL)),
        ("Sheet2!1:1", "rows", "Sheet2", None, (1, 1, 1, MAX_COL)),
        ("'123'!$B$2", "cell", "123", None, (2, 2, 2, 2)),
        ("'O''Brien'!A1:B3", "area", "O'Brien", None, (1, 1, 3, 2)),
        ("'Résumé'!C4", "cell", "Résumé", None, (4, 3, 4, 3)),
        ("[1]Sheet1!$A$1", "cell", "Sheet1", "1", (1, 1, 1, 1)),
        ("'[2]My sheet'!B2", "cell", "My sheet", "2", (2, 2, 2, 2)),
        ("XFD1048576", "cell", None, None, (MAX_ROW, MAX_COL, MAX_ROW, MAX_COL)),
    ],
)
def test_references_as_saved(text, kind, sheet, book, box):
    ref = parse_ref(text)
    assert (ref.kind, ref.sheet, ref.book, ref.placed(0, 0)) == (kind, sheet, book, box)


@pytest.mark.parametrize("text", ["Vol_T2", "H2O", "NR_B2", "rate", "_hidden"])
def test_names_with_cell_like_pieces_are_names(text):
    ref = parse_ref(text)
    assert ref.kind == "name" and ref.text == text


@pytest.mark.parametrize("text", ["Table1[Amount]", "[@Qty]", "Parts[[#Totals],[Amount]]"])
def test_structured_references(text):
    assert parse_ref(text).kind == "table"


def test_relative_form_and_moves():
    a, b = parse_ref("A$1"), parse_ref("B$1")
    assert a.key(5, 3) == b.key(5, 4)  # the same reference copied one column right
    assert parse_ref("$A$1").key(5, 3) == parse_ref("$A$1").key(9, 9)
    assert parse_ref("A1").placed(-1, 0) is None  # off the sheet: #REF!
    assert parse_ref("B2:A1").placed(0, 0) == (1, 1, 2, 2)  # corners in order


def test_three_d_span():
    ref = parse_ref("Sheet1:Sheet3!A1")
    assert (ref.sheet, ref.sheet2) == ("Sheet1", "Sheet3")


def test_sheet_names_round_trip():
    for name in ["Calc", "Sheet-1", "2024", "O'Brien", "A B", "Résumé"]:
        quoted = quote_sheet(name)
        assert split_sheet(quoted + "!A1") == (None, name, "A1")


def test_our_functions_in_every_saved_form():
    assert normalise('_xludf.JB_PROP("water")+[1]!jb_gas_k("air")') == (
        'JB_PROP("water")+JB_GAS_K("air")'
    )
    assert normalise('"_xludf.JB_PROP(" & A1') == '"_xludf.JB_PROP(" & A1'  # text stays text
    assert calls_ours("=1+JB_ABOUT()".lstrip("=")) and not calls_ours('"JB_ABOUT()"&1')


def test_cell_references_of_a_formula():
    assert cell_refs("A1+'My sheet'!$B$2*SUM(C1:C3)+rate", "S") == [
        ("S", 1, 1),
        ("My sheet", 2, 2),
    ]
