"""Sensitivity coefficients and uncertainty of the results of a saved workbook.

For each chosen result y and every numeric input cell xᵢ among its precedents, the
sensitivity coefficient cᵢ = ∂y/∂xᵢ is found by central differences through the engine,
re-evaluating only the cells that lie between that input and the result:

.. math::

    c_i \\approx \\frac{y(x_i + h) - y(x_i - h)}{2h},

once with a step h and once with h/2; the two must agree (else the chain is not smooth
there: an IF that switches, a ROUND, a lookup, a phase boundary) and their Richardson
combination (4·D(h/2) − D(h))/3 is reported. With standard uncertainties u(xᵢ) the law of
propagation of uncertainty (JCGM 100:2008, §5.1.2, uncorrelated inputs) gives

.. math::

    u_c^2(y) = \\sum_i (c_i\\,u(x_i))^2, \\qquad U = k\\,u_c,

and the Welch–Satterthwaite effective degrees of freedom (JCGM 100:2008, G.4.1)
ν_eff = u_c⁴ / Σ (cᵢ u(xᵢ))⁴ / νᵢ where degrees of freedom are given. Monte Carlo
(JCGM 101:2008) propagates the inputs' distributions through the workbook: the chain is
copied once per draw, one band of rows below the other, so that the engine evaluates each
formula of the chain for a whole block of draws in one vectorised call (its column path).

References
----------
.. [1] JCGM 100:2008, Evaluation of measurement data — Guide to the expression of
   uncertainty in measurement (GUM), §5.1.2 (law of propagation), §4.3.7 and §4.3.9
   (rectangular and triangular distributions), G.4.1 (Welch–Satterthwaite).
.. [2] JCGM 101:2008, Evaluation of measurement data — Supplement 1 to the GUM:
   propagation of distributions using a Monte Carlo method, §7.7 (probabilistically
   symmetric coverage interval), §8 (comparison with the law of propagation).

Examples
--------
>>> Uncertainty.parse("Sheet!B9=0.5").u
0.5
>>> round(Uncertainty.parse("Sheet!B9=0.3:rectangular").u, 6)   # a/sqrt(3)
0.173205
>>> Uncertainty.parse("Sheet!B9=1.0:normal:k=2").u
0.5
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from .engine import Engine, Outcome
from .reader import Book, Cell, col_letters
from .refs import parse_ref, tokens

__all__ = [
    "Uncertainty",
    "InputSensitivity",
    "ResultSensitivity",
    "Report",
    "analyse",
    "Chain",
    "uncertainties_in_book",
    "may_state_uncertainties",
    "to_json",
    "to_markdown",
    "console_lines",
    "render_html",
    "schema",
]

#: functions whose result jumps or is flat in its inputs: a derivative through them is only
#: meaningful where both steps agree and the result is not flat
STEP_FUNCTIONS = frozenset(
    """IF IFS IFERROR IFNA SWITCH CHOOSE ROUND ROUNDUP ROUNDDOWN INT TRUNC CEILING FLOOR
    CEILING.MATH FLOOR.MATH MROUND EVEN ODD SIGN VLOOKUP HLOOKUP LOOKUP XLOOKUP MATCH XMATCH
    INDEX MIN MAX MINA MAXA MINIFS MAXIFS ABS MOD FIXED TEXT""".split()
)
#: functions that read where a cell is, or references built at run time: such a chain
#: cannot be copied one band of rows below the other for Monte Carlo
_POSITIONAL = frozenset(
    "ROW INDIRECT OFFSET CELL ADDRESS FORMULATEXT ISFORMULA SHEET SHEETS INFO".split()
)
_DISTRIBUTIONS = ("normal", "rectangular", "triangular")
MAX_ROWS = 1_048_576
#: cells of one Monte Carlo block handed to the engine at once (time and memory)
BLOCK_CELLS = 120_000


def where(key) -> str:
    """``Sheet!B12`` of a cell key ``(sheet, row, col)``."""
    return f"{key[0]}!{col_letters(key[2])}{key[1]}"


def parse_where(text: str, sheets: list[str] | None = None):
    """A cell key from ``Sheet!B12`` (a quoted sheet name allowed); BadInput names it."""
    from joulebook.core.errors import BadInput

    ref = parse_ref(text.strip())
    if ref is None or ref.kind != "cell" or ref.sheet is None or ref.book is not None:
        raise BadInput(f"cell = {text!r} is not a cell address such as Sheet1!B12")
    sheet = ref.sheet
    if sheets is not None:
        match = {s.upper(): s for s in sheets}.get(sheet.upper())
        if match is None:
            raise BadInput(f"cell = {text!r}: no sheet {sheet!r} (sheets: {', '.join(sheets)})")
        sheet = match
    return (sheet, ref.r1, ref.c1)


@dataclass
class Uncertainty:
    """The uncertainty of one input cell, in the cell's own unit.

    Parameters
    ----------
    key : tuple
        The input cell ``(sheet, row, col)``.
    u : float
        Standard uncertainty, in the unit of the cell's value.
    distribution : str
        ``normal``, ``rectangular`` or ``triangular`` (symmetric; the half-width is
        √3·u or √6·u).
    dof : float or None
        Degrees of freedom of u (None: infinite).
    source : str
        Where it was stated (``command line``, ``cell Sheet!C9``, ``name u_fill_T``).

    Examples
    --------
    >>> Uncertainty(("S", 9, 2), 0.5).half_width is None
    True
    """

    key: tuple
    u: float
    distribution: str = "normal"
    dof: float | None = None
    source: str = "command line"

    @property
    def half_width(self) -> float | None:
        """The half-width a of a rectangular or triangular distribution, else None."""
        if self.distribution == "rectangular":
            return self.u * math.sqrt(3.0)
        if self.distribution == "triangular":
            return self.u * math.sqrt(6.0)
        return None

    @classmethod
    def parse(cls, text: str, sheets: list[str] | None = None) -> Uncertainty:
        """``Sheet!B9=0.5[:normal|rectangular|triangular][:k=2][:dof=10]``.

        A normal value is a standard uncertainty (an expanded one with ``k=``); a
        rectangular or triangular value is the half-width a of the distribution
        (u = a/√3, a/√6; JCGM 100:2008 §4.3.7, §4.3.9).
        """
        from joulebook.core.errors import BadInput

        cell, eq, rest = text.partition("=")
        if not eq:
            raise BadInput(f"u = {text!r}: write CELL=VALUE, e.g. Sheet1!B9=0.5")
        parts = [p.strip() for p in rest.split(":")]
        try:
            value = float(parts[0])
        except ValueError:
            raise BadInput(f"u = {text!r}: {parts[0]!r} is not a number") from None
        if not math.isfinite(value) or value < 0:
            raise BadInput(f"u = {text!r}: the uncertainty must be a finite number ≥ 0")
        dist, k, dof = "normal", 1.0, None
        for p in parts[1:]:
            low = p.lower()
            if low in _DISTRIBUTIONS:
                dist = low
            elif low.startswith("k="):
                k = _positive(low[2:], text, "k")
            elif low.startswith("dof="):
                dof = _positive(low[4:], text, "dof")
            else:
                raise BadInput(
                    f"u = {text!r}: {p!r} is not one of normal, rectangular, triangular, k=…, dof=…"
                )
        key = parse_where(cell, sheets)
        return cls(key, _standard(value, dist, k), dist, dof, "command line")


def _positive(s: str, text: str, what: str) -> float:
    from joulebook.core.errors import BadInput

    try:
        v = float(s)
    except ValueError:
        raise BadInput(f"u = {text!r}: {what} = {s!r} is not a number") from None
    if not (math.isfinite(v) and v > 0):
        raise BadInput(f"u = {text!r}: {what} = {s} must be above 0")
    return v


def _standard(value: float, dist: str, k: float) -> float:
    if dist == "rectangular":
        return value / math.sqrt(3.0)
    if dist == "triangular":
        return value / math.sqrt(6.0)
    return value / k


@dataclass
class InputSensitivity:
    """What one input does to one result."""

    key: tuple
    label: str
    unit: str
    value: object
    c: float | None = None  # ∂y/∂x, result unit per input unit
    relative: float | None = None  # (∂y/y)/(∂x/x)
    step: float | None = None
    u: float | None = None
    distribution: str = ""
    dof: float | None = None
    source: str = ""
    problem: str = ""  # why no coefficient (text input, refusal, not smooth)

    @property
    def contribution(self) -> float | None:
        """|cᵢ|·u(xᵢ), in the result's unit."""
        if self.c is None or self.u is None:
            return None
        return abs(self.c) * self.u


