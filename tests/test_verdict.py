"""A verdict a checker can sign (design §3): unit slips in ordinary arithmetic, refusals
swallowed by SUM/MAX and blank-input chains are red with their reason; their clean twins
and the demo workbooks pass with no such status.

The workbooks are built here the way engineers build them (label | value | unit columns,
units in labels, column headers), each planted slip beside a clean twin.  Unit facts are
"common practice" (gauge = absolute − atmosphere; °C and K share a scale but not a zero;
1 hp ≠ 1 kW; 1 Btu ≠ 1 kJ), and the conversion factors come from pint through the unit seed
(tests/test_units.py checks the seed against pint).
"""

from pathlib import Path

import pytest

from joulebook.faces.workbook.cellunits import clash_of, unit_of_text, units_in_label
from joulebook.faces.workbook.check import compare, failing, to_junit
from joulebook.faces.workbook.engine import Engine
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.status import Status
from joulebook.faces.workbook.writer import write_copy
from wbtools import build

WORKBOOKS = Path(__file__).resolve().parent.parent / "workbooks"

# the inputs of a sheet: label | value | unit, as an engineer lays them out
_UNIT_COLUMN = {
    "A1": "Item",
    "B1": "Value",
    "C1": "Unit",
    "A2": "Suction pressure",
    "B2": 2.5,
    "C2": "barg",
    "A3": "Discharge pressure",
    "B3": 850,
    "C3": "kPa",
    "A4": "Ambient temperature",
    "B4": 20,
    "C4": "degC",
    "A5": "Gas temperature",
    "B5": 310,
    "C5": "K",
    "A6": "Motor power",
    "B6": 15,
    "C6": "kW",
    "A7": "Pump power",
    "B7": 10,
    "C7": "hp",
    "A8": "Heat in",
    "B8": 500,
    "C8": "kJ",
    "A9": "Heat lost",
    "B9": 120,
    "C9": "Btu",
    "A10": "Saturation pressure at 150 degC",
    "B10": '=JB_PROP("water","P in bar","T in degC",150,"x",0)',
    "C10": "bar",
    "A11": "Gas mass",
    "B11": 2,
    "C11": "kg",
    "A12": "Discharge pressure (absolute)",
    "B12": 3.5,
    "C12": "bar",
    "A13": "Second heater",
    "B13": 200,
    "C13": "kJ",
    "A14": "Spare motor",
    "B14": 7.5,
    "C14": "kW",
    "A15": "Room temperature",
    "B15": 25,
    "C15": "degC",
}

# (cell, label, formula, what a checker would call it) — each slip of the issue
SLIPS = [
    ("E2", "Pressure rise", "=B10-B2", "bar"),  # a JB result in bar absolute minus barg
    ("E3", "Total pressure", "=B2+B3", "barg"),  # barg + kPa
    ("E4", "Temperature rise", "=B4-B5", "degC"),  # degC − K
    ("E5", "Power margin", "=B6-B7", "kW"),  # kW − hp
    ("E6", "Pressure sum", "=SUM(B2,B3)", "barg"),  # SUM over barg and kPa
    ("E7", "Net heat", "=B8-B9", "kJ"),  # kJ − Btu
    ("E8", "Energy per mass x dT", "=B11*(B4-B5)", "kg"),  # × over a degC − K slip
    ("E9", "Higher pressure", '=IF(B2>B3,"suction","discharge")', ""),  # compared across units
    ("E10", "Total power, hp", "=B6+B14", "hp"),  # kW + kW labelled hp
    # a gauge pressure fed where the call reads kPa absolute (the default unit system)
    ("E11", "Boundary work", "=JB_WORK_ISOBARIC(B2,0.1,0.3)", "kJ"),
    # a temperature in K fed as "T in degC"
    ("E12", "Enthalpy", '=JB_PROP("water","h in kJ/kg","T in degC",B5,"P in kPa",B3)', "kJ/kg"),
]
# the clean twins: the same arithmetic in consistent units
CLEAN = [
    ("E2", "Pressure rise", "=B10-B12", "bar"),
    ("E3", "Total pressure", "=B3+B3", "kPa"),
    ("E4", "Temperature rise", "=B15-B4", "degC"),
    ("E5", "Power margin", "=B6-B14", "kW"),
    ("E6", "Pressure sum", "=SUM(B3,B3)", "kPa"),
    ("E7", "Net heat", "=B8-B13", "kJ"),
    ("E8", "Mass times temperature rise", "=B11*(B15-B4)", ""),
    ("E9", "Higher pressure", '=IF(B10>B12,"saturation","discharge")', ""),
    ("E10", "Total power, kW", "=B6+B14", "kW"),
    ("E11", "Gas temperature in degC", "=B5-273.15", "degC"),  # a conversion by hand
    ("E12", "Discharge pressure in bar", "=B3/100", "bar"),
    ("E13", "Specific heat input", "=B8/B11", "kJ/kg"),
    ("E14", "Heat in, Btu", "=B8/1.05505585262", "Btu"),
    ("E15", "Boundary work", "=JB_WORK_ISOBARIC(B3,0.1,0.3)", "kJ"),
    ("E16", "Enthalpy", '=JB_PROP("water","h in kJ/kg","T in degC",B4,"P in kPa",B3)', "kJ/kg"),
]


