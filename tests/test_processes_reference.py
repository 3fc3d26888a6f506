"""End-state solver, first-law closure, cycles and stored energy.

Sources
-------
* The `iapws` package 1.5.5 (PyPI), an independent IAPWS-95 implementation, for the water
  and steam processes.
* NASA TM-4513 polynomials as carried by Cantera 3.2.0 (``nasa_gas.yaml``) for air with
  temperature-dependent c_p, built with the composition of the air equation of state.
* Analytic identities of the ideal gas with constant c_p (common practice).
"""

import math

import cantera as ct
import numpy as np
import pytest
from iapws import IAPWS95

from joulebook.core.errors import BadInput, OutOfRange
from refcheck import check

IAPWS = "iapws 1.5.5 (PyPI), independent IAPWS-95 implementation"
NASA_SRC = "NASA TM-4513 polynomials via Cantera 3.2.0 (nasa_gas.yaml)"

WANTS = ("W", "Q", "dU")


def _energy(call, state, path, end, value, mass):
    return {w: call("JB_PROCESS", state, path, end, value, f"{w} in J", mass) for w in WANTS}


def test_rigid_liquid_water_heated_pressure_from_the_equation_of_state(call):
    # trapped liquid: 20 °C, 1 bar, heated at constant volume to 40 °C
    s1 = "water | T = 20 degC | P = 1 bar"
    P2 = call("JB_PROCESS", s1, "rigid", "T2 in degC", 40, "P2 in MPa", 3.0)
    rho1 = IAPWS95(T=293.15, P=0.1).rho  # iapws 1.5.5
    ref = IAPWS95(T=313.15, rho=rho1)
    check(
        P2,
        ref.P,
        rtol=1e-6,
        quantity="P2 [MPa]",
        conditions="3 kg water 20 °C, 1 bar, rigid, heated to 40 °C",
        source=IAPWS,
    )
    assert P2 > 10  # over a hundred bar from a 20 K rise: never an ideal-gas answer
    Q = call("JB_PROCESS", s1, "rigid", "T2 in degC", 40, "Q in kJ", 3.0)
    check(
        Q,
        3.0 * (ref.u - IAPWS95(T=293.15, P=0.1).u),
        rtol=1e-6,
        quantity="Q [kJ]",
        conditions="3 kg water 20 °C, 1 bar, rigid, heated to 40 °C",
        source=IAPWS,
    )


def test_wet_steam_heated_in_a_sealed_vessel(call):
    s1 = "water | P = 2 bar | x = 0.1"
    T2 = call("JB_PROCESS", s1, "rigid", "P2 in bar", 10, "T2 in K", 1)
    x2 = call("JB_PROCESS", s1, "rigid", "P2 in bar", 10, "x2", 1)
    v1 = IAPWS95(P=0.2, x=0.1).v
    ref = IAPWS95(P=1.0, v=v1)  # iapws 1.5.5
    cond = "water 2 bar, x = 0.1, rigid, heated to 10 bar"
    check(T2, ref.T, rtol=1e-6, quantity="T2 [K]", conditions=cond, source=IAPWS)
    check(x2, ref.x, rtol=1e-5, quantity="x2 [-]", conditions=cond, source=IAPWS)


def test_boiling_at_constant_pressure(call):
    # 2 kg of saturated liquid at 5 bar boiled to saturated vapor: Q = m·h_fg, W = m·P·(v_g − v_f)
    s1 = "water | P = 5 bar | x = 0"
    f, g = IAPWS95(P=0.5, x=0), IAPWS95(P=0.5, x=1)  # iapws 1.5.5
    e = _energy(call, s1, "isobaric", "x2", 1, 2)
    cond = "2 kg saturated liquid water at 5 bar boiled at constant pressure to x = 1"
    check(
        e["Q"],
        2 * (g.h - f.h) * 1e3,
        rtol=1e-6,
        quantity="Q = m·h_fg [J]",
        conditions=cond,
        source=IAPWS,
    )
    check(
        e["W"],
        2 * 0.5e6 * (g.v - f.v),
        rtol=1e-6,
        quantity="W = m·P·(v_g − v_f) [J]",
        conditions=cond,
        source=IAPWS,
    )
    assert e["Q"] - e["W"] == pytest.approx(e["dU"], rel=1e-12)


