"""Stored expansion energy of a pressurized gas volume, and of a flashing liquid.

Three estimates for a gas, each labelled with what it is:

``isentropic``        E = m·(u1 − u2s): the work a reversible adiabatic expansion to ambient
                      pressure would deliver, on the fluid's equation of state (real-gas
                      effects and condensation included); no deduction for the work of
                      pushing back the atmosphere.
``ideal isentropic``  E = P·V/(k − 1)·[1 − (P_amb/P)^((k − 1)/k)]: the same for an ideal gas
                      with constant k.
``isochoric``         E = (P − P_amb)·V/(k − 1): the energy released if the pressure fell to
                      ambient at constant volume; the largest of the three for the same gas,
                      often used as a conservative bound.

A liquid stored above its boiling point at ambient pressure (a liquefied gas, hot water)
flashes when released: part of it boils and the vapour expands.  Its expansion energy is
``flashing liquid``: E = m·(u1 − u2) with state 2 the liquid and flash vapour at ambient
pressure and s2 = s1 (the isentropic expansion of the process-safety literature on vessel
bursts of liquefied gases [1]_, an upper bound of the energy the blast receives [2]_).
The gas estimates refuse such contents, since their model is a gas that expands.

Caution: these are estimates for judging pneumatic tests and gas receivers.  Pressure tests
and pressure equipment are governed by the applicable codes and standards and by a competent,
licensed engineer.  The energy of a flashing liquid is not its blast: only a part of it
drives the blast wave, the rest goes to fragments and the fireball of a flammable release.

References
----------
.. [1] Center for Chemical Process Safety, *Guidelines for Vapor Cloud Explosion, Pressure
   Vessel Burst, BLEVE, and Flash Fire Hazards*, 2nd ed., Wiley/AIChE, 2010 (expansion
   energy of a flashing liquid by isentropic expansion to ambient pressure; from memory).
.. [2] E. Planas-Cuchi, J. M. Salla, J. Casal, "Calculating overpressure from BLEVE
   explosions", J. Loss Prev. Process Ind. 17 (2004) 431–436 (the isentropic expansion as
   an upper bound of the mechanical energy released; from memory).
"""

from __future__ import annotations

import math

from ..errors import OutOfRange, fmt_value
from ..media import Point

__all__ = [
    "isentropic",
    "ideal_isentropic",
    "isochoric",
    "flashing_liquid",
    "holds_liquid",
    "flashes",
    "described",
    "STANDARD_ATMOSPHERE",
]

STANDARD_ATMOSPHERE = 101_325.0


def _check(P: float, V: float, P_amb: float) -> None:
    if not V > 0:
        raise OutOfRange(f"V = {fmt_value(V)} m3 must be > 0")
    if not P_amb > 0:
        raise OutOfRange(f"P_amb = {fmt_value(P_amb)} Pa must be > 0 (absolute)")
    if not P > P_amb:
        raise OutOfRange(
            f"P = {fmt_value(P / 1e3)} kPa is not above ambient {fmt_value(P_amb / 1e3)} kPa: "
            "nothing is stored (check gauge vs absolute)"
        )


def isentropic(med, p1: Point, V: float, P_amb: float = STANDARD_ATMOSPHERE, shows=None) -> float:
    r"""Stored energy of a gas volume: the work of a reversible adiabatic expansion to ambient.

    .. math:: E = m\,(u_1 - u_2), \quad s_2 = s_1,\; P_2 = P_{amb},\; m = V/v_1

    Parameters
    ----------
    med : medium
        The gas (:func:`joulebook.core.media.medium`).
    p1 : Point
        The stored state.
    V : float
        Volume (m³, > 0).
    P_amb : float
        Ambient pressure (Pa).
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    float
        E (J).

    Raises
    ------
    OutOfRange
        P at or below ambient, or V ≤ 0.

    References
    ----------
    .. [1] Isentropic expansion energy of a compressed gas and the isochoric bound (common
       practice); Y. A. Çengel, M. A. Boles, *Thermodynamics*, 9th ed., 2019, §7-9
       (isentropic ideal-gas relations).

    Caution: estimates; pressure tests are governed by the applicable codes and a competent,
    licensed engineer.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> E = isentropic(air, air.point("T", 300.0, "P", 1e6), 1.0)
    >>> round(E / ideal_isentropic(1e6, 1.0, 1.4), 9)               # the same for an ideal gas
    1.0
    """
    _check(p1.P, V, P_amb)
    p2 = med.point("P", P_amb, "s", p1.s, shows)
    return V / p1.v * (p1.u - p2.u)


