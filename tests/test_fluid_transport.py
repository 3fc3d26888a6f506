"""Transport properties and fluid names.

Sources: the independent library iapws 1.5.5 (IAPWS 2008 viscosity, IAPWS 2011 thermal
conductivity, IAPWS 2014 surface tension of water); ASHRAE Standard 34 for refrigerant
designations (isomer letters lower case, blend letters upper case), from memory.
"""

import pytest

from joulebook import call
from joulebook.errors import BadInput, OutOfRange
from refcheck import check

IAPWS = "iapws 1.5.5 (PyPI), IAPWS transport formulations"


@pytest.mark.parametrize("T, P", [(298.15, 0.101325), (500.0, 10.0), (700.0, 5.0)])
def test_viscosity_conductivity_prandtl_of_water(T, P):
    from iapws import IAPWS95

    ref = IAPWS95(T=T, P=P)
    cond = f"water, T = {T} K, P = {P} MPa"
    args = ("T in K", T, "P in MPa", P)
    check(call("JB_PROP", "water", "mu in Pa*s", *args), ref.mu, rtol=1e-6,
          quantity="mu [Pa s]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "lambda in W/(m*K)", *args), ref.k, rtol=1e-6,
          quantity="lambda [W/(m K)]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "nu in m2/s", *args), ref.mu / ref.rho, rtol=1e-6,
          quantity="nu [m2/s]", conditions=cond, source=IAPWS)  # fmt: skip
    check(call("JB_PROP", "water", "Pr", *args), ref.Prandt, rtol=1e-6,
          quantity="Pr [-]", conditions=cond, source=IAPWS)  # fmt: skip


def test_surface_tension_on_the_saturation_line_only():
    from iapws import IAPWS95

    # the property library's correlation for water differs from the IAPWS 2014 release by
    # about 0.1 % near room temperature
    check(call("JB_PROP", "water", "sigma in N/m", "T in K", 298.15, "x", 0),
          IAPWS95(T=298.15, x=0).sigma, rtol=2e-3, quantity="sigma [N/m]",
          conditions="water, saturated at 298.15 K", source=IAPWS)  # fmt: skip
    with pytest.raises(OutOfRange, match="saturation line only"):
        call("JB_PROP", "water", "sigma", "T in degC", 25, "P in kPa", 101.325)
    with pytest.raises(OutOfRange, match="two-phase"):
        call("JB_PROP", "water", "mu", "T in degC", 100, "x", 0.5)
    with pytest.raises(OutOfRange, match="no transport properties"):
        call("JB_PROP", "air (ideal gas)", "mu", "T in K", 300, "P in kPa", 100)


def test_fluid_names_read_naturally_and_library_keys_stay_internal():
    from joulebook.substances.fluids import fluid_names

    names = set(fluid_names())
    for good in ("cyclohexane", "isobutene", "R152a", "R236fa", "R410A", "R1234ze(E)"):
        assert good in names, good
    for bad in ("cyclo hexane", "R152A", "R236FA"):
        assert bad not in names, bad
    for key in ("D", "K", "natural gas (as methane)"):
        with pytest.raises(BadInput, match="unknown fluid"):
            call("JB_PROP", key, "h", "T in K", 300, "P in kPa", 100)
