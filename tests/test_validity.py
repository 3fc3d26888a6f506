"""Models inside their physics: the validity checks the catalog declares are read by check
and the audit (never a function named there), each planted fault beside its clean twin.

Sources: the thin-wall hoop stress σ = P·D/(2t) (Roark's Formulas for Stress and Strain,
8th ed., Table 13.1, thin-walled cylinder); carbon-steel pipe yield 240 MPa (ASTM A106/A106M
Grade B, specified minimum yield strength 35 ksi, from memory); the polytropic band
1 ≤ n ≤ 1.67 of gas compression and expansion and "a compressed gas warms" ("common
practice"); a liquid stores next to no expansion energy ("common practice").
"""

import pytest

from joulebook import call
from joulebook.catalog import CATALOG
from joulebook.core.working import names_in
from joulebook.faces.workbook.audit import build_audit, render_html
from joulebook.faces.workbook.check import compare, failing
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.status import Status
from joulebook.faces.workbook.validity import violations
from joulebook.faces.workbook.writer import write_copy
from wbtools import build

_WATER = "water | T = 15 degC | P = 4 bar"


def _cells(bad: bool) -> dict:
    return {
        "V!A1": "Blocked-in water, heated to (K)",
        "V!B1": 368.15 if bad else 298.15,
        "V!A2": "Pipe mean diameter, m",
        "V!B2": 0.2 if bad else 0.1,
        "V!A3": "Wall, m",
        "V!B3": 0.004 if bad else 0.01,
        "V!A4": "Pressure after heating (kPa)",
        "V!B4": f'=JB_BLOCKED_IN_P2("{_WATER}",B1,"cylinder",B2,B3,200000000,0.3)',
        # an indicator card: the compression branch, then the valve-open plateau
        "V!D1": "P [kPa]",
        "V!E1": "V [m3]",
        "V!D2": 100,
        "V!E2": 0.8,
        "V!D3": 189.8,
        "V!E3": 0.5,
        "V!D4": 378.7,
        "V!E4": 0.3,
        "V!D5": 378.7 if bad else 735.0,
        "V!E5": 0.2 if bad else 0.18,
        "V!D6": 378.7 if bad else 1793.0,
        "V!E6": 0.1 if bad else 0.09,
        "V!A6": "Fitted n",
        "V!B6": "=JB_POLY_FIT(D2:D6,E2:E6)",
        "V!A7": "Discharge temperature (K)",
        "V!B7": "=JB_POLY_T2_FROM_P(300,100,600,B6)",  # the fitted n feeds the discharge T
        "V!A8": "Stored energy of the test medium (kJ)",
        "V!B8": '=JB_STORED_ISENTROPIC("{}",2.5)'.format(
            "water | T = 20 degC | P = 30 bar" if bad else "nitrogen | T = 20 degC | P = 30 bar"
        ),
    }


def _rows(tmp_path, bad: bool) -> dict:
    src = build(tmp_path / f"v{bad}_src.xlsx", _cells(bad))
    book = read_book(src)
    saved = write_copy(book, Engine(book).run(), tmp_path / f"v{bad}.xlsx")
    book = read_book(saved)
    return {f"{r.sheet}!{r.cell}": r for r in compare(book, Engine(book).run())}, saved


def test_each_planted_fault_is_outside_the_model(tmp_path):
    rows, _ = _rows(tmp_path, True)
    hoop = rows["V!B4"]
    assert hoop.status is Status.OUTSIDE_MODEL, (hoop.status, hoop.note)
    assert "hoop stress" in hoop.note and "ASTM A106" in hoop.note and "thin wall" in hoop.note
    fit = rows["V!B6"]
    assert fit.status is Status.OUTSIDE_MODEL
    assert "fitted polytropic exponent n" in fit.note and "R²" in fit.note
    t2 = rows["V!B7"]
    assert t2.status is Status.OUTSIDE_MODEL and "below 0 K" in t2.note
    stored = rows["V!B8"]  # the function itself now refuses a liquid (a refusal: error)
    assert stored.status is Status.ERROR and "compressed liquid" in stored.note
    assert {r.cell for r in failing(list(rows.values()))} == {"B4", "B6", "B7", "B8"}


def test_each_clean_twin_passes(tmp_path):
    rows, _ = _rows(tmp_path, False)
    assert all(r.status is Status.PASS for r in rows.values()), [
        (k, r.status, r.note) for k, r in rows.items() if r.status is not Status.PASS
    ]


