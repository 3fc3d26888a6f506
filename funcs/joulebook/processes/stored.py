"""Stored expansion energy of a pressurized gas volume.

Three estimates, each labelled with what it is:

``isentropic``        E = m·(u1 − u2s): the work a reversible adiabatic expansion to ambient
                      pressure would deliver, on the fluid's equation of state (real-gas
                      effects and condensation included); no deduction for the work of
                      pushing back the atmosphere.
``ideal isentropic``  E = P·V/(k − 1)·[1 − (P_amb/P)^((k − 1)/k)]: the same for an ideal gas
                      with constant k.
``isochoric``         E = (P − P_amb)·V/(k − 1): the energy released if the pressure fell to
                      ambient at constant volume; the largest of the three for the same gas,
                      often used as a conservative bound.

Caution: these are estimates for judging pneumatic tests and gas receivers.  Pressure tests
and pressure equipment are governed by the applicable codes and standards and by a competent,
licensed engineer.
"""

from __future__ import annotations

import math

from ..errors import OutOfRange, fmt_value
from ..media import Point

__all__ = ["isentropic", "ideal_isentropic", "isochoric", "STANDARD_ATMOSPHERE"]

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
        The gas (:func:`joulebook.media.medium`).
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
    >>> from joulebook.media import medium
    >>> air = medium("air | k = 1.4")
    >>> E = isentropic(air, air.point("T", 300.0, "P", 1e6), 1.0)
    >>> round(E / ideal_isentropic(1e6, 1.0, 1.4), 9)               # the same for an ideal gas
    1.0
    """
    _check(p1.P, V, P_amb)
    p2 = med.point("P", P_amb, "s", p1.s, shows)
    return V / p1.v * (p1.u - p2.u)


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
