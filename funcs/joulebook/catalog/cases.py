"""Worksheet adapters of the closed-system cases of issue 27 (round 3): a blocked-in liquid
with a gas pocket and its time to a set pressure, the wall's membrane stresses, a gas-filled
vessel in a fire, and blowdown seen from the gas that stays.

Like :mod:`joulebook.catalog.adapters`: each takes the catalog's arguments (numbers already in SI,
omitted optional arguments as ``None``) and the unit system, and returns SI (or a table whose
headings name the system's units).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from joulebook.core import states
from joulebook.core.errors import BadInput
from joulebook.core.processes import blockedin, blowdown, cushion, gasfire, wall
from joulebook.core.substances import gases, solids
from joulebook.core.units import UnitSystem

STANDARD_ATMOSPHERE = 101_325.0


def _state(text, arg: str):
    if not states.is_state_text(text):
        raise BadInput(f"{arg} must be a state text from JB_STATE (got {str(text)[:50]!r})")
    st = states.parse_state(text)
    med = st.medium
    a, va, b, vb = st.si()
    return med, med.point(a, va, b, vb, st.shows())


def _compliance(shape, D, t, E, nu) -> float:
    word = "rigid" if shape is None else str(shape).strip().lower()
    data = (("D", D), ("wall", t), ("E_mod", E), ("poisson", nu))  # the arguments' names
    if word == "rigid":
        given = [n for n, v in data if v is not None]
        if given:
            raise BadInput(
                f"shape rigid takes no wall data ({', '.join(given)} given): write cylinder or "
                "sphere for a wall that stretches"
            )
        return 0.0
    missing = [n for n, v in data if v is None]
    if missing:
        raise BadInput(f"shape {word} needs {', '.join(missing)} (the wall's data)")
    return blockedin.compliance(word, D, t, E, nu)


def _cushion(gas, V_gas, system: UnitSystem) -> cushion.Cushion:
    word = "nitrogen" if gas is None else str(gas).strip()
    if word.lower() in ("vapour", "vapor"):
        return cushion.Cushion(V_gas, "vapour", 0.0, None)
    g = gases.gas_model(word, system)
    return cushion.Cushion(V_gas, "gas", g.R, lambda a, b: gases.delta_u(g, a, b))


def _fill(state1, V, V_gas, gas, shape, D, t, E, nu, alpha, kappa, system):
    med, p1 = _state(state1, "state1")
    if kappa is not None and getattr(med, "liquid", None) is None:
        raise BadInput(
            f"kappa = {kappa:g} 1/Pa is for an incompressible-model liquid (glycol, oil); "
            f"{med.name} takes its compressibility from its equation of state"
        )
    c = _compliance(shape, D, t, E, nu)
    cu = _cushion(gas, V_gas, system)
    return cushion.fill(med, p1, V, cu, c, alpha or 0.0, kappa or 0.0)


def cushion_p2(state1, T_2, V, V_gas, gas, shape, D, wall_t, E, nu, alpha_wall, kappa, *, system):
    f = _fill(state1, V, V_gas, gas, shape, D, wall_t, E, nu, alpha_wall, kappa, system)
    return cushion.pressure_at(f, T_2)


def time_blocked_in(
    state1,
    V,
    V_gas,
    P_set,
    Q_dot,
    UA,
    T_source,
    gas,
    shape,
    D,
    wall_t,
    E,
    nu,
    alpha_wall,
    kappa,
    *,
    system,
):
    if (UA is None) != (T_source is None):
        raise BadInput("give UA and T_source together (or neither)")
    if UA is not None and not UA > 0:
        raise BadInput(f"UA = {UA:g} W/K: the conductance must be above 0")
    if Q_dot is not None and Q_dot < 0:
        raise BadInput(f"Q_dot = {Q_dot:g} W: the heat rate must not be negative")
    f = _fill(state1, V, V_gas or 0.0, gas, shape, D, wall_t, E, nu, alpha_wall, kappa, system)
    return cushion.time_to_set(f, P_set, Q_dot or 0.0, UA or 0.0, T_source)[0]


# ---------------------------------------------------------------------------------------
# the wall


def _dp(P, P_out) -> float:
    return P - (STANDARD_ATMOSPHERE if P_out is None else P_out)


def hoop_stress(P, D, wall_t, P_out, f_y, *, system):
    return wall.hoop_stress(_dp(P, P_out), D, wall_t)


def axial_stress(P, D, wall_t, P_out, f_y, *, system):
    return wall.axial_stress(_dp(P, P_out), D, wall_t)


# ---------------------------------------------------------------------------------------
# a gas-filled vessel in a fire


def _gas_fire(state1, D, L, wall_t, P_set, fire, q, UA_in, f_y, P_amb, points=0):
    med, p1 = _state(state1, "state1")
    if q is not None and fire is not None:
        raise BadInput("give a fire curve or a flux q, not both")
    if q is not None:
        if not q > 0:
            raise BadInput(f"q = {q:g} W/m2: the absorbed heat flux must be above 0")
        flux = lambda t, Tw: q  # noqa: E731
    else:
        flux = "hydrocarbon" if fire is None else str(fire).strip().lower()
    return gasfire.gas_fire(
        med,
        p1,
        D,
        L,
        wall_t,
        P_set,
        flux,
        UA_in,
        wall.YIELD_DEFAULT if f_y is None else f_y,
        STANDARD_ATMOSPHERE if P_amb is None else P_amb,
        points,
    )


def time_fire_gas(state1, D, L, wall_t, P_set, fire, q, UA_in, f_y, P_amb, *, system):
    return _gas_fire(state1, D, L, wall_t, P_set, fire, q, UA_in, f_y, P_amb).t_set


def _points(points) -> int:
    n = 11 if points is None else int(points)
    if points is not None and n != points or not 2 <= n <= 1000:
        raise BadInput(f"points = {points}: a whole number from 2 to 1000")
    return n


def time_fire_gas_table(state1, D, L, wall_t, P_set, fire, q, UA_in, f_y, P_amb, points, *, system):
    res = _gas_fire(state1, D, L, wall_t, P_set, fire, q, UA_in, f_y, P_amb, _points(points))
    u = system.unit
    out: list[list] = [
        [
            f"t in {u('time')}",
            f"T in {u('temperature')}",
            f"T_wall in {u('temperature')}",
            f"P in {u('pressure')}",
            "hoop stress / yield at T_wall",
        ]
    ]
    for t, T, Tw, P, ratio in res.rows:
        out.append(
            [
                system.conv("time").from_si(t),
                system.conv("temperature").from_si(T),
                system.conv("temperature").from_si(Tw),
                system.conv("pressure").from_si(P),
                ratio,
            ]
        )
    return out


# ---------------------------------------------------------------------------------------
# blowdown


@lru_cache(maxsize=64)  # the time, T_min and table of one case share one integration
def _blowdown(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall):
    med, p1 = _state(state1, "state1")
    if (m_wall is None) != (UA_wall is None):
        raise BadInput("give m_wall and UA_wall together for heat from the wall (or neither)")
    w = None
    if m_wall is not None:
        if not m_wall > 0:
            raise BadInput(f"m_wall = {m_wall:g} kg: the wall mass must be above 0")
        if not UA_wall > 0:
            raise BadInput(f"UA_wall = {UA_wall:g} W/K: the conductance must be above 0")
        steel = solids.material("carbon steel")
        solids_c = solids.c
        w = blowdown.Wall(m_wall, UA_wall, lambda T: solids_c(steel, T))
    return blowdown.blowdown(
        med,
        p1,
        V,
        d,
        P_target,
        1.0 if Cd is None else Cd,
        STANDARD_ATMOSPHERE if P_back is None else P_back,
        w,
    )


def time_blowdown(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, *, system):
    return _blowdown(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall).t_end


def blowdown_t_min(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, *, system):
    return _blowdown(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall).T_min


def time_blowdown_table(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall, points, *, system):
    res = _blowdown(state1, V, d, P_target, Cd, P_back, m_wall, UA_wall)
    rows = [res.row(t) for t in np.linspace(0.0, res.t_end, _points(points))]  # type: ignore[misc]
    u = system.unit
    head = [f"t in {u('time')}", f"P in {u('pressure')}", f"T in {u('temperature')}"]
    head += [f"m in {u('mass')}", f"T_wall in {u('temperature')}"]
    out: list[list] = [head]
    for t, P, T, m, Tw in rows:
        out.append(
            [
                system.conv("time").from_si(t),
                system.conv("pressure").from_si(P),
                system.conv("temperature").from_si(T),
                system.conv("mass").from_si(m),
                "" if Tw is None else system.conv("temperature").from_si(Tw),
            ]
        )
    return out


__all__ = [
    "cushion_p2",
    "time_blocked_in",
    "hoop_stress",
    "axial_stress",
    "time_fire_gas",
    "time_fire_gas_table",
    "time_blowdown",
    "blowdown_t_min",
    "time_blowdown_table",
]
