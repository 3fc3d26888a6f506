"""The checker's audit: every formula cell of a workbook, explained and re-derived.

Every formula cell gets an entry: where it is and what it is called (the nearest label,
defined names), its formula, its inputs resolved (value, unit where the label or the formula
says it, source cell and its label), the formula with the numbers substituted, the recomputed
and the saved value with one truthful status, spilled results in full, and the flags a
checker raises by eye.  Each joulebook call in it — the whole formula or nested inside an
ordinary one — is explained as a sub-call: its arguments with units, the model behind it and
the working of its catalog entry (:mod:`joulebook.core.working`) with the numbers substituted.
The audit holds no per-function code: what a function reads, returns and how it is worked out
comes from its catalog entry.

Rendered as one self-contained HTML file from a Jinja2 template with autoescaping, and as JSON
for CI (``joulebook audit --json``, ``--fail-on-flags``).
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import re
from dataclasses import dataclass, field

import numpy as np

from joulebook.catalog import Func, lookup, working_call
from joulebook.core.errors import JoulebookError
from joulebook.core.units import parse_phrase, unit_system
from joulebook.core.version import __version__
from joulebook.core.working import work_out

from . import auditflags as eye
from .auditfig import figure, pretty_unit
from .calcmap import Node, calc_map
from .cellunits import declared_units
from .check import Row, compare, fmt, summary
from .engine import Engine
from .reader import Book, Cell, col_letters
from .refs import cell_refs, our_name, parse_ref, texts, tokens
from .status import STATUSES, Status
from .validity import violations

__all__ = ["Input", "Line", "SubCall", "Entry", "Audit", "build_audit", "render_html", "to_json"]

CAUTION = (
    "Results are engineering estimates. Pressure equipment, trapped liquid and stored energy "
    "are governed by the applicable codes and standards and by the judgement of a competent, "
    "licensed engineer; this report supports a check, it does not replace one."
)
#: the units the working is written in: coherent (kPa·m³ = kJ), so every line can be checked
WORKING_SYSTEM = "K-kPa-kJ"


@dataclass
class Input:
    name: str
    value: object
    unit: str
    source: str


@dataclass
class Line:
    """One line of a working: ``symbol = formula = substituted = value``."""

    symbol: str
    formula: str
    substituted: str
    value: str
    error: str = ""
    call: bool = False  # the line is one call of another catalog function


@dataclass
class SubCall:
    """One joulebook call in a cell: the whole formula, or nested inside it."""

    function: str
    text: str
    inputs: list[Input]
    result: object
    result_unit: str
    model: str
    working: list[Line]
    equation: str
    figure: str = ""
    figure_ref: str = ""  # "same path as Sheet!B6" when the figure was drawn there


@dataclass
class Entry:
    sheet: str
    cell: str
    label: str
    formula: str
    function: str  # the joulebook function the formula is, or "" for an ordinary formula
    inputs: list[Input]
    result: object
    result_unit: str
    model: str
    equation: str
    row: Row | None
    flags: list[str] = field(default_factory=list)
    figure: str = ""
    calls: list[SubCall] = field(default_factory=list)
    substituted: str = ""  # the formula with its cell references replaced by their values
    table: list[list[str]] = field(default_factory=list)  # a spilled result, row by row
    table_head: list[str] = field(default_factory=list)  # its column headings
    status: str = ""  # pass, differs, error, unsupported, not checked, circular, volatile …
    note: str = ""
    notes: list[str] = field(default_factory=list)  # what a checker should know; no mistake

    @property
    def anchor(self) -> str:
        return "c-" + re.sub(r"[^A-Za-z0-9]+", "-", f"{self.sheet}-{self.cell}")

    @property
    def key(self) -> tuple[str, int, int]:
        m = re.match(r"([A-Z]+)(\d+)$", self.cell)
        assert m
        from .refs import col_number

        return (self.sheet, int(m.group(2)), col_number(m.group(1)))


@dataclass
class Audit:
    book: Book
    entries: list[Entry]
    rows: list[Row]
    summary: dict
    caution: bool
    generated: str
    library: str
    maps: dict[str, str] = field(default_factory=dict)  # sheet -> SVG

    @property
    def flags(self) -> list[tuple[Entry, str]]:
        return [(e, f) for e in self.entries for f in e.flags]


# ---------------------------------------------------------------------------------------
# labels, references and values


def _label(book: Book, sheet: str, row: int, col: int) -> str:
    """The nearest text to the left in the row, else above in the column."""
    for c in range(col - 1, max(0, col - 6), -1):
        cell = book.cells.get((sheet, row, c))
        if cell and cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
    for r in range(row - 1, max(0, row - 4), -1):
        cell = book.cells.get((sheet, r, col))
        if cell and cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
    return ""


def _names_for(book: Book, sheet: str, ref: str) -> list[str]:
    out = []
    for name, target in book.names.items():
        r = _one_ref(target.lstrip("="))
        if r is not None and r.kind == "cell" and (r.sheet or "").upper() == sheet.upper():
            if f"{col_letters(r.c1)}{r.r1}" == ref:
                out.append(name)
    return out


def _where(key) -> str:
    return f"{key[0]}!{col_letters(key[2])}{key[1]}"


def _one_ref(text: str):
    """The reference *text* is, when it is one reference and nothing else."""
    try:
        toks = [t for t in tokens(text) if t[1] != "WHITE-SPACE"]
    except Exception:
        return None
    if len(toks) != 1 or toks[0][1:] != ("OPERAND", "RANGE"):
        return None
    return parse_ref(toks[0][0])


def _calls(formula: str) -> list[tuple[str, list[str], str]]:
    """Every joulebook call in *formula*, outer before inner: (name, argument texts, text)."""
    try:
        items = tokens(formula)
    except Exception:
        return []
    out = []
    for i, (v, t, sub) in enumerate(items):
        if t != "FUNC" or sub != "OPEN":
            continue
        name = our_name(v.replace(" ", ""))
        if not name:
            continue
        args, cur, depth, text = [], [], 0, [v]
        for v2, t2, s2 in items[i + 1 :]:
            text.append(v2)
            if t2 == "FUNC" and s2 == "OPEN":
                depth += 1
            elif t2 == "FUNC" and s2 == "CLOSE":
                if depth == 0:
                    args.append("".join(cur).strip())
                    break
                depth -= 1
            elif t2 == "SEP" and s2 == "ARG" and depth == 0:
                args.append("".join(cur).strip())
                cur = []
                continue
            cur.append(v2)
        if args == [""]:
            args = []
        out.append((name, args, "".join(text)))
    return out


def _resolve_arg(text: str, here: Cell, book: Book, values: dict, engine: Engine):
    """(value, source) of one argument text."""
    if text == "":
        return None, "omitted"
    if text.startswith('"') and text.endswith('"'):
        return text[1:-1].replace('""', '"'), "constant"
    try:
        return float(text), "constant"
    except ValueError:
        pass
    target, ref = None, _one_ref(text)
    if ref is not None and ref.kind == "name" and ref.text.upper() in book.names:
        ref = _one_ref(book.names[ref.text.upper()].lstrip("="))
    if ref is not None and ref.kind == "cell" and ref.book is None and not ref.sheet2:
        target = (ref.sheet or here.sheet, ref.r1, ref.c1)
    if ref is not None and ref.kind == "area" and ref.book is None and not ref.sheet2:
        sheet = ref.sheet or here.sheet
        n = (ref.r2 - ref.r1 + 1) * (ref.c2 - ref.c1 + 1)
        if n <= 100_000:
            nums = [
                float(x)
                for r in range(ref.r1, ref.r2 + 1)
                for k in range(ref.c1, ref.c2 + 1)
                if isinstance(x := values.get((sheet, r, k)), (int, float))
                and not isinstance(x, bool)
            ]
            return (nums or None), f"range {text}"
    if target is not None:
        v = values.get(target)
        src_cell = book.cells.get(target)
        kind = "formula" if src_cell is not None and src_cell.formula else "cell"
        lab = _label(book, *target)
        return v, f"{kind} {_where(target)}" + (f" ({lab})" if lab else "")
    try:
        v = engine.evaluate(here.sheet, here.row, here.col, text, values)
    except Exception:  # an argument the engine cannot evaluate on its own: show its text
        return None, f"expression {text}"
    if isinstance(v, np.ndarray) or (ref is not None and ref.kind == "area"):
        arr = np.asarray(v, dtype=object).reshape(-1)
        nums = [float(x) for x in arr if isinstance(x, (int, float)) and not isinstance(x, bool)]
        return (nums or None), f"range {text}"
    return v, f"expression {text}"


# ---------------------------------------------------------------------------------------
# one joulebook call


def _system(units_text):
    try:
        return unit_system(units_text if isinstance(units_text, str) and units_text else None)
    except JoulebookError:
        return unit_system(None)


_SPEC_OF = {"value1": "spec1", "value2": "spec2", "value": "given", "end_value": "end_spec"}


def _units_of(f: Func, argvals: dict, system) -> tuple[dict, dict, str]:
    """Unit text and units kind of every bound argument, and the unit of the result."""
    units: dict[str, str] = {}
    kinds: dict[str, str] = {}
    phrase_units: dict[str, str] = {}
    for a in f.all_args:
        v = argvals.get(a.name)
        if a.quantity:
            units[a.name] = system.unit(a.quantity) or ""
            kinds[a.name] = a.quantity
        elif a.type == "text" and isinstance(v, str) and " in " in v:
            phrase_units[a.name] = v.split(" in ", 1)[1].strip()
    for val_arg, spec_arg in _SPEC_OF.items():
        spec = argvals.get(spec_arg)
        if val_arg in argvals and isinstance(spec, str):
            sym, sep, unit = spec.partition(" in ")
            if val_arg == "end_value":  # 'T2 in degC': the end state's symbol
                spec = sym.strip().removesuffix("2") + sep + unit
            try:
                ph = parse_phrase(spec, system)
                units[val_arg] = ph.unit
                kinds[val_arg] = ph.kind
            except (JoulebookError, AttributeError):
                units[val_arg] = phrase_units.get(spec_arg, "")
    if f.result == "asked":
        want = argvals.get("want")
        res = phrase_units.get("want", "")
        if not res and isinstance(want, str):
            try:
                res = parse_phrase(want.strip(), system).unit
            except JoulebookError:
                res = ""
    elif f.result in ("text", "number"):
        res = ""
    else:
        res = system.unit(f.result)
    return units, kinds, res


def _figure_system(argvals: dict, system):
    """The call's unit system with T, P and V in the units its phrases and state texts use
    (a workbook that writes 'T in degC' and 'P = 4 bar' gets its figures in degC and bar)."""
    from joulebook.core.states import is_state_text

    found: dict[str, str] = {}
    for name, v in argvals.items():
        if name == "units" or not isinstance(v, str):
            continue
        if is_state_text(v):
            pieces = v.split("|")[1:]
        elif " in " in v:
            pieces = [v]
        else:
            continue
        for piece in pieces:
            if " in " in piece:
                sym, unit = piece.split(" in ", 1)
            elif "=" in piece:
                sym, rest = piece.split("=", 1)
                bits = rest.split(None, 1)
                unit = bits[1] if len(bits) == 2 else ""
            else:
                continue
            sym, unit = sym.strip().rstrip("12"), unit.strip()
            if sym in ("T", "P", "V") and unit and sym not in found:
                found[sym] = unit
    if not found:
        return system
    base = argvals.get("units") if isinstance(argvals.get("units"), str) else ""
    text = ", ".join([base or "K-kPa-kJ"] + [f"{k}={u}" for k, u in found.items()])
    try:
        return unit_system(text)
    except JoulebookError:
        return system


def _model(f: Func, argvals: dict) -> str:
    """The model behind a call, from the argument that names the substance."""
    from joulebook.core.media import medium
    from joulebook.core.states import is_state_text, parse_state
    from joulebook.core.substances import solids

    names = {a.name for a in f.args}
    try:
        for arg in ("state1", "state", "substance"):
            sub = argvals.get(arg)
            if arg in names and isinstance(sub, str) and sub.strip():
                med = parse_state(sub).medium if is_state_text(sub) else medium(sub)
                return med.model
        g = argvals.get("gas")
        if "gas" in names and isinstance(g, str):
            return medium(g if "|" in g else f"{g} (ideal gas)").model
        m = argvals.get("material")
        if "material" in names and isinstance(m, str):
            mat = solids.material(m)
            return f"incompressible {mat.name}: {mat.source}"
    except JoulebookError as e:
        return f"(model not resolved: {e.message})"
    if f.working is not None and f.working.result:
        return "closed-form relation (no property model)"
    return f.references[0] if f.references else ""


def _show(v, unit: str = "") -> str:
    """A value with its unit for the report (a range as its count and extremes)."""
    if isinstance(v, list):
        return f"{len(v)} values, {fmt(min(v))} … {fmt(max(v))}" if v else "no numbers"
    text = fmt(v)
    return f"{text} {pretty_unit(unit)}".strip() if unit and isinstance(v, float) else text


def _display(system):
    """``display(value, kind)`` for the substituted working, in the coherent system."""

    def show(v, kind):
        if isinstance(v, str):
            return f"'{v}'"
        if isinstance(v, list):
            return f"[{len(v)} values]"
        if not isinstance(v, (int, float)):
            return fmt(v)
        x = float(v)
        unit = ""
        if kind and kind != "text":
            conv = system.conv(kind)
            x, unit = conv.from_si(x), pretty_unit(system.unit(kind))
        text = f"{x:.6g}" + (f" {unit}" if unit else "")
        return f"({text.replace('-', '−', 1)})" if x < 0 else text

    return show


def _one_call(text: str) -> bool:
    """Whether a working expression is one catalog call and nothing else."""
    if not text.startswith("JB_") or not text.endswith(")") or "(" not in text:
        return False
    depth = 0
    for i, ch in enumerate(text):
        depth += ch == "("
        depth -= ch == ")"
        if depth == 0 and ch == ")":
            return i == len(text) - 1
    return False


_PHRASE = re.compile(r"(['\"][^'\"]*? in )([^'\"]+)(['\"])")


def _in_units(text: str, system) -> str:
    """A working expression with each quoted unit phrase it writes (``'Q in J'``,
    ``'P2 in Pa'``: the catalog's, asking in SI) in *system*'s unit of its quantity, as its
    values are shown; a phrase that does not parse stays as written.  Phrases a workbook
    passes in are arguments, substituted later, and never rewritten."""

    def swap(m: re.Match) -> str:
        sym = m.group(1)[1:-4].strip()
        try:
            ph = parse_phrase(f"{sym.removesuffix('2').removesuffix('1')} in {m.group(2)}")
            kind = ph.kind
        except (JoulebookError, AttributeError, KeyError):
            found = eye.unit_kind(m.group(2))  # a symbol of a result (dU): its unit's kind
            if found is None:
                return m.group(0)
            kind = found[0]
        unit = system.unit(kind)
        return m.group(1) + (unit or m.group(2)) + m.group(3)

    return _PHRASE.sub(swap, text)


def _working(f: Func, si: dict, kinds: dict, units_text) -> tuple[list[Line], object]:
    """The working lines of a call, and the value of its result line (SI) or None."""
    w = f.working
    if w is None or not (w.steps or w.result):
        return [], None
    ws = unit_system(WORKING_SYSTEM)
    show = _display(ws)
    steps, res = work_out(
        w, si, working_call(units_text), show, kinds, text=lambda e: _in_units(e, ws)
    )
    out = []
    for s in steps + ([res] if res else []):
        kind = s.kind if s is not res else (f.result if f.result not in ("asked",) else None)
        shown = "" if s.value is None else show(s.value, kind if kind != "number" else None)
        out.append(Line(s.symbol, s.formula, s.substituted, shown, s.error, _one_call(s.formula)))
    return out, (res.value if res is not None else None)


def _sub_call(
    name, args, text, c: Cell, book, values, engine, whole: bool, result, worked: bool = True
):
    f = lookup(name)
    argvals, sources = {}, {}
    for a, t in zip(f.all_args, args + [""] * (len(f.all_args) - len(args))):
        argvals[a.name], sources[a.name] = _resolve_arg(t, c, book, values, engine)
    units_text = argvals.get("units")
    system = _system(units_text)
    units, kinds, res_unit = _units_of(f, argvals, system)
    inputs = [
        Input(a.name, argvals.get(a.name), units.get(a.name, ""), sources[a.name])
        for a in f.all_args
        if not (sources[a.name] == "omitted" and a.optional)
    ]
    # a physical quantity left out takes the function's default: say which (a mass left out
    # makes the results per unit mass)
    inputs += [
        Input(a.name, "(omitted)", "", f"omitted: {a.help}")
        for a in f.args
        if a.quantity and a.optional and sources[a.name] == "omitted"
    ]
    if not whole:
        try:
            result = engine.evaluate(c.sheet, c.row, c.col, text, values)
        except Exception:
            result = None
    si = {}
    for a in f.all_args:
        v = argvals.get(a.name)
        if a.quantity and isinstance(v, float):
            v = system.conv(a.quantity).to_si(v)
        elif a.quantity and isinstance(v, list):
            v = [system.conv(a.quantity).to_si(x) for x in v]
        si[a.name] = v
    qkinds = {a.name: a.quantity for a in f.all_args if a.quantity}  # numbers held in SI
    try:
        # a copied-down row's working is its group's first row's; worked out anyway where a
        # step carries a plausibility band (a flag may hang on it)
        band = f.working is not None and f.working.band
        lines = _working(f, si, qkinds, units_text)[0] if worked or band else []
    except JoulebookError:
        lines = []
    sc = SubCall(
        f.name,
        text,
        inputs,
        result,
        res_unit,
        _model(f, argvals),
        lines,
        f.equation,
    )
    sc._f, sc._argvals, sc._si, sc._system = f, argvals, si, system  # type: ignore[attr-defined]
    return sc


# ---------------------------------------------------------------------------------------
# flags of one entry


def _status_flags(e: Entry, message: str) -> list[str]:
    row, out = e.row, []
    if row is None:
        return ["not recalculated by the engine"]
    if row.status is Status.DIFFERS:
        out.append(
            f"saved value {fmt(row.cached)} differs from the recomputed {fmt(row.recomputed)}: "
            "the workbook was not recalculated, or its inputs changed"
        )
    elif row.status is Status.NO_CACHED_VALUE:
        out.append("no saved value in the file: open and recalculate before sending it out")
    elif row.status is Status.ERROR:
        what = message or row.note or fmt(row.recomputed)
        if isinstance(row.recomputed, str) and row.recomputed.startswith("OutOfRange:"):
            out.append(
                "outside the model's range: joulebook refused to extrapolate (" + what[:160] + ")"
            )
        else:
            out.append("the formula returns an error: " + what[:200])
    elif row.status in (Status.UNSUPPORTED, Status.NOT_CHECKED, Status.CIRCULAR):
        note = row.note if row.note.startswith(row.status.value) else f"{row.status}: {row.note}"
        out.append(note[:220])
    elif row.status is Status.VOLATILE:
        note = row.note if row.note.startswith("volatile") else f"volatile: {row.note}"
        out.append(f"{note[:160]} (recomputed here, not compared)")
    elif row.status is Status.ERROR_VALUE:
        out.append(row.note)
    elif row.status in (
        Status.UNIT_CLASH,
        Status.REFUSAL_USED,
        Status.BLANK_INPUT,
        Status.OUTSIDE_MODEL,
    ):
        out.append(f"{row.status}: {row.note}"[:400])
    return out


def _call_flags(sc: SubCall, c: Cell, book: Book) -> list[str]:
    f: Func = sc._f  # type: ignore[attr-defined]
    argvals: dict = sc._argvals  # type: ignore[attr-defined]
    si: dict = sc._si  # type: ignore[attr-defined]
    out = []
    units, kinds, _ = _units_of(f, argvals, sc._system)  # type: ignore[attr-defined]
    for inp in sc.inputs:
        u = (inp.unit or "").strip()
        kind = kinds.get(inp.name)
        if isinstance(inp.value, float) and kind == "temperature" and u in ("K", "R", "degR"):
            if inp.value < 200:
                out.append(
                    f"{inp.name} = {fmt(inp.value)} {u}: a temperature under 200 {u} looks like "
                    "a °C or °F value fed as absolute"
                )
        # a label naming another unit than the one the formula reads the cell in
        m = re.match(r"(?:cell|formula) (.+?)!([A-Z]+)(\d+)(?: \((.*)\))?$", inp.source)
        if m and m.group(4) and kind and u:
            named = eye.label_unit(m.group(4), kind)
            try:
                read = eye.unit_kind(u)
            except JoulebookError:
                read = None
            if named is not None and read is not None and read[0] == kind:
                if not eye.same_unit(named, read[1]):
                    out.append(
                        f"{m.group(1)}!{m.group(2)}{m.group(3)} is labelled '{m.group(4)}' "
                        f"but {sc.function} reads it as {inp.name} in {pretty_unit(u)}"
                    )
        typed = inp.source == "constant" and isinstance(inp.value, float) and kind and u
        if typed and not _standard_atmosphere(inp.value, kind, sc._system, u):  # type: ignore[attr-defined]
            out.append(
                f"{inp.name} = {fmt(inp.value)} {pretty_unit(u)} is typed into the formula: put "
                "inputs in labelled cells a checker can see"
            )
    w = f.working
    if w is not None and w.band:
        name, lo, hi, what = w.band
        v = None
        if name == "=":
            v = sc.result if isinstance(sc.result, float) else None
            who = w.symbol
        else:
            who = name
            v = si.get(name)
            if v is None:
                v = next((ln for ln in sc.working if ln.symbol == name), None)
                v = _num(v.value) if v is not None else None
        if isinstance(v, float) and not lo <= v <= hi:
            out.append(f"{who} = {v:.4g} lies outside {what} ({lo:g}–{hi:g})")
    path = argvals.get("path")
    if isinstance(path, str) and path.strip().lower().startswith("polytropic"):
        n = _num(path.split("=", 1)[1]) if "=" in path else None
        if n is not None and not 1.0 <= n <= 1.67:
            out.append(
                f"polytropic n = {n:.4g} lies outside the usual 1–1.67 band of gas compression "
                "and expansion"
            )
    if w is not None and w.zero and isinstance(sc.result, float):
        scale = max([abs(si.get(k) or 0.0) for k in w.zero] + [1e-300])
        res_si = sc._system.conv(f.result).to_si(sc.result)  # type: ignore[attr-defined]
        if abs(res_si) > 1e-6 * scale:
            out.append(
                f"the first-law balance does not close: {w.symbol} = {fmt(sc.result)} "
                f"{pretty_unit(sc.result_unit)} (check signs: heat in +, work by the system +)"
            )
    if not any(
        inp.name in ("substance", "state1", "state") and inp.source.startswith("formula ")
        for inp in sc.inputs
    ):
        out += _state_flags(argvals)  # a state that comes from another cell is flagged there
    return out


def _validity_flags(sc: SubCall) -> list[str]:
    """The catalog's validity checks of a call nested in a formula (workbook/validity.py)."""
    f: Func = sc._f  # type: ignore[attr-defined]
    if not f.validity:
        return []
    res = sc.result
    units = sc._argvals.get("units")  # type: ignore[attr-defined]
    if isinstance(res, float) and f.result not in ("text", "number", "asked"):
        res = sc._system.conv(f.result).to_si(res)  # type: ignore[attr-defined]
    return violations(f, sc._si, res, units if isinstance(units, str) else None)  # type: ignore[attr-defined]


def _standard_atmosphere(v: float, kind: str, system, unit: str) -> bool:
    """101.325 kPa typed in is the standard atmosphere, a constant of the trade."""
    if kind != "pressure":
        return False
    k = eye.unit_kind(unit)
    return k is not None and abs(k[1].to_si(v) - 101325.0) < 1e-6


def _num(text) -> float | None:
    try:
        return float(str(text).split()[0].strip("()").replace("−", "-"))
    except (ValueError, IndexError):
        return None


def _state_flags(argvals: dict) -> list[str]:
    """Two-phase, near-critical and near-saturation states of the real fluid involved."""
    from joulebook.core.states import is_state_text, make_state, parse_state

    try:
        sub = argvals.get("state1") or argvals.get("state") or argvals.get("substance")
        if not isinstance(sub, str):
            return []
        if is_state_text(sub):
            st = parse_state(sub)
        elif all(
            isinstance(argvals.get(k), (str, float)) for k in ("spec1", "value1", "spec2", "value2")
        ):
            st = make_state(
                sub,
                argvals["spec1"],
                argvals["value1"],
                argvals["spec2"],
                argvals["value2"],
                _system(argvals.get("units")),
            )
        else:
            return []
        med = st.medium
        if med.ideal or getattr(med, "info", None) is None:  # no dome: ideal gas, liquid
            return []
        a, va, b, vb = st.si()
        p = med.point(a, va, b, vb, st.shows())
        info = med.info
    except (JoulebookError, ValueError, KeyError, AttributeError):
        return []
    out = []
    if p.x is not None and 0.0 < p.x < 1.0:
        out.append(
            f"note: two-phase state (x = {p.x:.4g}): T and P are tied; check the quality where "
            "it matters"
        )
    if abs(p.T / info.T_crit - 1) < 0.02 and abs(p.P / info.P_crit - 1) < 0.05:
        out.append(
            "state within 2 % of the critical temperature and 5 % of the critical pressure: "
            "properties change steeply here"
        )
    elif p.x is None and info.pure and info.T_triple <= p.T < info.T_crit:
        from joulebook.core.substances.fluids import _psat

        ps = _psat(info, p.T)
        if abs(p.P / ps - 1) < 0.01:
            out.append(
                "state within 1 % of the saturation pressure: a small change of T or P changes "
                "the phase"
            )
    return out


_GAUGE_UNITS = ("kpag", "barg", "psig", "mpag", "pag")


def _gauge_refs(book: Book, c: Cell, formula: str) -> list[str]:
    """Cells labelled as gauge pressures that a joulebook call reads with no gauge unit."""
    if any(w.lower() in t.lower() for t in texts(formula) for w in _GAUGE_UNITS):
        return []
    out = []
    for key in cell_refs(formula, c.sheet):
        lab = _label(book, *key).lower()
        if any(w in lab for w in eye.GAUGE_WORDS):
            out.append(
                f"{_where(key)} is labelled as a gauge pressure but this formula reads it with an"
                " absolute unit; use barg/psig/kPag"
            )
    return out


# ---------------------------------------------------------------------------------------
# ordinary formulas: precedents, substitution, comparisons


def _cell_unit(book: Book, key, by_key: dict, declared=None) -> tuple[str, str]:
    """(unit, label) of a cell: the result unit of a joulebook cell, else a unit its label
    names, else the unit its number format, unit cell or header writes (*declared*,
    :func:`joulebook.faces.workbook.cellunits.declared_units`)."""
    lab = _label(book, *key)
    e = by_key.get(key)
    if e is not None and e.function and e.result_unit:
        return e.result_unit, lab
    for text in eye._units_named(lab):
        k = eye.unit_kind(text)
        if k is not None:
            return text, lab
    if declared is not None:
        unit, source = declared(key)
        if unit:
            return unit, (lab + "; " if lab else "") + "unit from the " + source
    return "", lab


def _substitute(formula: str, here: str, values: dict) -> str:
    """The formula with each single-cell reference replaced by its value (tokenizer)."""
    try:
        toks = tokens(formula)
    except Exception:
        return ""
    out, changed = [], False
    for v, t, sub in toks:
        if t == "OPERAND" and sub == "RANGE":
            key = eye.operand_cell(v, here)
            if key is not None and key in values:
                x = values[key]
                text = fmt(x) if not isinstance(x, str) else f'"{x}"'
                if isinstance(x, float) and x < 0:
                    text = f"({text})"
                out.append(text)
                changed = True
                continue
        out.append(v)
    return "=" + "".join(out) if changed else ""


def _comparison_flags(book: Book, c: Cell, by_key: dict) -> list[str]:
    out = []
    for left, op, right in eye.comparisons(c.formula):
        sides = []
        for side in (left, right):
            key = eye.operand_cell(side, c.sheet)
            if key is None:
                sides.append((side, None, "", ""))
            else:
                unit, lab = _cell_unit(book, key, by_key)
                sides.append((_where(key), key, unit, lab))
        (lt, lk, lu, ll), (rt, rk, ru, rl) = sides
        if lk is not None and rk is not None:
            lg, rg = eye.is_gauge(ll, lu), eye.is_gauge(rl, ru)
            if lg is not None and rg is not None and lg != rg:
                g, a = (lt, rt) if lg else (rt, lt)
                out.append(
                    f"{lt} {op} {rt} compares a gauge pressure ({g}) with an absolute one ({a}): "
                    "convert one side (gauge = absolute − atmospheric)"
                )
                continue
            lkind, rkind = eye.unit_kind(lu) if lu else None, eye.unit_kind(ru) if ru else None
            if lkind and rkind and lkind[0] == rkind[0] and not eye.same_unit(lkind[1], rkind[1]):
                out.append(
                    f"{lt} {op} {rt} compares {lkind[0]}s in different units "
                    f"({pretty_unit(lu)} and {pretty_unit(ru)})"
                )
        for text, key in ((lt, lk), (rt, rk)):
            if key is None and eye.is_number(text) and float(text) not in (0.0, 1.0):
                other = rk if key is lk else lk
                if other is not None:
                    out.append(
                        f"the limit {text} in '{lt} {op} {rt}' is typed into the formula: put it in "
                        "a labelled cell with its unit"
                    )
    return out


_Q = re.compile(r"^\s*(q\b|heat\b)", re.IGNORECASE)
_DU = re.compile(r"(Δu|du\b|delta u|internal energy)", re.IGNORECASE)
_W = re.compile(r"(^\s*w\b|work)", re.IGNORECASE)


def _own_label_flags(e: Entry) -> list[str]:
    """A joulebook cell whose own label names another unit than the one it returns."""
    if not e.label or not e.result_unit or not isinstance(e.result, float):
        return []
    got = eye.unit_kind(e.result_unit)
    if got is None:
        return []
    named = eye.label_unit(e.label, got[0])
    if named is None or eye.same_unit(named, got[1]):
        return []
    return [
        f"the label '{e.label}' names {named.unit} but the formula returns "
        f"{pretty_unit(e.result_unit)}: a reader takes the number in the wrong unit"
    ]


def _cut_off_flags(c: Cell, sc: SubCall, engine: Engine, values: dict) -> list[str]:
    """An array range smaller than the table the call returns: rows or columns cut off; a
    table function entered in one cell shows only its first value."""
    box = _box(c)
    table = isinstance(sc._f.example.value, list)  # type: ignore[attr-defined]
    if box is None and not table:
        return []
    if box is None:
        box = (c.row, c.col, c.row, c.col)
    try:
        full = engine.evaluate(c.sheet, c.row, c.col, sc.text, values)
    except Exception:
        return []
    if not isinstance(full, (list, np.ndarray)):
        return []
    from joulebook.catalog import as_rows

    rows = as_rows(full)
    n, m = len(rows), max((len(r) for r in rows), default=0)
    h, w = box[2] - box[0] + 1, box[3] - box[1] + 1
    if n <= h and m <= w:
        return []
    if h == w == 1:
        return [
            f"{sc.function} returns a table of {n} × {m} values but is entered in one cell, "
            f"which shows only its first value ({fmt(rows[0][0]) if rows and rows[0] else ''}): "
            f"enter it as an array formula over {n} rows × {m} columns"
        ]
    return [
        f"the array range {c.array_ref} shows {min(n, h)} × {min(m, w)} of the {n} × {m} "
        f"values {sc.function} returns: rows or columns are cut off; widen the range"
    ]


def _hand_balance(book: Book, c: Cell, values: dict, label: str) -> list[str]:
    """A hand-typed heat cell (label Q / heat) built from a ΔU cell and a W cell must equal
    ΔU + W (heat in +, work by the system +)."""
    if not _Q.search(label):
        return []
    du = w = None
    for key in cell_refs(c.formula, c.sheet):
        lab = _label(book, *key)
        v = values.get(key)
        if isinstance(v, float) and _DU.search(lab):
            du = v
        elif isinstance(v, float) and _W.search(lab):
            w = v
    q = values.get((c.sheet, c.row, c.col))
    if du is None or w is None or not isinstance(q, float):
        return []
    if abs(q - (du + w)) > 1e-9 * max(abs(du), abs(w), 1e-300):
        return [
            f"hand-typed heat {fmt(q)} ≠ ΔU + W = {fmt(du)} + {fmt(w)} = {fmt(du + w)}: a sign "
            "slip? (heat in +, work by the system +)"
        ]
    return []


# ---------------------------------------------------------------------------------------
# spilled results


def _box(c: Cell) -> tuple[int, int, int, int] | None:
    if not c.array_ref or ":" not in c.array_ref:
        return None
    r = parse_ref(c.array_ref)
    if r is None or r.kind != "area":
        return None
    return r.r1, r.c1, r.r2, r.c2


def _table(book: Book, c: Cell, values: dict, columns: tuple[str, ...]) -> tuple[list, list]:
    """A spilled result in full: a heading row (the sheet's header row above the range, else
    the catalog's column names), then each row with the label to its left."""
    box = _box(c)
    if box is None:
        return [], []
    r1, c1, r2, c2 = box
    if (r2 - r1 + 1) * (c2 - c1 + 1) > 2000:
        r2 = r1 + 2000 // (c2 - c1 + 1)
    rows = [[values.get((c.sheet, r, k)) for k in range(c1, c2 + 1)] for r in range(r1, r2 + 1)]
    head = [book.cells.get((c.sheet, r1 - 1, k)) for k in range(c1, c2 + 1)]
    heading = [
        h.cached if h is not None and h.formula is None and isinstance(h.cached, str) else ""
        for h in head
    ]
    if not any(heading) and columns and len(columns) == c2 - c1 + 1:
        heading = list(columns)
    labels = []
    for r in range(r1, r2 + 1):
        lc = book.cells.get((c.sheet, r, c1 - 1))
        labels.append(lc.cached if lc is not None and isinstance(lc.cached, str) else "")
    head = (([""] if any(labels) else []) + [str(h) for h in heading]) if any(heading) else []
    out = [([lab] if any(labels) else []) + [fmt(v) for v in row] for lab, row in zip(labels, rows)]
    return head, out


# ---------------------------------------------------------------------------------------
# building the audit


def build_audit(
    book: Book,
    outcomes: dict | None = None,
    rtol: float = 1e-9,
    atol: float = 1e-12,
    figures: bool = True,
    progress=None,
    copies: bool = True,
    maps: bool = True,
) -> Audit:
    """Every formula cell of *book* explained, with one status and its flags.

    ``copies=False`` leaves out the working lines of a copied-down cell that is not the
    first of its group (:mod:`.groups`; the package shows the working once per group);
    ``maps=False`` leaves out the per-sheet maps (the package draws its own)."""
    engine = Engine(book)
    outcomes = outcomes if outcomes is not None else engine.run()
    rows = compare(book, outcomes, rtol, atol)
    by_cell = {(r.sheet, r.cell): r for r in rows}
    values = {k: c.cached for k, c in book.cells.items() if c.formula is None and c.has_cached}
    values.update({k: o.value for k, o in outcomes.items()})
    order = {s: i for i, s in enumerate(book.sheets)}
    cells = sorted(book.formula_cells(), key=lambda c: (order.get(c.sheet, 0), c.row, c.col))
    entries: list[Entry] = []
    by_key: dict = {}
    drawn: dict[str, str] = {}  # figure hash -> where it was first drawn
    declared = None  # units the sheet writes beside its inputs (read on first need)
    firsts = None
    if not copies:
        from .groups import runs

        firsts = {
            r.keys[0]
            for r in runs(((c.sheet, c.row, c.col), c.raw_formula or c.formula) for c in cells)
        }
    for i, c in enumerate(cells):
        key = (c.sheet, c.row, c.col)
        o = outcomes.get(key)
        result = o.value if o is not None else None
        row = by_cell.get((c.sheet, c.ref))
        label = _label(book, c.sheet, c.row, c.col)
        names = _names_for(book, c.sheet, c.ref)
        if names:
            label = (label + " · " if label else "") + "name: " + ", ".join(names)
        found = _calls(c.formula)
        whole = bool(found) and _tight(found[0][2]) == _tight(c.formula)
        calls = []
        for j, (name, args, text) in enumerate(found):
            try:
                calls.append(
                    _sub_call(
                        name,
                        args,
                        text,
                        c,
                        book,
                        values,
                        engine,
                        whole and j == 0,
                        result,
                        firsts is None or key in firsts or row is None or row.status != "pass",
                    )
                )
            except JoulebookError:
                continue  # an unknown JB_ name: the engine's status names it
        e = Entry(
            c.sheet,
            c.ref,
            label,
            c.raw_formula or c.formula,
            calls[0].function if whole and calls else "",
            [],
            result,
            "",
            "",
            "",
            row,
            status=row.status if row is not None else Status.NOT_CHECKED,
            note=row.note if row is not None else "",
            calls=calls,
        )
        if whole and calls:
            top = calls[0]
            e.inputs, e.result_unit, e.model = top.inputs, top.result_unit, top.model
            e.equation = _equation_text(top)
            e.table_head, e.table = _table(book, c, values, _columns(top))
        else:
            for k in dict.fromkeys(cell_refs(c.formula, c.sheet)):
                if declared is None:
                    declared = declared_units(book, values)
                unit, lab = _cell_unit(book, k, by_key, declared)
                src = book.cells.get(k)
                kind = "formula" if src is not None and src.formula else "cell"
                e.inputs.append(
                    Input(
                        _where(k),
                        values.get(k),
                        unit,
                        f"{kind} {_where(k)}" + (f" ({lab})" if lab else ""),
                    )
                )
            e.substituted = _substitute(c.formula, c.sheet, values)
            e.table_head, e.table = _table(book, c, values, ())
        # flags
        e.flags += _status_flags(e, o.message if o is not None else "")
        if o is not None and o.message and isinstance(result, tuple):
            e.flags.insert(0, f"the cell shows {result[1]}: {o.message}")
        for sc in calls if not whole else ():  # a whole call's validity is its status
            e.flags += [f"{sc.function}: {fl}" for fl in _validity_flags(sc)]
        for sc in calls:
            for fl in _call_flags(sc, c, book):
                if fl.startswith("note: "):
                    e.notes.append(fl[6:])
                elif fl not in e.flags:
                    e.flags.append(fl if whole else f"{sc.function}: {fl}")
        if calls:
            for g in _gauge_refs(book, c, c.formula):
                if g not in e.flags:
                    e.flags.append(g)
        if e.status is not Status.UNIT_CLASH:  # else the clash is the flag (verdict.py)
            e.flags += _comparison_flags(book, c, by_key)
        if whole and calls:
            e.flags += _own_label_flags(e) + _cut_off_flags(c, calls[0], engine, values)
        if not calls:
            e.flags += _hand_balance(book, c, values, label)
        # figures: one per distinct path
        if figures:
            for sc in calls:
                w = sc._f.working  # type: ignore[attr-defined]
                if w is None or not (w.curve or w.figure):
                    continue
                fp = _fingerprint(sc)
                if fp in drawn:
                    sc.figure_ref = drawn[fp]
                    continue
                sc.figure = figure(
                    w,
                    sc._si,  # type: ignore[attr-defined]
                    _figure_system(sc._argvals, sc._system),  # type: ignore[attr-defined]
                    working_call(sc._argvals.get("units")),  # type: ignore[attr-defined]
                )
                if sc.figure:
                    drawn[fp] = f"{c.sheet}!{c.ref}"
            if whole and calls:
                e.figure = calls[0].figure
        entries.append(e)
        by_key[key] = e
        if progress:
            progress(i + 1, len(cells))
    _unit_consistency(entries, by_key)
    from joulebook.core.substances.fluids import coolprop_version

    audit = Audit(
        book,
        entries,
        rows,
        summary(rows),
        caution=any(
            (sc._f.caution or sc._f.family in ("process", "stored", "work"))  # type: ignore[attr-defined]
            for e in entries
            for sc in e.calls
        ),
        generated=_dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC"),
        library=f"joulebook {__version__}; {coolprop_version()}",
    )
    if maps:
        audit.maps = _maps(audit)
    return audit


def _tight(text: str) -> str:
    return "".join(text.split()).lstrip("=").upper().replace("_XLFN.", "")


def _columns(sc: SubCall) -> tuple[str, ...]:
    w = sc._f.working  # type: ignore[attr-defined]
    return w.columns if w is not None else ()


def _equation_text(sc: SubCall) -> str:
    if sc.working:
        ln = sc.working[-1]
        return f"{ln.symbol} = {ln.formula}"
    return sc.equation


def _fingerprint(sc: SubCall) -> str:
    """What the figure of a call depends on: the arguments its working draws from."""
    from joulebook.core.working import names_in

    w = sc._f.working  # type: ignore[attr-defined]
    if w.figure == "path":
        used = {"state1", "path", "end_spec", "end_value", "mass"}
    elif w.figure == "points":
        used = {"P_values", "V_values"}
    else:
        used = {"V_1", "V_2"} | names_in(w.curve)
        for st in w.steps:
            used |= names_in(st.expr)
    si = sc._si  # type: ignore[attr-defined]
    # the path, not the units it is asked in: one figure per path, drawn in the units of the
    # first cell that asks for it
    key = {k: si.get(k) for k in used if k != "end_spec"}
    spec, value = si.get("end_spec"), si.get("end_value")
    if "end_spec" in used and isinstance(spec, str) and isinstance(value, float):
        sym, sep, unit = spec.partition(" in ")
        try:
            ph = parse_phrase(sym.strip().removesuffix("2") + sep + unit, sc._system)  # type: ignore[attr-defined]
            key["end_value"] = (ph.symbol, float(f"{ph.conv.to_si(value):.10g}"))
        except (JoulebookError, AttributeError):
            key["end_spec"] = spec
    payload = repr(sorted((k, repr(v)) for k, v in key.items()))
    return hashlib.sha256(payload.encode()).hexdigest()


def _unit_consistency(entries: list[Entry], by_key: dict) -> None:
    """Flag a joulebook call that reads another joulebook cell's result in another unit."""
    for e in entries:
        for sc in e.calls:
            for inp in sc.inputs:
                m = re.match(r"formula (.+?)!([A-Z]+)(\d+)", inp.source)
                if not m:
                    continue
                from .refs import col_number

                src = by_key.get((m.group(1), int(m.group(3)), col_number(m.group(2))))
                if src is None or not src.result_unit or not inp.unit:
                    continue
                if not isinstance(src.result, float):
                    continue
                a, b = eye.unit_kind(src.result_unit), eye.unit_kind(inp.unit)
                if a and b and a[0] == b[0] and not eye.same_unit(a[1], b[1]):
                    e.flags.append(
                        f"{inp.name} reads {m.group(1)}!{m.group(2)}{m.group(3)}, a result in "
                        f"{pretty_unit(src.result_unit)}, as {pretty_unit(inp.unit)}: the unit "
                        "systems of the two cells disagree"
                    )


def _ranges(formula: str, sheet: str) -> list[tuple]:
    """The ranges of *sheet* a formula reads, as (sheet, r1, c1, r2, c2) (tokenizer)."""
    try:
        toks = tokens(formula)
    except Exception:
        return []
    out = []
    for v, t, sub in toks:
        if t == "OPERAND" and sub == "RANGE":
            r = parse_ref(v)
            if (
                r is not None
                and r.kind == "area"
                and r.book is None
                and (r.sheet or sheet) == sheet
            ):
                out.append((sheet, r.r1, r.c1, r.r2, r.c2))
    return out


def _maps(a: Audit) -> dict[str, str]:
    out = {}
    book = a.book
    for sheet in book.sheets:
        es = [e for e in a.entries if e.sheet == sheet]
        if not es:
            continue
        nodes: dict = {}
        for e in es:
            k = e.key
            pre = [p for p in cell_refs(e.formula.lstrip("="), sheet) if p[0] == sheet]
            pre += _ranges(e.formula.lstrip("="), sheet)
            kind = (
                "flagged"
                if e.flags
                else "ours"
                if e.calls
                else "check"
                if eye.comparisons(e.formula)
                else "formula"
            )
            nodes[k] = Node(k, e.cell, e.label, kind, pre, e.anchor)
        for e in es:
            for p in nodes[e.key].precedents:
                if p in nodes:
                    continue
                if len(p) == 5:  # a range: one node, named by its heading
                    ref = f"{col_letters(p[2])}{p[1]}:{col_letters(p[4])}{p[3]}"
                    nodes[p] = Node(p, ref, _label(book, *p[:3]), "input", [], "")
                else:
                    nodes[p] = Node(
                        p, f"{col_letters(p[2])}{p[1]}", _label(book, *p), "input", [], ""
                    )
        ordered = sorted(nodes.values(), key=lambda n: (n.key[1], n.key[2]))
        out[sheet] = calc_map(ordered, sheet)
    return out


# ---------------------------------------------------------------------------------------
# outputs


def audit_rows(a: Audit) -> list[list[object]]:
    """The audit as rows of a worksheet (header first)."""
    rows: list[list[object]] = [
        ["joulebook audit", a.book.path.name, a.library, a.generated, "SHA-256 " + a.book.sha256],
        [CAUTION],
        [],
        [
            "sheet",
            "cell",
            "label",
            "formula",
            "result",
            "unit",
            "model",
            "equation",
            "status",
            "flags",
        ],
    ]
    for e in a.entries:
        result = e.result if isinstance(e.result, float) else fmt(e.result)
        rows.append(
            [
                e.sheet,
                e.cell,
                e.label,
                "=" + e.formula if e.formula else "",
                result,
                e.result_unit,
                e.model,
                e.equation or e.substituted,
                e.status,
                " | ".join(e.flags),
            ]
        )
    return rows


def _jsonable(v):
    if isinstance(v, tuple):
        return {"error": v[1]} if len(v) == 2 and v[0] == "error" else list(v)
    if isinstance(v, float) and not math.isfinite(v):
        return repr(v)
    if isinstance(v, np.ndarray):
        return [_jsonable(x) for x in v.tolist()]
    if isinstance(v, list):
        return [_jsonable(x) for x in v]
    return v


def to_json(a: Audit) -> str:
    """Every entry, flag and figure of the audit as JSON (figures as their presence)."""

    def inp(i: Input) -> dict:
        return {"name": i.name, "value": _jsonable(i.value), "unit": i.unit, "source": i.source}

    entries = []
    for e in a.entries:
        entries.append(
            {
                "sheet": e.sheet,
                "cell": e.cell,
                "label": e.label,
                "formula": "=" + e.formula,
                "function": e.function,
                "status": e.status,
                "note": e.note,
                "result": _jsonable(e.result),
                "result_unit": e.result_unit,
                "saved": _jsonable(e.row.cached) if e.row else None,
                "model": e.model,
                "equation": e.equation,
                "substituted": e.substituted,
                "inputs": [inp(i) for i in e.inputs],
                "calls": [
                    {
                        "function": sc.function,
                        "text": sc.text,
                        "result": _jsonable(sc.result),
                        "result_unit": sc.result_unit,
                        "model": sc.model,
                        "inputs": [inp(i) for i in sc.inputs],
                        "working": [vars(ln) for ln in sc.working],
                        "figure": bool(sc.figure),
                        "figure_ref": sc.figure_ref,
                    }
                    for sc in e.calls
                ],
                "table": ([e.table_head] if e.table_head else []) + e.table,
                "flags": e.flags,
                "notes": e.notes,
            }
        )
    return json.dumps(
        {
            "workbook": str(a.book.path),
            "sha256": a.book.sha256,
            "library": a.library,
            "summary": a.summary,
            "flags": [{"cell": f"{e.sheet}!{e.cell}", "flag": f} for e, f in a.flags],
            "entries": entries,
            "caution": CAUTION if a.caution else "",
        },
        indent=2,
        ensure_ascii=False,
    )


def _badge(e: Entry) -> str:
    """Green only for a recomputed value that matches and is not an error."""
    if isinstance(e.result, tuple):
        return "bad"
    return _BADGE.get(e.status, "bad")


#: the badge of each status (the one Status list): green only for a pass; amber for cells
#: whose value could not be compared; red for every other verdict
_BADGE = {
    s: (
        "pass"
        if s is Status.PASS
        else "warn"
        if s in (Status.NOT_CHECKED, Status.NO_CACHED_VALUE, Status.VOLATILE)
        else "bad"
    )
    for s in STATUSES
}


#: the statuses of a value that recomputes but cannot be signed (design §3)
_SIGNED = (Status.UNIT_CLASH, Status.REFUSAL_USED, Status.BLANK_INPUT, Status.OUTSIDE_MODEL)


def render_html(a: Audit) -> str:
    """The self-contained HTML report (Jinja2, autoescaped; figures and maps are SVG that
    escape every text from the workbook themselves)."""
    import jinja2
    from markupsafe import Markup, escape

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("joulebook.faces.workbook", "templates"),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )

    def breakable(text) -> Markup:
        """Formula text that wraps after separators and operators, never inside a word."""
        s = str(escape(text))
        for ch in (",", "(", "+", "*", "/", "&amp;", ";"):
            s = s.replace(ch, ch + "<wbr>")
        return Markup(s)

    env.filters["breakable"] = breakable
    env.filters["shown"] = _show
    env.filters["unit"] = pretty_unit
    env.filters["fmt"] = fmt
    tpl = env.get_template("audit.html")
    es = a.entries
    counts = [
        ("formula cells audited", len(es)),
        ("of them calling joulebook", sum(1 for e in es if e.calls)),
        ("passes (recomputed = saved, not an error)", sum(_badge(e) == "pass" for e in es)),
        ("differences", sum(e.status == Status.DIFFERS for e in es)),
        (
            "errors (joulebook refusals and error values)",
            sum(e.status in (Status.ERROR, Status.ERROR_VALUE) for e in es),
        ),
        (
            "unit clashes, refusals used, blank inputs, outside the model",
            sum(e.status in _SIGNED for e in es),
        ),
        ("unsupported / circular", sum(e.status in ("unsupported", "circular") for e in es)),
        ("not checked (a precedent was not evaluated)", sum(e.status == "not checked" for e in es)),
        ("volatile (recomputed, not compared)", sum(e.status == "volatile" for e in es)),
        ("no saved value", sum(e.status == "no cached value" for e in es)),
        ("cells recalculated, spilled cells included", a.summary.get("cells", 0)),
        ("flags raised", len(a.flags)),
    ]
    sheets = list(dict.fromkeys([e.sheet for e in a.entries]))
    return tpl.render(
        a=a,
        counts=counts,
        sheets=sheets,
        badge=_badge,
        status=lambda e: e.status,
        svg=lambda text: Markup(text),
        caution=CAUTION,
    )