@dataclass
class ResultSensitivity:
    """The sensitivity and uncertainty of one result cell."""

    key: tuple
    label: str
    unit: str
    value: object
    inputs: list[InputSensitivity] = field(default_factory=list)
    k: float = 2.0
    u_c: float | None = None
    U: float | None = None
    dof: float | None = None
    mc: dict | None = None
    notes: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        """False when a coefficient or the Monte Carlo run could not be trusted."""
        return not any(i.problem and i.problem != TEXT_INPUT for i in self.inputs) and not (
            self.mc and self.mc.get("disagrees")
        )


TEXT_INPUT = "text: listed, not perturbed"


@dataclass
class Report:
    """Everything ``joulebook sensitivity`` found in one workbook."""

    path: str
    results: list[ResultSensitivity]
    k: float = 2.0
    draws: int = 0
    notes: list[str] = field(default_factory=list)


# --------------------------------------------------------------------------------------------
# the workbook as a graph of cells


def _is_number(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)


class Chain:
    """The cells of *book* and what each formula cell reads, after one recompute.

    Parameters
    ----------
    book : Book
        The workbook as read.
    outcomes : dict
        The engine's outcomes of *book* (``Engine(book).run()``).
    """

    def __init__(self, book: Book, outcomes: dict[tuple, Outcome]):
        self.book = book
        self.outcomes = outcomes
        self.values: dict = {}
        for k, c in book.cells.items():
            if c.formula is None and c.has_cached:
                self.values[k] = c.cached
        for k, o in outcomes.items():
            self.values[k] = o.value
        self._rows: dict = {}
        for s, r, c in list(book.cells) + list(outcomes):
            self._rows.setdefault((s, c), set()).add(r)
        self._max = {}
        for (s, c), rows in self._rows.items():
            mr, mc = self._max.get(s, (0, 0))
            self._max[s] = (max(mr, max(rows)), max(mc, c))
        self.reads: dict = {}  # formula cell -> set of keys it reads
        self.boxes: dict = {}  # formula cell -> list of (sheet, r1, c1, r2, c2)
        self.functions: dict = {}  # formula cell -> set of function names
        self.bandable: dict = {}  # formula cell -> "" or why it cannot be copied in bands
        for c in book.formula_cells():
            self._add(c)
        self._engine: Engine | None = None
        self.readers: dict = {}
        for k, deps in self.reads.items():
            for d in deps:
                self.readers.setdefault(d, set()).add(k)

    def engine(self) -> Engine:
        """An engine that has recomputed the workbook (made once, on first use)."""
        if self._engine is None:
            self._engine = Engine(self.book)
            self._engine.run()
        return self._engine

    def _add(self, c: Cell) -> None:
        key = (c.sheet, c.row, c.col)
        deps, boxes, funcs, why = set(), [], set(), ""
        try:
            toks = tokens(c.formula)
        except Exception:
            toks = ()
            why = "formula not understood"
        for v, t, sub in toks:
            if t == "FUNC" and sub == "OPEN":
                name = v[:-1].upper()
                name = name.removeprefix("_XLFN.").removeprefix("_XLWS.")
                funcs.add(name)
                if name in _POSITIONAL:
                    why = why or f"{name} reads where the cell is"
            elif t == "OPERAND" and sub == "RANGE":
                ref = parse_ref(v)
                if ref is None:
                    why = why or f"reference {v} not understood"
                    continue
                if ref.kind in ("name", "table"):
                    target = self._name(ref.text, c.sheet)
                    why = why or f"{ref.text} is a name or a table"
                    if target is None:
                        continue
                    ref = target
                if ref.book is not None or ref.sheet2 is not None:
                    why = why or f"{v} is an external or 3-D reference"
                    continue
                if ref.kind in ("cols", "rows"):
                    why = why or f"{v} spans whole columns or rows"
                sheet = self._sheet(ref.sheet or c.sheet)
                box = ref.placed(0, 0)
                if box is None or sheet is None:
                    continue
                r1, c1, r2, c2 = box
                mr, mc = self._max.get(sheet, (0, 0))
                r2, c2 = min(r2, mr), min(c2, mc)
                boxes.append((sheet, box[0], box[1], box[2], box[3]))
                for cc in range(c1, c2 + 1):
                    for r in self._rows.get((sheet, cc), ()):
                        if r1 <= r <= r2:
                            deps.add((sheet, r, cc))
        if c.array_ref:
            why = why or "an array formula"
        deps.discard(key)
        self.reads[key] = deps
        self.boxes[key] = boxes
        self.functions[key] = funcs
        self.bandable[key] = why

    def _sheet(self, name: str) -> str | None:
        for s in self.book.sheets:
            if s.upper() == name.upper():
                return s
        return None

    def _name(self, name: str, sheet: str):
        text = self.book.local_names.get((sheet, name.upper())) or self.book.names.get(
            name.upper(), self.book.names.get(name)
        )
        if not text:
            return None
        ref = parse_ref(text.lstrip("="))
        if ref is None or ref.kind in ("name", "table"):
            return None
        return ref

    def upstream(self, key) -> set:
        """Every cell *key* depends on, formulas and inputs."""
        seen, stack = set(), [key]
        while stack:
            k = stack.pop()
            for d in self.reads.get(k, ()):
                if d not in seen:
                    seen.add(d)
                    stack.append(d)
        return seen

    def downstream(self, keys) -> set:
        """Every formula cell that depends on any of *keys* (themselves included)."""
        seen, stack = set(keys), list(keys)
        while stack:
            k = stack.pop()
            for d in self.readers.get(k, ()):
                if d not in seen:
                    seen.add(d)
                    stack.append(d)
        return seen

    def between(self, keys, result) -> set:
        """The formula cells on a path from any of *keys* to *result* (*result* included)."""
        up = self.upstream(result) | {result}
        return {k for k in self.downstream(keys) & up if k in self.reads}

    def order(self, live: set) -> list:
        """The formula cells of *live*, each after the cells of *live* it reads."""
        import graphlib

        graph = {k: [d for d in self.reads.get(k, ()) if d in live] for k in live}
        return list(graphlib.TopologicalSorter(graph).static_order())

    def is_formula(self, key) -> bool:
        return key in self.reads

    def inputs_of(self, key) -> list:
        """The constant cells among the precedents of *key*, in sheet and row order."""
        order = {s: i for i, s in enumerate(self.book.sheets)}
        ins = [
            k
            for k in self.upstream(key)
            if not self.is_formula(k)
            and k in self.book.cells
            and self.book.cells[k].has_cached
            and self.book.cells[k].cached not in ("", None)
        ]
        return sorted(ins, key=lambda k: (order.get(k[0], 0), k[1], k[2]))

    def default_results(self) -> list:
        """Joulebook calls and the formula cells no formula reads (ends of chains) that hold
        a number."""
        out = []
        order = {s: i for i, s in enumerate(self.book.sheets)}
        for k in self.reads:
            cell = self.book.cells[k]
            ours = "JB_" in (cell.formula or "").upper()
            end = not self.readers.get(k)
            if (ours or end) and _is_number(self.values.get(k)) and self.inputs_of(k):
                out.append(k)
        return sorted(out, key=lambda k: (order.get(k[0], 0), k[1], k[2]))

    def label(self, key) -> str:
        """The nearest text to the left in the row, else above in the column."""
        s, r, c = key
        for cc in range(c - 1, max(0, c - 6), -1):
            v = self._text(s, r, cc)
            if v:
                return v
        for rr in range(r - 1, max(0, r - 4), -1):
            v = self._text(s, rr, c)
            if v:
                return v
        return ""

    def unit(self, key) -> str:
        """The unit written in the cell to the right, or in brackets in the label."""
        s, r, c = key
        right = self._text(s, r, c + 1)
        if right and len(right) <= 16 and " " not in right.strip():
            return right.strip()
        label = self.label(key)
        for o, cl in (("[", "]"), ("(", ")")):
            if label.endswith(cl) and o in label:
                return label[label.rindex(o) + 1 : -1].strip()
        return ""

    def _text(self, s, r, c) -> str:
        cell = self.book.cells.get((s, r, c))
        if cell and cell.formula is None and isinstance(cell.cached, str):
            return cell.cached.strip()
        return ""


