"""Headless recalculation of a saved workbook.

The Excel formula language and built-ins come from the ``formulas`` library (EUPL-1.1+); we
do not write our own Excel.  To avoid its per-cell cost, each distinct formula *shape* (the
formula translated to a fixed anchor cell, i.e. its relative form) is compiled once and
reused for every cell of that shape with the references shifted; cells are evaluated in
dependency order (:mod:`graphlib`); circular references are found and reported, never looped.
Cells using position-dependent functions (ROW, COLUMN, OFFSET, INDIRECT) are compiled per
cell.  joulebook's own functions are registered from the catalog and run through
:func:`joulebook.catalog.call` exactly as in Excel: a failure gives the same cell text
(``OutOfRange: …``) that the sheet face returns.
"""

from __future__ import annotations

import graphlib
import re
from bisect import bisect_left, bisect_right
from dataclasses import dataclass, field

import numpy as np

from ..catalog import CATALOG
from ..sheet.cells import cell as sheet_cell
from .reader import Book, Cell, col_letters, col_number

__all__ = ["Engine", "Outcome", "ERROR"]

ANCHOR_ROW, ANCHOR_COL = 100_000, 703  # AAA100000: far enough that relative refs stay valid
_POSITIONAL = re.compile(r"\b(ROW|COLUMN|ROWS|COLUMNS|OFFSET|INDIRECT|CELL)\s*\(", re.IGNORECASE)
_UNSUPPORTED = re.compile(
    r"\[[^\]]*\.(xlsx|xlsm|xls|csv)\]|\bTABLE\s*\(|'\w:\\|https?://", re.IGNORECASE
)


def ERROR(code: str) -> tuple[str, str]:  # noqa: N802 - reads like Excel's error values
    return ("error", code)


@dataclass
class Outcome:
    """The recomputed value of one cell, and why it could not be computed when it was not."""

    value: object
    problem: str = ""  # "circular", "unsupported: …", "engine: …"


@dataclass
class _Compiled:
    fn: object
    inputs: list[str]  # references as seen from the anchor cell (or the cell itself)
    anchored: bool
    text: str = ""  # the formula text it was compiled from
    fast_inputs: list | None = None  # parsed plain references (see _parse_plain)


_REGISTERED = False


def _register_ours() -> None:
    """Add every catalog function to the formula library's function table."""
    global _REGISTERED
    if _REGISTERED:
        return
    import formulas

    table = formulas.get_functions()
    for f in CATALOG:
        table[f.name] = _our_function(f.name)
    _REGISTERED = True


def _to_cell_value(x):
    """A value as our cell path expects it: numbers, text, None for blank, '#N/A' for errors."""
    import schedula as sh
    from formulas.tokens.operand import XlError

    if isinstance(x, np.ndarray):
        return [
            [_to_cell_value(v) for v in row] for row in (x if x.ndim == 2 else x.reshape(1, -1))
        ]
    if x is sh.EMPTY:
        return None
    if isinstance(x, XlError):
        return str(x)
    if isinstance(x, (np.floating, np.integer)):
        return float(x)
    if isinstance(x, np.bool_):
        return bool(x)
    return x


def _our_function(name: str):
    def fn(*args):
        out = sheet_cell(name, *(_to_cell_value(a) for a in args))
        if isinstance(out, list):
            arr = np.empty((len(out), len(out[0]) if out else 0), dtype=object)
            for i, row in enumerate(out):
                for j, v in enumerate(row):
                    arr[i, j] = "" if v is None else v
            return arr
        return out

    fn.__name__ = name
    return fn


# ---------------------------------------------------------------------------------------
# references

_STRINGS = re.compile(r'("(?:[^"]|"")*")')
_CELLREF = re.compile(r"(?<![A-Za-z0-9_.])(\$?)([A-Za-z]{1,3})(\$?)(\d+)(?![A-Za-z0-9_(])")


