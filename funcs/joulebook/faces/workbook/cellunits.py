"""The unit of every cell of a workbook, and the formulas whose units do not agree.

Design §3 ("a verdict a checker can sign"): a formula cell passes only when its units are
consistent.  This module infers the unit of each cell and carries it through ordinary
formulas by dimension algebra:

- an **input cell** (a number) takes its unit from, first match wins, a unit cell to its
  right (``label | value | unit``), its label to the left (``Pressure [kPa]``,
  ``Suction (barg)``, ``Temperature, degC``, ``Heat in kJ``), the nearest text above it in
  its column (the column header);
- a **joulebook cell** takes the unit of its result from its call: the unit written in the
  wanted phrase (``"P2 in bar"``), else the default unit of its result's quantity in the
  call's unit system (its last argument, ``K-kPa-kJ`` when omitted);
- an **ordinary formula** combines its operands: ``+`` and ``-`` need the same dimension,
  scale and zero (gauge is not absolute; °C minus °C is a temperature interval, °C minus K
  is a slip; hp minus kW is a slip); ``*``, ``/`` and ``^`` combine dimensions; SUM, MIN,
  MAX, AVERAGE, IF, ROUND, ABS … keep their operands' common unit; a comparison needs the
  same unit on both sides.

Dimensions and scales come from pint through the unit seed (:mod:`joulebook.core.unitseed`), so
the common units never import pint; a unit outside the seed is "unit unknown", never
guessed.  A formula whose unit cannot be told (an unlabelled operand, a function this module
does not follow) gets no unit and no verdict.  The engine's hot path never comes here: only
``check`` and ``audit`` do.

Examples
--------
>>> u = unit_of_text("barg")
>>> u.text, u.offset
('barg', 101325.0)
>>> clash_of("+", unit_of_text("barg"), unit_of_text("kPa"))
'barg and kPa are different units (a gauge pressure is not an absolute one)'
>>> clash_of("-", unit_of_text("degC"), unit_of_text("degC")) is None
True
"""

from __future__ import annotations

import re
from bisect import bisect_left
from dataclasses import dataclass, replace
from functools import lru_cache

from joulebook.catalog import lookup
from joulebook.core.errors import JoulebookError
from joulebook.core.units import DEFAULT_SYSTEM, known_unit, unit_system

from .reader import Book, col_letters
from .refs import our_name, parse_ref, tokens

__all__ = [
    "Unit",
    "Clash",
    "CellUnits",
    "unit_of_text",
    "units_in_label",
    "format_unit",
    "number_format_units",
    "declared_units",
    "clash_of",
    "infer",
]

#: quantity kinds a unit named in a sheet is tried as, in order (temperature before its
#: difference: a label's "°C" is a temperature)
_KINDS = (
    "temperature",
    "pressure",
    "energy",
    "power",
    "volume",
    "mass",
    "length",
    "area",
    "time",
    "specific_energy",
    "specific_entropy",
    "specific_volume",
    "density",
    "speed",
    "volume_flow",
    "dynamic_viscosity",
    "kinematic_viscosity",
    "thermal_conductivity",
    "heat_flux",
    "heat_transfer_coefficient",
    "molar_mass",
    "torque",
    "voltage",
    "current",
    "temperature_difference",
    "pressure_difference",
)
_GAUGE_NOTE = "a gauge pressure is not an absolute one"
_DEPTH = 200  # formula chains followed this deep; deeper cells get no unit


@dataclass(frozen=True)
class Unit:
    """The unit of a cell: dimension, scale and zero, and where it was read.

    ``SI = value * factor + offset``.  ``factor`` None: the dimension is known but not the
    scale (a value multiplied by a typed number); ``offset`` None: the zero is not known (a
    typed number added).  ``interval`` marks a difference of temperatures or of gauge
    pressures (its zero is 0 whatever the scale's zero).
    """

    text: str
    dims: tuple
    factor: float | None = 1.0
    offset: float | None = 0.0
    interval: bool = False
    source: str = ""

    def shown(self) -> str:
        """The unit as a checker reads it (Δ before an interval of a scale with its own
        zero: Δ°C, Δbarg)."""
        own_zero = self.text.lower() not in ("k", "r", "degr", "kelvin")
        return ("Δ" if self.interval and own_zero else "") + self.text