# --------------------------------------------------------------------------------------------
# uncertainties written in the workbook

_U_HEADINGS = ("u", "±", "+/-", "u(x)", "uncertainty", "standard uncertainty")


def uncertainties_in_book(chain: Chain) -> dict:
    """Uncertainties the workbook states, by input cell (docs/uncertainty.md).

    Two conventions: a defined name ``u_<NAME>`` where ``<NAME>`` names the input cell; or,
    in the row of an input value, a number in a column headed ``u``, ``±``, ``+/-``,
    ``u(x)`` or ``uncertainty`` (the heading is the nearest text above in that column; it
    may end with a distribution word — ``± rectangular`` is a half-width — or ``k=2``).
    """
    book = chain.book
    out: dict = {}
    for name, text in book.names.items():
        if not name.upper().startswith("U_"):
            continue
        of = book.names.get(name[2:].upper()) or book.names.get(name[2:])
        if of is None:
            continue
        ref_in, ref_u = parse_ref(of.lstrip("=")), parse_ref(text.lstrip("="))
        if ref_in is None or ref_in.kind != "cell" or not ref_in.sheet:
            continue
        key = (chain._sheet(ref_in.sheet) or ref_in.sheet, ref_in.r1, ref_in.c1)
        value = None
        if ref_u is not None and ref_u.kind == "cell" and ref_u.sheet:
            value = chain.values.get((chain._sheet(ref_u.sheet) or ref_u.sheet, ref_u.r1, ref_u.c1))
        else:
            try:
                value = float(text.lstrip("="))
            except ValueError:
                value = None
        if _is_number(value) and value >= 0:
            out[key] = Uncertainty(key, float(value), source=f"name {name}")
    for (s, r, c), cell in book.cells.items():
        if cell.formula is not None or not _is_number(cell.cached):
            continue
        head = _heading(chain, s, r, c)
        if head is None:
            continue
        words = head.lower().replace("(", " ").replace(")", " ").split()
        dist = next((w for w in words if w in _DISTRIBUTIONS), "normal")
        k = 1.0
        for w in words:
            if w.startswith("k="):
                try:
                    k = float(w[2:])
                except ValueError:
                    pass
        # the value it qualifies: the nearest number to the left in the row
        for cc in range(c - 1, max(0, c - 4), -1):
            v = book.cells.get((s, r, cc))
            if v is not None and v.formula is None and _is_number(v.cached):
                key = (s, r, cc)
                if key not in out and float(cell.cached) >= 0:
                    out[key] = Uncertainty(
                        key,
                        _standard(float(cell.cached), dist, k if k > 0 else 1.0),
                        dist,
                        None,
                        f"cell {where((s, r, c))}",
                    )
                break
    return out