def _relative_key(formula: str, row: int, col: int) -> str:
    """The formula with each A1 reference written relative to (row, col): equal keys mean the
    same shape.  String literals are left alone; anything unusual simply gets its own key."""
    parts = _STRINGS.split(formula)

    def sub(m: re.Match) -> str:
        c = col_number(m.group(2))
        r = int(m.group(4))
        cs = f"C{c}" if m.group(1) else f"C[{c - col}]"
        rs = f"R{r}" if m.group(3) else f"R[{r - row}]"
        return rs + cs

    return "".join(p if i % 2 else _CELLREF.sub(sub, p) for i, p in enumerate(parts))


_A1 = re.compile(r"(\$?)([A-Z]{1,3})(\$?)(\d+)")
_COLS = re.compile(r"^(\$?)([A-Z]{1,3}):(\$?)([A-Z]{1,3})$")


def _shift_part(part: str, dr: int, dc: int) -> str:
    def sub(m):
        if (not m.group(1) and col_number(m.group(2)) + dc < 1) or (
            not m.group(3) and int(m.group(4)) + dr < 1
        ):
            raise ValueError("reference moved off the sheet")
        c = m.group(2) if m.group(1) else col_letters(col_number(m.group(2)) + dc)
        r = m.group(4) if m.group(3) else str(int(m.group(4)) + dr)
        return f"{m.group(1)}{c}{m.group(3)}{r}"

    return _A1.sub(sub, part)


def shift_ref(ref: str, dr: int, dc: int) -> str:
    """Shift the relative parts of a reference such as ``SHEET!A1:$B$3`` by (dr, dc)."""
    sheet, bang, addr = ref.rpartition("!")
    m = _COLS.match(addr)
    if m:
        if min(col_number(m.group(2)), col_number(m.group(4))) + dc < 1:
            raise ValueError("reference moved off the sheet")
        a = m.group(2) if m.group(1) else col_letters(col_number(m.group(2)) + dc)
        b = m.group(4) if m.group(3) else col_letters(col_number(m.group(4)) + dc)
        addr = f"{m.group(1)}{a}:{m.group(3)}{b}"
    else:
        addr = ":".join(_shift_part(p, dr, dc) for p in addr.split(":"))
    return f"{sheet}{bang}{addr}"


_PLAIN = re.compile(r"^(\$?)([A-Z]{1,3})(\$?)(\d+)(?::(\$?)([A-Z]{1,3})(\$?)(\d+))?$")


def _parse_plain(ref: str):
    """``$A1:B$3`` → ((r1, c1, r2, c2), (row1 abs, col1 abs, row2 abs, col2 abs)); None otherwise."""
    m = _PLAIN.match(ref)
    if not m:
        return None
    c1, r1 = col_number(m.group(2)), int(m.group(4))
    if m.group(6):
        c2, r2 = col_number(m.group(6)), int(m.group(8))
        flags = (bool(m.group(3)), bool(m.group(1)), bool(m.group(7)), bool(m.group(5)))
    else:
        c2, r2 = c1, r1
        flags = (bool(m.group(3)), bool(m.group(1))) * 2
    return (r1, c1, r2, c2), flags


_SIMPLE = re.compile(r"^\$?([A-Z]{1,3})\$?(\d+)(?::\$?([A-Z]{1,3})\$?(\d+))?$")


@dataclass
class _Range:
    sheet: str
    r1: int
    c1: int
    r2: int
    c2: int


