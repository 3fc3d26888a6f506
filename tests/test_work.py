"""Boundary work: analytic identities of ∫P dV and the sign convention.

Every check here is an exact identity of the path integrals (common practice), not a value
from a table.  Sign convention under test: work done BY the system (expansion) is positive.
"""

import math

import numpy as np
import pytest

from joulebook.core.errors import BadInput


def test_rigid_work_is_exactly_zero(call):
    assert call("JB_WORK_ISOBARIC", 500, 0.3, 0.3) == 0.0
    assert call("JB_WORK_POLYTROPIC", 100, 0.3, 900, 0.3) == 0.0
    assert (
        call("JB_PROCESS", "water | T = 20 degC | P = 1 bar", "rigid", "T2 in degC", 60, "W", 1)
        == 0.0
    )


def test_sign_convention_expansion_positive_compression_negative(call):
    assert call("JB_WORK_ISOBARIC", 200, 0.1, 0.2) > 0  # expansion: work by the system
    assert call("JB_WORK_ISOBARIC", 200, 0.2, 0.1) < 0  # compression: work on the system
    assert call("JB_WORK_ISOTHERMAL", 200, 0.1, 0.05) < 0
    assert call("JB_WORK_POLYTROPIC_N", 200, 0.1, 0.3, 1.3) > 0
    assert call("JB_WORK_LINEAR", 100, 0.1, 300, 0.2) > 0


@pytest.mark.parametrize("eps", [0.0, 1e-15, 1e-12, 1e-9, 1e-6, -1e-9, -1e-6])
def test_polytropic_is_continuous_through_n_equals_1(call, eps):
    iso = call("JB_WORK_ISOTHERMAL", 300, 0.2, 0.9)
    w = call("JB_WORK_POLYTROPIC_N", 300, 0.2, 0.9, 1.0 + eps)
    # dW/dn at n = 1 is −P1·V1·(ln r)²/2, so the difference is that times eps
    assert w == pytest.approx(iso - eps * 300 * 0.2 * math.log(4.5) ** 2 / 2, rel=1e-12, abs=1e-12)


def test_two_state_form_near_n_equal_1(call):
    P1, V1, V2 = 300.0, 0.2, 0.9
    for eps in (0.0, 1e-14, 1e-10):
        P2 = P1 * V1 / V2 * (1 + eps)
        assert call("JB_WORK_POLYTROPIC", P1, V1, P2, V2) == pytest.approx(
            call("JB_WORK_ISOTHERMAL", P1, V1, V2), rel=1e-9
        )


@pytest.mark.parametrize("n", [0.0, 0.5, 1.3, 1.4, 2.0, -0.5])
def test_polytropic_matches_the_textbook_closed_form(call, n):
    P1, V1, V2 = 120.0, 0.8, 0.25
    P2 = P1 * (V1 / V2) ** n
    closed = (P2 * V2 - P1 * V1) / (1 - n)
    assert call("JB_WORK_POLYTROPIC_N", P1, V1, V2, n) == pytest.approx(closed, rel=1e-12)
    assert call("JB_WORK_POLYTROPIC", P1, V1, P2, V2) == pytest.approx(closed, rel=1e-10)
    if n != 0.0:
        assert call("JB_POLY_EXPONENT", P1, V1, P2, V2) == pytest.approx(n, rel=1e-12)


def test_pv_integration_converges_to_the_closed_form(call):
    n, P1, V1, V2 = 1.35, 100.0, 0.9, 0.12
    exact = call("JB_WORK_POLYTROPIC_N", P1, V1, V2, n)
    errs = []
    for N in (11, 21, 41, 81):
        V = np.linspace(V1, V2, N)
        P = P1 * (V1 / V) ** n
        col = lambda a: [[x] for x in a]  # noqa: E731
        errs.append(abs(call("JB_WORK_PV", col(P), col(V)) - exact))
        # polytropic segments are exact for polytropic data
        assert call("JB_WORK_PV", col(P), col(V), "polytropic") == pytest.approx(exact, rel=1e-12)
    # trapezoid error falls as 1/N² (each halving of the step: ≈ 4×)
    for a, b in zip(errs, errs[1:]):
        assert 3.5 < a / b < 4.5


def test_closed_loop_gives_signed_enclosed_area(call):
    # rectangle 100–300 kPa × 0.1–0.4 m3: area 60 kJ
    P = [[300], [300], [100], [100], [300]]
    V = [[0.1], [0.4], [0.4], [0.1], [0.1]]
    assert call("JB_WORK_PV", P, V) == pytest.approx(60.0)  # clockwise: engine, net work out
    assert call("JB_WORK_PV", P[::-1], V[::-1]) == pytest.approx(-60.0)  # counter-clockwise


