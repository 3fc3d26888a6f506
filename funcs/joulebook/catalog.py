"""The catalog: the single list of joulebook's worksheet functions, and the cell-call path.

Everything else is generated from :data:`CATALOG`: the xlwings module, the headless engine's
function table, ``docs/functions.md`` and the generic catalog tests.  Adding a function is one
:class:`Func` entry here plus its core code (an adapter in :mod:`joulebook.formulas`) and
tests.

:func:`call` evaluates an entry exactly as a cell would: cell values are converted (blank →
missing, ranges → arrays), optional arguments take their defaults, numbers with a quantity
are converted from the unit system in force to SI, the adapter runs, and the result is
converted back.  Ranges broadcast like numpy; one formula fills a column.
"""

from __future__ import annotations

import importlib
import math
import re
from dataclasses import dataclass
from functools import cache

import numpy as np

from .errors import BadInput, JoulebookError, OutOfRange, cell_text, fmt_value
from .units import DEFAULT_SYSTEM, unit_system

__all__ = ["Arg", "Example", "Func", "CATALOG", "FAMILIES", "lookup", "call", "UNITS_ARG"]


@dataclass(frozen=True)
class Arg:
    """One worksheet argument."""

    name: str
    help: str
    type: str = "number"  # number | text | range
    quantity: str | None = None  # units kind of a number (converted to SI before the call)
    optional: bool = False
    default: object = None


@dataclass(frozen=True)
class Example:
    """A runnable example; ``value`` is the stated result in the formula's units."""

    args: tuple
    value: object
    rtol: float = 1e-6
    match: str = "equal"  # or "prefix" for text whose tail names library versions


@dataclass(frozen=True)
class Func:
    """One worksheet function."""

    name: str
    family: str
    help: str  # one line, ≤ 255 characters (Excel's function wizard)
    args: tuple[Arg, ...]
    result: str  # a units kind, "text", "asked" (unit written in the formula) or "number"
    impl: str  # attribute of joulebook.formulas
    equation: str
    references: tuple[str, ...]
    example: Example
    units: bool = True  # takes the optional trailing unit-system argument
    elementwise: bool = True  # ranges in scalar arguments broadcast and spill
    notes: str = ""
    caution: bool = False  # result concerns pressure / stored energy: docs carry the caution
    column: str = ""  # optional adapter taking whole float columns of the numeric arguments

    @property
    def all_args(self) -> tuple[Arg, ...]:
        return self.args + ((UNITS_ARG,) if self.units else ())

    def signature(self) -> str:
        parts = [f"[{a.name}]" if a.optional else a.name for a in self.all_args]
        return f"{self.name}({', '.join(parts)})"


UNITS_ARG = Arg(
    "units",
    f"unit system of numbers without a written unit: {DEFAULT_SYSTEM} (default), K-Pa-J, "
    "degC-bar-kJ, degF-psia-Btu, R-psia-Btu, or overrides like 'P=psig, V=L'",
    type="text",
    optional=True,
)

FAMILIES = {
    "state": "States and real-fluid properties",
    "gas": "Ideal gases",
    "solid": "Incompressible solids and liquids",
    "util": "Units and information",
}

_SUB = Arg(
    "substance", "fluid name (water, air, R134a, CO2 …) or a state text from JB_STATE", type="text"
)
_SPEC1 = Arg(
    "spec1",
    "first property phrase, e.g. 'T in degC' (T P v rho u h s x)",
    type="text",
    optional=True,
)
_VAL1 = Arg("value1", "value of the first property, in the phrase's unit", optional=True)
_SPEC2 = Arg("spec2", "second property phrase, e.g. 'P in kPa'", type="text", optional=True)
_VAL2 = Arg("value2", "value of the second property, in the phrase's unit", optional=True)
_GAS = Arg(
    "gas", "gas name (air, nitrogen, CO2 …) or constant-cp model 'air | k = 1.4'", type="text"
)
_MAT = Arg("material", "material name (carbon steel, copper, concrete, water …)", type="text")
_T = Arg("T", "absolute temperature", quantity="temperature")
_T1 = Arg("T_1", "initial absolute temperature", quantity="temperature")
_T2 = Arg("T_2", "final absolute temperature", quantity="temperature")

