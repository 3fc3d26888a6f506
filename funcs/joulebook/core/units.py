"""Units written in the formula: unit phrases, unit systems and cached conversion factors.

Everything inside joulebook is SI (K, Pa, m³, kg, J).  A unit string is parsed by pint once;
the resulting linear map ``SI = value * factor + offset`` is cached, so a worksheet call never
builds a pint object.

Unit phrases
    ``"T in degC"``, ``"P in kPa"``, ``"h in kJ/kg"``; a bare symbol (``"h"``) takes the
    default unit of the unit system in force.
Unit systems
    named by their key units, ``K-kPa-kJ`` (default), ``K-Pa-J``, ``degC-bar-kJ``,
    ``degF-psia-Btu``, ``R-psia-Btu``; per-quantity overrides such as ``"P=psig, V=L"``,
    optionally after a system name: ``"degC-bar-kJ, V=L"``.
Gauge pressure
    ``kPag``, ``barg``, ``MPag``, ``psig``: absolute = gauge + atmospheric reference,
    101.325 kPa unless written, e.g. ``"kPag @ 95 kPa"``.
Temperature
    an absolute temperature (``T``) and a temperature difference (``dT``) are different
    quantities; ``degC`` inside a compound unit such as ``kJ/(kg*degC)`` is a difference, so
    kJ/(kg·K) and kJ/(kg·°C) are the same number.

References
----------
NIST Special Publication 811 (2008), *Guide for the Use of the International System of
Units*, Appendix B (factors for psi, Btu_IT, lbm, °F, °R).
"""

from __future__ import annotations

import math
import re
import threading
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from .errors import BadInput, OutOfRange, fmt_value

__all__ = [
    "Conv",
    "KINDS",
    "SYMBOLS",
    "STANDARD_ATMOSPHERE",
    "UnitSystem",
    "unit_system",
    "parse_unit",
    "parse_phrase",
    "Phrase",
    "convert",
    "kind_of_unit",
    "typed_spellings",
    "DEFAULT_SYSTEM",
    "set_gauge_atmosphere",
    "registry",
]

#: standard atmosphere, Pa (the default reference of gauge pressure)
STANDARD_ATMOSPHERE = 101_325.0
DEFAULT_SYSTEM = "K-kPa-kJ"


@dataclass(frozen=True)
class Conv:
    r"""Linear map from a unit to SI.

    .. math:: x_{SI} = x \cdot \mathrm{factor} + \mathrm{offset}

    Parameters
    ----------
    factor : float
        SI value of one unit (1e3 for kPa, 0.3048 for ft).
    offset : float
        SI value of the unit's zero (273.15 for degC, the atmospheric reference of a gauge
        pressure); 0 for most units.
    unit : str
        The unit as written.

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> c = Conv(1.0, 273.15, "degC")
    >>> c.to_si(25.0), round(c.from_si(300.0), 2)
    (298.15, 26.85)
    """

    factor: float
    offset: float = 0.0
    unit: str = ""

    def to_si(self, value: Any) -> Any:
        """The SI value of *value* (a float or an array) given in this unit."""
        if self.offset == 0.0:
            return value * self.factor if self.factor != 1.0 else value
        return value * self.factor + self.offset

    def from_si(self, value: Any) -> Any:
        """The value in this unit of the SI *value* (a float or an array)."""
        if self.offset == 0.0:
            return value / self.factor if self.factor != 1.0 else value
        return (value - self.offset) / self.factor


# kind -> (SI unit text, pint dimensionality expressed as a unit with that dimension)
KINDS: dict[str, tuple[str, str]] = {
    "temperature": ("K", "K"),
    "temperature_difference": ("K", "K"),
    "pressure": ("Pa", "Pa"),
    "pressure_difference": ("Pa", "Pa"),
    "specific_volume": ("m**3/kg", "m**3/kg"),
    "density": ("kg/m**3", "kg/m**3"),
    "specific_energy": ("J/kg", "J/kg"),
    "specific_entropy": ("J/(kg*K)", "J/(kg*K)"),
    "specific_heat": ("J/(kg*K)", "J/(kg*K)"),
    "volume": ("m**3", "m**3"),
    "mass": ("kg", "kg"),
    "energy": ("J", "J"),
    "power": ("W", "W"),
    "molar_mass": ("kg/mol", "kg/mol"),
    "time": ("s", "s"),
    "length": ("m", "m"),
    "speed": ("m/s", "m/s"),
    "acceleration": ("m/s**2", "m/s**2"),
    "voltage": ("V", "V"),
    "current": ("A", "A"),
    "torque": ("N*m", "N*m"),
    "amount": ("mol", "mol"),
    "expansion_coefficient": ("1/K", "1/K"),
    "compressibility": ("1/Pa", "1/Pa"),
    "joule_thomson": ("K/Pa", "K/Pa"),
    "heat_flux": ("W/m**2", "W/m**2"),
    "area": ("m**2", "m**2"),
    "heat_transfer_coefficient": ("W/K", "W/K"),
    "modulus": ("Pa", "Pa"),
    "dynamic_viscosity": ("Pa*s", "Pa*s"),
    "kinematic_viscosity": ("m**2/s", "m**2/s"),
    "thermal_conductivity": ("W/(m*K)", "W/(m*K)"),
    "surface_tension": ("N/m", "N/m"),
    "volume_flow": ("m**3/s", "m**3/s"),
    "dimensionless": ("", ""),
}

#: human words for each kind, used in messages
KIND_WORDS = {
    "temperature": "temperature",
    "temperature_difference": "temperature difference",
    "pressure": "pressure",
    "pressure_difference": "pressure difference",
    "specific_volume": "specific volume",
    "density": "density",
    "specific_energy": "specific energy",
    "specific_entropy": "specific entropy",
    "specific_heat": "specific heat (or specific gas constant)",
    "volume": "volume",
    "mass": "mass",
    "energy": "energy",
    "power": "power",
    "molar_mass": "molar mass",
    "time": "time",
    "length": "length",
    "speed": "speed",
    "acceleration": "acceleration",
    "voltage": "voltage",
    "current": "current",
    "torque": "torque",
    "amount": "amount of gas",
    "expansion_coefficient": "expansion coefficient",
    "compressibility": "compressibility",
    "joule_thomson": "Joule–Thomson coefficient",
    "heat_flux": "heat flux",
    "area": "area",
    "heat_transfer_coefficient": "heat-transfer conductance UA",
    "modulus": "elastic modulus",
    "dynamic_viscosity": "dynamic viscosity",
    "kinematic_viscosity": "kinematic viscosity",
    "thermal_conductivity": "thermal conductivity",
    "surface_tension": "surface tension",
    "volume_flow": "volume flow",
    "dimensionless": "dimensionless number",
}