@dataclass(frozen=True)
class Clash:
    """Units that do not agree in one formula cell: what, both units and their sources."""

    cell: tuple[str, int, int]
    text: str


@dataclass
class CellUnits:
    """The inferred unit of each cell, the clashes, and the cells whose label names a unit
    joulebook does not know."""

    units: dict
    clashes: dict
    unknown: dict


# ---------------------------------------------------------------------------------------
# units named in a sheet


@lru_cache(maxsize=1)
def _kind_dims() -> dict[str, tuple]:
    from joulebook.core.unitseed import CONVS, DIMS

    out: dict[str, tuple] = {}
    for unit, kind in CONVS:
        if unit in DIMS:
            out.setdefault(kind, DIMS[unit][0])
    return out


@lru_cache(maxsize=1024)
def unit_of_text(text: str) -> Unit | None:
    """The :class:`Unit` of a unit as written in a sheet (``kPa``, ``barg``, ``°C``), or
    None when it names no common unit (never pint: only the seeded units and the gauge
    units are known).

    Examples
    --------
    >>> unit_of_text("hp").factor
    745.6998715822701
    >>> unit_of_text("furlongs") is None
    True
    """
    word = text.strip()
    if not word or len(word) > 24:
        return None
    dims = _kind_dims()
    for kind in _KINDS:
        conv = known_unit(word, kind)
        if conv is not None and kind in dims:
            return Unit(
                word,
                dims[kind],
                conv.factor,
                conv.offset,
                interval=kind in ("temperature_difference", "pressure_difference"),
            )
    return None


# a unit written in a label: in brackets or parentheses, after " in ", after a comma/colon
_BRACKETED = re.compile(r"[\[(]\s*([^\[\]()]{1,24}?)\s*[\])]")
_AFTER_IN = re.compile(r"\bin\s+([^\s,;:()\[\]]{1,16})\s*$")
_AFTER_COMMA = re.compile(r"[,:]\s*([^\s,;:()\[\]]{1,16})\s*(?:$|[(\[])")
_GAUGE_WORDS = re.compile(r"\b(gauge|gage)\b|\(g\)", re.IGNORECASE)
_NOT_UNITS = {"abs", "absolute", "gauge", "g", "a", "est", "estimated", "approx", "max", "min"}


def units_in_label(label: str) -> tuple[list[str], bool]:
    """Unit words a label writes (bracketed, after ``in``, after a comma) and whether one
    was bracketed (a bracketed word is meant as a unit: unknown there is "unit unknown").

    Examples
    --------
    >>> units_in_label("Suction pressure (barg)")
    (['barg'], True)
    >>> units_in_label("Motor power, hp")
    (['hp'], False)
    """
    out, bracketed = [], False
    for m in _BRACKETED.finditer(label):
        word = m.group(1).strip()
        if word.lower() not in _NOT_UNITS and not word.replace(".", "").isdigit():
            out.append(word)
            bracketed = True
    for rx in (_AFTER_IN, _AFTER_COMMA):
        m = rx.search(label)
        if m and m.group(1).lower() not in _NOT_UNITS:
            out.append(m.group(1))
    return out, bracketed


def _label_unit(label: str, source: str) -> tuple[Unit | None, str]:
    """(unit, "") from a label, (None, word) when it brackets a unit joulebook does not
    know, (None, "") when it names none."""
    words, bracketed = units_in_label(label)
    for w in words:
        u = unit_of_text(w)
        if u is not None:
            if (
                not u.offset
                and u.dims == _kind_dims().get("pressure")
                and _GAUGE_WORDS.search(label)
            ):  # "kPa (gauge)": the gauge unit
                u = unit_of_text(w + "g") or u
            return replace(u, source=source), ""
    if bracketed and words:
        return None, words[0]
    return None, ""


