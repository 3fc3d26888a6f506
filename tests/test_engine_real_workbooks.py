"""The engine on what real workbooks hold: tables saved over whole columns, ranges read by
thousands of formulas (built once), criteria ranges reused by copied-down SUMIFS (tested once
per distinct value), and dependencies that stay right when a looked-up cell changes.

Every workbook is a fixture of our own built with openpyxl; expected values are derived by
hand (each named beside its check) or from Excel's documented function behaviour (common
practice: the function reference of the spreadsheet programs)."""

import re
from pathlib import Path

import numpy as np
from openpyxl.worksheet.formula import ArrayFormula
from openpyxl.worksheet.table import Table, TableColumn, TableStyleInfo

from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.functions.criteria import remembered
from joulebook.faces.workbook.reader import read_book
from wbtools import build, outcomes, rewrite_part


def _whole_column_table(tmp_path: Path, ref: str) -> Path:
    """A table Loads[Item, Qty, Line] with Line = [@Qty]*2, and a total of Loads[Line]."""
    cells = {"S!A1": "Item", "S!B1": "Qty", "S!C1": "Line"}
    for r, (item, qty) in enumerate([("pump", 3.0), ("fan", 5.0), ("valve", 7.0)], start=2):
        cells[f"S!A{r}"], cells[f"S!B{r}"] = item, qty
        cells[f"S!C{r}"] = "=[@Qty]*2"
    cells["T!A1"] = "=SUM(Loads[Line])"
    cells["T!A2"] = '=VLOOKUP("fan",Loads,3,FALSE)'

    def table(wb):
        t = Table(displayName="Loads", ref="A1:C4")
        t.tableColumns = [
            TableColumn(id=i + 1, name=n) for i, n in enumerate(["Item", "Qty", "Line"])
        ]
        t.tableStyleInfo = TableStyleInfo(name="TableStyleLight1")
        wb["S"].add_table(t)

    src = build(tmp_path / "t.xlsx", cells, table)
    if ref == "A1:C4":
        return src

    def whole(data: bytes) -> bytes:  # as LibreOffice saves a table over whole columns
        return re.sub(rb'ref="A1:C4"', f'ref="{ref}"'.encode(), data)

    return rewrite_part(src, tmp_path / "whole.xlsx", "xl/tables/table1.xml", whole)


def test_a_table_saved_over_whole_columns_is_found(tmp_path):
    for ref in ("A1:C4", "A:C"):
        out = outcomes(_whole_column_table(tmp_path, ref))
        assert not any(o.problem for o in out.values()), ref
        # hand: Line = 2·Qty = 6, 10, 14; their sum 30; the fan's line 10
        assert [out[f"S!C{r}"].value for r in (2, 3, 4)] == [6.0, 10.0, 14.0]
        assert out["T!A1"].value == 30.0 and out["T!A2"].value == 10.0


def test_a_table_range_of_whole_columns_or_rows_is_read():
    from joulebook.faces.workbook.reader import _table_box

    assert _table_box("A:E") == (1, 1, 1_048_576, 5)
    assert _table_box("B2:D9") == (2, 2, 9, 4)
    assert _table_box("3:7") == (3, 1, 7, 16_384)


def _sumifs_book(tmp_path: Path, name: str, region_of_row3: str = "north") -> Path:
    """Data!A:C holds region, year, amount (40 rows); Sheet S sums by region with SUMIFS
    over whole columns, copied down and across, and looks amounts up with VLOOKUP."""
    regions = ["north", "south", "east", "west"]
    cells: dict = {}
    for r in range(1, 41):
        cells[f"Data!A{r}"] = regions[r % 4] if r != 3 else region_of_row3
        cells[f"Data!B{r}"] = 2020.0 + r % 3
        cells[f"Data!C{r}"] = float(r)
    for i, region in enumerate(regions, start=1):
        cells[f"S!A{i}"] = region
        cells[f"S!B{i}"] = f"=SUMIFS(Data!$C:$C,Data!$A:$A,$A{i})"
        cells[f"S!C{i}"] = f'=SUMIFS(Data!$C:$C,Data!$A:$A,$A{i},Data!$B:$B,">2020")'
        cells[f"S!D{i}"] = f"=COUNTIFS(Data!$A:$A,$A{i})"
        cells[f"S!E{i}"] = f"=B{i}*2"
    cells["S!F1"] = "=VLOOKUP(3,Data!$C:$C,1,FALSE)+MATCH(3,Data!$C:$C,0)"
    return build(tmp_path / name, cells)


