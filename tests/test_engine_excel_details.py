"""Excel's semantics where they are subtle, each seen wrong on a real workbook and checked
here on a fixture of our own.

Sources of the expected values, named beside each check:
- "LibreOffice 7.4": LibreOffice 7.4.7.2 recalculating this very fixture headless
  (soffice --convert-to csv), run while writing the test;
- "hand": derived by hand in the comment;
- "Excel reference": Excel's function reference — common practice; where LibreOffice
  differs from Excel, the difference is named.
"""

from pathlib import Path

from joulebook.faces.workbook.functions.operators import cancel_sum, general_text, power
from joulebook.faces.workbook.functions.rounding import ipmt, mround
from joulebook.faces.workbook.functions.spelling import normalized
from wbtools import build, outcomes


def _run(tmp_path: Path, cells: dict, name: str = "x.xlsx") -> dict:
    out = outcomes(build(tmp_path / name, cells))
    return {k: (o.value, o.problem) for k, o in out.items()}


def test_arithmetic_details(tmp_path):
    cells = {
        "S!A1": -8.0,
        "S!A3": 100000.1,
        "S!A4": 100000.0,
        "S!B1": "=A1^(1/3)",
        "S!B2": "=A1^2",
        "S!B3": "=0^0",
        "S!B4": "=0^-1",
        "S!B13": "=A3-A4-0.1",
        "S!B14": '="12:30"+13/24',
        "S!B17": "=0.5-0.4-0.1",
        "S!B18": "=0.1+0.2-0.3",
        "S!B19": "=(0.1+0.2)*3",
        "S!B20": '="3"*"4"',
        "S!B21": '="abc"+1',
        "S!B22": "=0.1+0.2-0.3=0",
        "S!B23": "=1*(0.5-0.4-0.1)",
        "S!B24": "=(0.5-0.4-0.1)",
        "S!B25": '=IF(0.1+0.2-0.3=0,"YES","NO")',
    }
    v = _run(tmp_path, cells)
    # Excel reference: a negative number to a fractional power is #NUM! (LibreOffice 7.4
    # gives -2, an odd root: the two programs differ here); 0^0 #NUM!, 0^-1 #DIV/0!
    assert v["S!B1"] == (("error", "#NUM!"), "")
    assert v["S!B2"][0] == 64.0  # hand: (-8)² = 64
    assert v["S!B3"][0] == ("error", "#NUM!") and v["S!B4"][0] == ("error", "#DIV/0!")
    # LibreOffice 7.4: 5.82076054E-12 — a residue of 6e-11 relative to 0.1 is kept
    assert abs(v["S!B13"][0] - 5.82076054e-12) < 1e-20
    assert v["S!B14"][0] == 1.0625  # LibreOffice 7.4; hand: 12.5/24 + 13/24 = 25.5/24
    # cancellation within 15 significant digits is 0 (LibreOffice 7.4: 0; the Excel
    # reference's own example .5-.4-.1 = 0, from memory)
    assert v["S!B17"][0] == 0.0 and v["S!B18"][0] == 0.0
    assert abs(v["S!B19"][0] - 0.9) < 1e-15  # hand; no cancellation: kept as computed
    # only a formula's last + or - cancels: inside a comparison or a product the residue
    # stays (Excel reference, from memory: =1*(.5-.4-.1) is -2.78E-17; a public workbook
    # saved "NO" for IF(Z22-Y22=0,…) on such a pair). LibreOffice 7.4 differs: it cancels
    # everywhere and compares approximately (B22 TRUE, B23 0, B25 "YES"; B24 0 alike).
    assert v["S!B22"][0] is False and v["S!B25"][0] == "NO"
    assert v["S!B23"][0] == 1 * (0.5 - 0.4 - 0.1) != 0.0
    assert v["S!B24"][0] == 0.0  # parentheses around the whole formula: still the last
    assert v["S!B20"][0] == 12.0  # hand: number text is read as numbers
    assert v["S!B21"][0] == ("error", "#VALUE!")  # Excel reference: text not a number


def test_numbers_written_as_text_in_general_format(tmp_path):
    cells = {
        "S!B1": '="x"&1.00000013E+48',
        "S!B2": '=""&(1/3)',
        "S!B3": '=""&123456789012345678',
        "S!B4": '=""&25',
        "S!B5": '=""&0.1',
        "S!B6": "=LEN(2/3)",
    }
    v = _run(tmp_path, cells)
    # Excel reference (the real workbook saved "1.00000013E+48"); LibreOffice 7.4
    # writes the same digits with a three-digit exponent (1.00000013E+048)
    assert v["S!B1"][0] == "x1.00000013E+48"
    assert v["S!B2"][0] == "0.333333333333333"  # LibreOffice 7.4: 15 significant digits
    assert v["S!B3"][0] == "1.23456789012346E+17"  # LibreOffice 7.4 (E+017 there)
    assert v["S!B4"][0] == "25" and v["S!B5"][0] == "0.1"  # hand
    assert v["S!B6"][0] == 17  # hand: "0.666666666666667" has 17 characters