# ---------------------------------------------------------------------------------------
# the algebra


def _same_scale(a: Unit, b: Unit) -> bool:
    if a.factor is None or b.factor is None:
        return True
    return abs(a.factor / b.factor - 1.0) < 1e-9


def _same_zero(a: Unit, b: Unit) -> bool:
    if a.offset is None or b.offset is None or a.interval or b.interval:
        return True
    return abs(a.offset - b.offset) <= 1e-9 * max(1.0, abs(a.offset), abs(b.offset))


def clash_of(op: str, a: Unit, b: Unit) -> str | None:
    """Why *a* ``op`` *b* mixes units (``+``, ``-``, a comparison, or ``,`` for the
    operands of SUM/MIN/MAX …), or None when they agree.

    Examples
    --------
    >>> clash_of("-", unit_of_text("hp"), unit_of_text("kW"))
    'hp and kW are different units (same dimension, another scale)'
    >>> clash_of("-", unit_of_text("degC"), unit_of_text("K"))
    'degC and K are different units (another zero)'
    """
    if a.dims != b.dims:
        return f"{a.shown()} and {b.shown()} are not the same dimension"
    if not _same_zero(a, b):
        gauge = a.dims == _kind_dims().get("pressure")
        why = _GAUGE_NOTE if gauge else "another zero"
        return f"{a.text} and {b.text} are different units ({why})"
    if not _same_scale(a, b):
        return f"{a.text} and {b.text} are different units (same dimension, another scale)"
    return None


def _add(op: str, a: Unit, b: Unit) -> Unit:
    """The unit of a ± b when they agree (a difference of two absolutes is an interval)."""
    if op == "-" and not a.interval and not b.interval and a.offset is not None:
        return replace(a, offset=0.0, interval=True, source="")
    if a.interval and not b.interval:
        return replace(b, source="")
    return replace(a, source="")


def _mul(op: str, a: Unit, b: Unit) -> Unit | None:
    if not (a.interval or not a.offset) or not (b.interval or not b.offset):
        return None  # °C or a gauge pressure multiplied: no unit told
    sign = 1 if op == "*" else -1
    dims: dict = dict(a.dims)
    for k, e in b.dims:
        dims[k] = dims.get(k, 0) + sign * e
    factor = None
    if a.factor is not None and b.factor is not None:
        factor = a.factor * b.factor if op == "*" else a.factor / b.factor
    text = f"{a.text}·{b.text}" if op == "*" else f"{a.text}/{b.text}"
    return Unit(text, tuple(sorted((k, e) for k, e in dims.items() if e)), factor, 0.0)


def _power(a: Unit, n: float) -> Unit | None:
    if a.offset and not a.interval:
        return None
    dims = tuple(sorted((k, e * n) for k, e in a.dims if e * n))
    factor = a.factor**n if a.factor is not None else None
    return Unit(f"{a.text}^{n:g}", dims, factor, 0.0)


_ONE = Unit("1", (), 1.0, 0.0)
_KEEP = {  # functions whose result has their operands' common unit: which arguments
    "SUM": None,
    "MIN": None,
    "MAX": None,
    "AVERAGE": None,
    "MEDIAN": None,
    "MINA": None,
    "MAXA": None,
    "ABS": (0,),
    "ROUND": (0,),
    "ROUNDUP": (0,),
    "ROUNDDOWN": (0,),
    "MROUND": (0,),
    "FLOOR": (0,),
    "CEILING": (0,),
    "IF": (1, 2),
    "IFERROR": (0, 1),
    "CHOOSE": None,  # its first argument is the index: handled below
}