def may_state_uncertainties(book: Book) -> bool:
    """A quick look, without reading any formula: does *book* have a ``u_…`` name or a text
    cell that could head a column of uncertainties?"""
    if any(n.upper().startswith("U_") for n in book.names):
        return True
    for c in book.cells.values():
        if c.formula is None and isinstance(c.cached, str):
            words = c.cached.strip().lower().split()
            if words and (words[0] in _U_HEADINGS or c.cached.strip().lower() in _U_HEADINGS):
                return True
    return False


def _heading(chain: Chain, s, r, c) -> str | None:
    for rr in range(r - 1, 0, -1):
        t = chain._text(s, rr, c)
        if t:
            first = t.lower().split()[0] if t.split() else ""
            return t if first in _U_HEADINGS or t.lower() in _U_HEADINGS else None
        cell = chain.book.cells.get((s, rr, c))
        if cell is not None and not _is_number(cell.cached):
            return None
    return None


# --------------------------------------------------------------------------------------------
# evaluating a part of the workbook


def _sub_book(chain: Chain, live: set, changed: dict) -> Book:
    """*book* with every formula cell outside *live* frozen at its recomputed value and the
    inputs in *changed* set to new values."""
    book = chain.book
    cells = {}
    for k, c in book.cells.items():
        if k in changed:
            cells[k] = Cell(k[0], k[1], k[2], cached=changed[k], has_cached=True)
        elif c.formula is not None and k not in live:
            cells[k] = Cell(k[0], k[1], k[2], cached=chain.values.get(k), has_cached=True)
        else:
            cells[k] = c
    for k, v in chain.values.items():  # spilled values of frozen array formulas
        if k not in cells and k not in live:
            cells[k] = Cell(k[0], k[1], k[2], cached=v, has_cached=True)
    return replace(book, cells=cells)


def _failure(o: Outcome | None) -> str:
    if o is None:
        return "not computed"
    if o.problem:
        return o.problem
    if o.message:
        return o.message
    if isinstance(o.value, tuple):
        return f"the result is the error value {o.value[1]}"
    if not _is_number(o.value):
        return f"the result is not a number ({o.value!r})"
    return ""


def _value_at(chain: Chain, live: set, result, changed: dict) -> tuple[float | None, str]:
    out = Engine(_sub_book(chain, live, changed)).run()
    o = out.get(result)
    why = _failure(o)
    return (None, why) if why else (float(o.value), "")


def _values_at(chain: Chain, live: set, result, key, points: list) -> tuple[list, str]:
    """The result at each of *points* for input *key*: the path's formulas evaluated once
    for all points (the engine's column path), else one sub-workbook run per point."""
    order = chain.order(live)
    try:
        values, messages = chain.engine().evaluate_columns(order, {key: points})[result]
    except ValueError:
        pairs = [_value_at(chain, live, result, {key: p}) for p in points]
        values = [y for y, _ in pairs]
        messages = [w for _, w in pairs]
    out = []
    for p, v, msg in zip(points, values, messages):
        why = msg or ("" if _is_number(v) else f"the result is {_shown(v)}")
        if why:
            return [], f"refused at {where(key)} = {p:.6g}: {why}"
        out.append(float(v))
    return out, ""