def test_isentropic_expansion_of_steam(call):
    s1 = "water | P = 3 MPa | T = 400 degC"
    one = IAPWS95(P=3.0, T=673.15)
    two = IAPWS95(P=0.1, s=one.s)  # iapws 1.5.5
    x2 = call("JB_PROCESS", s1, "isentropic", "P2 in kPa", 100, "x2", 1)
    W = call("JB_PROCESS", s1, "isentropic", "P2 in kPa", 100, "W in kJ", 1)
    cond = "1 kg steam 3 MPa, 400 °C, isentropic to 100 kPa"
    check(x2, two.x, rtol=1e-5, quantity="x2 [-]", conditions=cond, source=IAPWS)
    check(W, one.u - two.u, rtol=1e-6, quantity="W [kJ]", conditions=cond, source=IAPWS)
    assert call("JB_PROCESS", s1, "isentropic", "P2 in kPa", 100, "Q", 1) == 0.0


def test_real_fluid_isothermal_work_is_the_integral_across_the_dome(call):
    # water at 150 °C from compressed liquid (1 MPa) to vapor at 0.2 MPa: the isotherm crosses
    # the dome; W = ∫P dv must equal the path work computed from T·Δs − Δu
    s1 = "water | T = 150 degC | P = 1 MPa"
    v2 = call("JB_PROP", "water", "v", "T in degC", 150, "P in MPa", 0.2)
    W = call("JB_WORK_PATH", s1, "isothermal", "v2 in m3/kg", v2, 1, "K-Pa-J")
    v1 = call("JB_PROP", s1, "v")
    v = np.geomspace(v1, v2, 200_001)
    P = np.array(
        call("JB_PROP", "water", "P in Pa", "T in degC", 150, "v in m3/kg", v.reshape(-1, 1)),
        dtype=float,
    )[:, 0]
    assert W == pytest.approx(np.trapezoid(P, v), rel=1e-6)


def test_polytropic_real_fluid_work_is_the_path_integral(call):
    s1 = "CO2 | T = 40 degC | P = 5 MPa"
    n = 1.25
    W = call("JB_WORK_PATH", s1, f"polytropic n = {n}", "P2 in MPa", 1.0, 1, "K-Pa-J")
    P1, v1 = 5e6, call("JB_PROP", s1, "v")
    v2 = v1 * (5.0 / 1.0) ** (1 / n)
    assert W == pytest.approx((1e6 * v2 - P1 * v1) / (1 - n), rel=1e-10)


def _nasa_air():
    nasa = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}
    g = ct.Solution(thermo="ideal-gas", species=[nasa["N2"], nasa["O2"], nasa["Ar"]])
    g.TPX = 300.0, 101325.0, {"N2": 0.7812, "O2": 0.2096, "Ar": 0.0092}
    return g


def test_ideal_gas_rigid_heating_with_variable_cp_against_nasa(call):
    g = _nasa_air()  # Cantera 3.2.0, NASA TM-4513
    u1 = g.int_energy_mass
    g.TD = 900.0, g.density
    Q = call(
        "JB_PROCESS",
        "air (ideal gas) | T = 300 K | P = 1 bar",
        "rigid",
        "T2 in K",
        900,
        "Q in J",
        1,
    )
    check(
        Q,
        g.int_energy_mass - u1,
        rtol=2e-3,
        quantity="Q = Δu [J/kg]",
        conditions="air ideal gas, rigid, 300 K → 900 K",
        source=NASA_SRC,
    )