def _saved(tmp: Path, name: str, cells: dict, names: dict | None = None) -> Path:
    """The workbook as a spreadsheet program saves it: every formula with its value."""

    def prepare(wb):
        from openpyxl.workbook.defined_name import DefinedName

        for n, v in (names or {}).items():
            wb.defined_names[n] = DefinedName(n, attr_text=v)

    src = build(tmp / f"{name}_src.xlsx", cells, prepare)
    book = read_book(src)
    out = write_copy(book, Engine(book).run(), tmp / f"{name}.xlsx")
    return out


def _rows(path: Path) -> dict:
    book = read_book(path)
    return {f"{r.sheet}!{r.cell}": r for r in compare(book, Engine(book).run())}


def _sheet(formulas) -> dict:
    cells = {f"Calc!{k}": v for k, v in _UNIT_COLUMN.items()}
    for cell, label, formula, unit in formulas:
        row = cell[1:]
        cells[f"Calc!D{row}"] = label
        cells[f"Calc!{cell}"] = formula
        if unit:
            cells[f"Calc!F{row}"] = unit
    return cells


@pytest.fixture(scope="module")
def slips(tmp_path_factory):
    return _rows(_saved(tmp_path_factory.mktemp("slips"), "slips", _sheet(SLIPS)))


@pytest.fixture(scope="module")
def clean(tmp_path_factory):
    return _rows(_saved(tmp_path_factory.mktemp("clean"), "clean", _sheet(CLEAN)))


@pytest.mark.parametrize("cell", [s[0] for s in SLIPS])
def test_every_planted_unit_slip_is_a_unit_clash(slips, cell):
    r = slips[f"Calc!{cell}"]
    assert r.status is Status.UNIT_CLASH, (cell, r.status, r.note)
    assert any(w in r.note for w in ("not the same", "different units", "another scale"))


def test_a_clash_names_both_operands_their_units_and_where_each_came_from(slips):
    note = slips["Calc!E2"].note  # bar (a JB result) minus barg (a unit cell)
    assert "bar (B10: JB_PROP's phrase 'P in bar')" in note
    assert "barg (unit cell C2)" in note
    assert "a gauge pressure is not an absolute one" in note
    assert "another zero" in slips["Calc!E4"].note  # degC − K
    assert "another scale" in slips["Calc!E5"].note  # kW − hp
    assert "the cell's unit cell F10 says hp" in slips["Calc!E10"].note
    assert "reads P in kPa (K-kPa-kJ), but it holds barg (unit cell C2)" in slips["Calc!E11"].note
    assert "reads value1 as 'T in degC', but it holds K (unit cell C5)" in slips["Calc!E12"].note


@pytest.mark.parametrize("cell", [s[0] for s in CLEAN])
def test_every_clean_twin_passes(clean, cell):
    r = clean[f"Calc!{cell}"]
    assert r.status is Status.PASS, (cell, r.status, r.note)


def test_a_check_fails_on_a_clash_unless_allowed(slips):
    rows = list(slips.values())
    assert {r.cell for r in failing(rows)} == {s[0] for s in SLIPS}
    assert failing(rows, allow_unit_clash=True) == []
    junit = to_junit(read_book(WORKBOOKS / "blocked_in_line.xlsx"), rows)
    assert junit.count('<failure message="unit clash') == len(SLIPS)