#: trade symbols and the quantity each denotes (case matters: V is volume, v specific volume)
SYMBOLS: dict[str, str] = {
    "T": "temperature",
    "Tsat": "temperature",
    "dT": "temperature_difference",
    "P": "pressure",
    "Psat": "pressure",
    "dP": "pressure_difference",
    "v": "specific_volume",
    "rho": "density",
    "u": "specific_energy",
    "h": "specific_energy",
    "s": "specific_entropy",
    "cp": "specific_heat",
    "cv": "specific_heat",
    "c": "specific_heat",
    "R": "specific_heat",
    "x": "dimensionless",
    "k": "dimensionless",
    "Z": "dimensionless",
    "n": "dimensionless",
    "V": "volume",
    "m": "mass",
    "E": "energy",
    "Q": "energy",
    "W": "energy",
    "U": "energy",
    "H": "energy",
    "M": "molar_mass",
    "t": "time",
    "z": "length",
    "vel": "speed",
    "g": "acceleration",
    "Pow": "power",
    "beta": "expansion_coefficient",
    "kappa": "compressibility",
    "w": "speed",
    "mu_JT": "joule_thomson",
    "q": "heat_flux",
    "A": "area",
    "UA": "heat_transfer_coefficient",
    "E_mod": "modulus",
    "q_v": "volume_flow",
    "mu": "dynamic_viscosity",
    "nu": "kinematic_viscosity",
    "lambda": "thermal_conductivity",
    "Pr": "dimensionless",
    "sigma": "surface_tension",
    "RH": "dimensionless",
    "HR": "dimensionless",
    "Tdp": "temperature",
    "Twb": "temperature",
}

# ---------------------------------------------------------------------------------------
# pint, loaded once and only when a unit string outside the seed (:mod:`.unitseed`: the units
# of the named systems and the common ones, as pint computes them) is first parsed

from .unitseed import CONVS as _SEED_CONVS  # noqa: E402
from .unitseed import DIMS as _SEED_DIMS  # noqa: E402
from .unitseed import KINDS as _SEED_KINDS  # noqa: E402

_UREG: Any = None
_UREG_LOCK = threading.Lock()


def _ureg() -> Any:
    global _UREG
    if _UREG is None:
        with _UREG_LOCK:
            if _UREG is None:
                import pint

                ureg: Any = pint.UnitRegistry(on_redefinition="ignore")
                for line in _DEFINITIONS:
                    ureg.define(line)
                _define_gauge(ureg, _GAUGE_ATMOSPHERE[0])
                _UREG = ureg
    return _UREG


def registry() -> Any:
    """The project's one pint unit registry (built on first use, with the units below).

    Returns
    -------
    pint.UnitRegistry
        The registry every quantity of :mod:`joulebook.faces.api` belongs to; the worksheet's unit
        parsing reads the same one.

    References
    ----------
    .. [1] pint documentation, *Defining units*, https://pint.readthedocs.io.

    Examples
    --------
    >>> ureg = registry()
    >>> round(ureg.Quantity(1, "TR").to("kW").magnitude, 4)   # ton of refrigeration
    3.5169
    """
    return _ureg()


#: the atmosphere gauge pressures of the registry are read against (Pa); set_gauge_atmosphere
_GAUGE_ATMOSPHERE = [STANDARD_ATMOSPHERE]
#: gauge units of the registry and the absolute unit each counts in (as the worksheet's _GAUGE)
_PINT_GAUGE = {"Pag": "pascal", "kPag": "kilopascal", "MPag": "megapascal", "barg": "bar",
               "mbarg": "millibar", "psig": "psi"}  # fmt: skip


def _define_gauge(ureg: Any, atmosphere: float) -> None:
    """(Re)define the gauge units of *ureg* as offset units: absolute = gauge + atmosphere."""
    for name, unit in _PINT_GAUGE.items():
        scale = float(ureg.Quantity(1.0, unit).to("pascal").magnitude)
        ureg.define(f"{name} = {scale!r} * pascal; offset: {float(atmosphere)!r}")


def set_gauge_atmosphere(atmosphere: Any) -> float:
    r"""Set the atmosphere the registry's gauge units (barg, kPag, psig …) are read against.

    .. math:: P_{abs} = P_{gauge} + P_{atm}

    The default is the standard atmosphere, 101.325 kPa [1]_.  The setting applies to every
    conversion made afterwards (a quantity in barg keeps its gauge number; its absolute value
    follows the atmosphere in force).  Worksheet formulas are not affected: they state their
    own reference in the unit text (``kPag @ 95 kPa``).

    Parameters
    ----------
    atmosphere : float or pint.Quantity
        The local atmospheric pressure (Pa when a plain number), 50–110 kPa.

    Returns
    -------
    float
        The atmosphere in force before the call (Pa), to restore it later.

    Raises
    ------
    BadInput
        Not a number or not a pressure.
    OutOfRange
        Outside 50–110 kPa.

    References
    ----------
    .. [1] ISO 2533:1975, *Standard Atmosphere* (101.325 kPa at sea level).

    Examples
    --------
    >>> before = set_gauge_atmosphere(95_000.0)   # a site at about 550 m
    >>> registry().Quantity(0.0, "kPag").to("kPa")
    <Quantity(95.0, 'kilopascal')>
    >>> set_gauge_atmosphere(before)
    95000.0
    """
    if type(atmosphere).__module__.startswith("pint"):
        try:
            value = float(atmosphere.to("pascal").magnitude)
        except Exception:
            raise BadInput(f"atmosphere = {atmosphere} is not a pressure") from None
    else:
        try:
            value = float(atmosphere)
        except (TypeError, ValueError):
            raise BadInput(f"atmosphere = {atmosphere!r} is not a number (Pa)") from None
    if not 50_000.0 <= value <= 110_000.0:
        raise OutOfRange(f"atmosphere = {fmt_value(value)} Pa is outside 50–110 kPa")
    before = _GAUGE_ATMOSPHERE[0]
    with _UREG_LOCK:
        _GAUGE_ATMOSPHERE[0] = value
        if _UREG is not None:
            _define_gauge(_UREG, value)
    return before


