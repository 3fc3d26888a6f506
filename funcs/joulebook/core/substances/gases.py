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
    """An ideal-gas model (SI).

    Parameters
    ----------
    name : str
        The gas's name.
    R : float
        Specific gas constant (J/(kg·K)).
    M : float or None
        Molar mass (kg/mol), None when only R is known.
    cp_const : float or None
        c_p (J/(kg·K)) of the constant model; None for c_p⁰(T).
    internal : str or None
        The real fluid whose ideal-gas part gives c_p⁰(T).
    T_min, T_max : float
        Temperature range (K).
    source : str
        The model and its source, as cited in results.

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> gas_model("air | k = 1.4").constant
    True
    """

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
        """True for the constant-c_p model."""
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

    Parameters
    ----------
    text : str
        ``"air"`` (c_p⁰(T) of its equation of state), ``"air | k = 1.4"``,
        ``"air | cp = 1.005 kJ/(kg*K)"``, ``"R = 0.287 kJ/(kg*K) | cp = 1.005"``.
    system : UnitSystem, optional
        Unit system of constants written without a unit.

    Returns
    -------
    GasModel
        The model, cached.

    Raises
    ------
    BadInput
        Unknown gas, unknown key, or inconsistent constants (k ≤ 1, c_p ≤ R).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> round(gas_model("air | k = 1.4").cp_const, 2)       # k·R/(k − 1)
    1004.67
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
    r"""Isobaric specific heat of the ideal gas, c_p⁰(T).

    .. math:: c_p^0(T) = T\,\frac{ds^0}{dT}

    Parameters
    ----------
    g : GasModel
        The gas.
    T : float
        Temperature (K).

    Returns
    -------
    float
        c_p⁰ (J/(kg·K)).

    Raises
    ------
    OutOfRange
        T outside the model's range.

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> air = gas_model("air")
    >>> round(cp(air, 300.0), 1)
    1004.8
    """
    _check_T(g, T)
    return g.cp_const if g.constant else _ig(g.internal, T)[0]


def cv(g: GasModel, T: float) -> float:
    """Isochoric specific heat of the ideal gas.

    .. math:: c_v^0(T) = c_p^0(T) - R

    Parameters
    ----------
    g : GasModel
        The gas.
    T : float
        Temperature (K).

    Returns
    -------
    float
        c_v⁰ (J/(kg·K)).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> air = gas_model("air")
    >>> round(cp(air, 300.0) - cv(air, 300.0), 3) == round(air.R, 3)
    True
    """
    return cp(g, T) - g.R


def k(g: GasModel, T: float) -> float:
    """Ratio of specific heats of the ideal gas.

    .. math:: k(T) = c_p^0(T) / c_v^0(T)

    Parameters
    ----------
    g : GasModel
        The gas.
    T : float
        Temperature (K).

    Returns
    -------
    float
        k (dimensionless).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> air = gas_model("air")
    >>> round(k(air, 300.0), 4)
    1.3999
    """
    c = cp(g, T)
    return c / (c - g.R)


def delta_h(g: GasModel, T1: float, T2: float) -> float:
    r"""Enthalpy change of the ideal gas between two temperatures.

    .. math:: \Delta h = \int_{T_1}^{T_2} c_p^0\,dT

    Parameters
    ----------
    g : GasModel
        The gas.
    T1, T2 : float
        Initial and final temperature (K).

    Returns
    -------
    float
        Δh (J/kg).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> round(delta_h(gas_model("air | k = 1.4"), 300.0, 400.0), 2)   # c_p·ΔT
    100467.19
    """
    _check_T(g, T1, "T1")
    _check_T(g, T2, "T2")
    if g.constant:
        return g.cp_const * (T2 - T1)
    return _ig(g.internal, T2)[1] - _ig(g.internal, T1)[1]


def delta_u(g: GasModel, T1: float, T2: float) -> float:
    r"""Internal-energy change of the ideal gas between two temperatures.

    .. math:: \Delta u = \Delta h - R\,(T_2 - T_1)

    Parameters
    ----------
    g : GasModel
        The gas.
    T1, T2 : float
        Initial and final temperature (K).

    Returns
    -------
    float
        Δu (J/kg).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> round(delta_u(gas_model("air | k = 1.4"), 300.0, 400.0), 2)   # c_v·ΔT
    71762.28
    """
    return delta_h(g, T1, T2) - g.R * (T2 - T1)


def cp_mean(g: GasModel, T1: float, T2: float) -> float:
    r"""Mean isobaric specific heat over [T1, T2].

    .. math:: \bar c_p = \frac{\Delta h}{T_2 - T_1}

    (c_p⁰(T1) when T1 = T2).

    Parameters
    ----------
    g : GasModel
        The gas.
    T1, T2 : float
        The temperatures (K).

    Returns
    -------
    float
        Mean c_p (J/(kg·K)).

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> air = gas_model("air")
    >>> round(cp_mean(air, 300.0, 1000.0), 1)
    1065.6
    """
    if T1 == T2:
        return cp(g, T1)
    return delta_h(g, T1, T2) / (T2 - T1)


def delta_s(
    g: GasModel, T1: float, T2: float, P1: float | None = None, P2: float | None = None
) -> float:
    r"""Entropy change of the ideal gas.

    .. math:: \Delta s = s^0(T_2) - s^0(T_1) - R \ln(P_2/P_1)

    Without pressures, Δs⁰ at equal pressure.

    Parameters
    ----------
    g : GasModel
        The gas.
    T1, T2 : float
        Initial and final temperature (K).
    P1, P2 : float, optional
        Initial and final pressure (Pa); give both or neither.

    Returns
    -------
    float
        Δs (J/(kg·K)).

    Raises
    ------
    BadInput
        One pressure without the other, or a pressure ≤ 0.

    References
    ----------
    .. [1] E. W. Lemmon, R. T. Jacobsen, S. G. Penoncello, D. G. Friend, "Thermodynamic
       Properties of Air and Mixtures of Nitrogen, Argon, and Oxygen from 60 to 2000 K at
       Pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29 (2000) 331 (air's c_p⁰(T); each
       gas's from its own equation of state, via CoolProp).
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas relations).

    Examples
    --------
    >>> g = gas_model("air | k = 1.4")
    >>> abs(delta_s(g, 300.0, 300.0 * 8 ** (0.4 / 1.4), 1e5, 8e5)) < 1e-9   # isentropic
    True
    """
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
