"""The engineer's daily cases: expansion properties, blocked-in liquid in an elastic pipe,
heating with time, fire exposure, pressure tests and indicator diagrams.

Every check names its source: the independent library iapws 1.5.5 (IAPWS-95), hand
derivations written beside the check, or a published formula named with "from memory" where
it is recalled.
"""

import math

import pytest

from joulebook import call
from joulebook.errors import BadInput, OutOfRange
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
        (("cylinder", 0.1, 0.005, 200, 0.6, 1.2e-5), ["nu = 0.6", "0 ≤ ν < 0.5"]),
        (("cylinder", 0.1, 0.005, 200), ["needs nu"]),
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