#: units engineers use that pint lacks or spells otherwise [1]_ [2]_ [3]_
#:
#: .. [1] NIST SP 811 (2008), Appendix B: conventional inch of water (4 °C) 249.0889 Pa and
#:    the conventional millimetre, centimetre and metre of water on the same basis (1000 kg/m³
#:    under standard gravity 9.80665 m/s²), kilogram-force per square centimetre 98 066.5 Pa,
#:    Btu_IT, ton of refrigeration = 12,000 Btu_IT/h.
#: .. [2] ISO 13443:1996 (natural gas standard reference conditions: 15 °C, 101.325 kPa);
#:    DIN 1343 (normal conditions: 0 °C, 101.325 kPa).
#: .. [3] US gas industry standard cubic foot: 60 °F and 14.696 psia (101.325 kPa).
_DEFINITIONS = (
    "inch_water = 0.0254 * meter * 1000 * kilogram / meter ** 3 * 9.80665 * meter / second ** 2",
    "millimeter_water = 0.001 * meter * 1000 * kilogram / meter ** 3 * 9.80665 * meter / second ** 2",
    "centimeter_water = 0.01 * meter * 1000 * kilogram / meter ** 3 * 9.80665 * meter / second ** 2",
    "meter_water = meter * 1000 * kilogram / meter ** 3 * 9.80665 * meter / second ** 2",
    "MMBtu = 1e6 * Btu_it",
    "TR = 12000 * Btu_it / hour",
    # amounts of gas given as volumes at stated reference conditions (ideal gas)
    "scf = 101325 * pascal * foot ** 3 / (molar_gas_constant * 288.7055555555556 * kelvin)",
    "normal_cubic_meter = 101325 * pascal * meter ** 3 / (molar_gas_constant * 273.15 * kelvin)",
    "standard_cubic_meter = 101325 * pascal * meter ** 3 / (molar_gas_constant * 288.15 * kelvin)",
    "lbmol = 453.59237 * mol",
)

#: whole-unit spellings engineers type, matched without regard to case (a pressure's gauge or
#: absolute mark in brackets included)
_SPELLINGS = {
    "psi": "psi", "psia": "psia", "psig": "psig", "psi(a)": "psia", "psi(g)": "psig",
    "pa": "Pa", "pag": "Pag", "kpa": "kPa", "kpaa": "kPa", "kpag": "kPag", "kpa(a)": "kPa",
    "kpa(g)": "kPag", "mpa": "MPa", "mpaa": "MPa", "mpag": "MPag", "mpa(a)": "MPa",
    "mpa(g)": "MPag", "bar": "bar", "bara": "bar", "barg": "barg", "bar(a)": "bar",
    "bar(g)": "barg", "mbar": "mbar", "mbarg": "mbarg", "torr": "torr", "inh2o": "inch_water",
    "inhg": "inHg", "mmhg": "mmHg", "atm": "atm", "celsius": "degC", "fahrenheit": "degF",
    "kelvin": "K", "rankine": "degR", "mmbtu": "MMBtu", "tr": "TR", "scf": "scf",
    "mmh2o": "millimeter_water", "mmwc": "millimeter_water", "cmh2o": "centimeter_water",
    "mh2o": "meter_water", "mwc": "meter_water",
    "kg/cm2": "kgf/cm2", "kgf/cm2": "kgf/cm2", "kg/cm2a": "kgf/cm2", "kgf/cm2a": "kgf/cm2",
    "kg/cm2(a)": "kgf/cm2", "kgf/cm2(a)": "kgf/cm2", "kg/cm2g": "kgf/cm2g",
    "kgf/cm2g": "kgf/cm2g", "kg/cm2(g)": "kgf/cm2g", "kgf/cm2(g)": "kgf/cm2g",
    "kg/cm²": "kgf/cm2", "kgf/cm²": "kgf/cm2", "kg/cm²g": "kgf/cm2g", "kgf/cm²g": "kgf/cm2g",
}  # fmt: skip
#: spellings kept as typed (case matters: nm3 is cubic nanometres)
_EXACT_SPELLINGS = {"Nm3": "normal_cubic_meter", "Sm3": "standard_cubic_meter"}
_AMBIGUOUS = {
    "bbl": "bbl is ambiguous (31.5 or 42 US gallons): write oil_bbl (42 US gal) or "
    "liquid_bbl (31.5 US gal)",
}


def typed_spellings() -> tuple[str, ...]:
    """The units that the whole-unit spellings engineers type stand for, in the parser's form.

    Each spelling (``PSIG``, ``bar(g)``, ``kg/cm2g``, ``mmH2O``) is read as one of these, so
    the unit seed holds them all and a label naming one is read without pint.

    Returns
    -------
    tuple of str
        The units, sorted, e.g. ``'kgf/cm2g'``, ``'millimeter_water'``.

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> "millimeter_water" in typed_spellings() and "kgf/cm2g" in typed_spellings()
    True
    """
    return tuple(sorted({*_SPELLINGS.values(), *_EXACT_SPELLINGS.values()}))


def _spelled(raw: str) -> str:
    """An engineer's whole-unit spelling in the form the parser reads (PSIG → psig,
    bar(g) → barg, celsius → degC); any other text unchanged."""
    if raw in _EXACT_SPELLINGS:
        return _EXACT_SPELLINGS[raw]
    return _SPELLINGS.get(raw.replace(" ", "").lower(), raw)


