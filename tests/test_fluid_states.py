"""Real-fluid states where one answer would mislead: two states fitting the inputs, solids,
states outside an equation's validated range, pair-dependent derivatives, and the ice point.

Sources named beside each check: the independent library iapws 1.5.5 (IAPWS-95); IAPWS
R14-08(2011), "Revised release on the pressure along the melting and sublimation curves of
ordinary water substance" (melting temperatures); IAPWS R6-95(2018), the IAPWS-95 release
(validated range: melting curve to 1273 K, up to 1000 MPa).
"""

import pytest

from joulebook import call
from joulebook.core.errors import BadInput, OutOfRange


def test_cold_liquid_by_t_and_h_is_two_states_not_the_wet_one():
    # iapws 1.5.5: at 10 °C, h = 418.6482 kJ/kg is met by a wet state (x ≈ 0.152 at
    # 1.228 kPa) and by compressed liquid near 450 MPa; joulebook named only the wet one
    with pytest.raises(BadInput) as e:
        call("JB_PROP", "water", "P in MPa", "T in degC", 10, "h in kJ/kg", 418.6482)
    msg = str(e.value)
    assert "more than one state" in msg and "wet" in msg and "450000 kPa" in msg


def test_t_and_h_with_two_close_roots_is_more_than_one_state():
    # two compressed-liquid states 0.3 MPa apart at 539.27 K (h has a minimum along the
    # isotherm where T·β = 1): both lie between two points of the search grid
    with pytest.raises(BadInput, match="more than one state"):
        call("JB_PROP", "water", "P in MPa", "T in K", 539.273887, "h in kJ/kg", 1163.2805)


def test_pressure_and_density_near_the_density_maximum_fit_two_temperatures():
    # iapws 1.5.5: ρ = 999.943 kg/m³ at 101.325 kPa at 2.00 °C and at 5.998 °C
    for spec, value in (("rho in kg/m3", 999.943), ("v in m3/kg", 1 / 999.943)):
        with pytest.raises(BadInput) as e:
            call("JB_PROP", "water", "T in degC", "P in kPa", 101.325, spec, value)
        assert "275.15 K" in str(e.value) and "279.148 K" in str(e.value)
    # away from the maximum, one state (iapws 1.5.5: 999.0 kg/m³ at 15.66 °C)
    assert call("JB_PROP", "water", "T in degC", "P in kPa", 101.325, "rho in kg/m3", 999.0) == (
        pytest.approx(15.6638, abs=1e-3)
    )


def test_ice_is_refused_not_returned_as_compressed_liquid():
    # IAPWS R14-08: ice VI melts at 294.6 K near 900 MPa, so 280 K there is solid
    with pytest.raises(OutOfRange, match="is solid"):
        call("JB_PROP", "water", "P in MPa", "T in K", 280, "rho in kg/m3", 1232.598)
    with pytest.raises(OutOfRange, match="is solid"):
        call("JB_PROP", "water", "h in kJ/kg", "T in degC", 20, "P in MPa", 900)


def test_liquid_water_at_the_ice_point_is_accepted():
    # iapws 1.5.5: h = 0.0610 kJ/kg at 0 °C and 101.325 kPa, 2.5 mK below the melting line
    # (273.1525 K at 1 atm, IAPWS R14-08); accepted within 0.01 K of the line
    h = call("JB_PROP", "water", "h in kJ/kg", "T in degC", 0, "P in kPa", 101.325)
    assert h == pytest.approx(0.0610, abs=5e-5)
    assert call("JB_SOLID_HEAT", "water", 1, 0, 50, "degC-bar-kJ") == pytest.approx(
        209.36, rel=1e-3
    )
    with pytest.raises(OutOfRange):  # 20 mK below the line: ice
        call("JB_PROP", "water", "h in kJ/kg", "T in degC", -0.02, "P in kPa", 101.325)


def test_states_beyond_the_validated_range_are_refused():
    # IAPWS R6-95(2018): validated to 1273 K; the property library allows 2000 K
    with pytest.raises(OutOfRange, match="1273 K"):
        call("JB_PROP", "water", "h in kJ/kg", "T in K", 2000, "P in MPa", 1)
    assert call("JB_PROP", "water", "h in kJ/kg", "T in K", 1273, "P in MPa", 1) > 0


def test_near_critical_cp_does_not_depend_on_the_input_pair():
    # iapws 1.5.5 at (647.4505 K, 22.15979 MPa): cp = 3672.6003 kJ/(kg K)
    rho = call("JB_PROP", "water", "rho in kg/m3", "T in K", 647.4505, "P in MPa", 22.15979)
    by_tp = call("JB_PROP", "water", "cp", "T in K", 647.4505, "P in MPa", 22.15979)
    by_trho = call("JB_PROP", "water", "cp", "T in K", 647.4505, "rho in kg/m3", rho)
    assert by_tp == pytest.approx(by_trho, rel=1e-9)
    assert by_tp == pytest.approx(3672.6003, rel=1e-6)
    with pytest.raises(OutOfRange, match="critical point"):  # cp has no finite value there
        call("JB_PROP", "water", "cp", "T in K", 647.096, "rho in kg/m3", 322)


def test_u_and_s_find_high_pressure_liquid():
    # round trip over 30 compressed-liquid states from 396 to 1000 MPa (the library's own
    # (T, P) flash is the reference: u and s from it must lead back to its pressure)
    import random

    rng = random.Random(3)
    for _ in range(30):
        P, T = rng.uniform(396, 1000), rng.uniform(310, 600)
        u = call("JB_PROP", "water", "u", "T in K", T, "P in MPa", P)
        s = call("JB_PROP", "water", "s", "T in K", T, "P in MPa", P)
        assert call("JB_PROP", "water", "P in MPa", "u", u, "s", s) == pytest.approx(P, rel=1e-6)


@pytest.mark.parametrize("T", [280.0, 300.0, 500.0, 646.0])
def test_t_with_exactly_psat_is_refused_at_every_temperature(T):
    # common practice: T and P on the saturation line fix no state (x is free); one rule
    # whichever phase the library's flash would pick; a hair off the line is single-phase
    ps = call("JB_PROP", "water", "P in Pa", "T in K", T, "x", 0)
    with pytest.raises(BadInput, match="saturation line"):
        call("JB_PROP", "water", "h", "T in K", T, "P in Pa", ps)
    assert call("JB_PROP", "water", "phase", "T in K", T, "P in Pa", ps * 1.0001) == (
        "compressed liquid"
    )
    assert call("JB_PROP", "water", "phase", "T in K", T, "P in Pa", ps * 0.9999) == (
        "superheated vapor"
    )
