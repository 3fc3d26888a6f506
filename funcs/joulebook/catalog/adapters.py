"""Worksheet-facing adapters of the core: one plain function per catalog entry.

Each takes the catalog's arguments after cell conversion (numbers with a quantity already in
SI, text as given, optional arguments as ``None``) plus the unit system in force, and returns
an SI value for entries with a fixed result quantity, or the final value for entries whose
result unit is asked for in the formula (``JB_PROP``'s ``want``).
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import numpy as np

from joulebook.core import firstlaw, states
from joulebook.core.errors import (
    BadInput,
    BlankInput,
    JoulebookError,
    OutOfRange,
    fmt_value,
    message_in,
)
from joulebook.core.media import RealMedium, is_if97_text, medium
from joulebook.core.processes import (
    blockedin,
    cycles,
    engines,
    polytropic,
    pressuretests,
    solve,
    stored,
    timing,
    work,
)
from joulebook.core.substances import fluids, gases, humidair, solids
from joulebook.core.units import UnitSystem, convert, parse_phrase, parse_unit
from joulebook.core.version import __version__

from .cases import (  # noqa: F401  (issue 27 round 3: adapters kept in cases.py, re-exported)
    axial_stress,
    blowdown_t_min,
    cushion_p2,
    hoop_stress,
    time_blocked_in,
    time_blowdown,
    time_blowdown_table,
    time_fire_gas,
    time_fire_gas_table,
)

# ---------------------------------------------------------------------------------------
# real-fluid states


def _state_from_args(substance, spec1, value1, spec2, value2, system: UnitSystem) -> states.State:
    if not isinstance(substance, str) or not substance.strip():
        raise BadInput(f"substance must be a fluid name or a state text (got {substance!r})")
    if states.is_state_text(substance):
        extra = [
            n
            for n, v in (("spec1", spec1), ("value1", value1), ("spec2", spec2), ("value2", value2))
            if v is not None
        ]
        if extra:
            raise BadInput(f"a state text already fixes the state; leave {', '.join(extra)} blank")
        return states.parse_state(substance)
    missing = [
        n
        for n, v in (("spec1", spec1), ("value1", value1), ("spec2", spec2), ("value2", value2))
        if v is None
    ]
    if missing:
        msg = (
            f"{substance}: give two properties with values ({', '.join(missing)} missing), "
            "or pass a state text from JB_STATE"
        )
        if spec1 is not None and spec2 is not None:
            # both properties named, a value blank: a copied-down row not filled in yet
            raise BlankInput(msg)
        raise BadInput(msg)
    return states.make_state(substance, spec1, value1, spec2, value2, system)


def state_text(substance, spec1, value1, spec2, value2, *, system: UnitSystem) -> str:
    st = _state_from_args(substance, spec1, value1, spec2, value2, system)
    a, va, b, vb = st.si()
    st.medium.point(a, va, b, vb, shows=st.shows())  # validates the state
    return states.format_state(st)


_WANTS = tuple(w for w in fluids.OUTPUTS if w != "phase")


@lru_cache(maxsize=4096)
def _prop_plan(substance: str, want: str, spec1: str, spec2: str, system: UnitSystem):
    """Everything about a JB_PROP call except its two numbers, worked out once."""
    if not isinstance(want, str) or not want.strip():
        raise BadInput(f"want must name a property such as 'h in kJ/kg' (got {want!r})")
    med = medium(substance, system)
    p1 = states.spec_phrase(spec1, "spec1", system)
    p2 = states.spec_phrase(spec2, "spec2", system)
    shows = {p1.symbol: p1.conv, p2.symbol: p2.conv}
    if want.strip() == "phase":
        out = None
        sym = "phase"
    else:
        try:
            wp = parse_phrase(want, system, _WANTS)
        except BadInput as e:
            raise BadInput(f"want: {e.message}") from None
        out, sym = wp.conv, wp.symbol
    read = fluids.reader(sym) if isinstance(med, RealMedium) else None
    return med, p1.symbol, p1.conv, p2.symbol, p2.conv, sym, out, shows, read


def _prop_value(plan, va: float, vb: float):
    med, a, _, b, _, sym, out, shows, read = plan
    if read is not None:
        info = med.info
        val = read(info, fluids._flash(info, a, va, b, vb, shows), shows)
    else:
        val = med.read(sym, a, va, b, vb, shows)
    if sym == a or sym == b:  # an input read back is the input, to its last digit
        val = va if sym == a else vb
    return val if out is None or type(val) is str else out.from_si(val)


def prop(substance, want, spec1, value1, spec2, value2, *, system: UnitSystem):
    if (
        type(substance) is str
        and type(spec1) is str
        and type(spec2) is str
        and value1 is not None
        and value2 is not None
        and not states.is_state_text(substance)
    ):
        plan = _prop_plan(substance, want, spec1, spec2, system)
        return _prop_value(plan, plan[2].to_si(value1), plan[4].to_si(value2))
    st_ = _state_from_args(substance, spec1, value1, spec2, value2, system)
    (p1, v1), (p2, v2) = st_.specs
    return prop(
        st_.fluid,
        want,
        f"{p1.symbol} in {p1.unit}" if p1.unit else p1.symbol,
        v1,
        f"{p2.symbol} in {p2.unit}" if p2.unit else p2.symbol,
        v2,
        system=system,
    )


def prop_column(substance, want, spec1, value1, spec2, value2, *, system: UnitSystem):
    """JB_PROP over columns of value1/value2 (float arrays, NaN = blank) with one plan."""
    plan = _prop_plan(substance, want, spec1, spec2, system)
    med, a, ca, b, cb, sym, out, shows, read = plan
    va = ca.to_si(np.asarray(value1, dtype=float))
    vb = cb.to_si(np.asarray(value2, dtype=float))
    if read is not None:
        res = fluids.column_props(med.name, sym, a, va, b, vb, shows, out)
    else:
        va, vb = np.broadcast_arrays(va, vb)
        res = np.empty(va.shape, dtype=object)
        for idx in np.ndindex(va.shape):
            x, y = float(va[idx]), float(vb[idx])
            if x != x or y != y:
                res[idx] = None
                continue
            try:
                res[idx] = _prop_value(plan, x, y)
            except JoulebookError as e:
                res[idx] = e
    flat = res.reshape(-1)
    for i, r in enumerate(flat):
        if isinstance(r, JoulebookError):
            flat[i] = r.cell_text()
    return res


def phase(substance, spec1, value1, spec2, value2, *, system: UnitSystem) -> str:
    return prop(substance, "phase", spec1, value1, spec2, value2, system=system)


_SAT = re.compile(
    r"^\s*(?P<sym>Tsat|Psat|Tbubble|Tdew|Pbubble|Pdew|(?:v|u|h|s)(?:fg|f|g))\s*"
    r"(?:in\s+(?P<unit>.+?))?\s*$"
)
_SAT_KIND = {
    "T": "temperature",
    "P": "pressure",
    "v": "specific_volume",
    "u": "specific_energy",
    "h": "specific_energy",
    "s": "specific_entropy",
}


def saturation(substance, want, given, value, *, system: UnitSystem):
    if not isinstance(want, str):
        raise BadInput(f"want must be a saturation property such as 'hfg in kJ/kg' (got {want!r})")
    m = _SAT.match(want)
    if not m:
        raise BadInput(
            f"want {want!r}: use Tsat, Psat, Tbubble, Tdew, Pbubble, Pdew, vf, vg, vfg, uf, ug, "
            "ufg, hf, hg, hfg, sf, sg, sfg with an optional 'in unit'"
        )
    sym = m.group("sym")
    kind = _SAT_KIND[sym[0]]
    conv = parse_unit(m.group("unit"), kind) if m.group("unit") else system.conv(kind)
    gp = states.spec_phrase(given, "given", system)
    if gp.symbol not in ("T", "P"):
        raise BadInput(f"given must be 'T in …' or 'P in …' (got {given!r})")
    from joulebook.core.substances import mixtures

    # a named blend (R410A) is its pseudo-pure equation of state here as in JB_PROP; a
    # composition is the mixture model
    if mixtures.is_mixture_text(substance):
        return conv.from_si(
            _blend_saturation(substance, gp.symbol, gp.conv.to_si(float(value)), sym)
        )
    if isinstance(substance, str) and is_if97_text(substance):
        if sym in ("Tbubble", "Tdew", "Pbubble", "Pdew"):
            sym = sym[0] + "sat"  # water's bubble and dew points are its saturation point
        from joulebook.core.substances import if97

        return conv.from_si(if97.saturation(gp.symbol, gp.conv.to_si(float(value)), sym))
    info = fluids.fluid_info(substance)
    si = fluids.saturation(
        info.name, gp.symbol, gp.conv.to_si(float(value)), sym, shows={gp.symbol: gp.conv}
    )
    return conv.from_si(si)


def _blend_saturation(text: str, by: str, value: float, sym: str) -> float:
    """Bubble (liquid, f) and dew (vapour, g) points of a mixture or named blend."""
    from joulebook.core.substances import mixtures

    mix = mixtures.parse(text)
    if sym in ("Tsat", "Psat"):
        raise BadInput(
            f"{mix.text}: a mixture boils over a range; ask Tbubble and Tdew (or Pbubble, Pdew), "
            "or the f (bubble) and g (dew) properties"
        )
    if sym in ("Tbubble", "Tdew", "Pbubble", "Pdew"):
        if sym[0] == by:
            raise BadInput(f"{sym} at given {by}: give the other of T and P")
        T, P, *_ = mixtures.saturation(mix, by, value, 0.0 if "bubble" in sym else 1.0)
        return T if sym[0] == "T" else P
    prop, side = sym[0], sym[1:]
    idx = {"v": 2, "u": 3, "h": 4, "s": 5}[prop]
    f = mixtures.saturation(mix, by, value, 0.0)[idx]
    g = mixtures.saturation(mix, by, value, 1.0)[idx]
    return f if side == "f" else g if side == "g" else g - f


# ---------------------------------------------------------------------------------------
# ideal gases


def _gas(gas, system: UnitSystem) -> gases.GasModel:
    if not isinstance(gas, str) or not gas.strip():
        raise BadInput(f"gas must be a name such as air, or 'air | k = 1.4' (got {gas!r})")
    return gases.gas_model(gas, system)


def gas_cp(gas, T, *, system):
    return gases.cp(_gas(gas, system), T)


def gas_cv(gas, T, *, system):
    return gases.cv(_gas(gas, system), T)


def gas_k(gas, T, *, system):
    return gases.k(_gas(gas, system), T)


def gas_R(gas, *, system):
    return _gas(gas, system).R


def gas_molar_mass(gas, *, system):
    g = _gas(gas, system)
    if g.M is None:
        raise BadInput(f"gas model {gas!r} was given by R only; its molar mass is unknown")
    return g.M


def gas_delta_h(gas, T1, T2, *, system):
    return gases.delta_h(_gas(gas, system), T1, T2)


def gas_delta_u(gas, T1, T2, *, system):
    return gases.delta_u(_gas(gas, system), T1, T2)


def gas_cp_mean(gas, T1, T2, *, system):
    return gases.cp_mean(_gas(gas, system), T1, T2)


def gas_delta_s(gas, T1, T2, P1, P2, *, system):
    return gases.delta_s(_gas(gas, system), T1, T2, P1, P2)


# ---------------------------------------------------------------------------------------
# incompressible solids and liquids


def _mat(material) -> solids.Material:
    if not isinstance(material, str) or not material.strip():
        raise BadInput(f"material must be a name such as copper (got {material!r})")
    return solids.material(material)


def solid_c(material, T, *, system):
    return solids.c(_mat(material), T)


def solid_c_mean(material, T1, T2, *, system):
    return solids.c_mean(_mat(material), T1, T2)


def solid_delta_u(material, T1, T2, *, system):
    return solids.delta_u(_mat(material), T1, T2)


def solid_heat(material, m, T1, T2, *, system):
    if not m >= 0:
        raise BadInput(f"m = {m} kg: mass must be ≥ 0")
    return m * solids.delta_u(_mat(material), T1, T2)


# ---------------------------------------------------------------------------------------
# utilities


def unit_convert(value, from_unit, to_unit, *, system):
    for n, u in (("from_unit", from_unit), ("to_unit", to_unit)):
        if not isinstance(u, str) or not u.strip():
            raise BadInput(f"{n} must be a unit such as kPa (got {u!r})")
    return convert(value, from_unit, to_unit)


_TOPICS = ("version", "fluids", "materials", "units")


def why(message, *, system):
    """The joulebook message a face found in a cell ("" when the cell did not fail)."""
    return message_in(message)


def about(topic, *, system):
    topic = "version" if topic is None else str(topic).strip().lower()
    if topic == "version":
        return f"joulebook {__version__}; {fluids.coolprop_version()}"
    if topic == "fluids":
        return [[n] for n in fluids.fluid_names()]
    if topic == "materials":
        return [[n] for n in solids.material_names()]
    if topic == "units":
        return [["K-kPa-kJ"], ["K-Pa-J"], ["degC-bar-kJ"], ["degF-psia-Btu"], ["R-psia-Btu"]]
    raise BadInput(f"topic {topic!r}: use one of {', '.join(_TOPICS)}")


# ---------------------------------------------------------------------------------------
# boundary work, polytropic analysis, first law


def _positive_mass(m: float) -> None:
    if not m > 0:
        raise BadInput(f"m = {m} kg: mass must be > 0")


def work_isobaric(P, V_1, V_2, *, system):
    return work.isobaric(P, V_1, V_2)


def work_isothermal(P_1, V_1, V_2, *, system):
    return work.isothermal(P_1, V_1, V_2)


def work_isothermal_mass(gas, m, T, V_1, V_2, *, system):
    _positive_mass(m)
    if not T > 0:
        raise OutOfRange(f"T = {T} K must be > 0 (absolute)")
    if not (V_1 > 0 and V_2 > 0):
        raise OutOfRange("V_1 and V_2 must be > 0")
    return m * _gas(gas, system).R * T * math.log(V_2 / V_1)


def work_polytropic(P_1, V_1, P_2, V_2, *, system):
    return work.polytropic_states(P_1, V_1, P_2, V_2)


def work_polytropic_n(P_1, V_1, V_2, n, *, system):
    return work.polytropic_n(P_1, V_1, V_2, n)


def work_linear(P_1, V_1, P_2, V_2, *, system):
    return work.linear(P_1, V_1, P_2, V_2)


def work_pv(P_values, V_values, method, *, system):
    return work.from_pv(P_values, V_values, method or "trapezoid")


def work_electric_in(voltage, current, duration, *, system):
    return firstlaw.electrical_work_in(voltage, current, duration)


def work_shaft_in(torque, revolutions, *, system):
    return firstlaw.shaft_work_in(torque, revolutions)


def poly_exponent(P_1, V_1, P_2, V_2, *, system):
    return polytropic.exponent(P_1, V_1, P_2, V_2)


def poly_fit(P_values, V_values, show, *, system):
    n, C, r2 = polytropic.fit(P_values, V_values)
    what = "n" if show is None else str(show).strip().lower()
    if what == "n":
        return n
    if what == "all":
        # C in the unit system's own units: P_unit · V_unit^n
        c_user = C / system.conv("pressure").factor / system.conv("volume").factor ** n
        return [[n, c_user, r2]]
    raise BadInput(f"show = {show!r}: use n (default) or all (n, C, R² as a row)")


def poly_p2(P_1, V_1, V_2, n, *, system):
    return polytropic.p2(P_1, V_1, V_2, n)


def poly_v2(P_1, V_1, P_2, n, *, system):
    return polytropic.v2(P_1, V_1, P_2, n)


def poly_t2_from_v(T_1, V_1, V_2, n, *, system):
    return polytropic.t2_from_v(T_1, V_1, V_2, n)


def poly_t2_from_p(T_1, P_1, P_2, n, *, system):
    return polytropic.t2_from_p(T_1, P_1, P_2, n)


def balance_heat(dU, W_b, W_other, dKE, dPE, *, system):
    return firstlaw.heat(dU, W_b, W_other, dKE, dPE)


def balance_gap(Q, W_b, dU, W_other, dKE, dPE, *, system):
    return firstlaw.gap(Q, W_b, dU, W_other, dKE, dPE)


def balance_delta_ke(m, vel_1, vel_2, *, system):
    return firstlaw.delta_ke(m, vel_1, vel_2)


def balance_delta_pe(m, z_1, z_2, g, *, system):
    return firstlaw.delta_pe(m, z_1, z_2, g)


def heat_isobaric_gas(gas, m, T_1, T_2, W_other, *, system):
    _positive_mass(m)
    return m * gases.delta_h(_gas(gas, system), T_1, T_2) + (W_other or 0.0)


def heat_rigid_gas(gas, m, T_1, T_2, W_other, *, system):
    _positive_mass(m)
    return m * gases.delta_u(_gas(gas, system), T_1, T_2) + (W_other or 0.0)


# ---------------------------------------------------------------------------------------
# end-state solver


_PROC_KIND = {
    "P2": "pressure",
    "T2": "temperature",
    "v2": "specific_volume",
    "V2": "volume",
    "x2": "dimensionless",
    "u2": "specific_energy",
    "h2": "specific_energy",
    "s2": "specific_entropy",
    "W": "energy",
    "Q": "energy",
    "dU": "energy",
    "dH": "energy",
    "phase2": "text",
}
#: a property of the end state written without its 2 ("P in bar" is P2 in want and end_spec)
_END_STATE_SYMS = frozenset(("P", "T", "v", "V", "x", "u", "h", "s"))
_PROC_ALIAS = {"ΔU": "dU", "ΔH": "dH", "DU": "dU", "DH": "dH", "phase": "phase2"}
_PROC_PHRASE = re.compile(r"^\s*(?P<sym>[A-Za-zΔ][A-Za-z0-9]*)\s*(?:in\s+(?P<unit>.+?))?\s*$")


@lru_cache(maxsize=1024)
def _proc_phrase(text: str, arg: str, allowed: tuple, system: UnitSystem):
    if not isinstance(text, str):
        raise BadInput(f"{arg} must be text such as 'T2 in degC' (got {text!r})")
    m = _PROC_PHRASE.match(text)
    sym = _PROC_ALIAS.get(m.group("sym"), m.group("sym")) if m else None
    if sym in _END_STATE_SYMS:
        sym += "2"  # the end spec and the wanted state can only mean the end: "T in degC" is T2
    if sym not in allowed:
        raise BadInput(
            f"{arg} {text!r}: use one of {' '.join(allowed)} (P means P2), optionally 'in unit'"
        )
    kind = _PROC_KIND[sym]
    if kind == "text":
        return sym, None
    unit = m.group("unit")
    conv = parse_unit(unit, kind) if unit else system.conv(kind)
    return sym, conv


_WANT_SYMS = tuple(_PROC_KIND)


def _solved(state1, path, end_spec, end_value, mass, system):
    if not states.is_state_text(state1):
        raise BadInput(f"state1 must be a state text from JB_STATE (got {str(state1)[:50]!r})")
    st = states.parse_state(state1)
    med = st.medium
    a, va, b, vb = st.si()
    p1 = med.point(a, va, b, vb, st.shows())
    pth = solve.parse_path(path, system)
    end, conv = _proc_phrase(end_spec, "end_spec", solve.END_SPECS, system)
    m = 1.0 * system.conv("mass").factor if mass is None else mass
    res = solve.solve(med, p1, m, pth, end, conv.to_si(float(end_value)), st.shows())
    return med, res


def _proc_value(res, sym: str):
    p2 = res.p2
    if sym == "x2":
        if p2.x is None:
            raise OutOfRange(
                f"x2 is defined only for saturated states; the end state is {p2.phase}"
            )
        return p2.x
    return {
        "P2": p2.P,
        "T2": p2.T,
        "v2": p2.v,
        "V2": res.m * p2.v,
        "u2": p2.u,
        "h2": p2.h,
        "s2": p2.s,
        "W": res.W,
        "Q": res.Q,
        "dU": res.dU,
        "dH": res.dH,
        "phase2": p2.phase,
    }[sym]


def _given(end_spec, end_value, sym: str, conv, system):
    """The end value as given when *sym* (read in *conv*) is the end spec itself: an input
    read back equals the input to its last digit (None otherwise)."""
    end, end_conv = _proc_phrase(end_spec, "end_spec", solve.END_SPECS, system)
    if end != sym or conv is None or end_conv is None:
        return None
    if (end_conv.factor, end_conv.offset) == (conv.factor, conv.offset):
        return float(end_value)
    return conv.from_si(end_conv.to_si(float(end_value)))


def process(state1, path, end_spec, end_value, want, mass, *, system):
    med, res = _solved(state1, path, end_spec, end_value, mass, system)
    sym, conv = _proc_phrase(want, "want", _WANT_SYMS, system)
    given = _given(end_spec, end_value, sym, conv, system)
    if given is not None:
        return given
    val = _proc_value(res, sym)
    return val if conv is None else conv.from_si(val)


def work_path(state1, path, end_spec, end_value, mass, *, system):
    _, res = _solved(state1, path, end_spec, end_value, mass, system)
    return res.W


def process_table(state1, path, end_spec, end_value, mass, *, system):
    _, res = _solved(state1, path, end_spec, end_value, mass, system)
    rows = []
    for sym in _WANT_SYMS:
        kind = _PROC_KIND[sym]
        try:
            val = _proc_value(res, sym)
        except OutOfRange:
            rows.append([sym, "—", ""])
            continue
        if kind == "text":
            rows.append([sym, val, ""])
        else:
            given = _given(end_spec, end_value, sym, system.conv(kind), system)
            shown = given if given is not None else system.conv(kind).from_si(val)
            rows.append([sym, shown, system.unit(kind)])
    return rows


def process_path(state1, path, end_spec, end_value, points, mass, *, system):
    med, res = _solved(state1, path, end_spec, end_value, mass, system)
    N = 21 if points is None else int(points)
    if points is not None and N != points:
        raise BadInput(f"points = {points} must be a whole number")
    pts = solve.path_points(med, res, N)
    cols = (
        ("V", "volume", lambda p: res.m * p.v),
        ("P", "pressure", lambda p: p.P),
        ("T", "temperature", lambda p: p.T),
        ("v", "specific_volume", lambda p: p.v),
        ("s", "specific_entropy", lambda p: p.s),
    )
    header = [f"{sym} in {system.unit(kind)}" for sym, kind, _ in cols]
    body = [[system.conv(kind).from_si(fn(p)) for _, kind, fn in cols] for p in pts]
    return [header, *body]


# ---------------------------------------------------------------------------------------
# cycles and stored energy


def cycle_net(values, *, system):
    return cycles.net(values)


def cycle_gap(Q_values, W_values, *, system):
    return cycles.gap(Q_values, W_values)


def cycle_efficiency(Q_values, W_values, *, system):
    return cycles.efficiency(Q_values, W_values)


def stored_isentropic(state, V, P_amb, *, system):
    if not states.is_state_text(state):
        raise BadInput(f"state must be a state text from JB_STATE (got {str(state)[:50]!r})")
    st = states.parse_state(state)
    med = st.medium
    a, va, b, vb = st.si()
    p1 = med.point(a, va, b, vb, st.shows())
    if stored.holds_liquid(p1):  # a gas estimate: liquid contents flash (issue 27)
        raise OutOfRange(
            f"the contents are {stored.described(p1)}: a liquid that flashes is no gas "
            "expansion; use JB_STORED_FLASHING_LIQUID (JB_TEST_HYDRO_ENERGY if it does not boil)"
        )
    return stored.isentropic(
        med, p1, V, stored.STANDARD_ATMOSPHERE if P_amb is None else P_amb, st.shows()
    )


def stored_flashing_liquid(state, V, P_amb, *, system):
    med, p1, shows = _liquid_state(state, "state")
    E, _x2 = stored.flashing_liquid(
        med, p1, V, stored.STANDARD_ATMOSPHERE if P_amb is None else P_amb, shows
    )
    return E


def stored_ideal_isentropic(P, V, k, P_amb, *, system):
    return stored.ideal_isentropic(P, V, k, stored.STANDARD_ATMOSPHERE if P_amb is None else P_amb)


def stored_isochoric(P, V, k, P_amb, *, system):
    return stored.isochoric(P, V, k, stored.STANDARD_ATMOSPHERE if P_amb is None else P_amb)


# ---------------------------------------------------------------------------------------
# blocked-in liquid


def _liquid_state(text, arg: str):
    if not states.is_state_text(text):
        raise BadInput(f"{arg} must be a state text from JB_STATE (got {str(text)[:50]!r})")
    st = states.parse_state(text)
    med = st.medium
    a, va, b, vb = st.si()
    return med, med.point(a, va, b, vb, st.shows()), st.shows()


def blocked_in_p2(state1, T_2, shape, D, wall, E, nu, alpha_wall, *, system):
    med, p1, shows = _liquid_state(state1, "state1")
    c = _wall_compliance(shape, D, wall, E, nu)
    return blockedin.elastic_p2(med, p1, T_2, c, alpha_wall or 0.0, shows)


def _wall_compliance(shape, D, wall, E, nu) -> float:
    """The volumetric compliance of the container (0 for a rigid one), its data checked."""
    word = "rigid" if shape is None else str(shape).strip().lower()
    data = (("D", D), ("wall", wall), ("E_mod", E), ("poisson", nu))
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
    return blockedin.compliance(word, D, wall, E, nu)


def relief_thermal_flow(state, Q_dot, *, system):
    med, p1, shows = _liquid_state(state, "state")
    if p1.x is not None or "liquid" not in p1.phase:
        raise BadInput(f"state is {p1.phase}: the thermal-relief flow is for a liquid")
    T, P = p1.T, p1.P
    beta = med.read("beta", "T", T, "P", P, shows)
    cp = med.read("cp", "T", T, "P", P, shows)
    return blockedin.relief_flow(beta, Q_dot, 1.0 / p1.v, cp)


# ---------------------------------------------------------------------------------------
# time


def _target(spec, value, system):
    if not isinstance(spec, str):
        raise BadInput(f"target must be text such as 'P in bar' (got {spec!r})")
    ph = parse_phrase(spec, system, ("T", "P", "x"))
    return ph.symbol, ph.conv.to_si(float(value))


def _heat_rate(Q_dot, UA, T_source):
    if UA is None and T_source is not None:
        raise BadInput("T_source is given without UA: give both, or neither")
    if UA is not None and T_source is None:
        raise BadInput("UA is given without T_source: give the source temperature too")
    if UA is not None and not UA > 0:
        raise BadInput(f"UA = {UA:g} W/K: the conductance must be above 0")
    q0 = Q_dot or 0.0
    if UA is None and q0 == 0.0:
        raise BadInput("Q_dot = 0 and no UA: with no heat the time is infinite")
    if UA is None:
        return lambda p: q0
    return lambda p: q0 + UA * (T_source - p.T)


def _rigid_time(state1, V, target, target_value, rate, system, points=0):
    if not V > 0:  # an empty vessel holds no contents to heat: no time, refused
        c = system.conv("volume")
        raise BadInput(f"V = {fmt_value(c.from_si(V))} {c.unit}: the vessel volume must be above 0")
    med, p1, _ = _liquid_state(state1, "state1")
    sym, value = _target(target, target_value, system)
    return timing.rigid_heating(med, p1, V / p1.v, sym, value, rate, points)


def _time_table(res, system):
    t, rows = res
    header = [
        f"t in {system.unit('time')}",
        f"T in {system.unit('temperature')}",
        f"P in {system.unit('pressure')}",
        "x",
        f"Q in {system.unit('energy')}",
    ]
    out = [header]
    for tt, p, q in rows:
        out.append(
            [
                system.conv("time").from_si(tt),
                system.conv("temperature").from_si(p.T),
                system.conv("pressure").from_si(p.P),
                "" if p.x is None else p.x,
                system.conv("energy").from_si(q),
            ]
        )
    return out


def time_heating(state1, V, target, target_value, Q_dot, UA, T_source, *, system):
    return _rigid_time(state1, V, target, target_value, _heat_rate(Q_dot, UA, T_source), system)


def time_heating_table(state1, V, target, target_value, Q_dot, UA, T_source, points, *, system):
    n = _points(points)
    rate = _heat_rate(Q_dot, UA, T_source)
    return _time_table(_rigid_time(state1, V, target, target_value, rate, system, n), system)


def _points(points) -> int:
    n = 11 if points is None else int(points)
    if points is not None and n != points or not 2 <= n <= 1000:
        raise BadInput(f"points = {points}: a whole number from 2 to 1000")
    return n


def _fire_rate(med, shape, D, L, F, drainage, m, V):
    def rate(p) -> float:
        if p.x is not None:
            v_f = med.point("T", p.T, "x", 0.0).v
            V_liq = m * (1.0 - p.x) * v_f
        else:
            V_liq = V if "liquid" in p.phase else 0.0
        level = timing.liquid_level(shape, D, L, V_liq)
        A = timing.wetted_area(shape, D, L, level)
        if A <= 0:
            raise OutOfRange(
                "the vessel holds no liquid: the wetted-area fire law does not apply to a "
                "vapour-filled vessel"
            )
        return timing.fire_heat(A, 1.0 if F is None else F, drainage)

    return rate


def _fire(state1, shape, D, L, target, target_value, F, drainage, system, points=0):
    med, p1, _ = _liquid_state(state1, "state1")
    V = timing.vessel_volume(shape, D, L)
    m = V / p1.v
    sym, value = _target(target, target_value, system)
    rate = _fire_rate(med, str(shape).strip().lower(), D, L, F, drainage, m, V)
    return timing.rigid_heating(med, p1, m, sym, value, rate, points)


def time_fire(state1, shape, D, L, target, target_value, F, drainage, *, system):
    return _fire(state1, shape, D, L, target, target_value, F, drainage, system)


def time_fire_table(state1, shape, D, L, target, target_value, F, drainage, points, *, system):
    return _time_table(
        _fire(state1, shape, D, L, target, target_value, F, drainage, system, _points(points)),
        system,
    )


def fire_heat(A_wet, F, drainage, *, system):
    return timing.fire_heat(A_wet, 1.0 if F is None else F, drainage or "adequate")


def wetted_area(shape, D, L, level, *, system):
    return timing.wetted_area(shape, D, L, level)


def time_batch(material, m, T_1, T_2, UA, T_source, *, system):
    mat = _mat(material)
    solids._check(mat, T_1, "T_1")
    solids._check(mat, T_2, "T_2")
    return timing.batch_time(lambda T: solids.c(mat, T), m, T_1, T_2, UA, T_source)


def balance_rate(Q_dot, W_dot, *, system):
    return (Q_dot or 0.0) - (W_dot or 0.0)


# ---------------------------------------------------------------------------------------
# pressure tests


def pneumatic_test_energy(P_test, V, P_amb, *, system):
    return pressuretests.pneumatic_energy(P_test, V, P_amb or stored.STANDARD_ATMOSPHERE)


def hydro_test_energy(state, V, shape, D, wall, E, nu, P_amb, *, system):
    med, p1, shows = _liquid_state(state, "state")
    if p1.x is not None or "liquid" not in p1.phase:
        raise BadInput(f"state is {p1.phase}: a hydrostatic test holds liquid")
    P_amb = P_amb or stored.STANDARD_ATMOSPHERE
    if stored.flashes(med, p1, P_amb, shows):  # a hot liquid: its energy is a flash (issue 27)
        raise OutOfRange(
            f"state: the liquid at {fmt_value(p1.T - 273.15)} degC boils when released to "
            "ambient pressure; its energy is that of a flashing liquid: JB_STORED_FLASHING_LIQUID"
        )
    liquid = stored.isentropic(med, p1, V, P_amb, shows)
    c = _wall_compliance(shape, D, wall, E, nu)
    return liquid + pressuretests.container_energy(c, V, p1.P - P_amb)


def tnt_equivalent(E, basis, *, system):
    return pressuretests.tnt_equivalent(E, pressuretests.E_TNT if basis is None else basis)


def blast_distance(W_TNT, Z, *, system):
    return pressuretests.scaled_distance(W_TNT, Z)


# ---------------------------------------------------------------------------------------
# engines and compressors


def engine_volume(crank_angle, bore, stroke, rod, V_c, *, system):
    return engines.volume(crank_angle, bore, stroke, rod, V_c)


def engine_power(W_cycle, speed, cylinders, revs_per_cycle, *, system):
    return engines.indicated_power(W_cycle, speed / 60.0, cylinders, revs_per_cycle)


def engine_mep(W_cycle, V_d, *, system):
    return engines.mep(W_cycle, V_d)


def compressor_efficiency(clearance, P_suction, P_discharge, n, *, system):
    if P_discharge < P_suction:  # said in the user's unit; the core says it again in Pa
        c = system.conv("pressure")
        raise BadInput(
            f"P_discharge = {fmt_value(c.from_si(P_discharge))} {c.unit} is below P_suction = "
            f"{fmt_value(c.from_si(P_suction))} {c.unit}: a compressor discharges at or above "
            "its suction pressure"
        )
    return engines.volumetric_efficiency(clearance, P_suction, P_discharge, n)


def poly_fit_branches(P_values, V_values, *, system):
    return [list(engines.branch_fits(P_values, V_values))]


# ---------------------------------------------------------------------------------------
# humid air


def humid_air(want, P, spec1, value1, spec2, value2, *, system):
    if value1 is None or value2 is None:
        raise BadInput("give two properties with their values, e.g. 'T in degC', 25, 'RH', 0.5")
    w = humidair.phrase(want, system, humidair.OUTPUTS)
    a = humidair.phrase(spec1, system, humidair.INPUTS)
    b = humidair.phrase(spec2, system, humidair.INPUTS)
    val = humidair.prop(
        w.symbol, P, a.symbol, a.conv.to_si(float(value1)), b.symbol, b.conv.to_si(float(value2))
    )
    return w.conv.from_si(val)


def humid_condensate(P_1, T_1, RH_1, P_2, T_2, V_2, *, system):
    return humidair.condensate(P_1, T_1, RH_1, P_2, T_2, V_2)


# ---------------------------------------------------------------------------------------
# property charts as tables


_CHARTS = {"T-s": ("s", "T"), "P-v": ("v", "P"), "P-h": ("h", "P"), "h-s": ("s", "h")}
_CHART_KIND = {
    "s": "specific_entropy", "T": "temperature", "v": "specific_volume", "P": "pressure",
    "h": "specific_energy",
}  # fmt: skip


def _chart(coordinates) -> tuple[str, str]:
    key = str(coordinates).strip().replace("–", "-").replace(" ", "")
    for name, axes in _CHARTS.items():
        if key.lower() == name.lower():
            return axes
    raise BadInput(f"coordinates {coordinates!r}: use one of {', '.join(_CHARTS)}")


def _header(x: str, y: str, system) -> list[str]:
    return [f"{sym} in {system.unit(_CHART_KIND[sym])}" for sym in (x, y)]


def _xy(p, sym: str) -> float:
    return {"s": p.s, "T": p.T, "v": p.v, "P": p.P, "h": p.h}[sym]


def chart_dome(substance, coordinates, points, *, system):
    """The saturation dome as one line: up the liquid side from the triple point to the
    critical point and down the vapour side."""
    x, y = _chart(coordinates)
    med = medium(substance, system)
    if med.ideal:
        raise BadInput(f"{med.name} is modelled as an ideal gas: it has no saturation dome")
    info = med.info
    if not info.pure:
        raise BadInput(f"{info.name} is a pseudo-pure mixture without a single saturation line")
    n = _points(points)
    T_lo, T_hi = info.T_triple, info.T_crit * (1 - 1e-6)
    temps = [T_lo + (T_hi - T_lo) * (1 - (1 - i / (n - 1)) ** 2) for i in range(n)]
    rows = []
    for q, seq in ((0.0, temps), (1.0, temps[::-1])):
        for T in seq:
            p = med.point("T", T, "x", q)
            rows.append([system.conv(_CHART_KIND[x]).from_si(_xy(p, x)),
                         system.conv(_CHART_KIND[y]).from_si(_xy(p, y))])  # fmt: skip
    return [_header(x, y, system), *rows]


def chart_isoline(substance, coordinates, fixed, fixed_value, x_from, x_to, points, *, system):
    """A line of constant *fixed* (e.g. 'P in bar') across the chart, the chart's x quantity
    running from x_from to x_to (in the unit system's unit)."""
    x, y = _chart(coordinates)
    med = medium(substance, system)
    ph = parse_phrase(fixed, system, ("T", "P", "v", "h", "s"))
    if ph.symbol in (x, y):
        raise BadInput(
            f"fixed {fixed!r}: a line of constant {ph.symbol} is an axis of {coordinates}"
        )
    n = _points(points)
    cx = system.conv(_CHART_KIND[x])
    cy = system.conv(_CHART_KIND[y])
    fv = ph.conv.to_si(float(fixed_value))
    rows = []
    for i in range(n):
        xv = x_from + (x_to - x_from) * i / (n - 1)
        try:
            p = med.point(ph.symbol, fv, x, cx.to_si(xv))
            rows.append([xv, cy.from_si(_xy(p, y))])
        except JoulebookError as e:
            rows.append([xv, e.cell_text()])
    return [_header(x, y, system), *rows]