_LIQUID_WORDS = ("liquid", "bubble point")


def holds_liquid(p: Point) -> bool:
    """Whether a state holds liquid: a compressed or saturated liquid, or a two-phase mixture.

    Parameters
    ----------
    p : Point
        The state.

    Returns
    -------
    bool
        True for liquid or liquid and vapour (quality x < 1).

    References
    ----------
    .. [1] Center for Chemical Process Safety, *Guidelines for Vapor Cloud Explosion, Pressure
       Vessel Burst, BLEVE, and Flash Fire Hazards*, 2nd ed., Wiley/AIChE, 2010 (from memory).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> holds_liquid(w.point("T", 373.15, "x", 0.5)), holds_liquid(w.point("T", 400.0, "x", 1.0))
    (True, False)
    """
    if p.x is not None:
        return p.x < 1.0
    return any(w in p.phase for w in _LIQUID_WORDS)


def flashes(med, p1: Point, P_amb: float = STANDARD_ATMOSPHERE, shows=None) -> bool:
    """Whether liquid contents boil when expanded isentropically to ambient pressure.

    Parameters
    ----------
    med : medium
        The fluid.
    p1 : Point
        The stored state.
    P_amb : float
        Ambient pressure (Pa).
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    bool
        True when the contents hold liquid and the expanded state holds vapour.

    References
    ----------
    .. [1] Center for Chemical Process Safety, *Guidelines for Vapor Cloud Explosion, Pressure
       Vessel Burst, BLEVE, and Flash Fire Hazards*, 2nd ed., Wiley/AIChE, 2010 (from memory).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> flashes(w, w.point("T", 423.15, "P", 1.2e6)), flashes(w, w.point("T", 293.15, "P", 1.2e6))
    (True, False)
    """
    if not holds_liquid(p1) or not p1.P > P_amb:
        return False
    p2 = med.point("P", P_amb, "s", p1.s, shows)
    return p2.x is not None or not holds_liquid(p2)


def described(p: Point) -> str:
    """The phase of a state in words, with its quality inside the dome.

    Parameters
    ----------
    p : Point
        The state.

    Returns
    -------
    str
        E.g. ``saturated mixture (x = 0.3)``.

    References
    ----------
    .. [1] The phase words of :func:`joulebook.core.substances.fluids.phase_word` (common practice).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> described(medium("water").point("T", 373.15, "x", 0.3))
    'saturated mixture (x = 0.3)'
    """
    return p.phase if p.x is None or p.x in (0.0, 1.0) else f"{p.phase} (x = {fmt_value(p.x)})"


