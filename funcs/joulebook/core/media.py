"""Media: one interface over real fluids and ideal gases, for states and processes.

A *medium* turns two independent properties into a :class:`Point` (T, P, v, u, h, s, x and
the phase word), SI throughout.

* :class:`RealMedium`: a fluid on its reference equation of state (see
  :mod:`joulebook.core.substances.fluids`).
* :class:`IdealMedium`: an ideal gas, P·v = R·T, with h = h⁰(T), u = h − R·T and
  s = s⁰(T) − R·ln(P/P₀), P₀ = 101.325 kPa, from either the ideal-gas part of the gas's
  equation of state or constant specific heats (see :mod:`joulebook.core.substances.gases`).

Substance text selects the medium: ``"water"`` is a real fluid; ``"air (ideal gas)"`` is the
ideal-gas model of air with c_p(T); ``"air | k = 1.4"`` (any model constant) is the
constant-c_p ideal gas.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from .errors import BadInput, OutOfRange, fmt_value
from .roots import brent
from .substances import fluids, gases
from .units import UnitSystem, unit_system

__all__ = [
    "Point",
    "RealMedium",
    "IdealMedium",
    "LiquidMedium",
    "medium",
    "split_substance",
    "IDEAL_TAG",
    "is_if97_text",
]

IDEAL_TAG = "(ideal gas)"
_P0 = 101_325.0
_T_REF = 298.15  # K, zero of h for the constant-cp model
_GAS_KEYS = ("cp", "cv", "k", "R", "M")
_STATE_KEYS = fluids.INPUTS


@dataclass(frozen=True)
class Point:
    r"""A state, SI: K, Pa, m³/kg, J/kg, J/(kg·K); x is None outside the two-phase region.

    .. math:: h = u + P\,v

    Parameters
    ----------
    T : float
        Temperature (K).
    P : float
        Pressure (Pa).
    v : float
        Specific volume (m³/kg).
    u : float
        Specific internal energy (J/kg).
    h : float
        Specific enthalpy (J/kg).
    s : float
        Specific entropy (J/(kg·K)).
    x : float or None
        Quality (two-phase states only).
    phase : str
        The phase in words.

    References
    ----------
    .. [1] E. W. Lemmon, I. H. Bell, M. L. Huber, M. O. McLinden, reference equations of
       state as implemented by CoolProp: I. H. Bell et al., Ind. Eng. Chem. Res. 53 (2014)
       2498–2508.

    Examples
    --------
    >>> p = medium("water").point("T", 373.15, "x", 1.0)
    >>> p.phase, round(p.P)
    ('saturated vapor', 101418)
    """

    T: float
    P: float
    v: float
    u: float
    h: float
    s: float
    x: float | None
    phase: str


def split_substance(text: str) -> tuple[str, list[str], list[str]]:
    """Split substance/state text into (name, model-constant parts, state-spec parts).

    Parameters
    ----------
    text : str
        ``"air | k = 1.4 | T = 300 K | P = 1 bar"`` and the like.

    Returns
    -------
    tuple
        ``(name, [model constants], [state specifications])``.

    Raises
    ------
    BadInput
        A part that is not ``SYMBOL = value unit``.

    References
    ----------
    .. [1] docs/design.md §9 (ideal gases in state text).

    Examples
    --------
    >>> split_substance("air | k = 1.4 | T = 300 K | P = 1 bar")
    ('air', ['k = 1.4'], ['T = 300 K', 'P = 1 bar'])
    """
    parts = [p.strip() for p in str(text).split("|")]
    name = parts[0]
    consts, specs = [], []
    for p in parts[1:]:
        key = p.split("=", 1)[0].strip() if "=" in p else ""
        if key in _GAS_KEYS:
            consts.append(p)
        elif key:
            specs.append(p)
        else:
            raise BadInput(f"{p!r} in {text[:60]!r} is not 'SYMBOL = value unit'")
    if "=" in name and name.split("=", 1)[0].strip() in _GAS_KEYS:
        consts.insert(0, name)
        name = ""
    return name, consts, specs


class RealMedium:
    """A real fluid on its reference equation of state.

    Parameters
    ----------
    info : FluidInfo
        The fluid's constants and limits (:func:`joulebook.core.substances.fluids.fluid_info`).

    References
    ----------
    .. [1] E. W. Lemmon, I. H. Bell, M. L. Huber, M. O. McLinden, reference equations of
       state as implemented by CoolProp: I. H. Bell et al., Ind. Eng. Chem. Res. 53 (2014)
       2498–2508.

    Examples
    --------
    >>> w = medium("water")
    >>> type(w).__name__, round(w.read("h", "T", 298.15, "P", 1e5))
    ('RealMedium', 104919)
    """

    ideal = False

    def __init__(self, info: fluids.FluidInfo):
        self.info = info
        self.name = info.name
        self.model = info.eos
        self.R = info.R

    def text(self) -> str:
        """The fluid's name as substance text."""
        return self.name

    def point(self, a: str, va: float, b: str, vb: float, shows=None) -> Point:
        """The :class:`Point` fixed by properties *a* = *va* and *b* = *vb* (SI)."""
        info = self.info
        st = fluids._flash(info, a, va, b, vb, shows)
        two = fluids._is_two_phase(st)
        return Point(
            st.T(),
            st.p(),
            1.0 / st.rhomass(),
            st.umass(),
            st.hmass(),
            st.smass(),
            st.Q() if two else None,
            fluids.phase_word(info, st),
        )

    def read(self, want: str, a: str, va: float, b: str, vb: float, shows=None):
        """Property *want* (SI) at the state fixed by *a* = *va* and *b* = *vb*."""
        return fluids.state_props(self.name, [want], a, va, b, vb, shows)[0]