def test_units_in_labels_and_headers(tmp_path):
    # common practice: 1 bar = 100 kPa, gauge = absolute − 1.01325 bar
    cells = {
        "L!A1": "Suction pressure (barg)",
        "L!B1": 2,
        "L!A2": "Discharge pressure [kPa]",
        "L!B2": 800,
        "L!A3": "Inlet temperature, degC",
        "L!B3": 30,
        "L!A4": "Outlet temperature in K",
        "L!B4": 350,
        "L!A5": "Ratio",
        "L!B5": "=B2/B1",  # kPa / barg: a gauge pressure multiplied or divided is no unit told
        "L!A6": "Lift",
        "L!B6": "=B2-B1",  # slip: kPa − barg
        "L!A7": "Rise",
        "L!B7": "=B4-B3",  # slip: K − degC
        "L!D1": "P1 [psig]",
        "L!E1": "P2 [psig]",
        "L!F1": "Rise",
        "L!D2": 10,
        "L!E2": 30,
        "L!F2": "=E2-D2",  # clean: psig − psig under headers
        "L!G1": "P3 [kPa]",
        "L!G2": 250,
        "L!H1": "Mixed",
        "L!H2": "=G2-D2",  # slip: kPa − psig under headers
        "L!A9": "Flow [scfm]",
        "L!B9": 12,
        "L!A10": "Flow doubled [scfm]",
        "L!B10": "=B9*2",  # a unit joulebook does not know: "unit unknown", no verdict
        "L!A11": "Flow margin",
        "L!B11": "=B9-B2",
        "L!A12": "Vessel pressure, kPa (gauge)",
        "L!B12": 300,
        "L!A13": "Line pressure, kPa",
        "L!B13": 400,
        "L!A14": "Difference",
        "L!B14": "=B13-B12",  # slip: kPa absolute − kPa gauge
        "L!A15": "Rise, kPa (gauge)",
        "L!B15": "=B12-B12",  # clean: a gauge difference
    }
    rows = _rows(_saved(tmp_path, "labels", cells))
    assert rows["L!B5"].status is Status.PASS
    assert rows["L!B6"].status is Status.UNIT_CLASH and "(barg)" in rows["L!B6"].note
    assert rows["L!B7"].status is Status.UNIT_CLASH and "another zero" in rows["L!B7"].note
    assert rows["L!F2"].status is Status.PASS
    assert rows["L!H2"].status is Status.UNIT_CLASH and "header D1" in rows["L!H2"].note
    assert rows["L!B10"].status is Status.PASS
    assert "unit unknown" in rows["L!B10"].note and "scfm" in rows["L!B10"].note
    assert rows["L!B14"].status is Status.UNIT_CLASH and "kPag" in rows["L!B14"].note
    assert rows["L!B15"].status is Status.PASS
    assert rows["L!B11"].status is Status.PASS  # reads an input of unknown unit: said, no verdict
    assert rows["L!B11"].note.startswith("unit unknown: L!B9 — the label A9 names 'scfm'")


def _refusal_cells(bad: bool) -> dict:
    # JB_GAS_CP refuses a temperature below absolute zero (BadInput, "common practice")
    t = -300 if bad else 25
    return {
        "R!A1": "Inlet temperature, degC",
        "R!B1": t,
        "R!A2": "cp of air at the inlet",
        "R!B2": '=JB_GAS_CP("air",B1,"degC-bar-kJ")',
        "R!A3": "Spare",
        "R!B3": 1.0,
        "R!A4": "Sum",
        "R!B4": "=SUM(B2:B3)",
        "R!A5": "Largest",
        "R!B5": "=MAX(B2,B3)",
        "R!A6": "Twice the sum",
        "R!B6": "=B4*2",
        "R!A8": "Final volume, m3",
        "R!B8": None if bad else 2.0,
        "R!A9": "Boundary work",
        "R!B9": "=JB_WORK_ISOBARIC(500,1,B8)",
        "R!A10": "Work plus spare",
        "R!B10": "=SUM(B9,B3)",
    }