@dataclass
class Engine:
    """Recalculate *book*; :meth:`run` returns ``{(sheet, row, col): Outcome}`` for formula
    cells (and the cells an array formula spills into)."""

    book: Book
    progress: object = None  # callable(done, total) or None
    batch: bool = True  # evaluate same-shape columns in one vectorised call
    _compiled: dict = field(default_factory=dict)
    _sheet_upper: dict = field(default_factory=dict)
    _max: dict = field(default_factory=dict)

    def __post_init__(self):
        _register_ours()
        self._sheet_upper = {s.upper(): s for s in self.book.sheets}
        for s, r, c in self.book.cells:
            mr, mc = self._max.get(s, (0, 0))
            self._max[s] = (max(mr, r), max(mc, c))

    # --- compiling ----------------------------------------------------------------------
    def _compile(self, cell: Cell) -> tuple[_Compiled, int, int]:
        import formulas
        from openpyxl.formula.translate import Translator

        text = "=" + cell.formula
        fast = (cell.sheet, _relative_key(cell.formula, cell.row, cell.col))
        hit = self._compiled.get(fast)
        if hit is not None:
            return hit, cell.row - ANCHOR_ROW, cell.col - ANCHOR_COL
        if _POSITIONAL.search(cell.formula):
            key, anchored, shape = (cell.sheet, cell.row, cell.col, text), False, text
        else:
            try:
                shape = Translator(text, origin=cell.ref).translate_formula(
                    col_letters(ANCHOR_COL) + str(ANCHOR_ROW)
                )
            except Exception:
                shape = text
                key, anchored = (cell.sheet, cell.row, cell.col, text), False
            else:
                key, anchored = (cell.sheet, shape), True
        comp = self._compiled.get(key)
        if comp is None:
            fn = formulas.Parser().ast(shape)[1].compile()
            # the library drops the $ of absolute references: take them from the text
            from openpyxl.formula.tokenizer import Tokenizer

            marked = {}
            for tok in Tokenizer(shape).items:
                if tok.type == "OPERAND" and tok.subtype == "RANGE":
                    marked.setdefault(tok.value.replace("$", "").upper(), tok.value)
            comp = _Compiled(fn, [marked.get(k, k) for k in fn.inputs], anchored, shape)
            self._compiled[key] = comp
        if comp.anchored:
            self._compiled[fast] = comp  # later cells of this shape skip the translation
        if comp.anchored:
            return comp, cell.row - ANCHOR_ROW, cell.col - ANCHOR_COL
        return comp, 0, 0

    def _resolve(self, ref: str, here: str) -> _Range | None:
        m = _SIMPLE.match(ref)
        if m:
            r1, c1 = int(m.group(2)), col_number(m.group(1))
            if m.group(3):
                r2, c2 = int(m.group(4)), col_number(m.group(3))
                return _Range(here, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))
            return _Range(here, r1, c1, r1, c1)
        if ref.upper() in self.book.names:
            target = self.book.names[ref.upper()]
            return self._resolve(target.replace("$", ""), here)
        sheet, _, addr = ref.rpartition("!")
        sheet = sheet.strip("'").replace("''", "'")
        sname = self._sheet_upper.get(sheet.upper(), None) if sheet else here
        if sname is None:
            return None
        addr = addr.replace("$", "")
        mr, mc = self._max.get(sname, (1, 1))
        m = re.match(r"^([A-Z]{1,3}):([A-Z]{1,3})$", addr, re.IGNORECASE)
        if m:
            return _Range(sname, 1, col_number(m.group(1)), max(mr, 1), col_number(m.group(2)))
        m = re.match(r"^(\d+):(\d+)$", addr)
        if m:
            return _Range(sname, int(m.group(1)), 1, int(m.group(2)), max(mc, 1))
        parts = addr.split(":")
        try:
            ends = [
                (
                    int(re.search(r"\d+", p).group()),
                    col_number(re.match(r"[A-Z]+", p, re.IGNORECASE).group()),
                )
                for p in parts
            ]
        except AttributeError:
            return None
        (r1, c1), (r2, c2) = ends[0], ends[-1]
        return _Range(sname, min(r1, r2), min(c1, c2), max(r1, r2), max(c1, c2))

    # --- running ------------------------------------------------------------------------
    def run(self) -> dict[tuple[str, int, int], Outcome]:
        import formulas  # noqa: F401  (registers the parser grammar before compiling)

        cells = self.book.formula_cells()
        out: dict[tuple[str, int, int], Outcome] = {}
        plan: dict[tuple[str, int, int], tuple] = {}
        for c in cells:
            key = (c.sheet, c.row, c.col)
            if _UNSUPPORTED.search(c.formula):
                out[key] = Outcome(
                    ERROR("#REF!"), "unsupported: external workbook, data table or link"
                )
                continue
            if _POSITIONAL.search(c.formula):
                out[key] = Outcome(
                    ERROR("#VALUE!"),
                    "unsupported: ROW/COLUMN/OFFSET/INDIRECT/CELL need the cell's position",
                )
                continue
            try:
                comp, dr, dc = self._compile(c)
            except Exception as e:
                out[key] = Outcome(
                    ERROR("#NAME?"), f"unsupported: {type(e).__name__} while parsing"
                )
                continue
            if comp.anchored:
                if comp.fast_inputs is None:
                    comp.fast_inputs = [_parse_plain(ref) for ref in comp.inputs]
                ranges = []
                for ref, fast in zip(comp.inputs, comp.fast_inputs):
                    if fast is not None:  # a plain reference on this sheet: shift by arithmetic
                        (r1, c1, r2, c2), (a1, b1, a2, b2) = fast
                        rr1, cc1 = r1 if a1 else r1 + dr, c1 if b1 else c1 + dc
                        rr2, cc2 = r2 if a2 else r2 + dr, c2 if b2 else c2 + dc
                        if min(rr1, cc1, rr2, cc2) < 1:
                            ranges.append(None)  # #REF!
                        else:
                            ranges.append(
                                _Range(
                                    c.sheet,
                                    min(rr1, rr2),
                                    min(cc1, cc2),
                                    max(rr1, rr2),
                                    max(cc1, cc2),
                                )
                            )
                        continue
                    try:
                        ranges.append(self._resolve(shift_ref(ref, dr, dc), c.sheet))
                    except ValueError:
                        ranges.append(None)  # #REF!
            else:
                ranges = [self._resolve(ref, c.sheet) for ref in comp.inputs]
            plan[key] = (c, comp, ranges)

        # dependencies between formula cells (spilled ranges depend on their anchor)
        by_sheet_col: dict[tuple[str, int], list[int]] = {}
        owner: dict[tuple[str, int, int], tuple[str, int, int]] = {}
        for key in plan:
            by_sheet_col.setdefault((key[0], key[2]), []).append(key[1])
            c = plan[key][0]
            if c.array_ref:
                rng = self._resolve(c.array_ref, c.sheet)
                for r in range(rng.r1, rng.r2 + 1):
                    for cc in range(rng.c1, rng.c2 + 1):
                        if (c.sheet, r, cc) != key:
                            owner[(c.sheet, r, cc)] = key
                            by_sheet_col.setdefault((c.sheet, cc), []).append(r)
        for rows in by_sheet_col.values():
            rows.sort()
        graph: dict = {}
        for key, (_c, _comp, ranges) in plan.items():
            deps = set()
            for rng in ranges:
                if rng is None:
                    continue
                for cc in range(rng.c1, rng.c2 + 1):
                    rows = by_sheet_col.get((rng.sheet, cc))
                    if not rows:
                        continue
                    for r in rows[bisect_left(rows, rng.r1) : bisect_right(rows, rng.r2)]:
                        dep = owner.get((rng.sheet, r, cc), (rng.sheet, r, cc))
                        if dep != key:
                            deps.add(dep)
            graph[key] = deps
        values: dict[tuple[str, int, int], object] = {
            k: c.cached for k, c in self.book.cells.items() if c.formula is None and c.has_cached
        }
        batches = self._batches(plan, graph) if self.batch else {}
        member_of = {m: b for b, members in batches.items() for m in members}
        if batches:
            bgraph: dict = {}
            for key, deps in graph.items():
                node = member_of.get(key, key)
                bgraph.setdefault(node, set()).update(member_of.get(d, d) for d in deps)
            for node, deps in bgraph.items():
                deps.discard(node)
            try:
                order = list(graphlib.TopologicalSorter(bgraph).static_order())
            except graphlib.CycleError:  # batching can join what a cycle test must see apart
                batches, member_of = {}, {}
                order = self._order(graph, out)
        else:
            order = self._order(graph, out)

        total = len(order)
        for i, node in enumerate(order):
            if node in batches:
                self._run_batch(batches[node], plan, values, out)
            elif node in plan:
                self._run_cell(node, plan, values, out)
            if self.progress and (i % 200 == 0 or i == total - 1):
                self.progress(i + 1, total)
        return out

    def evaluate(self, sheet: str, row: int, col: int, formula: str, values: dict):
        """Value of *formula* (without "=") as if it stood in (sheet, row, col), reading
        *values*; used by the audit to show the value of an argument expression."""
        cell = Cell(sheet, row, col, formula=formula)
        comp, dr, dc = self._compile(cell)
        ranges = []
        for ref in comp.inputs:
            try:
                ranges.append(
                    self._resolve(shift_ref(ref, dr, dc) if comp.anchored else ref, sheet)
                )
            except ValueError:
                ranges.append(None)
        res = np.asarray(comp.fn(*[self._value_of(r, values) for r in ranges]), dtype=object)
        return _plain(res.reshape(-1)[0]) if res.size == 1 else res

    def _run_cell(self, key, plan, values, out) -> None:
        c, comp, ranges = plan[key]
        try:
            args = [self._value_of(rng, values) for rng in ranges]
            self._store(c, comp.fn(*args), values, out)
        except Exception as e:
            out[key] = Outcome(ERROR("#VALUE!"), f"engine: {type(e).__name__}")
            values[key] = ERROR("#VALUE!")

    def _batches(self, plan: dict, graph: dict) -> dict:
        """Same-shape cells of one column whose inputs are single cells and whose functions
        are all elementwise: evaluated together in one vectorised call."""
        groups: dict = {}
        for key, (c, comp, ranges) in plan.items():
            if not comp.anchored or c.array_ref or not _elementwise(comp):
                continue
            if any(r is None or r.r1 != r.r2 or r.c1 != r.c2 for r in ranges):
                continue
            groups.setdefault((c.sheet, c.col, id(comp)), []).append(key)
        batches = {}
        for gkey, members in groups.items():
            if len(members) < 2:
                continue
            mset = set(members)
            if any(graph[m] & mset for m in members):  # a running total: keep cell by cell
                continue
            batches[("batch",) + gkey] = sorted(members)
        return batches

    def _run_batch(self, members: list, plan: dict, values: dict, out: dict) -> None:
        c0, comp, _ = plan[members[0]]
        k = len(members)
        args = []
        for i in range(len(comp.inputs)):
            col = [self._value_of(plan[m][2][i], values) for m in members]
            first = col[0]
            if all(v is first or (type(v) is type(first) and v == first) for v in col):
                args.append(first)
            else:
                arr = np.empty((k, 1), dtype=object)
                for j, v in enumerate(col):
                    arr[j, 0] = v
                args.append(arr)
        try:
            res = np.asarray(comp.fn(*args), dtype=object)
        except Exception:
            res = None
        if res is None or not (res.size == 1 or res.shape in ((k, 1), (k,))):
            for m in members:  # not elementwise after all: one by one
                self._run_cell(m, plan, values, out)
            return
        flat = res.reshape(-1)
        for j, m in enumerate(members):
            v = _plain(flat[0] if flat.size == 1 else flat[j])
            values[m] = v
            out[m] = Outcome(v)

    def _order(self, graph: dict, out: dict) -> list:
        while True:
            try:
                return list(graphlib.TopologicalSorter(graph).static_order())
            except graphlib.CycleError as e:
                cycle = set(e.args[1])
                for key in cycle:
                    out[key] = Outcome(ERROR("#REF!"), "circular reference")
                    graph.pop(key, None)
                # cells that depend on the cycle keep the dependency; they will read the
                # error value stored for the cycle's cells
                for deps in graph.values():
                    deps -= cycle

    def _value_of(self, rng: _Range | None, values: dict):
        import schedula as sh
        from formulas.tokens.operand import Error

        if rng is None:
            return Error.errors["#REF!"]
        if rng.r1 == rng.r2 and rng.c1 == rng.c2:
            return _as_formula_value(values.get((rng.sheet, rng.r1, rng.c1), sh.EMPTY))
        h, w = rng.r2 - rng.r1 + 1, rng.c2 - rng.c1 + 1
        if h * w > 5_000_000:
            raise MemoryError("range too large")
        arr = np.empty((h, w), dtype=object)
        arr[:] = sh.EMPTY
        for (s, r, c), v in values.items() if h * w > len(values) else ():
            if s == rng.sheet and rng.r1 <= r <= rng.r2 and rng.c1 <= c <= rng.c2:
                arr[r - rng.r1, c - rng.c1] = _as_formula_value(v)
        if h * w <= len(values):
            for r in range(rng.r1, rng.r2 + 1):
                for c in range(rng.c1, rng.c2 + 1):
                    v = values.get((rng.sheet, r, c), sh.EMPTY)
                    if v is not sh.EMPTY:
                        arr[r - rng.r1, c - rng.c1] = _as_formula_value(v)
        return arr

    def _store(self, c: Cell, res, values: dict, out: dict) -> None:
        key = (c.sheet, c.row, c.col)
        arr = np.asarray(res, dtype=object)
        if c.array_ref:
            rng = self._resolve(c.array_ref, c.sheet)
            for r in range(rng.r1, rng.r2 + 1):
                for cc in range(rng.c1, rng.c2 + 1):
                    i, j = r - rng.r1, cc - rng.c1
                    if arr.ndim == 2 and i < arr.shape[0] and j < arr.shape[1]:
                        v = _plain(arr[i, j])
                    elif arr.ndim == 0 or arr.size == 1:
                        v = _plain(arr.reshape(-1)[0])
                    else:
                        v = ERROR("#N/A")
                    values[(c.sheet, r, cc)] = v
                    out[(c.sheet, r, cc)] = Outcome(v)
            return
        v = _plain(arr.reshape(-1)[0]) if arr.size >= 1 else ERROR("#VALUE!")
        values[key] = v
        out[key] = Outcome(v)