def _by_hand(region_of_row3: str = "north") -> dict:
    regions = ["north", "south", "east", "west"]
    rows = [(regions[r % 4] if r != 3 else region_of_row3, 2020 + r % 3, r) for r in range(1, 41)]
    return {
        g: (
            sum(a for x, _, a in rows if x == g),
            sum(a for x, y, a in rows if x == g and y > 2020),
            sum(1 for x, _, _ in rows if x == g),
        )
        for g in regions
    }


def test_copied_sumifs_over_whole_columns_agree_with_a_hand_sum(tmp_path):
    out = outcomes(_sumifs_book(tmp_path, "a.xlsx"))
    hand = _by_hand()  # the sums written out in Python from the same rows (hand derivation)
    for i, g in enumerate(["north", "south", "east", "west"], start=1):
        assert out[f"S!B{i}"].value == hand[g][0]
        assert out[f"S!C{i}"].value == hand[g][1]
        assert out[f"S!D{i}"].value == hand[g][2]
        assert out[f"S!E{i}"].value == 2 * hand[g][0]
    assert out["S!F1"].value == 6.0  # VLOOKUP finds 3 in row 3: 3 + 3


def test_a_changed_looked_up_cell_recomputes_its_readers(tmp_path):
    """Row 3 moved from the east to the north: each SUMIFS that reads it changes, each
    that does not stays (the ranges built once per run never carry one run into another)."""
    book = read_book(_sumifs_book(tmp_path, "b.xlsx", "east"))
    before = {k: o.value for k, o in Engine(book).run().items()}
    book.cells[("Data", 3, 1)].cached = "north"
    after = {k: o.value for k, o in Engine(book).run().items()}
    hand = _by_hand("north")
    for i, g in enumerate(["north", "south", "east", "west"], start=1):
        assert after[("S", i, 2)] == hand[g][0] and after[("S", i, 5)] == 2 * hand[g][0]
    assert after[("S", 1, 2)] == before[("S", 1, 2)] + 3  # north gained row 3 (amount 3)
    assert after[("S", 3, 2)] == before[("S", 3, 2)] - 3  # east lost it
    assert after[("S", 2, 2)] == before[("S", 2, 2)]  # south untouched


def test_a_range_read_while_its_formulas_change_is_never_stale(tmp_path):
    """Cells inside a range that many formulas read are themselves formulas: every reader
    comes after them (hand: A = 1..40 doubled, each total 2·820 = 1640 plus its own row)."""
    cells = {f"S!A{r}": f"=B{r}*2" for r in range(1, 41)}
    cells |= {f"S!B{r}": float(r) for r in range(1, 41)}
    cells |= {f"S!C{r}": f"=SUM($A$1:$A$40)+B{r}" for r in range(1, 41)}
    out = outcomes(build(tmp_path / "c.xlsx", cells))
    assert [out[f"S!C{r}"].value for r in (1, 20, 40)] == [1641.0, 1660.0, 1680.0]


def test_the_criteria_test_runs_once_per_distinct_value_and_keeps_types_apart():
    seen = []

    def test(rng, cond):  # a stand-in test that records what it was asked
        raw = rng["raw"]
        seen.append(len(raw.ravel()))
        return np.vectorize(lambda v: type(v) is type(cond) and v == cond, otypes=[bool])(raw)

    memo = remembered(test)
    raw = np.array([1.0, True, "a", 1.0] * 10, dtype=object).reshape(40, 1)
    got = memo({"raw": raw}, 1.0)
    assert got.shape == (40, 1) and int(got.sum()) == 20  # TRUE is not 1 (types apart)
    assert int(memo({"raw": raw.copy()}, True).sum()) == 10
    assert seen == [3, 3]  # three distinct values, each criterion tested once on them
    memo({"raw": raw}, 1.0)
    assert seen == [3, 3]  # the same range and criterion: from memory