# identifiers engineers type -> pint's spelling
_WORDS = {
    "C": "degC",
    "F": "degF",
    "R": "degR",
    "Ra": "degR",
    "degRa": "degR",
    "lbm": "lb",
    "Btu": "Btu_it",
    "BTU": "Btu_it",
    "btu": "Btu_it",
    "bara": "bar",
    "psia": "psi",
    "kPaa": "kPa",
    "MPaa": "MPa",
    "sec": "s",
    "hr": "hour",
    "cc": "cm**3",
    "Nm": "N*m",
    "cal": "cal_it",  # the International Table calorie, as Btu is (cal_th when written)
    "kcal": "kcal_it",
    "oil_bbl": "oil_barrel",
    "liquid_bbl": "barrel",
}
_GAUGE = {
    "Pag": "Pa", "kPag": "kPa", "MPag": "MPa", "barg": "bar", "mbarg": "mbar", "psig": "psia",
    "kgf/cm2g": "kgf/cm2",
}  # fmt: skip
#: a whole unit that names no absolute pressure: refused for one, read as a difference
_DIFFERENCE_ONLY = {"psi": "psia (absolute) or psig (gauge)"}
_ABS_TEMPS = {"K": "K", "degC": "degC", "degF": "degF", "degR": "degR", "kelvin": "K"}
_DELTA = {"degC": "delta_degC", "degF": "delta_degF"}
_IDENT = re.compile(r"[A-Za-z_][A-Za-z_]*")
_ATM = re.compile(r"^(?P<unit>[^@]+?)\s*@\s*(?P<num>[-+0-9.eE]+)\s*(?P<au>[A-Za-z]+)\s*$")


_DEG_WORD = re.compile(r"(?i)(?<![A-Za-z])deg(?:rees?)?\.?\s*([cfrk])(?![A-Za-z])")
_DEG_SIGN = re.compile(r"[°º]\s+([CFRK])(?![A-Za-z])")
#: a temperature glued to the mass or amount it divides: kJ/kgK, Btu/lbmR, kJ/kmolK
_GLUED_TEMP = re.compile(r"(?<![A-Za-z])(k?g|lbm?|k?mol)(K|C|F|R|deg[CFR])(?![A-Za-z])")


def _clean(text: str) -> str:
    t = text.strip()
    # "deg C", "deg. F", "degrees C", "° C": the degree written apart from its scale
    t = _DEG_WORD.sub(lambda m: "K" if m.group(1) in "kK" else "deg" + m.group(1).upper(), t)
    t = _DEG_SIGN.sub(r"°\1", t)
    for a, b in (
        ("°C", "degC"),
        ("ºC", "degC"),
        ("℃", "degC"),
        ("°F", "degF"),
        ("ºF", "degF"),
        ("°R", "degR"),
        ("°K", "K"),
        ("²", "**2"),
        ("³", "**3"),
        ("·", "*"),
        ("×", "*"),
        ("^", "**"),
    ):
        t = t.replace(a, b)
    return t


#: the longest unit text read: the unit parser (pint's) takes time growing with the square of
#: a long word's length, and no unit is written in more characters than this
MAX_UNIT_CHARS = 255


def _too_long(text: str) -> None:
    raise BadInput(
        f"unit text of {len(text):,} characters ({text[:20]!r}…); the limit is "
        f"{MAX_UNIT_CHARS} characters"
    )


def _to_pint(text: str, kind: str | None) -> str:
    """Rewrite an engineer's unit spelling into pint syntax."""
    if len(text.strip()) > MAX_UNIT_CHARS:
        _too_long(text.strip())
    t = _clean(text)
    t = _GLUED_TEMP.sub(r"\1*\2", t)
    # exponent glued to a unit: m3 -> m**3, ft3 -> ft**3, s2 -> s**2
    t = re.sub(r"([A-Za-z])(\d)", r"\1**\2", t)

    # kJ/kg.K, kJ/kg-K, Btu/lbm-R: everything after a single '/' is the denominator
    if t.count("/") == 1 and "(" not in t:
        num, den = t.split("/")
        den = re.sub(r"(?<=[A-Za-z0-9)])\s*[.\-*\s]\s*(?=[A-Za-z])", "*", den.strip())
        t = f"{num.strip()}/({den})" if "*" in den else f"{num.strip()}/{den}"
    else:
        t = re.sub(r"(?<=[A-Za-z])\.(?=[A-Za-z])", "*", t)

    single = _IDENT.fullmatch(t) is not None

    def word(m: re.Match) -> str:
        w = m.group(0)
        w = _WORDS.get(w, w)
        if w in _DELTA and not (single and kind == "temperature"):
            w = _DELTA[w]
        return w

    return _IDENT.sub(word, t)


@lru_cache(maxsize=4096)
def parse_unit(text: str, kind: str) -> Conv:
    r"""Parse *text* as a unit of quantity *kind* and return its cached SI map.

    .. math:: x_{SI} = x \cdot \mathrm{factor} + \mathrm{offset}

    Parameters
    ----------
    text : str
        Unit as typed, e.g. ``"degC"``, ``"kJ/kg.K"``, ``"m3"``, ``"psig"``,
        ``"kPag @ 95 kPa"``.
    kind : str
        One of :data:`KINDS`.

    Returns
    -------
    Conv
        ``si = value * factor + offset``.

    Raises
    ------
    BadInput
        Unknown unit, or a unit of another quantity (a pressure unit given for T).

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> parse_unit("kJ/kg.K", "specific_heat").factor
    1000.0
    >>> parse_unit("psig", "pressure").to_si(0.0)                 # gauge zero: 1 atm
    101325.0
    """
    if kind not in KINDS:
        raise BadInput(f"unknown quantity kind {kind!r}")
    raw = str(text).strip()
    if len(raw) > MAX_UNIT_CHARS:
        _too_long(raw)
    if raw == "" or raw in ("-", "1") and kind == "dimensionless":
        if kind == "dimensionless":
            return Conv(1.0, 0.0, "")
        raise BadInput(f"empty unit for {KIND_WORDS[kind]}")

    raw = _spelled(raw)
    for word in _IDENT.findall(raw):
        if word in _AMBIGUOUS:
            raise BadInput(f"unit {text!r}: {_AMBIGUOUS[word]}")
    # gauge pressure, optionally with its atmospheric reference
    atm = STANDARD_ATMOSPHERE
    m = _ATM.match(raw)
    base = raw
    if m:
        base = _spelled(m.group("unit").strip())
        try:
            num = float(m.group("num"))
        except ValueError:
            raise BadInput(f"atmospheric reference in unit {raw!r} is not a number") from None
        aconv = parse_unit(m.group("au"), "pressure")
        atm = aconv.to_si(num)
        if base not in _GAUGE:
            raise BadInput(
                f"unit {raw!r}: '@ reference' is only for gauge units (kPag, barg, psig)"
            )
        if not 50_000.0 <= atm <= 110_000.0:
            raise OutOfRange(
                f"atmospheric reference {fmt_value(num)} {m.group('au')} in {raw!r} is outside "
                "50–110 kPa"
            )
    if base in _GAUGE:
        if kind != "pressure":
            raise BadInput(f"unit {raw!r} is a gauge pressure, not a {KIND_WORDS[kind]} unit")
        c = parse_unit(_GAUGE[base], "pressure")
        return Conv(c.factor, atm, raw)

    if base in _DIFFERENCE_ONLY and kind == "pressure":
        raise BadInput(
            f"unit {text!r} is ambiguous for an absolute pressure: write "
            f"{_DIFFERENCE_ONLY[base]}; {base} is read only as a pressure difference"
        )
    if kind == "dimensionless":
        if base in ("%", "percent"):
            return Conv(0.01, 0.0, raw)
        raise BadInput(f"unit {raw!r} given for a dimensionless number (use no unit or %)")

    pint_text = _to_pint(base, kind)
    seeded = _SEED_CONVS.get((pint_text, kind))
    if seeded is not None:
        return Conv(seeded[0], seeded[1], raw)
    dim, want = _SEED_DIMS.get(pint_text), _SEED_DIMS.get(KINDS[kind][1])
    if dim is not None and want is not None and dim[0] != want[0]:
        _wrong_kind(raw, kind, dim[1])  # a unit of another quantity, refused as pint would
    factor, offset = _pint_conv(pint_text, kind, raw)
    return Conv(factor, offset, raw)