_REF_COOLPROP = "Bell, Wronski, Quoilin, Lemort, Ind. Eng. Chem. Res. 53 (2014) 2498 (CoolProp)"
_REF_IAPWS = (
    "IAPWS R6-95(2018): IAPWS-95 formulation for water (Wagner & Pruss, JPCRD 31, 387, 2002)"
)
_REF_SOLIDS = (
    "per material: NASA TM-4513 (1993) for Al, Cu, Fe; others as listed in docs/functions.md"
)

CATALOG: tuple[Func, ...] = (
    # ------------------------------------------------------------------ states
    Func(
        "JB_STATE",
        "state",
        "State text of a real fluid fixed by two properties, e.g. 'water | T = 25 degC | P = 200 kPa'; "
        "validated, and accepted by every property function in place of substance + specs.",
        (
            Arg("substance", "fluid name (water, air, R134a, CO2 …)", type="text"),
            _SPEC1,
            _VAL1,
            _SPEC2,
            _VAL2,
        ),
        "text",
        "state_text",
        "state = (fluid, two independent properties)",
        (_REF_COOLPROP,),
        Example(("water", "T in degC", 25, "P in kPa", 200), "water | T = 25 degC | P = 200 kPa"),
    ),
    Func(
        "JB_PROP",
        "state",
        "Property of a real fluid (T P v rho u h s cp cv k x Z Tsat Psat) at a state fixed by two "
        'properties, each with its unit: JB_PROP("water","h in kJ/kg","T in degC",25,"P in kPa",101.325).',
        (
            _SUB,
            Arg(
                "want",
                "wanted property with unit, e.g. 'h in kJ/kg' (bare symbol: default unit)",
                type="text",
            ),
            _SPEC1,
            _VAL1,
            _SPEC2,
            _VAL2,
        ),
        "asked",
        "prop",
        "Helmholtz-energy equation of state a(T, rho) of the fluid; e.g. h = u + P·v, k = cp/cv, Z = P·v/(R·T)",
        (_REF_COOLPROP, _REF_IAPWS),
        Example(
            ("water", "h in kJ/kg", "T in degC", 25, "P in kPa", 101.325), 104.92011980935509, 1e-9
        ),
        notes="Two-phase states: give x with T or P, or v with T or P; T and P alone cannot fix one.",
        column="prop_column",
    ),
    Func(
        "JB_PHASE",
        "state",
        "Phase of a real-fluid state in plain words: compressed liquid, saturated liquid, saturated "
        "mixture, saturated vapor, superheated vapor, supercritical fluid …",
        (_SUB, _SPEC1, _VAL1, _SPEC2, _VAL2),
        "text",
        "phase",
        "compare the state with the saturation line and the critical point",
        (_REF_COOLPROP,),
        Example(("water", "T in degC", 120, "P in kPa", 101.325), "superheated vapor"),
    ),
    Func(
        "JB_PROP_SAT",
        "state",
        "Saturation property of a real fluid at a given T or P: Tsat, Psat, vf vg vfg, uf ug ufg, "
        'hf hg hfg, sf sg sfg (f liquid, g vapor, fg = g − f), e.g. JB_PROP_SAT("water","hfg in kJ/kg","P in kPa",101.325).',
        (
            Arg("substance", "fluid name", type="text"),
            Arg(
                "want",
                "saturation property with unit, e.g. 'hfg in kJ/kg' or 'Tsat in degC'",
                type="text",
            ),
            Arg("given", "'T in …' or 'P in …'", type="text"),
            Arg("value", "the given saturation temperature or pressure"),
        ),
        "asked",
        "saturation",
        "phase equilibrium: equal P, T and Gibbs energy of liquid and vapor",
        (_REF_COOLPROP, _REF_IAPWS),
        Example(("water", "hfg in kJ/kg", "T in degC", 100), 2256.403721526573, 1e-9),
    ),
    # ------------------------------------------------------------------ ideal gases
    Func(
        "JB_GAS_CP",
        "gas",
        "Ideal-gas specific heat at constant pressure cp(T) of a gas.",
        (_GAS, _T),
        "specific_entropy",
        "gas_cp",
        "cp0(T) of the ideal-gas part of the fluid's equation of state; constant model: cp",
        (
            "ideal-gas part of each fluid's reference equation of state (see JB_ABOUT fluids)",
            _REF_COOLPROP,
        ),
        Example(("air", 300), 1.0047760912939265, 1e-9),
    ),
    Func(
        "JB_GAS_CV",
        "gas",
        "Ideal-gas specific heat at constant volume cv(T) = cp(T) − R.",
        (_GAS, _T),
        "specific_entropy",
        "gas_cv",
        "cv0 = cp0 − R",
        (_REF_COOLPROP,),
        Example(("air", 300), 0.7177269645063663, 1e-9),
    ),
    Func(
        "JB_GAS_K",
        "gas",
        "Ideal-gas specific-heat ratio k(T) = cp/cv.",
        (_GAS, _T),
        "dimensionless",
        "gas_k",
        "k = cp0 / (cp0 − R)",
        (_REF_COOLPROP,),
        Example(("air", 300), 1.3999419570156248, 1e-9),
    ),
    Func(
        "JB_GAS_R",
        "gas",
        "Specific gas constant R = R_u / M of a gas.",
        (_GAS,),
        "specific_entropy",
        "gas_R",
        "R = R_u / M",
        ("CODATA 2018 molar gas constant; molar masses of each fluid's equation of state",),
        Example(("air",), 0.2870491267875601, 1e-9),
    ),
    Func(
        "JB_GAS_MOLAR_MASS",
        "gas",
        "Molar mass M of a gas (default unit kg/kmol).",
        (_GAS,),
        "molar_mass",
        "gas_molar_mass",
        "M",
        ("molar masses of each fluid's equation of state",),
        Example(("nitrogen",), 28.01348, 1e-9),
    ),
    Func(
        "JB_GAS_DELTA_H",
        "gas",
        "Ideal-gas enthalpy change per unit mass from T1 to T2, integrating cp(T).",
        (_GAS, _T1, _T2),
        "specific_energy",
        "gas_delta_h",
        "Δh = ∫ cp0(T) dT from T1 to T2",
        (_REF_COOLPROP,),
        Example(("air", 300, 1000), 745.9324872635063, 1e-9),
    ),
    Func(
        "JB_GAS_DELTA_U",
        "gas",
        "Ideal-gas internal-energy change per unit mass from T1 to T2, integrating cv(T).",
        (_GAS, _T1, _T2),
        "specific_energy",
        "gas_delta_u",
        "Δu = ∫ cv0(T) dT = Δh − R·(T2 − T1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 1000), 544.9980985122141, 1e-9),
    ),
    Func(
        "JB_GAS_CP_MEAN",
        "gas",
        "Mean ideal-gas cp over T1..T2, so that Δh = cp_mean·(T2 − T1).",
        (_GAS, _T1, _T2),
        "specific_entropy",
        "gas_cp_mean",
        "cp_mean = Δh / (T2 − T1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 1000), 1.0656178389478662, 1e-9),
    ),
    Func(
        "JB_GAS_DELTA_S",
        "gas",
        "Ideal-gas entropy change per unit mass from (T1, P1) to (T2, P2); without pressures, "
        "the change at equal pressure.",
        (
            _GAS,
            _T1,
            _T2,
            Arg("P_1", "initial absolute pressure (optional)", quantity="pressure", optional=True),
            Arg("P_2", "final absolute pressure (optional)", quantity="pressure", optional=True),
        ),
        "specific_entropy",
        "gas_delta_s",
        "Δs = ∫ cp0(T)/T dT − R·ln(P2/P1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 600, 100, 500), 0.2452927443030884, 1e-9),
    ),
    # ------------------------------------------------------------------ solids
    Func(
        "JB_SOLID_C",
        "solid",
        "Specific heat c(T) of an incompressible solid or liquid (cp = cv = c).",
        (_MAT, _T),
        "specific_entropy",
        "solid_c",
        "c(T) from the material's published fit or table",
        (_REF_SOLIDS,),
        Example(("copper", 300), 0.384981302755812, 1e-9),
    ),
    Func(
        "JB_SOLID_C_MEAN",
        "solid",
        "Mean specific heat of an incompressible solid or liquid over T1..T2.",
        (_MAT, _T1, _T2),
        "specific_entropy",
        "solid_c_mean",
        "c_mean = ∫ c dT / (T2 − T1)",
        (_REF_SOLIDS,),
        Example(("aluminium", 300, 500), 0.9545622645934263, 1e-9),
    ),
    Func(
        "JB_SOLID_DELTA_U",
        "solid",
        "Internal-energy change per unit mass of an incompressible solid or liquid from T1 to T2.",
        (_MAT, _T1, _T2),
        "specific_energy",
        "solid_delta_u",
        "Δu = ∫ c(T) dT from T1 to T2",
        (_REF_SOLIDS,),
        Example(("aluminium", 300, 500), 190.91245291868526, 1e-9),
    ),
    Func(
        "JB_SOLID_HEAT",
        "solid",
        "Sensible heat to take a mass of an incompressible solid or liquid from T1 to T2 "
        "(positive when heated).",
        (_MAT, Arg("m", "mass of the body", quantity="mass"), _T1, _T2),
        "energy",
        "solid_heat",
        "Q = m·∫ c(T) dT from T1 to T2",
        (_REF_SOLIDS,),
        Example(("carbon steel", 1000, 300, 400), 46050.0, 1e-9),
    ),
    # ------------------------------------------------------------------ utilities
    Func(
        "JB_CONVERT",
        "util",
        "Convert a value between units of the same quantity; temperatures convert as absolute "
        "(27 degC → 300.15 K), gauge pressure uses 101.325 kPa unless written 'kPag @ 95 kPa'.",
        (
            Arg("value", "number to convert"),
            Arg("from_unit", "unit of value, e.g. psig", type="text"),
            Arg("to_unit", "wanted unit, e.g. kPa", type="text"),
        ),
        "number",
        "unit_convert",
        "value_SI = value·factor + offset; result = (value_SI − offset')/factor'",
        ("NIST SP 811 (2008), Appendix B",),
        Example((27, "degC", "K"), 300.15, 1e-12),
        units=False,
    ),
    Func(
        "JB_ABOUT",
        "util",
        "joulebook and property-library versions; with a topic, a spilled list: fluids, materials, units.",
        (
            Arg(
                "topic", "version (default), fluids, materials or units", type="text", optional=True
            ),
        ),
        "text",
        "about",
        "—",
        (_REF_COOLPROP,),
        Example((), "joulebook ", match="prefix"),
        units=False,
        elementwise=False,
    ),
)


