"""Blocked-in liquid: the pressure after heating a liquid-full pipe or vessel whose walls
stretch, and the thermal-relief flow that keeps it at its set pressure.

A liquid-full space of mass m is closed and heated from (T1, P1) to T2.  Its volume follows
the wall: it grows with the wall's temperature (linear expansion coefficient α) and with the
pressure (thin-wall elastic strain), so the end state satisfies

    v(T2, P2) = v1 · (1 + α·ΔT)³ · (1 + c·(P2 − P1))

with v(T, P) from the fluid's equation of state and the volumetric compliance c of a thin
wall of mean diameter D, thickness t, Young's modulus E and Poisson's ratio ν [1]_:

    closed cylinder  c = D·(5 − 4ν)/(4·t·E)   (hoop σ = P·D/(2t), axial σ = P·D/(4t))
    sphere           c = 3·D·(1 − ν)/(4·t·E)  (σ = P·D/(4t) in every direction)

Both sides are monotonic in P2 (the liquid is compressed as the wall yields), so the root is
unique and found by bracketing.  A rigid wall (c = 0, α = 0) gives the upper bound
v(T2, P2) = v1.

The thermal-relief flow of a blocked-in liquid under a heat input Q̇ is the volume the
liquid's expansion pushes out per unit time at constant pressure [2]_:

    q = β·Q̇/(ρ·c_p)

(β the isobaric expansion coefficient, ρ the density, c_p the specific heat, at the relief
state).  It is the hydraulic-expansion relief formula of API Standard 521 (4.4.12, in its US
form gpm = β·H/(500·G·c); recalled from memory), written without unit constants.

Caution: engineering estimates.  Pressure equipment and its relief are governed by the
applicable codes and standards and by the judgement of a competent, licensed engineer.

References
----------
.. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
   McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels); the volumetric strain is
   the sum of the three normal strains of Hooke's law.
.. [2] API Standard 521, *Pressure-relieving and Depressuring Systems*, §4.4.12 (hydraulic
   expansion), from memory.
"""

from __future__ import annotations

import math

from ..errors import BadInput, OutOfRange, fmt_value
from ..roots import brent

__all__ = ["compliance", "elastic_p2", "relief_flow", "SHAPES"]

SHAPES = ("cylinder", "sphere")


def compliance(shape: str, D: float, t: float, E: float, nu: float) -> float:
    r"""Volumetric compliance c = (1/V)·dV/dP of a thin wall (1/Pa).

    .. math:: c_{cyl} = \frac{D\,(5 - 4\nu)}{4\,t\,E}, \qquad
       c_{sph} = \frac{3\,D\,(1 - \nu)}{4\,t\,E}

    Parameters
    ----------
    shape : str
        ``cylinder`` (closed ends) or ``sphere``.
    D : float
        Mean diameter, m.
    t : float
        Wall thickness, m; below D/2.
    E : float
        Young's modulus of the wall, Pa.
    nu : float
        Poisson's ratio, 0 ≤ ν < 0.5.

    Returns
    -------
    float
        c (1/Pa).

    Raises
    ------
    BadInput
        Unknown shape, or wall data out of range.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels); the volumetric strain is
       the sum of the three normal strains of Hooke's law.

    Examples
    --------
    >>> round(compliance("cylinder", 0.1, 0.005, 200e9, 0.3) * 1e9, 6)
    0.095
    """
    word = str(shape).strip().lower()
    if word not in SHAPES:
        raise BadInput(f"shape = {shape!r}: use cylinder (closed ends) or sphere")
    if not D > 0:
        raise BadInput(f"D = {fmt_value(D)} m: the mean diameter must be above 0")
    if not 0 < t < D / 2:
        raise BadInput(
            f"wall = {fmt_value(t)} m: the wall thickness must be above 0 and below the radius "
            f"{fmt_value(D / 2)} m"
        )
    if not E > 0:
        raise BadInput(f"E_mod = {fmt_value(E)} Pa: Young's modulus must be above 0")
    if not 0 <= nu < 0.5:
        raise BadInput(f"poisson = {fmt_value(nu)}: Poisson's ratio must lie in 0 ≤ ν < 0.5")
    if word == "cylinder":
        return D * (5 - 4 * nu) / (4 * t * E)
    return 3 * D * (1 - nu) / (4 * t * E)


