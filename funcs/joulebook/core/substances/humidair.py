"""Humid air: the property library's real-gas model of air and water vapour (ASHRAE
RP-1485 [1]_), and the water a compressed-air receiver condenses.

A state is fixed by the total pressure and two of: dry-bulb temperature T, relative humidity
RH (0 to 1), humidity ratio HR (kg water per kg dry air), dew point Tdp, wet-bulb temperature
Twb, enthalpy h per kg dry air.  Read back any of these and v (volume per kg dry air).

The state (T, HR) is solved and checked before anything is answered: supersaturated inputs
(RH > 1, a dew point above T, more water than the air holds) are refused even when the
wanted property is one of the inputs, and dry air (HR = 0) has no dew point.  The wet bulb is
the temperature of the adiabatic-saturation balance
h_s(Twb) = h(T, HR) + (HR_s(Twb) − HR)·h_w(Twb), solved here on liquid water at every
pressure of the model (on ice, below 273.16 K, by the model's own solver); (Twb, h) fixes a
state too, weakly, since h changes little along a wet-bulb line.  HR is written bare or
'in kg/kg' / 'in g/kg'.

**Condensate of a receiver**: air taken in at (P1, T1, RH1) carries HR1 = HR(P1, T1, RH1);
compressed and cooled to (P2, T2) it can hold at most HR_sat(P2, T2); the receiver of volume
V2 holds m_da = V2/v_sat(P2, T2) of dry air, and the water that falls out of that air is

    m_water = m_da · max(0, HR1 − HR_sat(P2, T2)).

References
----------
.. [1] S. Herrmann, H.-J. Kretzschmar, D. P. Gatley, "Thermodynamic properties of real moist
   air, dry air, steam, water, and ice", ASHRAE RP-1485, HVAC&R Research 15 (2009) 961–986;
   the property library's humid-air functions implement it.
"""

from __future__ import annotations

import math
import re

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = ["INPUTS", "OUTPUTS", "prop", "condensate", "MODEL"]

MODEL = "real humid air, ASHRAE RP-1485 (Herrmann, Kretzschmar & Gatley 2009) via CoolProp"
INPUTS = ("T", "RH", "HR", "Tdp", "Twb", "h")
OUTPUTS = ("T", "RH", "HR", "Tdp", "Twb", "h", "v")
_KEY = {"T": "T", "RH": "R", "HR": "W", "Tdp": "D", "Twb": "B", "h": "H", "v": "V", "P": "P"}
_WORDS = {
    "T": "T", "RH": "relative humidity RH", "HR": "humidity ratio HR", "Tdp": "dew point Tdp",
    "Twb": "wet-bulb temperature Twb", "h": "enthalpy h per kg dry air",
    "v": "volume v per kg dry air",
}  # fmt: skip


#: units of the humidity ratio, a mass of water per mass of dry air
_HR_UNITS = {"kg/kg": 1.0, "g/kg": 1e-3, "lb/lb": 1.0, "kg/kg_da": 1.0, "g/kg_da": 1e-3}
_HR_PHRASE = re.compile(r"^\s*HR\s*(?:in\s+|\[\s*)(?P<unit>[^\]]+?)\s*\]?\s*$")


def phrase(text, system, allowed: tuple):
    """A humid-air property phrase: the unit phrases of :func:`joulebook.core.units.parse_phrase`,
    and the humidity ratio also in ``kg/kg`` or ``g/kg`` (mass of water per mass of dry air).

    .. math:: HR = m_w / m_{da}

    Parameters
    ----------
    text : str
        ``"HR in kg/kg"``, ``"HR in g/kg"``, ``"T in degC"``, ``"RH in %"`` …
    system : UnitSystem
        The unit system of bare symbols.
    allowed : tuple of str
        The symbols accepted.

    Returns
    -------
    Phrase
        Symbol, kind, unit and SI map.

    References
    ----------
    .. [1] S. Herrmann, H.-J. Kretzschmar, D. P. Gatley, "Thermodynamic properties of real
       moist air, dry air, steam, water, and ice", ASHRAE RP-1485, HVAC&R Research 15 (2009)
       961–986.

    Examples
    --------
    >>> phrase("HR in g/kg", None, INPUTS).conv.to_si(12.0)
    0.012
    """
    from ..units import Conv, Phrase, parse_phrase

    m = _HR_PHRASE.match(str(text)) if isinstance(text, str) else None
    if m and "HR" in allowed:
        unit = m.group("unit").replace(" ", "")
        factor = _HR_UNITS.get(unit) or _HR_UNITS.get(unit.lower())
        if factor is not None:
            return Phrase("HR", "dimensionless", unit, Conv(factor, 0.0, unit))
    return parse_phrase(text, system, allowed)


