"""Humid air: the property library's real-gas model of air and water vapour (ASHRAE
RP-1485 [1]_), and the water a compressed-air receiver condenses.

A state is fixed by the total pressure and two of: dry-bulb temperature T, relative humidity
RH (0 to 1), humidity ratio HR (kg water per kg dry air), dew point Tdp, wet-bulb temperature
Twb, enthalpy h per kg dry air.  Read back any of these and v (volume per kg dry air).

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


def _ha():
    from CoolProp.HumidAirProp import HAPropsSI

    return HAPropsSI


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
    if not 10.0 <= P <= 10e6:
        raise OutOfRange(
            f"P = {fmt_value(P / 1e3)} kPa is outside the humid-air model's range 0.01–10,000 kPa"
        )
    _check(a, va)
    _check(b, vb)
    if want in (a, b):
        return va if want == a else vb
    try:
        val = _ha()(_KEY[want], "P", P, _KEY[a], va, _KEY[b], vb)
    except ValueError:
        raise OutOfRange(
            f"humid air: no state with {a} = {fmt_value(va)} and {b} = {fmt_value(vb)} at "
            f"P = {fmt_value(P / 1e3)} kPa within the model (check RH ≤ 1, Tdp ≤ T)"
        ) from None
    if not math.isfinite(val):
        raise OutOfRange(f"humid air: the {_WORDS[want]} is not defined at this state")
    if want == "RH" and val > 1 + 1e-9:
        raise OutOfRange(
            f"humid air: these inputs give RH = {fmt_value(val)} > 1, supersaturated air, which "
            "the model does not hold (fog or condensate would form)"
        )
    return val


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
    hr1 = prop("HR", P1, "T", T1, "RH", RH1)
    hr_sat = prop("HR", P2, "T", T2, "RH", 1.0)
    v_sat = prop("v", P2, "T", T2, "RH", 1.0)
    return V2 / v_sat * max(0.0, hr1 - hr_sat)
