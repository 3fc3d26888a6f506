"""Circular references anywhere — through array formulas, What-If data tables, defined names,
run-time references (INDIRECT, OFFSET) — end as `circular` cells (or cells not checked
because of one), never as an internal error of the run.  Each planted loop has a clean twin
without the loop whose values are derived by hand."""

from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.formula import ArrayFormula, DataTableFormula

from joulebook.faces.cli import main
from joulebook.faces.workbook.status import Status
from wbtools import build, outcomes


def _array(ws_formula: str):
    def prepare(wb):
        wb["S"]["B1"] = ArrayFormula("B1:B3", ws_formula)

    return prepare


def test_a_loop_through_an_array_formula_marks_the_whole_array_circular(tmp_path):
    # C2 reads B3, a cell the array formula B1:B3 fills, and the array reads C2
    cells = {"S!A1": 1.0, "S!A2": 2.0, "S!A3": 3.0, "S!C1": 1.0, "S!C2": "=B3+1", "S!C3": 1.0}
    cells["S!D1"] = "=C2*2"
    out = outcomes(build(tmp_path / "loop.xlsx", cells, _array("=A1:A3*2+C1:C3")))
    for k in ("S!B1", "S!B2", "S!B3", "S!C2"):
        assert out[k].problem.startswith(Status.CIRCULAR), k
    assert out["S!D1"].problem.startswith("not checked: depends on S!C2 (circular")
    # clean twin: C2 a number; hand: B = 2·A + C = 3, 4+5=9, 7
    cells["S!C2"] = 5.0
    out = outcomes(build(tmp_path / "clean.xlsx", cells, _array("=A1:A3*2+C1:C3")))
    assert [out[f"S!B{r}"].value for r in (1, 2, 3)] == [3.0, 9.0, 7.0]
    assert not any(o.problem for o in out.values())


def _table(wb):
    wb["S"]["B3"] = DataTableFormula(ref="B3:B5", r1="A1")
    wb["S"]["B4"], wb["S"]["B5"] = 0.0, 0.0


def test_a_data_table_over_a_formula_that_reads_a_loop_is_not_checked(tmp_path, capsys):
    cells = {"S!A1": 1.0, "S!B2": "=A1*2+C1", "S!C1": "=C2+1", "S!C2": "=C1+1"}
    cells |= {"S!A3": 2.0, "S!A4": 3.0, "S!A5": 4.0}
    path = build(tmp_path / "t.xlsx", cells, _table)
    out = outcomes(path)
    assert out["S!C1"].problem.startswith("circular")
    for k in ("S!B3", "S!B4", "S!B5"):
        assert out[k].problem == "not checked: depends on S!C1 (circular reference)", k
    assert main(["check", str(path)]) == 1  # a failing check, not an internal error (3)
    assert "internal error" not in capsys.readouterr().err
    # clean twin: C1 a number; hand: B = 2·A + 10 for A = 2, 3, 4
    cells |= {"S!C1": 10.0, "S!C2": 0.0}
    out = outcomes(build(tmp_path / "clean.xlsx", cells, _table))
    assert [out[f"S!B{r}"].value for r in (3, 4, 5)] == [14.0, 16.0, 18.0]


def test_a_loop_through_a_defined_name_is_circular(tmp_path):
    def names(wb):
        wb.defined_names["next_one"] = DefinedName("next_one", attr_text="S!$B$1+1")

    out = outcomes(build(tmp_path / "n.xlsx", {"S!A1": "=next_one", "S!B1": "=A1*2"}, names))
    assert out["S!A1"].problem.startswith("circular") or out["S!B1"].problem.startswith("circular")
    out = outcomes(build(tmp_path / "m.xlsx", {"S!A1": "=next_one", "S!B1": 4.0}, names))
    assert out["S!A1"].value == 5.0 and not out["S!A1"].problem  # hand: 4 + 1


def test_loops_through_run_time_references_are_circular(tmp_path):
    cells = {"S!A1": '=INDIRECT("B1")*2', "S!B1": "=A1+1", "S!C1": "=SUM(OFFSET(D1,0,0,2,1))"}
    cells |= {"S!D1": "=C1+1", "S!D2": 2.0}
    out = outcomes(build(tmp_path / "d.xlsx", cells))
    for k in ("S!A1", "S!B1", "S!C1", "S!D1"):
        assert out[k].problem.startswith("circular"), k
    cells |= {"S!B1": 3.0, "S!D1": 1.0}
    out = outcomes(build(tmp_path / "e.xlsx", cells))
    assert out["S!A1"].value == 6.0 and out["S!C1"].value == 3.0  # hand: 3·2; 1 + 2
