"""Heat-transfer liquids: glycol–water and heat-transfer oils as incompressible liquids.

Names of our own, with the concentration written in them:

* ``ethylene glycol 40 %`` — ethylene glycol in water, 0–60 % by mass;
* ``propylene glycol 30 %`` — propylene glycol in water, 0–60 % by mass;
* ``hydrogenated terphenyl oil`` — a synthetic aromatic heat-transfer oil, 0–380 °C;
* ``white mineral oil`` — a paraffinic mineral heat-transfer oil, −10–315 °C.

The properties are the property library's fits for incompressible liquids [1]_: density,
c_p, h, u and s depend on temperature only (h = u + P·v), so there is no compressibility:
a liquid-full space with a rigid wall has no finite pressure, and the elastic wall (or a gas
cushion) gives the pressure, which is then an upper bound (the liquid's own compression
would lower it).  The glycol solutions are refused below their freezing temperature; the
expansion coefficient β = −(1/ρ)·dρ/dT is taken by a central difference of the fit.

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng. Chem. Res. 53 (2014)
   2498–2508 (CoolProp), incompressible liquids; the glycol solutions after Å. Melinder,
   *Properties of Secondary Working Fluids for Indirect Systems*, IIR, 2010 (from memory).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = ["Liquid", "liquid", "is_liquid_name", "at_T", "beta", "NAMES"]

_GLYCOL_RE = re.compile(
    r"^\s*(?P<base>ethylene|propylene)\s+glycol\s+(?P<pct>[0-9]+(?:\.[0-9]+)?)\s*%\s*$",
    re.IGNORECASE,
)
_OILS = {"hydrogenated terphenyl oil": "T66", "white mineral oil": "PNF"}
_GLYCOLS = {"ethylene": "MEG", "propylene": "MPG"}
NAMES = ("ethylene glycol N %", "propylene glycol N %", *_OILS)


@dataclass(frozen=True)
class Liquid:
    """An incompressible heat-transfer liquid.

    Parameters
    ----------
    name : str
        Our name (``ethylene glycol 40 %``).
    key : str
        The property library's key (never shown).
    fraction : float or None
        Mass fraction of the glycol (None for an oil).
    T_min, T_max : float
        Valid temperatures (K): the freezing point or the fit's lower end, and its upper end.

    References
    ----------
    .. [1] CoolProp incompressible liquids (Bell et al., Ind. Eng. Chem. Res. 53, 2014).

    Examples
    --------
    >>> liquid("ethylene glycol 40 %").fraction
    0.4
    """

    name: str
    key: str
    fraction: float | None
    T_min: float
    T_max: float


def is_liquid_name(name: str) -> bool:
    """Whether *name* names one of these liquids.

    .. math:: \\text{name} \\in \\{\\text{glycol } N\\,\\%,\\ \\text{oils}\\}

    Parameters
    ----------
    name : str
        A substance name.

    Returns
    -------
    bool
        True for a glycol solution with its concentration or a listed oil.

    References
    ----------
    .. [1] Names of our own (docs/design.md §2).

    Examples
    --------
    >>> is_liquid_name("Propylene glycol 30%"), is_liquid_name("water")
    (True, False)
    """
    s = str(name).strip().lower()
    return bool(_GLYCOL_RE.match(s)) or s in _OILS


def _coolprop():
    """The property library's module, imported on first use."""
    import CoolProp.CoolProp as CP  # noqa: N813

    return CP


def _state(key: str, fraction: float | None):
    AS = _coolprop().AbstractState("INCOMP", key)
    if fraction is not None:
        AS.set_mass_fractions([fraction])
    return AS