_INDEX: dict[str, Func] = {f.name.upper(): f for f in CATALOG}


def _index() -> dict[str, Func]:
    return _INDEX


def lookup(name: str) -> Func:
    """The catalog entry *name* (case-insensitive)."""
    f = _index().get(str(name).strip().upper())
    if f is None:
        raise BadInput(f"unknown joulebook function {name!r}")
    return f


@cache
def _impl(name: str):
    return getattr(importlib.import_module("joulebook.formulas"), name)


# ---------------------------------------------------------------------------------------
# cell conversion

_ERROR_TEXT = re.compile(r"^#(N/A|NULL!|DIV/0!|VALUE!|REF!|NAME\?|NUM!|GETTING_DATA|SPILL!|CALC!)$")


def _is_missing(v) -> bool:
    return v is None or (isinstance(v, str) and v == "") or (isinstance(v, float) and math.isnan(v))


def _as_array(v):
    if isinstance(v, np.ndarray):
        return v
    if isinstance(v, (list, tuple)):
        return np.array(v, dtype=object)
    return None


def _number(arg: Arg, v, where: str = ""):
    """One cell value as a float (or None when blank)."""
    if _is_missing(v):
        return None
    if isinstance(v, (bool, np.bool_)):
        raise BadInput(f"{arg.name}{where} = {v} is a TRUE/FALSE value; a number is needed")
    if isinstance(v, (int, float, np.integer, np.floating)):
        x = float(v)
        if not math.isfinite(x):
            raise BadInput(f"{arg.name}{where} = {x} is not a finite number")
        return x
    if isinstance(v, str):
        if _ERROR_TEXT.match(v.strip()):
            raise BadInput(f"{arg.name}{where} is the error value {v.strip()}")
        raise BadInput(f"{arg.name}{where} = {fmt_value(v)} is text; a number is needed")
    if hasattr(v, "year") and hasattr(v, "month"):
        raise BadInput(f"{arg.name}{where} is a date; a number is needed")
    raise BadInput(f"{arg.name}{where} has type {type(v).__name__}; a number is needed")


