"""joulebook sensitivity: coefficients, GUM uncertainty and Monte Carlo of workbook results.

References named beside the checks: closed forms differentiated by hand; the law of
propagation of uncertainty, JCGM 100:2008 §5.1.2 (uncorrelated inputs) and G.4.1
(Welch–Satterthwaite); the rectangular distribution's u = a/√3, JCGM 100:2008 §4.3.7.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from joulebook.core.errors import BadInput
from joulebook.faces.cli import main
from joulebook.faces.workbook.reader import read_book
from joulebook.faces.workbook.sensitivity import (
    TEXT_INPUT,
    Uncertainty,
    analyse,
    render_html,
    schema,
    to_dict,
    to_json,
    to_markdown,
)
from wbtools import build

M, R, T, V = 2.0, 287.05, 300.0, 0.5
U_M, U_T, U_V = 0.01, 2.0, 0.005


def gas_book(tmp_path: Path, extra: dict | None = None) -> Path:
    """Ideal gas P = m·R·T/V laid out as an engineer would: label | value | unit."""
    cells = {
        "Gas!A1": "Mass",
        "Gas!B1": M,
        "Gas!C1": "kg",
        "Gas!A2": "Gas constant",
        "Gas!B2": R,
        "Gas!C2": "J/(kg*K)",
        "Gas!A3": "Temperature",
        "Gas!B3": T,
        "Gas!C3": "K",
        "Gas!A4": "Volume",
        "Gas!B4": V,
        "Gas!C4": "m3",
        "Gas!A6": "Pressure",
        "Gas!B6": "=B1*B2*B3/B4",
        "Gas!C6": "Pa",
    }
    cells.update(extra or {})
    return build(tmp_path / "gas.xlsx", cells)


def one(report, cell: str):
    return next(r for r in report.results if f"{r.key[0]}!{_a1(r.key)}" == cell)


def _a1(key) -> str:
    from joulebook.faces.workbook.reader import col_letters

    return f"{col_letters(key[2])}{key[1]}"


def by_cell(result) -> dict:
    return {f"{i.key[0]}!{_a1(i.key)}": i for i in result.inputs}


def test_ideal_gas_relative_sensitivities_are_one_one_minus_one(tmp_path):
    # closed form: P = m R T / V, so (∂P/P)/(∂x/x) = 1 for m, R, T and −1 for V
    rep = analyse(read_book(gas_book(tmp_path)))
    r = one(rep, "Gas!B6")
    ins = by_cell(r)
    assert set(ins) == {"Gas!B1", "Gas!B2", "Gas!B3", "Gas!B4"}
    for cell, rel in (("Gas!B1", 1), ("Gas!B2", 1), ("Gas!B3", 1), ("Gas!B4", -1)):
        assert ins[cell].relative == pytest.approx(rel, abs=1e-6)
    P = M * R * T / V
    # closed form: ∂P/∂T = m R / V, ∂P/∂V = −m R T / V²
    assert ins["Gas!B3"].c == pytest.approx(M * R / V, rel=1e-6)
    assert ins["Gas!B4"].c == pytest.approx(-P / V, rel=1e-6)
    assert ins["Gas!B3"].label == "Temperature" and ins["Gas!B3"].unit == "K"
    assert r.unit == "Pa" and r.value == pytest.approx(P)


def test_gum_combined_uncertainty_matches_the_analytic_law_of_propagation(tmp_path):
    path = gas_book(tmp_path)
    book = read_book(path)
    us = [
        Uncertainty.parse(f"Gas!B1={U_M}", book.sheets),
        Uncertainty.parse(f"Gas!B3={U_T}", book.sheets),
        Uncertainty.parse(f"Gas!B4={U_V}", book.sheets),
    ]
    r = one(analyse(book, uncertainties=us), "Gas!B6")
    P = M * R * T / V
    # JCGM 100:2008 §5.1.2 for a product of powers: (u_c/P)² = Σ (pᵢ u(xᵢ)/xᵢ)²
    uc = P * math.sqrt((U_M / M) ** 2 + (U_T / T) ** 2 + (U_V / V) ** 2)
    assert r.u_c == pytest.approx(uc, rel=1e-6)
    assert r.U == pytest.approx(2 * uc, rel=1e-6) and r.k == 2
    ins = by_cell(r)
    assert ins["Gas!B4"].contribution == pytest.approx(P * U_V / V, rel=1e-6)
    assert ins["Gas!B2"].u is None and ins["Gas!B2"].contribution is None
    assert "independent" in " ".join(r.notes)


def test_monte_carlo_agrees_with_the_analytic_standard_deviation(tmp_path):
    # a linear chain y = 2a − 3b + c: the analytic standard deviation is exact
    # (JCGM 100:2008 §5.1.2 with no higher-order terms); 10⁵ draws within 1 %
    path = build(
        tmp_path / "lin.xlsx",
        {
            "S!A1": "a",
            "S!B1": 10.0,
            "S!A2": "b",
            "S!B2": 4.0,
            "S!A3": "c",
            "S!B3": 1.5,
            "S!A4": "two a",
            "S!B4": "=2*B1",
            "S!A5": "y",
            "S!B5": "=B4-3*B2+B3",
        },
    )
    book = read_book(path)
    us = [
        Uncertainty.parse("S!B1=0.2", book.sheets),
        Uncertainty.parse("S!B2=0.1:rectangular", book.sheets),  # half-width: u = a/√3
        Uncertainty.parse("S!B3=0.05", book.sheets),
    ]
    rep = analyse(book, results=[("S", 5, 2)], uncertainties=us, mc=100_000, seed=7)
    r = rep.results[0]
    sd = math.sqrt((2 * 0.2) ** 2 + (3 * 0.1 / math.sqrt(3)) ** 2 + 0.05**2)
    assert r.u_c == pytest.approx(sd, rel=1e-6)
    assert r.mc["std"] == pytest.approx(sd, rel=0.01)
    assert r.mc["mean"] == pytest.approx(2 * 10 - 3 * 4 + 1.5, abs=0.01)
    assert r.mc["draws"] == 100_000 and r.mc["refused"] == 0
    assert r.mc["how"].startswith("column path")  # each formula once per block of draws
    assert "disagrees" not in r.mc and r.ok


def test_monte_carlo_of_a_range_over_varying_inputs_runs_in_bands_of_rows(tmp_path):
    # SUM over a range that holds two varying inputs is not elementwise in the draws: the
    # chain is copied in bands of rows instead (each copy's range moves with it)
    path = build(
        tmp_path / "sum.xlsx",
        {"S!B1": 1.0, "S!B2": 2.0, "S!B3": "=SUM(B1:B2)*2", "S!B4": "=B3+$B$1"},
    )
    book = read_book(path)
    us = [Uncertainty(("S", 1, 2), 0.1), Uncertainty(("S", 2, 2), 0.2)]
    r = analyse(book, results=[("S", 4, 2)], uncertainties=us, mc=4000, seed=3).results[0]
    assert r.mc["how"].startswith("bands of rows")
    # y = 3·b1 + 2·b2: σ = √((3·0.1)² + (2·0.2)²) = 0.5 (JCGM 100:2008 §5.1.2, linear)
    assert r.u_c == pytest.approx(0.5, rel=1e-6)
    assert r.mc["std"] == pytest.approx(0.5, rel=0.05)
    assert r.mc["mean"] == pytest.approx(3 * 1 + 2 * 2, abs=0.05)


def test_product_and_quotient_and_their_uncertainty(tmp_path):
    # y = a·b/c: closed-form coefficients b/c, a/c, −a·b/c²
    path = build(
        tmp_path / "pq.xlsx",
        {"S!B1": 3.0, "S!B2": 5.0, "S!B3": 2.0, "S!B4": "=B1*B2", "S!B5": "=B4/B3"},
    )
    book = read_book(path)
    us = [Uncertainty(("S", i, 2), u) for i, u in ((1, 0.03), (2, 0.1), (3, 0.01))]
    r = analyse(book, results=[("S", 5, 2)], uncertainties=us).results[0]
    ins = by_cell(r)
    a, b, c = 3.0, 5.0, 2.0
    assert ins["S!B1"].c == pytest.approx(b / c, rel=1e-6)
    assert ins["S!B2"].c == pytest.approx(a / c, rel=1e-6)
    assert ins["S!B3"].c == pytest.approx(-a * b / c**2, rel=1e-6)
    uc = math.sqrt((b / c * 0.03) ** 2 + (a / c * 0.1) ** 2 + (a * b / c**2 * 0.01) ** 2)
    assert r.u_c == pytest.approx(uc, rel=1e-6)


def test_polytropic_work_coefficients_match_the_closed_form(tmp_path):
    # W = P1·V1·((V2/V1)^(1−n) − 1)/(1 − n), differentiated by hand
    P1, V1, V2, n = 100.0, 0.01, 0.002, 1.3
    path = build(
        tmp_path / "poly.xlsx",
        {
            "S!B1": P1,
            "S!B2": V1,
            "S!B3": V2,
            "S!B4": n,
            "S!B6": "=JB_WORK_POLYTROPIC_N(B1,B2,B3,B4)",
        },
    )
    r = analyse(read_book(path), results=[("S", 6, 2)]).results[0]
    ins = by_cell(r)
    rr = V2 / V1
    W = P1 * V1 * (rr ** (1 - n) - 1) / (1 - n)
    assert r.value == pytest.approx(W, rel=1e-9)
    assert ins["S!B1"].c == pytest.approx(W / P1, rel=1e-6)
    assert ins["S!B3"].c == pytest.approx(P1 * (V1 / V2) ** n, rel=1e-6)  # = P2
    assert ins["S!B2"].c == pytest.approx(n * W / V1 - P1, rel=1e-6)
    g_n = (-math.log(rr) * rr ** (1 - n) * (1 - n) + (rr ** (1 - n) - 1)) / (1 - n) ** 2
    assert ins["S!B4"].c == pytest.approx(P1 * V1 * g_n, rel=1e-6)


def test_real_fluid_dh_dT_at_constant_pressure_is_cp(tmp_path):
    # ∂h/∂T at constant P is cp by definition; cp from JB_PROP itself (IAPWS-95)
    path = build(
        tmp_path / "h.xlsx",
        {
            "W!A1": "Fluid",
            "W!B1": "water",
            "W!A2": "Temperature",
            "W!B2": 60.0,
            "W!A3": "Pressure",
            "W!B3": 500.0,
            "W!B5": '=JB_PROP(B1,"h in kJ/kg","T in degC",B2,"P in kPa",B3)',
            "W!B6": '=JB_PROP(B1,"cp in kJ/kg.K","T in degC",B2,"P in kPa",B3)',
        },
    )
    rep = analyse(read_book(path), results=[("W", 5, 2)])
    r = rep.results[0]
    ins = by_cell(r)
    cp = one(analyse(read_book(path), results=[("W", 6, 2)]), "W!B6").value
    assert ins["W!B2"].c == pytest.approx(cp, rel=1e-5)
    assert ins["W!B1"].problem == TEXT_INPUT and ins["W!B1"].c is None


def test_a_switching_if_and_a_rounding_are_reported_not_differentiated(tmp_path):
    path = build(
        tmp_path / "step.xlsx",
        {
            "S!B1": 100.0,
            "S!B2": "=IF(B1>100,2*B1,B1)",  # switches exactly at the input's value
            "S!B3": 3.14159,
            "S!B4": "=ROUND(B3,1)",
        },
    )
    rep = analyse(read_book(path), results=[("S", 2, 2), ("S", 4, 2)])
    kink = rep.results[0].inputs[0]
    assert kink.c is None and "not smooth" in kink.problem and "S!B1" in kink.problem
    flat = rep.results[1].inputs[0]
    assert flat.c is None and "ROUND" in flat.problem
    assert not rep.results[0].ok and not rep.results[1].ok


def test_a_smooth_if_that_does_not_switch_is_differentiated(tmp_path):
    # a clean twin of the switching IF: far from its switch, the branch is smooth
    path = build(tmp_path / "if.xlsx", {"S!B1": 50.0, "S!B2": "=IF(B1>100,2*B1,3*B1)"})
    r = analyse(read_book(path), results=[("S", 2, 2)]).results[0]
    assert r.inputs[0].c == pytest.approx(3.0, rel=1e-9) and r.ok


def test_a_refusal_names_the_input_and_the_limit(tmp_path):
    # 1273 K is the upper end joulebook takes for water (its message says so): a step above is refused
    path = build(
        tmp_path / "edge.xlsx",
        {
            "S!B1": 1273.0,
            "S!B2": 1000.0,
            "S!B3": '=JB_PROP("water","h in kJ/kg","T in K",B1,"P in kPa",B2)',
        },
    )
    r = analyse(read_book(path), results=[("S", 3, 2)]).results[0]
    t = by_cell(r)["S!B1"]
    assert t.c is None and t.problem.startswith("refused at S!B1 = 1273.13")
    assert "1273 K" in t.problem.split(":", 1)[1]  # the model's limit, from its message
    assert by_cell(r)["S!B2"].c is not None  # the other input is fine


def test_monte_carlo_across_the_boiling_point_disagrees_with_first_order(tmp_path):
    # water at 99.5 degC and 101.325 kPa, u(T) = 1 K: draws cross the boiling point and h
    # jumps by the latent heat; the law of propagation cannot see it (JCGM 101:2008 §8)
    path = build(
        tmp_path / "boil.xlsx",
        {
            "S!B1": 99.5,
            "S!B2": 101.325,
            "S!B3": '=JB_PROP("water","h in kJ/kg","T in degC",B1,"P in kPa",B2)',
        },
    )
    book = read_book(path)
    us = [Uncertainty.parse("S!B1=1", book.sheets)]
    r = analyse(book, results=[("S", 3, 2)], uncertainties=us, mc=2000).results[0]
    assert r.u_c == pytest.approx(4.216, rel=0.01)  # ≈ cp·u(T), cp of liquid water near 100 °C
    assert r.mc["std"] > 100 * r.u_c  # the latent heat (≈ 2257 kJ/kg) dominates
    assert "not linear" in r.mc["disagrees"] and not r.ok


def test_clean_gas_chain_does_not_disagree(tmp_path):
    # clean twin of the boiling case: 1 % inputs on an ideal gas agree within JCGM 101's
    # numerical tolerance (one significant digit of u_c)
    book = read_book(gas_book(tmp_path))
    us = [Uncertainty(("Gas", 3, 2), U_T), Uncertainty(("Gas", 4, 2), U_V)]
    r = analyse(book, results=[("Gas", 6, 2)], uncertainties=us, mc=20_000).results[0]
    assert "disagrees" not in r.mc and r.ok


def test_uncertainties_written_in_the_workbook(tmp_path):
    # a "u" column beside the values, a "± rectangular" column, and a defined name u_<NAME>
    def names(wb):
        from openpyxl.workbook.defined_name import DefinedName

        for n, ref in (("volume", "Gas!$B$5"), ("u_volume", "Gas!$F$5")):
            wb.defined_names[n] = DefinedName(n, attr_text=ref)

    path = build(
        tmp_path / "stated.xlsx",
        {
            "Gas!A1": "Input",
            "Gas!B1": "Value",
            "Gas!D1": "u",
            "Gas!E1": "± rectangular",
            "Gas!A2": "Mass",
            "Gas!B2": M,
            "Gas!C2": "kg",
            "Gas!D2": U_M,
            "Gas!A3": "Gas constant",
            "Gas!B3": R,
            "Gas!A4": "Temperature",
            "Gas!B4": T,
            "Gas!C4": "K",
            "Gas!E4": 3.0,
            "Gas!A5": "Volume",
            "Gas!B5": V,
            "Gas!F5": U_V,
            "Gas!A7": "Pressure",
            "Gas!B7": "=B2*B3*B4/B5",
        },
        prepare=names,
    )
    r = analyse(read_book(path), results=[("Gas", 7, 2)]).results[0]
    ins = by_cell(r)
    assert ins["Gas!B2"].u == pytest.approx(U_M) and ins["Gas!B2"].source == "cell Gas!D2"
    # JCGM 100:2008 §4.3.7: a rectangular half-width a gives u = a/√3
    assert ins["Gas!B4"].u == pytest.approx(3.0 / math.sqrt(3))
    assert ins["Gas!B4"].distribution == "rectangular"
    assert ins["Gas!B5"].u == pytest.approx(U_V) and ins["Gas!B5"].source.lower() == "name u_volume"
    assert ins["Gas!B3"].u is None  # nothing stated: no uncertainty, not a guess
    # the clean twin: the same numbers without headings are not read as uncertainties
    bare = build(
        tmp_path / "bare.xlsx",
        {
            "Gas!B2": M,
            "Gas!D2": U_M,
            "Gas!B3": R,
            "Gas!B4": T,
            "Gas!B5": V,
            "Gas!B7": "=B2*B3*B4/B5",
        },
    )
    r2 = analyse(read_book(bare), results=[("Gas", 7, 2)]).results[0]
    assert all(i.u is None for i in r2.inputs) and r2.u_c is None


def test_effective_degrees_of_freedom_welch_satterthwaite(tmp_path):
    # y = a + b, u = 1 each with 4 and 9 degrees of freedom:
    # ν_eff = u_c⁴ / (1/4 + 1/9) = 4 / (13/36) (JCGM 100:2008 G.4.1)
    path = build(tmp_path / "dof.xlsx", {"S!B1": 1.0, "S!B2": 2.0, "S!B3": "=B1+B2"})
    book = read_book(path)
    us = [Uncertainty.parse("S!B1=1:dof=4", book.sheets), Uncertainty.parse("S!B2=1:dof=9")]
    r = analyse(book, results=[("S", 3, 2)], uncertainties=us).results[0]
    assert r.u_c == pytest.approx(math.sqrt(2))
    assert r.dof == pytest.approx(4 / (13 / 36))


@pytest.mark.parametrize(
    "text, words",
    [
        ("S!B1", "CELL=VALUE"),
        ("S!B1=abc", "not a number"),
        ("S!B1=-1", "≥ 0"),
        ("S!B1=1:lognormal", "normal, rectangular"),
        ("S!B1=1:k=0", "above 0"),
        ("B1=1", "Sheet1!B12"),
    ],
)
def test_a_bad_uncertainty_names_the_argument_and_the_valid_forms(text, words):
    with pytest.raises(BadInput) as e:
        Uncertainty.parse(text, ["S"])
    msg = str(e.value)
    assert words in msg and ("u = " in msg or "cell = " in msg)


def test_monte_carlo_of_a_chain_reading_its_own_row_goes_draw_by_draw(tmp_path):
    path = build(tmp_path / "row.xlsx", {"S!B1": 2.0, "S!B2": "=B1*ROW()"})
    book = read_book(path)
    us = [Uncertainty(("S", 1, 2), 0.1)]
    r = analyse(book, results=[("S", 2, 2)], uncertainties=us, mc=200).results[0]
    assert r.mc["how"].startswith("draw by draw") and "ROW" in r.mc["how"]
    assert r.mc["std"] == pytest.approx(0.2, rel=0.2)
    with pytest.raises(BadInput, match="at most 2000 draws"):
        analyse(book, results=[("S", 2, 2)], uncertainties=us, mc=5000)


def test_default_results_are_our_calls_and_the_ends_of_chains(tmp_path):
    path = build(
        tmp_path / "d.xlsx",
        {
            "S!B1": 2.0,
            "S!B2": "=B1*3",  # read by B3: not an end
            "S!B3": "=B2+1",  # an end
            "S!B4": '=JB_CONVERT(B1,"bar","kPa")',  # a joulebook call (and an end)
            "S!B5": '="text "&B1',  # an end, but text: not a result
        },
    )
    rep = analyse(read_book(path))
    assert [r.key for r in rep.results] == [("S", 3, 2), ("S", 4, 2)]


def test_json_is_strict_and_follows_the_shipped_schema(tmp_path):
    jsonschema = pytest.importorskip("jsonschema")
    book = read_book(gas_book(tmp_path))
    us = [Uncertainty(("Gas", 3, 2), U_T, "triangular")]
    rep = analyse(book, uncertainties=us, mc=500)
    data = json.loads(to_json(rep))
    jsonschema.validate(data, schema())
    res = data["results"][0]
    assert res["cell"] == "Gas!B6" and res["k"] == 2.0
    assert {"cell", "c", "relative", "u", "contribution"} <= set(res["inputs"][0])
    assert {"mean", "std", "low", "high"} <= set(res["mc"])
    assert to_dict(rep)["results"][0]["u_c"] == res["u_c"]


def test_reports_escape_the_workbook_text(tmp_path):
    path = gas_book(tmp_path, {"Gas!A3": "<b>T</b> | pipe"})
    rep = analyse(read_book(path), uncertainties=[Uncertainty(("Gas", 3, 2), 1.0)])
    html = render_html(rep)
    assert "<b>T</b>" not in html and "&lt;b&gt;T&lt;/b&gt;" in html
    assert "<svg" in html and "tornado" in html
    md = to_markdown(rep)
    assert "\\| pipe" not in md or "<b>" not in md  # Markdown cells escaped
    assert "| Gas!B6 Pressure |" in md


def test_command_line_exit_codes_and_outputs(tmp_path, capsys):
    path = gas_book(tmp_path)
    before = path.read_bytes()
    out = tmp_path / "s.html"
    code = main(
        [
            "sensitivity",
            str(path),
            "--u",
            "Gas!B3=2",
            "--u",
            "Gas!B4=0.005",
            "-o",
            str(out),
            "--json",
            str(tmp_path / "s.json"),
            "--summary",
            str(tmp_path / "s.md"),
        ]
    )
    text = capsys.readouterr().out
    assert code == 0 and "Gas!B6 Pressure: 344460 Pa ±" in text
    assert out.read_text().startswith("<!DOCTYPE html>")
    assert json.loads((tmp_path / "s.json").read_text())["results"][0]["U"] > 0
    assert path.read_bytes() == before  # the workbook is never modified
    # the output may not be the input, nor be replaced without --force
    assert main(["sensitivity", str(path), "--json", str(path)]) == 2
    assert main(["sensitivity", str(path), "-o", str(out)]) == 2
    assert main(["sensitivity", str(path), "--u", "Nowhere!B3=1"]) == 2
    assert main(["sensitivity", str(tmp_path / "missing.xlsx")]) == 2
    (tmp_path / "bad.xlsx").write_bytes(b"not a zip")
    assert main(["sensitivity", str(tmp_path / "bad.xlsx")]) == 2
    err = capsys.readouterr().err
    assert "bad.xlsx" in err and "Nowhere" in err
    # a result whose coefficient is refused: exit 1
    step = build(tmp_path / "step.xlsx", {"S!B1": 100.0, "S!B2": "=IF(B1>100,2*B1,B1)"})
    assert main(["sensitivity", str(step)]) == 1


def test_diff_and_sensitivity_refuse_what_is_not_a_regular_file_and_name_it(tmp_path, capsys):
    # the guards of check, recalc and audit hold for every verb (docs/ci.md exit codes)
    import os

    fifo = tmp_path / "pipe.xlsx"
    os.mkfifo(fifo)
    book = gas_book(tmp_path)
    assert main(["sensitivity", str(fifo)]) == 2
    assert main(["diff", str(book), str(fifo)]) == 2
    err = capsys.readouterr().err
    assert err.count("pipe.xlsx") >= 2
    # an output that is the other input is refused before any work
    assert main(["diff", str(book), str(book), "--json", str(book)]) == 2


def test_the_audit_carries_plus_minus_U_on_each_result_when_uncertainties_are_given(tmp_path):
    # the same U as the sensitivity report (JCGM 100:2008 §5.1.2), on the package's results
    book = gas_book(tmp_path)
    out = tmp_path / "audit.html"
    args = ["audit", str(book), "-o", str(out), "--u", "Gas!B3=2", "--u", "Gas!B4=0.005"]
    assert main(args) == 0
    html = out.read_text(encoding="utf-8")
    P = M * R * T / V
    U = 2 * P * math.sqrt((U_T / T) ** 2 + (U_V / V) ** 2)
    import re

    shown = [float(x) for x in re.findall(r"± ([0-9.]+) \(k = 2\)", html)]
    assert len(shown) == 2  # the results table and the entry
    assert all(x == pytest.approx(U, rel=1e-4) for x in shown)
    # the clean twin: no uncertainty stated, no ± anywhere
    plain = tmp_path / "plain.html"
    assert main(["audit", str(book), "-o", str(plain)]) == 0
    assert "± " not in plain.read_text(encoding="utf-8").split('<h2 id="results">')[1][:2000]
    # a bad uncertainty is named, exit 2
    assert main(["audit", str(book), "-o", str(tmp_path / "x.html"), "--u", "Gas!B3=x"]) == 2