def test_ideal_gas_isentropic_compression_with_variable_cp_against_nasa(call):
    g = _nasa_air()  # Cantera 3.2.0, NASA TM-4513
    s1 = g.entropy_mass
    g.SP = s1, 2.0e6
    T2 = call(
        "JB_PROCESS",
        "air (ideal gas) | T = 300 K | P = 101.325 kPa",
        "isentropic",
        "P2 in MPa",
        2.0,
        "T2 in K",
        1,
    )
    check(
        T2,
        g.T,
        rtol=1e-3,
        quantity="T2 [K]",
        conditions="air ideal gas, isentropic 101.325 kPa, 300 K → 2 MPa",
        source=NASA_SRC,
    )


def test_ideal_gas_isentropic_has_n_equal_k_for_constant_cp(call):
    s1 = "air | k = 1.4 | T = 300 K | P = 100 kPa"
    V1 = call("JB_PROP", s1, "v")
    P2 = call("JB_PROCESS", s1, "isentropic", "v2 in m3/kg", V1 / 8, "P2 in kPa", 1)
    assert call("JB_POLY_EXPONENT", 100, V1, P2, V1 / 8) == pytest.approx(1.4, rel=1e-9)


@pytest.mark.parametrize(
    "state, path, end, value",
    [
        ("water | T = 20 degC | P = 1 bar", "rigid", "T2 in degC", 80),
        ("water | P = 2 bar | x = 0.3", "rigid", "Q in kJ", 800),
        ("water | P = 5 bar | x = 0", "isobaric", "Q in kJ", 1500),
        ("water | P = 5 bar | T = 200 degC", "isobaric", "W in kJ", 30),
        ("water | T = 150 degC | P = 1 MPa", "isothermal", "Q in kJ", 900),
        ("water | T = 150 degC | x = 0.2", "isothermal", "W in kJ", 50),
        ("water | P = 3 MPa | T = 400 degC", "isentropic", "W in kJ", 400),
        ("R134a | T = 20 degC | P = 3 bar", "polytropic n = 1.1", "Q in kJ", 6),
        ("R134a | T = 20 degC | P = 3 bar", "polytropic n = 1.1", "W in kJ", -15),
        ("nitrogen | T = 300 K | P = 100 kPa", "linear slope = 400 kPa/m3", "T2 in K", 600),
        ("nitrogen | T = 300 K | P = 100 kPa", "linear slope = 400 kPa/m3", "Q in kJ", 300),
        ("water | T = 25 degC | x = 0.0005", "stops P = 300 kPa", "Q in kJ", 1200),
        ("water | T = 25 degC | x = 0.0005", "stops P = 300 kPa", "Q in kJ", 20),
        ("water | T = 200 degC | P = 5 bar", "stops V = 0.2 m3", "Q in kJ", -1500),
        ("air (ideal gas) | T = 300 K | P = 100 kPa", "polytropic n = 1.3", "Q in kJ", 40),
        ("air | k = 1.4 | T = 300 K | P = 100 kPa", "isothermal", "W in kJ", -80),
    ],
)
def test_every_solved_process_closes_the_first_law(call, state, path, end, value):
    e = _energy(call, state, path, end, value, 1.0)
    scale = max(abs(e["Q"]), abs(e["W"]), abs(e["dU"]), 1.0)
    assert abs(e["Q"] - e["W"] - e["dU"]) <= 1e-9 * scale
    target = call(
        "JB_PROCESS",
        state,
        path,
        end,
        value,
        end.split(" in ")[0] + " in " + end.split(" in ")[1] if " in " in end else end,
        1.0,
    )
    assert target == pytest.approx(value, rel=1e-9, abs=1e-9)