def elastic_p2(med, p1, T2: float, c: float, alpha: float, shows=None) -> float:
    r"""End pressure of a blocked-in liquid heated in a wall that stretches.

    .. math:: v(T_2, P_2) = v_1 (1 + \alpha\,\Delta T)^3 (1 + c\,(P_2 - P_1))

    solved for P2 by bracketing; c = 0 and α = 0 give the rigid upper bound v(T2, P2) = v1.

    Parameters
    ----------
    med : medium
        The liquid's medium (:func:`joulebook.core.media.medium`).
    p1 : Point
        The state when blocked in (compressed or saturated liquid).
    T2 : float
        Temperature after heating (K).
    c : float
        Volumetric compliance of the wall (1/Pa), ≥ 0.
    alpha : float
        Linear expansion coefficient of the wall (1/K), 0–0.001.
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    float
        P2 (Pa, absolute).

    Raises
    ------
    BadInput
        A start state that is not liquid, or wall data out of range.
    OutOfRange
        The pressure would pass the model's limit, or vapour would form.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels); the volumetric strain is
       the sum of the three normal strains of Hooke's law.
    .. [2] API Standard 521, §4.4.12 (hydraulic expansion), from memory.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> water = medium("water")
    >>> p1 = water.point("T", 288.15, "P", 4e5)
    >>> rigid = elastic_p2(water, p1, 318.15, 0.0, 0.0)
    >>> steel = elastic_p2(water, p1, 318.15, 0.095e-9, 12e-6)
    >>> steel < rigid
    True
    """
    if p1.x is not None or "liquid" not in p1.phase:
        raise BadInput(
            f"state1 is {p1.phase}: a blocked-in line must start liquid-full (compressed or "
            "saturated liquid)"
        )
    if not math.isfinite(alpha) or not 0 <= alpha < 1e-3:
        raise BadInput(f"alpha_wall = {fmt_value(alpha)} 1/K: use 0 to 0.001 (steel 1.2e-5)")
    if not c >= 0:
        raise BadInput(f"the wall compliance {fmt_value(c)} 1/Pa must not be negative")
    grow = (1.0 + alpha * (T2 - p1.T)) ** 3

    def g(P: float) -> float:
        return med.point("T", T2, "P", P, shows).v - p1.v * grow * (1.0 + c * (P - p1.P))

    info = getattr(med, "info", None)
    P_max = info.P_max if info is not None else 1e9
    P_low = 1.0
    if info is not None and info.pure and info.T_triple <= T2 < info.T_crit:
        from ..substances.fluids import _psat

        P_low = _psat(info, T2) * (1 + 2e-5)  # just off the saturation line
    hi = min(P_max, max(p1.P, P_low) * 2)
    try:
        g_hi = g(hi)
        while g_hi > 0 and hi < P_max:
            hi = min(P_max, hi * 2)
            g_hi = g(hi)
        g_lo = g(P_low)
    except OutOfRange as e:
        raise OutOfRange(f"blocked-in liquid: {e.message}") from None
    if g_hi > 0:
        raise OutOfRange(
            f"blocked-in liquid: the pressure would pass the model's limit "
            f"{fmt_value(P_max / 1e6)} MPa before the liquid fits the container"
        )
    if g_lo < 0:
        raise OutOfRange(
            "blocked-in liquid: at T2 the container holds more than the liquid fills; the "
            "pressure falls to saturation and vapour forms (no longer liquid-full)"
        )
    return brent(g, P_low, hi, g_lo, g_hi, xtol=1e-6, rtol=1e-13, what="blocked-in pressure")


def relief_flow(beta: float, Q_dot: float, rho: float, cp: float) -> float:
    r"""Thermal-relief volume flow of a heated blocked-in liquid.

    .. math:: q = \frac{\beta\,\dot Q}{\rho\,c_p}

    Parameters
    ----------
    beta : float
        Isobaric expansion coefficient of the liquid (1/K).
    Q_dot : float
        Heat input (W), > 0.
    rho : float
        Density (kg/m³).
    cp : float
        Isobaric specific heat (J/(kg·K)).

    Returns
    -------
    float
        q (m³/s).

    Raises
    ------
    BadInput
        No heat input.
    OutOfRange
        A liquid that contracts on heating (β ≤ 0).

    References
    ----------
    .. [1] API Standard 521, *Pressure-relieving and Depressuring Systems*, §4.4.12
       (hydraulic expansion), from memory.

    Examples
    --------
    >>> round(relief_flow(2.57e-4, 10e3, 997.0, 4181.0) * 3.6e6, 3)  # L/h
    2.22
    """
    if not Q_dot > 0:
        raise BadInput(
            f"Q_dot = {fmt_value(Q_dot)} W: the heat input must be above 0 (no heat, no flow)"
        )
    if not beta > 0:
        raise OutOfRange(
            f"the liquid contracts on heating here (beta = {fmt_value(beta)} 1/K): no relief flow"
        )
    return beta * Q_dot / (rho * cp)
