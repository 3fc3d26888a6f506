"""The workbook-level error style (defined name JB_ERRORS) and the blank rule, in both faces.

The rules are joulebook's own (docs/errors.md); the spreadsheet behaviour they rely on —
IFERROR/ISERROR catch error values, an error value propagates through arithmetic — is Excel's
(from memory; LibreOffice agrees, tests/test_libreoffice.py).
"""

import types

import openpyxl
import pytest
from openpyxl.workbook.defined_name import DefinedName

from joulebook.core.errors import BadInput
from joulebook.faces.cli import main
from joulebook.faces.workbook.engine import ERROR, Engine
from joulebook.faces.workbook.reader import read_book
from wbtools import build

CELLS = {
    "S!A1": 5.0,  # below the ideal-gas model's range for air
    "S!A2": 300.0,
    "S!B1": '=JB_GAS_CP("air",A1)',
    "S!B2": '=JB_GAS_CP("air",A2)',
    "S!B3": '=JB_GAS_CP("air",A3)',  # A3 blank: a row not filled in yet
    "S!B4": '=JB_GAS_CP("no such gas",A2)',
    "S!C1": "=IFERROR(B1,-1)",
    "S!C2": "=JB_WHY(B1)",
    "S!C3": "=JB_WHY(B2)",
    "S!C4": '=2*JB_GAS_CP("air",A1)',
    "S!C5": "=JB_WHY(C4)",
    "S!C6": "=ISERROR(B1)",
    "S!C7": '=JB_WHY(JB_GAS_CP("air",1))',
    "S!C8": "=B3",
}


def _book(tmp_path, style=None, name="e.xlsx"):
    def prepare(wb):
        if style is not None:
            wb.defined_names["JB_ERRORS"] = DefinedName("JB_ERRORS", attr_text=style)

    return build(tmp_path / name, CELLS, prepare)


def _values(path):
    return {
        f"{k[0]}!{openpyxl.utils.get_column_letter(k[2])}{k[1]}": o
        for k, o in Engine(read_book(path)).run().items()
    }


def test_text_style_is_the_default(tmp_path):
    v = _values(_book(tmp_path))
    assert v["S!B1"].value.startswith("OutOfRange: air: T = 5 K")
    assert v["S!B1"].message == v["S!B1"].value
    assert v["S!C1"].value == v["S!B1"].value  # text is not an error: IFERROR passes it on
    assert v["S!C6"].value is False
    assert v["S!C2"].value == v["S!B1"].value and v["S!C2"].message == ""  # explains, not fails
    assert v["S!C3"].value == ""
    assert v["S!B3"].value == "" and v["S!B3"].message == ""  # blank in, blank out
    assert v["S!B4"].value.startswith("BadInput:")


@pytest.mark.parametrize("text", ['"values"', '"VALUES"', '="values"'])
def test_values_style_gives_error_values_with_their_messages(tmp_path, text):
    v = _values(_book(tmp_path, text))
    assert v["S!B1"].value == ERROR("#NUM!")  # out of range
    assert v["S!B1"].message.startswith("OutOfRange: air: T = 5 K")
    assert v["S!B4"].value == ERROR("#VALUE!")  # bad input
    assert v["S!C1"].value == -1.0  # IFERROR catches it
    assert v["S!C6"].value is True
    assert v["S!C2"].value == v["S!B1"].message
    assert v["S!C4"].value == ERROR("#NUM!")  # propagates through arithmetic, message kept
    assert v["S!C5"].value == v["S!B1"].message
    assert v["S!C7"].value.startswith("OutOfRange: air: T = 1 K")
    assert v["S!B2"].value == pytest.approx(1.00477609, rel=1e-8)
    assert v["S!B3"].value == "" and v["S!C8"].value == ""  # the blank rule holds in both


def test_an_unknown_style_is_refused_by_name(tmp_path):
    with pytest.raises(BadInput, match=r"JB_ERRORS = .*loud.*\"text\".*\"values\""):
        Engine(read_book(_book(tmp_path, '"loud"')))