def _shown(v) -> str:
    if isinstance(v, tuple):
        return f"the error value {v[1]}"
    return repr(v)


def _step(x: float) -> float:
    return 1e-4 * abs(x) if x != 0 else 1e-4


def coefficient(chain: Chain, result, key) -> tuple[float | None, float | None, str]:
    """∂result/∂key by central differences with steps h and h/2 (Richardson), or a reason.

    Returns
    -------
    (c, h, problem)
    """
    x = chain.values.get(key)
    if not _is_number(x):
        return None, None, TEXT_INPUT
    x = float(x)
    live = chain.between([key], result)
    h = _step(x)
    points = [x + h, x - h, x + h / 2, x - h / 2]
    ys, problem = _values_at(chain, live, result, key, points)
    if problem:
        return None, h, problem
    d = [(ys[0] - ys[1]) / (2 * h), (ys[2] - ys[3]) / h]
    y0 = chain.values.get(result)
    scale = max(abs(d[0]), abs(d[1]), abs(float(y0)) / max(abs(x), 1e-300) * 1e-9, 1e-300)
    if abs(d[0] - d[1]) > 1e-3 * scale:
        return (
            None,
            h,
            f"not smooth at {where(key)} = {x:.6g}: steps h and h/2 give "
            f"{d[0]:.6g} and {d[1]:.6g} (an IF that switches, a rounding, a lookup or a "
            "phase boundary)",
        )
    steps = {f for k in live for f in chain.functions.get(k, ())} & STEP_FUNCTIONS
    if d[0] == 0 and d[1] == 0 and steps:
        return (
            None,
            h,
            f"flat at {where(key)}: the result does not move within ±{h:.3g} "
            f"through {', '.join(sorted(steps))}; no derivative through a step function",
        )
    return (4 * d[1] - d[0]) / 3, h, ""


# --------------------------------------------------------------------------------------------
# Monte Carlo through the column path


def _shifted(formula: str, dr: int) -> str:
    """*formula* with every cell and area reference moved *dr* rows and written relative."""
    out = []
    for v, t, sub in tokens(formula):
        if t == "OPERAND" and sub == "RANGE":
            ref = parse_ref(v)
            if ref is not None and ref.kind in ("cell", "area"):
                head = v[: v.rindex("!") + 1] if "!" in v else ""
                a = f"{col_letters(ref.c1)}{ref.r1 + dr}"
                if ref.kind == "area":
                    a += f":{col_letters(ref.c2)}{ref.r2 + dr}"
                out.append(head + a)
                continue
        out.append(v)
    return "".join(out)


def _bands(chain: Chain, live: set, result) -> tuple[str, int, int]:
    """Why the chain cannot be copied in bands ("" when it can), its first row, its height."""
    for k in live:
        why = chain.bandable.get(k, "")
        if why:
            return f"{where(k)}: {why}", 0, 0
    rows = []
    for k in live:
        rows.append(k[1])
        for _sheet, r1, _c1, r2, _c2 in chain.boxes.get(k, ()):
            rows += [r1, r2]
    lo, hi = min(rows), max(rows)
    return "", lo, hi - lo + 1


def _draws(uncs: list[Uncertainty], x0: list[float], n: int, rng) -> list:
    import numpy as np

    cols = []
    for u, x in zip(uncs, x0):
        if u.distribution == "rectangular":
            a = u.half_width
            cols.append(rng.uniform(x - a, x + a, n))
        elif u.distribution == "triangular":
            a = u.half_width
            cols.append(rng.triangular(x - a, x, x + a, n) if a > 0 else np.full(n, x))
        else:
            cols.append(rng.normal(x, u.u, n))
    return cols


#: draws evaluated together by the column path (memory: one object per cell and draw)
COLUMN_BLOCK = 20_000


def _by_columns(chain: Chain, live: set, result, keys, cols, ys, refusals) -> str:
    """Monte Carlo through :meth:`Engine.evaluate_columns`: each formula of the path once per
    block of draws. Returns how it ran, or "" when the path cannot be run this way."""
    order = chain.order(live)
    eng = chain.engine()
    n = len(ys)
    for start in range(0, n, COLUMN_BLOCK):
        stop = min(n, start + COLUMN_BLOCK)
        try:
            got = eng.evaluate_columns(
                order, {k: [float(v) for v in c[start:stop]] for k, c in zip(keys, cols)}
            )
        except ValueError:
            return ""
        values, messages = got[result]
        for j, (v, msg) in enumerate(zip(values, messages)):
            if msg or not _is_number(v):
                w = msg or f"the result is {v[1] if isinstance(v, tuple) else repr(v)}"
                refusals[w] = refusals.get(w, 0) + 1
            else:
                ys[start + j] = float(v)
    return f"column path: {len(live)} formula cells, each evaluated per block of {COLUMN_BLOCK:,} draws"


