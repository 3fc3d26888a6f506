"""Indicator diagrams of engines and reciprocating compressors.

**Cylinder volume from the crank angle** (slider-crank) [1]_: with bore B, stroke S (crank
radius a = S/2), connecting-rod length l and clearance volume V_c,

    V(θ) = V_c + (π·B²/4)·(l + a − a·cos θ − √(l² − a²·sin² θ)),

θ = 0 at top dead centre.

**Indicated power**: P_i = W_cycle·N·z / n_R, with W_cycle the net work of one cycle of one
cylinder (∮P dV), N the shaft speed (rev/s), z the number of cylinders and n_R the
revolutions per cycle (2 for a four-stroke engine, 1 for a two-stroke engine or a
reciprocating compressor).  **Mean effective pressure**: MEP = W_cycle/V_d, V_d the swept
volume π·B²/4·S.

**Clearance volumetric efficiency** of a reciprocating compressor [2]_:
η_v = 1 + c − c·(P_d/P_s)^(1/n), c = V_c/V_d, n the polytropic exponent of the re-expansion.

**Separate polytropic fits** of a measured closed loop: the compression branch (volume
falling from its largest to its smallest value) and the expansion branch (rising back) are
fitted in ln P – ln V apart, since their exponents differ (heat transfer, leakage); the
valve-open lines of a compressor card (pressure plateaus) are found by a least-squares
break point [3]_ and left out, and each turning point belongs to the branch it begins.

References
----------
.. [1] J. B. Heywood, *Internal Combustion Engine Fundamentals*, McGraw-Hill, 1988, §2.2
   (cylinder volume, eq. 2.4 and 2.5) and §2.4 (indicated work, mean effective pressure).
.. [2] Reciprocating-compressor volumetric efficiency from the clearance re-expansion
   (common practice; textbooks of compressor engineering).
.. [3] D. M. Hawkins, "Point estimation of the parameters of piecewise regression models",
   Applied Statistics 25 (1976) 51–57 (from memory).
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import BadInput, OutOfRange, fmt_value
from .polytropic import fit
from .work import _clean_pairs

__all__ = ["volume", "indicated_power", "mep", "volumetric_efficiency", "branch_fits"]


def volume(theta_deg: float, bore: float, stroke: float, rod: float, V_c: float) -> float:
    r"""Cylinder volume of the slider-crank at crank angle θ from top dead centre.

    .. math:: V = V_c + \frac{\pi B^2}{4}\left(l + a - a\cos\theta
       - \sqrt{l^2 - a^2 \sin^2\theta}\right), \quad a = S/2

    Parameters
    ----------
    theta_deg : float
        Crank angle (degrees from top dead centre).
    bore : float
        Bore B (m).
    stroke : float
        Stroke S (m).
    rod : float
        Connecting-rod length l (m), > S/2.
    V_c : float
        Clearance volume (m³).

    Returns
    -------
    float
        V (m³).

    References
    ----------
    .. [1] J. B. Heywood, *Internal Combustion Engine Fundamentals*, McGraw-Hill, 1988, §2.2
       (cylinder volume, eq. 2.4 and 2.5) and §2.4 (indicated work, mean effective pressure).

    Examples
    --------
    >>> B, S = 0.1, 0.1
    >>> Vd = math.pi * B**2 / 4 * S
    >>> round((volume(180, B, S, 0.2, 1e-4) - volume(0, B, S, 0.2, 1e-4)) / Vd, 12)
    1.0
    """
    for name, v in (("bore", bore), ("stroke", stroke), ("rod", rod)):
        if not v > 0:
            raise BadInput(f"{name} = {fmt_value(v)} m must be above 0")
    if not rod > stroke / 2:
        raise BadInput(
            f"rod = {fmt_value(rod)} m: the connecting rod must be longer than the crank "
            f"radius {fmt_value(stroke / 2)} m"
        )
    if not V_c >= 0:
        raise BadInput(f"V_c = {fmt_value(V_c)} m3: the clearance volume must not be negative")
    if not math.isfinite(theta_deg):
        raise BadInput("crank_angle is not a finite number")
    a, th = stroke / 2, math.radians(theta_deg)
    return V_c + math.pi * bore**2 / 4 * (
        rod + a - a * math.cos(th) - math.sqrt(rod * rod - (a * math.sin(th)) ** 2)
    )


def indicated_power(W_cycle: float, speed: float, cylinders: float, revs_per_cycle: float) -> float:
    r"""Indicated power of an engine or compressor.

    .. math:: P_i = \frac{W_{cycle}\,N\,z}{n_R}

    Parameters
    ----------
    W_cycle : float
        Indicated work per cycle of one cylinder (J).
    speed : float
        Speed N (rev/s).
    cylinders : float
        Number of cylinders z.
    revs_per_cycle : float
        Revolutions per cycle n_R (2 four-stroke, 1 two-stroke).

    Returns
    -------
    float
        P_i (W).

    References
    ----------
    .. [1] J. B. Heywood, *Internal Combustion Engine Fundamentals*, McGraw-Hill, 1988, §2.2
       (cylinder volume, eq. 2.4 and 2.5) and §2.4 (indicated work, mean effective pressure).

    Examples
    --------
    >>> indicated_power(500.0, 50.0, 4, 2)
    50000.0
    """
    if not speed > 0:
        raise BadInput(f"speed = {fmt_value(speed)} rev/s must be above 0")
    if not (cylinders >= 1 and float(cylinders).is_integer()):
        raise BadInput(f"cylinders = {fmt_value(cylinders)}: a whole number, 1 or more")
    if revs_per_cycle not in (1, 2):
        raise BadInput(
            f"revs_per_cycle = {fmt_value(revs_per_cycle)}: 2 for a four-stroke engine, 1 for a "
            "two-stroke engine or a compressor"
        )
    return W_cycle * speed * cylinders / revs_per_cycle


def mep(W_cycle: float, V_d: float) -> float:
    """Mean effective pressure.

    .. math:: MEP = W_{cycle} / V_d

    Parameters
    ----------
    W_cycle : float
        Work per cycle (J).
    V_d : float
        Displaced volume (m³), > 0.

    Returns
    -------
    float
        MEP (Pa).

    References
    ----------
    .. [1] J. B. Heywood, *Internal Combustion Engine Fundamentals*, McGraw-Hill, 1988, §2.2
       (cylinder volume, eq. 2.4 and 2.5) and §2.4 (indicated work, mean effective pressure).

    Examples
    --------
    >>> mep(500.0, 5e-4)
    1000000.0
    """
    if not V_d > 0:
        raise BadInput(f"V_d = {fmt_value(V_d)} m3: the swept volume must be above 0")
    return W_cycle / V_d


def volumetric_efficiency(c: float, P_s: float, P_d: float, n: float) -> float:
    r"""Volumetric efficiency of a reciprocating compressor from its clearance.

    .. math:: \eta_v = 1 + c - c\,(P_d/P_s)^{1/n}

    Parameters
    ----------
    c : float
        Clearance ratio V_c/V_d.
    P_s, P_d : float
        Suction and discharge pressure (Pa, absolute), P_d ≥ P_s.
    n : float
        Polytropic exponent of the re-expansion.

    Returns
    -------
    float
        η_v (dimensionless).

    References
    ----------
    .. [1] Reciprocating-compressor volumetric efficiency from the clearance re-expansion
       (common practice; textbooks of compressor engineering).

    Examples
    --------
    >>> round(volumetric_efficiency(0.05, 1e5, 4e5, 1.3), 6)
    0.904758
    """
    if not 0 <= c < 1:
        raise BadInput(f"clearance = {fmt_value(c)}: the clearance ratio V_c/V_d lies in 0 to 1")
    if not (P_s > 0 and P_d > 0):
        raise BadInput("P_suction and P_discharge are absolute and must be above 0")
    if not 1 <= n <= 1.7:
        raise BadInput(f"n = {fmt_value(n)}: the re-expansion exponent lies in 1 to 1.7")
    if P_d < P_s:
        raise BadInput(
            f"P_discharge = {fmt_value(P_d)} Pa is below P_suction = {fmt_value(P_s)} Pa: a "
            "compressor discharges at or above its suction pressure"
        )
    eta = 1 + c - c * (P_d / P_s) ** (1 / n)
    if eta <= 0:
        raise OutOfRange(
            f"the clearance gas re-expands to fill the whole stroke (η_v = {fmt_value(eta)}): "
            "no gas is drawn in at this pressure ratio"
        )
    return eta


def branch_fits(P, V) -> tuple[float, float, float, float]:
    r"""Polytropic exponents of the compression and expansion branches of a closed loop.

    The loop is split where its volume turns: the points from which the volume falls form
    the compression branch, those from which it rises the expansion branch, so a turning
    point (the largest or the smallest volume) belongs to the branch it begins, never to both;
    points at constant volume (combustion, blow-down) belong to neither.  On each branch, a
    valve-open line of a compressor card (discharge or suction, P about constant while the
    volume moves) is found as a pressure plateau at either end: the break point that
    minimises the squared residuals of a line in ln P – ln V joined to a constant ln P
    [3]_ is taken when it at least halves the residuals of the line alone and leaves a
    plateau of 3 points or more.  The remaining polytropic points are fitted to

    .. math:: \ln P = \ln C - n \ln V

    Parameters
    ----------
    P, V : array_like
        Pressures (Pa, absolute) and volumes (m³) of the loop in the order measured (time
        order around the cycle).

    Returns
    -------
    tuple of float
        ``(n_compression, n_expansion, R²_compression, R²_expansion)``, each R² that of the
        branch's fit in ln P – ln V.

    Raises
    ------
    BadInput
        Fewer than 6 points, or a branch with fewer than 3 polytropic points.

    References
    ----------
    .. [1] J. B. Heywood, *Internal Combustion Engine Fundamentals*, McGraw-Hill, 1988, §2.2
       (cylinder volume, eq. 2.4 and 2.5) and §2.4 (indicated work, mean effective pressure).
    .. [2] Least squares in logarithmic coordinates (common practice).
    .. [3] D. M. Hawkins, "Point estimation of the parameters of piecewise regression
       models", Applied Statistics 25 (1976) 51–57 (the break point of a two-phase
       regression by least squares over every candidate; from memory).

    Examples
    --------
    >>> V = [1.0, 0.5, 0.25, 0.25, 0.5, 1.0]
    >>> P = [1.0, 2 ** 1.3, 4 ** 1.3, 3 * 4 ** 1.3, 3 * 4 ** 1.3 / 2 ** 1.25, 3 * 4 ** 1.3 / 4 ** 1.25]
    >>> [round(n, 9) for n in branch_fits(P, V)]
    [1.3, 1.25, 1.0, 1.0]
    """
    P, V = _clean_pairs(P, V)
    if P.size < 6:
        raise BadInput(f"a closed loop needs at least 6 points (got {P.size})")
    if (P <= 0).any() or (V <= 0).any():
        raise OutOfRange("a branch fit needs every P > 0 and V > 0 (absolute)")
    closed = (P[0], V[0]) == (P[-1], V[-1])
    if closed:  # the last point repeats the first: one point, once
        P, V = P[:-1], V[:-1]
    n = P.size
    falling: list[int] = []
    rising: list[int] = []
    for i in range(n):
        after, before = V[(i + 1) % n] - V[i], V[i] - V[(i - 1) % n]
        # the segment a point begins decides its branch; a point before a constant-volume
        # step ends the branch it arrived by
        step = after if after != 0 else before
        if step < 0:
            falling.append(i)
        elif step > 0:
            rising.append(i)
    fits = []
    for branch, what in ((falling, "compression"), (rising, "expansion")):
        members = set(branch)
        first = next((i for i in branch if (i - 1) % n not in members), branch[0] if branch else 0)
        idx = sorted(branch, key=lambda i: (i - first) % n)  # path order from its first point
        x, y = np.log(V[idx]), np.log(P[idx])
        lo, hi = _polytropic_part(x, y) if len(idx) >= 3 else (0, len(idx))
        if hi - lo < 3:
            raise BadInput(
                f"the {what} branch has {hi - lo} points off its valve plateaus: at least 3 "
                "are needed"
            )
        fits.append(fit(P[idx][lo:hi], V[idx][lo:hi]))
    (n_c, _, r2_c), (n_e, _, r2_e) = fits
    return n_c, n_e, r2_c, r2_e


def _sse_line(x: np.ndarray, y: np.ndarray) -> float:
    """Squared residuals of the least-squares line y(x) (all of y's spread if x is constant)."""
    xc, yc = x - x.mean(), y - y.mean()
    sxx, sxy, syy = float(xc @ xc), float(xc @ yc), float(yc @ yc)
    return max(syy - sxy * sxy / sxx, 0.0) if sxx > 0 else syy


def _tail_break(x: np.ndarray, y: np.ndarray) -> tuple[int, float]:
    """The best split into a line on [0, k) and a constant on [k, N), by cumulative sums:
    ``(k, squared residuals)``, k = N when no split with 3 points a side exists."""
    N = x.size
    if N < 6:
        return N, _sse_line(x, y)
    # prefix sums for the line on the head, suffix sums for the constant on the tail
    c = np.concatenate(([0.0], np.cumsum(np.ones(N))))
    sx = np.concatenate(([0.0], np.cumsum(x)))
    sy = np.concatenate(([0.0], np.cumsum(y)))
    sxx = np.concatenate(([0.0], np.cumsum(x * x)))
    sxy = np.concatenate(([0.0], np.cumsum(x * y)))
    syy = np.concatenate(([0.0], np.cumsum(y * y)))
    k = np.arange(3, N - 2)  # 3 points or more on each side
    m = c[k]
    vxx = sxx[k] - sx[k] ** 2 / m
    vxy = sxy[k] - sx[k] * sy[k] / m
    vyy = syy[k] - sy[k] ** 2 / m
    with np.errstate(divide="ignore", invalid="ignore"):
        head = np.where(vxx > 0, vyy - np.where(vxx > 0, vxy**2 / vxx, 0.0), vyy)
    mt = N - m
    ty = sy[N] - sy[k]
    tail = (syy[N] - syy[k]) - ty**2 / mt
    total = np.maximum(head, 0.0) + np.maximum(tail, 0.0)
    best = int(np.argmin(total))
    return int(k[best]), float(total[best])


def _polytropic_part(x: np.ndarray, y: np.ndarray) -> tuple[int, int]:
    """The slice [lo, hi) of a branch (ln V, ln P in path order) left when a valve plateau
    at its end and one at its start are cut off; a plateau is cut only when it halves the
    squared residuals of the line alone."""
    lo, hi = 0, x.size
    whole = _sse_line(x, y)
    k, sse = _tail_break(x, y)
    if k < hi and sse < 0.5 * whole:
        hi, whole = k, _sse_line(x[:k], y[:k])
    k, sse = _tail_break(x[lo:hi][::-1], y[lo:hi][::-1])  # a plateau at the start
    if k < hi - lo and sse < 0.5 * whole:
        lo = hi - k
    return lo, hi