@lru_cache(maxsize=64)
def liquid(name: str) -> Liquid:
    """The liquid named *name*, its range checked.

    .. math:: 0 \\le w_{glycol} \\le 0.6

    Parameters
    ----------
    name : str
        ``ethylene glycol 40 %``, ``propylene glycol 30 %``, ``hydrogenated terphenyl oil``,
        ``white mineral oil``.

    Returns
    -------
    Liquid
        The liquid with its temperature range.

    Raises
    ------
    BadInput
        An unknown name or a concentration outside 0–60 %.

    References
    ----------
    .. [1] CoolProp incompressible liquids (Bell et al. 2014); glycols after Melinder (2010).

    Examples
    --------
    >>> round(liquid("ethylene glycol 40 %").T_min - 273.15, 1)   # freezes at about −24 °C
    -23.8
    """
    s = " ".join(str(name).strip().lower().split())
    m = _GLYCOL_RE.match(s)
    if m:
        pct = float(m.group("pct"))
        if not 0 < pct <= 60:
            raise BadInput(
                f"{name!r}: the glycol concentration {fmt_value(pct)} % lies outside 0–60 % "
                "by mass (the data's range)"
            )
        key, x = _GLYCOLS[m.group("base").lower()], pct / 100.0
        CP = _coolprop()
        T_freeze = CP.PropsSI("T_freeze", "T", 300.0, "P", 101325.0, f"INCOMP::{key}[{x}]")
        AS = _state(key, x)
        text = f"{m.group('base').lower()} glycol {fmt_value(pct)} %"
        return Liquid(text, key, x, max(T_freeze, AS.Tmin()), AS.Tmax())
    if s in _OILS:
        AS = _state(_OILS[s], None)
        return Liquid(s, _OILS[s], None, AS.Tmin(), AS.Tmax())
    raise BadInput(f"{name!r} is not a listed heat-transfer liquid: use {', '.join(NAMES)}")


def _check_T(liq: Liquid, T: float) -> None:
    if not (math.isfinite(T) and liq.T_min <= T <= liq.T_max):
        low = "freezing point" if liq.fraction is not None else "lower end"
        raise OutOfRange(
            f"{liq.name}: T = {fmt_value(T)} K lies outside {fmt_value(round(liq.T_min, 2))}–"
            f"{fmt_value(liq.T_max)} K (the {low} to the upper end of the data)"
        )


def at_T(liq: Liquid, T: float, P: float) -> tuple[float, float, float, float, float]:
    """Specific volume, u, h, s and c_p of the liquid at (T, P).

    .. math:: h = u + P\\,v, \\quad v = 1/\\rho(T)

    Parameters
    ----------
    liq : Liquid
        The liquid.
    T : float
        Temperature (K).
    P : float
        Pressure (Pa), > 0.

    Returns
    -------
    tuple of float
        v (m³/kg), u (J/kg), h (J/kg), s (J/(kg·K)), c_p (J/(kg·K)).

    Raises
    ------
    OutOfRange
        T outside the liquid's range or P not above 0.

    References
    ----------
    .. [1] CoolProp incompressible liquids (Bell et al. 2014).

    Examples
    --------
    >>> v, u, h, s, cp = at_T(liquid("ethylene glycol 40 %"), 293.15, 2e5)
    >>> round(1 / v, 1)
    1051.9
    """
    _check_T(liq, T)
    if not (math.isfinite(P) and P > 0):
        raise OutOfRange(f"{liq.name}: P = {fmt_value(P)} Pa must be above 0 (absolute)")
    AS = _state(liq.key, liq.fraction)
    AS.update(_coolprop().PT_INPUTS, P, T)
    v = 1.0 / AS.rhomass()
    u = AS.umass()
    return v, u, u + P * v, AS.smass(), AS.cpmass()


def beta(liq: Liquid, T: float) -> float:
    """Isobaric expansion coefficient of the liquid, by a central difference of ρ(T).

    .. math:: \\beta = -\\frac{1}{\\rho}\\frac{d\\rho}{dT}

    Parameters
    ----------
    liq : Liquid
        The liquid.
    T : float
        Temperature (K).

    Returns
    -------
    float
        β (1/K).

    References
    ----------
    .. [1] CoolProp incompressible liquids (Bell et al. 2014).

    Examples
    --------
    >>> round(beta(liquid("ethylene glycol 40 %"), 293.15) * 1e4, 2)
    4.54
    """
    _check_T(liq, T)
    dT = 0.01
    lo, hi = max(T - dT, liq.T_min), min(T + dT, liq.T_max)
    v_lo = at_T(liq, lo, 101325.0)[0]
    v_hi = at_T(liq, hi, 101325.0)[0]
    v = at_T(liq, T, 101325.0)[0]
    return (v_hi - v_lo) / ((hi - lo) * v)
