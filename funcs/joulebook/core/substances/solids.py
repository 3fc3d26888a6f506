"""Incompressible solids and liquids: c(T) with its source and valid range.

For an incompressible substance c_p = c_v = c, and the sensible energy change is
Δu = ∫_{T1}^{T2} c(T) dT (J/kg); Δh differs from Δu only by v·ΔP, which this model neglects.

Each material carries one of two c(T) forms, integrated exactly:

* ``nasa7`` / ``nasa9``: the NASA polynomial fits of McBride, Gordon & Reno (NASA TM-4513,
  1993) for condensed species, piecewise in temperature; c/R = Σ aᵢ Tⁱ⁻¹ (7-term) or
  Σ aᵢ Tⁱ⁻³ (9-term), R = 8.314462618 J/(mol·K).
* ``table``: c at tabulated temperatures, linear between them (so ∫c dT is the trapezoid
  rule, exact for the interpolant).
* ``en1993``: the equation for carbon steel of EN 1993-1-2:2005, §3.4.1.2, eq. (3.2),
  piecewise in temperature and integrated in closed form.

Values outside a material's range are refused, never extrapolated.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = ["Material", "MATERIALS", "material", "c", "delta_u", "c_mean", "material_names"]

R_UNIVERSAL = 8.314462618  # J/(mol K), CODATA 2018 (exact)


@dataclass(frozen=True)
class Material:
    """An incompressible solid or liquid with its sourced c(T).

    Parameters
    ----------
    name : str
        Display name.
    aliases : tuple of str
        Other names accepted.
    form : str
        ``nasa7``, ``nasa9``, ``table`` or ``en1993``.
    data : tuple
        The coefficients or table of the form (see the module docstring).
    T_min, T_max : float
        Valid temperature range (K).
    source : str
        The data's source, as cited in results.
    molar_mass : float, optional
        kg/mol, for the NASA forms.
    note : str
        A remark shown with results.

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> material("steel").name
    'carbon steel'
    """

    name: str
    aliases: tuple[str, ...]
    form: str  # "nasa7", "nasa9", "table" or "en1993" (the Eurocode equation for steel)
    data: tuple  # see module docstring
    T_min: float
    T_max: float
    source: str
    molar_mass: float | None = None  # kg/mol, for the NASA forms
    note: str = ""


# NASA TM-4513 condensed-species coefficients, as distributed in Cantera's nasa_condensed.yaml
_AL = (
    (200.0, 933.61, (1.01040191, 0.0120769743, -2.62083556e-05, 2.64282413e-08, -9.01916513e-12)),
)
_CU = (
    (200.0, 1000.0, (1.76672074, 7.34699432e-03, -1.5471296e-05, 1.50539591e-08, -5.24861335e-12)),
    (1000.0, 1358.0, (3.4200891, -1.61201394e-03, 3.05145917e-06, -2.11162788e-09, 6.99858397e-13)),
)
_FE = (
    (
        200.0,
        1000.0,
        (0.0, 0.0, 2.41337476, -1.57780744e-03, 2.14701339e-05, -3.80171438e-08, 2.20426984e-11),
    ),
    (
        1000.0,
        1042.0,
        (0.0, 0.0, 4690.80173, -9.90659991, 2.69427446e-03, 5.54445321e-06, -3.01659823e-09),
    ),
)

_MEMORY = "typical handbook value recalled from memory, not from a checked table"

MATERIALS: tuple[Material, ...] = (
    Material(
        "aluminium",
        ("aluminum", "Al", "pure aluminium"),
        "nasa7",
        _AL,
        200.0,
        933.61,
        "NASA TM-4513 (McBride, Gordon & Reno 1993), species Al(cr), data CODA89",
        molar_mass=0.026981538,
    ),
    Material(
        "copper",
        ("Cu", "pure copper"),
        "nasa7",
        _CU,
        200.0,
        1358.0,
        "NASA TM-4513 (McBride, Gordon & Reno 1993), species Cu(cr), data CODA89",
        molar_mass=0.063546,
    ),
    Material(
        "pure iron",
        ("iron", "Fe", "alpha iron"),
        "nasa9",
        _FE,
        200.0,
        1042.0,
        "NASA TM-4513 (McBride, Gordon & Reno 1993), species Fe(a), JANAF data 3/78 "
        "(alpha iron, up to the Curie point)",
        molar_mass=0.055845,
    ),
    Material(
        "carbon steel",
        ("steel", "mild steel", "plain carbon steel", "AISI 1010", "structural steel"),
        "en1993",
        (),
        250.0,
        1473.15,
        "carbon steel, EN 1993-1-2:2005 (Eurocode 3, structural fire design) §3.4.1.2, "
        "eq. (3.2), for 20–1200 °C, including the peak of the α–γ transformation at 735 °C "
        "(the equation transcribed from memory; check it against the standard)",
        note="below 20 °C the cubic of the first range is continued (406 J/(kg·K) at 250 K)",
    ),
    Material(
        "stainless steel",
        ("stainless", "SS304", "304", "AISI 304", "austenitic stainless steel"),
        "table",
        (
            (300.0, 477.0),
            (400.0, 515.0),
            (600.0, 557.0),
            (800.0, 582.0),
            (1000.0, 611.0),
            (1200.0, 640.0),
        ),
        250.0,
        1200.0,
        f"austenitic stainless steel AISI 304, {_MEMORY}; ±5 %",
        note="below 300 K the 300 K value is held",
    ),
    Material(
        "cast iron",
        ("grey cast iron", "gray cast iron"),
        "table",
        ((293.0, 460.0), (500.0, 510.0), (700.0, 560.0)),
        250.0,
        700.0,
        f"grey cast iron, {_MEMORY}; ±10 %",
        note="below 293 K the 293 K value is held",
    ),
    Material(
        "brass",
        ("cartridge brass", "70-30 brass", "CuZn30"),
        "table",
        ((300.0, 375.0), (400.0, 395.0), (600.0, 425.0)),
        250.0,
        600.0,
        f"cartridge brass (70 Cu, 30 Zn), {_MEMORY}; ±5 %",
        note="below 300 K the 300 K value is held",
    ),
    Material(
        "concrete",
        ("stone concrete", "normal-weight concrete"),
        "table",
        ((250.0, 880.0), (400.0, 880.0)),
        250.0,
        400.0,
        f"normal-weight (stone-mix) concrete, dry, {_MEMORY}; ±10 %, varies with mix and moisture",
    ),
    Material(
        "glass",
        ("soda-lime glass", "plate glass", "window glass"),
        "table",
        ((250.0, 750.0), (350.0, 750.0)),
        250.0,
        350.0,
        f"soda-lime plate glass, {_MEMORY}; ±10 %",
    ),
    Material(
        "borosilicate glass",
        ("pyrex", "borosilicate"),
        "table",
        ((300.0, 835.0), (400.0, 908.0), (600.0, 1038.0), (800.0, 1122.0)),
        300.0,
        800.0,
        f"borosilicate glass, {_MEMORY}; ±5 %",
    ),
    Material(
        "granite",
        ("granite rock",),
        "table",
        ((250.0, 775.0), (400.0, 775.0)),
        250.0,
        400.0,
        f"granite, {_MEMORY}; ±10 %, varies with mineral content",
    ),
    Material(
        "water",
        ("liquid water", "H2O liquid"),
        "table",
        (
            (273.15, 4219.4),
            (275.0, 4213.5),
            (280.0, 4200.9),
            (285.0, 4192.4),
            (290.0, 4186.6),
            (295.0, 4182.9),
            (300.0, 4180.6),
            (305.0, 4179.5),
            (310.0, 4179.2),
            (315.0, 4179.6),
            (320.0, 4180.5),
            (325.0, 4181.9),
            (330.0, 4183.7),
            (335.0, 4185.8),
            (340.0, 4188.3),
            (345.0, 4191.2),
            (350.0, 4194.5),
            (355.0, 4198.2),
            (360.0, 4202.3),
            (365.0, 4207.0),
            (370.0, 4212.1),
            (373.12, 4215.6),
        ),
        273.15,
        373.12,
        "liquid water at 101.325 kPa: c_p tabulated from IAPWS-95 (CoolProp 8.0.0) every 5 K, "
        "rounded to 0.1 J/(kg K); interpolation error < 0.05 %; from the ice point at 1 atm "
        "(0 °C, 2.5 mK below the melting line, where IAPWS-95 extrapolates smoothly)",
    ),
    Material(
        "engine oil",
        ("oil", "unused engine oil", "lubricating oil"),
        "table",
        ((273.0, 1796.0), (300.0, 1909.0), (350.0, 2118.0), (400.0, 2337.0), (430.0, 2471.0)),
        273.0,
        430.0,
        f"unused engine oil, {_MEMORY}; ±5 %",
    ),
)


def _key(name: str) -> str:
    return re.sub(r"[\s\-_]", "", str(name)).lower()


@lru_cache(maxsize=1)
def _index() -> dict[str, Material]:
    idx: dict[str, Material] = {}
    for m in MATERIALS:
        for n in (m.name, *m.aliases):
            k = _key(n)
            assert k not in idx, f"duplicate material alias {n}"
            idx[k] = m
    return idx


def material_names() -> list[str]:
    """Display names of every material, in the catalogue's order.

    Returns
    -------
    list of str
        The names :func:`material` accepts (aliases aside).

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> material_names()[:2]
    ['aluminium', 'copper']
    """
    return [m.name for m in MATERIALS]


def material(name: str) -> Material:
    """Resolve a material name or alias.

    Parameters
    ----------
    name : str
        ``"copper"``, ``"carbon steel"``, ``"concrete"`` …

    Returns
    -------
    Material
        The material and its c(T).

    Raises
    ------
    BadInput
        Unknown material; the message lists the known ones.

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> material("Copper").form
    'nasa7'
    """
    m = _index().get(_key(name))
    if m is None:
        raise BadInput(
            f"unknown material {fmt_value(str(name))}; known: " + ", ".join(material_names())
        )
    return m


def _clamp_low(m: Material, T: float) -> float:
    # tables whose first point lies above T_min hold the first value (stated in the note)
    return max(T, m.data[0][0]) if m.form == "table" else T


def _check(m: Material, T: float, arg: str) -> None:
    if not (T == T) or math.isinf(T):
        raise BadInput(f"{arg} is not a finite number")
    if not (m.T_min <= T <= m.T_max):
        raise OutOfRange(
            f"{m.name}: {arg} = {fmt_value(T)} K is outside the data's range "
            f"{fmt_value(m.T_min)}–{fmt_value(m.T_max)} K"
        )


def _poly_piece(m: Material, T: float):
    for lo, hi, a in m.data:
        if lo <= T <= hi:
            return lo, hi, a
    raise OutOfRange(f"{m.name}: T = {fmt_value(T)} K outside the fitted ranges")


def _nasa_cp_R(form: str, a, T: float) -> float:
    if form == "nasa7":
        return a[0] + T * (a[1] + T * (a[2] + T * (a[3] + T * a[4])))
    return a[0] / T**2 + a[1] / T + a[2] + T * (a[3] + T * (a[4] + T * (a[5] + T * a[6])))


def _nasa_int_R(form: str, a, T: float) -> float:
    """∫ c/R dT (antiderivative) at T."""
    if form == "nasa7":
        return T * (a[0] + T * (a[1] / 2 + T * (a[2] / 3 + T * (a[3] / 4 + T * a[4] / 5))))
    return (
        -a[0] / T
        + a[1] * math.log(T)
        + a[2] * T
        + a[3] * T**2 / 2
        + a[4] * T**3 / 3
        + a[5] * T**4 / 4
        + a[6] * T**5 / 5
    )


def _en1993_c(T: float) -> float:
    """c of carbon steel, EN 1993-1-2 eq. (3.2), θ in °C: a cubic to 600 °C, a rise to the
    transformation peak of 5000 J/(kg·K) at 735 °C, a fall to 900 °C, then constant."""
    t = T - 273.15
    if t < 600.0:
        return 425.0 + 7.73e-1 * t - 1.69e-3 * t**2 + 2.22e-6 * t**3
    if t < 735.0:
        return 666.0 + 13002.0 / (738.0 - t)
    if t < 900.0:
        return 545.0 + 17820.0 / (t - 731.0)
    return 650.0


def _en1993_int(T: float) -> float:
    """∫ c dT of eq. (3.2) from 0 °C to T, piece by piece in closed form (J/kg)."""

    def cubic(t: float) -> float:
        return 425.0 * t + 7.73e-1 * t**2 / 2 - 1.69e-3 * t**3 / 3 + 2.22e-6 * t**4 / 4

    def rise(t: float) -> float:
        return 666.0 * t - 13002.0 * math.log(738.0 - t)

    def fall(t: float) -> float:
        return 545.0 * t + 17820.0 * math.log(t - 731.0)

    t = T - 273.15
    total = cubic(min(t, 600.0))
    if t > 600.0:
        total += rise(min(t, 735.0)) - rise(600.0)
    if t > 735.0:
        total += fall(min(t, 900.0)) - fall(735.0)
    if t > 900.0:
        total += 650.0 * (t - 900.0)
    return total


def c(m: Material, T: float) -> float:
    r"""Specific heat c(T) of the material (c_p = c_v = c, incompressible).

    .. math:: c(T) = R/M \sum_i a_i T^{i-1} \quad\text{(NASA 7-term form)}

    Parameters
    ----------
    m : Material
        The material.
    T : float
        Temperature (K).

    Returns
    -------
    float
        c (J/(kg·K)).

    Raises
    ------
    OutOfRange
        T outside the material's range.

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> round(c(material("copper"), 300.0), 1)
    385.0
    """
    _check(m, T, "T")
    if m.form == "en1993":
        return _en1993_c(T)
    if m.form == "table":
        return _table_c(m.data, _clamp_low(m, T))
    _, _, a = _poly_piece(m, T)
    return _nasa_cp_R(m.form, a, T) * R_UNIVERSAL / m.molar_mass


def _table_c(data, T: float) -> float:
    for (t0, c0), (t1, c1) in zip(data, data[1:]):
        if t0 <= T <= t1:
            return c0 + (c1 - c0) * (T - t0) / (t1 - t0)
    return data[-1][1]


def _table_int(data, T: float) -> float:
    """∫_{T_first}^{T} c dT for the piecewise-linear table."""
    total = 0.0
    for (t0, c0), (t1, c1) in zip(data, data[1:]):
        if T <= t0:
            break
        hi = min(T, t1)
        c_hi = c0 + (c1 - c0) * (hi - t0) / (t1 - t0)
        total += 0.5 * (c0 + c_hi) * (hi - t0)
    return total


def _antiderivative(m: Material, T: float) -> float:
    if m.form == "en1993":
        return _en1993_int(T)
    if m.form == "table":
        first_T, first_c = m.data[0]
        if T < first_T:  # held constant below the first point
            return first_c * (T - first_T)
        return _table_int(m.data, T)
    total = 0.0
    for lo, hi, a in m.data:
        top = min(T, hi)
        if top <= lo:
            break
        total += _nasa_int_R(m.form, a, top) - _nasa_int_R(m.form, a, lo)
    return total * R_UNIVERSAL / m.molar_mass


def delta_u(m: Material, T1: float, T2: float) -> float:
    r"""Sensible internal-energy change, negative on cooling.

    .. math:: \Delta u = \int_{T_1}^{T_2} c(T)\,dT

    Parameters
    ----------
    m : Material
        The material.
    T1, T2 : float
        Initial and final temperature (K).

    Returns
    -------
    float
        Δu (J/kg).

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> round(delta_u(material("copper"), 300.0, 400.0) / 1e3, 2)   # kJ/kg
    39.34
    """
    _check(m, T1, "T1")
    _check(m, T2, "T2")
    return _antiderivative(m, T2) - _antiderivative(m, T1)


def c_mean(m: Material, T1: float, T2: float) -> float:
    r"""Mean specific heat over [T1, T2].

    .. math:: \bar c = \frac{\Delta u}{T_2 - T_1}

    (c(T1) when T1 = T2).

    Parameters
    ----------
    m : Material
        The material.
    T1, T2 : float
        The temperatures (K).

    Returns
    -------
    float
        Mean c (J/(kg·K)).

    References
    ----------
    .. [1] B. J. McBride, S. Gordon, M. A. Reno, *Coefficients for Calculating Thermodynamic
       and Transport Properties of Individual Species*, NASA TM-4513, 1993 (condensed species).
    .. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural
       fire design*, §3.4.1.2, eq. (3.2) (carbon steel).

    Examples
    --------
    >>> round(c_mean(material("copper"), 300.0, 400.0), 1)
    393.4
    """
    if T1 == T2:
        return c(m, T1)
    return delta_u(m, T1, T2) / (T2 - T1)
