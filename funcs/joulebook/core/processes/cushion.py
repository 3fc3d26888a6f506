"""Blocked-in liquid with a gas pocket, and the time a heated blocked-in space takes to reach
a set pressure, both with the elastic wall.

A closed container of volume V (at state 1) holds liquid of mass m_L at (T1, P1) and a small
gas pocket of volume V_g1 — the cushion.  Heated to T2, the container grows with the wall
(linear expansion α, volumetric compliance c of :func:`blockedin.compliance`):

    V_c(T2, P2) = V·(1 + α·ΔT)³·(1 + c·(P2 − P1))

and the liquid takes m_L·v(T2, P2).  The pocket is what is left:

* **nitrogen (or another gas)**: an ideal gas at the liquid's temperature, holding the
  liquid's vapour at its saturation pressure P_v(T) where the liquid has one (neglected for
  the incompressible heat-transfer liquids), gas not dissolved:

      (V_c − m_L·v(T2, P2))·(P2 − P_v(T2)) = (P1 − P_v(T1))·V_g1·T2/T1

* **vapour** (the liquid's own vapour, a pure fluid saturated at state 1): the contents are one
  fluid of mass m = m_L + V_g1/v_g(T1) and v = V_c/m; while v lies above the saturated-liquid
  volume at T2 the pocket remains and P2 = P_sat(T2); after it has condensed the space is
  liquid-full and v(T2, P2) = V_c(T2, P2)/m.

Each residual is monotonic in P2, so the root is unique and bracketed [1]_.

**Time to a set pressure** under a heat rate Q̇(T) = Q̇_0 + UA·(T_source − T): the heat to
reach T is Q(T) = U(T) − U1 + W(T), U the contents' internal energy (liquid, gas, vapour),
W = ½·(P1 + P)·(V_c − V_c1) the work on the wall (trapezoid: the wall's P–V line); the
wall's own heat capacity is not included (add it to m·c for a heavy wall).  T_set solves
P(T) = P_set, and integrating t = ∫ dQ/Q̇(T) by parts avoids differentiating Q:

    t = Q(T_set)/Q̇(T_set) − ∫ Q(T)·UA/Q̇(T)² dT        (from T1 to T_set)

(adaptive quadrature, scipy.integrate.quad) — with UA = 0 it is Q/Q̇_0.

Caution: engineering estimates.  Gas dissolving in the liquid, a pocket that is not where the
heat is, and pockets trapped in branches change the answer; blocked-in liquid and its relief
are governed by the applicable codes and standards and by the judgement of a competent,
licensed engineer.

References
----------
.. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
   McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels); ideal-gas law and the
   first law of a closed system (common practice).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from ..errors import BadInput, OutOfRange, fmt_value
from ..media import Point
from ..roots import brent

__all__ = ["Cushion", "Fill", "fill", "pressure_at", "heat_to", "time_to_set"]


@dataclass(frozen=True)
class Cushion:
    """The gas pocket of a blocked-in space.

    Parameters
    ----------
    V_gas : float
        Pocket volume at state 1 (m³), ≥ 0 (0: liquid-full).
    kind : str
        ``gas`` (an ideal gas, with ``du`` its internal energy change per kg) or ``vapour``.
    R : float
        Specific gas constant of the gas (J/(kg·K)); unused for vapour.
    du : callable or None
        u(T2) − u(T1) of the gas per kg (J/kg), for the heat.

    References
    ----------
    .. [1] Ideal-gas law (common practice).

    Examples
    --------
    >>> Cushion(0.001, "gas", 296.8, None).kind
    'gas'
    """

    V_gas: float
    kind: str
    R: float
    du: Callable[[float, float], float] | None


@dataclass(frozen=True)
class Fill:
    """A blocked-in space: liquid, pocket, wall.

    Parameters
    ----------
    med : medium
        The liquid.
    p1 : Point
        Liquid state when blocked in.
    V : float
        Container volume (m³).
    cushion : Cushion
        The gas pocket.
    c : float
        Wall compliance (1/Pa).
    alpha : float
        Wall linear expansion (1/K).
    kappa : float
        Compressibility of an incompressible-model liquid (1/Pa), 0 for a real fluid.

    References
    ----------
    .. [1] Young & Budynas, Roark's Formulas for Stress and Strain, 7th ed., 2002, Table 13.1.

    Examples
    --------
    >>> Fill(None, None, 1.0, Cushion(0.0, "gas", 0.0, None), 0.0, 0.0, 0.0).V
    1.0
    """

    med: object
    p1: Point
    V: float
    cushion: Cushion
    c: float
    alpha: float
    kappa: float

    @property
    def m_liquid(self) -> float:
        """Mass of the liquid (kg)."""
        return (self.V - self.cushion.V_gas) / self.p1.v

    @property
    def m_vapour(self) -> float:
        """Mass of the vapour of a vapour pocket (kg), 0 otherwise."""
        if self.cushion.kind != "vapour" or self.cushion.V_gas == 0:
            return 0.0
        return self.cushion.V_gas / self.med.point("T", self.p1.T, "x", 1.0).v  # type: ignore[attr-defined]

    @property
    def m_gas(self) -> float:
        """Mass of the cushion gas (kg), 0 for vapour."""
        if self.cushion.kind != "gas" or self.cushion.V_gas == 0:
            return 0.0
        p_g = self.p1.P - vapour_pressure(self.med, self.p1.T)
        return p_g * self.cushion.V_gas / (self.cushion.R * self.p1.T)


def fill(med, p1: Point, V: float, cushion: Cushion, c: float, alpha: float, kappa: float) -> Fill:
    r"""A blocked-in space checked: a liquid state, a pocket smaller than the container.

    .. math:: 0 \le V_{g1} < V

    Parameters
    ----------
    med : medium
        The liquid.
    p1 : Point
        Liquid state when blocked in (saturated liquid for a vapour pocket).
    V : float
        Container volume (m³).
    cushion : Cushion
        The pocket.
    c : float
        Wall compliance (1/Pa), ≥ 0.
    alpha : float
        Wall linear expansion (1/K), 0–0.001.
    kappa : float
        Compressibility of an incompressible-model liquid (1/Pa), ≥ 0.

    Returns
    -------
    Fill
        The space.

    Raises
    ------
    BadInput
        A state that is not liquid, a pocket of the wrong size, wall data out of range.

    References
    ----------
    .. [1] Common practice (the inputs of a blocked-in case).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> f = fill(w, w.point("T", 288.15, "P", 4e5), 1.0, Cushion(0.0, "gas", 0.0, None), 0, 0, 0)
    >>> round(f.m_liquid, 1)
    999.2
    """
    if "liquid" not in p1.phase or (p1.x is not None and p1.x != 0.0):
        raise BadInput(
            f"state1 is {p1.phase}: a blocked-in space starts with liquid (compressed or "
            "saturated liquid)"
        )
    if not (math.isfinite(V) and V > 0):
        raise BadInput(f"V = {fmt_value(V)} m3: the container volume must be above 0")
    if not (math.isfinite(cushion.V_gas) and 0 <= cushion.V_gas < V):
        raise BadInput(
            f"V_gas = {fmt_value(cushion.V_gas)} m3: the pocket lies from 0 up to below the "
            f"container volume {fmt_value(V)} m3"
        )
    if not (math.isfinite(alpha) and 0 <= alpha < 1e-3):
        raise BadInput(f"alpha_wall = {fmt_value(alpha)} 1/K: use 0 to 0.001 (steel 1.2e-5)")
    if not (math.isfinite(kappa) and 0 <= kappa < 1e-7):
        raise BadInput(f"kappa = {fmt_value(kappa)} 1/Pa: use 0 to 1e-7 (water about 4.6e-10)")
    if cushion.kind == "vapour" and cushion.V_gas > 0 and p1.x != 0.0:
        raise BadInput(
            f"a vapour pocket needs the liquid saturated at state 1 (write x = 0); state1 is "
            f"{p1.phase}"
        )
    if cushion.kind == "gas" and cushion.V_gas > 0:
        if not p1.P > vapour_pressure(med, p1.T):
            raise BadInput("the gas pocket needs P1 above the liquid's vapour pressure")
    return Fill(med, p1, V, cushion, c, alpha, kappa)


def vapour_pressure(med, T: float) -> float:
    r"""Saturation pressure of the liquid at T (Pa); 0 where the model has none.

    .. math:: P_v = P_{sat}(T) \;\text{(pure fluids)}, \quad 0 \;\text{(incompressible liquids)}

    Parameters
    ----------
    med : medium
        The liquid.
    T : float
        Temperature (K).

    Returns
    -------
    float
        P_v (Pa).

    References
    ----------
    .. [1] The fluid's equation of state (CoolProp), saturation line.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> round(vapour_pressure(medium("water"), 373.124))
    101324
    """
    if getattr(med, "liquid", None) is not None:
        return 0.0
    try:
        return med.point("T", T, "x", 0.0).P
    except (BadInput, OutOfRange):
        return 0.0


def _container(f: Fill, T: float, P: float) -> float:
    return f.V * (1.0 + f.alpha * (T - f.p1.T)) ** 3 * (1.0 + f.c * (P - f.p1.P))


def _v_liquid(f: Fill, T: float, P: float) -> float:
    v = f.med.point("T", T, "P", P).v  # type: ignore[attr-defined]
    return v * math.exp(-f.kappa * (P - f.p1.P)) if f.kappa else v


def _p_max(f: Fill) -> float:
    info = getattr(f.med, "info", None)
    return info.P_max if info is not None else 1e9


def _solve_up(g, lo: float, f: Fill, what: str) -> float:
    """The root of increasing g above lo, the bracket grown by doubling."""
    P_max = _p_max(f)
    g_lo = g(lo)
    if g_lo >= 0:
        return lo
    hi = min(P_max, max(2 * lo, f.p1.P * 2, 2e5))
    try:
        g_hi = g(hi)
        while g_hi < 0 and hi < P_max:
            hi = min(P_max, hi * 2)
            g_hi = g(hi)
    except OutOfRange as e:
        raise OutOfRange(f"blocked-in liquid: {e.message}") from None
    if g_hi < 0:
        hint = ""
        if getattr(f.med, "liquid", None) is not None and not f.kappa:
            hint = (
                "; a liquid incompressible in the data needs a stretching wall, a pocket or kappa"
            )
        raise OutOfRange(
            f"blocked-in liquid: the pressure would pass {fmt_value(P_max / 1e6)} MPa (the "
            f"model's limit) before the contents fit the container{hint}"
        )
    return brent(g, lo, hi, g_lo, g_hi, xtol=1e-6, rtol=1e-13, what=what)


def pressure_at(f: Fill, T2: float) -> float:
    r"""Pressure of the blocked-in space at temperature T2.

    .. math:: (V_c - m_L v(T_2, P_2))\,(P_2 - P_v(T_2)) = (P_1 - P_v(T_1))\,V_{g1} T_2/T_1

    (gas pocket; vapour pocket and liquid-full as in the module text).

    Parameters
    ----------
    f : Fill
        The space.
    T2 : float
        Temperature (K).

    Returns
    -------
    float
        P2 (Pa, absolute).

    Raises
    ------
    OutOfRange
        The pressure passes the model's limit, or the liquid shrinks until vapour forms.

    References
    ----------
    .. [1] Young & Budynas, Roark's Formulas, 7th ed., Table 13.1; ideal-gas law.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> p1 = w.point("T", 288.15, "P", 4e5)
    >>> f = fill(w, p1, 1.0, Cushion(0.02, "gas", 296.8, None), 0.0, 0.0, 0.0)
    >>> round(pressure_at(f, 318.15) / 1e5, 2)   # bar
    7.84
    """
    if not math.isfinite(T2):
        raise BadInput(f"T_2 = {fmt_value(T2)} K must be a finite number")
    cu, m_L = f.cushion, f.m_liquid
    if cu.V_gas == 0 or cu.kind == "gas":
        Pv2 = vapour_pressure(f.med, T2)
        if cu.V_gas == 0:

            def g(P: float) -> float:
                return m_L * _v_liquid(f, T2, P) - _container(f, T2, P)

            lo = max(Pv2 * (1 + 2e-5), 1.0)
            if g(lo) < 0:
                raise OutOfRange(
                    "blocked-in liquid: at T_2 the container holds more than the liquid fills; "
                    "the pressure falls to saturation and vapour forms"
                )
            return _solve_up(lambda P: -g(P), lo, f, "blocked-in pressure")
        nRT = (f.p1.P - vapour_pressure(f.med, f.p1.T)) * cu.V_gas * T2 / f.p1.T

        def h(P: float) -> float:
            return (_container(f, T2, P) - m_L * _v_liquid(f, T2, P)) * (P - Pv2) - nRT

        return _solve_up(h, max(Pv2 * (1 + 2e-5), 1.0), f, "cushion pressure")
    # vapour pocket: one fluid of mass m
    m = m_L + f.m_vapour
    sat = f.med.point("T", T2, "x", 0.0)  # type: ignore[attr-defined]
    if _container(f, T2, sat.P) / m >= sat.v:
        return sat.P

    def k(P: float) -> float:
        return _container(f, T2, P) / m - f.med.point("T", T2, "P", P).v  # type: ignore[attr-defined]

    return _solve_up(k, sat.P * (1 + 2e-5), f, "blocked-in pressure")


def heat_to(f: Fill, T: float) -> tuple[float, float]:
    r"""Pressure at T and the heat into the contents from state 1 to T.

    .. math:: Q = U(T) - U_1 + \tfrac12 (P_1 + P)(V_c - V_{c1})

    Parameters
    ----------
    f : Fill
        The space.
    T : float
        Temperature (K).

    Returns
    -------
    tuple of float
        P (Pa) and Q (J).

    References
    ----------
    .. [1] First law of a closed system (common practice).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> p1 = w.point("T", 288.15, "P", 4e5)
    >>> f = fill(w, p1, 1.0, Cushion(0.02, "gas", 296.8, lambda a, b: 743.0 * (b - a)), 0, 0, 0)
    >>> round(heat_to(f, 298.15)[1] / 1e6, 1)   # MJ, about m·c·ΔT = 979 kg·4.18·10
    41.0
    """
    P = pressure_at(f, T)
    Vc = _container(f, T, P)
    W = 0.5 * (f.p1.P + P) * (Vc - f.V)
    cu = f.cushion
    if cu.kind == "vapour" and cu.V_gas > 0:
        m = f.m_liquid + f.m_vapour
        U1 = f.m_liquid * f.p1.u + f.m_vapour * f.med.point("T", f.p1.T, "x", 1.0).u  # type: ignore[attr-defined]
        sat = f.med.point("T", T, "x", 0.0)  # type: ignore[attr-defined]
        if Vc / m >= sat.v:
            u = f.med.point("T", T, "v", Vc / m).u  # type: ignore[attr-defined]
        else:
            u = f.med.point("T", T, "P", P).u  # type: ignore[attr-defined]
        return P, m * u - U1 + W
    u_L = f.med.point("T", T, "P", P).u  # type: ignore[attr-defined]
    dU = f.m_liquid * (u_L - f.p1.u)
    if f.m_gas:
        if cu.du is None:
            raise BadInput("the gas pocket's internal energy is needed for the heat")
        dU += f.m_gas * cu.du(f.p1.T, T)
    return P, dU + W


def time_to_set(
    f: Fill, P_set: float, Q0: float = 0.0, UA: float = 0.0, T_source: float | None = None
) -> tuple[float, float]:
    r"""Time for a heated blocked-in space to reach a set pressure, and the temperature then.

    .. math:: t = \frac{Q(T_{set})}{\dot Q(T_{set})} - \int_{T_1}^{T_{set}}
       \frac{Q(T)\,UA}{\dot Q(T)^2}\,dT, \qquad \dot Q = \dot Q_0 + UA\,(T_{source} - T)

    Parameters
    ----------
    f : Fill
        The space.
    P_set : float
        Set pressure (Pa, absolute), above P1.
    Q0 : float
        Constant heat rate (W), ≥ 0.
    UA : float
        Conductance to a source (W/K), ≥ 0.
    T_source : float, optional
        Source temperature (K), with UA.

    Returns
    -------
    tuple of float
        t (s) and T_set (K).

    Raises
    ------
    BadInput
        No heat, or a set pressure not above P1.
    OutOfRange
        The set pressure is never reached (the source is colder than needed).

    References
    ----------
    .. [1] First law per unit time of a closed system (common practice); integration by
       parts; R. Piessens et al., *QUADPACK*, Springer, 1983 (scipy.integrate.quad).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> w = medium("water")
    >>> p1 = w.point("T", 288.15, "P", 4e5)
    >>> f = fill(w, p1, 0.01, Cushion(0.0, "gas", 0.0, None), 0.095e-9, 12e-6, 0.0)
    >>> t, T = time_to_set(f, 50e5, Q0=100.0)
    >>> round(t), round(T - 273.15, 2)
    (5524, 28.31)
    """
    from scipy.integrate import quad

    p1 = f.p1
    if not (math.isfinite(P_set) and P_set > p1.P):
        raise BadInput(
            f"P_set = {fmt_value(P_set)} Pa: the set pressure must lie above the start "
            f"{fmt_value(p1.P)} Pa"
        )
    if not (Q0 >= 0 and UA >= 0) or (Q0 == 0 and UA == 0):
        raise BadInput("give a heat rate Q_dot above 0, or UA with T_source")
    if UA and T_source is None:
        raise BadInput("UA is given without T_source: give the source temperature too")

    def rate(T: float) -> float:
        return Q0 + (UA * (T_source - T) if UA else 0.0)  # type: ignore[operator]

    T_lo, T_hi = _bracket_T(f, P_set, rate)
    T_set = brent(
        lambda T: pressure_at(f, T) - P_set, T_lo, T_hi, xtol=1e-9, rtol=1e-13, what="T_set"
    )
    Q_set = heat_to(f, T_set)[1]
    t = Q_set / rate(T_set)
    if UA:
        integral, _ = quad(
            lambda T: heat_to(f, T)[1] * UA / rate(T) ** 2,
            p1.T,
            T_set,
            epsabs=0.0,
            epsrel=1e-9,
            limit=200,
        )
        t -= integral
    return t, T_set


def _bracket_T(f: Fill, P_set: float, rate) -> tuple[float, float]:
    """Temperatures below and above the one where P reaches P_set, where the heat still flows."""
    lo, step = f.p1.T, 1.0
    for _ in range(400):
        T = lo + step
        if not rate(T) > 0:
            raise OutOfRange(
                f"the heat rate falls to 0 at {fmt_value(round(T, 2))} K before the pressure "
                f"reaches {fmt_value(P_set)} Pa: the set pressure is never reached"
            )
        try:
            P = pressure_at(f, T)
        except OutOfRange:
            if step < 1e-6:
                raise
            step /= 4
            continue
        if P >= P_set:
            return lo, T
        lo, step = T, step * 2
    raise OutOfRange(f"the set pressure {fmt_value(P_set)} Pa is not reached")
