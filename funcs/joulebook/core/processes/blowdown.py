"""Blowdown seen from the gas that stays in the vessel.

A rigid vessel of volume V holds gas at state 1 and vents through an orifice of diameter d
(area A = π·d²/4, discharge coefficient C_d) to a back pressure P_b.  The gas that stays in
the vessel is a closed system of shrinking mass m = V/v: it pushes the leaving gas out, so
it expands, and per unit mass [1]_

    du = −P·dv + δq,       dv/dt = −v²/V · dm/dt,       dm/dt = −C_d·A·G(state, P_b)

With no heat (δq = 0) the expansion is isentropic, s = s1, and the vessel state follows from
(v, s1) alone.  With heat from the wall (a lumped wall of mass m_w and specific heat c_w(T_w)
exchanging hA·(T_w − T) with the gas), δq = hA·(T_w − T)·dt/m and
m_w·c_w·dT_w/dt = −hA·(T_w − T).

The mass flux G is that of an isentropic nozzle from the vessel state taken as stagnation
state, on the equation of state [2]_: G(P_t) = ρ(P_t, s)·√(2·(h − h(P_t, s))), maximized
over the throat pressure P_b ≤ P_t ≤ P.  Where the maximum lies above P_b the flow is
choked (the throat pressure is the critical pressure); otherwise P_t = P_b.  For an ideal
gas with constant k this is the textbook orifice law, and the choked isentropic blowdown has
the closed form [3]_

    P/P1 = [1 + (k − 1)/2 · C·t]^(−2k/(k − 1)),
    C = C_d·A/V · √(k·R·T1) · (2/(k + 1))^((k + 1)/(2(k − 1)))

The equations are integrated with scipy's explicit Runge–Kutta method of order 8 (DOP853)
to the event P = P_target.

Caution: engineering estimates.  The minimum temperature of the gas is not the minimum
temperature of the wall or of the outlet piping; depressuring systems and the materials'
minimum design temperature are governed by the applicable codes and standards and by the
judgement of a competent, licensed engineer.

References
----------
.. [1] First law of a closed system of variable boundary (common practice): the gas that
   stays does the flow work of the gas that leaves.
.. [2] Isentropic nozzle flow on a real-fluid equation of state, maximum mass flux at the
   throat (common practice; homogeneous equilibrium where the throat is two-phase).
.. [3] Closed-form choked discharge of an ideal gas from a vessel, isentropic (from memory;
   derived in tests/test_cases_round3.py from the same equations).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import BadInput, NoConvergence, OutOfRange, fmt_value
from ..media import Point

__all__ = ["Wall", "Blowdown", "nozzle_flux", "blowdown", "ideal_choked_pressure"]


@dataclass(frozen=True)
class Wall:
    """A lumped wall exchanging heat with the gas.

    Parameters
    ----------
    m : float
        Wall mass (kg), > 0.
    hA : float
        Conductance between wall and gas (W/K), > 0.
    c : callable
        Specific heat of the wall c(T) (J/(kg·K)), T in K.

    References
    ----------
    .. [1] EN 1993-1-2:2005 §3.4.1.2 (c(T) of carbon steel), from memory.

    Examples
    --------
    >>> Wall(100.0, 50.0, lambda T: 460.0).hA
    50.0
    """

    m: float
    hA: float
    c: Callable[[float], float]


@dataclass(frozen=True)
class Blowdown:
    """The result of a blowdown: time to the target, the minimum gas temperature and rows.

    Parameters
    ----------
    t_end : float
        Time to the target pressure (s).
    T_min : float
        Minimum gas temperature on the way (K).
    rows : list of tuple
        (t, P, T, m, T_wall or None) at the times asked for.
    row : callable, optional
        The row (t, P, T, m, T_wall or None) at any time t from 0 to t_end (dense output).

    References
    ----------
    .. [1] First law of a closed system of variable boundary (common practice).

    Examples
    --------
    >>> Blowdown(1.0, 250.0, []).t_end
    1.0
    """

    t_end: float
    T_min: float
    rows: list
    row: Callable[[float], tuple] | None = None


def nozzle_flux(
    med, p: Point, P_back: float, near: float | None = None
) -> tuple[float, bool, float]:
    r"""Mass flux of an isentropic nozzle from stagnation state *p* to the back pressure.

    .. math:: G = \max_{P_b \le P_t \le P} \rho(P_t, s)\,\sqrt{2\,(h - h(P_t, s))}

    Parameters
    ----------
    med : medium
        The gas (:func:`joulebook.core.media.medium`).
    p : Point
        The stagnation (vessel) state.
    P_back : float
        Back pressure (Pa, absolute).
    near : float, optional
        A throat pressure ratio P_t/P expected nearby (the last one): the search starts within
        ±5 % of it and widens to the whole range when the maximum lies at that window's edge.

    Returns
    -------
    tuple of (float, bool, float)
        G (kg/(s·m²)), whether the flow is choked, and the throat ratio P_t/P.

    References
    ----------
    .. [1] Isentropic nozzle flow, maximum mass flux at the throat (common practice).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> p = air.point("T", 300.0, "P", 5e5)
    >>> G, choked, ratio = nozzle_flux(air, p, 101325.0)
    >>> round(G, 2), choked, round(ratio, 4)   # P·√(k/(R·T))·(2/(k + 1))^3; (2/(k + 1))^3.5
    (1166.68, True, 0.5283)
    """
    from scipy.optimize import minimize_scalar

    if not P_back < p.P:
        return 0.0, False, 1.0
    h, s = p.h, p.s

    def flux(Pt: float) -> float:
        try:
            q = med.point("P", Pt, "s", s)
        except OutOfRange:  # no fluid state at this throat pressure (e.g. below the triple
            return 0.0  # point): the nozzle cannot pass flow there
        return math.sqrt(2.0 * max(h - q.h, 0.0)) / q.v

    def best(lo: float, hi: float):
        return minimize_scalar(
            lambda Pt: -flux(Pt),
            bounds=(lo, hi),
            method="bounded",
            options={"xatol": 1e-7 * p.P},  # G is flat at its maximum: error ~ (δP/P)²
        )

    res = None
    if near is not None:
        lo, hi = max(P_back, (near - 0.05) * p.P), min(p.P, (near + 0.05) * p.P)
        if lo < hi:
            res = best(lo, hi)
            edge = 1e-3 * (hi - lo)
            if (res.x - lo < edge and lo > P_back) or hi - res.x < edge:
                res = None  # the maximum lies beyond the window
    if res is None:
        res = best(P_back, p.P)
    G_back = flux(P_back)
    if G_back >= -res.fun:
        return float(G_back), False, P_back / p.P
    return float(-res.fun), True, float(res.x) / p.P


def ideal_choked_pressure(t: float, P1: float, T1: float, k: float, R: float, CdA_V: float):
    r"""Pressure of an ideal gas (constant k) in choked isentropic blowdown at time t.

    .. math:: \frac{P}{P_1} = \left[1 + \frac{k-1}{2} C t\right]^{-2k/(k-1)}, \quad
       C = \frac{C_d A}{V}\sqrt{k R T_1}\left(\frac{2}{k+1}\right)^{\frac{k+1}{2(k-1)}}

    Parameters
    ----------
    t : float
        Time (s).
    P1 : float
        Initial pressure (Pa).
    T1 : float
        Initial temperature (K).
    k : float
        Specific-heat ratio (-).
    R : float
        Specific gas constant (J/(kg·K)).
    CdA_V : float
        C_d·A/V (1/m).

    Returns
    -------
    float
        P (Pa); valid while the flow is choked.

    References
    ----------
    .. [1] Closed-form choked discharge of an ideal gas from a vessel (from memory).

    Examples
    --------
    >>> round(ideal_choked_pressure(0.0, 5e5, 300.0, 1.4, 287.0, 1e-3))
    500000
    """
    C = CdA_V * math.sqrt(k * R * T1) * (2.0 / (k + 1.0)) ** ((k + 1.0) / (2.0 * (k - 1.0)))
    return P1 * (1.0 + 0.5 * (k - 1.0) * C * t) ** (-2.0 * k / (k - 1.0))


def _check(p1: Point, V: float, d: float, Cd: float, P_back: float, P_target: float):
    if p1.x is not None or "liquid" in p1.phase:
        raise BadInput(
            f"state1 is {p1.phase}: the blowdown here is of a gas (or vapour, supercritical fluid)"
        )
    if not (math.isfinite(V) and V > 0):
        raise BadInput(f"V = {fmt_value(V)} m3: the vessel volume must be above 0")
    if not (math.isfinite(d) and 0 < d):
        raise BadInput(f"d = {fmt_value(d)} m: the orifice diameter must be above 0")
    if not (math.isfinite(Cd) and 0 < Cd <= 1):
        raise BadInput(f"Cd = {fmt_value(Cd)}: the discharge coefficient lies in 0 < Cd ≤ 1")
    if not (math.isfinite(P_back) and P_back > 0):
        raise BadInput(f"P_back = {fmt_value(P_back)} Pa: the back pressure must be above 0")
    if not P_back < P_target < p1.P:
        raise BadInput(
            f"P_target = {fmt_value(P_target)} Pa: the target lies between the back pressure "
            f"{fmt_value(P_back)} Pa and the start {fmt_value(p1.P)} Pa (the vessel only "
            "approaches the back pressure)"
        )


def blowdown(
    med,
    p1: Point,
    V: float,
    d: float,
    P_target: float,
    Cd: float = 1.0,
    P_back: float = 101_325.0,
    wall: Wall | None = None,
    points: int = 0,
) -> Blowdown:
    r"""Blow a vessel's gas down through an orifice to a target pressure.

    .. math:: m\,\frac{du}{dt} = -m P \frac{dv}{dt} + hA\,(T_w - T), \quad
       \frac{dm}{dt} = -C_d A\, G(P, s, P_b)

    Parameters
    ----------
    med : medium
        The gas (:func:`joulebook.core.media.medium`).
    p1 : Point
        The state at the start (gas, vapour or supercritical fluid).
    V : float
        Vessel volume (m³).
    d : float
        Orifice diameter (m).
    P_target : float
        Pressure to reach (Pa), between P_back and P1.
    Cd : float
        Discharge coefficient, 0 < Cd ≤ 1.
    P_back : float
        Back pressure (Pa).
    wall : Wall, optional
        The wall that warms the gas; None for the isentropic (adiabatic) blowdown.
    points : int
        Rows of the table, evenly spaced in time (0: none).

    Returns
    -------
    Blowdown
        Time to the target, minimum gas temperature, table rows.

    Raises
    ------
    BadInput
        Arguments out of range.
    OutOfRange
        A state outside the property model on the way.
    NoConvergence
        The integration failed.

    References
    ----------
    .. [1] First law of a closed system of variable boundary (common practice).
    .. [2] E. Hairer, S. P. Nørsett, G. Wanner, *Solving Ordinary Differential Equations I*,
       2nd ed., Springer, 1993, §II.5 (DOP853, as scipy.integrate.solve_ivp implements it).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> p1 = air.point("T", 300.0, "P", 10e5)
    >>> res = blowdown(air, p1, 1.0, 0.01, 3e5)
    >>> round(res.t_end, 2), round(res.T_min, 2)   # closed form 59.46 s; T1·(P/P1)^(2/7)
    (59.46, 212.68)
    """
    from scipy.integrate import solve_ivp

    _check(p1, V, d, Cd, P_back, P_target)
    CdA = Cd * math.pi * d * d / 4.0
    s1 = p1.s

    def state(y) -> Point:
        if wall is None:
            p = med.point("v", 1.0 / y[0], "s", s1)
        else:
            p = med.point("v", 1.0 / y[0], "u", y[1])
        if p.x is not None:
            raise OutOfRange(
                f"the gas in the vessel starts to condense near {fmt_value(round(p.P))} Pa, "
                f"{fmt_value(round(p.T, 2))} K: a two-phase blowdown is outside this model "
                "(choose a target above it)"
            )
        return p

    last = [None]  # the throat ratio of the last call, where the next search starts

    def rhs(t, y):
        p = state(y)
        G, _, last[0] = nozzle_flux(med, p, P_back, last[0])
        drho = -CdA * G / V
        if wall is None:
            return [drho]
        q = wall.hA * (y[2] - p.T)  # W into the gas
        rho = y[0]
        du = p.P * drho / (rho * rho) + q / (rho * V)
        return [drho, du, -q / (wall.m * wall.c(y[2]))]

    def reached(t, y):
        return state(y).P - P_target

    reached.terminal = True  # type: ignore[attr-defined]
    reached.direction = -1  # type: ignore[attr-defined]

    y0 = [1.0 / p1.v] if wall is None else [1.0 / p1.v, p1.u, p1.T]
    G0, _, last[0] = nozzle_flux(med, p1, P_back)
    if not G0 > 0:
        raise OutOfRange("blowdown: no fluid state along the nozzle's isentrope passes flow")
    tau = V / (CdA * G0 * p1.v)  # time to empty at the first rate
    try:
        sol = solve_ivp(
            rhs,
            (0.0, 1e4 * tau),
            y0,
            method="DOP853",
            rtol=1e-9,
            atol=[1e-12 * y0[0], 1e-3, 1e-9][: len(y0)],
            events=reached,
            dense_output=True,
        )
    except OutOfRange as e:
        raise OutOfRange(f"blowdown: {e.message}") from None
    if sol.status == -1:
        raise NoConvergence(f"blowdown: the integration failed ({sol.message})")
    if not sol.t_events[0].size:
        raise OutOfRange(
            f"blowdown: the pressure does not fall to {fmt_value(P_target)} Pa within "
            f"{fmt_value(1e4 * tau)} s (the wall keeps the gas above it)"
        )
    t_end = float(sol.t_events[0][0])
    T_min = _min_temperature(sol, state, t_end, wall is None)

    def row(t: float) -> tuple:
        y = sol.sol(t) if t < t_end else sol.y_events[0][0]
        p = state(y)
        return (float(t), p.P, p.T, float(V * y[0]), None if wall is None else float(y[2]))

    rows = [row(t) for t in np.linspace(0.0, t_end, points)] if points else []
    return Blowdown(t_end, T_min, rows, row)


def _min_temperature(sol, state, t_end: float, adiabatic: bool) -> float:
    """The lowest gas temperature up to t_end: the end state when adiabatic (T falls all the
    way), else the least of a dense sample refined by a bounded minimum search."""
    from scipy.optimize import minimize_scalar

    T_end = state(sol.y_events[0][0]).T
    if adiabatic:
        return T_end
    ts = np.linspace(0.0, t_end, 201)
    Ts = [state(sol.sol(t)).T for t in ts[:-1]] + [T_end]
    i = int(np.argmin(Ts))
    if i in (0, len(ts) - 1):
        return float(Ts[i])
    res = minimize_scalar(
        lambda t: state(sol.sol(t)).T,
        bounds=(ts[i - 1], ts[i + 1]),
        method="bounded",
        options={"xatol": 1e-9 * t_end},
    )
    return float(min(res.fun, Ts[i]))