# built-ins that act cell by cell on arrays (aggregates such as SUM or MIN are not)
_ELEMENTWISE = {
    "IF",
    "IFERROR",
    "IFNA",
    "ROUND",
    "ROUNDUP",
    "ROUNDDOWN",
    "ABS",
    "SQRT",
    "EXP",
    "LN",
    "LOG10",
    "POWER",
    "SIN",
    "COS",
    "TAN",
    "PI",
    "INT",
    "MOD",
    "SIGN",
    "NOT",
    "ISNUMBER",
    "ISERROR",
    "ISERR",
    "ISTEXT",
    "ISBLANK",
    "TRUNC",
    "DEGREES",
    "RADIANS",
}
_CALLS = re.compile(r"([A-Z][A-Z0-9_.]*)\s*\(", re.IGNORECASE)
_OURS_ELEMENTWISE = {
    f.name for f in CATALOG if f.elementwise and not any(a.type == "range" for a in f.args)
}


def _elementwise(comp: _Compiled) -> bool:
    text = getattr(comp, "text", "")
    names = {n.upper() for n in _CALLS.findall(text)}
    return all(n in _ELEMENTWISE or n in _OURS_ELEMENTWISE for n in names)


def _plain(x):
    """A formula-library value as a plain cell value."""
    import schedula as sh
    from formulas.tokens.operand import XlError

    if isinstance(x, XlError):
        return ERROR(str(x))
    if x is sh.EMPTY:
        return 0.0
    if isinstance(x, (bool, np.bool_)):
        return bool(x)
    if isinstance(x, (int, float, np.integer, np.floating)):
        return float(x)
    if isinstance(x, str):
        return x
    return str(x)


def _as_formula_value(v):
    from formulas.tokens.operand import Error

    if isinstance(v, tuple) and len(v) == 2 and v[0] == "error":
        return Error.errors.get(v[1], Error.errors["#VALUE!"])
    return v