def known_unit(text: str, kind: str) -> Conv | None:
    """The conversion of *text* as a common unit of *kind*, or None — never loading pint.

    For reading a unit a worksheet label names (``Temperature (°F)``): only the units the
    seed holds (:mod:`.unitseed`) and the gauge units are known; any other word is None.

    Parameters
    ----------
    text : str
        A word that may be a unit.
    kind : str
        One of :data:`KINDS`.

    Returns
    -------
    Conv or None
        ``si = value * factor + offset``, or None when *text* is no common unit of *kind*.

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> known_unit("°F", "temperature").offset
    255.37222222222223
    >>> known_unit("points", "pressure") is None
    True
    """
    try:
        raw = _spelled(str(text).strip())
        if not raw or kind not in KINDS or kind == "dimensionless":
            return None
        if raw in _GAUGE:
            return parse_unit(raw, "pressure") if kind == "pressure" else None
        if (_to_pint(raw, kind), kind) in _SEED_CONVS:
            return parse_unit(raw, kind)
    except (BadInput, OutOfRange, ValueError, KeyError):
        return None
    return None


def _wrong_kind(raw: str, kind: str, dimension: str) -> None:
    """Refuse a unit of another quantity (*dimension*: pint's words for the unit's own)."""
    got = kind_of_unit(raw, _quiet=True)
    got_words = KIND_WORDS.get(got, dimension) if got else dimension
    raise BadInput(
        f"unit {raw!r} is a {got_words} unit; {KIND_WORDS[kind]} needs e.g. {_EXAMPLE_UNITS[kind]}"
    )


def _pint_conv(pint_text: str, kind: str, raw: str) -> tuple[float, float]:
    """(factor, offset) of a unit in pint's syntax by pint (what :mod:`.unitseed` holds for
    the common units); BadInput naming *raw* when it is not a unit of *kind*."""
    ureg = _ureg()
    try:
        q1 = ureg.Quantity(1.0, pint_text)
    except Exception:
        raise BadInput(f"unknown unit {raw!r} for {KIND_WORDS[kind]}") from None
    si_text, dim_text = KINDS[kind]
    want_dim = ureg.Quantity(1.0, dim_text).dimensionality
    if q1.dimensionality != want_dim:
        _wrong_kind(raw, kind, str(q1.dimensionality))
    try:
        if kind == "temperature":
            if pint_text not in _ABS_TEMPS:
                raise BadInput(
                    f"unit {raw!r} is not an absolute temperature unit (K, degC, degF, R)"
                )
            q0 = ureg.Quantity(0.0, pint_text).to("K").magnitude
            f = ureg.Quantity(1.0, _DELTA.get(pint_text, pint_text)).to("K").magnitude
            return float(f), float(q0)
        f = q1.to(si_text).magnitude
    except BadInput:
        raise
    except Exception:
        raise BadInput(f"unit {raw!r} cannot be converted to {si_text}") from None
    return _exact(float(f)), 0.0


def _exact(f: float) -> float:
    """A conversion factor with the last-bit noise of its arithmetic removed: a factor within
    4 units in the last place of a 12-digit decimal is that decimal (pint's 0.30479999999999996
    is the defined 0.3048 m/ft); any other factor (5/9) is kept as computed."""
    short = float(f"{f:.12g}")
    return short if abs(short - f) <= 4 * math.ulp(f) else f


_EXAMPLE_UNITS = {
    "temperature": "K, degC, degF, R",
    "temperature_difference": "K, degC, degF, R",
    "pressure": "Pa, kPa, MPa, bar, psia, kPag, barg, psig",
    "pressure_difference": "Pa, kPa, bar, psi, mmH2O",
    "specific_volume": "m3/kg, L/kg, ft3/lbm",
    "density": "kg/m3, lbm/ft3",
    "specific_energy": "J/kg, kJ/kg, Btu/lbm",
    "specific_entropy": "J/(kg*K), kJ/kg.K, kJ/(kg*degC), Btu/lbm-R",
    "specific_heat": "J/(kg*K), kJ/kg.K, kJ/(kg*degC), Btu/lbm-R",
    "volume": "m3, L, ft3, gal",
    "mass": "kg, g, t, lbm",
    "energy": "J, kJ, MJ, kWh, Btu",
    "power": "W, kW, hp",
    "molar_mass": "kg/kmol, g/mol",
    "time": "s, min, hour",
    "length": "m, mm, ft",
    "speed": "m/s, km/hour",
    "acceleration": "m/s2",
    "voltage": "V",
    "current": "A",
    "torque": "N*m, lbf*ft",
    "amount": "mol, kmol, lbmol, scf, Nm3, Sm3",
    "expansion_coefficient": "1/K, 1/degF",
    "compressibility": "1/Pa, 1/kPa, 1/bar, 1/psi",
    "joule_thomson": "K/kPa, K/bar, degF/psi",
    "heat_flux": "W/m2, kW/m2, Btu/(h*ft2)",
    "area": "m2, ft2",
    "heat_transfer_coefficient": "W/K, kW/K, Btu/(h*degF)",
    "modulus": "GPa, MPa, psi",
    "dynamic_viscosity": "Pa*s, mPa*s, cP, lbm/(ft*s)",
    "kinematic_viscosity": "m2/s, mm2/s, cSt, ft2/s",
    "thermal_conductivity": "W/(m*K), Btu/(h*ft*degF)",
    "surface_tension": "N/m, mN/m, lbf/ft",
    "volume_flow": "m3/s, m3/h, L/min, gal/min",
    "dimensionless": "no unit or %",
}