@dataclass
class _Val:
    unit: Unit | None
    literal: bool = False  # a number typed into the formula
    text: str | None = None  # a text operand (a literal or one cell holding text)
    cells: tuple = ()  # the cells of a range operand (for SUM and its kin)


class _Formula:
    """A recursive-descent reading of one formula's tokens, giving its unit and clashes."""

    def __init__(self, inf: _Inference, key: tuple, toks: list, depth: int):
        self.inf, self.key, self.toks, self.i, self.depth = inf, key, toks, 0, depth
        self.clashes: list[str] = []

    def peek(self):
        return self.toks[self.i] if self.i < len(self.toks) else None

    def take(self):
        t = self.toks[self.i]
        self.i += 1
        return t

    # precedence: comparison < & < + - < * / < ^ < prefix < postfix
    def expr(self) -> _Val:
        left = self.concat()
        while (t := self.peek()) and t[1] == "OPERATOR-INFIX" and t[0] in _COMPARE:
            self.take()
            right = self.concat()
            self.agree(t[0], left, right)
            left = _Val(None)
        return left

    def concat(self) -> _Val:
        left = self.additive()
        while (t := self.peek()) and t[1] == "OPERATOR-INFIX" and t[0] == "&":
            self.take()
            self.additive()
            left = _Val(None)
        return left

    def additive(self) -> _Val:
        left = self.term()
        while (t := self.peek()) and t[1] == "OPERATOR-INFIX" and t[0] in "+-":
            self.take()
            right = self.term()
            left = self.plus(t[0], left, right)
        return left

    def term(self) -> _Val:
        left = self.power()
        while (t := self.peek()) and t[1] == "OPERATOR-INFIX" and t[0] in "*/":
            self.take()
            right = self.power()
            left = self.times(t[0], left, right)
        return left

    def power(self) -> _Val:
        left = self.prefix()
        while (t := self.peek()) and t[1] == "OPERATOR-INFIX" and t[0] == "^":
            self.take()
            right = self.prefix()
            n = self.number(right)
            if left.literal and right.literal:
                left = _Val(None, literal=True)
            elif left.unit is not None and n is not None:
                left = _Val(_power(left.unit, n))
            else:
                left = _Val(None)
        return left

    def prefix(self) -> _Val:
        t = self.peek()
        if t is not None and t[1] == "OPERATOR-PREFIX":
            self.take()
            return self.prefix()  # a sign keeps the unit
        v = self.primary()
        while (t := self.peek()) and t[1] == "OPERATOR-POSTFIX":
            self.take()
            if not v.literal:
                v = _Val(replace(v.unit, factor=None) if v.unit else None)
        return v

    def primary(self) -> _Val:
        t = self.peek()
        if t is None:
            return _Val(None)
        v, kind, sub = self.take()
        if kind == "OPERAND":
            if sub == "NUMBER":
                return _Val(None, literal=True, text=v)
            if sub == "TEXT":
                return _Val(None, text=v[1:-1].replace('""', '"'))
            if sub == "RANGE":
                return self.inf.operand(v, self.key, self.depth)
            return _Val(None)
        if kind == "PAREN" and sub == "OPEN":
            inner = self.expr()
            if self.peek() is not None and self.peek()[1] == "PAREN":
                self.take()
            return inner
        if kind == "FUNC" and sub == "OPEN":
            name = v[:-1].upper().removeprefix("_XLFN.")
            args = self.arguments("FUNC")
            return self.call(name, our_name(v), args)
        if kind == "ARRAY" and sub == "OPEN":
            self.arguments("ARRAY")
            return _Val(None)
        return _Val(None)

    def arguments(self, closer: str) -> list[_Val]:
        args: list[_Val] = []
        t = self.peek()
        if t is not None and t[1] == closer and t[2] == "CLOSE":
            self.take()
            return args
        while True:
            t = self.peek()
            if t is None:
                return args
            if t[1] == "SEP" or (t[1] == closer and t[2] == "CLOSE"):
                args.append(_Val(None))  # an empty argument
            else:
                args.append(self.expr())
            t = self.peek()
            if t is None:
                return args
            self.take()
            if t[1] == closer and t[2] == "CLOSE":
                return args

    # the rules
    def number(self, v: _Val) -> float | None:
        if v.literal and v.text is not None:
            try:
                return float(v.text)
            except ValueError:
                return None
        return None

    def agree(self, op: str, a: _Val, b: _Val) -> Unit | None:
        if a.unit is None or b.unit is None:
            return None
        why = clash_of(op, a.unit, b.unit)
        if why is not None:
            self.clashes.append(
                f"'{op}' between {a.unit.text} ({a.unit.source}) and {b.unit.text} "
                f"({b.unit.source}): {why}"
            )
            return None
        return a.unit

    def plus(self, op: str, a: _Val, b: _Val) -> _Val:
        if a.literal and b.literal:
            return _Val(None, literal=True)
        if a.literal or b.literal:  # a typed number added: the zero is no longer told
            u = b.unit if a.literal else a.unit
            return _Val(replace(u, offset=None, source="") if u is not None else None)
        if a.unit is None or b.unit is None:
            return _Val(None)
        if self.agree(op, a, b) is None:
            return _Val(None)
        return _Val(_add(op, a.unit, b.unit))

    def times(self, op: str, a: _Val, b: _Val) -> _Val:
        if a.literal and b.literal:
            return _Val(None, literal=True)
        if a.literal or b.literal:  # a typed factor: the dimension stays, the scale is not told
            u = b.unit if a.literal else a.unit
            if u is None:
                return _Val(None)
            if op == "/" and a.literal:
                return _Val(_power(replace(u, factor=None), -1))
            return _Val(replace(u, factor=None, offset=0.0 if u.interval else u.offset, source=""))
        if a.unit is None or b.unit is None:
            return _Val(None)
        return _Val(_mul(op, a.unit, b.unit))

    def call(self, name: str, ours: str | None, args: list[_Val]) -> _Val:
        if ours:
            return _Val(self.inf.call_unit(ours, args, self.clashes))
        if name not in _KEEP:
            return _Val(None)
        picked = args[1:] if name == "CHOOSE" else args
        which = _KEEP[name]
        if which is not None:
            picked = [args[i] for i in which if i < len(args)]
        units: list[Unit] = []
        for a in picked:
            if a.literal or (a.unit is None and a.text is not None):
                continue
            if a.cells:
                units += [u for u in a.cells if u is not None]
            elif a.unit is None:
                return _Val(None)  # an operand of no known unit: none told
            else:
                units.append(a.unit)
        if not units:
            return _Val(None)
        first = units[0]
        for u in units[1:]:
            if self.agree(",", _Val(first), _Val(u)) is None:
                return _Val(None)
        return _Val(first)