@pytest.mark.parametrize("style", [None, "values"])
def test_a_refusal_skipped_by_sum_or_max_is_refusal_used(tmp_path, style):
    names = {"JB_ERRORS": '"values"'} if style else None
    rows = _rows(_saved(tmp_path, "bad", _refusal_cells(True), names))
    b2 = rows["R!B2"]
    assert b2.status is Status.ERROR
    if style is None:  # text style: SUM and MAX skip the text and return a number
        for cell in ("R!B4", "R!B5", "R!B6"):
            assert rows[cell].status is Status.REFUSAL_USED, (cell, rows[cell].status)
        assert "R!B2 holds the refusal 'BadInput" in rows["R!B4"].note
        assert "reads R!B4, which reads R!B2" in rows["R!B6"].note
    else:  # error values propagate: the readers are errors themselves, never a pass
        for cell in ("R!B4", "R!B5", "R!B6"):
            assert rows[cell].status is not Status.PASS, (cell, rows[cell].status)
    rows_ok = _rows(_saved(tmp_path, "good", _refusal_cells(False), names))
    assert all(r.status is Status.PASS for r in rows_ok.values()), [
        (k, r.status, r.note) for k, r in rows_ok.items() if r.status is not Status.PASS
    ]


def test_a_blank_required_input_flowing_on_is_blank_input(tmp_path):
    rows = _rows(_saved(tmp_path, "blank", _refusal_cells(True)))
    assert rows["R!B9"].status is Status.BLANK_INPUT
    assert "R!B8 blank" in rows["R!B9"].note
    assert rows["R!B10"].status is Status.BLANK_INPUT
    assert "reads R!B9" in rows["R!B10"].note
    bad = failing(list(rows.values()))
    assert {r.cell for r in bad} >= {"B4", "B5", "B6", "B9", "B10"}
    let = failing(list(rows.values()), allow_errors=True, allow_refusals=True)
    assert let == []


def test_a_deliberate_blank_is_no_blank_input(tmp_path):
    # =IF(B1="","",JB_…): a row not filled in yet, blank on purpose; SUM over it is clean
    cells = {"R!A1": "Final volume, m3", "R!A2": "Boundary work", "R!A3": "Total"}
    cells["R!B2"] = '=IF(B1="","",JB_WORK_ISOBARIC(500,1,B1))'
    cells["R!B3"] = "=SUM(B2,1)"
    rows = _rows(_saved(tmp_path, "deliberate", cells))
    assert rows["R!B2"].status is Status.PASS and rows["R!B3"].status is Status.PASS


def test_a_blank_call_nobody_reads_is_no_failure(tmp_path):
    cells = {"R!A1": "Final volume, m3", "R!A2": "Boundary work"}
    cells["R!B2"] = "=JB_WORK_ISOBARIC(500,1,B1)"
    rows = _rows(_saved(tmp_path, "lone", cells))
    assert rows["R!B2"].status is Status.PASS


@pytest.mark.parametrize("path", sorted(WORKBOOKS.glob("*.xlsx")), ids=lambda p: p.stem)
def test_the_demo_workbooks_hold_every_verdict(path):
    rows = _rows(path)
    assert rows and all(r.status is Status.PASS for r in rows.values()), [
        (k, r.status, r.note) for k, r in rows.items() if r.status is not Status.PASS
    ]


def test_the_unit_algebra():
    # common practice: gauge ≠ absolute; °C − °C is an interval; hp ≠ kW; kJ ≠ Btu
    u = unit_of_text
    assert clash_of("-", u("degC"), u("degC")) is None
    assert clash_of("-", u("K"), u("K")) is None
    assert "another zero" in clash_of("-", u("degC"), u("K"))
    assert "gauge" in clash_of("+", u("psig"), u("psia"))
    assert clash_of("+", u("psig"), u("psi")) is None  # a bare psi is a pressure difference
    assert u("psi").interval
    assert "another scale" in clash_of("-", u("kJ"), u("Btu"))
    assert "dimension" in clash_of("+", u("kPa"), u("kJ"))
    assert u("barg").offset == pytest.approx(101325.0)  # common practice: 1 atm reference
    assert units_in_label("Heat [Btu]") == (["Btu"], True)
    assert units_in_label("Heat W") == ([], False)  # a bare last word is no unit