def kind_of_unit(text: str, _quiet: bool = False) -> str | None:
    """The quantity kind a unit string belongs to (temperature wins over difference).

    Parameters
    ----------
    text : str
        A unit as typed.

    Returns
    -------
    str or None
        A key of :data:`KINDS`.

    Raises
    ------
    BadInput
        Unknown unit, or one of no quantity joulebook converts.

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> kind_of_unit("Btu/lbm")
    'specific_energy'
    >>> kind_of_unit("degF")
    'temperature'
    """
    if len(str(text).strip()) > MAX_UNIT_CHARS:
        if _quiet:
            return None
        _too_long(str(text).strip())
    raw = _spelled(str(text).strip())
    for word in _IDENT.findall(raw):
        if word in _AMBIGUOUS and not _quiet:
            raise BadInput(f"unit {text!r}: {_AMBIGUOUS[word]}")
    atm = _ATM.match(raw)
    base = atm.group("unit").strip() if atm else raw
    if base in _GAUGE:
        return "pressure"
    try:
        seeded = _SEED_KINDS.get(_to_pint(base, "temperature"))
    except Exception:
        seeded = None
    if seeded is not None:
        return seeded
    return _pint_kind(base, raw, _quiet)


def _pint_kind(base: str, raw: str, _quiet: bool) -> str | None:
    """kind_of_unit by pint (what :mod:`.unitseed` holds for the common units)."""
    ureg = _ureg()
    try:
        pint_text = _to_pint(base, "temperature")
        dim = ureg.Quantity(1.0, pint_text).dimensionality
    except Exception:
        if _quiet:
            return None
        raise BadInput(f"unknown unit {raw!r}") from None
    for kind, (_si, dim_text) in KINDS.items():
        if kind in ("temperature_difference", "pressure_difference"):
            continue
        if dim_text and ureg.Quantity(1.0, dim_text).dimensionality == dim:
            return kind
    if _quiet:
        return None
    raise BadInput(f"unit {raw!r} is not a quantity joulebook converts")


# ---------------------------------------------------------------------------------------
# unit systems


@dataclass(frozen=True, eq=False)
class UnitSystem:
    """Default unit of every quantity kind, named by its key units.

    Instances come from the cached :func:`unit_system`, so identity is equality (and hashing
    is cheap, which matters: systems key several caches on the hot path).

    Parameters
    ----------
    name : str
        The text it was parsed from (``"degC-bar-kJ"``).
    units : tuple of (str, str)
        ``(kind, unit text)`` pairs, one per kind of :data:`KINDS`.

    References
    ----------
    .. [1] docs/units.md (the unit systems and their defaults).

    Examples
    --------
    >>> unit_system("degF-psia-Btu").unit("specific_energy")
    'Btu/lbm'
    """

    name: str
    units: tuple[tuple[str, str], ...]  # (kind, unit text)

    def unit(self, kind: str) -> str:
        """The default unit text of quantity *kind* in this system."""
        return dict(self.units)[kind]

    def conv(self, kind: str) -> Conv:
        """The cached SI map (:class:`Conv`) of the default unit of *kind*."""
        return _system_convs(self)[kind]


@lru_cache(maxsize=256)
def _system_convs(system: UnitSystem) -> dict[str, Conv]:
    return {kind: parse_unit(unit, kind) for kind, unit in system.units}


_SI_DEFAULTS = {
    "temperature": "K",
    "temperature_difference": "K",
    "pressure": "Pa",
    "pressure_difference": "Pa",
    "specific_volume": "m3/kg",
    "density": "kg/m3",
    "specific_energy": "J/kg",
    "specific_entropy": "J/(kg*K)",
    "specific_heat": "J/(kg*K)",
    "volume": "m3",
    "mass": "kg",
    "energy": "J",
    "power": "W",
    "molar_mass": "kg/kmol",
    "time": "s",
    "length": "m",
    "speed": "m/s",
    "acceleration": "m/s2",
    "voltage": "V",
    "current": "A",
    "torque": "N*m",
    "amount": "mol",
    "expansion_coefficient": "1/K",
    "compressibility": "1/Pa",
    "joule_thomson": "K/Pa",
    "heat_flux": "W/m2",
    "area": "m2",
    "heat_transfer_coefficient": "W/K",
    "modulus": "Pa",
    "volume_flow": "m3/s",
    "dynamic_viscosity": "Pa*s",
    "kinematic_viscosity": "m2/s",
    "thermal_conductivity": "W/(m*K)",
    "surface_tension": "N/m",
    "dimensionless": "",
}

_DELTA_OF = {"K": "K", "kelvin": "K", "degC": "K", "degF": "R", "degR": "R"}


def _difference_unit(p_unit: str) -> str:
    """The unit of a pressure difference that goes with a pressure unit: its scale without
    the gauge or absolute mark (psia, psig -> psi; barg -> bar)."""
    base = _GAUGE.get(_spelled(p_unit), _spelled(p_unit))
    return {"psia": "psi"}.get(base, base)


