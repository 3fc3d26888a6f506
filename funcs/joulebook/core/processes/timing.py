"""Time: a closed rigid vessel heated at a rate that may depend on its state, fire exposure,
wetted areas, and the batch heating of a liquid or a solid.

**A rigid vessel under a heat rate.**  With no work (rigid walls, no shaft) the first law per
unit time is m·du/dt = Q̇(state); along the vessel's isochore v = V/m the state is a function
of u alone, so the equation separates and the time to reach a target is the integral

    t = m · ∫ du / Q̇(u)      from u1 to u2,

taken with Gauss–Legendre quadrature [2]_ on the equation of state, piece by piece between
the phase boundaries the path crosses (where the integrand has a kink), each piece halved
until a 48- and a 24-point rule agree to 1e-9; where Q̇ falls towards zero (the contents
approaching a source temperature, where 1/Q̇ grows without bound) the rule is taken in
ln|s − u|, s the extrapolated zero of Q̇, as the batch time below takes it in ln(T_s − T).  The heat rate is
Q̇ = Q̇_const + UA·(T_source − T) + Q̇_fire(A_wet), each term optional.

**Fire exposure** [1]_: Q̇ = C·F·A^0.82 with A the wetted area (m²), F the environment factor
and C = 43 200 W/m^1.64 where drainage and fire-fighting are adequate, 70 900 without (the US
forms 21 000 and 34 500 Btu/h with A in ft² are the same law in other units).

**Wetted area** up to a liquid level h: horizontal cylinder of diameter D and length L with
flat ends, A = L·D·θ/2 + 2·(D²/8)·(θ − sin θ), θ = 2·acos(1 − 2h/D); vertical cylinder,
A = π·D·h + π·D²/4 (the bottom).  The level follows the liquid: V_liquid = m·(1 − x)·v_f
(all the volume when the vessel is liquid-full, none when it holds vapour only).

**Batch heating** of a mass with c(T) by a medium at T_source through UA:
t = m·∫ c(T) dT / (UA·(T_source − T)); for constant c this is the exponential closed form
t = (m·c/UA)·ln((T_source − T1)/(T_source − T2)), i.e. Q/(UA·LMTD).

Caution: engineering estimates.  Fire cases and relief are governed by the applicable codes
and standards (the wetted area that counts, the height limit above grade, the factor F) and
by the judgement of a competent, licensed engineer.

References
----------
.. [1] API Standard 521, *Pressure-relieving and Depressuring Systems*, §4.4.13.2 (fire
   exposure, wetted surface, environment factor F); recalled from memory.
.. [2] G. H. Golub, J. H. Welsch, "Calculation of Gauss quadrature rules", Math. Comp. 23
   (1969) 221–230 (the nodes and weights, numpy.polynomial.legendre.leggauss).
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import BadInput, NoConvergence, OutOfRange, fmt_value
from ..roots import brent

__all__ = [
    "fire_heat",
    "wetted_area",
    "liquid_level",
    "rigid_heating",
    "batch_time",
    "FIRE_C",
]

#: API 521 fire-exposure constants, W per m^1.64 (adequate drainage, inadequate)
FIRE_C = {"adequate": 43_200.0, "inadequate": 70_900.0}
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(48)
_NODES_24, _WEIGHTS_24 = np.polynomial.legendre.leggauss(24)


def fire_heat(A_wet: float, F: float = 1.0, drainage: str = "adequate") -> float:
    r"""Heat absorbed by a vessel's wetted surface exposed to a pool fire.

    .. math:: \dot Q = C\,F\,A^{0.82}

    C = 43,200 W/m^1.64 with adequate drainage and fire fighting, 70,900 without.

    Parameters
    ----------
    A_wet : float
        Wetted area (m²), > 0.
    F : float
        Environment factor (1 bare vessel; less with insulation or water spray), 0–1.
    drainage : str
        ``adequate`` or ``inadequate``.

    Returns
    -------
    float
        Q̇ (W).

    Raises
    ------
    BadInput
        A non-positive area, F outside 0–1, unknown drainage word.

    References
    ----------
    .. [1] API Standard 521, *Pressure-relieving and Depressuring Systems*, §4.4.13.2 (fire
       exposure, wetted surface, environment factor F); recalled from memory.

    Examples
    --------
    >>> round(fire_heat(10.0))
    285420
    """
    if not A_wet > 0:
        raise BadInput(f"A_wet = {fmt_value(A_wet)} m2: the wetted area must be above 0")
    if not 0 < F <= 1:
        raise BadInput(f"F = {fmt_value(F)}: the environment factor lies in 0 < F ≤ 1")
    word = str(drainage or "adequate").strip().lower()
    if word not in FIRE_C:
        raise BadInput(f"drainage = {drainage!r}: use adequate or inadequate")
    return FIRE_C[word] * F * A_wet**0.82


def _check_vessel(shape: str, D: float, L: float) -> str:
    word = str(shape).strip().lower()
    if word not in ("horizontal", "vertical"):
        raise BadInput(f"shape = {shape!r}: use horizontal or vertical (a cylinder)")
    if not D > 0:
        raise BadInput(f"D = {fmt_value(D)} m: the diameter must be above 0")
    if not L > 0:
        raise BadInput(f"L = {fmt_value(L)} m: the length must be above 0")
    return word


def vessel_volume(shape: str, D: float, L: float) -> float:
    r"""Volume of a cylinder with flat ends.

    .. math:: V = \frac{\pi D^2}{4} L

    Parameters
    ----------
    shape : str
        ``horizontal`` or ``vertical``.
    D : float
        Diameter (m).
    L : float
        Length (m).

    Returns
    -------
    float
        V (m³).

    References
    ----------
    .. [1] Circle-segment area and cylinder geometry (common practice).

    Examples
    --------
    >>> round(vessel_volume("horizontal", 2.0, 5.0), 4)
    15.708
    """
    _check_vessel(shape, D, L)
    return math.pi * D * D / 4 * L


def wetted_area(shape: str, D: float, L: float, level: float) -> float:
    r"""Wetted area of a horizontal or vertical cylinder with flat ends up to *level*.

    .. math:: A_{vert} = \pi D\,\ell + \frac{\pi D^2}{4}, \qquad
       A_{hor} = \theta\,\frac{D}{2}\,L + 2\,A_{seg}(\ell)

    with θ the wetted angle of the shell and A_seg the circle segment below the level.

    Parameters
    ----------
    shape : str
        ``horizontal`` or ``vertical``.
    D : float
        Diameter (m).
    L : float
        Length (m).
    level : float
        Liquid level from the bottom (m), 0 to D (horizontal) or L (vertical).

    Returns
    -------
    float
        Wetted area (m²).

    References
    ----------
    .. [1] Circle-segment area and cylinder geometry (common practice).
    .. [2] API Standard 521, §4.4.13.2.2 (wetted surface), from memory.

    Examples
    --------
    >>> round(wetted_area("vertical", 2.0, 5.0, 1.0), 4)  # π·2·1 + π·1
    9.4248
    >>> round(wetted_area("horizontal", 2.0, 5.0, 2.0), 4)  # full: π·2·5 + 2·π
    37.6991
    """
    word = _check_vessel(shape, D, L)
    top = D if word == "horizontal" else L
    if not 0 <= level <= top * (1 + 1e-12):
        raise BadInput(
            f"level = {fmt_value(level)} m: the liquid level lies from 0 to {fmt_value(top)} m"
        )
    level = min(level, top)
    if word == "vertical":
        return math.pi * D * level + (math.pi * D * D / 4 if level > 0 else 0.0)
    theta = 2 * math.acos(max(-1.0, min(1.0, 1 - 2 * level / D)))
    return L * D * theta / 2 + 2 * (D * D / 8) * (theta - math.sin(theta))


def liquid_level(shape: str, D: float, L: float, V_liquid: float) -> float:
    r"""The liquid level holding *V_liquid* in the cylinder (inverse of the segment volume).

    .. math:: V_{liq}(\ell) = L\,A_{seg}(\ell) \;\text{(horizontal)}, \qquad
       V_{liq} = \frac{\pi D^2}{4}\,\ell \;\text{(vertical)}

    Parameters
    ----------
    shape : str
        ``horizontal`` or ``vertical``.
    D : float
        Diameter (m).
    L : float
        Length (m).
    V_liquid : float
        Liquid volume (m³), 0 to the vessel's volume.

    Returns
    -------
    float
        Level (m).

    References
    ----------
    .. [1] Circle-segment area and cylinder geometry (common practice).

    Examples
    --------
    >>> round(liquid_level("horizontal", 2.0, 5.0, vessel_volume("horizontal", 2.0, 5.0) / 2), 9)
    1.0
    """
    word = _check_vessel(shape, D, L)
    V = vessel_volume(word, D, L)
    if V_liquid <= 0:
        return 0.0
    if V_liquid >= V:
        return D if word == "horizontal" else L
    if word == "vertical":
        return V_liquid / (math.pi * D * D / 4)
    seg = V_liquid / L  # the segment's area

    def f(h: float) -> float:
        th = 2 * math.acos(1 - 2 * h / D)
        return D * D / 8 * (th - math.sin(th)) - seg

    return brent(f, 0.0, D, xtol=1e-12, what="liquid level")


def _pieces(u1: float, u2: float, breaks) -> list[tuple[float, float]]:
    lo, hi = min(u1, u2), max(u1, u2)
    cuts = sorted({lo, hi, *(b for b in breaks if lo < b < hi)})
    return list(zip(cuts, cuts[1:]))


def rigid_heating(med, p1, m: float, end_sym: str, end_value: float, rate, points: int = 0):
    r"""Time for a rigid vessel to reach a target T, P or x under a heat rate.

    The end state is the one on the vessel's isochore (v = v1) with the target value; the
    first law m·du/dt = Q̇(state) is integrated piece by piece between phase boundaries:

    .. math:: t = m \int_{u_1}^{u_2} \frac{du}{\dot Q(u)}

    Parameters
    ----------
    med : medium
        The contents' medium.
    p1 : Point
        The initial state.
    m : float
        Mass (kg).
    end_sym : str
        ``T``, ``P`` or ``x``.
    end_value : float
        The target (SI).
    rate : callable
        ``rate(point) -> W``, the heat rate into the contents at a state.
    points : int
        With points > 0, also the table [(t, point, Q)] at that many states along the way.

    Returns
    -------
    float or tuple
        The time (s); with *points*, ``(time, table)``.

    Raises
    ------
    OutOfRange
        The target is not reached on the isochore, or the heat rate falls to zero first.
    NoConvergence
        The time integral does not converge (a target within the model's rounding of the
        state where Q̇ = 0).

    References
    ----------
    .. [1] API Standard 521, *Pressure-relieving and Depressuring Systems*, §4.4.13.2 (fire
       exposure, wetted surface, environment factor F); recalled from memory.
    .. [2] G. H. Golub, J. H. Welsch, "Calculation of Gauss quadrature rules", Math. Comp. 23
       (1969) 221–230 (the nodes and weights, numpy.polynomial.legendre.leggauss).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> t = rigid_heating(air, air.point("T", 300.0, "P", 1e5), 1.0, "T", 400.0, lambda p: 1e3)
    >>> round(t, 3)                                              # m·cv·ΔT / Q̇
    71.762
    """
    v = p1.v
    try:
        p2 = med.point("v", v, end_sym, end_value)
    except (OutOfRange, BadInput) as e:
        raise OutOfRange(
            f"no state on the vessel's isochore has that target: {e.message}"
        ) from None
    u1, u2 = p1.u, p2.u
    if u2 == u1:
        return (0.0, [(0.0, p1, 0.0)]) if points else 0.0
    breaks = []
    for x in (0.0, 1.0):  # the isochore crosses the saturation line at most once
        try:
            breaks.append(med.point("v", v, "x", x).u)
        except (OutOfRange, BadInput):
            pass
    sign = 1.0 if u2 > u1 else -1.0
    unit = {"T": " K", "P": " Pa"}.get(end_sym, "")
    target = f"the target {end_sym} = {end_value:.12g}{unit}"

    def inv_rate(u: float) -> float:
        q = rate(med.point("v", v, "u", u))
        if not sign * q > 0:
            raise OutOfRange(
                f"the heat rate is {fmt_value(q)} W at u = {fmt_value(u / 1e3)} kJ/kg: the "
                "target is never reached (heating stops or reverses before it)"
            )
        return 1.0 / q

    def integral(a: float, b: float) -> float:
        total = 0.0
        for lo, hi in _pieces(a, b, breaks):
            total += _quad(inv_rate, lo, hi, target)
        return total * (1.0 if b >= a else -1.0)

    if not points:
        return m * integral(u1, u2)
    table = [(0.0, p1, 0.0)]
    t, u_prev = 0.0, u1
    for i in range(1, points):
        u = u1 + (u2 - u1) * i / (points - 1) if i < points - 1 else u2
        t += m * integral(u_prev, u)  # row by row: each piece integrated once
        pt = med.point("v", v, "u", u) if i < points - 1 else p2
        table.append((t, pt, m * (u - u1)))
        u_prev = u
    return t, table


def _quad(f, lo: float, hi: float, target: str, depth: int = 0) -> float:
    """∫ f from lo to hi to a relative 1e-9, adaptively (f = 1/Q̇ of the heating).

    On each piece the 48- and 24-point Gauss–Legendre rules are compared and the piece is
    halved until they agree.  Where Q̇ falls towards zero beyond an end of the piece (the
    contents approaching a source temperature), 1/Q̇ grows like 1/(s − u) and a fixed rule
    is short (7.6 % at 0.1 K from the source); there the rule is taken in y = ln|s − u|, with
    s the zero of Q̇ extrapolated through three points, in which the integrand is nearly
    constant (the substitution of :func:`batch_time`, whose s is the source itself).
    """
    a48 = _rule(f, lo, hi, _NODES, _WEIGHTS)
    a24 = _rule(f, lo, hi, _NODES_24, _WEIGHTS_24)
    if abs(a48 - a24) <= 1e-9 * abs(a48):
        return a48
    if depth >= 40:
        raise NoConvergence(
            f"{target} lies too close to the state where the heat rate falls to zero: the "
            "time integral does not converge to 1e-9 (give a target farther from it)"
        )
    mid = (lo + hi) / 2
    return _quad(f, lo, mid, target, depth + 1) + _quad(f, mid, hi, target, depth + 1)


def _rule(f, lo: float, hi: float, nodes, weights) -> float:
    """One Gauss–Legendre rule on [lo, hi], in y = ln|s − u| when 1/f vanishes near an end."""
    fa, fm, fb = f(lo), f((lo + hi) / 2), f(hi)
    L = hi - lo
    s = None
    # the end where the rate is smaller, and the rate's zero extrapolated beyond it
    if abs(fb) > abs(fm) > abs(fa) or abs(fb) > abs(fa) and abs(fb) > abs(fm):
        qb, qm = 1 / fb, 1 / fm
        if qm != qb and (qm - qb) * qb > 0:  # |Q̇| falls towards hi
            s = hi + qb * (L / 2) / (qm - qb)
            s = s if 0 < s - hi < L else None
    elif abs(fa) > abs(fm):
        qa, qm = 1 / fa, 1 / fm
        if qm != qa and (qm - qa) * qa > 0:  # |Q̇| falls towards lo
            s = lo - qa * (L / 2) / (qm - qa)
            s = s if 0 < lo - s < L else None
    if s is None:
        mid, half = (lo + hi) / 2, L / 2
        return float(half * sum(w * f(mid + half * x) for x, w in zip(nodes, weights)))
    sign = 1.0 if s > hi else -1.0  # u = s − sign·e^y
    y_lo, y_hi = math.log(abs(s - lo)), math.log(abs(s - hi))
    mid, half = (y_lo + y_hi) / 2, (y_hi - y_lo) / 2
    total = 0.0
    for x, w in zip(nodes, weights):
        e = math.exp(mid + half * x)
        total += w * f(s - sign * e) * e
    # du = −sign·e^y dy
    return float(-sign * half * total)


def batch_time(c_of_T, m: float, T1: float, T2: float, UA: float, T_source: float) -> float:
    r"""Time to heat a batch of solid or liquid with c(T) from T1 to T2 through UA.

    .. math:: t = m \int_{T_1}^{T_2} \frac{c(T)\,dT}{UA\,(T_{source} - T)}

    Parameters
    ----------
    c_of_T : callable
        Specific heat c(T) (J/(kg·K)).
    m : float
        Mass (kg).
    T1, T2 : float
        Initial and final temperature (K), both on one side of T_source.
    UA : float
        Conductance (W/K).
    T_source : float
        Source temperature (K).

    Returns
    -------
    float
        t (s).

    References
    ----------
    .. [1] G. H. Golub, J. H. Welsch, "Calculation of Gauss quadrature rules", Math. Comp. 23
       (1969) 221–230 (the nodes and weights, numpy.polynomial.legendre.leggauss).
    .. [2] Lumped-capacitance heating through a conductance (common practice).

    Examples
    --------
    >>> t = batch_time(lambda T: 4180.0, 100.0, 293.15, 333.15, 500.0, 353.15)
    >>> round(t / (100 * 4180 / 500 * math.log(60 / 20)), 12)  # the closed form for constant c
    1.0
    """
    if not UA > 0:
        raise BadInput(f"UA = {fmt_value(UA)} W/K: the conductance must be above 0")
    if not m > 0:
        raise BadInput(f"m = {fmt_value(m)} kg: the mass must be above 0")
    if T2 == T1:
        return 0.0
    if (T_source - T1) * (T_source - T2) <= 0 or abs(T_source - T2) >= abs(T_source - T1):
        raise OutOfRange(
            f"T_2 = {fmt_value(T2)} K is not reached from T_1 = {fmt_value(T1)} K with the "
            f"source at {fmt_value(T_source)} K (a batch approaches the source, never passes it)"
        )
    # substitution y = ln(T_source − T) removes the end singularity's growth
    y1, y2 = math.log(abs(T_source - T1)), math.log(abs(T_source - T2))
    mid, half = (y1 + y2) / 2, (y2 - y1) / 2
    s = math.copysign(1.0, T_source - T1)
    total = 0.0
    for x, w in zip(_NODES, _WEIGHTS):
        T = T_source - s * math.exp(mid + half * x)
        total += w * c_of_T(T)
    # dT = −s·e^y dy and T_source − T = s·e^y, so c dT/(T_s − T) = −c dy
    return float(-m / UA * half * total)
