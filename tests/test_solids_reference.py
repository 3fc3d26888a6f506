"""Incompressible solids and liquids.

Sources
-------
* NASA TM-4513 condensed-species polynomials (Al(cr), Cu(cr), Fe(a)) as carried by Cantera
  3.2.0's ``nasa_condensed.yaml``: the independent evaluation checks our copy of the coefficients.
* NIST-JANAF Thermochemical Tables (Chase 1998, 4th ed.) Cp° at 298.15 K: Al 24.209,
  Cu 24.440, Fe 25.10 J/(mol K) — recalled from memory, checked with a 1 % tolerance.
* Liquid water: IAPWS-95 via the independent `iapws` 1.5.5 package at 101.325 kPa.
"""

import cantera as ct
import numpy as np
import pytest
from iapws import IAPWS95

from joulebook.core.errors import BadInput, OutOfRange
from joulebook.core.substances import solids
from refcheck import check

COND = {s.name: s for s in ct.Species.list_from_file("nasa_condensed.yaml")}


@pytest.mark.parametrize(
    "material, species", [("aluminium", "AL(cr)"), ("copper", "Cu(cr)"), ("pure iron", "Fe(a)")]
)
@pytest.mark.parametrize("T", [250.0, 298.15, 500.0, 900.0])
def test_metals_against_nasa_condensed(call, material, species, T):
    s = COND[species]
    ref = s.thermo.cp(T) / s.molecular_weight  # J/(kg K)
    check(
        call("JB_SOLID_C", material, T, "K-Pa-J"),
        ref,
        rtol=1e-6,
        quantity="c [J/(kg K)]",
        conditions=f"{material}, T = {T} K",
        source="NASA TM-4513 condensed species via Cantera 3.2.0 (nasa_condensed.yaml)",
    )


@pytest.mark.parametrize(
    "material, M, cp_molar",
    [("aluminium", 26.9815, 24.209), ("copper", 63.546, 24.440), ("pure iron", 55.845, 25.10)],
)
def test_metals_against_janaf_298(call, material, M, cp_molar):
    # NIST-JANAF Cp° at 298.15 K (from memory; 1 % tolerance)
    check(
        call("JB_SOLID_C", material, 298.15, "K-Pa-J"),
        cp_molar / M * 1000,
        rtol=1e-2,
        quantity="c [J/(kg K)]",
        conditions=f"{material}, T = 298.15 K",
        source="NIST-JANAF Cp at 298.15 K (recalled from memory)",
    )


@pytest.mark.parametrize("T", [275.0, 300.0, 330.0, 360.0])
def test_liquid_water_table_against_iapws95(call, T):
    # IAPWS-95 via iapws 1.5.5 at 101.325 kPa; the table is linear between 5 K points
    ref = IAPWS95(T=T, P=0.101325).cp
    check(
        call("JB_SOLID_C", "water", T, "K-Pa-J"),
        ref * 1e3,
        rtol=5e-4,
        quantity="c [J/(kg K)]",
        conditions=f"liquid water, T = {T} K, 101.325 kPa",
        source="iapws 1.5.5 (PyPI), independent IAPWS-95 implementation",
    )


def test_at_least_twelve_materials_each_with_source_and_range():
    assert len(solids.MATERIALS) >= 12
    for m in solids.MATERIALS:
        assert m.source and m.T_min < m.T_max
        for T in np.linspace(m.T_min, m.T_max, 7):
            assert 100.0 < solids.c(m, T) < 5000.0


@pytest.mark.parametrize("m", solids.MATERIALS, ids=lambda m: m.name)
def test_delta_u_is_the_integral_of_c(m):
    # the steel equation's sharp transformation peak needs a finer grid for the trapezoid
    T = np.linspace(m.T_min, m.T_max, 200001 if m.form == "en1993" else 20001)
    c = np.array([solids.c(m, t) for t in T])
    assert solids.delta_u(m, m.T_min, m.T_max) == pytest.approx(np.trapezoid(c, T), rel=2e-7)
    assert solids.delta_u(m, m.T_max, m.T_min) == -solids.delta_u(m, m.T_min, m.T_max)


def test_heat_and_mean(call):
    dU = call("JB_SOLID_DELTA_U", "copper", 300, 400)
    assert call("JB_SOLID_HEAT", "copper", 2.5, 300, 400) == pytest.approx(2.5 * dU, rel=1e-12)
    assert call("JB_SOLID_C_MEAN", "copper", 300, 400) == pytest.approx(dU / 100, rel=1e-12)
    # cooling gives negative heat (heat leaves the body)
    assert call("JB_SOLID_HEAT", "copper", 1, 400, 300) < 0
    # kJ/(kg K) and kJ/(kg °C) are the same number (common practice): °C inputs, same Δu
    assert call("JB_SOLID_DELTA_U", "copper", 26.85, 126.85, "degC-kPa-kJ") == pytest.approx(
        dU, rel=1e-12
    )


def test_errors(call):
    with pytest.raises(OutOfRange, match="outside the data's range"):
        call("JB_SOLID_C", "aluminium", 1200)
    with pytest.raises(BadInput, match="unknown material"):
        call("JB_SOLID_C", "unobtainium", 300)
    assert call("JB_SOLID_C", "Al", 300) == call("JB_SOLID_C", "aluminum", 300)


def test_carbon_steel_follows_the_eurocode_equation(call):
    # EN 1993-1-2:2005 §3.4.1.2 eq. (3.2) (from memory): 425 + 0.773·θ − 1.69e-3·θ² +
    # 2.22e-6·θ³ J/(kg·K) below 600 °C; 666 + 13002/(738 − θ) to 735 °C (5000 at the peak);
    # 545 + 17820/(θ − 731) to 900 °C; 650 to 1200 °C
    assert call("JB_SOLID_C", "carbon steel", 20, "degC-bar-kJ") == pytest.approx(0.43980176)
    assert call("JB_SOLID_C", "carbon steel", 735, "degC-bar-kJ") == pytest.approx(5.0)
    assert call("JB_SOLID_C", "carbon steel", 1000, "degC-bar-kJ") == pytest.approx(0.650)
    # hand: ∫ from 900 to 1200 °C of 650 J/(kg·K) = 195 kJ/kg
    assert call("JB_SOLID_DELTA_U", "carbon steel", 900, 1200, "degC-bar-kJ") == pytest.approx(
        195.0
    )