def _text(arg: Arg, v, where: str = ""):
    if _is_missing(v):
        return None
    if isinstance(v, str):
        if _ERROR_TEXT.match(v.strip()):
            raise BadInput(f"{arg.name}{where} is the error value {v.strip()}")
        return v
    raise BadInput(f"{arg.name}{where} = {fmt_value(v)} must be text, e.g. {arg.help[:60]}")


def _cell(arg: Arg, v, where: str = ""):
    return _number(arg, v, where) if arg.type == "number" else _text(arg, v, where)


def _range(arg: Arg, v) -> np.ndarray:
    """A whole range as a 2-D float array, blanks as NaN."""
    a = _as_array(v)
    if a is None:
        a = np.array([[v]], dtype=object)
    if a.ndim == 1:
        a = a.reshape(-1, 1)
    if a.ndim != 2:
        raise BadInput(f"{arg.name} must be a row, column or block of cells")
    out = np.full(a.shape, np.nan)
    for idx, x in np.ndenumerate(a):
        y = _number(arg, x, f" (item {idx[0] + 1},{idx[1] + 1})")
        if y is not None:
            out[idx] = y
    return out


# ---------------------------------------------------------------------------------------
# the call path


def call(name: str, *values):
    """Evaluate worksheet function *name* with cell values, as a cell would.

    Scalars give a scalar; ranges (lists, tuples, numpy arrays) in scalar arguments broadcast
    like numpy and give an array whose failed elements hold their error text and whose
    elements with a blank input are ``None``.

    Raises
    ------
    BadInput, OutOfRange, NoConvergence
        For a scalar call, any failure; for an array call, failures of the call as a whole.
    """
    f = _INDEX.get(name) or lookup(name)
    nall = len(f.all_args)
    if len(values) > nall:
        raise BadInput(
            f"{f.name} takes at most {nall} arguments, got {len(values)}: {f.signature()}"
        )

    units_text = None
    if f.units and len(values) == nall:
        u = values[-1]
        if type(u) in _ARRAY_TYPES:
            raise BadInput("units must be a single text, not a range")
        units_text = _text(UNITS_ARG, u)
    system = unit_system(units_text)

    fargs = f.args
    prepared: list = []
    arrays: dict[int, np.ndarray] | None = None
    nv = len(values)
    for i, arg in enumerate(fargs):
        v = values[i] if i < nv else None
        t = type(v)
        # fast paths for the common cell values
        if v is None:
            prepared.append(None)
        elif t is float and arg.type == "number" and v - v == 0.0:
            prepared.append(v)
        elif t is str and arg.type == "text" and v and v[0] != "#":
            prepared.append(v)
        elif arg.type == "range":
            prepared.append(_range(arg, v))
        elif t in _ARRAY_TYPES:
            a = v if t is np.ndarray else np.array(v, dtype=object)
            if a.size == 1:
                prepared.append(_cell(arg, a.reshape(-1)[0]))
            elif not f.elementwise:
                raise BadInput(f"{arg.name} must be a single cell")
            else:
                if arrays is None:
                    arrays = {}
                arrays[i] = a
                prepared.append(None)
        else:
            prepared.append(_cell(arg, v))

    if arrays is None:
        return _evaluate(f, fargs, prepared, system)
    return _broadcast(f, fargs, prepared, arrays, system)