def test_check_fails_error_values_unless_allowed_and_recalc_writes_them(tmp_path, capsys):
    src = _book(tmp_path, '"values"')
    out = tmp_path / "fresh.xlsx"
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    wb = openpyxl.load_workbook(out, data_only=True)  # real error values (t="e")
    assert wb["S"]["B1"].data_type == "e" and wb["S"]["B1"].value == "#NUM!"
    cells = {c.ref: c for c in read_book(out).cells.values()}
    assert cells["B1"].cached == ERROR("#NUM!")
    capsys.readouterr()
    # saved the same error, still a joulebook failure in a strict check
    assert main(["check", str(out), "--json", str(tmp_path / "r.json")]) == 1
    report = capsys.readouterr().out
    assert "S!B1" in report and "error" in report
    # IFERROR swallowing the refusal, and a blank call read on, are red too (design §3);
    # ISERROR and JB_WHY only look at it
    assert main(["check", str(out), "--allow-errors"]) == 1
    report = capsys.readouterr().out
    assert "S!C1 " in report and "refusal used" in report  # =IFERROR(B1,-1)
    assert "S!C8 " in report and "blank input" in report  # =B3, B3 blank
    assert "S!C6 " not in report and "S!C2 " not in report  # =ISERROR(B1), =JB_WHY(B1)
    assert main(["check", str(out), "--allow-errors", "--allow-refusals"]) == 0


# ---------------------------------------------------------------------------------------
# the sheet face: the same cells through joulebook.faces.sheet.cells with a stand-in caller


class _Names(list):
    def __getitem__(self, key):
        if isinstance(key, str):
            return next(n for n in self if n.name == key)
        return super().__getitem__(key)


def _caller(address, style=None, book="calc.xlsx"):
    names = _Names()
    if style:
        names.append(types.SimpleNamespace(name="JB_ERRORS", refers_to=f'="{style}"'))
    sheet = types.SimpleNamespace(name="S", book=types.SimpleNamespace(fullname=book, names=names))
    return types.SimpleNamespace(sheet=sheet, address=address, value=None)


@pytest.fixture
def sheet_cells():
    import sys

    from joulebook.tools.sheetgen import windows_stubs

    for name, mod in windows_stubs().items():
        sys.modules.setdefault(name, mod)
    import joulebook.faces.sheet.cells as cells

    cells._STYLES.clear()
    cells._MESSAGES.clear()
    return cells


def test_both_faces_give_the_same_cell(tmp_path, sheet_cells):
    engine = _values(_book(tmp_path, '"values"'))
    c = sheet_cells
    b1 = c.cell("JB_GAS_CP", [["air"]], [[5.0]], None, caller=_caller("$B$1", "values", "e"))
    b4 = c.cell(
        "JB_GAS_CP", [["no such gas"]], [[300.0]], None, caller=_caller("$B$4", "values", "e")
    )
    b3 = c.cell("JB_GAS_CP", [["air"]], [[None]], None, caller=_caller("$B$3", "values", "e"))
    for got, key in ((b1, "S!B1"), (b4, "S!B4")):
        assert got.varianttype == 10  # VT_ERROR: Excel shows the error value
        assert got.value == c.COM_ERROR_CODES[engine[key].value[1]]
    assert b3 is None and engine["S!B3"].value == ""  # blank (xlwings writes None as empty)
    # JB_WHY(B1): the message kept for B1's address, as the engine keeps it for B1
    why = c.why("JB_WHY", _caller("$B$1", book="e"), caller=_caller("$C$2", "values", "e"))
    assert why == engine["S!C2"].value
    # the text style (no name) gives the same text as the engine
    text = _values(_book(tmp_path, name="t.xlsx"))
    t1 = c.cell("JB_GAS_CP", [["air"]], [[5.0]], None, caller=_caller("$B$1", book="t"))
    assert t1 == text["S!B1"].value
    target = _caller("$B$1", book="t")
    target.value = t1
    assert c.why("JB_WHY", target, caller=_caller("$C$2", book="t")) == t1


def test_sheet_face_spills_error_values_per_element(sheet_cells):
    c = sheet_cells
    out = c.cell(
        "JB_GAS_CP", [["air"]], [[300.0], [5.0], [None]], None, caller=_caller("$B$1", "values")
    )
    assert isinstance(out[0][0], float) and out[2][0] is None
    assert out[1][0].value == c.COM_ERROR_CODES["#NUM!"]
    assert c.why("JB_WHY", _caller("$B$1"), caller=_caller("$C$1", "values")).startswith(
        "OutOfRange: air: T = 5 K"
    )
    # no caller (called from VBA or the function wizard): the text style
    assert c.cell("JB_GAS_CP", "air", 5.0).startswith("OutOfRange")


def test_the_audit_says_why_a_cell_shows_an_error_value(tmp_path):
    from joulebook.faces.workbook.audit import build_audit

    report = build_audit(read_book(_book(tmp_path, '"values"')), figures=False)
    b1 = next(e for e in report.entries if e.cell == "B1")
    assert b1.flags[0].startswith("the cell shows #NUM!: OutOfRange: air: T = 5 K")
