"""A gas-filled (unwetted) vessel in a fire: gas and wall temperature with time.

A closed cylinder of diameter D, length L (flat ends) and wall t holds gas only; the fire
heats the whole outer surface A = π·D·L + π·D²/2.  The wall (carbon steel, density
7850 kg/m³ and c(T) of EN 1993-1-2 [2]_) is one lumped temperature T_w; it passes heat to the
gas through a conductance UA_in (default h = 10 W/(m²·K) over A, a natural-convection value
for a gas: common practice — give your own).  The gas is a rigid closed system:

    m_g·du/dt = UA_in·(T_w − T)
    m_w·c(T_w)·dT_w/dt = A·q_net(t, T_w) − UA_in·(T_w − T)

integrated with scipy's DOP853 until the gas reaches the set pressure.  The net heat flux
into the wall is either a stated constant (an absorbed flux) or that of a fire curve of
EN 1991-1-2 [1]_ (§3.1, eq. 3.1–3.3):

    q_net = α_c·(θ_g − θ_w) + ε_m·ε_f·σ·[(θ_g + 273)⁴ − (θ_w + 273)⁴],  ε_m = 0.7, ε_f = 1

    standard curve     θ_g = 20 + 345·log10(8·t + 1),                       α_c = 25 W/(m²·K)
    hydrocarbon curve  θ_g = 1080·(1 − 0.325·e^(−0.167·t) − 0.675·e^(−2.5·t)) + 20,
                                                                           α_c = 50 W/(m²·K)

(t in minutes, θ in °C; the curves and coefficients from memory).

The wall's strength falls with its temperature: the table reports the hoop stress at the
gas pressure over the reduced yield strength k_y(T_w)·f_y (see
:mod:`joulebook.core.processes.wall`).  **An unwetted wall heats fast and can rupture at a
pressure below the relief set pressure, before the relief device opens**: relief alone does
not protect a gas-filled vessel in a fire; depressuring, fire protection or water spray are
judged by the applicable codes and standards and by a competent, licensed engineer.

References
----------
.. [1] EN 1991-1-2:2002, *Eurocode 1: Actions on structures — Part 1-2: Actions on
   structures exposed to fire*, §3.1 (net heat flux), §3.2.1 (standard curve), §3.2.3
   (hydrocarbon curve); from memory.
.. [2] EN 1993-1-2:2005, *Eurocode 3 — Part 1-2: Structural fire design*, §2.2 (ε_m = 0.7),
   §3.2.2 (ρ = 7850 kg/m³), §3.4.1.2 (c(T)), Table 3.1 (k_y); from memory.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import BadInput, NoConvergence, OutOfRange, fmt_value
from ..media import Point
from ..substances import solids
from . import wall as wallmod

__all__ = ["fire_curve", "net_flux", "GasFire", "gas_fire", "STEEL_DENSITY", "FIRES"]

STEEL_DENSITY = 7850.0  # kg/m³, EN 1993-1-2 §3.2.2 (from memory)
SIGMA = 5.670374419e-8  # W/(m²·K⁴), CODATA 2018
EPS_STEEL = 0.7  # EN 1993-1-2 §2.2 (from memory)
H_IN_DEFAULT = 10.0  # W/(m²·K), natural convection of a gas (common practice)
T_WALL_MAX = 1473.15  # K, the end of the steel data and of its strength
#: fire curve -> convective coefficient α_c (W/(m²·K)), EN 1991-1-2 §3.2 (from memory)
FIRES = {"standard": 25.0, "hydrocarbon": 50.0}


def fire_curve(curve: str, t: float) -> float:
    r"""Gas temperature of a nominal fire curve of EN 1991-1-2 at time t.

    .. math:: \theta_{std} = 20 + 345\log_{10}(8t + 1), \quad
       \theta_{hc} = 1080\,(1 - 0.325 e^{-0.167 t} - 0.675 e^{-2.5 t}) + 20

    (t in minutes, θ in °C).

    Parameters
    ----------
    curve : str
        ``standard`` or ``hydrocarbon``.
    t : float
        Time from ignition (s), ≥ 0.

    Returns
    -------
    float
        Fire gas temperature (K).

    Raises
    ------
    BadInput
        An unknown curve.

    References
    ----------
    .. [1] EN 1991-1-2:2002, §3.2.1 and §3.2.3 (nominal temperature–time curves), from
       memory.

    Examples
    --------
    >>> round(fire_curve("standard", 600.0) - 273.15, 1)   # 10 min: 678.4 °C
    678.4
    """
    tm = max(t, 0.0) / 60.0
    if curve == "standard":
        return 273.15 + 20.0 + 345.0 * math.log10(8.0 * tm + 1.0)
    if curve == "hydrocarbon":
        return (
            273.15
            + 20.0
            + 1080.0 * (1 - 0.325 * math.exp(-0.167 * tm) - 0.675 * math.exp(-2.5 * tm))
        )
    raise BadInput(f"fire = {curve!r}: use standard or hydrocarbon (or give the flux q)")


def net_flux(curve: str, t: float, T_w: float) -> float:
    r"""Net heat flux into a steel surface in a nominal fire (EN 1991-1-2 §3.1).

    .. math:: \dot q = \alpha_c(\theta_g - \theta_w)
       + \varepsilon_m \varepsilon_f \sigma \left(T_g^4 - T_w^4\right)

    with ε_m = 0.7 (carbon steel), ε_f = 1 and α_c 25 (standard) or 50 W/(m²·K)
    (hydrocarbon).

    Parameters
    ----------
    curve : str
        ``standard`` or ``hydrocarbon``.
    t : float
        Time from ignition (s).
    T_w : float
        Wall surface temperature (K).

    Returns
    -------
    float
        q (W/m²), into the wall.

    References
    ----------
    .. [1] EN 1991-1-2:2002, §3.1 eq. (3.1)–(3.3), from memory.
    .. [2] EN 1993-1-2:2005, §2.2 (ε_m = 0.7 for carbon steel), from memory.

    Examples
    --------
    >>> round(net_flux("hydrocarbon", 600.0, 293.15) / 1e3, 1)  # kW/m²
    166.3
    """
    Tg = fire_curve(curve, t)
    return FIRES[curve] * (Tg - T_w) + EPS_STEEL * SIGMA * (Tg**4 - T_w**4)


@dataclass(frozen=True)
class GasFire:
    """The result of a fire case: time to the set pressure and the table rows.

    Parameters
    ----------
    t_set : float
        Time to the set pressure (s).
    rows : list of tuple
        (t, T gas, T wall, P, stress ratio) at the times asked for.

    References
    ----------
    .. [1] EN 1991-1-2:2002 §3.1–3.2, from memory.

    Examples
    --------
    >>> GasFire(600.0, []).t_set
    600.0
    """

    t_set: float
    rows: list


def _geometry(D: float, L: float, t: float) -> tuple[float, float, float]:
    if not (math.isfinite(D) and D > 0):
        raise BadInput(f"D = {fmt_value(D)} m: the diameter must be above 0")
    if not (math.isfinite(L) and L > 0):
        raise BadInput(f"L = {fmt_value(L)} m: the length must be above 0")
    if not (math.isfinite(t) and 0 < t <= D / 4):
        raise BadInput(f"wall = {fmt_value(t)} m: the wall lies above 0 and at most D/4")
    V = math.pi * D * D / 4 * L
    A = math.pi * D * L + math.pi * D * D / 2
    return V, A, STEEL_DENSITY * A * t


def gas_fire(
    med,
    p1: Point,
    D: float,
    L: float,
    t_wall: float,
    P_set: float,
    flux: str | Callable[[float, float], float] = "hydrocarbon",
    UA_in: float | None = None,
    f_y: float = wallmod.YIELD_DEFAULT,
    P_amb: float = 101_325.0,
    points: int = 0,
) -> GasFire:
    r"""Heat a gas-filled steel vessel in a fire until its gas reaches the set pressure.

    .. math:: m_g \frac{du}{dt} = UA_{in}(T_w - T), \quad
       m_w c(T_w) \frac{dT_w}{dt} = A\,\dot q(t, T_w) - UA_{in}(T_w - T)

    Parameters
    ----------
    med : medium
        The gas (:func:`joulebook.core.media.medium`).
    p1 : Point
        The gas at the start; the wall starts at the same temperature.
    D : float
        Diameter (m).
    L : float
        Length between the flat ends (m).
    t_wall : float
        Wall thickness (m).
    P_set : float
        Set pressure (Pa, absolute), above P1.
    flux : str or callable
        ``standard`` or ``hydrocarbon`` (EN 1991-1-2 curves), or q(t, T_w) in W/m².
    UA_in : float, optional
        Wall-to-gas conductance (W/K); default 10 W/(m²·K) times the outer area.
    f_y : float
        Yield strength of the wall at room temperature (Pa).
    P_amb : float
        Pressure outside (Pa).
    points : int
        Rows of the table (0: none).

    Returns
    -------
    GasFire
        Time to the set pressure and the table.

    Raises
    ------
    BadInput
        Arguments out of range, a start state that is not a gas.
    OutOfRange
        The wall reaches 1200 °C (no strength left) before the set pressure.

    References
    ----------
    .. [1] EN 1991-1-2:2002, §3.1–3.2 (net heat flux, fire curves), from memory.
    .. [2] EN 1993-1-2:2005, §3.2.2, §3.4.1.2, Table 3.1 (steel), from memory.

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> n2 = medium("nitrogen")
    >>> p1 = n2.point("T", 293.15, "P", 10e5)
    >>> res = gas_fire(n2, p1, 1.0, 3.0, 0.008, 12e5)
    >>> round(res.t_set, 1)
    124.6
    """
    from scipy.integrate import solve_ivp

    if p1.x is not None or "liquid" in p1.phase:
        raise BadInput(f"state1 is {p1.phase}: this fire case is for a vessel holding gas only")
    if not P_set > p1.P:
        raise BadInput(
            f"P_set = {fmt_value(P_set)} Pa: the set pressure must lie above the start "
            f"{fmt_value(p1.P)} Pa"
        )
    if not (math.isfinite(f_y) and f_y > 0):
        raise BadInput(f"f_y = {fmt_value(f_y)} Pa: the yield strength must be above 0")
    V, A, m_w = _geometry(D, L, t_wall)
    UA = H_IN_DEFAULT * A if UA_in is None else UA_in
    if not (math.isfinite(UA) and UA > 0):
        raise BadInput(f"UA_in = {fmt_value(UA)} W/K: the conductance must be above 0")
    if isinstance(flux, str):
        if flux not in FIRES:
            raise BadInput(f"fire = {flux!r}: use standard or hydrocarbon (or give the flux q)")
        curve = flux
        q = lambda t, Tw: net_flux(curve, t, Tw)  # noqa: E731
    else:
        q = flux
    steel = solids.material("carbon steel")
    m_g = V / p1.v

    def gas(y) -> Point:
        return med.point("v", p1.v, "u", y[0])

    def rhs(t, y):
        Tw = min(y[1], T_WALL_MAX)
        Q = UA * (Tw - gas(y).T)
        return [Q / m_g, (A * q(t, Tw) - Q) / (m_w * solids.c(steel, Tw))]

    def at_set(t, y):
        return gas(y).P - P_set

    def too_hot(t, y):
        return y[1] - (T_WALL_MAX - 1e-6)

    at_set.terminal = True  # type: ignore[attr-defined]
    at_set.direction = 1  # type: ignore[attr-defined]
    too_hot.terminal = True  # type: ignore[attr-defined]
    too_hot.direction = 1  # type: ignore[attr-defined]
    t_max = 48 * 3600.0
    try:
        sol = solve_ivp(
            rhs,
            (0.0, t_max),
            [p1.u, p1.T],
            method="DOP853",
            rtol=1e-9,
            atol=[1e-9 * max(abs(p1.u), 1e3), 1e-9],
            events=(at_set, too_hot),
            dense_output=True,
            max_step=60.0,
        )
    except OutOfRange as e:
        raise OutOfRange(f"gas in a fire: {e.message}") from None
    if sol.status == -1:
        raise NoConvergence(f"gas in a fire: the integration failed ({sol.message})")
    if sol.t_events[1].size:
        raise OutOfRange(
            f"gas in a fire: the wall reaches 1200 °C at {fmt_value(float(sol.t_events[1][0]))} s "
            "before the gas reaches the set pressure; the wall would have failed first"
        )
    if not sol.t_events[0].size:
        raise OutOfRange(
            f"gas in a fire: the gas does not reach {fmt_value(P_set)} Pa within 48 h (the "
            "heat input levels off below it)"
        )
    t_set = float(sol.t_events[0][0])
    rows = []
    for t in np.linspace(0.0, t_set, points) if points else ():
        y = sol.sol(t) if t < t_set else sol.y_events[0][0]
        g = gas(y)
        sigma = wallmod.hoop_stress(g.P - P_amb, D, t_wall)
        k_y = wallmod.yield_reduction(float(y[1]))
        rows.append((float(t), g.T, float(y[1]), g.P, sigma / (k_y * f_y)))
    return GasFire(t_set, rows)
