"""The Pythonic API (joulebook.State, Q_, the work and first-law helpers).

Sources
-------
* The `iapws` package 1.5.5 (PyPI), an independent implementation of IAPWS-95.
* Cantera 3.2.0 (PyPI) with its bundled ``air.yaml`` (NASA 7-coefficient polynomials), an
  independent ideal-gas model of air.
* Closed-form ideal-gas relations with constant specific heats (common practice).

Besides the outside world, the API must agree with ``joulebook.call`` (the cell path): it is
the same core, so the two agree to the last few bits.
"""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
import pytest
from iapws import IAPWS95

import joulebook
from joulebook import Q_, State
from joulebook.core.errors import BadInput, OutOfRange
from refcheck import check

IAPWS = "iapws 1.5.5 (PyPI), independent IAPWS-95 implementation"
CANTERA = "Cantera 3.2.0 air.yaml (NASA polynomials), independent ideal-gas air"


# ---------------------------------------------------------------------------------------
# the package stays light


def test_import_is_light_and_the_api_is_lazy():
    code = (
        "import sys, joulebook; assert 'pint' not in sys.modules; "
        "S = joulebook.State; assert 'pint' not in sys.modules and 'CoolProp' not in sys.modules; "
        "joulebook.Q_(1, 'bar'); assert 'pint' in sys.modules; print('ok')"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "ok"


def test_one_registry():
    from joulebook.core.units import registry

    assert Q_(1, "bar")._REGISTRY is registry()
    assert State("water", T=300, P=1e5).h._REGISTRY is registry()
    assert joulebook.registry() is registry()


# ---------------------------------------------------------------------------------------
# states against the outside world


@pytest.mark.parametrize("T_C, P_bar", [(25, 2), (150, 10), (400, 50)])
def test_state_against_iapws(T_C, P_bar):
    st = State("water", T=Q_(T_C, "degC"), P=Q_(P_bar, "bar"))
    ref = IAPWS95(T=T_C + 273.15, P=P_bar / 10)
    cond = f"T = {T_C} degC, P = {P_bar} bar (joulebook.State)"
    check(st.h.to("kJ/kg").magnitude, ref.h, rtol=1e-6, quantity="h", conditions=cond, source=IAPWS)
    check(
        st.s.to("kJ/(kg*K)").magnitude,
        ref.s,
        rtol=1e-6,
        quantity="s",
        conditions=cond,
        source=IAPWS,
    )
    check(
        st.cp.to("kJ/(kg*K)").magnitude, ref.cp, rtol=1e-6, quantity="cp", conditions=cond,
        source=IAPWS,
    )  # fmt: skip
    check(st.rho.to("kg/m**3").magnitude, ref.rho, rtol=1e-7, quantity="rho", conditions=cond,
          source=IAPWS)  # fmt: skip


def test_saturated_array_against_iapws():
    T = Q_(np.array([50.0, 100.0, 200.0]), "degC")
    st = State("water", T=T, x=1)
    P = st.P.to("MPa").magnitude
    assert P.shape == (3,)
    for i, t in enumerate([50.0, 100.0, 200.0]):
        ref = IAPWS95(T=t + 273.15, x=1.0)
        check(P[i], ref.P, rtol=1e-6, quantity="Psat", conditions=f"T = {t} degC (State array)",
              source=IAPWS)  # fmt: skip


# ---------------------------------------------------------------------------------------
# the three scenarios of a notebook, each in a dozen lines


def test_blocked_in_line_against_iapws():
    # liquid water trapped at 15 degC, 4 bar in a rigid line, warmed by the sun
    line = State("water", T=Q_(15, "degC"), P=Q_(4, "bar"))
    T2 = Q_(np.linspace(20, 45, 6), "degC")
    P2 = joulebook.blocked_in_p2(line, T2)
    # a rigid container keeps the density: P2 = P(T2, rho1) on IAPWS-95 (iapws 1.5.5)
    rho1 = IAPWS95(T=288.15, P=0.4).rho
    for t, p in zip(T2.to("K").magnitude, P2.to("MPa").magnitude):
        ref = IAPWS95(T=float(t), rho=rho1).P
        check(p, ref, rtol=1e-5, quantity="P2 blocked-in (rigid)",
              conditions=f"water 15 degC, 4 bar -> {t - 273.15:.0f} degC", source=IAPWS)  # fmt: skip
    # the steel pipe stretches: below the rigid bound, still far above the start
    steel = joulebook.blocked_in_p2(
        line, Q_(45, "degC"), shape="cylinder", D=Q_(100, "mm"), wall=Q_(5, "mm"),
        E=Q_(200, "GPa"), nu=0.3, alpha_wall=Q_(1.2e-5, "1/K"),
    )  # fmt: skip
    assert 4e5 < steel.to("Pa").magnitude < P2[-1].to("Pa").magnitude


def test_boiling_pot_against_iapws():
    # 2 kg of water at 20 degC in a pot at 1 atm, brought to the boil and half boiled off
    pot = State("water", T=Q_(20, "degC"), P=Q_(1, "atm"), m=Q_(2, "kg"))
    r = pot.isobaric(x2=0.5)
    assert r.end.phase == "saturated mixture"
    ref1 = IAPWS95(T=293.15, P=0.101325)
    ref2 = IAPWS95(P=0.101325, x=0.5)
    cond = "2 kg water, 20 degC -> x = 0.5 at 1 atm"
    check(r.Q.to("kJ").magnitude, 2 * (ref2.h - ref1.h), rtol=1e-5, quantity="Q (isobaric)",
          conditions=cond, source=IAPWS)  # fmt: skip
    check(r.T2.to("K").magnitude, ref2.T, rtol=1e-7, quantity="T2", conditions=cond, source=IAPWS)
    # the first law closes: Q - W = dU, and at constant P, Q = dH
    assert r.Q.magnitude - r.W.magnitude == pytest.approx(r.dU.magnitude, rel=1e-12)
    assert r.Q.magnitude == pytest.approx(r.dH.magnitude, rel=1e-9)


def test_polytropic_compression_closed_form():
    # air with constant k = 1.4 compressed from 1 bar, 300 K, 1 L to 10 bar along n = 1.3
    gas = State("air | k = 1.4", T=Q_(300, "K"), P=Q_(1, "bar"), V=Q_(1, "L"))
    r = gas.polytropic(1.3, P2=Q_(10, "bar"))
    # closed forms (common practice): T2 = T1 (P2/P1)^((n-1)/n), W = (P1V1 - P2V2)/(n - 1)
    T2 = 300 * 10 ** (0.3 / 1.3)
    V2 = 1e-3 * 0.1 ** (1 / 1.3)
    assert r.T2.to("K").magnitude == pytest.approx(T2, rel=1e-9)
    assert r.V2.to("m**3").magnitude == pytest.approx(V2, rel=1e-9)
    assert r.W.to("J").magnitude == pytest.approx((1e5 * 1e-3 - 1e6 * V2) / 0.3, rel=1e-9)
    # Q = W + m cv dT with cv = R/(k - 1)
    m = gas.m.magnitude
    R = 8.314462618 / 28.96546e-3  # the gas's R from its molar mass; compared loosely below
    Q = r.W.magnitude + m * R / 0.4 * (T2 - 300)
    assert r.Q.magnitude == pytest.approx(Q, rel=2e-3)


def test_polytropic_compression_against_cantera():
    import cantera as ct

    gas = State("air (ideal gas)", T=Q_(300, "K"), P=Q_(1, "bar"), m=Q_(1, "kg"))
    r = gas.polytropic(1.3, P2=Q_(10, "bar"))
    air = ct.Solution("air.yaml")
    air.TPX = 300.0, 1e5, "O2:0.21, N2:0.78, AR:0.01"
    u1 = air.int_energy_mass
    air.TP = r.T2.to("K").magnitude, 1e6
    du = air.int_energy_mass - u1
    check(r.dU.to("kJ").magnitude, du / 1e3, rtol=3e-3, quantity="dU (polytropic n = 1.3)",
          conditions="1 kg air 300 K, 1 -> 10 bar", source=CANTERA)  # fmt: skip


# ---------------------------------------------------------------------------------------
# the API and the cell path agree


@pytest.mark.parametrize("want", ["h", "s", "u", "v", "rho", "cp", "cv", "w", "beta", "mu"])
def test_prop_agrees_with_call(want):
    st = State("water", T=Q_(80, "degC"), P=Q_(3, "bar"))
    ours = st.prop(want).magnitude
    cell = joulebook.call("JB_PROP", "water", want, "T in degC", 80, "P in bar", 3, "K-Pa-J")
    assert ours == pytest.approx(cell, rel=1e-12)


def test_phase_and_text_agree_with_call():
    st = State("R134a", T=Q_(-10, "degC"), x=0.3)
    assert st.phase == joulebook.call("JB_PHASE", "R134a", "T in degC", -10, "x", 0.3)
    again = State.from_text(st.text)
    assert again.h.magnitude == pytest.approx(st.h.magnitude, rel=1e-14)


@pytest.mark.parametrize(
    "substance, path, method, kw, end_spec, end_value",
    [
        ("water", "rigid", "rigid", {}, "T2 in K", 330.0),
        ("air (ideal gas)", "isobaric", "isobaric", {}, "T2 in K", 500.0),
        ("air (ideal gas)", "polytropic n = 1.25", "polytropic", {"n": 1.25}, "P2 in Pa", 6e5),
        ("nitrogen", "isothermal", "isothermal", {}, "V2 in m3", 2e-3),
        ("R134a", "isentropic", "isentropic", {}, "P2 in Pa", 1.2e6),
        ("air (ideal gas)", "linear slope = 2e8 Pa/m3", "linear", {"slope": 2e8}, "Q in J", 500.0),
        ("water", "isobaric", "isobaric", {}, "Q in J", 5e5),
        ("air (ideal gas)", "stops P = 300000 Pa", "stops", {"P_lift": 3e5}, "T2 in K", 1200.0),
    ],
)
def test_process_agrees_with_call(substance, path, method, kw, end_spec, end_value):
    T1, P1 = (300.0, 4e5) if substance == "R134a" else (300.0, 1e5)
    if substance == "R134a":
        st = State(substance, T=T1 + 20, P=P1, m=0.5)
    else:
        st = State(substance, T=T1, P=P1, m=0.5)
    end_key = end_spec.split()[0]
    r = getattr(st, method)(**kw, **{end_key: end_value})
    text = joulebook.call("JB_STATE", st.substance, "T in K", st.T.magnitude, "P in Pa",
                          st.P.magnitude, "K-Pa-J")  # fmt: skip
    for want, ours in (("W", r.W), ("Q", r.Q), ("dU", r.dU), ("dH", r.dH), ("T2", r.T2)):
        unit = "K" if want == "T2" else "J"
        cell = joulebook.call(
            "JB_PROCESS", text, path, end_spec, end_value, f"{want} in {unit}", 0.5
        )
        assert ours.magnitude == pytest.approx(cell, rel=1e-9, abs=1e-9), want


def test_blocked_in_agrees_with_call():
    line = State("water", T=Q_(15, "degC"), P=Q_(4, "bar"))
    ours = joulebook.blocked_in_p2(line, 318.15)
    cell = joulebook.call("JB_BLOCKED_IN_P2", "water | T = 15 degC | P = 4 bar", 318.15)
    assert ours.to("kPa").magnitude == pytest.approx(cell, rel=1e-9)


def test_work_helpers_agree_with_call():
    assert joulebook.work_isobaric(Q_(2, "bar"), Q_(1, "L"), Q_(3, "L")).to(
        "kJ"
    ).magnitude == pytest.approx(joulebook.call("JB_WORK_ISOBARIC", 200, 0.001, 0.003))
    assert joulebook.work_polytropic(Q_(1, "bar"), Q_(1, "L"), Q_(0.5, "L"), 1.3).to(
        "kJ"
    ).magnitude == pytest.approx(joulebook.call("JB_WORK_POLYTROPIC_N", 100, 0.001, 0.0005, 1.3))
    assert joulebook.heat(Q_(10, "kJ"), Q_(2, "kJ"), Q_(-3, "kJ")).to(
        "kJ"
    ).magnitude == pytest.approx(joulebook.call("JB_BALANCE_HEAT", 10, 2, -3))


# ---------------------------------------------------------------------------------------
# numbers, arrays, Series


def test_plain_si_numbers_equal_quantities():
    a = State("water", T=298.15, P=2e5)
    b = State("water", T=Q_(25, "degC"), P=Q_(200, "kPa"))
    assert a.h.magnitude == pytest.approx(b.h.magnitude, rel=1e-14)


def test_arrays_broadcast_like_columns():
    T = Q_(np.array([[20.0], [60.0]]), "degC")
    P = Q_(np.array([1.0, 5.0, 20.0]), "bar")
    st = State("water", T=T, P=P)
    h = st.h.magnitude
    assert h.shape == (2, 3)
    for i, t in enumerate([20.0, 60.0]):
        for j, p in enumerate([1.0, 5.0, 20.0]):
            one = State("water", T=Q_(t, "degC"), P=Q_(p, "bar")).h.magnitude
            assert h[i, j] == one
    W = joulebook.work_isobaric(Q_([1, 2], "bar"), Q_(1, "L"), Q_(2, "L"))
    assert W.magnitude.tolist() == pytest.approx([100.0, 200.0])


def test_process_over_an_array_of_end_values():
    st = State("water", T=Q_(20, "degC"), P=Q_(1, "bar"), m=Q_(1, "kg"))
    r = st.rigid(T2=Q_([25.0, 30.0], "degC"))
    for i, t in enumerate([25.0, 30.0]):
        one = st.rigid(T2=Q_(t, "degC"))
        assert r.P2.magnitude[i] == pytest.approx(one.P2.magnitude, rel=1e-12)
        assert r.Q.magnitude[i] == pytest.approx(one.Q.magnitude, rel=1e-12)


def test_pandas_series_taken_as_values():
    import pandas as pd

    T = pd.Series([20.0, 40.0, 60.0], index=["a", "b", "c"])
    st = State("water", T=Q_(T, "degC"), P=Q_(1, "bar"))
    rho = pd.Series(st.rho.to("kg/m**3").magnitude, index=T.index)
    assert rho["b"] == pytest.approx(State("water", T=313.15, P=1e5).rho.magnitude, rel=1e-12)
    si = State("water", T=T + 273.15, P=1e5)  # a Series of plain SI numbers
    assert si.rho.magnitude.tolist() == pytest.approx(rho.tolist(), rel=1e-12)


# ---------------------------------------------------------------------------------------
# errors are the project's


def test_errors_are_project_errors():
    with pytest.raises(BadInput, match="exactly two"):
        State("water", T=300, P=1e5, h=1e5)
    with pytest.raises(BadInput, match="T = .* is not a temperature"):
        State("water", T=Q_(3, "bar"), P=1e5)
    with pytest.raises(BadInput, match="unknown"):
        State("unobtainium", T=300, P=1e5)
    with pytest.raises(BadInput, match="not a finite"):
        State("water", T=math.nan, P=1e5)
    with pytest.raises(OutOfRange, match="at index \\(1,\\)"):
        State("water", T=Q_([300, 5000], "K"), P=1e5)
    st = State("water", T=Q_(150, "degC"), P=Q_(1, "bar"))
    with pytest.raises(OutOfRange, match="quality"):
        st.x  # noqa: B018 - reading the property is the test
    with pytest.raises(BadInput, match="no mass"):
        st.rigid(T2=500)
    with pytest.raises(BadInput, match="exactly one end condition"):
        st.rigid(T2=500, P2=1e6, m=1)
    with pytest.raises(BadInput, match="unknown unit"):
        Q_(1, "blorbs")
    with pytest.raises(BadInput, match="m or the volume V"):
        State("water", T=300, P=1e5, m=1, V=1)