_COMPARE = {"<", ">", "<=", ">=", "=", "<>"}


_MAIN = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
_QUOTED = re.compile(r'"([^"]{1,24})"')


def format_unit(code: str) -> str | None:
    """The unit a number format writes after the number (``0.0 "bar"`` → ``bar``): the
    quoted text of its first (positive) section, or None.

    Examples
    --------
    >>> format_unit('#,##0.0 "kPa";-#,##0.0 "kPa"')
    'kPa'
    >>> format_unit("0.00") is None
    True
    """
    first = code.split(";", 1)[0]
    words = [w.strip() for w in _QUOTED.findall(first) if w.strip()]
    return words[-1] if words else None


def number_format_units(book: Book) -> dict:
    """The unit each cell's number format writes, keyed (sheet, row, col): read from the
    package's styles and, only when a style writes a unit, the cells' style indexes."""
    import zipfile

    from defusedxml import ElementTree as SafeET

    try:
        zf = zipfile.ZipFile(book.path)
    except (OSError, zipfile.BadZipFile):
        return {}
    out: dict = {}
    with zf:
        try:
            root = SafeET.fromstring(zf.read("xl/styles.xml"))
        except Exception:
            return {}
        codes = {}
        for nf in root.iter(_MAIN + "numFmt"):
            unit = format_unit(nf.get("formatCode", ""))
            if unit:
                codes[nf.get("numFmtId")] = unit
        xfs = root.find(_MAIN + "cellXfs")
        styled = {}
        for i, xf in enumerate(xfs if xfs is not None else ()):
            if xf.get("numFmtId") in codes:
                styled[str(i)] = codes[xf.get("numFmtId")]
        if not styled:
            return {}  # no style writes a unit: the sheets are not read again
        from .reader import split_ref

        for sheet, part in book.sheet_parts.items():
            try:
                fh = zf.open(part)
            except KeyError:
                continue
            with fh:
                for _ev, el in SafeET.iterparse(fh, events=("end",)):
                    if el.tag == _MAIN + "c":
                        st = el.get("s")
                        if st in styled and el.get("r"):
                            out[(sheet, *split_ref(el.get("r")))] = styled[st]
                        el.clear()
    return out