def monte_carlo(chain: Chain, result, uncs: list[Uncertainty], n: int, seed: int = 1) -> dict:
    """Propagate the distributions of *uncs* to *result* with *n* draws (JCGM 101:2008).

    The cells between the inputs and the result are copied once per draw, each copy a band
    of rows below the last, every reference made relative so that the copies share one
    formula shape; the engine then evaluates each formula for a whole block of draws in one
    vectorised call. A chain that reads where it is (ROW, OFFSET, INDIRECT), whole columns,
    names or tables is run draw by draw instead (at most 2,000 draws).

    Returns
    -------
    dict
        ``mean``, ``std``, ``low``, ``high`` (95 % probabilistically symmetric interval),
        ``draws``, ``refused`` (draws the model refused) and ``how``.
    """
    import numpy as np

    rng = np.random.default_rng(seed)
    keys = [u.key for u in uncs]
    x0 = [float(chain.values[k]) for k in keys]
    live = chain.between(keys, result)
    why, lo, height = _bands(chain, live, result)
    cols = _draws(uncs, x0, n, rng)
    ys = np.full(n, np.nan)
    refusals: dict = {}
    column = _by_columns(chain, live, result, keys, cols, ys, refusals)
    if column:
        how = column
    elif why:
        if n > 2000:
            from joulebook.core.errors import BadInput

            raise BadInput(
                f"mc = {n}: the chain to {where(result)} cannot be copied for a vectorised "
                f"run ({why}); at most 2000 draws are run one by one"
            )
        for i in range(n):
            y, w = _value_at(chain, live, result, {k: float(c[i]) for k, c in zip(keys, cols)})
            if w:
                refusals[w] = refusals.get(w, 0) + 1
            else:
                ys[i] = y
        how = f"draw by draw ({why})"
    else:
        frozen = _sub_book(chain, live, {})
        band_keys = set(live) | {k for c in live for k in chain.reads.get(c, ()) if k not in live}
        per = max(1, min(BLOCK_CELLS // max(1, len(band_keys)), (MAX_ROWS - lo) // height))
        for start in range(0, n, per):
            m = min(per, n - start)
            cells = {}
            for b in range(m):
                dr = b * height
                for k in band_keys:
                    s, r, c = k
                    nk = (s, r + dr, c)
                    if k in live:
                        src = chain.book.cells[k]
                        cells[nk] = Cell(s, r + dr, c, formula=_shifted(src.formula, dr))
                    else:
                        v = frozen.cells.get(k)
                        cached = v.cached if v is not None else chain.values.get(k)
                        cells[nk] = Cell(s, r + dr, c, cached=cached, has_cached=True)
                for k, col in zip(keys, cols):
                    nk = (k[0], k[1] + dr, k[2])
                    cells[nk] = Cell(
                        nk[0], nk[1], nk[2], cached=float(col[start + b]), has_cached=True
                    )
            book = replace(chain.book, cells=cells, tables=[], data_tables=[])
            out = Engine(book).run()
            for b in range(m):
                o = out.get((result[0], result[1] + b * height, result[2]))
                w = _failure(o)
                if w:
                    refusals[w] = refusals.get(w, 0) + 1
                else:
                    ys[start + b] = float(o.value)
        how = f"bands of rows: {len(live)} formula cells × {n} draws, blocks of {per} draws"
    good = ys[np.isfinite(ys)]
    res: dict = {"draws": n, "refused": int(n - good.size), "how": how}
    if refusals:
        res["refusals"] = dict(sorted(refusals.items(), key=lambda kv: -kv[1])[:5])
    if good.size >= 2:
        res.update(
            mean=float(good.mean()),
            std=float(good.std(ddof=1)),
            low=float(np.quantile(good, 0.025)),
            high=float(np.quantile(good, 0.975)),
        )
    return res


# --------------------------------------------------------------------------------------------
# the analysis


def analyse(
    book: Book,
    outcomes: dict | None = None,
    results: list | None = None,
    uncertainties: list[Uncertainty] | None = None,
    mc: int = 0,
    k: float = 2.0,
    seed: int = 1,
) -> Report:
    """Sensitivity coefficients, GUM uncertainty and (``mc`` > 0) Monte Carlo of results.

    Parameters
    ----------
    book : Book
        The workbook as read (:func:`joulebook.faces.workbook.reader.read_book`).
    outcomes : dict, optional
        Its engine outcomes (computed when not given).
    results : list of (sheet, row, col), optional
        The result cells (default: every joulebook call and every end of a chain).
    uncertainties : list of Uncertainty, optional
        Stated on the command line; they override those the workbook states.
    mc : int
        Monte Carlo draws (0: none).
    k : float
        Coverage factor of the expanded uncertainty U = k·u_c.
    seed : int
        Seed of the random draws (the same seed gives the same report).

    Returns
    -------
    Report
    """
    outcomes = Engine(book).run() if outcomes is None else outcomes
    chain = Chain(book, outcomes)
    stated = uncertainties_in_book(chain)
    for u in uncertainties or ():
        stated[u.key] = u
    report = Report(str(book.path), [], k=k, draws=mc)
    for key in results or chain.default_results():
        report.results.append(_one(chain, key, stated, mc, k, seed))
    unused = [
        u
        for kk, u in stated.items()
        if not any(i.key == kk for r in report.results for i in r.inputs)
    ]
    for u in unused:
        report.notes.append(
            f"the uncertainty of {where(u.key)} ({u.source}) reaches no chosen result"
        )
    return report


def _one(chain: Chain, key, stated: dict, mc: int, k: float, seed: int) -> ResultSensitivity:
    y = chain.values.get(key)
    res = ResultSensitivity(key, chain.label(key), chain.unit(key), y, k=k)
    if not chain.is_formula(key):
        res.notes.append(f"{where(key)} is not a formula cell")
        return res
    o = chain.outcomes.get(key)
    why = _failure(o)
    if why:
        res.notes.append(f"{where(key)} is not a number the engine computed: {why}")
        return res
    for x in chain.inputs_of(key):
        v = chain.values.get(x)
        inp = InputSensitivity(x, chain.label(x), chain.unit(x), v)
        c, h, problem = coefficient(chain, key, x)
        inp.c, inp.step, inp.problem = c, h, problem
        if c is not None and _is_number(v) and v != 0 and y != 0:
            inp.relative = c * float(v) / float(y)
        u = stated.get(x)
        if u is not None:
            inp.u, inp.distribution, inp.dof, inp.source = u.u, u.distribution, u.dof, u.source
        res.inputs.append(inp)
    with_u = [i for i in res.inputs if i.u is not None]
    if with_u:
        if any(i.c is None for i in with_u):
            bad = [where(i.key) for i in with_u if i.c is None]
            res.notes.append(
                "no combined uncertainty: no coefficient for " + ", ".join(bad) + " (see below)"
            )
        else:
            terms = [(i.c * i.u) for i in with_u]
            res.u_c = math.sqrt(sum(t * t for t in terms))
            res.U = k * res.u_c
            finite = [(t, i.dof) for t, i in zip(terms, with_u) if i.dof]
            if finite and res.u_c > 0:
                denom = sum(t**4 / nu for t, nu in finite)
                res.dof = res.u_c**4 / denom if denom > 0 else None
            res.notes.append("inputs assumed independent (no correlation stated)")
        if mc:
            uncs = [stated[i.key] for i in with_u]
            res.mc = monte_carlo(chain, key, uncs, mc, seed)
            _compare(res)
    return res


def _compare(res: ResultSensitivity) -> None:
    """JCGM 101:2008 §8: the law of propagation validated by the Monte Carlo interval."""
    m = res.mc
    if not m or "std" not in m or res.u_c is None:
        return
    y = float(res.value)
    half = 1.959964 * res.u_c  # the 95 % interval of a normal output
    lo, hi = y - half, y + half
    # numerical tolerance of §8.2 with one significant decimal digit of u_c (ndig = 1):
    # half a unit of u_c's leading digit
    tol = 0.5 * 10 ** math.floor(math.log10(res.u_c)) if res.u_c > 0 else 0.0
    d_low, d_high = abs(lo - m["low"]), abs(hi - m["high"])
    m["d_low"], m["d_high"], m["tolerance"] = d_low, d_high, tol
    reasons = []
    if max(d_low, d_high) > tol:
        reasons.append(
            f"the 95 % interval from the law of propagation [{lo:.6g}, {hi:.6g}] differs "
            f"from Monte Carlo's [{m['low']:.6g}, {m['high']:.6g}] by more than {tol:.2g}"
        )
    if m.get("refused"):
        reasons.append(f"{m['refused']} of {m['draws']} draws were refused by the model")
    if reasons:
        m["disagrees"] = "; ".join(reasons) + (
            " — the result is not linear over the inputs' spread (a phase boundary, a "
            "switch or a strong curvature): use the Monte Carlo interval"
        )


# --------------------------------------------------------------------------------------------
# outputs


def _num(v):
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, tuple):
        return v[1]
    return v


def to_dict(report: Report) -> dict:
    """The report as plain JSON-ready data (the shape of ``sensitivity.schema.json``)."""
    results = []
    for r in report.results:
        results.append(
            {
                "cell": where(r.key),
                "label": r.label,
                "unit": r.unit,
                "value": _num(r.value),
                "u_c": r.u_c,
                "U": r.U,
                "k": r.k,
                "dof": r.dof,
                "notes": r.notes,
                "inputs": [
                    {
                        "cell": where(i.key),
                        "label": i.label,
                        "unit": i.unit,
                        "value": _num(i.value),
                        "c": i.c,
                        "relative": i.relative,
                        "step": i.step,
                        "u": i.u,
                        "distribution": i.distribution or None,
                        "dof": i.dof,
                        "source": i.source or None,
                        "contribution": i.contribution,
                        "problem": i.problem or None,
                    }
                    for i in r.inputs
                ],
                **({"mc": r.mc} if r.mc else {}),
            }
        )
    return {
        "workbook": report.path,
        "k": report.k,
        "draws": report.draws,
        "notes": report.notes,
        "results": results,
    }


def to_json(report: Report) -> str:
    """Strict JSON (no NaN or Infinity tokens)."""
    import json

    return json.dumps(to_dict(report), indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def schema() -> dict:
    """The JSON Schema of :func:`to_json`'s output (shipped with the package)."""
    import json
    from importlib.resources import files

    return json.loads(
        files("joulebook.faces.workbook").joinpath("sensitivity.schema.json").read_text("utf-8")
    )


def fmt(v, digits: int = 4) -> str:
    """A number as a person reads it (4 significant digits by default)."""
    if v is None:
        return "—"
    if isinstance(v, float):
        return f"{v:.{digits}g}"
    return str(v)


def per(result_unit: str, input_unit: str) -> str:
    """The unit of ∂y/∂x: ``bar/degC``, ``bar`` per a dimensionless input, ``bar·K`` per 1/K."""
    ru = result_unit or "1"
    iu = (input_unit or "").strip()
    if iu in ("", "-", "1"):
        return "" if ru == "1" else ru
    if iu.startswith("1/"):
        return f"{ru}·{iu[2:]}"
    return f"{ru}/({iu})" if any(ch in iu for ch in "/*·") else f"{ru}/{iu}"


def _md_cell(text: str) -> str:
    return str(text).replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def to_markdown(report: Report) -> str:
    """A short summary for CI job pages."""
    lines = [f"## Sensitivity of {_md_cell(report.path)}", ""]
    lines.append("| result | value | u_c | U | largest contributions |")
    lines.append("| --- | --- | --- | --- | --- |")
    for r in report.results:
        top = sorted(
            (i for i in r.inputs if i.contribution is not None),
            key=lambda i: -(i.contribution or 0),
        )[:3]
        tops = ", ".join(f"{where(i.key)} {fmt(i.contribution)}" for i in top) or (
            ", ".join(
                f"{where(i.key)} rel {fmt(i.relative)}"
                for i in sorted(r.inputs, key=lambda i: -abs(i.relative or 0))[:3]
                if i.relative is not None
            )
        )
        name = f"{where(r.key)} {r.label}".strip()
        lines.append(
            f"| {_md_cell(name)} | {fmt(r.value)} {_md_cell(r.unit)} | {fmt(r.u_c)} | "
            f"{fmt(r.U)} (k = {fmt(r.k)}) | {_md_cell(tops)} |"
        )
    problems = [
        (r, i) for r in report.results for i in r.inputs if i.problem and i.problem != TEXT_INPUT
    ]
    if problems:
        lines += ["", "Coefficients not computed:"]
        lines += [f"- {where(r.key)} ← {where(i.key)}: {_md_cell(i.problem)}" for r, i in problems]
    for r in report.results:
        if r.mc and r.mc.get("disagrees"):
            lines.append(f"- {where(r.key)}: {_md_cell(r.mc['disagrees'])}")
    return "\n".join(lines) + "\n"


def console_lines(report: Report) -> list[str]:
    """What the command prints: one line per result, its largest drivers, and problems."""
    out = []
    for r in report.results:
        unc = f" ± {fmt(r.U)} (k = {fmt(r.k)})" if r.U is not None else ""
        out.append(f"{where(r.key)} {r.label}: {fmt(r.value, 6)} {r.unit}{unc}".rstrip())
        ranked = sorted(
            (i for i in r.inputs if i.relative is not None),
            key=lambda i: -(i.contribution if i.contribution is not None else abs(i.relative)),
        )
        for i in ranked[:3]:
            share = f", contributes {fmt(i.contribution)}" if i.contribution is not None else ""
            out.append(
                f"  {where(i.key)} {i.label}: dy/dx = {fmt(i.c)}, relative {fmt(i.relative)}{share}"
            )
        for i in r.inputs:
            if i.problem and i.problem != TEXT_INPUT:
                out.append(f"  {where(i.key)}: {i.problem}")
        if r.mc and r.mc.get("disagrees"):
            out.append(f"  Monte Carlo: {r.mc['disagrees']}")
    if not report.results:
        out.append("no result with numeric inputs among its precedents")
    return out


def tornado_svg(r: ResultSensitivity) -> str:
    """A tornado chart of one result: per input, the change of the result for ±u (or, with
    no uncertainty, for ±1 % of the input), in the result's unit."""
    from xml.sax.saxutils import escape

    bars = []
    for i in r.inputs:
        if i.c is None or not _is_number(i.value):
            continue
        dx = i.u if i.u is not None else 0.01 * abs(float(i.value))
        bars.append((f"{where(i.key)} {i.label}"[:52], i.c * dx, "±u" if i.u else "±1 %"))
    if not bars:
        return ""
    bars.sort(key=lambda b: -abs(b[1]))
    big = max(abs(b[1]) for b in bars) or 1.0
    w, left, right, row = 720, 330, 70, 22
    half = (w - left - right) / 2
    mid = left + half
    h = row * len(bars) + 58
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" '
        f'viewBox="0 0 {w} {h}" role="img" aria-label="tornado chart of {escape(where(r.key))}">',
        f'<line x1="{mid}" y1="10" x2="{mid}" y2="{h - 40}" stroke="#333"/>',
    ]
    for n, (name, d, how) in enumerate(bars):
        y = 14 + n * row
        length = abs(d) / big * half
        out.append(
            f'<text x="{left - 6}" y="{y + 13}" font-size="11" text-anchor="end">'
            f"{escape(name)}</text>"
        )
        # the input moved up draws to the side of the coefficient's sign (blue), moved down
        # to the other (orange): the side tells the sign, not the colour alone
        x_plus = mid if d >= 0 else mid - length
        x_minus = mid - length if d >= 0 else mid
        out.append(
            f'<rect x="{x_plus:.1f}" y="{y}" width="{length:.1f}" height="{row - 6}" '
            f'fill="#0072b2"><title>{escape(how)} up: {d:+.4g} {escape(r.unit)}</title></rect>'
        )
        out.append(
            f'<rect x="{x_minus:.1f}" y="{y}" width="{length:.1f}" height="{row - 6}" '
            f'fill="#e69f00"><title>{escape(how)} down: {-d:+.4g} {escape(r.unit)}</title></rect>'
        )
        out.append(
            f'<text x="{w - 4}" y="{y + 13}" font-size="10" text-anchor="end">±{abs(d):.3g}</text>'
        )
    out.append(
        f'<text x="{mid}" y="{h - 24}" font-size="11" text-anchor="middle">change of the '
        f"result ({escape(r.unit or 'its unit')}) for each input moved by its u (±1 % where "
        "none is stated)</text>"
    )
    out.append(
        f'<text x="{mid}" y="{h - 8}" font-size="11" text-anchor="middle">blue: input moved '
        "up · orange: input moved down</text>"
    )
    out.append("</svg>")
    return "".join(out)


def render_html(report: Report) -> str:
    """The HTML report (Jinja2, autoescaped; the tornado charts are SVG escaped here)."""
    import jinja2
    from markupsafe import Markup

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("joulebook.faces.workbook", "templates"),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
    )
    env.filters["fmt"] = fmt
    env.globals["where"] = where
    env.globals["per"] = per
    charts = {where(r.key): Markup(tornado_svg(r)) for r in report.results}
    return env.get_template("sensitivity.html").render(
        report=report, charts=charts, text_input=TEXT_INPUT
    )