def _energy_family(energy_unit: str) -> dict[str, str]:
    """Mass-based units that go with an energy unit."""
    if energy_unit.lower() in ("btu", "btu_it"):
        return {
            "mass": "lbm", "volume": "ft3", "length": "ft", "time": "s", "speed": "ft/s",
            "acceleration": "ft/s2", "torque": "lbf*ft", "area": "ft2",
        }  # fmt: skip
    return {"mass": "kg", "volume": "m3", "length": "m", "time": "s"}


@lru_cache(maxsize=256)
def unit_system(text: str | None = None) -> UnitSystem:
    """Parse a unit-system text: a name such as ``degC-bar-kJ`` and/or overrides ``"P=psig"``.

    Parameters
    ----------
    text : str, optional
        ``K-kPa-kJ`` (the default when empty), ``K-Pa-J``, ``degC-bar-kJ``, ``degF-psia-Btu``,
        ``R-psia-Btu``, optionally followed by per-symbol overrides ``"P=psig, V=L"``.

    Returns
    -------
    UnitSystem
        The system, cached (the same object for the same text).

    Raises
    ------
    BadInput
        Unknown name part, unknown symbol in an override, or a unit of the wrong quantity.

    References
    ----------
    .. [1] docs/units.md (the unit systems and their defaults).

    Examples
    --------
    >>> s = unit_system("degC-bar-kJ, V=L")
    >>> s.unit("pressure"), s.unit("volume"), s.unit("specific_heat")
    ('bar', 'L', 'kJ/(kg*K)')
    """
    raw = DEFAULT_SYSTEM if text is None or str(text).strip() == "" else str(text).strip()
    parts = [p.strip() for p in re.split(r"[;,]", raw) if p.strip()]
    name_parts = [p for p in parts if "=" not in p]
    overrides = [p for p in parts if "=" in p]
    if len(name_parts) > 1:
        raise BadInput(f"units {raw!r}: give one system name (e.g. K-kPa-kJ) plus overrides P=…")
    name = name_parts[0] if name_parts else DEFAULT_SYSTEM
    toks = [t for t in name.split("-") if t]
    t_unit, p_unit, e_unit = "K", "kPa", "kJ"
    seen: set[str] = set()
    for tok in toks:
        k = kind_of_unit(tok, _quiet=True)
        if k is None and tok in _GAUGE:
            k = "pressure"
        if k not in ("temperature", "pressure", "energy") or k in seen:
            raise BadInput(
                f"units {raw!r}: part {tok!r} is not a temperature, pressure or energy unit; "
                "write e.g. K-kPa-kJ, degC-bar-kJ, degF-psia-Btu"
            )
        seen.add(k)
        if k == "temperature":
            parse_unit(tok, "temperature")
            t_unit = tok
        elif k == "pressure":
            p_unit = _spelled(tok)
            parse_unit(p_unit, "pressure")
        else:
            e_unit = tok
    fam = _energy_family(e_unit)
    m_unit, vol_unit = fam["mass"], fam["volume"]
    d_unit = _DELTA_OF[_to_pint(t_unit, "temperature")]
    units = dict(_SI_DEFAULTS)
    family: dict[str, str] = {
        k: fam[k] for k in ("speed", "acceleration", "torque", "area") if k in fam
    }
    units.update(
        {
            "temperature": t_unit,
            "temperature_difference": d_unit,
            "pressure": p_unit,
            "pressure_difference": _difference_unit(p_unit),
            "energy": e_unit,
            "mass": m_unit,
            "volume": vol_unit,
            "specific_volume": f"{vol_unit}/{m_unit}",
            "density": f"{m_unit}/{vol_unit}",
            "specific_energy": f"{e_unit}/{m_unit}",
            "specific_entropy": f"{e_unit}/({m_unit}*{d_unit})",
            "specific_heat": f"{e_unit}/({m_unit}*{d_unit})",
            "length": fam["length"],
            **family,
            "expansion_coefficient": f"1/{d_unit}",
            "compressibility": f"1/{_GAUGE.get(p_unit, p_unit)}",
            "joule_thomson": f"{d_unit}/{_GAUGE.get(p_unit, p_unit)}",
        }
    )
    if e_unit.lower() in ("btu", "btu_it"):
        units["power"] = "Btu/hour"
        units["heat_flux"] = "Btu/(hour*ft2)"
        units["heat_transfer_coefficient"] = "Btu/(hour*R)"
        units["modulus"] = "psi"
        units["volume_flow"] = "gal/min"
        units["dynamic_viscosity"] = "lbm/(ft*s)"
        units["kinematic_viscosity"] = "ft2/s"
        units["thermal_conductivity"] = "Btu/(hour*ft*R)"
        units["surface_tension"] = "lbf/ft"
    elif e_unit in ("kJ", "MJ"):
        units["power"] = "kW"
        units["heat_flux"] = "kW/m2"
        units["heat_transfer_coefficient"] = "kW/K"
        units["modulus"] = "GPa"
        units["volume_flow"] = "m3/h"
    for ov in overrides:
        sym, _, unit = (s.strip() for s in ov.partition("="))
        if sym not in SYMBOLS:
            raise BadInput(_unknown_override(raw, sym, unit))
        kind = SYMBOLS[sym]
        parse_unit(unit, kind)
        units[kind] = unit
    system = UnitSystem(raw, tuple(sorted(units.items())))
    _system_convs(system)  # validate every unit now
    return system


def _unknown_override(raw: str, sym: str, unit: str) -> str:
    """The message of an override whose symbol is unknown."""
    names = sorted(set(SYMBOLS) - {"Tsat", "Psat"}, key=str.lower)
    return _unknown_symbol(f"units {raw!r}: unknown symbol {sym!r} in override", sym, unit, names)


def _unknown_symbol(
    head: str, sym: str, unit: str | None, names: tuple[str, ...] | list[str]
) -> str:
    """*head* and the symbols: first those the user most likely means (those of the unit's
    quantity, those spelled alike), then the others, so that a message clipped to its
    length never loses the one needed."""
    import difflib

    kind = kind_of_unit(unit, _quiet=True) if unit else None
    likely = [n for n in names if SYMBOLS.get(n) == kind]
    likely += [
        n
        for n in difflib.get_close_matches(sym, names, n=4, cutoff=0.5)
        + [n for n in names if n.lower() == sym.lower()]
        if n not in likely
    ]
    rest = [n for n in names if n not in likely]
    if likely:
        return f"{head}; did you mean {' or '.join(likely)}? Others: {' '.join(rest)}"
    return f"{head}; use one of {' '.join(names)}"