class _Inference:
    def __init__(self, book: Book, values: dict, formats: dict | None = None):
        self.book, self.values = book, values
        self.formats = formats or {}
        self.units: dict = {}
        self.clashes: dict = {}
        self.unknown: dict = {}
        self.busy: set = set()
        self._declared: dict = {}
        self._columns: dict | None = None  # (sheet, col) -> rows holding text, sorted

    # where a cell's unit is written
    def _text_at(self, sheet: str, r: int, c: int) -> str | None:
        cell = self.book.cells.get((sheet, r, c))
        if cell is None or cell.formula is not None and not isinstance(cell.cached, str):
            return None
        v = self.values.get((sheet, r, c), cell.cached)
        return v.strip() if isinstance(v, str) and v.strip() else None

    def _texts_above(self, sheet: str, r: int, c: int) -> tuple[int, str] | None:
        """(row, text) of the nearest text above (sheet, r, c) in its column, or None."""
        if self._columns is None:
            cols: dict = {}
            for k, cell in self.book.cells.items():
                v = self.values.get(k, cell.cached)
                if isinstance(v, str) and v.strip():
                    cols.setdefault((k[0], k[2]), []).append(k[1])
            self._columns = {k: sorted(rows) for k, rows in cols.items()}
        rows = self._columns.get((sheet, c))
        if not rows:
            return None
        i = bisect_left(rows, r)
        if i == 0:
            return None
        rr = rows[i - 1]
        text = self._text_at(sheet, rr, c)
        return (rr, text) if text is not None else None

    def declared(self, key) -> Unit | None:
        """The unit a cell's neighbours write for it (unit column, label, header)."""
        if key in self._declared:
            return self._declared[key]
        sheet, r, c = key
        u: Unit | None = None
        fmt_unit = self.formats.get(key)
        if fmt_unit is not None:  # the number format writes it: 0.0 "bar"
            u = unit_of_text(fmt_unit)
            if u is not None:
                u = replace(u, source=f"number format of {col_letters(c)}{r} ('{fmt_unit}')")
            else:
                self.unknown[key] = f"the number format of {col_letters(c)}{r} writes '{fmt_unit}'"
        right = self._text_at(sheet, r, c + 1) if u is None and key not in self.unknown else None
        if right is not None and len(right) <= 16 and " " not in right.strip("[]() "):
            word = right.strip("[]() ")
            u = unit_of_text(word)
            if u is not None:
                u = replace(u, source=f"unit cell {col_letters(c + 1)}{r}")
            elif right.startswith(("[", "(")) and not word.replace(".", "").isdigit():
                self.unknown[key] = f"the unit cell {col_letters(c + 1)}{r} says '{word}'"
        if u is None and key not in self.unknown:
            text = self._text_at(sheet, r, c - 1) if c > 1 else None
            if text is not None:  # the label just left of the value
                u, bad = _label_unit(text, f"label {col_letters(c - 1)}{r} '{text[:40]}'")
                if bad:
                    self.unknown[key] = f"the label {col_letters(c - 1)}{r} names '{bad}'"
        if u is None and key not in self.unknown:
            above = self._texts_above(sheet, r, c)
            if above is not None:  # the nearest text above: the column header
                rr, text = above
                u, bad = _label_unit(text, f"header {col_letters(c)}{rr} '{text[:40]}'")
                if bad:
                    self.unknown[key] = f"the header {col_letters(c)}{rr} names '{bad}'"
        self._declared[key] = u
        return u

    def unit(self, key, depth: int) -> Unit | None:
        cell = self.book.cells.get(key)
        if cell is None:
            return None
        v = self.values.get(key, cell.cached)
        if isinstance(v, (str, bool, tuple)) or v is None:
            return None
        if cell.formula is None:
            return self.declared(key)
        if key not in self.units:
            self.formula(key, depth + 1)
        return self.units.get(key)

    def formula(self, key, depth: int = 0) -> None:
        if key in self.units or key in self.busy or depth > _DEPTH:
            return
        cell = self.book.cells[key]
        self.busy.add(key)
        try:
            toks = [t for t in tokens(cell.formula or "") if t[1] != "WHITE-SPACE"]
        except Exception:
            toks = []
        inferred = None
        clashes: list[str] = []
        if toks:
            f = _Formula(self, key, toks, depth)
            try:
                inferred = f.expr().unit
            except (IndexError, TypeError, ValueError):
                inferred = None
            clashes = f.clashes
        self.busy.discard(key)
        own = self.declared(key)
        if inferred is not None and own is not None:
            why = _contradicts(inferred, own)
            if why:
                clashes.append(
                    f"the formula gives {inferred.shown()} but the cell's "
                    f"{own.source} says {own.text}: {why}"
                )
        if clashes:
            self.clashes[key] = "; ".join(dict.fromkeys(clashes))
        unit = inferred if inferred is not None else own
        if inferred is not None:  # where the unit came from, as a checker would look
            where = f"{col_letters(key[2])}{key[1]}"
            src = f"{where}: {inferred.source}" if inferred.source else f"formula {where}"
            unit = replace(inferred, source=src)
        self.units[key] = unit

    def operand(self, text: str, key, depth: int) -> _Val:
        sheet = key[0]
        ref = parse_ref(text)
        if ref is not None and ref.kind == "name":
            target = self.book.local_names.get((sheet, ref.text.upper())) or self.book.names.get(
                ref.text
            )
            ref = parse_ref(target) if isinstance(target, str) else None
        if ref is None or ref.book is not None or ref.sheet2:
            return _Val(None)
        s = ref.sheet or sheet
        if ref.kind == "cell":
            k = (s, ref.r1, ref.c1)
            v = self.values.get(k)
            if isinstance(v, str):
                return _Val(None, text=v)
            return _Val(self.unit(k, depth))
        if ref.kind == "area":
            r1, r2 = sorted((ref.r1, ref.r2))
            c1, c2 = sorted((ref.c1, ref.c2))
            if (r2 - r1 + 1) * (c2 - c1 + 1) > 4096:
                return _Val(None)
            cells = tuple(
                self.unit((s, r, c), depth)
                for r in range(r1, r2 + 1)
                for c in range(c1, c2 + 1)
                if isinstance(self.values.get((s, r, c)), float)
            )
            if any(u is None for u in cells):
                return _Val(None)  # a value of no known unit in the range: none told
            return _Val(None, cells=cells)
        return _Val(None)

    def call_unit(self, name: str, args: list[_Val], clashes: list[str]) -> Unit | None:
        """A joulebook call's result unit: the wanted phrase's unit, else the result
        quantity's unit in the call's unit system.  An argument whose cell holds another
        unit than the call reads it in is added to *clashes*."""
        try:
            f = lookup(name)
        except JoulebookError:
            return None
        names = [a.name for a in f.all_args]
        given = {n: a for n, a in zip(names, args)}
        system_text = given.get("units")
        text = system_text.text if system_text is not None else None
        try:
            system = unit_system(text if isinstance(text, str) and text else None)
        except JoulebookError:
            return None
        clashes += _argument_clashes(f, given, system, text or DEFAULT_SYSTEM)
        if f.result == "asked":
            want = given.get("want")
            phrase = want.text if want is not None else None
            if not isinstance(phrase, str) or " in " not in phrase:
                return None
            u = unit_of_text(phrase.split(" in ", 1)[1])
            return replace(u, source=f"{name}'s phrase '{phrase}'") if u else None
        if f.result in ("text", "number"):
            return None
        try:
            unit_text = system.unit(f.result)
        except KeyError:
            return None
        u = unit_of_text(unit_text)
        if u is None:
            return None
        return replace(u, source=f"{name} in {text or DEFAULT_SYSTEM}")


