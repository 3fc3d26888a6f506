"""The catalog: the single list of joulebook's worksheet functions, and the cell-call path.

Everything else is generated from :data:`CATALOG`: the xlwings module, the headless engine's
function table, ``docs/functions.md`` and the generic catalog tests.  Adding a function is one
:class:`Func` entry here plus its core code (an adapter in :mod:`joulebook.catalog.adapters`) and
tests.

:func:`call` evaluates an entry exactly as a cell would: cell values are converted (blank →
missing, ranges → arrays), optional arguments take their defaults, numbers with a quantity
are converted from the unit system in force to SI, the adapter runs, and the result is
converted back.  Ranges broadcast like numpy; one formula fills a column.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from joulebook.catalog import adapters as formulas
from joulebook.core.errors import (
    BadInput,
    BlankInput,
    JoulebookError,
    OutOfRange,
    cell_text,
    fmt_value,
)
from joulebook.core.units import DEFAULT_SYSTEM, unit_system
from joulebook.core.working import Step, Working

from .quantities import cell_values

__all__ = [
    "Arg",
    "Example",
    "Validity",
    "Func",
    "CATALOG",
    "FAMILIES",
    "lookup",
    "call",
    "UNITS_ARG",
]


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
class Validity:
    """A limit of the model's physics, declared on an entry and checked by ``check`` and the
    audit on every call of it (they never name a function: they read these).

    ``value`` is a working expression (:mod:`joulebook.core.working`) in the entry's argument
    names, ``result`` and the names of ``defaults``, all SI; the call is inside the model
    when the value lies within ``low``..``high`` (a bound is a number or one of those
    names) and, for a text value, is none of ``not_text``.  ``when`` (an expression) must be
    above zero for the check to apply; a value that cannot be evaluated (an argument left
    out) is no verdict.  Each default states its source."""

    says: str  # what the value is, in the flag: "hoop stress (P2 − P_amb)·D/(2·wall)"
    value: str
    model: str  # the model whose physics ends there
    low: float | str | None = None
    high: float | str | None = None
    when: str = ""
    not_text: tuple[str, ...] = ()
    defaults: tuple[tuple[str, float, str], ...] = ()  # (name, SI value, its source)
    kind: str | None = None  # the units kind of the value and its bounds, for the flag
    item: int | None = None  # the value is this item of a row the expression returns


@dataclass(frozen=True)
class Func:
    """One worksheet function."""

    name: str
    family: str
    help: str  # one line, ≤ 255 characters (Excel's function wizard)
    args: tuple[Arg, ...]
    result: str  # a units kind, "text", "asked" (unit written in the formula) or "number"
    impl: Callable  # the adapter in joulebook.catalog.adapters (SI in, SI out)
    equation: str
    references: tuple[str, ...]
    example: Example
    units: bool = True  # takes the optional trailing unit-system argument
    elementwise: bool = True  # ranges in scalar arguments broadcast and spill
    notes: str = ""
    caution: bool = False  # result concerns pressure / stored energy: docs carry the caution
    column: Callable | None = (
        None  # optional adapter taking whole float columns of the numeric arguments
    )
    # its one argument is a cell whose joulebook message the face hands over (JB_WHY): the
    # message behind an error value, or the cell's value when it holds a message as text
    reads_message: bool = False
    # how the result is worked out, in the entry's argument names (the audit and docs show it)
    working: Working | None = None
    # limits of the model's physics, checked on every call by check and the audit
    validity: tuple[Validity, ...] = ()

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

_N_WHAT = "the usual 1–1.67 band of gas compression and expansion"
_N_BAND = ("n", 1.0, 1.67, _N_WHAT)
_ZERO_TERMS = (("W_other", 0.0), ("dKE", 0.0), ("dPE", 0.0))
_PROCESS_STEPS = (
    tuple(
        Step(sym, f"JB_PROCESS(state1, path, end_spec, end_value, '{sym}2 in {unit}', mass)", kind)
        for sym, unit, kind in (
            ("P", "Pa", "pressure"),
            ("T", "K", "temperature"),
        )
    )
    + tuple(
        Step(sym, f"JB_PROCESS(state1, path, end_spec, end_value, '{sym} in J', mass)", "energy")
        for sym in ("W", "Q", "dU")
    )
    + (Step("phase2", "JB_PROCESS(state1, path, end_spec, end_value, 'phase2', mass)", "text"),)
)

#: a state's working: its properties read back through the property model (SI asked; the
#: audit shows them in its working units)
_STATE_STEPS = tuple(
    Step(sym, f"JB_PROP(substance, '{sym} in {unit}', spec1, value1, spec2, value2)", kind)
    for sym, unit, kind in (
        ("T", "K", "temperature"),
        ("P", "Pa", "pressure"),
        ("v", "m3/kg", "specific_volume"),
        ("u", "J/kg", "specific_energy"),
        ("h", "J/kg", "specific_energy"),
        ("s", "J/(kg*K)", "specific_entropy"),
    )
) + (Step("phase", "JB_PHASE(substance, spec1, value1, spec2, value2)", "text"),)

FAMILIES = {
    "state": "States and real-fluid properties",
    "gas": "Ideal gases",
    "solid": "Incompressible solids and liquids",
    "work": "Boundary and other work",
    "poly": "Polytropic analysis",
    "balance": "First law of a closed system",
    "process": "End states of processes",
    "cycle": "Cycles",
    "stored": "Stored expansion energy",
    "blocked": "Blocked-in liquid and thermal relief",
    "time": "Heating with time and fire exposure",
    "test": "Pressure tests",
    "engine": "Indicator diagrams, engines and compressors",
    "humid": "Humid air",
    "util": "Units and information",
}

_SUB = Arg(
    "substance",
    "fluid name (water, air, R134a, CO2 …; 'water (IF97)' for the industrial formulation) or a "
    "state text from JB_STATE",
    type="text",
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

_V1 = Arg("V_1", "initial volume", quantity="volume")
_V2 = Arg("V_2", "final volume", quantity="volume")
_P1 = Arg("P_1", "initial absolute pressure", quantity="pressure")
_P2 = Arg("P_2", "final absolute pressure", quantity="pressure")
_N = Arg("n", "polytropic exponent n of P·V^n = C")
_K = Arg("k", "specific-heat ratio cp/cv of the gas (1 < k ≤ 1.7)")
_PAMB = Arg(
    "P_amb", "absolute ambient pressure (default 101.325 kPa)", quantity="pressure", optional=True
)
_WB = Arg("W_b", "boundary work by the system (+ on expansion)", quantity="energy")
_WOTHER = Arg(
    "W_other",
    "other work BY the system: shaft, electrical (negative when done on it)",
    quantity="energy",
    optional=True,
)
_DKE = Arg("dKE", "kinetic-energy change (optional)", quantity="energy", optional=True)
_DPE = Arg("dPE", "potential-energy change (optional)", quantity="energy", optional=True)
_STATE1 = Arg(
    "state1",
    "initial state text from JB_STATE (real fluid, or ideal gas such as 'air (ideal gas) | …')",
    type="text",
)
_PATH = Arg(
    "path",
    "rigid, isobaric, isothermal, isentropic, 'polytropic n = 1.3', 'linear slope = 500 kPa/m3', 'stops P = 4 bar' or 'stops V = 0.02 m3'",
    type="text",
)
_END_SPEC = Arg(
    "end_spec",
    "end condition with unit: V2, v2, P2, T2, x2, Q or W, e.g. 'T2 in degC'",
    type="text",
)
_END_VALUE = Arg("end_value", "value of the end condition, in its unit")
_MASS = Arg(
    "mass", "mass of the system (default 1 of the mass unit)", quantity="mass", optional=True
)
_QVALS = Arg(
    "Q_values", "heats into the system of each process (+ in)", type="range", quantity="energy"
)
_WVALS = Arg(
    "W_values", "works by the system of each process (+ out)", type="range", quantity="energy"
)

_REF_WORK = "boundary work W = ∫P dV of a closed system for each path (common practice)"
_REF_FIRSTLAW = "first law of thermodynamics for a closed system, Q − W = ΔE (common practice)"
_REF_STORED = (
    "isentropic expansion energy of a compressed gas (common practice; see docs for the caution)"
)

_REF_THIN_WALL = (
    "Young & Budynas, Roark's Formulas for Stress and Strain, 7th ed. (2002), Table 13.1: "
    "thin-walled pressure vessels; volumetric strain from Hooke's law"
)
_REF_API521 = (
    "API Std 521, Pressure-relieving and Depressuring Systems, 4.4.12 hydraulic expansion "
    "(from memory): gpm = β·H/(500·G·c), here q = β·Q/(ρ·cp) without unit constants"
)
_REF_FIRE = (
    "API Std 521, Pressure-relieving and Depressuring Systems, 4.4.13.2 fire exposure "
    "(from memory): Q = C·F·A^0.82, C = 43,200 W/m^1.64 (adequate drainage), 70,900 without"
)
_REF_TIME = (
    "first law per unit time of a rigid closed system, m·du/dt = Q_dot(state), separated and "
    "integrated by Gauss–Legendre quadrature on the equation of state (common practice)"
)
_REF_PCC2 = (
    "ASME PCC-2, Article 501 (pressure testing), stored-energy appendix (from memory): "
    "E = 2.5·P·V·[1 − (P_amb/P)^0.286]"
)
_REF_TNT = "ton of TNT = 4.184e9 J by convention (NIST SP 811, Appendix B)"
_REF_SCALING = "Kinney & Graham, Explosive Shocks in Air, 2nd ed. (1985), ch. 5: cube-root scaling"
_REF_HEYWOOD = (
    "Heywood, Internal Combustion Engine Fundamentals (1988), §2.2–2.4: slider-crank volume, "
    "indicated work and power, mean effective pressure"
)
_REF_BREAK = (
    "Hawkins, Point estimation of the parameters of piecewise regression models, Applied "
    "Statistics 25 (1976) 51–57: the break point by least squares (from memory)"
)
_REF_FLASHING = (
    "CCPS, Guidelines for Vapor Cloud Explosion, Pressure Vessel Burst, BLEVE, and Flash Fire "
    "Hazards, 2nd ed. (2010): expansion energy of a flashing liquid, isentropic to ambient; "
    "Planas-Cuchi, Salla, Casal, J. Loss Prev. Process Ind. 17 (2004) 431 (from memory)"
)
_REF_HUMID = (
    "Herrmann, Kretzschmar & Gatley, ASHRAE RP-1485, HVAC&R Research 15 (2009) 961: real "
    "humid air (the property library's humid-air functions)"
)
_REF_COOLPROP = "Bell, Wronski, Quoilin, Lemort, Ind. Eng. Chem. Res. 53 (2014) 2498 (CoolProp)"
_REF_IAPWS = (
    "IAPWS R6-95(2018): IAPWS-95 formulation for water (Wagner & Pruss, JPCRD 31, 387, 2002)"
)
_REF_SOLIDS = (
    "per material: NASA TM-4513 (1993) for Al, Cu, Fe; others as listed in docs/functions.md"
)

_WALL = (
    Arg("D", "mean diameter of the wall", quantity="length", optional=True),
    Arg("wall", "wall thickness (below D/2)", quantity="length", optional=True),
    # E_mod and poisson, not E and nu: in a units override E is an energy and nu a
    # kinematic viscosity (the arguments were E and nu before issue 27; positions unchanged)
    Arg(
        "E_mod",
        "Young's modulus of the wall (steel about 200 GPa)",
        quantity="modulus",
        optional=True,
    ),
    Arg("poisson", "Poisson's ratio ν of the wall, 0 to 0.5 (steel 0.3)", optional=True),
)
_HEATING_ARGS = (
    Arg("state1", "initial state text of the contents, from JB_STATE", type="text"),
    Arg("V", "vessel volume", quantity="volume"),
    Arg("target", "target with unit: 'P in bar', 'T in degC' or 'x'", type="text"),
    Arg("target_value", "value of the target, in its unit"),
    Arg(
        "Q_dot",
        "constant heat rate into the contents (optional)",
        quantity="power",
        optional=True,
    ),
    Arg(
        "UA",
        "conductance to a medium at T_source (optional)",
        quantity="heat_transfer_coefficient",
        optional=True,
    ),
    Arg(
        "T_source",
        "temperature of the medium (with UA)",
        quantity="temperature",
        optional=True,
    ),
)
_FIRE_ARGS = (
    Arg("state1", "initial state text of the contents, from JB_STATE", type="text"),
    Arg("shape", "horizontal or vertical", type="text"),
    Arg("D", "diameter", quantity="length"),
    Arg("L", "length between the ends (height when vertical)", quantity="length"),
    Arg("target", "target with unit: 'P in bar', 'T in degC' or 'x'", type="text"),
    Arg("target_value", "value of the target, in its unit"),
    Arg("F", "environment factor, 0 < F ≤ 1 (default 1)", optional=True),
    Arg("drainage", "adequate (default) or inadequate", type="text", optional=True),
)

# issue 27, round 3 (joulebook.catalog.cases)
_REF_CUSHION = (
    "gas pocket in a blocked-in liquid: ideal-gas law at the liquid's temperature with its "
    "vapour pressure, the liquid on its equation of state (common practice)"
)
_REF_YIELD = (
    "default f_y = 235 MPa, structural steel S235 for t ≤ 16 mm (EN 10025-2, from memory); "
    "give the wall's own minimum yield strength"
)
_REF_EN1991 = (
    "EN 1991-1-2:2002 §3.1–3.2 (from memory): net heat flux α_c·Δθ + ε·σ·ΔT⁴ of the standard "
    "(α_c 25) and hydrocarbon (α_c 50) fire curves"
)
_REF_EN1993 = (
    "EN 1993-1-2:2005 (from memory): carbon steel ρ = 7850 kg/m³, c(T) §3.4.1.2, ε_m = 0.7, "
    "yield reduction k_y Table 3.1"
)
_REF_BLOWDOWN = (
    "closed system of the gas that stays, du = −P·dv + δq, isentropic nozzle at maximum flux "
    "(common practice); scipy.integrate.solve_ivp DOP853"
)
_STRESS_BAND = "the yield strength f_y (|σ|/f_y ≤ 1)"
_P_OUT = Arg(
    "P_out", "absolute pressure outside (default 101.325 kPa)", quantity="pressure", optional=True
)
_F_Y = Arg(
    "f_y",
    "yield strength of the wall (default 235 MPa, S235 steel)",
    quantity="modulus",
    optional=True,
    default=235e6,
)
_CASE_WALL = (
    Arg("shape", "rigid (default), cylinder (closed ends) or sphere", type="text", optional=True),
    *_WALL,
    Arg(
        "alpha_wall",
        "linear expansion coefficient of the wall (steel 1.2e-5 1/K)",
        quantity="expansion_coefficient",
        optional=True,
        default=0.0,
    ),
    Arg(
        "kappa",
        "compressibility of a glycol or oil fill (incompressible in the data; default 0)",
        quantity="compressibility",
        optional=True,
    ),
)
_FIRE_GAS_ARGS = (
    Arg("state1", "gas state text at the start, from JB_STATE", type="text"),
    Arg("D", "diameter of the cylinder", quantity="length"),
    Arg("L", "length between the flat ends", quantity="length"),
    Arg("wall", "steel wall thickness", quantity="length"),
    Arg("P_set", "set pressure of the relief device (absolute)", quantity="pressure"),
    Arg("fire", "hydrocarbon (default) or standard fire curve", type="text", optional=True),
    Arg("q", "absorbed heat flux instead of a curve", quantity="heat_flux", optional=True),
    Arg(
        "UA_in",
        "wall-to-gas conductance (default 10 W/(m2·K) over the area)",
        quantity="heat_transfer_coefficient",
        optional=True,
    ),
    _F_Y,
    Arg(
        "P_amb",
        "absolute pressure outside (default 101.325 kPa)",
        quantity="pressure",
        optional=True,
    ),
)
_BLOWDOWN_ARGS = (
    Arg("state1", "gas state text at the start, from JB_STATE", type="text"),
    Arg("V", "vessel volume", quantity="volume"),
    Arg("d", "orifice diameter", quantity="length"),
    Arg("P_target", "pressure to reach (absolute), above P_back", quantity="pressure"),
    Arg("Cd", "discharge coefficient, 0 < Cd ≤ 1 (default 1)", optional=True),
    Arg(
        "P_back",
        "absolute back pressure (default 101.325 kPa)",
        quantity="pressure",
        optional=True,
    ),
    Arg("m_wall", "steel wall mass that warms the gas (optional)", quantity="mass", optional=True),
    Arg(
        "UA_wall",
        "wall-to-gas conductance (with m_wall)",
        quantity="heat_transfer_coefficient",
        optional=True,
    ),
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
        formulas.state_text,
        "state = (fluid, two independent properties)",
        (_REF_COOLPROP,),
        Example(("water", "T in degC", 25, "P in kPa", 200), "water | T = 25 degC | P = 200 kPa"),
        working=Working(steps=_STATE_STEPS),
    ),
    Func(
        "JB_PROP",
        "state",
        "Property of a fluid (T P v rho u h s cp cv k x Z Tsat Psat beta kappa w mu_JT mu nu lambda "
        "Pr sigma) at a state "
        "fixed by two properties, each with its unit: "
        'JB_PROP("water","h in kJ/kg","T in degC",25,"P in kPa",101.325).',
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
        formulas.prop,
        "Helmholtz-energy equation of state a(T, rho) of the fluid; e.g. h = u + P·v, k = cp/cv, Z = P·v/(R·T)",
        (_REF_COOLPROP, _REF_IAPWS),
        Example(
            ("water", "h in kJ/kg", "T in degC", 25, "P in kPa", 101.325), 104.92011980935509, 1e-9
        ),
        notes="Two-phase states: give x with T or P, or v with T or P; T and P alone cannot fix one. "
        "beta = (1/v)(∂v/∂T)_P (isobaric expansion), kappa = −(1/v)(∂v/∂P)_T (isothermal "
        "compressibility), w (speed of sound) and mu_JT = (∂T/∂P)_h (Joule–Thomson) come from "
        "the equation of state, single-phase or saturated liquid/vapour (x = 0, 1); for an "
        "ideal gas 1/T, 1/P, √(k·R·T), 0. "
        "mu (dynamic viscosity), nu = mu/rho, lambda (thermal conductivity) and Pr = mu·cp/lambda "
        "come from the property library's transport correlation for the fluid (water: IAPWS "
        "2008 and 2011, refused outside their ranges), single-phase or saturated liquid (x = 0) "
        "and vapour (x = 1); sigma (surface tension, water: IAPWS R1-76(2014)) on the "
        "saturation line only. A pair that fits two states is refused, naming them.",
        column=formulas.prop_column,
        working=Working(
            steps=(Step("phase", "JB_PHASE(substance, spec1, value1, spec2, value2)", "text"),)
        ),
    ),
    Func(
        "JB_PHASE",
        "state",
        "Phase of a real-fluid state in plain words: compressed liquid, saturated liquid, saturated "
        "mixture, saturated vapor, superheated vapor, supercritical fluid …",
        (_SUB, _SPEC1, _VAL1, _SPEC2, _VAL2),
        "text",
        formulas.phase,
        "compare the state with the saturation line and the critical point",
        (_REF_COOLPROP,),
        Example(("water", "T in degC", 120, "P in kPa", 101.325), "superheated vapor"),
    ),
    Func(
        "JB_PROP_SAT",
        "state",
        "Saturation property at a given T or P: Tsat, Psat (Tbubble Tdew Pbubble Pdew of a mixture "
        "or blend), vf vg vfg, uf ug ufg, hf hg hfg, sf sg sfg (f liquid or bubble, g vapor or dew).",
        (
            Arg(
                "substance",
                "fluid name, blend (R410A …) or mixture ('propane 0.7, butane 0.3')",
                type="text",
            ),
            Arg(
                "want",
                "saturation property with unit, e.g. 'hfg in kJ/kg' or 'Tsat in degC'",
                type="text",
            ),
            Arg("given", "'T in …' or 'P in …'", type="text"),
            Arg("value", "the given saturation temperature or pressure"),
        ),
        "asked",
        formulas.saturation,
        "phase equilibrium: equal P, T and Gibbs energy of liquid and vapor",
        (_REF_COOLPROP, _REF_IAPWS),
        Example(("water", "hfg in kJ/kg", "T in degC", 100), 2256.403721526573, 1e-9),
        notes="A blend by name (R404A R407C R410A R507A) is its pseudo-pure equation of state, "
        "as in JB_PROP; a composition is the mixture model, its bubble and dew points found on "
        "the phase envelope and refused above the cricondenbar/cricondentherm or where a line "
        "is crossed twice. 'water (IF97)' gives IF97's saturation values.",
    ),
    # ------------------------------------------------------------------ ideal gases
    Func(
        "JB_GAS_CP",
        "gas",
        "Ideal-gas specific heat at constant pressure cp(T) of a gas.",
        (_GAS, _T),
        "specific_heat",
        formulas.gas_cp,
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
        "specific_heat",
        formulas.gas_cv,
        "cv0 = cp0 − R",
        (_REF_COOLPROP,),
        Example(("air", 300), 0.7177269645063663, 1e-9),
        working=Working(
            "cv",
            "cp - R",
            (
                Step("cp", "JB_GAS_CP(gas, T)", "specific_heat"),
                Step("R", "JB_GAS_R(gas)", "specific_heat"),
            ),
        ),
    ),
    Func(
        "JB_GAS_K",
        "gas",
        "Ideal-gas specific-heat ratio k(T) = cp/cv.",
        (_GAS, _T),
        "dimensionless",
        formulas.gas_k,
        "k = cp0 / (cp0 − R)",
        (_REF_COOLPROP,),
        Example(("air", 300), 1.3999419570156248, 1e-9),
        working=Working(
            "k",
            "cp/(cp - R)",
            (
                Step("cp", "JB_GAS_CP(gas, T)", "specific_heat"),
                Step("R", "JB_GAS_R(gas)", "specific_heat"),
            ),
        ),
    ),
    Func(
        "JB_GAS_R",
        "gas",
        "Specific gas constant R = R_u / M of a gas.",
        (_GAS,),
        "specific_heat",
        formulas.gas_R,
        "R = R_u / M",
        ("CODATA 2018 molar gas constant; molar masses of each fluid's equation of state",),
        Example(("air",), 0.2870491267875601, 1e-9),
        working=Working(steps=(Step("M", "JB_GAS_MOLAR_MASS(gas)", "molar_mass"),)),
    ),
    Func(
        "JB_GAS_MOLAR_MASS",
        "gas",
        "Molar mass M of a gas (default unit kg/kmol).",
        (_GAS,),
        "molar_mass",
        formulas.gas_molar_mass,
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
        formulas.gas_delta_h,
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
        formulas.gas_delta_u,
        "Δu = ∫ cv0(T) dT = Δh − R·(T2 − T1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 1000), 544.9980985122141, 1e-9),
        working=Working(
            "Δu",
            "dh - R*(T_2 - T_1)",
            (
                Step("dh", "JB_GAS_DELTA_H(gas, T_1, T_2)", "specific_energy"),
                Step("R", "JB_GAS_R(gas)", "specific_heat"),
            ),
        ),
    ),
    Func(
        "JB_GAS_CP_MEAN",
        "gas",
        "Mean ideal-gas cp over T1..T2, so that Δh = cp_mean·(T2 − T1).",
        (_GAS, _T1, _T2),
        "specific_heat",
        formulas.gas_cp_mean,
        "cp_mean = Δh / (T2 − T1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 1000), 1.0656178389478662, 1e-9),
        working=Working(
            "cp_mean",
            "dh/(T_2 - T_1)",
            (Step("dh", "JB_GAS_DELTA_H(gas, T_1, T_2)", "specific_energy"),),
        ),
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
        formulas.gas_delta_s,
        "Δs = ∫ cp0(T)/T dT − R·ln(P2/P1)",
        (_REF_COOLPROP,),
        Example(("air", 300, 600, 100, 500), 0.2452927443030884, 1e-9),
        working=Working(
            steps=(
                Step("R", "JB_GAS_R(gas)", "specific_heat"),
                Step("s_P", "-R*ln(P_2/P_1)", "specific_entropy"),
            )
        ),
    ),
    # ------------------------------------------------------------------ solids
    Func(
        "JB_SOLID_C",
        "solid",
        "Specific heat c(T) of an incompressible solid or liquid (cp = cv = c).",
        (_MAT, _T),
        "specific_heat",
        formulas.solid_c,
        "c(T) from the material's published fit or table",
        (_REF_SOLIDS,),
        Example(("copper", 300), 0.384981302755812, 1e-9),
    ),
    Func(
        "JB_SOLID_C_MEAN",
        "solid",
        "Mean specific heat of an incompressible solid or liquid over T1..T2.",
        (_MAT, _T1, _T2),
        "specific_heat",
        formulas.solid_c_mean,
        "c_mean = ∫ c dT / (T2 − T1)",
        (_REF_SOLIDS,),
        Example(("aluminium", 300, 500), 0.9545622645934263, 1e-9),
        working=Working(
            "c_mean",
            "du/(T_2 - T_1)",
            (Step("du", "JB_SOLID_DELTA_U(material, T_1, T_2)", "specific_energy"),),
        ),
    ),
    Func(
        "JB_SOLID_DELTA_U",
        "solid",
        "Internal-energy change per unit mass of an incompressible solid or liquid from T1 to T2.",
        (_MAT, _T1, _T2),
        "specific_energy",
        formulas.solid_delta_u,
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
        formulas.solid_heat,
        "Q = m·∫ c(T) dT from T1 to T2",
        (_REF_SOLIDS,),
        Example(("carbon steel", 1000, 300, 400), 47444.98168616241, 1e-9),
        working=Working(
            "Q", "m*du", (Step("du", "JB_SOLID_DELTA_U(material, T_1, T_2)", "specific_energy"),)
        ),
    ),
    # ------------------------------------------------------------------ boundary work
    Func(
        "JB_WORK_ISOBARIC",
        "work",
        "Boundary work at constant pressure, W = P·(V2 − V1); positive when the system expands "
        "(work by the system), exactly 0 for a rigid (constant-volume) system.",
        (Arg("P", "absolute pressure of the process", quantity="pressure"), _V1, _V2),
        "energy",
        formulas.work_isobaric,
        "W = P·(V2 − V1)",
        (_REF_WORK,),
        Example((200, 0.05, 0.08), 6.0),
        working=Working("W", "P*(V_2 - V_1)", curve="P"),
    ),
    Func(
        "JB_WORK_ISOTHERMAL",
        "work",
        "Boundary work of an ideal gas at constant temperature, W = P1·V1·ln(V2/V1); positive "
        "when the system expands (work by the system).",
        (_P1, _V1, _V2),
        "energy",
        formulas.work_isothermal,
        "W = P1·V1·ln(V2/V1)",
        (_REF_WORK,),
        Example((500, 0.02, 0.1), 16.094379124341003),
        working=Working("W", "P_1*V_1*ln(V_2/V_1)", curve="P_1*V_1/V"),
    ),
    Func(
        "JB_WORK_ISOTHERMAL_MASS",
        "work",
        "Boundary work of a mass of ideal gas at constant temperature, W = m·R·T·ln(V2/V1); "
        "positive when the system expands (work by the system).",
        (_GAS, Arg("m", "mass of gas", quantity="mass"), _T, _V1, _V2),
        "energy",
        formulas.work_isothermal_mass,
        "W = m·R·T·ln(V2/V1)",
        (_REF_WORK,),
        Example(("air", 0.5, 300, 0.1, 0.3), 47.30335472103956),
        working=Working(
            "W",
            "m*R*T*ln(V_2/V_1)",
            (Step("R", "JB_GAS_R(gas)", "specific_heat"),),
            curve="m*R*T/V",
        ),
    ),
    Func(
        "JB_WORK_POLYTROPIC",
        "work",
        "Boundary work along P·V^n = C through two states, W = (P2·V2 − P1·V1)/(1 − n), n from the "
        "states; continuous at n = 1; positive when the system expands (work by the system).",
        (_P1, _V1, _P2, _V2),
        "energy",
        formulas.work_polytropic,
        "W = (P2·V2 − P1·V1)/(1 − n) = P1·V1·ln(V2/V1)·φ(ln(P2·V2/(P1·V1))), φ(z) = (e^z − 1)/z",
        (_REF_WORK,),
        Example((100, 0.8, 900, 0.15), -175.95610217371583),
        working=Working(
            "W",
            "(P_2*V_2 - P_1*V_1)/(1 - n)",
            (Step("n", "ln(P_2/P_1)/ln(V_1/V_2)"),),
            band=_N_BAND,
            curve="P_1*(V_1/V)**n",
        ),
    ),
    Func(
        "JB_WORK_POLYTROPIC_N",
        "work",
        "Boundary work along P·V^n = C from (P1, V1) to V2 for a given n; equals the isothermal "
        "result at n = 1; positive when the system expands (work by the system).",
        (_P1, _V1, _V2, _N),
        "energy",
        formulas.work_polytropic_n,
        "W = P1·V1·ln(r)·φ((1 − n)·ln r), r = V2/V1, φ(z) = (e^z − 1)/z",
        (_REF_WORK,),
        Example((100, 0.8, 0.15, 1.3), -173.95753822834706),
        working=Working(
            "W",
            "(P_2*V_2 - P_1*V_1)/(1 - n)",
            (Step("P_2", "P_1*(V_1/V_2)**n", "pressure"),),
            band=_N_BAND,
            curve="P_1*(V_1/V)**n",
        ),
    ),
    Func(
        "JB_WORK_LINEAR",
        "work",
        "Boundary work when pressure is linear in volume (spring-loaded piston), "
        "W = (P1 + P2)/2·(V2 − V1); positive when the system expands (work by the system).",
        (_P1, _V1, _P2, _V2),
        "energy",
        formulas.work_linear,
        "W = (P1 + P2)/2·(V2 − V1)",
        (_REF_WORK,),
        Example((150, 0.05, 350, 0.09), 10.0),
        working=Working(
            "W", "(P_1 + P_2)/2*(V_2 - V_1)", curve="P_1 + (P_2 - P_1)*(V - V_1)/(V_2 - V_1)"
        ),
    ),
    Func(
        "JB_WORK_PV",
        "work",
        "Boundary work from measured pressure–volume points (two ranges, in path order); a closed "
        "loop (last point = first) gives the net cycle work; positive = work by the system.",
        (
            Arg(
                "P_values",
                "absolute pressures in path order (blank rows ignored)",
                type="range",
                quantity="pressure",
            ),
            Arg("V_values", "volumes in the same order", type="range", quantity="volume"),
            Arg(
                "method",
                "trapezoid (default) or polytropic (each segment P·V^n = C)",
                type="text",
                optional=True,
            ),
        ),
        "energy",
        formulas.work_pv,
        "W = Σ ∫P dV over segments: trapezoid (P1 + P2)/2·ΔV, or polytropic per segment",
        (_REF_WORK,),
        Example(([[100], [200], [200], [100], [100]], [[0.1], [0.1], [0.3], [0.3], [0.1]]), 20.0),
        elementwise=False,
        working=Working("W", figure="points"),
    ),
    Func(
        "JB_WORK_PATH",
        "work",
        "Boundary work of a mass of real fluid or ideal gas along a path (isothermal, isentropic, "
        "polytropic …) on its equation of state, to an end condition; positive = work by the system.",
        (_STATE1, _PATH, _END_SPEC, _END_VALUE, _MASS),
        "energy",
        formulas.work_path,
        "W = m·∫P dv along the path; isothermal W = m·[T·(s2 − s1) − (u2 − u1)], isentropic W = −m·(u2 − u1)",
        (_REF_COOLPROP, _REF_WORK),
        Example(("water | T = 200 degC | x = 0", "isothermal", "x2", 1, 2), 392.00926814312766),
        caution=True,
        working=Working("W", figure="path"),
    ),
    Func(
        "JB_WORK_ELECTRIC_IN",
        "work",
        "Electrical energy delivered to the system, V·I·Δt; it is work done ON the system, so enter "
        "it in a balance as a negative W_other.",
        (
            Arg("voltage", "voltage across the element", quantity="voltage"),
            Arg("current", "current through it", quantity="current"),
            Arg("duration", "time it runs", quantity="time"),
        ),
        "energy",
        formulas.work_electric_in,
        "W_in = V·I·Δt",
        (_REF_WORK,),
        Example((230, 4, 600), 552.0),
        working=Working("W_in", "voltage*current*duration"),
    ),
    Func(
        "JB_WORK_SHAFT_IN",
        "work",
        "Shaft (paddle-wheel, stirrer) work delivered to the system, 2π·N·τ; it is work done ON the "
        "system, so enter it in a balance as a negative W_other.",
        (Arg("torque", "shaft torque", quantity="torque"), Arg("revolutions", "number of turns")),
        "energy",
        formulas.work_shaft_in,
        "W_in = 2π·N·τ",
        (_REF_WORK,),
        Example((12, 400), 30.159289474462014),
        working=Working("W_in", "2*pi*revolutions*torque"),
    ),
    # ------------------------------------------------------------------ polytropic
    Func(
        "JB_POLY_EXPONENT",
        "poly",
        "Polytropic exponent n of the path P·V^n = C through two states.",
        (_P1, _V1, _P2, _V2),
        "dimensionless",
        formulas.poly_exponent,
        "n = ln(P2/P1) / ln(V1/V2)",
        (_REF_WORK,),
        Example((100, 0.8, 900, 0.15), 1.3125779630290983),
        working=Working(
            "n",
            "ln(P_2/P_1)/ln(V_1/V_2)",
            band=("=", 1.0, 1.67, _N_WHAT),
            curve="P_1*(V_1/V)**(ln(P_2/P_1)/ln(V_1/V_2))",
        ),
    ),
    Func(
        "JB_POLY_FIT",
        "poly",
        "Least-squares polytropic fit of measured data in ln P – ln V: n, or with show = all a row "
        "(n, C in the sheet's P·V^n units, R²).",
        (
            Arg(
                "P_values",
                "absolute pressures (blank rows ignored)",
                type="range",
                quantity="pressure",
            ),
            Arg("V_values", "volumes in the same order", type="range", quantity="volume"),
            Arg("show", "n (default) or all", type="text", optional=True),
        ),
        "number",
        formulas.poly_fit,
        "ln P = ln C − n·ln V, least squares in ln P",
        (_REF_WORK,),
        Example(([[100], [189.8], [378.7]], [[0.8], [0.5], [0.3]]), 1.3575233586851823, 1e-6),
        elementwise=False,
        working=Working("n", figure="points", columns=("n", "C", "R²")),
        validity=(
            Validity(
                "fitted polytropic exponent n",
                "result",
                "a polytropic compression or expansion of a gas",
                low=1.0,
                high=1.67,
            ),
            Validity(
                "R² of the fit in ln P – ln V",
                "JB_POLY_FIT(P_values, V_values, 'all')",
                "one polytropic path P·V^n = C through the points (a lower R² mixes branches "
                "or valve events: fit each branch apart)",
                low=0.99,
                item=2,
            ),
        ),
    ),
    Func(
        "JB_POLY_P2",
        "poly",
        "End pressure on P·V^n = C: P2 = P1·(V1/V2)^n.",
        (_P1, _V1, _V2, _N),
        "pressure",
        formulas.poly_p2,
        "P2 = P1·(V1/V2)^n",
        (_REF_WORK,),
        Example((100, 0.8, 0.2, 1.3), 606.2866266041592),
        working=Working("P2", "P_1*(V_1/V_2)**n", band=_N_BAND, curve="P_1*(V_1/V)**n"),
    ),
    Func(
        "JB_POLY_V2",
        "poly",
        "End volume on P·V^n = C: V2 = V1·(P1/P2)^(1/n).",
        (_P1, _V1, _P2, _N),
        "volume",
        formulas.poly_v2,
        "V2 = V1·(P1/P2)^(1/n)",
        (_REF_WORK,),
        Example((100, 0.8, 600, 1.3), 0.20161001506742393),
        working=Working("V2", "V_1*(P_1/P_2)**(1/n)", band=_N_BAND),
    ),
    Func(
        "JB_POLY_T2_FROM_V",
        "poly",
        "End temperature of an ideal gas on P·V^n = C from the volume ratio: T2 = T1·(V1/V2)^(n − 1).",
        (_T1, _V1, _V2, _N),
        "temperature",
        formulas.poly_t2_from_v,
        "T2 = T1·(V1/V2)^(n − 1)",
        (_REF_WORK,),
        Example((300, 0.8, 0.2, 1.3), 454.71496995311946),
        working=Working("T2", "T_1*(V_1/V_2)**(n - 1)", band=_N_BAND),
    ),
    Func(
        "JB_POLY_T2_FROM_P",
        "poly",
        "End temperature of an ideal gas on P·V^n = C from the pressure ratio: T2 = T1·(P2/P1)^((n − 1)/n).",
        (_T1, _P1, _P2, _N),
        "temperature",
        formulas.poly_t2_from_p,
        "T2 = T1·(P2/P1)^((n − 1)/n)",
        (_REF_WORK,),
        Example((300, 100, 600, 1.3), 453.6225339017037),
        working=Working("T2", "T_1*(P_2/P_1)**((n - 1)/n)", band=_N_BAND),
        validity=(
            Validity(
                "end temperature of a compression (P_2 > P_1) minus its start T_1",
                "result - T_1",
                "a polytropic compression of a gas (n ≥ 1: the gas warms as it is compressed)",
                low=0.0,
                when="P_2 - P_1",
                kind="temperature_difference",
            ),
        ),
    ),
    # ------------------------------------------------------------------ first law
    Func(
        "JB_BALANCE_HEAT",
        "balance",
        "Heat of a closed system from the first law, Q = ΔU + ΔKE + ΔPE + W_b + W_other; heat into "
        "the system +, work by the system + (work done on it is negative).",
        (Arg("dU", "internal-energy change ΔU", quantity="energy"), _WB, _WOTHER, _DKE, _DPE),
        "energy",
        formulas.balance_heat,
        "Q = ΔU + ΔKE + ΔPE + W_b + W_other",
        (_REF_FIRSTLAW,),
        Example((120, 30, -25), 125.0),
        working=Working("Q", "dU + dKE + dPE + W_b + W_other", defaults=_ZERO_TERMS),
    ),
    Func(
        "JB_BALANCE_GAP",
        "balance",
        "Checker's first-law gap Q − W − ΔE for numbers already in a workbook; 0 when they close. "
        "Heat into the system +, work by the system +.",
        (
            Arg("Q", "heat into the system", quantity="energy"),
            _WB,
            Arg("dU", "internal-energy change ΔU", quantity="energy"),
            _WOTHER,
            _DKE,
            _DPE,
        ),
        "energy",
        formulas.balance_gap,
        "gap = Q − W_b − W_other − (ΔU + ΔKE + ΔPE)",
        (_REF_FIRSTLAW,),
        Example((125, 30, 120, -25), 0.0),
        working=Working(
            "gap",
            "Q - W_b - W_other - (dU + dKE + dPE)",
            defaults=_ZERO_TERMS,
            zero=("Q", "W_b", "dU"),
        ),
    ),
    Func(
        "JB_BALANCE_DELTA_KE",
        "balance",
        "Kinetic-energy change of a moving closed system, ΔKE = m·(V2² − V1²)/2.",
        (
            Arg("m", "mass of the system", quantity="mass"),
            Arg("vel_1", "initial speed", quantity="speed"),
            Arg("vel_2", "final speed", quantity="speed"),
        ),
        "energy",
        formulas.balance_delta_ke,
        "ΔKE = m·(V2² − V1²)/2",
        (_REF_FIRSTLAW,),
        Example((1200, 0, 25), 375.0),
        working=Working("ΔKE", "m*(vel_2**2 - vel_1**2)/2"),
    ),
    Func(
        "JB_BALANCE_DELTA_PE",
        "balance",
        "Potential-energy change of a closed system raised or lowered, ΔPE = m·g·(z2 − z1), "
        "g = 9.80665 m/s² unless given.",
        (
            Arg("m", "mass of the system", quantity="mass"),
            Arg("z_1", "initial elevation", quantity="length"),
            Arg("z_2", "final elevation", quantity="length"),
            Arg("g", "gravity (default 9.80665 m/s2)", quantity="acceleration", optional=True),
        ),
        "energy",
        formulas.balance_delta_pe,
        "ΔPE = m·g·(z2 − z1)",
        (_REF_FIRSTLAW, "standard gravity 9.80665 m/s² (3rd CGPM, 1901)"),
        Example((500, 0, 40), 196.133),
        working=Working("ΔPE", "m*g*(z_2 - z_1)", defaults=(("g", 9.80665),)),
    ),
    Func(
        "JB_HEAT_ISOBARIC_GAS",
        "balance",
        "Heat to a mass of ideal gas at constant pressure, Q = m·Δh + W_other (Q − W_other = ΔH); "
        "heat into the system +, W_other by the system +.",
        (_GAS, Arg("m", "mass of gas", quantity="mass"), _T1, _T2, _WOTHER),
        "energy",
        formulas.heat_isobaric_gas,
        "Q = m·∫cp dT + W_other",
        (_REF_FIRSTLAW, _REF_COOLPROP),
        Example(("air", 2, 300, 500), 405.8402854863983),
        working=Working(
            "Q",
            "m*dh + W_other",
            (Step("dh", "JB_GAS_DELTA_H(gas, T_1, T_2)", "specific_energy"),),
            defaults=(("W_other", 0.0),),
        ),
    ),
    Func(
        "JB_HEAT_RIGID_GAS",
        "balance",
        "Heat to a mass of ideal gas in a rigid vessel, Q = m·Δu + W_other; heat into the system +, "
        "W_other by the system + (a stirrer or heater inside is negative).",
        (_GAS, Arg("m", "mass of gas", quantity="mass"), _T1, _T2, _WOTHER),
        "energy",
        formulas.heat_rigid_gas,
        "Q = m·∫cv dT + W_other",
        (_REF_FIRSTLAW, _REF_COOLPROP),
        Example(("air", 2, 300, 500), 291.0206347713742),
        caution=True,
        working=Working(
            "Q",
            "m*du + W_other",
            (Step("du", "JB_GAS_DELTA_U(gas, T_1, T_2)", "specific_energy"),),
            defaults=(("W_other", 0.0),),
        ),
    ),
    # ------------------------------------------------------------------ processes
    Func(
        "JB_PROCESS",
        "process",
        "End state, work or heat of a fixed mass taken from state1 along a path (rigid, isobaric, "
        "isothermal, isentropic, polytropic n=…, linear slope=…, stops P=…/V=…) to an end condition. Q in +, W out +.",
        (
            _STATE1,
            _PATH,
            _END_SPEC,
            _END_VALUE,
            Arg(
                "want",
                "P2 T2 v2 V2 x2 u2 h2 s2 phase2 W Q dU dH (P means P2), with unit, e.g. 'P2 in MPa'",
                type="text",
            ),
            _MASS,
        ),
        "asked",
        formulas.process,
        "Q − W = m·(u2 − u1); W = m·∫P dv along the path; end state on the equation of state",
        (_REF_COOLPROP, _REF_IAPWS, _REF_FIRSTLAW),
        Example(
            ("water | T = 20 degC | P = 1 bar", "rigid", "T2 in degC", 40, "P2 in bar", 1),
            139.52702410665785,
            1e-6,
        ),
        caution=True,
        notes="A blocked-in liquid heated at constant volume (the example) gains several bar per "
        "kelvin (water in a rigid container: about 4.7 bar/K from 20 °C, 10.5 bar/K from 50 °C): "
        "the pressure comes from the equation of state, never from a gas law.",
        working=Working(steps=_PROCESS_STEPS, figure="path"),
    ),
    Func(
        "JB_PROCESS_TABLE",
        "process",
        "All end-state and energy results of JB_PROCESS as a spilled table (quantity, value, unit): "
        "P2 T2 v2 V2 x2 u2 h2 s2 phase2 W Q dU dH. Q in +, W out +.",
        (_STATE1, _PATH, _END_SPEC, _END_VALUE, _MASS),
        "asked",
        formulas.process_table,
        "as JB_PROCESS",
        (_REF_COOLPROP, _REF_FIRSTLAW),
        Example(
            ("water | P = 2 bar | x = 0.5", "rigid", "Q in kJ", 500, 1.5),
            [
                ["P2", 266.5797762541553, "kPa"],
                ["T2", 402.689741172735, "K"],
                ["v2", 0.44337109655774287, "m3/kg"],
                ["V2", 0.6650566448366143, "m3"],
                ["x2", 0.654658901545228, ""],
                ["u2", 1850.12657721082, "kJ/kg"],
                ["h2", 1968.3203449287216, "kJ/kg"],
                ["s2", 5.165755723041846, "kJ/(kg*K)"],
                ["W", 0.0, "kJ"],
                ["Q", 499.999999999995, "kJ"],
                ["dU", 499.999999999995, "kJ"],
                ["dH", 544.2793226095625, "kJ"],
                ["phase2", "saturated mixture", ""],
            ],
            1e-6,
        ),
        elementwise=False,
        caution=True,
        working=Working(steps=_PROCESS_STEPS, figure="path"),
    ),
    Func(
        "JB_PROCESS_PATH",
        "process",
        "Points along a JB_PROCESS path as a spilled table with a header row: V, P, T, v, s, for a "
        "native P–v or T–s chart of the process.",
        (
            _STATE1,
            _PATH,
            _END_SPEC,
            _END_VALUE,
            Arg("points", "number of points (default 21, 2 to 10000)", optional=True),
            _MASS,
        ),
        "asked",
        formulas.process_path,
        "states at equal steps of the path variable (u, h or ln v)",
        (_REF_COOLPROP,),
        Example(
            (
                "air (ideal gas) | T = 300 K | P = 100 kPa",
                "polytropic n = 1.3",
                "V2 in m3",
                0.1,
                3,
                1,
            ),
            [
                ["V in m3", "P in kPa", "T in K", "v in m3/kg", "s in kJ/(kg*K)"],
                [0.8611473803626802, 100.0, 300.0, 0.8611473803626802, 3.8911667274091744],
                [
                    0.29345312749444,
                    405.32217561423545,
                    414.364821129993,
                    0.29345312749444,
                    3.815268806041198,
                ],
                [0.1, 1642.8606604465717, 572.3273499669704, 0.1, 3.7455196403709703],
            ],
            1e-6,
        ),
        elementwise=False,
        working=Working(steps=_PROCESS_STEPS, figure="path"),
    ),
    # ------------------------------------------------------------------ cycles
    Func(
        "JB_CYCLE_NET",
        "cycle",
        "Net value over a cycle's processes: Σ of a range of heats (Q_net) or works (W_net); blanks ignored.",
        (
            Arg(
                "values", "heats or works of the cycle's processes", type="range", quantity="energy"
            ),
        ),
        "energy",
        formulas.cycle_net,
        "Q_net = Σ Q_i, W_net = Σ W_i",
        (_REF_FIRSTLAW,),
        Example(([[120], [-45], [0]],), 75.0),
        elementwise=False,
    ),
    Func(
        "JB_CYCLE_GAP",
        "cycle",
        "Closure gap of a cycle, Q_net − W_net; 0 when the process results close (ΔE over a cycle "
        "is 0). Heat in +, work by the system +.",
        (_QVALS, _WVALS),
        "energy",
        formulas.cycle_gap,
        "gap = Σ Q_i − Σ W_i  (= ΔE_cycle = 0)",
        (_REF_FIRSTLAW,),
        Example(([[100], [-60], [0]], [[0], [0], [40]]), 0.0),
        elementwise=False,
    ),
    Func(
        "JB_CYCLE_EFFICIENCY",
        "cycle",
        "Thermal efficiency W_net / Q_in of a cycle (Q_in = sum of positive heats); refuses a cycle "
        "whose Q_net and W_net differ. Heat in +, work by the system +.",
        (_QVALS, _WVALS),
        "dimensionless",
        formulas.cycle_efficiency,
        "η = W_net / Q_in",
        (_REF_FIRSTLAW,),
        Example(([[100], [-60], [0]], [[0], [0], [40]]), 0.4),
        elementwise=False,
    ),
    # ------------------------------------------------------------------ stored energy
    Func(
        "JB_STORED_ISENTROPIC",
        "stored",
        "Stored expansion energy of a gas volume: isentropic expansion to ambient on the real-fluid "
        "equation of state, m·(u1 − u2s); liquid contents: JB_STORED_FLASHING_LIQUID. An "
        "estimate: pressure tests are governed by the codes.",
        (
            Arg(
                "state",
                "state text of the contents from JB_STATE (real fluid or ideal gas)",
                type="text",
            ),
            Arg("V", "gas volume", quantity="volume"),
            _PAMB,
        ),
        "energy",
        formulas.stored_isentropic,
        "E = m·(u1 − u2), s2 = s1, P2 = P_amb, m = V/v1",
        (_REF_COOLPROP, _REF_STORED),
        Example(("nitrogen | P = 30 bar | T = 20 degC", 2.5), 11310.71420636391, 1e-6),
        caution=True,
        working=Working(
            "E",
            "m*(u_1 - u_2)",
            (
                Step("m", "V*JB_PROP(state, 'rho in kg/m3')", "mass"),
                Step("u_1", "JB_PROP(state, 'u in J/kg')", "specific_energy"),
                Step(
                    "u_2",
                    "JB_PROCESS(state, 'isentropic', 'P2 in Pa', P_amb, 'u2 in J/kg')",
                    "specific_energy",
                ),
            ),
            defaults=(("P_amb", 101325.0),),
        ),
        validity=(
            Validity(
                "phase of the contents",
                "JB_PHASE(state)",
                "the expansion of a gas (a liquid stores next to no expansion energy: "
                "treat it as a hydrostatic test)",
                not_text=("compressed liquid", "saturated liquid"),
            ),
        ),
    ),
    Func(
        "JB_STORED_FLASHING_LIQUID",
        "stored",
        "Expansion energy of a liquid stored above its boiling point (liquefied gas, hot water) "
        "that flashes on release: isentropic expansion of liquid and flash vapour to ambient, "
        "m·(u1 − u2). An estimate, not the blast.",
        (
            Arg(
                "state",
                "state text of the contents from JB_STATE: liquid, or liquid and vapour (x < 1)",
                type="text",
            ),
            Arg("V", "volume the contents fill (the vessel volume)", quantity="volume"),
            _PAMB,
        ),
        "energy",
        formulas.stored_flashing_liquid,
        "E = m·(u1 − u2), s2 = s1, P2 = P_amb (liquid + flash vapour), m = V/v1",
        (_REF_COOLPROP, _REF_FLASHING),
        Example(("propane | T = 50 degC | x = 0", 12), 307667.04096917127, 1e-6),
        caution=True,
        notes="The energy of the expansion is not the blast it drives: only a part of it goes "
        "into the pressure wave (the rest into fragments, and a fireball when the fluid burns). "
        "The isentropic expansion is an upper bound of the mechanical energy released.",
        working=Working(
            "E",
            "m*(u_1 - u_2)",
            (
                Step("m", "V*JB_PROP(state, 'rho in kg/m3')", "mass"),
                Step("u_1", "JB_PROP(state, 'u in J/kg')", "specific_energy"),
                Step(
                    "u_2",
                    "JB_PROCESS(state, 'isentropic', 'P2 in Pa', P_amb, 'u2 in J/kg')",
                    "specific_energy",
                ),
                Step("x_2", "JB_PROCESS(state, 'isentropic', 'P2 in Pa', P_amb, 'x2')"),
            ),
            defaults=(("P_amb", 101325.0),),
        ),
    ),
    Func(
        "JB_STORED_IDEAL_ISENTROPIC",
        "stored",
        "Stored expansion energy, ideal gas with constant k: P·V/(k − 1)·[1 − (P_amb/P)^((k−1)/k)]. "
        "An estimate: pressure tests are governed by the codes and a competent engineer.",
        (
            Arg("P", "absolute gas pressure", quantity="pressure"),
            Arg("V", "gas volume", quantity="volume"),
            _K,
            _PAMB,
        ),
        "energy",
        formulas.stored_ideal_isentropic,
        "E = P·V/(k − 1)·[1 − (P_amb/P)^((k − 1)/k)]",
        (_REF_STORED,),
        Example((3000, 2.5, 1.4), 11628.033185742339),
        caution=True,
        working=Working(
            "E", "P*V/(k - 1)*(1 - (P_amb/P)**((k - 1)/k))", defaults=(("P_amb", 101325.0),)
        ),
    ),
    Func(
        "JB_STORED_ISOCHORIC",
        "stored",
        "Stored energy as a constant-volume release, (P − P_amb)·V/(k − 1): the largest of the usual "
        "estimates. An estimate: pressure tests are governed by the codes and a competent engineer.",
        (
            Arg("P", "absolute gas pressure", quantity="pressure"),
            Arg("V", "gas volume", quantity="volume"),
            _K,
            _PAMB,
        ),
        "energy",
        formulas.stored_isochoric,
        "E = (P − P_amb)·V/(k − 1)",
        (_REF_STORED,),
        Example((3000, 2.5, 1.4), 18116.718750000004),
        caution=True,
        working=Working("E", "(P - P_amb)*V/(k - 1)", defaults=(("P_amb", 101325.0),)),
    ),
    # ------------------------------------------------------------------ blocked-in liquid
    Func(
        "JB_BLOCKED_IN_P2",
        "blocked",
        "Pressure after heating a blocked-in, liquid-full pipe or vessel to T_2: shape rigid "
        "(upper bound), cylinder or sphere (thin wall that stretches with P and T), solved on the "
        "equation of state. An estimate: relief is governed by the codes.",
        (
            Arg("state1", "liquid state text when blocked in, from JB_STATE", type="text"),
            Arg("T_2", "temperature after heating", quantity="temperature"),
            Arg(
                "shape",
                "rigid (default), cylinder (closed ends) or sphere",
                type="text",
                optional=True,
            ),
            *_WALL,
            Arg(
                "alpha_wall",
                "linear expansion coefficient of the wall (steel 1.2e-5 1/K)",
                quantity="expansion_coefficient",
                optional=True,
                default=0.0,
            ),
        ),
        "pressure",
        formulas.blocked_in_p2,
        "v(T2, P2) = v1·(1 + α·ΔT)³·(1 + c·(P2 − P1)); c = D(5 − 4ν)/(4tE) closed cylinder, "
        "3D(1 − ν)/(4tE) sphere, 0 rigid",
        (_REF_COOLPROP, _REF_IAPWS, _REF_THIN_WALL),
        Example(("water | T = 15 degC | P = 4 bar", 318.15), 21229.822209007747, 1e-6),
        caution=True,
        notes="The rigid result is the upper bound; a steel pipe (D = 100 mm, wall 5 mm) gives "
        "about 150 bar where the rigid bound gives 212 bar for water blocked in at 15 °C, 4 bar "
        "and warmed to 45 °C.",
        working=Working(
            steps=(
                Step("beta", "JB_PROP(state1, 'beta in 1/K')", "expansion_coefficient"),
                Step("kappa", "JB_PROP(state1, 'kappa in 1/Pa')", "compressibility"),
            )
        ),
        validity=(
            Validity(
                "hoop stress (P_2 − P_amb)·D/(2·wall) of the wall",
                "(result - P_amb)*D/(2*wall)",
                "a thin wall that stretches elastically (beyond yield the wall deforms "
                "plastically or fails, and the pressure found does not arise)",
                high="yield_strength",
                when="D*wall",
                defaults=(
                    ("P_amb", 101325.0, "the standard atmosphere (ISO 2533)"),
                    (
                        "yield_strength",
                        240e6,
                        "ASTM A106/A106M Grade B carbon-steel pipe, specified minimum yield "
                        "strength 35 ksi (240 MPa)",
                    ),
                ),
                kind="pressure",
            ),
        ),
    ),
    Func(
        "JB_RELIEF_THERMAL_FLOW",
        "blocked",
        "Thermal-relief volume flow of a blocked-in liquid under a heat input: q = β·Q_dot/(ρ·cp) "
        "at the relief state (API 521 hydraulic expansion). An estimate: relief sizing is "
        "governed by the codes.",
        (
            Arg(
                "state", "liquid state text at the relief set pressure, from JB_STATE", type="text"
            ),
            Arg("Q_dot", "heat input to the liquid (sun, tracing, process)", quantity="power"),
        ),
        "volume_flow",
        formulas.relief_thermal_flow,
        "q = β·Q_dot/(ρ·cp)",
        (_REF_COOLPROP, _REF_API521),
        Example(("water | T = 45 degC | P = 20 bar", 10), 0.003677730090279406, 1e-6),
        caution=True,
        working=Working(
            "q",
            "beta*Q_dot/(rho*cp)",
            (
                Step("beta", "JB_PROP(state, 'beta in 1/K')", "expansion_coefficient"),
                Step("rho", "JB_PROP(state, 'rho in kg/m3')", "density"),
                Step("cp", "JB_PROP(state, 'cp in J/(kg*K)')", "specific_heat"),
            ),
        ),
    ),
    # ------------------------------------------------------------------ time
    Func(
        "JB_TIME_HEATING",
        "time",
        "Time for a rigid vessel (state1, volume V) to reach a target T, P or x under a heat rate "
        "Q_dot and/or UA·(T_source − T), integrated on the equation of state.",
        (*_HEATING_ARGS,),
        "time",
        formulas.time_heating,
        "t = m·∫ du/Q_dot(u) along v = V/m, Q_dot = Q0 + UA·(T_source − T)",
        (_REF_TIME, _REF_COOLPROP),
        Example(
            ("water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15, 10), 16103.012867656853, 1e-8
        ),
        caution=True,
    ),
    Func(
        "JB_TIME_HEATING_TABLE",
        "time",
        "The heating of JB_TIME_HEATING as a spilled table of t, T, P, x, Q at points states from "
        "state1 to the target.",
        (
            *_HEATING_ARGS,
            Arg("points", "number of rows, 2 to 1000 (default 11)", optional=True),
        ),
        "asked",
        formulas.time_heating_table,
        "t_i = m·∫ du/Q_dot(u) from u1 to u_i",
        (_REF_TIME, _REF_COOLPROP),
        Example(
            ("water | T = 20 degC | P = 1 atm", 1, "T in K", 333.15, 10, None, None, 2),
            [
                ["t in s", "T in K", "P in kPa", "x", "Q in kJ"],
                [0.0, 293.15, 101.325, "", 0.0],
                [16103.012867656853, 333.15, 35814.50965623428, "", 161030.1286765685],
            ],
        ),
        elementwise=False,
        caution=True,
    ),
    Func(
        "JB_FIRE_HEAT",
        "time",
        "Heat input of a pool fire to a vessel by its wetted area (API 521): Q = C·F·A^0.82, C = "
        "43,200 W/m^1.64 with adequate drainage, 70,900 without. An estimate: fire cases follow "
        "the codes.",
        (
            Arg("A_wet", "wetted area (the part the code counts)", quantity="area"),
            Arg("F", "environment factor, 0 < F ≤ 1 (1 bare vessel)", optional=True),
            Arg("drainage", "adequate (default) or inadequate", type="text", optional=True),
        ),
        "power",
        formulas.fire_heat,
        "Q = C·F·A^0.82",
        (_REF_FIRE,),
        Example((10,), 285.41956953928144, 1e-9),
        caution=True,
    ),
    Func(
        "JB_WETTED_AREA",
        "time",
        "Wetted area of a horizontal or vertical cylindrical vessel (flat ends) up to a liquid "
        "level.",
        (
            Arg("shape", "horizontal or vertical", type="text"),
            Arg("D", "diameter", quantity="length"),
            Arg("L", "length between the ends (height when vertical)", quantity="length"),
            Arg("level", "liquid level above the bottom", quantity="length"),
        ),
        "area",
        formulas.wetted_area,
        "horizontal A = L·D·θ/2 + 2·(D²/8)(θ − sin θ), θ = 2·acos(1 − 2h/D); vertical π·D·h + π·D²/4",
        ("plane and cylinder geometry (common practice)",),
        Example(("vertical", 2, 5, 1), 9.42477796076938, 1e-12),
    ),
    Func(
        "JB_TIME_FIRE",
        "time",
        "Time for a fire-exposed cylindrical vessel to reach a target (e.g. its set pressure), the "
        "wetted area following the liquid level, on the equation of state. An estimate: fire "
        "cases follow the codes.",
        (*_FIRE_ARGS,),
        "time",
        formulas.time_fire,
        "t = m·∫ du/Q_fire(A_wet(level(u))) along v = V/m",
        (_REF_FIRE, _REF_TIME, _REF_COOLPROP),
        Example(
            ("water | P = 2 bar | x = 0.0005", "horizontal", 2, 6, "P in kPa", 1000),
            4920.495040569851,
            1e-6,
        ),
        caution=True,
    ),
    Func(
        "JB_TIME_FIRE_TABLE",
        "time",
        "The fire exposure of JB_TIME_FIRE as a spilled table of t, T, P, x, Q at points states.",
        (
            *_FIRE_ARGS,
            Arg("points", "number of rows, 2 to 1000 (default 11)", optional=True),
        ),
        "asked",
        formulas.time_fire_table,
        "t_i = m·∫ du/Q_fire(u) from u1 to u_i",
        (_REF_FIRE, _REF_TIME, _REF_COOLPROP),
        Example(
            ("water | P = 2 bar | x = 0.0005", "horizontal", 2, 6, "P in kPa", 1000, None, None, 2),
            [
                ["t in s", "T in K", "P in kPa", "x", "Q in kJ"],
                [0.0, 393.3600913279622, 200.0, 0.0005, 0.0],
                [4920.495040569851, 453.0280078816743, 1000.0, 0.001943725146763347, 3253882.5294],
            ],
        ),
        elementwise=False,
        caution=True,
    ),
    Func(
        "JB_TIME_BATCH",
        "time",
        "Time to heat or cool a batch of a solid or liquid (c(T) of JB_SOLID_C) from T_1 to T_2 "
        "through UA from a medium at T_source: m·∫c dT/(UA·(T_source − T)).",
        (
            _MAT,
            Arg("m", "mass of the batch", quantity="mass"),
            _T1,
            _T2,
            Arg("UA", "conductance between batch and medium", quantity="heat_transfer_coefficient"),
            Arg("T_source", "temperature of the medium", quantity="temperature"),
        ),
        "time",
        formulas.time_batch,
        "t = m·∫ c(T) dT/(UA·(T_source − T)) = m·c/UA·ln((Ts − T1)/(Ts − T2)) for constant c",
        (_REF_SOLIDS, "batch heating by a medium at constant temperature (common practice)"),
        Example(("water", 100, 293.15, 333.15, 0.5, 353.15), 918.745656876649, 1e-6),
    ),
    Func(
        "JB_BALANCE_RATE",
        "balance",
        "First law per unit time of a closed system: dE/dt = Q_dot − W_dot (heat in, work out).",
        (
            Arg("Q_dot", "heat rate into the system", quantity="power"),
            Arg(
                "W_dot", "power delivered by the system (optional)", quantity="power", optional=True
            ),
        ),
        "power",
        formulas.balance_rate,
        "dE/dt = Q_dot − W_dot",
        (_REF_FIRSTLAW,),
        Example((12, 5), 7.0),
        working=Working("dE/dt", "Q_dot - W_dot"),
    ),
    # ------------------------------------------------------------------ issue 27, round 3:
    # gas pocket, wall stress, gas-filled vessel in a fire, blowdown (joulebook.catalog.cases)
    Func(
        "JB_BLOCKED_IN_CUSHION_P2",
        "blocked",
        "Pressure after heating a blocked-in liquid with a gas pocket (nitrogen or any gas, or "
        "its own vapour) to T_2, the wall rigid or stretching. An estimate: relief is governed "
        "by the codes.",
        (
            Arg("state1", "liquid state text when blocked in, from JB_STATE", type="text"),
            Arg("T_2", "temperature after heating", quantity="temperature"),
            Arg("V", "container volume (liquid + pocket) at state1", quantity="volume"),
            Arg("V_gas", "gas pocket volume at state1 (0: liquid-full)", quantity="volume"),
            Arg(
                "gas",
                "pocket gas: nitrogen (default), any gas name, or vapour (the liquid's own, x = 0)",
                type="text",
                optional=True,
            ),
            *_CASE_WALL,
        ),
        "pressure",
        formulas.cushion_p2,
        "(V_c − m_L·v(T2, P2))·(P2 − P_v(T2)) = (P1 − P_v(T1))·V_g1·T2/T1, "
        "V_c = V·(1 + α·ΔT)³·(1 + c·(P2 − P1))",
        (_REF_COOLPROP, _REF_THIN_WALL, _REF_CUSHION),
        Example(("water | T = 15 degC | P = 4 bar", 318.15, 1, 0.02), 783.7117111375226, 1e-6),
        caution=True,
        notes="Gas dissolving in the liquid is neglected; the pocket holds the liquid's vapour "
        "at its saturation pressure (none for glycol and oil fills). A glycol or oil fill is "
        "incompressible in the property library: give kappa from its data for a liquid-full "
        "space, or the result is an upper bound.",
    ),
    Func(
        "JB_TIME_BLOCKED_IN",
        "time",
        "Time for a heated blocked-in liquid (with an optional gas pocket, the wall rigid or "
        "stretching) to reach a set pressure, under Q_dot and/or UA·(T_source − T). An "
        "estimate: relief is governed by the codes.",
        (
            Arg("state1", "liquid state text when blocked in, from JB_STATE", type="text"),
            Arg("V", "container volume (liquid + pocket) at state1", quantity="volume"),
            Arg("V_gas", "gas pocket volume at state1 (0: liquid-full)", quantity="volume"),
            Arg("P_set", "set pressure to reach (absolute)", quantity="pressure"),
            Arg(
                "Q_dot",
                "constant heat rate into the contents (optional)",
                quantity="power",
                optional=True,
            ),
            Arg(
                "UA",
                "conductance to a source at T_source (optional)",
                quantity="heat_transfer_coefficient",
                optional=True,
            ),
            Arg(
                "T_source",
                "temperature of the source (with UA)",
                quantity="temperature",
                optional=True,
            ),
            Arg(
                "gas",
                "pocket gas: nitrogen (default), any gas name, or vapour",
                type="text",
                optional=True,
            ),
            *_CASE_WALL,
        ),
        "time",
        formulas.time_blocked_in,
        "t = Q(T_set)/Q_dot(T_set) − ∫ Q(T)·UA/Q_dot(T)² dT, Q = ΔU + ½(P1 + P)·ΔV_c, "
        "P(T_set) = P_set",
        (_REF_COOLPROP, _REF_THIN_WALL, _REF_CUSHION, _REF_FIRSTLAW),
        Example(
            (
                "water | T = 15 degC | P = 4 bar",
                0.01,
                0,
                5000,
                0.1,
                None,
                None,
                None,
                "cylinder",
                0.1,
                0.005,
                200,
                0.3,
                1.2e-5,
            ),
            5523.99825194775,
            1e-6,
        ),
        caution=True,
        notes="The wall's own heat capacity is not included. The set pressure is absolute.",
    ),
    Func(
        "JB_WALL_HOOP_STRESS",
        "blocked",
        "Hoop stress of a thin cylinder wall, (P − P_out)·D/(2·wall), e.g. at the pressure of a "
        "blocked-in or heated case; the audit flags it above the yield strength f_y. An "
        "estimate: pressure equipment follows the codes.",
        (
            Arg("P", "absolute pressure inside", quantity="pressure"),
            Arg("D", "mean diameter", quantity="length"),
            Arg("wall", "wall thickness (at most D/4)", quantity="length"),
            _P_OUT,
            _F_Y,
        ),
        "modulus",
        formulas.hoop_stress,
        "σ_hoop = (P − P_out)·D/(2·t)",
        (_REF_THIN_WALL, _REF_YIELD),
        Example((20000, 0.2, 0.01), 0.19898675, 1e-9),
        caution=True,
        working=Working(
            "sigma",
            "(P - P_out)*D/(2*wall)",
            (Step("ratio", "(P - P_out)*D/(2*wall)/f_y", None),),
            band=("ratio", -1.0, 1.0, _STRESS_BAND),
            defaults=(("P_out", 101325.0), ("f_y", 235e6)),
        ),
    ),
    Func(
        "JB_WALL_AXIAL_STRESS",
        "blocked",
        "Axial stress of a thin closed cylinder wall (the stress of a thin sphere), "
        "(P − P_out)·D/(4·wall); the audit flags it above the yield strength f_y. An estimate: "
        "pressure equipment follows the codes.",
        (
            Arg("P", "absolute pressure inside", quantity="pressure"),
            Arg("D", "mean diameter", quantity="length"),
            Arg("wall", "wall thickness (at most D/4)", quantity="length"),
            _P_OUT,
            _F_Y,
        ),
        "modulus",
        formulas.axial_stress,
        "σ_axial = (P − P_out)·D/(4·t)",
        (_REF_THIN_WALL, _REF_YIELD),
        Example((20000, 0.2, 0.01), 0.099493375, 1e-9),
        caution=True,
        working=Working(
            "sigma",
            "(P - P_out)*D/(4*wall)",
            (Step("ratio", "(P - P_out)*D/(4*wall)/f_y", None),),
            band=("ratio", -1.0, 1.0, _STRESS_BAND),
            defaults=(("P_out", 101325.0), ("f_y", 235e6)),
        ),
    ),
    Func(
        "JB_TIME_FIRE_GAS",
        "time",
        "Time for a gas-filled (unwetted) steel cylinder in a fire to reach its set pressure, "
        "gas and wall heated with time. Caution: an unwetted wall can fail before the relief "
        "device opens; fire cases follow the codes.",
        _FIRE_GAS_ARGS,
        "time",
        formulas.time_fire_gas,
        "m_g·du/dt = UA_in·(T_w − T); m_w·c(T_w)·dT_w/dt = A·q(t, T_w) − UA_in·(T_w − T)",
        (_REF_COOLPROP, _REF_EN1991, _REF_EN1993),
        Example(
            ("nitrogen | T = 20 degC | P = 10 bar", 1, 3, 0.008, 1200), 124.62608374899555, 1e-6
        ),
        caution=True,
        notes="An unwetted wall heats quickly and loses strength above about 400 °C: it can "
        "rupture below the set pressure, before the relief device opens. See the table's "
        "stress ratio.",
    ),
    Func(
        "JB_TIME_FIRE_GAS_TABLE",
        "time",
        "The fire case of JB_TIME_FIRE_GAS as a spilled table of t, gas T, wall T, P and the "
        "hoop stress over the yield strength at the wall's temperature. An unwetted wall can "
        "fail before relief opens.",
        (*_FIRE_GAS_ARGS, Arg("points", "number of rows, 2 to 1000 (default 11)", optional=True)),
        "asked",
        formulas.time_fire_gas_table,
        "the rows of JB_TIME_FIRE_GAS; ratio = σ_hoop/(k_y(T_w)·f_y)",
        (_REF_COOLPROP, _REF_EN1991, _REF_EN1993),
        Example(
            (
                "nitrogen | T = 20 degC | P = 10 bar",
                1,
                3,
                0.008,
                1200,
                None,
                None,
                None,
                None,
                None,
                2,
            ),
            [
                ["t in s", "T in K", "T_wall in K", "P in kPa", "hoop stress / yield at T_wall"],
                [0.0, 293.15, 293.15, 1000.0, 0.23900930851063829],
                [
                    124.62608374899555,
                    350.43078527650283,
                    540.8228259088155,
                    1200.0,
                    0.2922007978723404,
                ],
            ],
            1e-6,
        ),
        elementwise=False,
        caution=True,
    ),
    Func(
        "JB_TIME_BLOWDOWN",
        "time",
        "Time to blow a vessel's gas down through an orifice to P_target, the gas that stays "
        "expanding isentropically (or warmed by the wall), choked or not, on the equation of "
        "state. An estimate: depressuring follows the codes.",
        _BLOWDOWN_ARGS,
        "time",
        formulas.time_blowdown,
        "dm/dt = −Cd·A·G(P, s, P_back), du = −P·dv + δq; G = max ρ_t·√(2(h − h_t)) at s",
        (_REF_COOLPROP, _REF_BLOWDOWN),
        Example(("nitrogen | T = 20 degC | P = 100 bar", 1, 0.01, 300), 204.87896890688066, 1e-6),
        caution=True,
        notes="The gas in the vessel must stay gas: where it reaches its dew point the case is "
        "refused (a two-phase blowdown is outside the model). The wall heats the gas only with "
        "m_wall and UA_wall (carbon steel, c(T) of EN 1993-1-2); the outside is adiabatic.",
    ),
    Func(
        "JB_BLOWDOWN_T_MIN",
        "time",
        "Lowest temperature of the gas that stays in a vessel blown down to P_target (as "
        "JB_TIME_BLOWDOWN): not the wall's or the outlet's temperature. An estimate: minimum "
        "design temperatures follow the codes.",
        _BLOWDOWN_ARGS,
        "temperature",
        formulas.blowdown_t_min,
        "T_min = min T(t), 0 ≤ t ≤ t(P_target)",
        (_REF_COOLPROP, _REF_BLOWDOWN),
        Example(("nitrogen | T = 20 degC | P = 100 bar", 1, 0.01, 300), 104.05519774425409, 1e-6),
        caution=True,
    ),
    Func(
        "JB_TIME_BLOWDOWN_TABLE",
        "time",
        "The blowdown of JB_TIME_BLOWDOWN as a spilled table of t, P, T, the mass left and the "
        "wall temperature.",
        (*_BLOWDOWN_ARGS, Arg("points", "number of rows, 2 to 1000 (default 11)", optional=True)),
        "asked",
        formulas.time_blowdown_table,
        "the rows of JB_TIME_BLOWDOWN at evenly spaced times",
        (_REF_COOLPROP, _REF_BLOWDOWN),
        Example(
            ("nitrogen | T = 20 degC | P = 100 bar", 1, 0.01, 300, None, None, None, None, 2),
            [
                ["t in s", "P in kPa", "T in K", "m in kg", "T_wall in K"],
                [0.0, 10000.0, 293.15, 114.84167763552414, ""],
                [204.87896890688066, 300.0, 104.05519774425409, 10.26916785533156, ""],
            ],
            1e-6,
        ),
        elementwise=False,
        caution=True,
    ),
    # ------------------------------------------------------------------ pressure tests
    Func(
        "JB_TEST_PNEUMATIC_ENERGY",
        "test",
        "Stored energy of a pneumatic test by the common code formula, E = 2.5·P·V·[1 − "
        "(P_amb/P)^0.286] (P absolute). An estimate: pressure tests are governed by the codes.",
        (
            Arg(
                "P_test", "absolute test pressure (write psig/barg for gauge)", quantity="pressure"
            ),
            Arg("V", "volume under test", quantity="volume"),
            _PAMB,
        ),
        "energy",
        formulas.pneumatic_test_energy,
        "E = 2.5·P·V·[1 − (P_amb/P)^0.286]",
        (_REF_PCC2,),
        Example((1200, 2), 3041.0313412154287, 1e-9),
        caution=True,
        working=Working(
            "E", "2.5*P_test*V*(1 - (P_amb/P_test)**0.286)", defaults=(("P_amb", 101325.0),)
        ),
    ),
    Func(
        "JB_TEST_HYDRO_ENERGY",
        "test",
        "Stored energy of a hydrostatic test: the liquid's isentropic expansion on its equation "
        "of state plus the stretched wall's elastic energy (cylinder or sphere). An estimate: "
        "tests are governed by the codes.",
        (
            Arg("state", "liquid state text at the test pressure, from JB_STATE", type="text"),
            Arg("V", "volume under test", quantity="volume"),
            Arg(
                "shape",
                "rigid (default, liquid only), cylinder or sphere",
                type="text",
                optional=True,
            ),
            *_WALL,
            _PAMB,
        ),
        "energy",
        formulas.hydro_test_energy,
        "E = m·(u1 − u2s) + ½·c·V·(P − P_amb)²",
        (_REF_COOLPROP, _REF_IAPWS, _REF_THIN_WALL),
        Example(("water | T = 20 degC | P = 12 bar", 2), 0.6507293801249098, 1e-6),
        caution=True,
        # the liquid's part worked out with its numbers; the wall's ½·c·V·ΔP² takes the
        # compliance of the shape named (the equation above), so no closed-form result line
        working=Working(
            steps=(
                Step("m", "V*JB_PROP(state, 'rho in kg/m3')", "mass"),
                Step("u_1", "JB_PROP(state, 'u in J/kg')", "specific_energy"),
                Step(
                    "u_2",
                    "JB_PROCESS(state, 'isentropic', 'P2 in Pa', P_amb, 'u2 in J/kg')",
                    "specific_energy",
                ),
                Step("E_liquid", "m*(u_1 - u_2)", "energy"),
                Step("P", "JB_PROP(state, 'P in Pa')", "pressure"),
                Step("dP", "P - P_amb", "pressure"),
            ),
            defaults=(("P_amb", 101325.0),),
        ),
    ),
    Func(
        "JB_TEST_TNT",
        "test",
        "TNT equivalent of a stored energy, W = E/e_TNT, on the conventional basis e_TNT = "
        "4.184 MJ/kg unless another basis is given.",
        (
            Arg("E", "stored energy", quantity="energy"),
            Arg(
                "basis",
                "energy per mass of TNT (default 4.184 MJ/kg)",
                quantity="specific_energy",
                optional=True,
            ),
        ),
        "mass",
        formulas.tnt_equivalent,
        "W = E/e_TNT",
        (_REF_TNT,),
        Example((4184,), 1.0, 1e-12),
        caution=True,
        working=Working("W_TNT", "E/basis", defaults=(("basis", 4.184e6),)),
    ),
    Func(
        "JB_TEST_DISTANCE",
        "test",
        "Distance by cube-root (Hopkinson–Cranz) scaling, R = Z·W^(1/3), with the scaled distance "
        "Z your code sets for the overpressure it limits. Exclusion zones follow the codes.",
        (
            Arg("W_TNT", "TNT-equivalent mass", quantity="mass"),
            Arg("Z", "scaled distance from the applicable code, m/kg^(1/3)"),
        ),
        "length",
        formulas.blast_distance,
        "R = Z·W^(1/3)",
        (_REF_SCALING,),
        Example((8, 10), 20.0, 1e-12),
        caution=True,
        working=Working("R", "Z*W_TNT**(1/3)"),
    ),
    # ------------------------------------------------------------------ engines
    Func(
        "JB_ENGINE_VOLUME",
        "engine",
        "Cylinder volume at a crank angle (degrees from top dead centre) of a slider-crank: "
        "V = V_c + π·B²/4·(l + a − a·cos θ − √(l² − a²·sin²θ)), a = S/2.",
        (
            Arg("crank_angle", "crank angle in degrees from top dead centre"),
            Arg("bore", "cylinder bore", quantity="length"),
            Arg("stroke", "piston stroke", quantity="length"),
            Arg("rod", "connecting-rod length (centre to centre)", quantity="length"),
            Arg("V_c", "clearance volume", quantity="volume"),
        ),
        "volume",
        formulas.engine_volume,
        "V = V_c + π·B²/4·(l + a − a·cos θ − √(l² − a²·sin²θ))",
        (_REF_HEYWOOD,),
        Example((90, 0.1, 0.1, 0.2, 0.0001), 0.0005425784050035163, 1e-12),
        working=Working(
            "V",
            "V_c + pi*bore**2/4*(rod + a - a*cos(theta) - sqrt(rod**2 - a**2*sin(theta)**2))",
            (Step("a", "stroke/2", "length"), Step("theta", "crank_angle*pi/180")),
        ),
    ),
    Func(
        "JB_ENGINE_POWER",
        "engine",
        "Indicated power from the net work of one cycle of one cylinder: W·N·z/n_R (N in rev/min, "
        "n_R = 2 four-stroke, 1 two-stroke or compressor).",
        (
            Arg("W_cycle", "net work of one cycle of one cylinder (∮P dV)", quantity="energy"),
            Arg("speed", "shaft speed in rev/min"),
            Arg("cylinders", "number of cylinders"),
            Arg("revs_per_cycle", "2 four-stroke, 1 two-stroke or compressor"),
        ),
        "power",
        formulas.engine_power,
        "P_i = W_cycle·(N/60)·z/n_R",
        (_REF_HEYWOOD,),
        Example((0.5, 3000, 4, 2), 50.0, 1e-12),
        working=Working("P_i", "W_cycle*speed/60*cylinders/revs_per_cycle"),
    ),
    Func(
        "JB_ENGINE_MEP",
        "engine",
        "Mean effective pressure of a cycle: MEP = W_cycle/V_d (V_d the swept volume).",
        (
            Arg("W_cycle", "net work of one cycle of one cylinder", quantity="energy"),
            Arg("V_d", "swept volume π·B²/4·S", quantity="volume"),
        ),
        "pressure",
        formulas.engine_mep,
        "MEP = W_cycle/V_d",
        (_REF_HEYWOOD,),
        Example((0.5, 0.0005), 1000.0, 1e-12),
        working=Working("MEP", "W_cycle/V_d"),
    ),
    Func(
        "JB_COMPRESSOR_VOLUMETRIC_EFFICIENCY",
        "engine",
        "Clearance volumetric efficiency of a reciprocating compressor: 1 + c − c·(P_d/P_s)^(1/n), "
        "c = V_c/V_d.",
        (
            Arg("clearance", "clearance ratio V_c/V_d, 0 to 1"),
            Arg("P_suction", "absolute suction pressure", quantity="pressure"),
            Arg("P_discharge", "absolute discharge pressure", quantity="pressure"),
            Arg("n", "polytropic exponent of the re-expansion, 1 to 1.7"),
        ),
        "number",
        formulas.compressor_efficiency,
        "η_v = 1 + c − c·(P_d/P_s)^(1/n)",
        ("reciprocating-compressor clearance re-expansion (common practice)",),
        Example((0.05, 100, 400, 1.3), 0.9047577143885676, 1e-12),
        working=Working(
            "η_v",
            "1 + clearance - clearance*(P_discharge/P_suction)**(1/n)",
            band=("n", 1.0, 1.67, _N_WHAT),
        ),
    ),
    Func(
        "JB_POLY_FIT_BRANCHES",
        "engine",
        "Polytropic exponents of the compression and expansion branches of a measured closed "
        "loop, fitted apart with valve plateaus (suction, discharge) left out: a row (n "
        "compression, n expansion, R² compression, R² expansion).",
        (
            Arg(
                "P_values",
                "absolute pressures around the loop, in order",
                type="range",
                quantity="pressure",
            ),
            Arg("V_values", "volumes in the same order", type="range", quantity="volume"),
        ),
        "number",
        formulas.poly_fit_branches,
        "ln P = ln C − n·ln V on each branch between the largest and smallest volume, its "
        "constant-pressure ends (valve-open plateaus) cut at the least-squares break point",
        (_REF_WORK, _REF_HEYWOOD, _REF_BREAK),
        Example(
            (
                [[100], [180], [330], [700], [500], [280], [160], [110]],
                [[0.5], [0.33], [0.2], [0.1], [0.13], [0.22], [0.36], [0.48]],
            ),
            [[1.2998649100391684, 1.1616191962568, 0.9979945461499561, 0.9993691574087468]],
            1e-6,
        ),
        elementwise=False,
        working=Working(
            figure="points",
            columns=("n compression", "n expansion", "R² compression", "R² expansion"),
        ),
        validity=tuple(
            Validity(
                f"fitted polytropic exponent of the {branch} branch",
                "JB_POLY_FIT_BRANCHES(P_values, V_values)",
                "a polytropic compression or expansion of a gas",
                low=1.0,
                high=1.67,
                item=i,
            )
            for i, branch in enumerate(("compression", "expansion"))
        ),
    ),
    # ------------------------------------------------------------------ humid air
    Func(
        "JB_HUMID_AIR",
        "humid",
        "Property of humid air (T RH HR Tdp Twb h v; h and v per kg dry air) at total pressure P "
        "fixed by two of T RH HR Tdp Twb h, each with its unit: real humid air, ASHRAE RP-1485.",
        (
            Arg(
                "want",
                "wanted property with unit, e.g. 'HR in kg/kg', 'Tdp in degC', 'RH in %'",
                type="text",
            ),
            Arg("P", "total (absolute) pressure", quantity="pressure"),
            Arg("spec1", "first property phrase, e.g. 'T in degC'", type="text"),
            Arg("value1", "value of the first property"),
            Arg("spec2", "second property phrase, e.g. 'RH' (0 to 1) or 'RH in %'", type="text"),
            Arg("value2", "value of the second property"),
        ),
        "asked",
        formulas.humid_air,
        "real-gas mixture of dry air and water vapour with enhancement factor (RP-1485)",
        (_REF_HUMID,),
        Example(("Tdp in degC", 101.325, "T in degC", 25, "RH", 0.5), 13.866886648880495, 1e-6),
        notes="RH is a fraction from 0 to 1 ('RH in %' for percent); HR is kg water per kg dry "
        "air ('HR', 'HR in kg/kg' or 'HR in g/kg'). The state is solved and checked first: "
        "supersaturated inputs (RH > 1, Tdp > T) are refused even when an input is asked back, "
        "and dry air has no dew point. (Twb, h) fixes a state, weakly.",
    ),
    Func(
        "JB_HUMID_CONDENSATE",
        "humid",
        "Water condensed in a compressed-air receiver of volume V_2 at (P_2, T_2) from air taken "
        "in at (P_1, T_1, RH_1): m_da·max(0, HR1 − HR_sat2), real humid air (RP-1485).",
        (
            Arg("P_1", "absolute pressure of the intake air", quantity="pressure"),
            Arg("T_1", "temperature of the intake air", quantity="temperature"),
            Arg("RH_1", "relative humidity of the intake air, 0 to 1"),
            Arg("P_2", "absolute pressure in the receiver", quantity="pressure"),
            Arg("T_2", "temperature in the receiver", quantity="temperature"),
            Arg("V_2", "receiver volume", quantity="volume"),
        ),
        "mass",
        formulas.humid_condensate,
        "m_water = V2/v_sat(P2, T2)·max(0, HR(P1, T1, RH1) − HR_sat(P2, T2))",
        (_REF_HUMID,),
        Example((101.325, 303.15, 0.7, 901.325, 308.15, 1), 0.15089700274430073, 1e-6),
    ),
    # ------------------------------------------------------------------ chart tables
    Func(
        "JB_CHART_DOME",
        "state",
        "The saturation dome of a real fluid as a spilled two-column table for a native chart: "
        "T-s, P-v, P-h or h-s, up the liquid line to the critical point and down the vapour line.",
        (
            _SUB,
            Arg("coordinates", "T-s, P-v, P-h or h-s (y–x)", type="text"),
            Arg("points", "points on each side, 2 to 1000 (default 11)", optional=True),
        ),
        "asked",
        formulas.chart_dome,
        "saturated liquid (x = 0) and vapour (x = 1) from the triple to the critical point",
        (_REF_COOLPROP,),
        Example(
            ("water", "T-s", 2),
            [
                ["s in kJ/(kg*K)", "T in K"],
                [0.0, 273.16],
                [4.396234406227893, 647.0953529039873],
                [4.417943113172108, 647.0953529039873],
                [9.15549340929812, 273.16],
            ],
            1e-6,
        ),
        elementwise=False,
    ),
    Func(
        "JB_CHART_ISOLINE",
        "state",
        "A line of constant T, P, v, h or s across a T-s, P-v, P-h or h-s chart as a spilled "
        "table, the chart's x quantity running from x_from to x_to.",
        (
            _SUB,
            Arg("coordinates", "T-s, P-v, P-h or h-s (y–x)", type="text"),
            Arg("fixed", "the constant property with unit, e.g. 'P in bar'", type="text"),
            Arg("fixed_value", "its value"),
            Arg("x_from", "first value of the chart's x quantity (unit-system unit)"),
            Arg("x_to", "last value of the chart's x quantity"),
            Arg("points", "number of points, 2 to 1000 (default 11)", optional=True),
        ),
        "asked",
        formulas.chart_isoline,
        "state (fixed, x) for x from x_from to x_to; y read from it",
        (_REF_COOLPROP,),
        Example(
            ("water", "T-s", "P in bar", 10, 2, 7, 2),
            [["s in kJ/(kg*K)", "T in K"], [2, 438.9628308222241], [7, 540.9859097141951]],
            1e-6,
        ),
        elementwise=False,
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
        formulas.unit_convert,
        "value_SI = value·factor + offset; result = (value_SI − offset')/factor'",
        ("NIST SP 811 (2008), Appendix B",),
        Example((27, "degC", "K"), 300.15, 1e-12),
        units=False,
    ),
    Func(
        "JB_WHY",
        "util",
        "The joulebook message behind a cell's failure (its error value in a workbook whose "
        'JB_ERRORS name is "values", or its text); blank when the cell did not fail.',
        (
            Arg(
                "cell",
                "a cell holding a joulebook result, e.g. B7",
                type="text",
            ),
        ),
        "text",
        formulas.why,
        "—",
        ("common practice: a spreadsheet error value carries no message; the face keeps it",),
        Example(
            ("OutOfRange: T = 5 K is below 273.16 K",), "OutOfRange: T = 5 K is below 273.16 K"
        ),
        units=False,
        elementwise=False,
        reads_message=True,
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
        formulas.about,
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


# ---------------------------------------------------------------------------------------
# cell conversion

_ERROR_TEXT = re.compile(r"^#(N/A|NULL!|DIV/0!|VALUE!|REF!|NAME\?|NUM!|GETTING_DATA|SPILL!|CALC!)$")


def _is_missing(v) -> bool:
    """A blank cell: None or empty text.  NaN is no blank: it is refused as bad input."""
    return v is None or (isinstance(v, str) and v == "")


def _as_array(v):
    if isinstance(v, np.ndarray):
        return v
    if isinstance(v, (list, tuple)):
        return np.array(v, dtype=object)
    return None


def _depth(v, limit: int = 3) -> int:
    """How deep lists and tuples nest in *v* (counted up to *limit*)."""
    d = 0
    while isinstance(v, (list, tuple)) and d < limit:
        d += 1
        inner = [x for x in v if isinstance(x, (list, tuple))]
        if not inner:
            break
        v = inner[0] if len(inner) == 1 else max(inner, key=lambda x: _depth(x, limit - d))
    return d


def _array2(arg: Arg, v) -> np.ndarray:
    """A range given as lists: at most 2 levels (rows of cells), as an object array."""
    if _depth(v) > 2:
        raise BadInput(
            f"{arg.name} is a list nested more than 2 levels deep; a cell takes a value, a "
            "row, a column or a block (2 levels)"
        )
    return np.array(v, dtype=object)


def _number(arg: Arg, v, where: str = ""):
    """One cell value as a float (or None when blank)."""
    if _is_missing(v):
        return None
    if isinstance(v, (bool, np.bool_)):
        raise BadInput(f"{arg.name}{where} = {v} is a TRUE/FALSE value; a number is needed")
    if isinstance(v, (int, float, np.integer, np.floating)):
        try:
            x = float(v)
        except OverflowError:  # an integer beyond the range of a float
            raise BadInput(
                f"{arg.name}{where} = {fmt_value(v)} is beyond the range of a number (±1.8e308)"
            ) from None
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


# per entry, worked out once: (func, ((type, quantity, optional, default), …), n_all)
_FAST = {
    f.name: (f, tuple((a.type, a.quantity, a.optional, a.default) for a in f.args), len(f.all_args))
    for f in CATALOG
}


def working_call(units: str | None = None):
    """``call(name, *si_args)`` for working expressions (:mod:`joulebook.core.working`): numbers
    with a quantity arrive in SI and are handed to the cell path in the unit system *units*
    (the calling cell's, so bare phrases mean what they meant there); the result returns in
    SI.  Asked results are asked for in SI units by the templates themselves."""
    system = unit_system(units if isinstance(units, str) and units.strip() else None)

    def run(name: str, *args):
        f = lookup(name)
        vals = []
        for a, v in zip(f.args, args):
            if a.quantity and isinstance(v, float):
                v = system.conv(a.quantity).from_si(v)
            vals.append(v)
        vals += [None] * (len(f.args) - len(vals))
        out = call(f.name, *vals, units) if f.units and units else call(f.name, *vals)
        if isinstance(out, float) and f.result not in _AS_IS:
            out = system.conv(f.result).to_si(out)
        return out

    return run


def call(name: str, *values):
    """Evaluate worksheet function *name* with cell values, as a cell would.

    Scalars give a scalar; ranges (lists, tuples, numpy arrays) in scalar arguments broadcast
    like numpy and give an array whose failed elements hold their error text and whose
    elements with a blank input are ``None``.  From Python an argument may also be a pint
    quantity or a ``joulebook.State`` (:func:`joulebook.catalog.quantities.cell_values`).

    Raises
    ------
    BadInput, OutOfRange, NoConvergence
        For a scalar call, any failure; for an array call, failures of the call as a whole.
    """
    entry = _FAST.get(name)
    if entry is None:
        entry = _FAST[lookup(name).name]
    f, specs, nall = entry
    nv = len(values)
    if nv > nall or (f.units and nv == nall):
        return _call(f, values)
    # the common case: plain numbers and text, no unit-system argument
    system = _DEFAULT
    si = []
    for i, (typ, qty, opt, default) in enumerate(specs):
        v = values[i] if i < nv else None
        t = type(v)
        if (
            (t is float or t is _F64 or (t is int and -_BIG < v < _BIG))
            and typ == "number"
            and (v - v == 0)
        ):
            x = float(v) if qty is None else system.conv(qty).to_si(float(v))
            if (x < 0.0 or (x == 0.0 and qty != "volume")) and qty in _ABSOLUTE:
                return _call(f, values)  # refused there, with the argument named
            si.append(x)
        elif t is str and typ == "text" and v and v[0] != "#":
            si.append(v)
        elif v is None and opt:
            si.append(default)
        else:
            return _call(f, values)
    return _run(f, si, system)


def _call(f: Func, values):
    """The general cell-call path: unit systems, ranges, conversions and their errors."""
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
    values = cell_values(f, values, system)  # pint quantities and States from Python

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
            a = v if t is np.ndarray else _array2(arg, v)
            if a.ndim > 2:
                raise BadInput(
                    f"{arg.name} is nested {a.ndim} levels deep; a cell takes a value, a "
                    "row, a column or a block (2 levels)"
                )
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
_BIG = 2**1023  # integers at least this large take the general path (overflow is named)
_DEFAULT = unit_system(None)
_F64 = np.float64


def _evaluate(f: Func, fargs, prepared, system):
    si_args = []
    for arg, x in zip(fargs, prepared):
        if x is None:
            if not arg.optional:
                raise BlankInput(f"{arg.name} is required: {arg.help[:120]}")
            si_args.append(arg.default)
        elif arg.quantity is None:
            si_args.append(x)
        else:
            conv = system.conv(arg.quantity)
            y = conv.to_si(x)
            if arg.quantity in _ABSOLUTE:
                _above_zero(arg, x, y, conv)
            si_args.append(y)
    return _run(f, si_args, system)


#: quantities that are absolute amounts: zero or less is no state of matter
_ABSOLUTE = {
    "temperature": "an absolute temperature must be above 0 K",
    "pressure": "an absolute pressure must be above 0",
    "volume": "a volume must not be below 0",
    "mass": "a mass must be above 0",
}
_GAUGE_HINT = " (a gauge pressure is written kPag, barg, psig)"


def _above_zero(arg: Arg, given, si, conv) -> None:
    """The one rule for absolute quantities (T, P, V, m): above zero, whatever the unit."""
    if type(si) is float and (
        si != si or (si >= 0.0 if arg.quantity == "volume" else si > 0.0)
    ):  # one number that keeps the rule (NaN is refused elsewhere): no array needed
        return
    a = np.asarray(si, dtype=float)
    # a volume may be zero (a bag inflated from flat, a cylinder filled from empty)
    bad = (a < 0.0 if arg.quantity == "volume" else ~(a > 0.0)) & ~np.isnan(a)
    if not bad.any():
        return
    g = np.asarray(given, dtype=float)
    idx = tuple(np.argwhere(bad)[0]) if a.ndim else ()
    where = f" (item {','.join(str(i + 1) for i in idx)})" if idx else ""
    unit = f" {conv.unit}" if conv.unit else ""
    shown = f"{arg.name}{where} = {fmt_value(float(g[idx]))}{unit}"
    rule = _ABSOLUTE[arg.quantity]
    if conv.offset:  # degC, degF, gauge units: where zero lies in the unit given
        zero = f"{fmt_value(conv.from_si(0.0))}{unit}"
        edge = "absolute zero" if arg.quantity == "temperature" else "a perfect vacuum"
        raise BadInput(f"{shown} is at or below {edge} ({zero}); {rule}")
    hint = _GAUGE_HINT if arg.quantity == "pressure" else ""
    raise BadInput(f"{shown}: {rule}{hint}")


def _run(f: Func, si_args, system):
    try:
        result = f.impl(*si_args, system=system)
    except JoulebookError:
        raise
    except ArithmeticError as e:  # overflow, division by an underflowed number
        raise OutOfRange(_beyond(f, si_args, system)) from e
    except ValueError as e:
        # a property-library failure we did not foresee: report it as ours, never as a number
        raise OutOfRange(
            f"{f.name}: the model could not evaluate these inputs ({type(e).__name__})"
        ) from e
    try:
        return _result(f, result, system)
    except _NotFinite:
        raise OutOfRange(_beyond(f, si_args, system)) from None


class _NotFinite(OutOfRange):
    """A result (or a value of a table) that is NaN or inf."""


def _beyond(f: Func, si_args, system) -> str:
    """The message of a result beyond any finite number, naming the input furthest from 1."""
    worst = None
    for arg, x in zip(f.args, si_args):
        if arg.type != "number" or type(x) is not float or x == 0.0:
            continue
        size = abs(math.log10(abs(x)))
        if worst is None or size > worst[0]:
            worst = (size, arg, x)
    if worst is None:
        return f"{f.name}: the result is beyond any finite number for these inputs"
    size, arg, x = worst
    conv = system.conv(arg.quantity) if arg.quantity else None
    unit = f" {conv.unit}" if conv is not None and conv.unit else ""
    shown = fmt_value(conv.from_si(x) if conv is not None else x) + unit
    rule = (
        "a model carries magnitudes from 1e-100 to 1e100"
        if size > 100
        else "the inputs together put it beyond any finite number"
    )
    return f"{f.name}: no finite result with {arg.name} = {shown}; {rule}"


def _result(f: Func, value, system):
    if type(value) is float:
        out = value if f.result in _AS_IS else system.conv(f.result).from_si(value)
        if out - out != 0.0:  # NaN or inf must never reach a cell
            raise _NotFinite(f"{f.name}: the result is not a finite number")
        return out
    if isinstance(value, (np.floating, int)) and not isinstance(value, bool):
        return _result(f, float(value), system)
    if isinstance(value, list):  # a table: no cell of it may hold NaN or inf either
        for row in value:
            for x in row if isinstance(row, list) else [row]:
                if isinstance(x, float) and x - x != 0.0:
                    raise _NotFinite(f"{f.name}: a value of the table is not a finite number")
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
    # each range as a flat list of its elements in row order (numpy's own order, the
    # elements as indexing gives them), so the loop below does not index an array each time
    cols = [(i, list(np.broadcast_to(a, shape).ravel())) for i, a in arrays.items()]
    results = []
    memo: dict[tuple, object] = {}
    for n in range(math.prod(shape)):
        elem = list(prepared)
        missing = False
        try:
            for i, values in cols:
                v = values[n]
                try:
                    x = _cell(fargs[i], v)
                except JoulebookError:  # again, the item named (only a refusal pays for it)
                    idx = np.unravel_index(n, shape)
                    x = _cell(fargs[i], v, f" (item {','.join(str(j + 1) for j in idx)})")
                if x is None:  # a blank cell in a range: blank result for that element
                    missing = True
                elem[i] = x
        except JoulebookError as e:
            results.append(e.cell_text())
            continue
        if missing:
            results.append(None)
            continue
        key = tuple(elem)
        r = memo.get(key, memo)
        if r is memo:
            try:
                r = _evaluate(f, fargs, elem, system)
            except BlankInput:  # a blank input outside the ranges: a blank element
                r = None
            except JoulebookError as e:
                r = e.cell_text()
            except Exception as e:  # a library failure must not kill the whole column
                r = cell_text(e)
            memo[key] = r
        results.append(r)
    out = np.empty(len(results), dtype=object)
    for n, r in enumerate(results):  # one by one: a result may itself be a list
        out[n] = r
    return out.reshape(shape)


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
