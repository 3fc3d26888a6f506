"""Transport properties and fluid names.

Sources: the independent library iapws 1.5.5 (IAPWS 2008 viscosity, IAPWS 2011 thermal
conductivity, IAPWS 2014 surface tension of water); ASHRAE Standard 34 for refrigerant
designations (isomer letters lower case, blend letters upper case), from memory.
"""

import pytest

from joulebook import call
from joulebook.core.errors import BadInput, OutOfRange
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

    # water's sigma is the IAPWS 2014 release's equation (tests/test_props_round3.py)
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
    from joulebook.core.substances.fluids import fluid_names

    names = set(fluid_names())
    for good in ("cyclohexane", "isobutene", "R152a", "R236fa", "R410A", "R1234ze(E)"):
        assert good in names, good
    for bad in ("cyclo hexane", "R152A", "R236FA"):
        assert bad not in names, bad
    for key in ("D", "K", "natural gas (as methane)"):
        with pytest.raises(BadInput, match="unknown fluid"):
            call("JB_PROP", key, "h", "T in K", 300, "P in kPa", 100)


PSYCHRO = (
    "psychrolib 2.5.0 (PyPI), ASHRAE Handbook Fundamentals 2017 ch. 1 (ideal-gas mixture, "
    "no enhancement factor: HR differs from the real-gas model by about 0.5 %)"
)


@pytest.mark.parametrize("T, RH", [(25.0, 0.5), (5.0, 0.9), (40.0, 0.3)])
def test_humid_air_against_an_independent_psychrometric_library(T, RH):
    import psychrolib as p

    p.SetUnitSystem(p.SI)
    cond = f"humid air at 101.325 kPa, T = {T} degC, RH = {RH}"
    args = (101.325, "T in degC", T, "RH", RH)
    hr = p.GetHumRatioFromRelHum(T, RH, 101325.0)
    check(call("JB_HUMID_AIR", "HR", *args), hr, rtol=8e-3, quantity="HR [kg/kg]",
          conditions=cond, source=PSYCHRO)  # fmt: skip
    check(call("JB_HUMID_AIR", "Tdp in degC", *args), p.GetTDewPointFromRelHum(T, RH),
          rtol=2e-3, quantity="Tdp [degC]", conditions=cond, source=PSYCHRO)  # fmt: skip
    # and the round trip: RH back from T and the dew point
    tdp = call("JB_HUMID_AIR", "Tdp in degC", *args)
    assert call("JB_HUMID_AIR", "RH", 101.325, "T in degC", T, "Tdp in degC", tdp) == (
        pytest.approx(RH, rel=1e-8)
    )


def test_receiver_condensate_by_hand():
    # hand: m = V/v_sat2·(HR1 − HR_sat2) with the model's own HR and v; 1 m³ receiver at
    # 9 bar(g) and 35 °C fed with air at 30 °C, 70 % RH
    hr1 = call("JB_HUMID_AIR", "HR", 101.325, "T in K", 303.15, "RH", 0.7)
    hr2 = call("JB_HUMID_AIR", "HR", 901.325, "T in K", 308.15, "RH", 1.0)
    v2 = call("JB_HUMID_AIR", "v in m3/kg", 901.325, "T in K", 308.15, "RH", 1.0)
    m = call("JB_HUMID_CONDENSATE", 101.325, 303.15, 0.7, 901.325, 308.15, 1)
    assert m == pytest.approx((hr1 - hr2) / v2, rel=1e-12)
    assert 0.14 < m < 0.16  # about 150 g per cubic metre of receiver
    with pytest.raises(OutOfRange, match="supersaturated|RH"):
        call("JB_HUMID_AIR", "HR", 101.325, "T in degC", 25, "RH", 1.2)