class IdealMedium:
    r"""An ideal gas (P·v = R·T) with c_p(T) or constant c_p.

    .. math:: h = h^0(T), \quad u = h - R\,T, \quad s = s^0(T) - R \ln(P/P_0)

    with P₀ = 101.325 kPa.

    Parameters
    ----------
    g : GasModel
        The gas model (:func:`joulebook.core.substances.gases.gas_model`).
    text : str
        The substance text it was named by.

    References
    ----------
    .. [1] E. W. Lemmon, I. H. Bell, M. L. Huber, M. O. McLinden, reference equations of
       state as implemented by CoolProp: I. H. Bell et al., Ind. Eng. Chem. Res. 53 (2014)
       2498–2508.
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas u, h and s).

    Examples
    --------
    >>> air = medium("air | k = 1.4")
    >>> p = air.point("T", 300.0, "P", 1e5)
    >>> round(p.v, 5)                                   # R·T/P
    0.86115
    """

    ideal = True

    def __init__(self, g: gases.GasModel, text: str):
        self.g = g
        self.name = g.name
        self.model = f"ideal gas: {g.source}"
        self.R = g.R
        self._text = text

    def text(self) -> str:
        """The substance text the gas was named by."""
        return self._text

    # --- the model's temperature functions --------------------------------------------
    def h_T(self, T: float) -> float:
        """Specific enthalpy h⁰(T) (J/kg), zero at 298.15 K for constant c_p."""
        g = self.g
        gases._check_T(g, T)
        return g.cp_const * (T - _T_REF) if g.constant else gases._ig(g.internal, T)[1]

    def u_T(self, T: float) -> float:
        """Specific internal energy u = h⁰(T) − R·T (J/kg)."""
        return self.h_T(T) - self.R * T

    def s0_T(self, T: float) -> float:
        """Standard-state entropy s⁰(T) at P₀ = 101.325 kPa (J/(kg·K))."""
        g = self.g
        gases._check_T(g, T)
        return g.cp_const * math.log(T / _T_REF) if g.constant else gases._ig(g.internal, T)[2]

    def _T_from(self, fn, target: float, what: str) -> float:
        g = self.g
        lo, hi = g.T_min, g.T_max
        if g.constant:
            lo, hi = 1.0, 50_000.0
        flo, fhi = fn(lo) - target, fn(hi) - target
        if (flo > 0) == (fhi > 0):
            raise OutOfRange(
                f"{self.name}: {what} = {fmt_value(target)} lies outside the model's range "
                f"({fmt_value(lo)}–{fmt_value(hi)} K)"
            )
        return brent(
            lambda T: fn(T) - target,
            lo,
            hi,
            flo,
            fhi,
            xtol=1e-12,
            what=f"{self.name} T from {what}",
        )

    # --- flashing ------------------------------------------------------------------------
    def TP(self, a: str, va: float, b: str, vb: float) -> tuple[float, float]:
        """Temperature and pressure (K, Pa) fixed by *a* = *va* and *b* = *vb*."""
        if a == b:
            raise BadInput(f"{self.name}: the two state properties must differ (both are {a})")
        vals = {a: va, b: vb}
        if "x" in vals:
            raise BadInput(f"{self.name} is modelled as an ideal gas: it has no quality x")
        if "rho" in vals:
            r = vals.pop("rho")
            if not r > 0:
                raise OutOfRange(f"{self.name}: density must be > 0 (got {fmt_value(r)})")
            vals["v"] = 1.0 / r
        for k in ("P", "v", "T"):
            if k in vals and not vals[k] > 0:
                raise OutOfRange(f"{self.name}: {k} = {fmt_value(vals[k])} must be > 0 (absolute)")
        R = self.R
        if {"u", "h"} <= vals.keys() or ("T" in vals and ({"u", "h"} & vals.keys())):
            raise BadInput(
                f"{self.name}: for an ideal gas u and h depend on T alone; give P or v too"
            )
        if "T" in vals:
            T = vals["T"]
        elif "u" in vals:
            T = self._T_from(self.u_T, vals["u"], "u")
        elif "h" in vals:
            T = self._T_from(self.h_T, vals["h"], "h")
        elif {"P", "v"} <= vals.keys():
            T = vals["P"] * vals["v"] / R
        elif {"P", "s"} <= vals.keys():
            s_target = vals["s"] + R * math.log(vals["P"] / _P0)
            T = self._T_from(self.s0_T, s_target, "s")
        elif {"v", "s"} <= vals.keys():
            v, s = vals["v"], vals["s"]
            T = self._T_from(lambda T: self.s0_T(T) - R * math.log(R * T / (v * _P0)), s, "s")
        else:  # pragma: no cover - all pairs are handled above
            raise BadInput(f"{self.name}: the pair {a}, {b} does not fix an ideal-gas state")
        if "P" in vals:
            P = vals["P"]
        elif "v" in vals:
            P = R * T / vals["v"]
        elif "s" in vals:
            P = _P0 * math.exp((self.s0_T(T) - vals["s"]) / R)
        else:
            raise BadInput(f"{self.name}: give P, v or s with T, u or h")
        gases._check_T(self.g, T)
        return T, P

    def point(self, a: str, va: float, b: str, vb: float, shows=None) -> Point:
        """The :class:`Point` fixed by properties *a* = *va* and *b* = *vb* (SI)."""
        T, P = self.TP(a, va, b, vb)
        h = self.h_T(T)
        return Point(
            T,
            P,
            self.R * T / P,
            h - self.R * T,
            h,
            self.s0_T(T) - self.R * math.log(P / _P0),
            None,
            "ideal gas",
        )

    def read(self, want: str, a: str, va: float, b: str, vb: float, shows=None):
        """Property *want* (SI) at the state fixed by *a* = *va* and *b* = *vb*."""
        p = self.point(a, va, b, vb, shows)
        simple = {
            "T": p.T,
            "P": p.P,
            "v": p.v,
            "rho": 1.0 / p.v,
            "u": p.u,
            "h": p.h,
            "s": p.s,
            "Z": 1.0,
            "phase": p.phase,
        }
        if want in simple:
            return simple[want]
        if want in ("cp", "cv", "k"):
            return {"cp": gases.cp, "cv": gases.cv, "k": gases.k}[want](self.g, p.T)
        # ideal gas, P·v = R·T: β = 1/T, κ = 1/P, w = √(k·R·T), μ_JT = 0 (h depends on T alone)
        if want == "beta":
            return 1.0 / p.T
        if want == "kappa":
            return 1.0 / p.P
        if want == "w":
            return math.sqrt(gases.k(self.g, p.T) * self.R * p.T)
        if want == "mu_JT":
            return 0.0
        if want in ("mu", "nu", "lambda", "Pr", "sigma"):
            raise OutOfRange(
                f"{self.name} is modelled as an ideal gas, which has no transport properties: "
                f"give the real fluid's name (without '{IDEAL_TAG}') for {want}"
            )
        raise OutOfRange(f"{self.name} is modelled as an ideal gas: {want} is not defined")