def test_spellings_excel_stores(tmp_path):
    cells = {
        "S!A1": -8.0,
        "S!A2": 0.5,
        "S!B8": "=1e6+1",
        "S!B9": "=A2*2\n",
        "S!B10": "=SUM(OFFSET(A1,0,0))",
        "S!B11": "=OFFSET(A1,1,0,,)",
        "S!B12": "=SUM(OFFSET(A1,0,0,2,))",
        "S!B13": "=2.5e3/5",
    }
    v = _run(tmp_path, cells)
    assert v["S!B8"] == (1000001.0, "")  # LibreOffice 7.4
    assert v["S!B9"] == (1.0, "")  # LibreOffice 7.4
    assert v["S!B10"][0] == -8.0  # LibreOffice 7.4
    # OFFSET with its height and width left empty: the reference's own size
    assert v["S!B11"][0] == 0.5 and v["S!B12"][0] == -7.5  # LibreOffice 7.4
    assert v["S!B13"][0] == 500.0  # hand
    assert normalized("OFFSET(A1,,)") == "OFFSET(A1,,)"  # rows and columns stay (0, 0)


def test_mround_and_ipmt(tmp_path):
    cells = {
        "S!B3": "=MROUND(2.5,1)",
        "S!B4": "=MROUND(-2.5,-1)",
        "S!B5": "=MROUND(7.5,5)",
        "S!B6": "=IPMT(0.01,1,12,-1000)",
        "S!B7": "=IPMT(0.01,2,12,1000)",
        "S!B8": "=MROUND(5,-2)",
        "S!B9": "=IPMT(0.01,13,12,1000)",
        "S!B10": "=IPMT(0.01,1,12,1000,0,1)",
    }
    v = _run(tmp_path, cells)
    assert [v[f"S!B{r}"][0] for r in (3, 4, 5)] == [3.0, -3.0, 10.0]  # LibreOffice 7.4
    assert v["S!B6"][0] == 10.0  # LibreOffice 7.4; hand: -pv · rate = 1000 · 0.01
    assert abs(v["S!B7"][0] - -9.21151211321658) < 1e-12  # LibreOffice 7.4
    assert v["S!B8"][0] == ("error", "#NUM!")  # Excel reference: signs differ
    assert v["S!B9"][0] == ("error", "#NUM!")  # Excel reference: per beyond nper
    assert v["S!B10"][0] == 0.0  # Excel reference: no interest in the first period (type 1)


def test_the_pieces_alone():
    assert cancel_sum(1e5 + 0.1, -1e5) != 0.0  # a real difference is kept
    assert cancel_sum(0.30000000000000004, -0.3) == 0.0  # hand: 5.6e-17 of 0.3
    assert power(2.0, 0.5) == 2.0**0.5 and power(-2.0, 3.0) == -8.0  # hand
    assert power(10.0, 400.0) == "#NUM!"  # Excel reference: overflow
    assert general_text(1e15) == "1E+15" and general_text(123456789012345.0) == "123456789012345"
    assert mround(1.3, 0.2) == 1.4000000000000001  # hand: 6.5 (to 15 digits) rounds to 7
    assert ipmt(0.0, 1, 12, 1200) == 0.0  # hand: no rate, no interest


def test_network_and_data_service_functions_are_refused_by_name(tmp_path):
    from openpyxl.worksheet.formula import ArrayFormula

    from joulebook.faces.workbook.status import Status

    def spill(wb):
        wb["S"]["D1"] = ArrayFormula("D1:D3", '=_xlfn.STOCKHISTORY("XYZ",1)')

    cells = {
        "S!B1": '=_xlfn.WEBSERVICE("http://example.invalid/x")',
        "S!B2": '=CUBEVALUE("conn","[Measures].[Total]")',
        "S!B3": "=B1&B2",
        "S!B4": "=1+1",
    }
    out = outcomes(build(tmp_path / "n.xlsx", cells, spill))
    assert out["S!B1"].problem.startswith(f"{Status.UNSUPPORTED}: WEBSERVICE needs the network")
    assert out["S!B2"].problem.startswith("unsupported: CUBEVALUE needs the network")
    for k in ("S!D1", "S!D2", "S!D3"):  # the cells it fills too, never "#NAME?" text
        assert out[k].problem.startswith("unsupported: STOCKHISTORY needs the network"), k
    assert out["S!B3"].problem.startswith("not checked: depends on S!B1")
    assert out["S!B4"] == out["S!B4"].__class__(2.0)  # hand: a clean twin is computed
