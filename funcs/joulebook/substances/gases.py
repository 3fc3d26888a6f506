"""Ideal gases: temperature-dependent c_p⁰(T) and a constant-c_p model.

Two models, chosen by the gas text:

``"air"`` (any real-fluid name)
    the ideal-gas part of that fluid's reference equation of state: c_p⁰(T) exactly as the
    equation of state defines it, with h⁰(T) = ∫c_p⁰ dT and s⁰(T) = ∫c_p⁰/T dT taken from
    the same function (so they are consistent to round-off).
``"air | k = 1.4"``, ``"air | cp = 1.005 kJ/(kg*K)"``, ``"R = 0.287 kJ/(kg*K) | cp = 1.005"``
    constant specific heats: c_p, c_v = c_p − R, k = c_p/c_v, Δh = c_p·ΔT,
    Δs⁰ = c_p·ln(T2/T1).

In both, c_p − c_v = R exactly and Δu = Δh − R·ΔT.  All values are SI.

References
----------
Each gas's ideal-gas heat capacity is the one published with its reference equation of state
(e.g. Lemmon et al., J. Phys. Chem. Ref. Data 29, 331 (2000) for air), evaluated by CoolProp.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from ..errors import BadInput, OutOfRange, fmt_value
from ..units import UnitSystem, parse_unit, unit_system
from . import fluids

__all__ = ["GasModel", "gas_model", "cp", "cv", "k", "delta_h", "delta_u", "cp_mean", "delta_s"]

R_UNIVERSAL = 8.314462618  # J/(mol K), CODATA 2018 (exact)
_P_REF = 101_325.0


@dataclass(frozen=True)
class GasModel:
    """An ideal-gas model (SI)."""

    name: str
    R: float  # J/(kg K)
    M: float | None  # kg/mol (None when only R is known)
    cp_const: float | None  # J/(kg K) for the constant model, None for c_p⁰(T)
    internal: str | None  # the real fluid whose ideal-gas part is used
    T_min: float
    T_max: float
    source: str

    @property
    def constant(self) -> bool:
        return self.cp_const is not None


def _num_with_unit(text: str, kind: str, system: UnitSystem, what: str) -> float:
    m = re.fullmatch(r"\s*([-+]?[0-9.]+(?:[eE][-+]?\d+)?)\s*(.*?)\s*", text)
    if not m:
        raise BadInput(f"gas model: {what} = {text!r} is not a number with an optional unit")
    val = float(m.group(1))
    conv = parse_unit(m.group(2), kind) if m.group(2) else system.conv(kind)
    return conv.to_si(val)


@lru_cache(maxsize=1024)
def gas_model(text: str, system: UnitSystem | None = None) -> GasModel:
    """Parse a gas text into a :class:`GasModel`.

    Raises
    ------
    BadInput
        Unknown gas, unknown key, or inconsistent constants (k ≤ 1, c_p ≤ R).
    """
    system = system or unit_system(None)
    parts = [p.strip() for p in str(text).split("|")]
    head, rest = parts[0], parts[1:]
    consts: dict[str, float] = {}
    name = head
    if "=" in head:
        rest, name = parts, ""
    for p in rest:
        if not p:
            continue
        key, _, val = (x.strip() for x in p.partition("="))
        if key == "k":
            v = _num_with_unit(val, "dimensionless", system, key)
        elif key in ("cp", "cv", "R"):
            v = _num_with_unit(val, "specific_entropy", system, key)
        elif key == "M":
            v = _num_with_unit(val, "molar_mass", system, key)
            if not v > 0:
                raise BadInput(
                    f"gas model {text!r}: M = {val} must be above 0 (the molar mass, e.g. "
                    "M = 28.97 kg/kmol)"
                )
        else:
            raise BadInput(f"gas model {text!r}: unknown key {key!r}; use cp, cv, k, R or M")
        consts[key] = v
    if not name and not consts:
        raise BadInput(
            "gas is blank; give a name such as air, or constants like 'R = 0.287 | k = 1.4'"
        )

    fi = fluids.fluid_info(name) if name else None
    R = consts.get("R")
    M = consts.get("M")
    if R is None and M is not None:
        R = R_UNIVERSAL / M
    if R is None and fi is not None:
        R, M = fi.R, fi.molar_mass  # the equation of state's own gas constant
    if fi is not None and M is None and "R" not in consts:
        M = fi.molar_mass
    if not consts:
        return GasModel(
            fi.name,
            R,
            M,
            None,
            fi.internal,
            fi.T_min,
            fi.T_max,
            f"ideal-gas part of {fi.eos}",
        )
    if R is None:
        raise BadInput(f"gas model {text!r}: give a gas name, R or M with the constants")
    if not R > 0:
        raise BadInput(f"gas model {text!r}: R must be > 0")
    given = {k: consts[k] for k in ("cp", "cv", "k") if k in consts}
    if len(given) != 1:
        raise BadInput(f"gas model {text!r}: give exactly one of cp, cv or k (got {len(given)})")
    if "k" in given:
        kk = given["k"]
        if not 1.0 < kk <= 1.7:
            raise OutOfRange(
                f"gas model: k = {fmt_value(kk)} is outside 1 < k ≤ 1.7 for an ideal gas"
            )
        cpc = kk * R / (kk - 1.0)
    elif "cp" in given:
        cpc = given["cp"]
    else:
        cpc = given["cv"] + R
    if not cpc > R * 1.0000001:
        raise OutOfRange(
            f"gas model: cp = {fmt_value(cpc)} J/(kg K) must exceed R = {fmt_value(R)}"
        )
    label = (fi.name if fi else "gas") + " (constant cp)"
    return GasModel(label, R, M, cpc, None, 1e-3, 1e5, "constant specific heats given by the user")


def _check_T(g: GasModel, T: float, arg: str = "T") -> None:
    if not (T == T):
        raise BadInput(f"{arg} is not a number")
    if not (g.T_min <= T <= g.T_max):
        raise OutOfRange(
            f"{g.name}: {arg} = {fmt_value(T)} K is outside the ideal-gas model's range "
            f"{fmt_value(g.T_min)}–{fmt_value(g.T_max)} K"
        )


@lru_cache(maxsize=65536)
def _ig(internal: str, T: float) -> tuple[float, float, float]:
    """(c_p⁰, h⁰, s⁰ at 101.325 kPa) of the equation of state's ideal-gas part, SI."""
    M = fluids._state(internal, 3).molar_mass()
    rho = _P_REF * M / (R_UNIVERSAL * T)
    st = fluids._up(internal, 3, fluids._coolprop().DmassT_INPUTS, rho, T)
    return st.cp0mass(), st.hmass_idealgas(), st.smass_idealgas()