def test_pv_blanks_and_errors(call):
    assert call("JB_WORK_PV", [[100], [None], [100]], [[0.1], [None], [0.2]]) == pytest.approx(10.0)
    with pytest.raises(BadInput, match="at least 2 points"):
        call("JB_WORK_PV", [[100]], [[0.1]])
    with pytest.raises(BadInput, match="equal lengths"):
        call("JB_WORK_PV", [[100], [200]], [[0.1], [0.2], [0.3]])
    with pytest.raises(BadInput, match="partner"):
        call("JB_WORK_PV", [[100], [None]], [[0.1], [0.2]])
    with pytest.raises(BadInput, match="P_values"):
        call("JB_WORK_PV", [[100], ["x"]], [[0.1], [0.2]])
    with pytest.raises(BadInput, match="method"):
        call("JB_WORK_PV", [[100], [200]], [[0.1], [0.2]], "simpsons")
    with pytest.raises(BadInput, match=r"P_values \(item 2,1\) = -5 kPa: an absolute pressure"):
        call("JB_WORK_PV", [[100], [-5]], [[0.1], [0.2]], "polytropic")


def test_units_of_work(call):
    # 1 bar·L = 100 J (SI definitions)
    assert call("JB_WORK_ISOBARIC", 1, 0, 1, "K-Pa-J, P=bar, V=L") == pytest.approx(100.0)
    # gauge pressure is converted to absolute before the work is taken
    assert call("JB_WORK_ISOBARIC", 0, 0, 1, "P=kPag, V=m3") == pytest.approx(101.325)


def test_isothermal_mass_form_equals_pv_form(call):
    m, T, V1, V2 = 0.5, 300.0, 0.1, 0.3
    R = call("JB_GAS_R", "air")
    P1 = m * R * T / V1
    assert call("JB_WORK_ISOTHERMAL_MASS", "air", m, T, V1, V2) == pytest.approx(
        call("JB_WORK_ISOTHERMAL", P1, V1, V2), rel=1e-12
    )


def test_polytropic_fit_recovers_exact_data(call):
    V = np.linspace(0.9, 0.15, 30)
    P = 101.325 * (0.9 / V) ** 1.27
    row = call("JB_POLY_FIT", [[p] for p in P], [[v] for v in V], "all")
    n, C, r2 = row[0]
    assert n == pytest.approx(1.27, rel=1e-12)
    assert C == pytest.approx(101.325 * 0.9**1.27, rel=1e-10)
    assert r2 == pytest.approx(1.0, abs=1e-12)


def test_polytropic_end_states_are_consistent(call):
    P2 = call("JB_POLY_P2", 100, 0.8, 0.2, 1.3)
    assert call("JB_POLY_V2", 100, 0.8, P2, 1.3) == pytest.approx(0.2, rel=1e-12)
    Tv = call("JB_POLY_T2_FROM_V", 300, 0.8, 0.2, 1.3)
    Tp = call("JB_POLY_T2_FROM_P", 300, 100, P2, 1.3)
    assert Tv == pytest.approx(Tp, rel=1e-12)
    # ideal gas: P·V/T constant (common practice)
    assert 100 * 0.8 / 300 == pytest.approx(P2 * 0.2 / Tv, rel=1e-12)


def test_other_work_helpers(call):
    assert call("JB_WORK_ELECTRIC_IN", 230, 4, 600, "K-Pa-J") == pytest.approx(230 * 4 * 600)
    assert call("JB_WORK_SHAFT_IN", 12, 400, "K-Pa-J") == pytest.approx(2 * math.pi * 400 * 12)
    assert call("JB_BALANCE_DELTA_KE", 2, 3, 5, "K-Pa-J") == pytest.approx(16.0)
    assert call("JB_BALANCE_DELTA_PE", 2, 0, 10, None, "K-Pa-J") == pytest.approx(2 * 9.80665 * 10)


def test_first_law_helpers_sign_convention(call):
    # a stirred rigid tank: 30 kJ of paddle work done ON the gas (W_other = −30), no heat:
    # ΔU = Q − W = 0 − (−30) = 30 kJ
    assert call("JB_BALANCE_HEAT", 30, 0, -30) == pytest.approx(0.0)
    assert call("JB_BALANCE_GAP", 0, 0, 30, -30) == pytest.approx(0.0)
    assert call("JB_BALANCE_GAP", 10, 0, 30, -30) == pytest.approx(10.0)
    # constant pressure: Q − W_other = ΔH
    dh = call("JB_GAS_DELTA_H", "air", 300, 500)
    assert call("JB_HEAT_ISOBARIC_GAS", "air", 2, 300, 500, -5) == pytest.approx(2 * dh - 5)
    du = call("JB_GAS_DELTA_U", "air", 300, 500)
    assert call("JB_HEAT_RIGID_GAS", "air", 2, 300, 500) == pytest.approx(2 * du)