#: a value argument and the phrase argument that names its unit ("T in degC", value)
_SPEC_OF = {"value1": "spec1", "value2": "spec2", "value": "given", "end_value": "end_spec"}


def _argument_clashes(f, given: dict, system, system_text: str) -> list[str]:
    """Arguments of a joulebook call whose cells hold another unit than the call reads them
    in: the unit system's unit of the argument's quantity, or its phrase's unit."""
    out = []
    for a in f.args:
        v = given.get(a.name)
        if v is None or v.literal:
            continue
        have = v.unit if v.unit is not None else (v.cells[0] if v.cells else None)
        if have is None:
            continue
        if a.quantity:
            try:
                unit_text = system.unit(a.quantity)
            except KeyError:
                continue
            how = f"{f.name} reads {a.name} in {unit_text} ({system_text})"
        elif a.name in _SPEC_OF:
            spec = given.get(_SPEC_OF[a.name])
            phrase = spec.text if spec is not None else None
            if not isinstance(phrase, str) or " in " not in phrase:
                continue
            unit_text = phrase.split(" in ", 1)[1].strip()
            how = f"{f.name} reads {a.name} as '{phrase}'"
        else:
            continue
        want = unit_of_text(unit_text)
        if want is None:
            continue
        if a.quantity == "temperature_difference" or want.interval:
            have = replace(have, interval=True)  # a difference: scale only, not the zero
        why = clash_of(",", have, want)
        if why is not None:
            out.append(f"{how}, but it holds {have.text} ({have.source}): {why}")
    return out