_IDEAL_RE = re.compile(r"^(?P<name>.*?)\s*\(\s*ideal\s+gas\s*\)\s*$", re.IGNORECASE)
_IF97_RE = re.compile(r"^\s*(water|steam|H2O)\s*\(\s*IF97\s*\)\s*$", re.IGNORECASE)


def is_if97_text(text: str) -> bool:
    """Does *text* name water by IAPWS-IF97 (``"water (IF97)"``)?

    Parameters
    ----------
    text : str
        Substance text.

    Returns
    -------
    bool
        True for ``water (IF97)``, ``steam (IF97)``, ``H2O (IF97)`` in any case.

    References
    ----------
    .. [1] IAPWS R7-97(2012), *Revised Release on the IAPWS Industrial Formulation 1997 for
       the Thermodynamic Properties of Water and Steam*.

    Examples
    --------
    >>> is_if97_text("Water (IF97)"), is_if97_text("water")
    (True, False)
    """
    return bool(_IF97_RE.match(str(text)))


class _TabulatedMedium:
    """What a medium without the real-fluid reader shares: the properties of a Point, x, the
    derivatives from ``_derivative(T, P, want)`` and the saturation values ``_sat(want, p)``."""

    ideal = False
    _NOT_OFFERED = ""

    def text(self) -> str:
        return self.name

    def _sat(self, want: str, p: Point):
        raise OutOfRange(f"{self.name}: {want} is not offered here")

    def read(self, want: str, a: str, va: float, b: str, vb: float, shows=None):
        p = self.point(a, va, b, vb, shows)
        simple = {
            "T": p.T, "P": p.P, "v": p.v, "rho": 1.0 / p.v, "u": p.u, "h": p.h, "s": p.s,
            "Z": p.P * p.v / (self.R * p.T), "phase": p.phase,
        }  # fmt: skip
        if want in simple:
            return simple[want]
        if want == "x":
            if p.x is None:
                raise OutOfRange(f"{self.name}: x is defined only for saturated states")
            return p.x
        if want in ("cp", "cv", "k", "w"):
            if p.x is not None:
                raise OutOfRange(f"{self.name}: {want} is not defined for a two-phase state")
            return self._derivative(p.T, p.P, want)
        if want in ("Tsat", "Psat"):
            return self._sat(want, p)
        raise OutOfRange(f"{self.name}: {want} is not offered{self._NOT_OFFERED}")