def _ha():
    from CoolProp.HumidAirProp import HAPropsSI

    return HAPropsSI


_UNIT = {"T": " K", "Tdp": " K", "Twb": " K", "h": " J/kg", "HR": " kg/kg", "RH": "", "v": " m3/kg"}


def _show(sym: str, val: float) -> str:
    return f"{sym} = {fmt_value(val)}{_UNIT[sym]}"


def _check(sym: str, val: float) -> None:
    if not math.isfinite(val):
        raise BadInput(f"{sym} is not a finite number")
    if sym == "RH" and not 0 <= val <= 1:
        raise OutOfRange(
            f"RH = {fmt_value(val)}: the relative humidity lies in 0 to 1 (write 'RH in %' "
            "for percent); above 1 the air is supersaturated, which the model does not hold"
        )
    if sym == "HR" and not val >= 0:
        raise OutOfRange(f"HR = {fmt_value(val)} kg/kg: the humidity ratio must not be negative")
    if sym in ("T", "Tdp", "Twb") and not 130.0 <= val <= 623.15:
        raise OutOfRange(
            f"{sym} = {fmt_value(val)} K is outside the humid-air model's range 130–623.15 K"
        )


def prop(want: str, P: float, a: str, va: float, b: str, vb: float) -> float:
    r"""*want* of humid air at total pressure *P* (Pa) fixed by (*a*, *va*), (*b*, *vb*), SI.

    .. math:: RH = \frac{x_w\,P}{f\,P_{ws}(T)}, \qquad HR = \frac{m_w}{m_{da}}

    on the real-gas model of moist air.

    Parameters
    ----------
    want : str
        One of ``T RH HR Tdp Twb h v``.
    P : float
        Total pressure (Pa).
    a, b : str
        Two of ``T RH HR Tdp Twb h``.
    va, vb : float
        Their values, SI (RH as a fraction 0–1, h and v per kg dry air).

    Returns
    -------
    float
        The value, SI.

    Raises
    ------
    BadInput
        Unknown symbols or a repeated one.
    OutOfRange
        A value outside the model's range.

    References
    ----------
    .. [1] S. Herrmann, H.-J. Kretzschmar, D. P. Gatley, "Thermodynamic properties of real moist
       air, dry air, steam, water, and ice", ASHRAE RP-1485, HVAC&R Research 15 (2009) 961–986.

    Examples
    --------
    >>> round(prop("Tdp", 101325.0, "T", 298.15, "RH", 0.5) - 273.15, 3)
    13.867
    """
    if want not in OUTPUTS:
        raise BadInput(f"want {want!r}: use one of {' '.join(OUTPUTS)}")
    for s in (a, b):
        if s not in INPUTS:
            raise BadInput(f"{s!r} does not fix humid air; use two of {' '.join(INPUTS)}")
    if a == b:
        raise BadInput(f"the two properties must differ (both are {a})")
    if {a, b} <= {"HR", "Tdp"}:
        raise BadInput("HR and Tdp say the same thing at a given pressure; give T with one")
    _check_P("P", P)
    _check(a, va)
    _check(b, vb)
    T, W = _state(P, a, va, b, vb)
    rh = _validate(P, T, W, a, va, b, vb)
    if want in (a, b):  # an input read back is the input, once the state is known to exist
        return va if want == a else vb
    if want == "T":
        return T
    if want == "HR":
        return W
    if want == "RH":
        return rh
    if want == "Tdp" and W == 0.0:
        raise OutOfRange("humid air: dry air (HR = 0, RH = 0) has no dew point")
    if want == "Twb":
        return _wet_bulb(P, T, W)
    return _ha_checked(want, P, "T", T, "HR", W)


def _check_P(name: str, P: float) -> None:
    if not 10.0 <= P <= 10e6:
        raise OutOfRange(
            f"{name} = {fmt_value(P / 1e3)} kPa is outside the humid-air model's range "
            "0.01–10,000 kPa"
        )


def _ha_checked(want: str, P: float, a: str, va: float, b: str, vb: float) -> float:
    """One call of the model, its failure a message naming the inputs."""
    try:
        val = _ha()(_KEY[want], "P", P, _KEY[a], va, _KEY[b], vb)
    except ValueError:
        raise OutOfRange(
            f"humid air: no state with {_show(a, va)} and {_show(b, vb)} at "
            f"P = {fmt_value(P / 1e3)} kPa within the model (check RH ≤ 1, Tdp ≤ T)"
        ) from None
    if not math.isfinite(val):
        raise OutOfRange(f"humid air: the {_WORDS[want]} is not defined at this state")
    return val