# ---------------------------------------------------------------------------------------
# unit phrases


@dataclass(frozen=True)
class Phrase:
    """A parsed unit phrase such as ``"T in degC"``.

    Parameters
    ----------
    symbol : str
        The trade symbol (``T``, ``P``, ``h``, …; see :data:`SYMBOLS`).
    kind : str
        Its quantity kind.
    unit : str
        The unit as written (or the system's default).
    conv : Conv
        The unit's SI map.

    References
    ----------
    .. [1] docs/design.md §3 (units written in the formula).

    Examples
    --------
    >>> parse_phrase("T in degC").conv.to_si(25)
    298.15
    """

    symbol: str
    kind: str
    unit: str
    conv: Conv


_PHRASE = re.compile(
    r"^\s*(?P<sym>[A-Za-z][A-Za-z0-9_]*)\s*(?:(?:in|\[)\s*(?P<unit>.*?)\s*\]?)?\s*$"
)


@lru_cache(maxsize=4096)
def parse_phrase(text: str, system: UnitSystem | None = None, allowed: tuple = ()) -> Phrase:
    """Parse ``"<symbol> in <unit>"`` (or a bare symbol) into symbol, kind and SI map.

    Parameters
    ----------
    text : str
        ``"T in degC"``, ``"h in kJ/kg"``, ``"P [bar]"``, or a bare symbol ``"h"`` (the system's
        default unit).
    system : UnitSystem, optional
        The unit system of bare symbols (``K-kPa-kJ`` unless given).
    allowed : tuple of str
        The symbols accepted (any of :data:`SYMBOLS` when empty).

    Returns
    -------
    Phrase
        Symbol, kind, unit and SI map.

    Raises
    ------
    BadInput
        Unknown symbol, symbol not in *allowed*, or a unit of another quantity.

    References
    ----------
    .. [1] docs/design.md §3 (units written in the formula).

    Examples
    --------
    >>> p = parse_phrase("h")
    >>> p.symbol, p.unit
    ('h', 'kJ/kg')
    """
    if len(str(text)) > MAX_UNIT_CHARS + 64:  # a symbol, "in" and a unit at most
        raise BadInput(
            f"quantity text of {len(str(text)):,} characters ({str(text)[:20]!r}…); the "
            f"limit is {MAX_UNIT_CHARS + 64} characters"
        )
    system = system or unit_system(None)
    m = _PHRASE.match(str(text))
    if not m:
        raise BadInput(f"{text!r} is not a property phrase like 'T in degC' or 'h'")
    sym = m.group("sym")
    sym = _SYMBOL_ALIASES.get(sym, sym)
    if sym not in SYMBOLS or (allowed and sym not in allowed):
        head = f"unknown property {m.group('sym')!r} in {text!r}"
        names = allowed or tuple(SYMBOLS)
        raise BadInput(_unknown_symbol(head, m.group("sym"), m.group("unit"), names))
    kind = SYMBOLS[sym]
    unit = m.group("unit")
    if unit is None or unit == "":
        unit = system.unit(kind)
        conv = system.conv(kind)
    else:
        try:
            conv = parse_unit(unit, kind)
        except BadInput as e:
            raise BadInput(f"in {text!r}: {e.message}") from None
    return Phrase(sym, kind, unit, conv)


_SYMBOL_ALIASES = {
    "D": "rho",
    "density": "rho",
    "Cp": "cp",
    "Cv": "cv",
    "K": "k",
    "quality": "x",
    "X": "x",
    "gamma": "k",
    "p": "P",
    "t": "t",
}


def convert(value: Any, from_unit: str, to_unit: str) -> Any:
    """Convert *value* between two units of the same quantity.

    Temperatures convert as absolute temperatures (27 degC -> 300.15 K); write ``dT`` units
    as ``delta_degC`` or use the same unit on both sides for a difference.

    .. math:: x_2 = (x_1 f_1 + o_1 - o_2) / f_2

    Parameters
    ----------
    value : float or array_like
        The value in *from_unit*.
    from_unit, to_unit : str
        Units of one quantity.

    Returns
    -------
    float or numpy.ndarray
        The value in *to_unit*.

    Raises
    ------
    BadInput
        Units of different quantities, or an absolute temperature or pressure below zero.

    References
    ----------
    .. [1] NIST Special Publication 811 (2008), *Guide for the Use of the International System
       of Units*, Appendix B (conversion factors).

    Examples
    --------
    >>> convert(100, "psig", "kPa")
    790.8007293168364
    >>> convert(10, "delta_degC", "delta_degF")
    18.0
    """
    k1 = kind_of_unit(from_unit) or ""
    k2 = kind_of_unit(to_unit) or ""
    if k1 != k2:
        raise BadInput(
            f"cannot convert {from_unit!r} ({KIND_WORDS.get(k1, k1)}) to {to_unit!r} "
            f"({KIND_WORDS.get(k2, k2)})"
        )
    if k1 == "temperature" and any(
        str(u).strip().lower().startswith("delta_") for u in (from_unit, to_unit)
    ):
        # a temperature difference: a factor, no offset (delta_degC to delta_degF is 1.8)
        k1 = k2 = "temperature_difference"
    if k1 == "pressure" and any(
        _spelled(str(u).strip()) in _DIFFERENCE_ONLY for u in (from_unit, to_unit)
    ):
        # psi names no absolute pressure: a difference, converted by its factor alone
        k1 = k2 = "pressure_difference"
    c1 = parse_unit(from_unit, k1)
    c2 = parse_unit(to_unit, k2)
    si = c1.to_si(value)
    if k1 in ("temperature", "pressure") and np.any(np.asarray(si) < 0.0):
        edge = "absolute zero" if k1 == "temperature" else "a perfect vacuum"
        what = "temperature difference (delta_degC, delta_degF)" if k1 == "temperature" else ""
        tail = f"; convert a {what} instead" if what else ""
        raise BadInput(
            f"value = {value} {from_unit} is below {edge} ({c1.from_si(0.0):.6g} {from_unit})"
            f": no absolute {KIND_WORDS.get(k1, k1)} is below zero{tail}"
        )
    return c2.from_si(si)