def test_units_from_number_formats(tmp_path):
    # common practice: a number format such as 0.0 "bar" shows the unit beside the number
    cells = {
        "N!A1": "Suction",
        "N!B1": 3,
        "N!A2": "Discharge",
        "N!B2": 250,
        "N!A3": "Sum",
        "N!B3": "=B1+B2",  # slip: barg + kPa, both told by their formats only
        "N!A4": "Second stage",
        "N!B4": 150,
        "N!A5": "Sum of absolutes",
        "N!B5": "=B2+B4",  # clean: kPa + kPa
        "N!A6": "Flow",
        "N!B6": "=B4*2",  # its own format writes a unit joulebook does not know
    }
    formats = {"B1": '0.0 "barg"', "B2": '0 "kPa"', "B4": '#,##0 "kPa";-#,##0 "kPa"'}
    formats["B6"] = '0 "scfm"'

    def styled(wb):
        for ref, code in formats.items():
            wb["N"][ref].number_format = code

    src = build(tmp_path / "fmt_src.xlsx", cells, styled)
    book = read_book(src)
    rows = _rows(write_copy(book, Engine(book).run(), tmp_path / "fmt.xlsx"))
    assert rows["N!B3"].status is Status.UNIT_CLASH
    assert "number format of B1 ('barg')" in rows["N!B3"].note
    assert rows["N!B5"].status is Status.PASS
    assert rows["N!B6"].status is Status.PASS and "unit unknown" in rows["N!B6"].note