def flashing_liquid(
    med, p1: Point, V: float, P_amb: float = STANDARD_ATMOSPHERE, shows=None
) -> tuple[float, float]:
    r"""Expansion energy of a flashing liquid: isentropic expansion to ambient pressure.

    The contents (liquid, or liquid and vapour at quality x1 < 1) expand reversibly and
    adiabatically to ambient pressure, where the liquid has partly flashed to vapour:

    .. math:: E = m\,(u_1 - u_2), \quad s_2 = s_1,\; P_2 = P_{amb},\; m = V/v_1

    with the flash fraction x2 = (s1 − s_f)/(s_g − s_f) at P_amb.

    Parameters
    ----------
    med : medium
        The fluid (a real fluid or mixture with a two-phase region).
    p1 : Point
        The stored state: liquid or two-phase, above its boiling point at P_amb.
    V : float
        Volume of the contents (m³, > 0): the vessel volume they fill.
    P_amb : float
        Ambient pressure (Pa).
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    tuple of float
        ``(E, x2)``: E (J) and the mass fraction of vapour after the expansion.

    Raises
    ------
    OutOfRange
        P at or below ambient, V ≤ 0, contents that hold no liquid (a gas: use
        :func:`isentropic`), or a liquid below its boiling point at P_amb (no flash).

    References
    ----------
    .. [1] Center for Chemical Process Safety, *Guidelines for Vapor Cloud Explosion, Pressure
       Vessel Burst, BLEVE, and Flash Fire Hazards*, 2nd ed., Wiley/AIChE, 2010 (expansion
       energy of a flashing liquid by isentropic expansion to ambient pressure; from memory).
    .. [2] E. Planas-Cuchi, J. M. Salla, J. Casal, "Calculating overpressure from BLEVE
       explosions", J. Loss Prev. Process Ind. 17 (2004) 431–436 (the isentropic expansion
       as an upper bound of the mechanical energy released; from memory).

    Caution: an estimate of the energy, not of the blast; vessel bursts and fire cases are
    governed by the applicable codes and a competent, licensed engineer.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> E, x2 = flashing_liquid(w, w.point("T", 453.15, "x", 0.0), 1.0)
    >>> round(E / 1e6, 1), round(x2, 3)          # MJ for 1 m3 of water at 180 degC
    (49.4, 0.138)
    """
    _check(p1.P, V, P_amb)
    if not holds_liquid(p1):
        raise OutOfRange(
            f"the contents are {described(p1)}: they hold no liquid to flash; use "
            "JB_STORED_ISENTROPIC for a gas"
        )
    p2 = med.point("P", P_amb, "s", p1.s, shows)
    if p2.x is None and holds_liquid(p2):  # still all liquid at ambient pressure: no flash
        raise OutOfRange(
            f"T = {fmt_value(p1.T)} K: the liquid does not flash at P_amb = "
            f"{fmt_value(P_amb / 1e3)} kPa (no vapour forms); its energy is that of compression "
            "(JB_TEST_HYDRO_ENERGY)"
        )
    return V / p1.v * (p1.u - p2.u), 1.0 if p2.x is None else p2.x


def _k(k: float) -> None:
    if not 1.0 < k <= 1.7:
        raise OutOfRange(f"k = {fmt_value(k)} is outside 1 < k ≤ 1.7 for a gas")


def ideal_isentropic(P: float, V: float, k: float, P_amb: float = STANDARD_ATMOSPHERE) -> float:
    r"""Stored energy of an ideal gas with constant k, expanded isentropically to ambient.

    .. math:: E = \frac{P V}{k - 1}\left[1 - \left(\frac{P_{amb}}{P}\right)^{(k-1)/k}\right]

    Parameters
    ----------
    P : float
        Pressure (Pa, absolute, above P_amb).
    V : float
        Volume (m³, > 0).
    k : float
        Ratio of specific heats (> 1).
    P_amb : float
        Ambient pressure (Pa).

    Returns
    -------
    float
        E (J).

    References
    ----------
    .. [1] Isentropic expansion energy of a compressed gas and the isochoric bound (common
       practice); Y. A. Çengel, M. A. Boles, *Thermodynamics*, 9th ed., 2019, §7-9
       (isentropic ideal-gas relations).

    Caution: estimates; pressure tests are governed by the applicable codes and a competent,
    licensed engineer.

    Examples
    --------
    >>> round(ideal_isentropic(1e6, 1.0, 1.4) / 1e6, 4)   # MJ
    1.2003
    """
    _check(P, V, P_amb)
    _k(k)
    return P * V / (k - 1.0) * -math.expm1((k - 1.0) / k * math.log(P_amb / P))


def isochoric(P: float, V: float, k: float, P_amb: float = STANDARD_ATMOSPHERE) -> float:
    r"""Stored energy released if the pressure fell to ambient at constant volume (a bound).

    .. math:: E = \frac{(P - P_{amb})\,V}{k - 1}

    Parameters
    ----------
    P : float
        Pressure (Pa, absolute, above P_amb).
    V : float
        Volume (m³, > 0).
    k : float
        Ratio of specific heats (> 1).
    P_amb : float
        Ambient pressure (Pa).

    Returns
    -------
    float
        E (J).

    References
    ----------
    .. [1] Isentropic expansion energy of a compressed gas and the isochoric bound (common
       practice); Y. A. Çengel, M. A. Boles, *Thermodynamics*, 9th ed., 2019, §7-9
       (isentropic ideal-gas relations).

    Caution: estimates; pressure tests are governed by the applicable codes and a competent,
    licensed engineer.

    Examples
    --------
    >>> round(isochoric(1e6, 1.0, 1.4) / 1e6, 4)          # MJ
    2.2467
    """
    _check(P, V, P_amb)
    _k(k)
    return (P - P_amb) * V / (k - 1.0)
