"""The engineer's daily cases: expansion properties, blocked-in liquid in an elastic pipe,
heating with time, fire exposure, pressure tests and indicator diagrams.

Every check names its source: the independent library iapws 1.5.5 (IAPWS-95), hand
derivations written beside the check, or a published formula named with "from memory" where
it is recalled.
"""

import math

import pytest

from joulebook import call
from joulebook.core.errors import BadInput, OutOfRange
from refcheck import check

IAPWS = "iapws 1.5.5 (PyPI), independent IAPWS-95 implementation"


@pytest.mark.parametrize("T, P", [(298.15, 0.101325), (600.0, 20.0), (350.0, 50.0)])
def test_expansion_properties_of_water(T, P):
    from iapws import IAPWS95

    ref = IAPWS95(T=T, P=P)
    cond = f"water, T = {T} K, P = {P} MPa"
    args = ("T in K", T, "P in MPa", P)
    check(call("JB_PROP", "water", "beta in 1/K", *args), ref.alfav, rtol=1e-6,
          quantity="beta [1/K]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "kappa in 1/MPa", *args), ref.kappa, rtol=1e-6,
          quantity="kappa [1/MPa]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "w in m/s", *args), ref.w, rtol=1e-6,
          quantity="w [m/s]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "mu_JT in K/MPa", *args), ref.joule, rtol=1e-5,
          quantity="mu_JT [K/MPa]", conditions=cond, source=IAPWS)  # fmt: skip


def test_expansion_properties_of_an_ideal_gas_and_refusals():
    # hand: ideal gas β = 1/T, κ = 1/P, w = √(kRT), μ_JT = 0
    g = ("air | k = 1.4 | M = 28.97", "T in K", 300, "P in kPa", 100)
    assert call("JB_PROP", g[0], "beta in 1/K", *g[1:]) == pytest.approx(1 / 300)
    assert call("JB_PROP", g[0], "kappa in 1/kPa", *g[1:]) == pytest.approx(0.01)
    R = 8314.462618 / 28.97
    assert call("JB_PROP", g[0], "w in m/s", *g[1:]) == pytest.approx(math.sqrt(1.4 * R * 300))
    assert call("JB_PROP", g[0], "mu_JT", *g[1:]) == 0.0
    with pytest.raises(OutOfRange, match="two-phase"):
        call("JB_PROP", "water", "beta", "T in degC", 100, "x", 0.5)


def test_blocked_in_pipe_rigid_and_elastic_against_an_independent_equation_of_state():
    """Water blocked in at 15 °C and 4 bar, warmed to 45 °C: the end pressure must make the
    liquid fill the container.  Hand (thin wall, closed cylinder): c = D(5 − 4ν)/(4tE);
    V2/V1 = (1 + αΔT)³·(1 + c·ΔP).  The liquid volumes come from iapws 1.5.5."""
    from iapws import IAPWS95

    s1 = "water | T = 15 degC | P = 4 bar"
    rigid = call("JB_BLOCKED_IN_P2", s1, 45, "rigid", *[None] * 5, "degC-bar-kJ")
    D, t, E, nu, a = 0.1, 0.005, 200.0, 0.3, 1.2e-5
    elastic = call("JB_BLOCKED_IN_P2", s1, 45, "cylinder", D, t, E, nu, a, "degC-bar-kJ")
    v1 = 1 / IAPWS95(T=288.15, P=0.4).rho
    c = D * (5 - 4 * nu) / (4 * t * E * 1e9)  # 1/Pa
    for P2, c_, a_ in ((rigid, 0.0, 0.0), (elastic, c, a)):
        v2 = 1 / IAPWS95(T=318.15, P=P2 / 10).rho
        want = v1 * (1 + a_ * 30) ** 3 * (1 + c_ * (P2 - 4) * 1e5)
        check(v2, want, rtol=1e-9, quantity="v2 = v1·V2/V1 [m3/kg]",
              conditions=f"blocked-in water 15→45 °C, P2 = {P2:.3f} bar", source=IAPWS)  # fmt: skip
    assert 150 < elastic < 156 < 210 < rigid < 214  # the stretch takes about a quarter off