def _state(P: float, a: str, va: float, b: str, vb: float) -> tuple[float, float]:
    """(T, HR) of the state the inputs fix, solved before anything is answered."""
    pair = {a: va, b: vb}
    if "T" in pair:
        other = b if a == "T" else a
        T = pair["T"]
        if other == "HR":
            return T, pair["HR"]
        if other == "Twb":
            return T, _hr_from_wet_bulb(P, T, pair["Twb"])
        return T, _ha_checked("HR", P, a, va, b, vb)
    if set(pair) == {"Twb", "h"}:
        return _from_wet_bulb_and_h(P, pair["Twb"], pair["h"])
    T = _ha_checked("T", P, a, va, b, vb)
    W = pair["HR"] if "HR" in pair else _ha_checked("HR", P, a, va, b, vb)
    return T, W


def _validate(P, T, W, a, va, b, vb) -> float:
    """The relative humidity of the state; refuses supersaturated air (RH > 1) and a
    temperature outside the model, naming the inputs."""
    if not 130.0 <= T <= 623.15:
        raise OutOfRange(
            f"humid air: {_show(a, va)} and {_show(b, vb)} give T = "
            f"{fmt_value(T)} K, outside the model's range 130–623.15 K"
        )
    if not (math.isfinite(W) and W >= 0):
        raise OutOfRange(f"humid air: {a} and {b} give no humidity ratio at this pressure")
    try:
        rh = _ha()("R", "P", P, "T", T, "W", W)
    except ValueError:  # the model refuses RH outside 0 to 1
        rh = float("inf")
    if not rh <= 1 + 1e-7:
        raise OutOfRange(
            f"humid air: {_show(a, va)} and {_show(b, vb)} at "
            f"P = {fmt_value(P / 1e3)} kPa would be supersaturated (more water than air at "
            f"T = {fmt_value(T)} K holds: RH > 1; check Tdp ≤ T)"
        )
    return min(rh, 1.0)


def _h_water(P: float, T: float) -> float:
    """Enthalpy of liquid water at (T, P) on IAPWS-95, the model's water reference."""
    import CoolProp.CoolProp as CP

    return CP.PropsSI("H", "T", T, "P", P, "Water")


def _adiabatic_saturation(P: float, T: float, W: float, Tw: float) -> float:
    """h_s(Tw) − h(T, W) − (W_s(Tw) − W)·h_w(Tw): zero at the wet-bulb temperature."""
    ws = _ha()("W", "P", P, "T", Tw, "R", 1.0)
    hs = _ha()("H", "P", P, "T", Tw, "W", ws)
    return hs - _ha()("H", "P", P, "T", T, "W", W) - (ws - W) * _h_water(P, Tw)


def _wet_bulb(P: float, T: float, W: float) -> float:
    """Twb by the adiabatic-saturation balance on liquid water, solved here at every pressure
    (the model's own solver gives up above about 1 MPa); below the triple point (a wet bulb
    on ice) the model's solver."""
    from scipy.optimize import brentq

    lo = 273.16
    try:
        f_lo = _adiabatic_saturation(P, T, W, lo)
        f_hi = _adiabatic_saturation(P, T, W, T)
    except ValueError:
        f_lo = f_hi = float("nan")
    if f_lo < 0 < f_hi:
        return float(brentq(lambda t: _adiabatic_saturation(P, T, W, t), lo, T, xtol=1e-10))
    if f_hi == 0:
        return T
    try:
        val = _ha()("B", "P", P, "T", T, "W", W)
        if math.isfinite(val):
            return val
    except ValueError:
        pass
    raise OutOfRange(
        f"humid air: no wet-bulb temperature found at T = {fmt_value(T)} K, "
        f"HR = {fmt_value(W)}, P = {fmt_value(P / 1e3)} kPa"
    )


def _hr_from_wet_bulb(P: float, T: float, Twb: float) -> float:
    """HR of air at T whose wet bulb is Twb (≤ T): the adiabatic saturation balance."""
    if Twb > T + 1e-9:
        raise OutOfRange(
            f"humid air: the wet-bulb temperature Twb = {fmt_value(Twb)} K lies above "
            f"T = {fmt_value(T)} K; it is at most T"
        )
    from scipy.optimize import brentq

    g0 = g1 = float("nan")
    if Twb >= 273.16:
        try:
            ws = _ha()("W", "P", P, "T", Twb, "R", 1.0)
            g = lambda w: _adiabatic_saturation(P, T, w, Twb)  # noqa: E731
            g0, g1 = g(0.0), g(ws)
        except ValueError:
            pass
    if g0 >= 0 >= g1:
        return 0.0 if g0 == 0 else float(brentq(g, 0.0, ws, xtol=1e-14))
    try:
        return _ha()("W", "P", P, "T", T, "B", Twb)  # a wet bulb on ice: the model's solver
    except ValueError:
        raise OutOfRange(
            f"humid air: no state with T = {fmt_value(T)} K and Twb = {fmt_value(Twb)} K at "
            f"P = {fmt_value(P / 1e3)} kPa within the model"
        ) from None


