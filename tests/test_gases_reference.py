"""Ideal gases against NASA polynomials and the identities of the ideal-gas model.

Source for cp0: NASA TM-4513 (McBride, Gordon & Reno 1993) 7-coefficient polynomials as
carried by Cantera 3.2.0's ``nasa_gas.yaml``, an independent library.  Each check stays inside
the polynomial's valid range (200–6000 K).  Air is built in Cantera from those species with
the composition of the air equation of state (N2 0.7812, O2 0.2096, Ar 0.0092 mole fractions,
Lemmon et al. 2000).
"""

import math

import cantera as ct
import numpy as np
import pytest

from joulebook.core.errors import BadInput, OutOfRange
from refcheck import check

NASA_SRC = "NASA TM-4513 polynomials via Cantera 3.2.0 (nasa_gas.yaml)"

NASA = {s.name: s for s in ct.Species.list_from_file("nasa_gas.yaml")}


def _nasa_cp(species: str, T: float) -> float:
    s = NASA[species]
    assert s.thermo.min_temp <= T <= s.thermo.max_temp
    return s.thermo.cp(T) / s.molecular_weight  # J/(kg K)


def _nasa_air_cp(T: float) -> float:
    g = ct.Solution(thermo="ideal-gas", species=[NASA["N2"], NASA["O2"], NASA["Ar"]])
    g.TPX = T, 101325.0, {"N2": 0.7812, "O2": 0.2096, "Ar": 0.0092}
    return g.cp_mass


@pytest.mark.parametrize("T", [300.0, 500.0, 1000.0])
@pytest.mark.parametrize(
    "gas, species, rtol",
    [
        ("nitrogen", "N2", 1e-3),
        ("oxygen", "O2", 1e-3),
        ("CO2", "CO2", 1e-3),
        ("argon", "Ar", 1e-3),
        ("hydrogen", "H2", 3e-3),
    ],
)
def test_cp0_against_nasa_tm4513(call, gas, species, rtol, T):
    check(
        call("JB_GAS_CP", gas, T, "K-Pa-J"),
        _nasa_cp(species, T),
        rtol=rtol,
        quantity="cp0 [J/(kg K)]",
        conditions=f"{gas}, T = {T} K",
        source=NASA_SRC,
    )


@pytest.mark.parametrize("T", [300.0, 500.0, 1000.0])
def test_air_cp0_against_nasa_tm4513(call, T):
    check(
        call("JB_GAS_CP", "air", T, "K-Pa-J"),
        _nasa_air_cp(T),
        rtol=1e-3,
        quantity="cp0 [J/(kg K)]",
        conditions=f"air (N2 0.7812, O2 0.2096, Ar 0.0092), T = {T} K",
        source=NASA_SRC,
    )


def test_R_of_air(call):
    # common practice: R of air ≈ 0.287 kJ/(kg K)
    assert call("JB_GAS_R", "air") == pytest.approx(0.287, abs=5e-4)


@pytest.mark.parametrize(
    "gas",
    ["air", "nitrogen", "CO2", "argon", "hydrogen", "air | k = 1.4", "R = 0.287 | cp = 1.005"],
)
@pytest.mark.parametrize("T", [250.0, 600.0, 950.0])
def test_cp_minus_cv_is_R_exactly(call, gas, T):
    cp = call("JB_GAS_CP", gas, T, "K-Pa-J")
    cv = call("JB_GAS_CV", gas, T, "K-Pa-J")
    R = call("JB_GAS_R", gas, "K-Pa-J")
    assert cp - cv == pytest.approx(R, rel=1e-12)
    assert cp > cv  # common practice
    assert call("JB_GAS_K", gas, T) == pytest.approx(cp / cv, rel=1e-12)


def test_delta_h_is_the_integral_of_cp(call):
    T = np.linspace(300.0, 1200.0, 4001)
    cp = np.array([call("JB_GAS_CP", "air", t, "K-Pa-J") for t in T])
    dh = call("JB_GAS_DELTA_H", "air", 300, 1200, "K-Pa-J")
    assert dh == pytest.approx(np.trapezoid(cp, T), rel=1e-8)
    ds = call("JB_GAS_DELTA_S", "air", 300, 1200, None, None, "K-Pa-J")
    assert ds == pytest.approx(np.trapezoid(cp / T, T), rel=1e-7)  # trapezoid error ~3e-8
    du = call("JB_GAS_DELTA_U", "air", 300, 1200, "K-Pa-J")
    assert du == pytest.approx(dh - call("JB_GAS_R", "air", "K-Pa-J") * 900, rel=1e-12)
    assert call("JB_GAS_CP_MEAN", "air", 300, 1200, "K-Pa-J") == pytest.approx(dh / 900, rel=1e-12)


def test_delta_h_against_nasa_enthalpy(call):
    # NASA TM-4513 via Cantera 3.2.0: h(T2) − h(T1) of N2
    s = NASA["N2"]
    ref = (s.thermo.h(1000.0) - s.thermo.h(300.0)) / s.molecular_weight  # J/kg
    assert call("JB_GAS_DELTA_H", "N2", 300, 1000, "K-Pa-J") == pytest.approx(ref, rel=1e-3)


def test_pressure_term_of_entropy(call):
    # isothermal: Δs = −R ln(P2/P1), analytic identity of the ideal gas
    R = call("JB_GAS_R", "air")
    assert call("JB_GAS_DELTA_S", "air", 300, 300, 100, 1000) == pytest.approx(
        -R * math.log(10), rel=1e-12
    )


def test_constant_cp_model(call):
    cp = call("JB_GAS_CP", "air | k = 1.4", 300)
    R = call("JB_GAS_R", "air")
    assert cp == pytest.approx(1.4 * R / 0.4, rel=1e-12)
    assert call("JB_GAS_DELTA_H", "air | k = 1.4", 300, 400) == pytest.approx(100 * cp, rel=1e-12)
    assert call("JB_GAS_CP", "R = 0.287 | cp = 1.005", 900) == pytest.approx(1.005)
    assert call("JB_GAS_CP", "R = 287 J/(kg*K) | cv = 0.718 kJ/kg.K", 900) == pytest.approx(1.005)
    assert call("JB_GAS_DELTA_S", "air | cp = 1.005", 300, 600) == pytest.approx(
        1.005 * math.log(2), rel=1e-12
    )
    with pytest.raises(BadInput, match="exactly one of cp, cv or k"):
        call("JB_GAS_CP", "air | k = 1.4 | cp = 1.0", 300)
    with pytest.raises(OutOfRange, match="1 < k"):
        call("JB_GAS_CP", "air | k = 0.9", 300)
    with pytest.raises(BadInput, match="molar mass is unknown"):
        call("JB_GAS_MOLAR_MASS", "R = 0.287 | k = 1.4")


def test_unit_systems_on_gas_functions(call):
    # 1 kJ/(kg K) = 1/4.1868 Btu/(lbm R) (NIST SP 811 B.9)
    si = call("JB_GAS_CP", "air", 300)
    us = call("JB_GAS_CP", "air", 80.33, "degF-psia-Btu")  # 80.33 °F = 300.0 K
    assert us == pytest.approx(si / 4.1868, rel=1e-5)
    assert call("JB_GAS_DELTA_H", "air", 25, 125, "degC-bar-kJ") == pytest.approx(
        call("JB_GAS_DELTA_H", "air", 298.15, 398.15), rel=1e-12
    )


def test_range_refused(call):
    with pytest.raises(OutOfRange, match="ideal-gas model's range"):
        call("JB_GAS_CP", "air", 5000)