def test_chart_tables_for_native_charts():
    # the dome's points are saturation states (iapws 1.5.5 for one of them); an isoline's
    # points are the states (fixed, x) read back by JB_PROP (the same model, a consistency
    # check of the table's assembly)
    from iapws import IAPWS95

    dome = call("JB_CHART_DOME", "water", "T-s", 11, "degC-bar-kJ")
    assert dome[0] == ["s in kJ/(kg*K)", "T in degC"] and len(dome) == 1 + 22
    ts = [r[1] for r in dome[1:]]
    assert ts[:11] == sorted(ts[:11]) and ts[11:] == sorted(ts[11:], reverse=True)
    for row, x in ((dome[4], 0), (dome[19], 1)):
        check(row[0], IAPWS95(T=row[1] + 273.15, x=x).s, rtol=1e-6,
              quantity="s_f [kJ/(kg K)]" if x == 0 else "s_g [kJ/(kg K)]",
              conditions=f"water, saturated at {row[1]:.4f} degC (a point of the dome table)",
              source="iapws 1.5.5 (PyPI), independent IAPWS-95 implementation")  # fmt: skip
    line = call("JB_CHART_ISOLINE", "water", "P-h", "T in degC", 150, 500, 3000, 6)
    assert line[0] == ["h in kJ/kg", "P in kPa"]
    for h, P in line[1:]:
        if isinstance(P, float):
            assert call("JB_PROP", "water", "T in degC", "h in kJ/kg", h, "P in kPa", P) == (
                pytest.approx(150, abs=1e-6)
            )
    with pytest.raises(BadInput, match="axis"):
        call("JB_CHART_ISOLINE", "water", "T-s", "T in K", 300, 1, 2)


def test_mixtures_by_composition_and_blends_by_name():
    # R410A is R32/R125 50/50 by mass (ASHRAE 34, from memory); its bubble pressure at 25 °C
    # is about 1.65 MPa with a glide under 0.5 K (from memory, refrigerant tables)
    pb = call("JB_PROP_SAT", "R410A", "Pbubble in kPa", "T in degC", 25)
    pd = call("JB_PROP_SAT", "R410A", "Pdew in kPa", "T in degC", 25)
    check(pb, 1650.0, rtol=1.5e-2, quantity="P_bubble [kPa]", conditions="R410A at 25 degC",
          source="refrigerant saturation tables for R410A, from memory (about 1.65 MPa)")  # fmt: skip
    assert 0 < pb - pd < 20
    # the name is one model (its pseudo-pure equation) in JB_PROP and JB_PROP_SAT alike
    assert call("JB_PROP", "R410A", "P in kPa", "T in degC", 25, "x", 0) == pb
    # its composition is the mixture model: the same blend within 1 % (Lemmon 2003 fitted the
    # pseudo-pure equation to mixture-model values, from memory)
    by_mass = call("JB_PROP", "R32 0.5, R125 0.5 (mass)", "P in kPa", "T in degC", 25, "x", 0)
    assert by_mass == pytest.approx(pb, rel=1e-2)
    # R407C glides about 5–7 K at 1 MPa (from memory)
    glide = call("JB_PROP_SAT", "R407C", "Tdew in K", "P in kPa", 1000) - call(
        "JB_PROP_SAT", "R407C", "Tbubble in K", "P in kPa", 1000
    )
    assert 4 < glide < 8
    with pytest.raises(BadInput, match="boils over a range"):
        call("JB_PROP_SAT", "R407C", "Tsat", "P in kPa", 1000)


def test_natural_gas_mixture_states():
    ng = "methane 0.9, ethane 0.06, nitrogen 0.03, CO2 0.01"
    # hand: at 1 bar and 300 K the gas is nearly ideal, ρ ≈ P·M/(R·T) (within 0.5 %)
    M = 0.9 * 16.0428 + 0.06 * 30.069 + 0.03 * 28.0134 + 0.01 * 44.0095  # g/mol (from memory)
    rho = call("JB_PROP", ng, "rho in kg/m3", "T in K", 300, "P in bar", 1)
    check(rho, 1e5 * M / 1000 / (8.314462618 * 300), rtol=5e-3, quantity="rho [kg/m3]",
          conditions="natural gas (CH4 0.9, C2H6 0.06, N2 0.03, CO2 0.01) at 300 K, 1 bar",
          source="hand: ideal-gas density P·M/(R·T), molar masses from memory")  # fmt: skip
    tb = call("JB_PROP", ng, "T in K", "P in bar", 20, "x", 0)
    td = call("JB_PROP", ng, "T in K", "P in bar", 20, "x", 1)
    assert tb < td  # bubble below dew
    s = call("JB_STATE", ng, "T in degC", 25, "P in bar", 50)
    assert call("JB_PROP", s, "Z") == pytest.approx(
        call("JB_PROP", ng, "Z", "T in degC", 25, "P in bar", 50), rel=1e-12
    )
    with pytest.raises(BadInput, match="two phases"):
        call("JB_PROP", ng, "h", "T in K", (tb + td) / 2, "P in bar", 20)
    with pytest.raises(BadInput, match="add up to 1"):
        call("JB_PROP", "methane 0.9, ethane 0.2", "h", "T in K", 300, "P in bar", 1)
    with pytest.raises(BadInput, match="T–P"):
        call("JB_PROP", ng, "h", "T in K", 300, "h in kJ/kg", 1)