_ARRAY_TYPES = (list, tuple, np.ndarray)


def _evaluate(f: Func, fargs, prepared, system):
    si_args = []
    for arg, x in zip(fargs, prepared):
        if x is None:
            if not arg.optional:
                raise BadInput(f"{arg.name} is required: {arg.help[:120]}")
            si_args.append(arg.default)
        elif arg.quantity is None:
            si_args.append(x)
        else:
            si_args.append(system.conv(arg.quantity).to_si(x))
    try:
        result = _impl(f.impl)(*si_args, system=system)
    except JoulebookError:
        raise
    except (ValueError, ArithmeticError) as e:
        # a property-library failure we did not foresee: report it as ours, never as a number
        raise OutOfRange(
            f"{f.name}: the model could not evaluate these inputs ({type(e).__name__})"
        ) from e
    return _result(f, result, system)


def _result(f: Func, value, system):
    if type(value) is float:
        out = value if f.result in _AS_IS else system.conv(f.result).from_si(value)
        if out - out != 0.0:  # NaN or inf must never reach a cell
            raise OutOfRange(f"{f.name}: the result is not a finite number")
        return out
    if isinstance(value, (np.floating, int)) and not isinstance(value, bool):
        return _result(f, float(value), system)
    return value


_AS_IS = ("text", "asked", "number")


