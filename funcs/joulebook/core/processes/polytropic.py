"""Polytropic analysis: P·Vⁿ = C.

n from two states, a least-squares fit of measured data in ln P – ln V, and end states from n
(P2, V2, and T2 for an ideal gas).  SI throughout.

References
----------
Least squares in logarithmic coordinates: ln P = ln C − n·ln V is linear in (ln V, ln P);
the fit minimises the squared residuals of ln P (common practice for indicator diagrams).
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import BadInput, OutOfRange, fmt_value
from .work import _clean_pairs

__all__ = ["exponent", "fit", "p2", "v2", "t2_from_v", "t2_from_p"]


def _pos(**kw: float) -> None:
    for name, v in kw.items():
        if not v > 0.0:
            raise OutOfRange(f"{name} = {fmt_value(v)} must be > 0 (absolute)")


def exponent(P1: float, V1: float, P2: float, V2: float) -> float:
    r"""Polytropic exponent through two states.

    .. math:: n = \frac{\ln(P_2/P_1)}{\ln(V_1/V_2)}

    Parameters
    ----------
    P1, P2 : float
        Initial and final pressure (Pa, absolute, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0, different).

    Returns
    -------
    float
        n.

    Raises
    ------
    OutOfRange
        A non-positive value.
    BadInput
        Equal volumes (no exponent).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 and §7-9 (polytropic processes; common practice).

    Examples
    --------
    >>> round(exponent(1e5, 1e-3, 1e5 * 2 ** 1.3, 0.5e-3), 12)
    1.3
    """
    _pos(P_1=P1, V_1=V1, P_2=P2, V_2=V2)
    if V1 == V2:
        raise BadInput("V_1 = V_2: a constant-volume change has no finite polytropic exponent")
    return math.log(P2 / P1) / math.log(V1 / V2)


def fit(P, V) -> tuple[float, float, float]:
    r"""Least-squares fit of measured data to P·Vⁿ = C.

    .. math:: \ln P = \ln C - n \ln V

    the squared residuals of ln P minimised.

    Parameters
    ----------
    P, V : array_like
        Absolute pressures (Pa) and volumes (m³), NaN = blank.

    Returns
    -------
    tuple of float
        ``(n, C, R²)`` with C in Pa·m³ⁿ.

    Raises
    ------
    BadInput
        Fewer than two points, unequal lengths, or all volumes equal.

    References
    ----------
    .. [1] Least squares in logarithmic coordinates (common practice for indicator diagrams).

    Examples
    --------
    >>> V = [1e-3, 0.8e-3, 0.6e-3, 0.4e-3]
    >>> P = [1e5 * (1e-3 / v) ** 1.25 for v in V]
    >>> n, C, r2 = fit(P, V)
    >>> round(n, 9), round(r2, 9)
    (1.25, 1.0)
    """
    P, V = _clean_pairs(P, V)
    if (P <= 0).any() or (V <= 0).any():
        raise OutOfRange("polytropic fit needs every P > 0 and V > 0 (absolute)")
    x, y = np.log(V), np.log(P)
    if np.ptp(x) == 0.0:
        raise BadInput("all volumes are equal: no polytropic exponent can be fitted")
    slope, intercept = np.polyfit(x, y, 1)
    resid = y - (intercept + slope * x)
    ss_tot = float(np.sum((y - y.mean()) ** 2))
    r2 = 1.0 - float(np.sum(resid**2)) / ss_tot if ss_tot > 0 else 1.0
    return float(-slope), float(math.exp(intercept)), r2


def p2(P1: float, V1: float, V2: float, n: float) -> float:
    """End pressure along P·Vⁿ = C.

    .. math:: P_2 = P_1 (V_1/V_2)^n

    Parameters
    ----------
    P1 : float
        Initial pressure (Pa, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0).
    n : float
        Polytropic exponent.

    Returns
    -------
    float
        P2 (Pa).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 and §7-9 (polytropic processes; common practice).

    Examples
    --------
    >>> round(p2(1e5, 1e-3, 0.5e-3, 1.4))
    263902
    """
    _pos(P_1=P1, V_1=V1, V_2=V2)
    return P1 * (V1 / V2) ** n


def v2(P1: float, V1: float, P2: float, n: float) -> float:
    """End volume along P·Vⁿ = C.

    .. math:: V_2 = V_1 (P_1/P_2)^{1/n}

    Parameters
    ----------
    P1, P2 : float
        Initial and final pressure (Pa, > 0).
    V1 : float
        Initial volume (m³, > 0).
    n : float
        Polytropic exponent, not 0.

    Returns
    -------
    float
        V2 (m³).

    Raises
    ------
    BadInput
        n = 0 (an isobar fixes no volume).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 and §7-9 (polytropic processes; common practice).

    Examples
    --------
    >>> round(v2(1e5, 1e-3, 2e5, 1.0), 12)
    0.0005
    """
    _pos(P_1=P1, V_1=V1, P_2=P2)
    if n == 0.0:
        raise BadInput("n = 0 is a constant-pressure path: P does not fix V")
    return V1 * (P1 / P2) ** (1.0 / n)


def t2_from_v(T1: float, V1: float, V2: float, n: float) -> float:
    """End temperature of an ideal gas along P·Vⁿ = C, from the volumes.

    .. math:: T_2 = T_1 (V_1/V_2)^{n-1}

    Parameters
    ----------
    T1 : float
        Initial temperature (K, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0).
    n : float
        Polytropic exponent.

    Returns
    -------
    float
        T2 (K).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 and §7-9 (polytropic processes; common practice).

    Examples
    --------
    >>> round(t2_from_v(300.0, 1e-3, 0.5e-3, 1.4), 2)
    395.85
    """
    _pos(T_1=T1, V_1=V1, V_2=V2)
    return T1 * (V1 / V2) ** (n - 1.0)


def t2_from_p(T1: float, P1: float, P2: float, n: float) -> float:
    """End temperature of an ideal gas along P·Vⁿ = C, from the pressures.

    .. math:: T_2 = T_1 (P_2/P_1)^{(n-1)/n}

    Parameters
    ----------
    T1 : float
        Initial temperature (K, > 0).
    P1, P2 : float
        Initial and final pressure (Pa, > 0).
    n : float
        Polytropic exponent, not 0.

    Returns
    -------
    float
        T2 (K).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 and §7-9 (polytropic processes; common practice).

    Examples
    --------
    >>> round(t2_from_p(300.0, 1e5, 8e5, 1.4), 1)
    543.4
    """
    _pos(T_1=T1, P_1=P1, P_2=P2)
    if n == 0.0:
        raise BadInput("n = 0 is a constant-pressure path: P does not fix T")
    return T1 * (P2 / P1) ** ((n - 1.0) / n)
