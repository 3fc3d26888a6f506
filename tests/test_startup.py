"""What a check imports: only the libraries its formulas need (speed lives in tests/bench)."""

import subprocess
import sys

import pytest

from wbtools import build

_PROBE = """
import sys
from joulebook.faces.cli import main
code = main(["check", sys.argv[1]])
names = ("CoolProp", "pint", "scipy.stats", "scipy.interpolate", "openpyxl")
print(code, *(m in sys.modules for m in names))
"""


def _check_imports(path) -> list[str]:
    r = subprocess.run(
        [sys.executable, "-c", _PROBE, str(path)], capture_output=True, text=True, check=True
    )
    return r.stdout.split()[-6:]


@pytest.fixture
def saved(tmp_path):
    from joulebook.faces.cli import main

    def make(formula: str):
        raw = build(tmp_path / "raw.xlsx", {"Calc!A1": 25.0, "Calc!B1": formula})
        out = tmp_path / "book.xlsx"
        assert main(["recalc", str(raw), "-o", str(out)]) == 0
        return out

    return make


def test_closed_form_workbook_imports_neither_property_library_nor_pint_nor_scipy(saved):
    # nor openpyxl's workbook model: only its formula tokenizer, loaded on its own
    path = saved("=ROUND(JB_WORK_POLYTROPIC_N(100,0.8,0.1+A1/1000,1.3),3)")
    assert _check_imports(path) == ["0", "False", "False", "False", "False", "False"]


def test_one_property_formula_imports_the_property_library_only(saved):
    path = saved('=JB_PROP("water","h in kJ/kg","T in degC",A1,"P in kPa",101.325)')
    assert _check_imports(path) == ["0", "True", "False", "False", "False", "False"]


def test_statistics_functions_work_with_scipy_deferred(tmp_path):
    # the library's statistics module is imported with scipy deferred; functions that use
    # scipy (KURT, NORM.S.DIST, PERCENTILE) import it when they run and give its values
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    path = build(
        tmp_path / "stat.xlsx",
        {
            "S!A1": 1.0,
            "S!A2": 2.0,
            "S!A3": 4.0,
            "S!A4": 8.0,
            "S!A5": 9.0,
            "S!B1": "=KURT(A1:A5)",
            "S!B2": "=_xlfn.NORM.S.DIST(0,TRUE)",
            "S!B3": "=PERCENTILE(A1:A5,0.3)",
            "S!B4": "=MAX(A1:A5)+AVERAGE(A1:A5)",
        },
    )
    out = Engine(read_book(path)).run()
    # KURT: Excel's sample excess kurtosis formula (Excel function reference, KURT),
    # n(n+1)/((n-1)(n-2)(n-3))·Σz⁴ − 3(n-1)²/((n-2)(n-3)), computed here by hand
    xs = [1.0, 2.0, 4.0, 8.0, 9.0]
    n, m = len(xs), sum(xs) / len(xs)
    sd = (sum((x - m) ** 2 for x in xs) / (n - 1)) ** 0.5
    kurt = n * (n + 1) / ((n - 1) * (n - 2) * (n - 3)) * sum(((x - m) / sd) ** 4 for x in xs)
    kurt -= 3 * (n - 1) ** 2 / ((n - 2) * (n - 3))
    assert out[("S", 1, 2)].value == pytest.approx(kurt, rel=1e-12)
    assert out[("S", 2, 2)].value == pytest.approx(0.5, rel=1e-15)  # Φ(0) = 1/2 exactly
    # PERCENTILE.INC by linear interpolation (Excel function reference): rank 0.3·4 = 1.2
    assert out[("S", 3, 2)].value == pytest.approx(2.0 + 0.2 * (4.0 - 2.0), rel=1e-12)
    assert out[("S", 4, 2)].value == pytest.approx(9.0 + 4.8)