def test_a_plain_arithmetic_check_never_imports_pint(tmp_path):
    # the unit seed answers the common units (check's start-up is benchmarked)
    import subprocess
    import sys

    plain = _sheet([c for c in SLIPS if "B10" not in c[2]])
    del plain["Calc!B10"]  # the one joulebook call
    path = _saved(tmp_path, "plain", plain)
    code = (
        "import sys\n"
        "from joulebook.faces.workbook.reader import read_book\n"
        "from joulebook.faces.workbook.engine import Engine\n"
        "from joulebook.faces.workbook.check import compare\n"
        f"b = read_book({str(path)!r})\n"
        "rows = compare(b, Engine(b).run())\n"
        "assert any(r.status == 'unit clash' for r in rows)\n"
        "print('pint' in sys.modules)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


@pytest.mark.parametrize("path", sorted(WORKBOOKS.glob("*.xls*")), ids=lambda p: p.stem)
def test_workbooks_joulebook_makes_declare_real_error_values(path):
    # design §3: a refusal must propagate through SUM and MAX in the spreadsheet too
    from joulebook.catalog.cellvalues import ERRORS_NAME, error_style

    assert error_style(read_book(path).names.get(ERRORS_NAME)) == "values"


def test_a_workbook_without_the_name_keeps_the_text_style(tmp_path):
    from joulebook.catalog.cellvalues import ERRORS_NAME, error_style
    from joulebook.tools.demo import new_workbook

    plain = build(tmp_path / "plain.xlsx", {"S!A1": 1})
    assert error_style(read_book(plain).names.get(ERRORS_NAME)) == "text"
    wb = new_workbook()
    wb.active["A1"] = 1
    wb.save(tmp_path / "new.xlsx")
    assert error_style(read_book(tmp_path / "new.xlsx").names.get(ERRORS_NAME)) == "values"


def test_a_result_computed_from_a_slip_is_red_down_the_chain(tmp_path):
    # the chain: a unit slip, through MAX, into a further result — every cell red
    cells = {
        "C!A1": "Vessel pressure",
        "C!B1": 8.0,
        "C!C1": "barg",
        "C!A2": "Relief set pressure",
        "C!B2": 1100.0,
        "C!C2": "kPa",
        "C!A3": "Margin",
        "C!B3": "=B2-B1",  # the slip: kPa − barg
        "C!C3": "kPa",
        "C!A4": "Largest margin",
        "C!B4": "=MAX(B3,0)",
        "C!C4": "kPa",
        "C!A5": "Margin in bar",
        "C!B5": "=B4/100",
        "C!C5": "bar",
        "C!A6": "Unrelated",
        "C!B6": "=B2*2",
        "C!C6": "kPa",
    }
    rows = _rows(_saved(tmp_path, "chain", cells))
    assert rows["C!B3"].status is Status.UNIT_CLASH
    for cell in ("C!B4", "C!B5"):
        assert rows[cell].status is Status.UNIT_CLASH, (cell, rows[cell].note)
    assert rows["C!B5"].note.startswith("reads C!B4, which reads C!B3: C!B3 is unit clash")
    assert rows["C!B6"].status is Status.PASS  # the clean twin beside it


def test_outcomes_carry_their_status_typed(tmp_path):
    # the engine's Outcome says what it is; nothing downstream parses its text
    from wbtools import outcomes

    cells = {
        "T!A1": "=NOSUCHFUNC(1)",
        "T!A2": "=A1+1",
        "T!B1": "=B2+1",
        "T!B2": "=B1+1",
        "T!B3": "=B1*2",
        "T!C1": "=NOW()",
        "T!C2": "=C1+1",
        "T!D1": "=1+1",
    }
    out = outcomes(build(tmp_path / "t.xlsx", cells))
    assert out["T!A1"].kind is Status.UNSUPPORTED and out["T!A1"].kept
    assert out["T!A2"].kind is Status.NOT_CHECKED and out["T!A2"].cause is Status.UNSUPPORTED
    assert out["T!B1"].kind is Status.CIRCULAR
    assert out["T!B3"].kind is Status.NOT_CHECKED and out["T!B3"].cause is Status.CIRCULAR
    assert out["T!C1"].kind is Status.VOLATILE and not out["T!C1"].kept
    assert out["T!C2"].kind is Status.VOLATILE
    assert out["T!D1"].kind is None and out["T!D1"].problem == ""
    book = read_book(build(tmp_path / "t2.xlsx", cells))
    rows = compare(book, Engine(book).run())
    let = {f"{r.sheet}!{r.cell}" for r in failing(rows, allow_unsupported=True)}
    assert "T!A1" not in let and "T!A2" not in let  # unsupported, and not checked because of it
    assert {"T!B1", "T!B2", "T!B3"} <= let  # circular, and not checked because of it


def test_json_junit_and_sarif_carry_the_new_verdicts(tmp_path, capsys):
    import json

    from joulebook.faces.cli import main

    cells = _sheet(SLIPS[:2]) | _refusal_cells(True)
    path = _saved(tmp_path, "reports", cells)
    out = {k: tmp_path / f"r.{k}" for k in ("json", "xml", "sarif")}
    code = main(
        ["check", str(path), "--json", str(out["json"]), "--junit", str(out["xml"])]
        + ["--sarif", str(out["sarif"])]
    )
    assert code == 1
    said = capsys.readouterr().out
    assert "unit clash" in said and "a gauge pressure is not an absolute one" in said  # the reason
    report = json.loads(out["json"].read_text())
    statuses = {c["status"] for c in report["workbooks"][0]["cells"]}
    assert {"unit clash", "refusal used", "blank input"} <= statuses
    import importlib.resources

    import jsonschema

    schema = importlib.resources.files("joulebook.faces.workbook") / "check.schema.json"
    jsonschema.validate(report, json.loads(schema.read_text(encoding="utf-8")))
    junit = out["xml"].read_text()
    assert 'failure message="refusal used' in junit and 'failure message="blank input' in junit
    sarif = json.loads(out["sarif"].read_text())
    rules = [r["id"] for r in sarif["runs"][0]["tool"]["driver"]["rules"]]
    assert {"unit clash", "refusal used", "blank input", "outside the model"} <= set(rules)
    found = {r["ruleId"] for r in sarif["runs"][0]["results"]}
    assert {"unit clash", "refusal used", "blank input"} <= found
    for r in sarif["runs"][0]["results"]:
        assert rules[r["ruleIndex"]] == r["ruleId"]
    # relaxed by name, still counted
    assert main(["check", str(path), "--allow-errors", "--allow-refusals"]) == 1
    assert "unit clash" in capsys.readouterr().out
    relaxed = ["--allow-errors", "--allow-refusals", "--allow-unit-clash"]
    assert main(["check", str(path), *relaxed]) == 0
    said = capsys.readouterr().out
    assert "relaxed: errors, refusals, unit clash allowed" in said and "2 unit clash" in said