class MixtureMedium(_TabulatedMedium):
    """A mixture by composition on the multi-fluid model (substances/mixtures.py).

    Parameters
    ----------
    text : str
        Mixture text, e.g. ``"methane 0.9, ethane 0.1"`` or ``"R32 0.5, R125 0.5 (mass)"``
        (a blend by name, ``"R410A"``, is its pseudo-pure equation of state instead).

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases
       and other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091 (the model's form).

    Examples
    --------
    >>> mix = medium("methane 0.9, ethane 0.1")
    >>> mix.point("T", 300.0, "P", 5e6).phase
    'single phase (mixture)'
    """

    info = None
    _NOT_OFFERED = " for mixtures"

    def __init__(self, text: str):
        from .substances import mixtures

        self._mx = mixtures
        self.mix = mixtures.parse(text)
        self.name = self.mix.text
        self.model = f"{mixtures.MODEL} via {fluids.coolprop_version()}"
        self.R = 8.314462618 / mixtures.molar_mass(self.mix)

    def point(self, a: str, va: float, b: str, vb: float, shows=None) -> Point:
        """The :class:`Point` at T–P, or at T or P with x (bubble 0, dew 1)."""
        pair = {a: va, b: vb}
        if set(pair) == {"T", "P"}:
            T, P, v, u, h, s = self._mx.at_TP(self.mix, pair["T"], pair["P"])
            return Point(T, P, v, u, h, s, None, "single phase (mixture)")
        for by in ("T", "P"):
            if set(pair) == {by, "x"}:
                x = pair["x"]
                T, P, v, u, h, s = self._mx.saturation(self.mix, by, pair[by], x)
                word = "bubble point" if x == 0 else "dew point" if x == 1 else "two-phase mixture"
                return Point(T, P, v, u, h, s, x, word)
        raise BadInput(
            f"{self.name}: a mixture takes T–P, or T or P with x (0 bubble point, 1 dew point)"
        )

    def _derivative(self, T: float, P: float, want: str) -> float:
        return self._mx.derivative(self.mix, T, P, want)


