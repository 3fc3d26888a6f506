"""Boundary work W = ∫P dV of a closed system, positive when the system expands.

Sign convention: work done *by* the system is positive (expansion, dV > 0); work done *on*
the system is negative (compression).  All values SI: Pa, m³, J.

References
----------
The path integrals are the standard closed-form results of ∫P dV for each path (common
practice); the polytropic form is written with φ(z) = (eᶻ − 1)/z so that it is continuous
through n = 1 (the isothermal ideal-gas case) with no division blow-up.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = [
    "phi",
    "isobaric",
    "isothermal",
    "polytropic_states",
    "polytropic_n",
    "linear",
    "from_pv",
]


def phi(z: float) -> float:
    r"""φ(z) = (eᶻ − 1)/z with φ(0) = 1, accurate for every z (uses expm1).

    .. math:: \varphi(z) = \frac{e^z - 1}{z}, \qquad \varphi(0) = 1

    Parameters
    ----------
    z : float
        The argument.

    Returns
    -------
    float
        φ(z).

    References
    ----------
    .. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM,
       2002, §1.14.1 (computing (eˣ − 1)/x accurately).

    Examples
    --------
    >>> phi(0.0), round(phi(1e-12), 12), round(phi(1.0), 6)
    (1.0, 1.000000000001, 1.718282)
    """
    if z == 0.0:
        return 1.0
    if abs(z) < 1e-300:
        return 1.0
    return math.expm1(z) / z


def _positive(name: str, value: float) -> None:
    if not value > 0.0:
        raise OutOfRange(f"{name} = {fmt_value(value)} must be > 0 (absolute pressure, volume)")


def isobaric(P: float, V1: float, V2: float) -> float:
    r"""Boundary work at constant pressure; exactly 0 for a rigid (constant-volume) system.

    .. math:: W = P\,(V_2 - V_1)

    Parameters
    ----------
    P : float
        Pressure (Pa).
    V1, V2 : float
        Initial and final volume (m³).

    Returns
    -------
    float
        Work done by the system (J).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> isobaric(2e5, 1e-3, 3e-3)
    400.0
    """
    return P * (V2 - V1)


def isothermal(P1: float, V1: float, V2: float) -> float:
    r"""Boundary work of an ideal gas at constant temperature.

    .. math:: W = P_1 V_1 \ln(V_2/V_1)

    Parameters
    ----------
    P1 : float
        Initial pressure (Pa, absolute, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0).

    Returns
    -------
    float
        Work done by the system (J).

    Raises
    ------
    OutOfRange
        A pressure or volume ≤ 0.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> round(isothermal(1e5, 1e-3, 2e-3), 3)
    69.315
    """
    _positive("P_1", P1)
    _positive("V_1", V1)
    _positive("V_2", V2)
    return P1 * V1 * math.log(V2 / V1)


def polytropic_n(P1: float, V1: float, V2: float, n: float) -> float:
    r"""Boundary work along P·Vⁿ = C through (P1, V1) to V2.

    .. math:: W = \frac{P_2 V_2 - P_1 V_1}{1 - n} = P_1 V_1 \ln r\;\varphi\big((1 - n)\ln r\big),
       \quad r = V_2/V_1

    At n = 1 this is P1·V1·ln r, the isothermal result.

    Parameters
    ----------
    P1 : float
        Initial pressure (Pa, absolute, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0).
    n : float
        Polytropic exponent, −50…50.

    Returns
    -------
    float
        Work done by the system (J).

    Raises
    ------
    OutOfRange
        Non-positive pressure or volume, n outside −50…50, or an end pressure beyond any finite number.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> round(polytropic_n(1e5, 1e-3, 0.5e-3, 1.3), 2)
    -77.05
    """
    _positive("P_1", P1)
    _positive("V_1", V1)
    _positive("V_2", V2)
    if not math.isfinite(n):
        raise BadInput(f"n = {n} is not a finite number")
    if abs(n) > 50:
        raise OutOfRange(
            f"polytropic n = {fmt_value(n)} is outside −50…50 (real processes lie between 0 "
            "and about 1.7; a constant-volume process does no boundary work)"
        )
    lnr = math.log(V2 / V1)
    try:
        w = P1 * V1 * lnr * phi((1.0 - n) * lnr)
    except OverflowError:
        w = math.inf
    if not math.isfinite(w):
        raise OutOfRange(
            f"n = {fmt_value(n)} with V_2/V_1 = {fmt_value(V2 / V1)}: the end pressure "
            "P_1·(V_1/V_2)^n is beyond any finite number"
        )
    return w


def polytropic_states(P1: float, V1: float, P2: float, V2: float) -> float:
    r"""Boundary work along P·Vⁿ = C through two states; n = ln(P2/P1)/ln(V1/V2).

    .. math:: W = \frac{P_2 V_2 - P_1 V_1}{1 - n} = P_1 V_1 \ln r\;\varphi(z),
       \quad z = \ln\frac{P_2 V_2}{P_1 V_1}

    finite and continuous as n → 1.  V1 = V2 gives 0 (rigid).

    Parameters
    ----------
    P1, P2 : float
        Initial and final pressure (Pa, absolute, > 0).
    V1, V2 : float
        Initial and final volume (m³, > 0).

    Returns
    -------
    float
        Work done by the system (J).

    Raises
    ------
    OutOfRange
        A pressure or volume ≤ 0.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> round(polytropic_states(1e5, 1e-3, 2e5, 0.5e-3), 3)     # n = 1: P1·V1·ln(1/2)
    -69.315
    """
    for name, v in (("P_1", P1), ("V_1", V1), ("P_2", P2), ("V_2", V2)):
        _positive(name, v)
    lnr = math.log(V2 / V1)
    if lnr == 0.0:
        return 0.0
    z = math.log((P2 * V2) / (P1 * V1))
    return P1 * V1 * lnr * phi(z)


def linear(P1: float, V1: float, P2: float, V2: float) -> float:
    r"""Boundary work with pressure linear in volume (spring-loaded piston).

    .. math:: W = \frac{P_1 + P_2}{2} (V_2 - V_1)

    Parameters
    ----------
    P1, P2 : float
        Initial and final pressure (Pa).
    V1, V2 : float
        Initial and final volume (m³).

    Returns
    -------
    float
        Work done by the system (J).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> linear(1e5, 1e-3, 3e5, 2e-3)
    200.0
    """
    return 0.5 * (P1 + P2) * (V2 - V1)


def _clean_pairs(P: ArrayLike, V: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    p = np.asarray(P, dtype=float)
    v = np.asarray(V, dtype=float)
    if p.size != v.size:
        raise BadInput(f"P_values has {p.size} cells but V_values has {v.size}; give equal lengths")
    p, v = p.reshape(-1), v.reshape(-1)
    blankP, blankV = np.isnan(p), np.isnan(v)
    half = np.flatnonzero(blankP ^ blankV)
    if half.size:
        i = int(half[0])
        which = "P_values" if blankP[i] else "V_values"
        raise BadInput(f"point {i + 1}: {which} is blank but its partner is not")
    keep = ~(blankP | blankV)
    p, v = p[keep], v[keep]
    if p.size < 2:
        raise BadInput(f"need at least 2 points of P and V (got {p.size} after blanks)")
    return p, v


def from_pv(P: ArrayLike, V: ArrayLike, method: str = "trapezoid") -> float:
    r"""Work from measured P–V points: Σ over segments of ∫P dV.

    .. math:: W = \sum_i \frac{P_i + P_{i+1}}{2} (V_{i+1} - V_i) \quad\text{(trapezoid)}

    Parameters
    ----------
    P, V : array_like
        Absolute pressures (Pa) and volumes (m³) in path order; NaN = blank (both blank:
        skipped).  A closed loop (last point equal to the first) gives the net cycle work,
        positive when the loop runs clockwise in the P–V plane (an engine).
    method : {"trapezoid", "polytropic"}
        ``trapezoid``: each segment straight in P–V (exact for piecewise-linear data; for a
        closed loop this is the enclosed polygon area with its sign).  ``polytropic``: each
        segment P·Vⁿ = C through its end points (exact for polytropic data; needs P > 0 and
        V > 0).

    Returns
    -------
    float
        Work done by the system along the points (J).

    Raises
    ------
    BadInput
        Unequal lengths, a blank without its partner, fewer than two points, unknown method.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 (moving boundary work, eqs. 4-2, 4-7, 4-9; common practice).

    Examples
    --------
    >>> from_pv([1e5, 2e5, 3e5], [1e-3, 2e-3, 3e-3])
    400.0
    """
    p, v = _clean_pairs(P, V)
    m = (method or "trapezoid").strip().lower()
    if m in ("trapezoid", "trapezoidal", "linear"):
        return float(np.sum(0.5 * (p[1:] + p[:-1]) * np.diff(v)))
    if m in ("polytropic", "polytropic segments", "power"):
        if (p <= 0).any() or (v <= 0).any():
            i = int(np.flatnonzero((p <= 0) | (v <= 0))[0])
            raise OutOfRange(f"point {i + 1}: polytropic segments need P > 0 and V > 0")
        return float(
            sum(polytropic_states(p[i], v[i], p[i + 1], v[i + 1]) for i in range(p.size - 1))
        )
    raise BadInput(f"method {method!r}: use trapezoid or polytropic")