def _from_wet_bulb_and_h(P: float, Twb: float, h: float) -> tuple[float, float]:
    """(T, HR) on the wet-bulb line Twb whose enthalpy is h.  Along a wet-bulb line
    h = h_s(Twb) − (W_s − W)·h_w(Twb) falls as T rises (W falls), so one T fits; the fall is
    small, so h fixes T weakly: an error δh moves T by about δh / (h_w·|dW/dT|)."""
    from scipy.optimize import brentq

    def f(T: float) -> float:
        try:
            W = _hr_from_wet_bulb(P, T, Twb)
            return _ha()("H", "P", P, "T", T, "W", W) - h
        except (ValueError, OutOfRange):
            return float("nan")

    lo, hi = Twb, min(623.15, Twb + 300.0)
    f_lo, f_hi = f(lo), f(hi)
    for _ in range(60):  # the line ends where the air is dry (W = 0): close in on that end
        if f_hi == f_hi:
            break
        hi = 0.5 * (lo + hi)
        f_hi = f(hi)
    if not (f_lo >= 0 >= f_hi):
        raise OutOfRange(
            f"humid air: no state with Twb = {fmt_value(Twb)} K and h = {fmt_value(h)} J/kg at "
            f"P = {fmt_value(P / 1e3)} kPa (h lies between the saturated h at Twb and the dry "
            "air's)"
        )
    T = lo if f_lo == 0 else hi if f_hi == 0 else float(brentq(f, lo, hi, xtol=1e-10))
    return T, _hr_from_wet_bulb(P, T, Twb)


def condensate(P1: float, T1: float, RH1: float, P2: float, T2: float, V2: float) -> float:
    r"""Water condensed from the air that fills a receiver after compression and cooling.

    .. math:: m_w = \frac{V_2}{v_{sat}(P_2, T_2)}\,\max\big(0,\ HR_1 - HR_{sat}(P_2, T_2)\big)

    Parameters
    ----------
    P1 : float
        Intake pressure (Pa).
    T1 : float
        Intake temperature (K).
    RH1 : float
        Intake relative humidity (0–1).
    P2 : float
        Receiver pressure (Pa).
    T2 : float
        Receiver temperature (K).
    V2 : float
        Receiver volume (m³), > 0.

    Returns
    -------
    float
        Condensed water (kg).

    References
    ----------
    .. [1] S. Herrmann, H.-J. Kretzschmar, D. P. Gatley, "Thermodynamic properties of real moist
       air, dry air, steam, water, and ice", ASHRAE RP-1485, HVAC&R Research 15 (2009) 961–986.

    Examples
    --------
    >>> round(condensate(101325.0, 303.15, 0.7, 901325.0, 308.15, 1.0), 4)
    0.1509
    """
    if not V2 > 0:
        raise BadInput(f"V_2 = {fmt_value(V2)} m3: the receiver volume must be above 0")
    # each argument checked under its own name before the model sees it
    for name, val in (("P_1", P1), ("P_2", P2)):
        if not math.isfinite(val):
            raise BadInput(f"{name} is not a finite number")
        _check_P(name, val)
    for name, val in (("T_1", T1), ("T_2", T2)):
        if not (math.isfinite(val) and 130.0 <= val <= 623.15):
            raise OutOfRange(
                f"{name} = {fmt_value(val)} K is outside the humid-air model's range 130–623.15 K"
            )
    if not (math.isfinite(RH1) and 0 <= RH1 <= 1):
        raise OutOfRange(f"RH_1 = {fmt_value(RH1)}: the relative humidity lies in 0 to 1")
    try:
        hr1 = prop("HR", P1, "T", T1, "RH", RH1)
    except OutOfRange:
        raise OutOfRange(
            f"humid air: no intake state at P_1 = {fmt_value(P1 / 1e3)} kPa, T_1 = "
            f"{fmt_value(T1)} K, RH_1 = {fmt_value(RH1)} within the model"
        ) from None
    try:
        hr_sat = prop("HR", P2, "T", T2, "RH", 1.0)
        v_sat = prop("v", P2, "T", T2, "RH", 1.0)
    except OutOfRange:
        raise OutOfRange(
            f"humid air: no saturated receiver state at P_2 = {fmt_value(P2 / 1e3)} kPa, T_2 = "
            f"{fmt_value(T2)} K within the model (T_2 must lie below the boiling point at P_2)"
        ) from None
    return V2 / v_sat * max(0.0, hr1 - hr_sat)