class IF97Medium(_TabulatedMedium):
    """Water by the industrial formulation IAPWS-IF97 (substances/if97.py).

    References
    ----------
    .. [1] IAPWS R7-97(2012), *Revised Release on the IAPWS Industrial Formulation 1997 for
       the Thermodynamic Properties of Water and Steam*.

    Examples
    --------
    >>> w = medium("water (IF97)")
    >>> round(w.point("T", 300.0, "P", 3e6).h / 1e3, 6)    # IF97 Table 5: 115.331273 kJ/kg
    115.331273
    """

    _NOT_OFFERED = " with IF97; write water (IAPWS-95) for it"

    def __init__(self):
        from .substances import if97

        self._if97 = if97
        self.name = if97.NAME
        self.model = if97.model_text()
        self.info = fluids.fluid_info("water")  # constants and the dome for the audit's charts
        self.R = self.info.R

    def point(self, a: str, va: float, b: str, vb: float, shows=None) -> Point:
        """The :class:`Point` fixed by *a* = *va* and *b* = *vb* on IAPWS-IF97."""
        T, P, v, u, h, s, x = self._if97.flash(a, va, b, vb)
        if x is not None:
            words = {0.0: "saturated liquid", 1.0: "saturated vapor"}
            phase = words.get(x, "saturated mixture")
        elif T >= self._if97.T_CRIT and P >= self._if97.P_CRIT:
            phase = "supercritical fluid"
        elif T >= self._if97.T_CRIT:
            phase = "gas above the critical temperature"
        elif P >= self._if97.psat(T):
            phase = "compressed liquid"
        else:
            phase = "superheated vapor"
        return Point(T, P, v, u, h, s, x, phase)

    def _derivative(self, T: float, P: float, want: str) -> float:
        return self._if97.derivative(T, P, want)

    def _sat(self, want: str, p: Point):
        if want == "Tsat":
            return self._if97.sat("P", p.P, 0.0)[0]
        return self._if97.sat("T", p.T, 0.0)[1]