def _lookup_book(tmp_path: Path, name: str) -> Path:
    """Data!A1:B100: keys (numbers 1..97, then the text "1", "Pump" and TRUE) and values;
    Calc looks keys up over whole columns, copied down."""
    cells: dict = {}
    for r in range(1, 98):
        cells[f"Data!A{r}"] = float(r)
        cells[f"Data!B{r}"] = float(r * 10)
    cells |= {"Data!A98": "1", "Data!B98": -1.0, "Data!A99": "Pump", "Data!B99": -2.0}
    cells |= {"Data!A100": True, "Data!B100": -3.0}
    keys = [5.0, "1", "pump", True, 1.0, 200.0, "PUMP"]
    for r, k in enumerate(keys, start=1):
        cells[f"Calc!A{r}"] = k
        cells[f"Calc!B{r}"] = f"=VLOOKUP($A{r},Data!$A:$B,2,FALSE)"
        cells[f"Calc!C{r}"] = f"=MATCH($A{r},Data!$A:$A,0)"
        cells[f"Calc!D{r}"] = f"=INDEX(Data!$B:$B,MATCH($A{r},Data!$A:$A,0))"
        cells[f"Calc!E{r}"] = f"=_xlfn.XLOOKUP($A{r},Data!$A$1:$A$100,Data!$B$1:$B$100)"
    return build(tmp_path / name, cells)


def test_exact_lookups_keep_types_apart_and_ignore_case(tmp_path):
    out = outcomes(_lookup_book(tmp_path, "l.xlsx"))
    # Excel reference: an exact match compares text without regard to case and never takes
    # the number 1 for the text "1" or for TRUE; a key not there is #N/A (hand: row numbers)
    expect_b = [50.0, -1.0, -2.0, -3.0, 10.0, ("error", "#N/A"), -2.0]
    expect_c = [5, 98, 99, 100, 1, ("error", "#N/A"), 99]
    assert [out[f"Calc!B{r}"].value for r in range(1, 8)] == expect_b
    assert [out[f"Calc!C{r}"].value for r in range(1, 8)] == expect_c
    assert [out[f"Calc!D{r}"].value for r in range(1, 8)] == expect_b
    assert [out[f"Calc!E{r}"].value for r in range(1, 8)] == expect_b


def test_a_changed_lookup_table_recomputes_the_lookups(tmp_path):
    book = read_book(_lookup_book(tmp_path, "m.xlsx"))
    first = Engine(book).run()
    assert first[("Calc", 1, 2)].value == 50.0
    book.cells[("Data", 5, 2)].cached = 55.0  # the looked-up value changes
    book.cells[("Data", 99, 1)].cached = "Valve"  # and a key disappears
    again = Engine(book).run()
    assert again[("Calc", 1, 2)].value == 55.0 and again[("Calc", 1, 4)].value == 55.0
    assert again[("Calc", 3, 3)].value == ("error", "#N/A")  # "pump" no longer there
    assert again[("Calc", 2, 3)].value == 98  # the others stay


def test_a_lookup_of_a_reference_that_index_returns(tmp_path):
    """MATCH of INDEX(…) (a reference, not a value) over a whole column, as a real workbook
    finds the first positive reading: hand — D1:D4 = 0, 0, 7, 9: the first positive is 7,
    in row 3."""
    cells = {"S!D1": 0.0, "S!D2": 0.0, "S!D3": 7.0, "S!D4": 9.0}
    for r in range(5, 60):  # a column read by many formulas: handed from the run's cache
        cells[f"S!E{r}"] = f"=COUNT(D:D)+{r}"
    cells["S!J20"] = "=MATCH(TRUE,D:D>0,0)"  # a plain formula: D:D>0 meets row 20 (blank)

    def array(wb):  # as the real workbook saves it: an array formula (dynamic array)
        wb["S"]["J19"] = ArrayFormula("J19", "=MATCH(INDEX(D:D,MATCH(TRUE,D:D>0,0)),D:D,0)")

    out = outcomes(build(tmp_path / "f.xlsx", cells, array))
    assert out["S!J19"].value == 3 and not out["S!J19"].problem
    assert out["S!J20"].value == ("error", "#N/A")  # Excel reference: implicit intersection