def cp(g: GasModel, T: float) -> float:
    """c_p⁰(T), J/(kg·K)."""
    _check_T(g, T)
    return g.cp_const if g.constant else _ig(g.internal, T)[0]


def cv(g: GasModel, T: float) -> float:
    """c_v⁰(T) = c_p⁰(T) − R, J/(kg·K)."""
    return cp(g, T) - g.R


def k(g: GasModel, T: float) -> float:
    """k(T) = c_p⁰/c_v⁰."""
    c = cp(g, T)
    return c / (c - g.R)


def delta_h(g: GasModel, T1: float, T2: float) -> float:
    """Δh = ∫_{T1}^{T2} c_p⁰ dT, J/kg."""
    _check_T(g, T1, "T1")
    _check_T(g, T2, "T2")
    if g.constant:
        return g.cp_const * (T2 - T1)
    return _ig(g.internal, T2)[1] - _ig(g.internal, T1)[1]


def delta_u(g: GasModel, T1: float, T2: float) -> float:
    """Δu = Δh − R·(T2 − T1), J/kg."""
    return delta_h(g, T1, T2) - g.R * (T2 - T1)


def cp_mean(g: GasModel, T1: float, T2: float) -> float:
    """Mean c_p over [T1, T2] = Δh/(T2 − T1); c_p⁰(T1) when T1 = T2, J/(kg·K)."""
    if T1 == T2:
        return cp(g, T1)
    return delta_h(g, T1, T2) / (T2 - T1)


def delta_s(
    g: GasModel, T1: float, T2: float, P1: float | None = None, P2: float | None = None
) -> float:
    """Δs = s⁰(T2) − s⁰(T1) − R·ln(P2/P1), J/(kg·K); without pressures, Δs⁰ at equal pressure."""
    _check_T(g, T1, "T1")
    _check_T(g, T2, "T2")
    if g.constant:
        ds0 = g.cp_const * math.log(T2 / T1)
    else:
        ds0 = _ig(g.internal, T2)[2] - _ig(g.internal, T1)[2]
    if P1 is None and P2 is None:
        return ds0
    if P1 is None or P2 is None:
        raise BadInput("give both P1 and P2, or neither (Δs at equal pressure)")
    if not (P1 > 0 and P2 > 0):
        raise OutOfRange(
            f"absolute pressures must be > 0 (P1 = {fmt_value(P1)} Pa, P2 = {fmt_value(P2)} Pa)"
        )
    return ds0 - g.R * math.log(P2 / P1)