def test_piston_on_stops_heating(call):
    # 1 kg of wet water at 25 °C under a piston that needs 300 kPa to lift: it lifts once
    # the rigid heating has brought the pressure to 300 kPa
    s1 = "water | T = 25 degC | x = 0.0005"
    q_lift = call("JB_PROCESS", s1, "rigid", "P2 in kPa", 300, "Q in kJ", 1)
    table = {
        r[0]: r[1]
        for r in call("JB_PROCESS_TABLE", s1, "stops P = 300 kPa", "Q in kJ", q_lift + 800, 1)
    }
    assert table["P2"] == pytest.approx(300.0)
    vA = call("JB_PROP", s1, "v")
    assert table["W"] == pytest.approx(300.0 * (table["v2"] - vA), rel=1e-9)
    assert table["Q"] == pytest.approx(q_lift + 800, rel=1e-9)
    # a small heat never lifts the piston: rigid, no work
    small = {
        r[0]: r[1] for r in call("JB_PROCESS_TABLE", s1, "stops P = 300 kPa", "Q in kJ", 20, 1)
    }
    assert small["W"] == 0.0 and small["P2"] < 300


def test_piston_landing_on_stops_when_cooled(call):
    s1 = "water | T = 200 degC | P = 5 bar"
    m = 1.0
    V1 = call("JB_PROP", s1, "v") * m
    t = {r[0]: r[1] for r in call("JB_PROCESS_TABLE", s1, "stops V = 0.2 m3", "Q in kJ", -1500, m)}
    assert t["V2"] == pytest.approx(0.2, rel=1e-12)
    assert t["W"] == pytest.approx(500.0 * (0.2 - V1), rel=1e-9)
    assert t["P2"] < 500.0


def test_otto_like_air_standard_cycle_closes_and_matches_the_constant_k_efficiency(call):
    gas = "air | k = 1.4"
    s1 = f"{gas} | T = 300 K | P = 100 kPa"
    v1 = call("JB_PROP", s1, "v")
    r = 8.0
    W12 = call("JB_PROCESS", s1, "isentropic", "v2 in m3/kg", v1 / r, "W", 1)
    T2 = call("JB_PROCESS", s1, "isentropic", "v2 in m3/kg", v1 / r, "T2", 1)
    s2 = call("JB_STATE", gas, "T in K", T2, "v in m3/kg", v1 / r)
    Q23 = call("JB_PROCESS", s2, "rigid", "T2 in K", 1800, "Q", 1)
    s3 = call("JB_STATE", gas, "T in K", 1800, "v in m3/kg", v1 / r)
    W34 = call("JB_PROCESS", s3, "isentropic", "v2 in m3/kg", v1, "W", 1)
    T4 = call("JB_PROCESS", s3, "isentropic", "v2 in m3/kg", v1, "T2", 1)
    s4 = call("JB_STATE", gas, "T in K", T4, "v in m3/kg", v1)
    Q41 = call("JB_PROCESS", s4, "rigid", "T2 in K", 300, "Q", 1)
    Q = [[0.0], [Q23], [0.0], [Q41]]
    W = [[W12], [0.0], [W34], [0.0]]
    assert abs(call("JB_CYCLE_GAP", Q, W)) <= 1e-9 * Q23
    # constant-k air-standard cycle: η = 1 − r^(1−k) (common practice, analytic)
    assert call("JB_CYCLE_EFFICIENCY", Q, W) == pytest.approx(1 - r ** (1 - 1.4), rel=1e-9)
    with pytest.raises(OutOfRange, match="does not close"):
        call("JB_CYCLE_EFFICIENCY", [[100], [-50]], [[10], [0]])


def test_path_points_lie_on_the_path(call):
    s1 = "air (ideal gas) | T = 300 K | P = 100 kPa"
    rows = call("JB_PROCESS_PATH", s1, "polytropic n = 1.3", "V2 in m3", 0.1, 11, 1)
    assert rows[0][0].startswith("V in") and len(rows) == 12
    V = np.array([r[0] for r in rows[1:]])
    P = np.array([r[1] for r in rows[1:]])
    assert np.allclose(P * V**1.3, P[0] * V[0] ** 1.3, rtol=1e-9)
    assert V[-1] == pytest.approx(0.1)
    two = call(
        "JB_PROCESS_PATH",
        "water | T = 25 degC | x = 0.0005",
        "stops P = 300 kPa",
        "Q in kJ",
        1200,
        10,
        1,
    )
    P2 = [r[1] for r in two[1:]]
    assert P2[-1] == pytest.approx(300.0) and min(P2) < 300.0


