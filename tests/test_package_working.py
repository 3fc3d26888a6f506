"""The working in the units the reader sees (issue 29, item 5): a call's text asks in the unit
its value is shown in, one figure per distinct path whatever unit a cell asks in, a state's
working reads its properties back from the model, a table function entered in one cell is
flagged.  Invented scenarios, built with openpyxl and recalculated by ``joulebook recalc``."""

import re
from pathlib import Path

import openpyxl
import pytest
from openpyxl.worksheet.formula import ArrayFormula

from joulebook.faces.cli import main
from joulebook.faces.workbook.audit import build_audit
from joulebook.faces.workbook.auditfig import pretty_unit
from joulebook.faces.workbook.reader import read_book

WORKBOOKS = Path(__file__).resolve().parents[1] / "workbooks"


def _recalc(src: Path) -> Path:
    out = src.with_name(src.stem + "-r.xlsx")
    assert main(["recalc", str(src), "-o", str(out)]) == 0
    return out


@pytest.fixture(scope="module")
def piston(tmp_path_factory):
    """Water heated in a rigid tank until the pressure reaches 3 bar, asked three ways: in
    bar, the same end in kPa, and a different end (4 bar)."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Tank"
    ws["A1"], ws["B1"] = "Initial state", '=JB_STATE("water","T in degC",25,"x",0.0005)'
    ws["A2"], ws["B2"] = "Mass (kg)", 2
    ws["A3"], ws["B3"] = "Heat to 3 bar (kJ)", '=JB_PROCESS(B1,"rigid","P2 in bar",3,"Q in kJ",B2)'
    ws["A4"], ws["B4"] = "Same end in kPa", '=JB_PROCESS(B1,"rigid","P2 in kPa",300,"Q in kJ",B2)'
    ws["A5"], ws["B5"] = "Heat to 4 bar (kJ)", '=JB_PROCESS(B1,"rigid","P2 in bar",4,"Q in kJ",B2)'
    ws["A7"] = "End state, in one cell"
    ws["B7"] = '=JB_PROCESS_TABLE(B1,"rigid","P2 in bar",3,B2)'
    ws["A9"] = "End state, as an array"
    ws["B10"] = ArrayFormula("B10:D22", '=JB_PROCESS_TABLE(B1,"rigid","P2 in bar",3,B2)')
    path = tmp_path_factory.mktemp("working") / "tank.xlsx"
    wb.save(path)
    return build_audit(read_book(_recalc(path)))


def _e(a, cell):
    return next(e for e in a.entries if e.cell == cell)


def _call_units_agree(a) -> list:
    """Working lines whose call asks in one unit and shows its value in another, or whose
    own text (the catalog's phrases, not the workbook's arguments) asks in a unit other than
    the working's (K, kPa, kJ …)."""
    bad = []
    working = {"K", "kPa", "kJ", "kJ/kg", "kJ/(kg*K)", "m3/kg", "kg/m3", "m3", "kg"}
    for e in a.entries:
        for sc in e.calls:
            for ln in sc.working:
                units = re.findall(r" in ([^'\"]+)['\"]", ln.formula)
                if any(u not in working for u in units):
                    bad.append((e.cell, ln.symbol, ln.formula))
                if ln.call and units and ln.value:
                    if not ln.value.endswith(pretty_unit(units[-1])):
                        bad.append((e.cell, ln.symbol, ln.formula, ln.value))
    return bad


def test_a_workbook_phrase_in_a_working_is_never_rewritten(piston):
    """The start state's 'T in degC' (the workbook's argument, 25 in degC) stays as written
    beside its value; only the catalog's own phrases follow the working's units."""
    t = next(ln for ln in _e(piston, "B1").calls[0].working if ln.symbol == "T")
    assert "'T in degC', 25" in t.substituted and "'T in K'" in t.formula


def test_call_text_asks_in_the_unit_its_value_is_shown_in(piston):
    lines = [ln for sc in _e(piston, "B3").calls for ln in sc.working if ln.call]
    p = next(ln for ln in lines if ln.symbol == "P")
    assert "'P2 in kPa'" in p.formula and p.value == "300 kPa"
    q = next(ln for ln in lines if ln.symbol == "Q")
    assert "'Q in kJ'" in q.formula and q.value.endswith(" kJ")
    assert _call_units_agree(piston) == []


@pytest.mark.parametrize(
    "name", ["piston_on_stops.xlsx", "wet_steam_vessel.xlsx", "receiver_pneumatic_test.xlsx"]
)
def test_demo_working_lines_agree_with_their_units(name):
    assert _call_units_agree(build_audit(read_book(WORKBOOKS / name), figures=False)) == []


def test_one_figure_per_path_whatever_unit_it_is_asked_in(piston):
    b3, b4, b5 = (_e(piston, c).calls[0] for c in ("B3", "B4", "B5"))
    assert b3.figure and "P [bar]" in b3.figure  # drawn in the units of the first cell
    assert b4.figure == "" and b4.figure_ref == "Tank!B3"  # 300 kPa is the same end
    assert b5.figure and b5.figure_ref == ""  # 4 bar is another path: its own figure


def test_state_working_reads_its_properties_from_the_model(piston):
    sc = _e(piston, "B1").calls[0]
    got = {ln.symbol: ln.value for ln in sc.working}
    assert set(got) == {"T", "P", "v", "u", "h", "s", "phase"}
    assert got["T"] == "298.15 K" and got["phase"] == "'saturated mixture'"
    # saturation pressure of water at 25 degC: 3.1699 kPa (IAPWS-95 saturation table, from
    # memory; checked to four digits)
    assert got["P"].startswith("3.169") and got["P"].endswith("kPa")
    assert "IAPWS-95" in sc.model and "(fluid, two independent properties)" not in str(
        [ln.formula for ln in sc.working]
    )


def test_table_function_in_one_cell_is_flagged_and_as_an_array_is_not(piston):
    one = _e(piston, "B7")
    assert any("entered in one cell" in f and "13 rows" in f for f in one.flags), one.flags
    arr = _e(piston, "B10")
    assert not any("entered in one cell" in f for f in arr.flags), arr.flags


def test_hydrotest_working_has_its_numbers_substituted():
    a = build_audit(read_book(WORKBOOKS / "receiver_pneumatic_test.xlsx"), figures=False)
    e = next(e for e in a.entries if e.function == "JB_TEST_HYDRO_ENERGY")
    lines = {ln.symbol: ln for ln in e.calls[0].working}
    assert set(lines) >= {"m", "u1", "u2", "E_liquid", "P", "dP"}
    assert all(not ln.error and ln.value for ln in lines.values())
    liquid = lines["E_liquid"]
    assert liquid.formula == "m·(u1 − u2)" and "kg·(" in liquid.substituted
    assert lines["dP"].substituted.endswith("− 101.325 kPa")


def test_a_spilled_table_is_the_result_not_its_first_heading(tmp_path):
    from joulebook.faces.workbook.package import build_package, render_package

    html = render_package(
        build_package(build_audit(read_book(WORKBOOKS / "piston_on_stops.xlsx"), figures=False))
    )
    assert "Result:</strong> the table below, 12 rows × 5 columns" in html
    assert "Result:</strong> V in m3" not in html