def test_the_audit_shows_the_verdict_red_with_its_reason(tmp_path):
    _, saved = _rows(tmp_path, True)
    a = build_audit(read_book(saved), figures=False)
    by = {e.cell: e for e in a.entries}
    assert by["B4"].status is Status.OUTSIDE_MODEL
    assert any("outside the model" in f and "hoop stress" in f for f in by["B4"].flags)
    html = render_html(a)
    assert "hoop stress" in html and "unit clashes, refusals used, blank inputs" in html


def test_the_hoop_stress_figure():
    # Roark Table 13.1: σ = P·D/(2t); here (P2 − 1 atm)·0.1/(2·0.005) against 240 MPa
    f = next(f for f in CATALOG if f.validity and f.result == "pressure")
    si = {"D": 0.1, "wall": 0.005}
    assert violations(f, si, 20e6) == []  # (20 MPa − 0.1)·10 = 199 MPa < 240 MPa
    flags = violations(f, si, 30e6)  # 299 MPa > 240 MPa
    assert len(flags) == 1 and "299 MPa" in flags[0] and "1.25×" in flags[0]
    assert violations(f, {}, 30e6) == []  # no wall data: no verdict


def test_every_declared_check_names_only_what_the_entry_has():
    for f in CATALOG:
        for v in f.validity:
            known = {a.name for a in f.all_args} | {"result"} | {n for n, *_ in v.defaults}
            for expr in (v.value, v.when):
                used = names_in(expr) if expr else set()
                assert used <= known, (f.name, expr, used - known)
            for b in (v.low, v.high):
                assert b is None or isinstance(b, float) or b in known, (f.name, b)
            assert all(src for *_, src in v.defaults), f.name  # every default states its source
            assert v.says and v.model


def test_the_stored_energy_of_a_liquid_is_flagged_by_its_declared_check():
    # the function refuses a liquid itself; the catalog's check says the same of any result
    f = next(f for f in CATALOG if f.validity and f.family == "stored")
    flags = violations(f, {"state": "water | T = 20 degC | P = 30 bar", "V": 2.5}, 5.0e3)
    assert flags and "compressed liquid" in flags[0]
    gas = {"state": "nitrogen | T = 20 degC | P = 30 bar", "V": 2.5}
    assert violations(f, gas, call("JB_STORED_ISENTROPIC", gas["state"], 2.5) * 1e3) == []


@pytest.mark.parametrize("n, held", [(1.3, True), (0.59, False), (1.8, False)])
def test_the_fitted_band(n, held):
    f = next(f for f in CATALOG if f.validity and f.family == "poly" and f.result == "number")
    # five points on P·V^n = C exactly (R² = 1): only the band can fail
    vs = [0.8, 0.5, 0.3, 0.2, 0.1]
    ps = [100e3 * (0.8 / v) ** n for v in vs]
    flags = violations(f, {"P_values": [[p] for p in ps], "V_values": [[v] for v in vs]}, n)
    assert (flags == []) is held, flags


def test_each_branch_fit_of_a_card_is_checked():
    # a loop whose compression branch is polytropic (n = 1.3) and whose expansion branch is
    # flat (valve-open plateau, n ≈ 0): the second item fails, the first holds
    f = next(f for f in CATALOG if f.validity and f.elementwise is False and f.family == "engine")
    vs = [0.5, 0.4, 0.3, 0.2, 0.1, 0.2, 0.3, 0.4, 0.5]
    comp = [100e3 * (0.5 / v) ** 1.3 for v in vs[:5]]
    expa = [comp[-1] * (0.1 / v) ** 0.05 for v in vs[5:]]
    si = {"P_values": [[p] for p in comp + expa], "V_values": [[v] for v in vs]}
    flags = violations(f, si, None)
    assert len(flags) == 1 and "expansion branch" in flags[0], flags


def test_the_audit_checks_a_call_nested_in_a_formula(tmp_path):
    cells = {
        "N!A1": "Twice the discharge temperature",
        "N!B1": "=2*JB_POLY_T2_FROM_P(300,100,600,0.59)",
    }
    cells |= {"N!A2": "Its clean twin", "N!B2": "=2*JB_POLY_T2_FROM_P(300,100,600,1.3)"}
    src = build(tmp_path / "n_src.xlsx", cells)
    book = read_book(src)
    saved = write_copy(book, Engine(book).run(), tmp_path / "n.xlsx")
    by = {e.cell: e for e in build_audit(read_book(saved), figures=False).entries}
    assert any(f.startswith("JB_POLY_T2_FROM_P: end temperature") for f in by["B1"].flags)
    assert not [f for f in by["B2"].flags if "outside the model" in f]
