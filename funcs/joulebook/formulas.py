"""Worksheet-facing adapters of the core: one plain function per catalog entry.

Each takes the catalog's arguments after cell conversion (numbers with a quantity already in
SI, text as given, optional arguments as ``None``) plus the unit system in force, and returns
an SI value for entries with a fixed result quantity, or the final value for entries whose
result unit is asked for in the formula (``JB_PROP``'s ``want``).
"""

from __future__ import annotations

import re
from functools import lru_cache

import numpy as np

from . import __version__, states
from .errors import BadInput, JoulebookError
from .substances import fluids, gases, solids
from .units import UnitSystem, convert, parse_phrase, parse_unit

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
        raise BadInput(
            f"{substance}: give two properties with values ({', '.join(missing)} missing), "
            "or pass a state text from JB_STATE"
        )
    return states.make_state(substance, spec1, value1, spec2, value2, system)


def state_text(substance, spec1, value1, spec2, value2, *, system: UnitSystem) -> str:
    st = _state_from_args(substance, spec1, value1, spec2, value2, system)
    a, va, b, vb = st.si()
    fluids.state_props(st.fluid, [], a, va, b, vb, shows=st.shows())  # validates the state
    return states.format_state(st)


_WANTS = tuple(w for w in fluids.OUTPUTS if w != "phase")


@lru_cache(maxsize=4096)
def _prop_plan(substance: str, want: str, spec1: str, spec2: str, system: UnitSystem):
    """Everything about a JB_PROP call except its two numbers, worked out once."""
    if not isinstance(want, str) or not want.strip():
        raise BadInput(f"want must name a property such as 'h in kJ/kg' (got {want!r})")
    info = fluids.fluid_info(substance)
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
    return info, p1.symbol, p1.conv, p2.symbol, p2.conv, sym, out, shows, fluids.reader(sym)


def prop(substance, want, spec1, value1, spec2, value2, *, system: UnitSystem):
    if (
        type(substance) is str
        and "|" not in substance
        and type(spec1) is str
        and type(spec2) is str
        and value1 is not None
        and value2 is not None
    ):
        info, a, ca, b, cb, sym, out, shows, read = _prop_plan(
            substance, want, spec1, spec2, system
        )
        st = fluids._flash(info, a, ca.to_si(value1), b, cb.to_si(value2), shows)
        val = read(info, st, shows)
        return val if out is None else out.from_si(val)
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
    info, a, ca, b, cb, sym, out, shows, _ = _prop_plan(substance, want, spec1, spec2, system)
    res = fluids.column_props(
        info.name,
        sym,
        a,
        ca.to_si(np.asarray(value1, dtype=float)),
        b,
        cb.to_si(np.asarray(value2, dtype=float)),
        shows,
        out,
    )
    flat = res.reshape(-1)
    for i, r in enumerate(flat):
        if isinstance(r, JoulebookError):
            flat[i] = r.cell_text()
    return res


def phase(substance, spec1, value1, spec2, value2, *, system: UnitSystem) -> str:
    return prop(substance, "phase", spec1, value1, spec2, value2, system=system)


_SAT = re.compile(r"^\s*(?P<sym>Tsat|Psat|(?:v|u|h|s)(?:fg|f|g))\s*(?:in\s+(?P<unit>.+?))?\s*$")
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
            f"want {want!r}: use Tsat, Psat, vf, vg, vfg, uf, ug, ufg, hf, hg, hfg, sf, sg, sfg "
            "with an optional 'in unit'"
        )
    sym = m.group("sym")
    kind = _SAT_KIND[sym[0]]
    conv = parse_unit(m.group("unit"), kind) if m.group("unit") else system.conv(kind)
    gp = states.spec_phrase(given, "given", system)
    if gp.symbol not in ("T", "P"):
        raise BadInput(f"given must be 'T in …' or 'P in …' (got {given!r})")
    info = fluids.fluid_info(substance)
    si = fluids.saturation(
        info.name, gp.symbol, gp.conv.to_si(float(value)), sym, shows={gp.symbol: gp.conv}
    )
    return conv.from_si(si)


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