def test_stored_energy_forms(call):
    # an ideal gas with constant k: the equation-of-state route equals the closed form exactly
    e_state = call("JB_STORED_ISENTROPIC", "nitrogen | k = 1.4 | P = 3000 kPa | T = 293.15 K", 2.5)
    assert e_state == pytest.approx(call("JB_STORED_IDEAL_ISENTROPIC", 3000, 2.5, 1.4), rel=1e-9)
    # the constant-volume release is the largest (common practice)
    assert call("JB_STORED_ISOCHORIC", 3000, 2.5, 1.4) > e_state
    # real nitrogen at 30 bar and 20 °C is close to ideal: within 10 % of the ideal form
    real = call("JB_STORED_ISENTROPIC", "nitrogen | P = 3000 kPa | T = 293.15 K", 2.5)
    assert real == pytest.approx(e_state, rel=0.1)
    with pytest.raises(OutOfRange, match="not above ambient"):
        call("JB_STORED_ISOCHORIC", 100, 2.5, 1.4)


def test_process_errors_are_clear(call):
    s1 = "water | T = 20 degC | P = 1 bar"
    with pytest.raises(BadInput, match="keeps P constant"):
        call("JB_PROCESS", s1, "isobaric", "P2 in bar", 3, "T2", 1)
    with pytest.raises(BadInput, match="no boundary work"):
        call("JB_PROCESS", s1, "rigid", "W in kJ", 3, "T2", 1)
    with pytest.raises(BadInput, match="use one of"):
        call("JB_PROCESS", s1, "adiabaticish", "T2 in K", 300, "P2", 1)
    with pytest.raises(BadInput, match="needs n"):
        call("JB_PROCESS", s1, "polytropic", "T2 in K", 300, "P2", 1)
    with pytest.raises(BadInput, match="state text"):
        call("JB_PROCESS", "water", "rigid", "T2 in K", 300, "P2", 1)
    with pytest.raises(BadInput, match="no quality"):
        call("JB_PROCESS", "air (ideal gas) | T = 300 K | P = 1 bar", "rigid", "x2", 0.5, "P2", 1)
    with pytest.raises(BadInput, match="already lifts"):
        call("JB_PROCESS", s1, "stops P = 0.5 bar", "Q in kJ", 10, "P2", 1)


def test_mass_scales_extensive_results(call):
    s1 = "water | P = 5 bar | x = 0"
    q1 = call("JB_PROCESS", s1, "isobaric", "x2", 1, "Q in kJ", 1)
    q3 = call("JB_PROCESS", s1, "isobaric", "x2", 1, "Q in kJ", 3)
    assert q3 == pytest.approx(3 * q1, rel=1e-12)
    assert call("JB_PROCESS", s1, "isobaric", "x2", 1, "Q in kJ") == pytest.approx(
        q1
    )  # default 1 kg


def test_heat_sign_convention(call):
    s1 = "air (ideal gas) | T = 300 K | P = 100 kPa"
    assert call("JB_PROCESS", s1, "rigid", "T2 in K", 400, "Q", 1) > 0  # heated: heat in
    assert call("JB_PROCESS", s1, "rigid", "T2 in K", 250, "Q", 1) < 0  # cooled: heat out
    assert math.isclose(
        call("JB_PROCESS", s1, "isothermal", "P2 in kPa", 50, "Q", 1),
        call("JB_PROCESS", s1, "isothermal", "P2 in kPa", 50, "W", 1),
        rel_tol=1e-9,
    )