class LiquidMedium(_TabulatedMedium):
    """A heat-transfer liquid, incompressible (substances/liquids.py): T–P states only.

    Parameters
    ----------
    text : str
        ``"ethylene glycol 40 %"``, ``"propylene glycol 30 %"``, ``"white mineral oil"`` …

    References
    ----------
    .. [1] CoolProp incompressible liquids (Bell et al., Ind. Eng. Chem. Res. 53, 2014).

    Examples
    --------
    >>> g = medium("ethylene glycol 40 %")
    >>> round(1 / g.point("T", 293.15, "P", 2e5).v, 1)
    1051.9
    """

    info = None
    R = math.inf  # no gas constant: Z is not offered
    _NOT_OFFERED = " for an incompressible liquid (T, P, v, rho, u, h, s, cp, beta only)"

    def __init__(self, text: str):
        from .substances import liquids

        self._liq = liquids
        self.liquid = liquids.liquid(text)
        self.name = self.liquid.name
        self.model = f"incompressible liquid via {fluids.coolprop_version()}"

    def point(self, a: str, va: float, b: str, vb: float, shows=None) -> Point:
        """The :class:`Point` at T–P (the liquid's state depends on T; h on P through P·v)."""
        pair = {a: va, b: vb}
        if set(pair) != {"T", "P"}:
            raise BadInput(f"{self.name} is an incompressible liquid: give T and P")
        v, u, h, s, _cp = self._liq.at_T(self.liquid, pair["T"], pair["P"])
        return Point(pair["T"], pair["P"], v, u, h, s, None, "liquid (incompressible)")

    def read(self, want: str, a: str, va: float, b: str, vb: float, shows=None):
        """Property *want* (SI) at (T, P); β from ρ(T), c_p = c_v."""
        p = self.point(a, va, b, vb, shows)
        if want in ("cp", "cv"):
            return self._liq.at_T(self.liquid, p.T, p.P)[4]
        if want == "beta":
            return self._liq.beta(self.liquid, p.T)
        if want in ("Z", "k", "w", "kappa"):
            raise OutOfRange(f"{self.name}: {want} is not offered{self._NOT_OFFERED}")
        return super().read(want, a, va, b, vb, shows)


_CONST_KIND = {
    "cp": "specific_entropy",
    "cv": "specific_entropy",
    "R": "specific_entropy",
    "M": "molar_mass",
}


def _explicit_unit(part: str, system: UnitSystem) -> str:
    """``cp = 1.005`` -> ``cp = 1.005 kJ/(kg*K)``: the text must not depend on the unit system."""
    key, _, val = (x.strip() for x in part.partition("="))
    if key in _CONST_KIND and re.fullmatch(r"[-+]?[0-9.]+(?:[eE][-+]?\d+)?", val):
        return f"{key} = {val} {system.unit(_CONST_KIND[key])}"
    return f"{key} = {val}"


@lru_cache(maxsize=1024)
def medium(text: str, system: UnitSystem | None = None):
    """The medium named by substance text (state-spec parts, if any, are ignored here).

    Parameters
    ----------
    text : str
        ``"water"`` (a real fluid), ``"water (IF97)"``, ``"air (ideal gas)"`` (c_p(T)),
        ``"air | k = 1.4"`` (constant c_p), a mixture ``"methane 0.9, ethane 0.1"``.
    system : UnitSystem, optional
        The unit system of model constants written without a unit (``cp = 1.005``).

    Returns
    -------
    RealMedium or IdealMedium or MixtureMedium or IF97Medium
        The medium, cached per text and system.

    Raises
    ------
    BadInput
        Unknown substance or malformed model constants.

    References
    ----------
    .. [1] E. W. Lemmon, I. H. Bell, M. L. Huber, M. O. McLinden, reference equations of
       state as implemented by CoolProp: I. H. Bell et al., Ind. Eng. Chem. Res. 53 (2014)
       2498–2508.
    .. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       2019, §4-4 and §7-9 (ideal-gas u, h and s).

    Examples
    --------
    >>> medium("air (ideal gas)").text()
    'air (ideal gas)'
    """
    system = system or unit_system(None)
    name, consts, _specs = split_substance(text)
    if _IF97_RE.match(name) and not consts:
        return IF97Medium()
    from .substances import liquids, mixtures

    if not consts and liquids.is_liquid_name(name):
        return LiquidMedium(name)
    if not consts and mixtures.is_mixture_text(name):
        return MixtureMedium(name)
    m = _IDEAL_RE.match(name)
    if m or consts:
        gname = m.group("name") if m else name
        consts = [_explicit_unit(c, system) for c in consts]
        gas_text = " | ".join([gname, *consts]) if gname else " | ".join(consts)
        g = gases.gas_model(gas_text, system)
        shown = f"{gname} {IDEAL_TAG}" if m and not consts else gas_text
        return IdealMedium(g, shown)
    return RealMedium(fluids.fluid_info(name))