@pytest.mark.parametrize(
    "args, words",
    [
        (("cylinder", 0.1, 0.06, 200, 0.3, 1.2e-5), ["wall = 0.06", "below the radius"]),
        (("cylinder", 0.1, 0.005, 200, 0.6, 1.2e-5), ["poisson = 0.6", "0 ≤ ν < 0.5"]),
        (("cylinder", 0.1, 0.005, 200), ["needs poisson"]),
        (("rigid", 0.1), ["takes no wall data"]),
        (("cone", 0.1, 0.005, 200, 0.3), ["cylinder", "sphere"]),
    ],
)
def test_blocked_in_bad_wall_data(args, words):
    with pytest.raises(BadInput) as e:
        padded = [*args, *[None] * (6 - len(args))]  # the unit system is the last argument
        call("JB_BLOCKED_IN_P2", "water | T = 15 degC | P = 4 bar", 45, *padded, "degC-bar-kJ")
    for w in words:
        assert w in str(e.value)


def test_thermal_relief_flow():
    # hand: q = β·Q/(ρ·cp) with β, ρ, cp of water at 45 °C, 20 bar from iapws 1.5.5
    from iapws import IAPWS95

    w = IAPWS95(T=318.15, P=2.0)
    q = call("JB_RELIEF_THERMAL_FLOW", "water | T = 45 degC | P = 20 bar", 10, "K-Pa-J, Pow=kW")
    check(q, w.alfav * 10e3 / (w.rho * w.cp * 1e3), rtol=1e-6, quantity="q [m3/s]",
          conditions="water 45 °C, 20 bar, 10 kW", source=IAPWS)  # fmt: skip
    with pytest.raises(BadInput, match="above 0"):
        call("JB_RELIEF_THERMAL_FLOW", "water | T = 45 degC | P = 20 bar", 0)