def _contradicts(inferred: Unit, own: Unit) -> str | None:
    if inferred.dims != own.dims:
        return "not the same dimension"
    if not inferred.interval and not _same_zero(inferred, own):
        return _GAUGE_NOTE if own.dims == _kind_dims().get("pressure") else "another zero"
    if not _same_scale(inferred, own):
        return "same dimension, another scale"
    return None


def declared_units(book: Book, values: dict):
    """``unit(key) -> (unit text, where it came from)`` of a cell from what its neighbours
    write (number format, unit cell, label, header), ``("", "")`` when none: the audit's
    reading of the inputs it lists."""
    inf = _Inference(book, values, number_format_units(book))

    def unit(key) -> tuple[str, str]:
        u = inf.declared(key)
        return (u.text, u.source) if u is not None else ("", "")

    return unit


def infer(book: Book, values: dict, keys=None) -> CellUnits:
    """The unit of every formula cell of *book* (or of *keys*) and of the cells they read,
    the unit clashes of each formula cell, and the cells whose unit is unknown.

    *values* holds every cell's value (recomputed or saved).
    """
    inf = _Inference(book, values, number_format_units(book))
    todo = keys if keys is not None else [k for k, c in book.cells.items() if c.formula]
    for key in todo:
        inf.formula(key)
    return CellUnits(inf.units, inf.clashes, inf.unknown)