def _broadcast(f: Func, fargs, prepared, arrays, system):
    try:
        shape = np.broadcast_shapes(*(a.shape for a in arrays.values()))
    except ValueError:
        shapes = ", ".join(
            f"{fargs[i].name} {'×'.join(map(str, a.shape))}" for i, a in arrays.items()
        )
        raise BadInput(f"ranges of different shapes cannot be combined: {shapes}") from None
    b = {i: np.broadcast_to(a, shape) for i, a in arrays.items()}
    out = np.empty(shape, dtype=object)
    memo: dict[tuple, object] = {}
    for idx in np.ndindex(shape):
        elem = list(prepared)
        missing = False
        try:
            for i, a in b.items():
                where = f" (item {','.join(str(j + 1) for j in idx)})"
                x = _cell(fargs[i], a[idx], where)
                if x is None:  # a blank cell in a range: blank result for that element
                    missing = True
                elem[i] = x
        except JoulebookError as e:
            out[idx] = e.cell_text()
            continue
        if missing:
            out[idx] = None
            continue
        key = tuple(elem)
        r = memo.get(key, memo)
        if r is memo:
            try:
                r = _evaluate(f, fargs, elem, system)
            except JoulebookError as e:
                r = e.cell_text()
            except Exception as e:  # a library failure must not kill the whole column
                r = cell_text(e)
            memo[key] = r
        out[idx] = r
    return out


def as_rows(value) -> list[list]:
    """Any call result as a 2-D list (what a spilled range holds)."""
    if isinstance(value, np.ndarray):
        a = (
            value
            if value.ndim == 2
            else value.reshape(-1, 1)
            if value.ndim == 1
            else value.reshape(1, 1)
        )
        return a.tolist()
    if isinstance(value, list):
        return [r if isinstance(r, list) else [r] for r in value]
    return [[value]]