def test_rigid_vessel_at_a_constant_heat_rate_matches_the_closed_form():
    # hand: t = m·(u2 − u1)/Q with m = V/v1, u from iapws 1.5.5 along v = v1
    from iapws import IAPWS95

    w1 = IAPWS95(T=293.15, P=0.101325)
    w2 = IAPWS95(T=333.15, rho=w1.rho)
    t = call("JB_TIME_HEATING", "water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15, 10)
    check(t, w1.rho * (w2.u - w1.u) / 10, rtol=1e-6, quantity="t [s]",
          conditions="1 m3 liquid-full rigid vessel, 20→60 °C at 10 kW", source=IAPWS)  # fmt: skip


def test_heating_through_ua_against_an_independent_integration():
    # t = m·∫ du/(UA·(Ts − T)) along the isochore, by a fine trapezoid over iapws 1.5.5 states
    import numpy as np
    from iapws import IAPWS95

    rho = IAPWS95(T=293.15, P=0.101325).rho
    T = np.linspace(293.15, 333.15, 801)
    u = np.array([IAPWS95(T=t, rho=rho).u for t in T]) * 1e3
    ref = rho * 1.0 * np.trapezoid(1.0 / (500.0 * (353.15 - T)), u)
    t = call("JB_TIME_HEATING", "water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15,
             None, 0.5, 353.15)  # fmt: skip
    check(t, ref, rtol=2e-5, quantity="t [s]",
          conditions="1 m3 liquid-full rigid vessel, 20→60 °C, UA 500 W/K from 80 °C",
          source=IAPWS + ", trapezoid over 801 states")  # fmt: skip


def test_heating_table_ends_at_the_time_and_the_target():
    rows = call("JB_TIME_HEATING_TABLE", "water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15,
                10, None, None, 5)  # fmt: skip
    assert rows[0] == ["t in s", "T in K", "P in kPa", "x", "Q in kJ"]
    t_end = call("JB_TIME_HEATING", "water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15, 10)
    assert rows[-1][0] == pytest.approx(t_end) and rows[-1][1] == pytest.approx(333.15)
    times = [r[0] for r in rows[1:]]
    assert times == sorted(times) and rows[1][0] == 0.0
    # hand: Q = Q_dot·t at a constant rate
    assert all(r[4] == pytest.approx(10 * r[0], rel=1e-9, abs=1e-9) for r in rows[1:])


def test_fire_heat_and_wetted_area():
    # API 521 (from memory): Q = 43,200·F·A^0.82 W; hand: 43,200·10^0.82
    assert call("JB_FIRE_HEAT", 10) == pytest.approx(43.2 * 10**0.82, rel=1e-12)
    assert call("JB_FIRE_HEAT", 10, 0.5, "inadequate") == pytest.approx(70.9 * 0.5 * 10**0.82)
    # hand geometry: vertical π·D·h + π·D²/4; horizontal half full: L·D·π/2 + 2·π·D²/8
    assert call("JB_WETTED_AREA", "vertical", 2, 5, 1) == pytest.approx(3 * math.pi)
    assert call("JB_WETTED_AREA", "horizontal", 2, 6, 1) == pytest.approx(6 * math.pi + math.pi)
    with pytest.raises(BadInput, match="level = 2.5"):
        call("JB_WETTED_AREA", "horizontal", 2, 6, 2.5)


def test_fire_on_a_liquid_full_vessel_matches_the_closed_form():
    # liquid-full all the way: the wetted area is the whole vessel, so Q is constant and
    # t = m·(u2 − u1)/Q (hand; u from iapws 1.5.5 along the isochore)
    from iapws import IAPWS95

    D, L = 1.0, 3.0
    A = math.pi * D * L + 2 * math.pi * D * D / 4
    Q = 43200 * A**0.82
    w1 = IAPWS95(T=293.15, P=0.101325)
    w2 = IAPWS95(T=303.15, rho=w1.rho)
    m = w1.rho * math.pi * D * D / 4 * L
    t = call(
        "JB_TIME_FIRE", "water | T = 20 degC | P = 1 atm", "horizontal", D, L, "T in K", 303.15
    )
    check(t, m * (w2.u - w1.u) * 1e3 / Q, rtol=1e-6, quantity="t [s]",
          conditions="liquid-full horizontal vessel D 1 m, L 3 m, fire, 20→30 °C",
          source=IAPWS + "; API 521 fire law (from memory)")  # fmt: skip


def test_fire_reaches_the_set_pressure_of_a_part_full_vessel():
    # a horizontal drum of water at 2 bar, heated by fire to 10 bar: the time is the sum of
    # the table's steps, and it grows when the environment factor shrinks (F = 0.5)
    s1 = "water | P = 2 bar | x = 0.0005"
    t = call("JB_TIME_FIRE", s1, "horizontal", 2, 6, "P in bar", 10, None, None, "degC-bar-kJ")
    half = call("JB_TIME_FIRE", s1, "horizontal", 2, 6, "P in bar", 10, 0.5, None, "degC-bar-kJ")
    assert 60 < t / 60 < 120 and half == pytest.approx(2 * t, rel=1e-9)  # hand: Q ∝ F


def test_batch_heating_against_the_exponential_closed_form():
    # hand: constant c gives t = (m·c/UA)·ln((Ts − T1)/(Ts − T2)); water's c(T) varies by
    # 0.1 % over 20–60 °C, so the result lies within that of the closed form at its mean c
    c_mean = call("JB_SOLID_C_MEAN", "water", 293.15, 333.15, "K-Pa-J")
    t = call("JB_TIME_BATCH", "water", 100, 293.15, 333.15, 0.5, 353.15)
    assert t == pytest.approx(100 * c_mean / 500 * math.log(60 / 20), rel=2e-3)
    with pytest.raises(OutOfRange, match="never passes"):
        call("JB_TIME_BATCH", "water", 100, 293.15, 363.15, 0.5, 353.15)


@pytest.mark.parametrize(
    "args, words",
    [
        ((1, "T in K", 333.15, 0), ["infinite"]),
        ((1, "T in K", 333.15), ["infinite"]),
        ((1, "T in K", 283.15, 10), ["never reached"]),  # the target is already passed
        ((1, "T in K", 333.15, None, 0.5, 313.15), ["never reached"]),  # source too cold
        ((1, "T in K", 333.15, None, 0.5), ["without T_source"]),
    ],
)
def test_heating_time_bad_input(args, words):
    with pytest.raises((BadInput, OutOfRange)) as e:
        call("JB_TIME_HEATING", "water | T = 20 degC | P = 1 atm", *args)
    for w in words:
        assert w in str(e.value), str(e.value)


def test_pneumatic_test_energy_is_the_ideal_isentropic_energy_of_air():
    # ASME PCC-2 (from memory): E = 2.5·P·V·[1 − (Pa/P)^0.286] is P·V/(k − 1)·[1 −
    # (Pa/P)^((k−1)/k)] for k = 1.4 with the exponent rounded; hand: within 0.1 %
    code = call("JB_TEST_PNEUMATIC_ENERGY", 1200, 2)
    assert code == pytest.approx(2.5 * 1200 * 2 * (1 - (101.325 / 1200) ** 0.286), rel=1e-12)
    ideal = call("JB_STORED_IDEAL_ISENTROPIC", 1200, 2, 1.4)
    assert code == pytest.approx(ideal, rel=1e-3)
    # gauge written as gauge: 11 barg is 12.01325 bar absolute
    assert call("JB_TEST_PNEUMATIC_ENERGY", 11, 2, None, "degC-barg-kJ") == pytest.approx(
        call("JB_TEST_PNEUMATIC_ENERGY", 1201.325, 2), rel=1e-12
    )


def test_hydrostatic_test_stores_far_less_than_pneumatic():
    # hand: the liquid's expansion work ≈ κ·V·(P1² − P2²)/2 with κ of water at 20 °C from
    # iapws 1.5.5; the wall adds ½·c·V·ΔP² (thin wall, closed cylinder)
    from iapws import IAPWS95

    kappa = IAPWS95(T=293.15, P=1.2).kappa / 1e6  # 1/Pa
    liquid = call("JB_TEST_HYDRO_ENERGY", "water | T = 20 degC | P = 12 bar", 2)
    check(liquid * 1e3, kappa * 2 * (1.2e6**2 - 101325.0**2) / 2, rtol=2e-2,
          quantity="E_liquid [J]", conditions="2 m3 water at 12 bar, 20 °C", source=IAPWS)  # fmt: skip
    c = 1.0 * (5 - 4 * 0.3) / (4 * 0.01 * 200e9)
    both = call("JB_TEST_HYDRO_ENERGY", "water | T = 20 degC | P = 12 bar", 2, "cylinder", 1,
                0.01, 200, 0.3, None, "K-kPa-kJ")  # fmt: skip
    assert both - liquid == pytest.approx(0.5 * c * 2 * (1.2e6 - 101325.0) ** 2 / 1e3, rel=1e-9)
    assert call("JB_TEST_PNEUMATIC_ENERGY", 1200, 2) > 1000 * both


def test_tnt_and_distance():
    # the conventional basis: 1 kg TNT = 4.184 MJ (NIST SP 811); cube-root scaling (hand)
    assert call("JB_TEST_TNT", 4184) == pytest.approx(1.0)
    assert call("JB_TEST_TNT", 4184, 4500) == pytest.approx(4184 / 4500)
    assert call("JB_TEST_DISTANCE", 8, 10) == pytest.approx(20.0)
    with pytest.raises(BadInput, match="scaled distance"):
        call("JB_TEST_DISTANCE", 8, 0)


def test_slider_crank_volume_power_and_mep():
    # hand (Heywood §2.2): at 90° the piston has moved a + l − √(l² − a²) from TDC
    B, S, rod, Vc = 0.1, 0.1, 0.2, 1e-4
    a = S / 2
    want = Vc + math.pi * B**2 / 4 * (rod + a - math.sqrt(rod * rod - a * a))
    assert call("JB_ENGINE_VOLUME", 90, B, S, rod, Vc) == pytest.approx(want, rel=1e-12)
    assert call("JB_ENGINE_VOLUME", 180, B, S, rod, Vc) == pytest.approx(
        Vc + math.pi * B**2 / 4 * S
    )
    # hand: 0.5 kJ per cycle, 3000 rev/min, 4 cylinders, four-stroke: 0.5·50·4/2 = 50 kW
    assert call("JB_ENGINE_POWER", 0.5, 3000, 4, 2) == pytest.approx(50.0)
    assert call("JB_ENGINE_MEP", 0.5, 0.0005) == pytest.approx(1000.0)  # kPa
    with pytest.raises(BadInput, match="longer than the crank"):
        call("JB_ENGINE_VOLUME", 90, B, S, 0.04, Vc)


def test_compressor_volumetric_efficiency_and_branch_fits():
    # hand: 1 + 0.05 − 0.05·4^(1/1.3)
    assert call("JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY", 0.05, 100, 400, 1.3) == pytest.approx(
        1.05 - 0.05 * 4 ** (1 / 1.3), rel=1e-12
    )
    # a loop made of two exact polytropes: compression n = 1.3, expansion n = 1.15 (hand)
    Vc = [0.5, 0.4, 0.3, 0.2, 0.1]
    Ve = [0.1, 0.15, 0.25, 0.35, 0.5]
    P = [100 * (0.5 / v) ** 1.3 for v in Vc] + [2000 * (0.1 / v) ** 1.15 for v in Ve]
    n = call("JB_POLY_FIT_BRANCHES", [[p] for p in P], [[v] for v in Vc + Ve])
    assert n[0][0] == pytest.approx(1.3, rel=1e-9)
    assert n[0][1] == pytest.approx(1.15, rel=1e-9)
