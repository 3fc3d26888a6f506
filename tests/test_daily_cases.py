"""The engineer's daily cases: expansion properties, blocked-in liquid in an elastic pipe,
heating with time, fire exposure, pressure tests and indicator diagrams.

Every check names its source: the independent library iapws 1.5.5 (IAPWS-95), hand
derivations written beside the check, or a published formula named with "from memory" where
it is recalled.
"""

import math

import pytest
from refcheck import check

from joulebook import call
from joulebook.errors import BadInput, JoulebookError, OutOfRange

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
