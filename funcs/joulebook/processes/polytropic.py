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
    """n = ln(P2/P1) / ln(V1/V2)."""
    _pos(P_1=P1, V_1=V1, P_2=P2, V_2=V2)
    if V1 == V2:
        raise BadInput("V_1 = V_2: a constant-volume change has no finite polytropic exponent")
    return math.log(P2 / P1) / math.log(V1 / V2)


def fit(P, V) -> tuple[float, float, float]:
    """Least-squares fit of ln P = ln C − n·ln V; returns (n, C, R²) with C in Pa·m³ⁿ."""
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
    """P2 = P1·(V1/V2)ⁿ."""
    _pos(P_1=P1, V_1=V1, V_2=V2)
    return P1 * (V1 / V2) ** n


def v2(P1: float, V1: float, P2: float, n: float) -> float:
    """V2 = V1·(P1/P2)^(1/n)."""
    _pos(P_1=P1, V_1=V1, P_2=P2)
    if n == 0.0:
        raise BadInput("n = 0 is a constant-pressure path: P does not fix V")
    return V1 * (P1 / P2) ** (1.0 / n)


def t2_from_v(T1: float, V1: float, V2: float, n: float) -> float:
    """Ideal gas: T2 = T1·(V1/V2)^(n − 1)."""
    _pos(T_1=T1, V_1=V1, V_2=V2)
    return T1 * (V1 / V2) ** (n - 1.0)


def t2_from_p(T1: float, P1: float, P2: float, n: float) -> float:
    """Ideal gas: T2 = T1·(P2/P1)^((n − 1)/n)."""
    _pos(T_1=T1, P_1=P1, P_2=P2)
    if n == 0.0:
        raise BadInput("n = 0 is a constant-pressure path: P does not fix T")
    return T1 * (P2 / P1) ** ((n - 1.0) / n)
