"""What changed between two revisions of a calculation workbook, and why each result moved.

:func:`diff_books` aligns the two revisions (:mod:`joulebook.faces.workbook.align`), lists every
change with its label and unit, and for every result whose saved value moved, the changed
inputs and formulas among its precedents, ranked by their share of the move: the NEW
revision is recomputed by the engine with each change put back as it was in OLD, one at a
time (changes that share no result are put back in the same run).  A result that moved
though nothing among its precedents changed is *unexplained*: a property library or
joulebook version, a value typed over a formula's saved result, a stale save.

The outcome is a :class:`Diff`; :func:`to_json`, :func:`to_markdown` and
:func:`render_html` write it.  Nothing here writes a file or modifies a workbook.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field, replace
from functools import lru_cache
from importlib import resources

from .align import (
    Alignment,
    Parsed,
    align,
    content_key,
    formula_text,
    same_moved,
    translate,
)
from .check import compare
from .engine import Engine
from .reader import Book, Cell, col_letters
from .refs import our_name, parse_ref
from .status import Status

__all__ = [
    "KINDS",
    "FAIL_ON",
    "Cause",
    "Change",
    "Diff",
    "diff_books",
    "failing",
    "to_json",
    "to_markdown",
    "render_html",
    "schema",
]

#: the kinds of change, in the order reports list them
KINDS = ("unexplained", "result", "input", "formula", "inserted", "deleted", "renamed", "extended")
#: what each ``--fail-on`` word fails on
FAIL_ON = {
    "inputs": frozenset({"input"}),
    "formulas": frozenset({"formula"}),
    "results": frozenset({"result", "unexplained"}),
    "any": frozenset(KINDS),
}
RTOL, ATOL = 1e-9, 1e-12
#: changes put back one by one at most this many times (runs of the engine); past it the
#: causes are listed without shares
MAX_RUNS = 40
#: an alignment covering less than this share of the cells means two unrelated workbooks
UNRELATED = 0.25
#: the share of the move a sum of single effects may miss before the changes "interact"
INTERACT = 0.01


@dataclass
class Cause:
    """One change among a moved result's precedents and its part of the move."""

    where: str  # "Sheet!B4"
    label: str
    effect: float | None = None  # the result's move this change alone accounts for
    share: float | None = None  # effect / total move


@dataclass
class Change:
    """One change between the revisions (``kind`` is one of :data:`KINDS`)."""

    kind: str
    what: str  # cell, row, column, sheet, name, table
    sheet: str | None
    cell: str | None  # NEW address (OLD for a deletion); "5:7" or "C:D" for rows, columns
    old: object = None
    new: object = None
    label: str = ""
    unit: str = ""
    delta: float | None = None
    delta_pct: float | None = None
    causes: list[Cause] = field(default_factory=list)
    interaction: float | None = None  # the move no single change accounts for
    unexplained_part: float | None = None  # the move left with every change put back
    status: Status | None = None  # the NEW cell's check verdict (results)
    recomputed: object = None
    note: str = ""
    calls: list[dict] = field(default_factory=list)  # joulebook calls whose arguments changed

    @property
    def where(self) -> str:
        return f"{self.sheet}!{self.cell}" if self.sheet and self.cell else (self.cell or "")


@dataclass
class Diff:
    old: Book
    new: Book
    changes: list[Change]
    aligned: float  # the share of cells aligned
    unrelated: bool
    results_compared: bool
    notes: list[str] = field(default_factory=list)
    runs: int = 0  # engine runs spent on causes

    def count(self, kind: str) -> int:
        return sum(c.kind == kind for c in self.changes)

    @property
    def moved(self) -> list[Change]:
        return [c for c in self.changes if c.kind in ("result", "unexplained")]


# ---------------------------------------------------------------------------------------
# labels, units, values


def _text(c: Cell | None) -> str:
    if c is None or c.formula is not None or not isinstance(c.cached, str):
        return ""
    return c.cached.strip()


def label_of(book: Book, key) -> str:
    """The nearest text to the left in the row, else above in the column."""
    s, r, col = key
    for c in range(col - 1, max(0, col - 6), -1):
        t = _text(book.cells.get((s, r, c)))
        if t:
            return t
    for rr in range(r - 1, max(0, r - 4), -1):
        t = _text(book.cells.get((s, rr, col)))
        if t:
            return t
    return ""


def _unit_words(label: str) -> list[str]:
    out = []
    for open_, close in (("[", "]"), ("(", ")")):
        i = label.rfind(open_)
        j = label.find(close, i + 1)
        if 0 <= i < j:
            out.append(label[i + 1 : j].strip())
    if "," in label:
        out.append(label.rsplit(",", 1)[1].strip())
    if " in " in label:
        out.append(label.rsplit(" in ", 1)[1].strip())
    return [w for w in out if 0 < len(w) <= 16]


@lru_cache(maxsize=4096)
def _is_unit(text: str) -> bool:
    """True when *text* is a common unit of some quantity joulebook converts (the unit
    seed only: pint is not loaded)."""
    from joulebook.core.units import KINDS as UNIT_KINDS
    from joulebook.core.units import known_unit

    if not text or len(text) > 16:
        return False
    for kind in UNIT_KINDS:
        try:
            if known_unit(text, kind) is not None:
                return True
        except Exception:  # a word the unit reader refuses is no unit
            continue
    return False


def unit_of(book: Book, key, label: str) -> str:
    """A unit for the cell: the text in the cell to its right when it names a unit, else one
    its label names (in square brackets, parentheses, after a comma or "in")."""
    s, r, c = key
    right = _text(book.cells.get((s, r, c + 1)))
    if _is_unit(right):
        return right
    for w in _unit_words(label):
        if _is_unit(w):
            return w
    i, j = label.rfind("["), label.rfind("]")
    if 0 <= i < j and 0 < j - i - 1 <= 16 and " " not in label[i + 1 : j].strip():
        return label[i + 1 : j].strip()  # a unit in square brackets, as labels write one
    return ""


def _num(v) -> float | None:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        return None
    x = float(v)
    return x if math.isfinite(x) else None


def _same(a, b) -> bool:
    x, y = _num(a), _num(b)
    if x is not None and y is not None:
        return abs(x - y) <= ATOL + RTOL * max(abs(x), abs(y))
    return a == b


def _shown(v) -> object:
    if isinstance(v, tuple) and len(v) == 2 and v[0] == "error":
        return v[1]
    return v


def _addr(key) -> str:
    return f"{col_letters(key[2])}{key[1]}"


def _where(key) -> str:
    return f"{key[0]}!{_addr(key)}"


# ---------------------------------------------------------------------------------------
# joulebook calls and their arguments


def _calls(p: Parsed) -> list[tuple[str, list[str]]]:
    """Each joulebook call in a formula: its name and its arguments' texts."""
    out = []
    stack: list = []  # open functions: [name or None, args, current]
    for v, t, sub in p.toks:
        if t == "FUNC" and sub == "OPEN":
            stack.append([our_name(v), [], []])
            if len(stack) > 1:
                stack[-2][2].append(v)
            continue
        if t == "FUNC" and sub == "CLOSE" and stack:
            name, args, cur = stack.pop()
            args.append("".join(cur).strip())
            if name:
                out.append((name, [a for a in args if a or len(args) > 1]))
            if stack:
                stack[-1][2].append(v)
            continue
        if t == "SEP" and sub == "ARG" and stack:
            stack[-1][1].append("".join(stack[-1][2]).strip())
            stack[-1][2] = []
            continue
        if stack:
            stack[-1][2].append(v)
    return out


def _call_changes(old_calls, new_calls) -> list[dict]:
    out = []
    for (name_o, args_o), (name_n, args_n) in zip(old_calls, new_calls):
        if name_o != name_n:
            out.append({"function": name_n, "argument": None, "old": name_o, "new": name_n})
            continue
        for i in range(max(len(args_o), len(args_n))):
            a = args_o[i] if i < len(args_o) else None
            b = args_n[i] if i < len(args_n) else None
            if a != b:
                out.append({"function": name_n, "argument": i + 1, "old": a, "new": b})
    for name, _ in new_calls[len(old_calls) :]:
        out.append({"function": name, "argument": None, "old": None, "new": name})
    for name, _ in old_calls[len(new_calls) :]:
        out.append({"function": name, "argument": None, "old": name, "new": None})
    return out


# ---------------------------------------------------------------------------------------
# precedents of the NEW revision


class _Graph:
    """Precedents of each cell of a book, read from its references (tokenizer)."""

    def __init__(self, book: Book, parsed: dict):
        self.book = book
        # OFFSET, INDIRECT, a name not a plain range, a What-If data table: the whole book
        self.dynamic = bool(book.data_tables)
        by_sheet: dict[str, list] = {}
        for k in book.cells:
            by_sheet.setdefault(k[0], []).append(k)
        self._by_sheet = by_sheet
        upper = {s.upper(): s for s in book.sheets}
        self.pre: dict[tuple, set] = {}
        spill: dict = {}
        for k, c in book.cells.items():
            if c.formula is not None and c.array_ref:
                box = _box_of(c.array_ref)
                if box is not None:
                    for r in range(box[0], box[2] + 1):
                        for cc in range(box[1], box[3] + 1):
                            if (k[0], r, cc) != k:
                                spill[(k[0], r, cc)] = k
        self.spill = spill
        for k, p in parsed.items():
            if not p.formula:
                continue
            deps: set = set()
            for v, t, _ in p.toks:
                if t == "FUNC" and v.upper().rstrip("(").split(".")[-1] in ("OFFSET", "INDIRECT"):
                    self.dynamic = True
            for _, ref in p.refs:
                self._add(ref, k[0], upper, deps)
            self.pre[k] = deps
        for k, a in spill.items():
            self.pre.setdefault(k, set()).add(a)
        self._post: dict | None = None

    def _add(self, ref, here: str, upper: dict, deps: set, depth: int = 0) -> None:
        if ref.book is not None:
            return
        if ref.kind in ("name", "table"):
            if ref.kind == "table" or depth > 8:
                self.dynamic = True
                return
            text = self.book.local_names.get((here, ref.text.upper())) or self.book.names.get(
                ref.text.upper()
            )
            inner = parse_ref(text.lstrip("=")) if text else None
            if inner is None or inner.kind == "name":
                self.dynamic = True
                return
            self._add(inner, here, upper, deps, depth + 1)
            return
        sheet = upper.get((ref.sheet or here).upper()) if ref.sheet else here
        if sheet is None or ref.sheet2:
            self.dynamic = True
            return
        if ref.kind == "cell":
            deps.add((sheet, ref.r1, ref.c1))
            return
        r1, c1, r2, c2 = (
            min(ref.r1, ref.r2),
            min(ref.c1, ref.c2),
            max(ref.r1, ref.r2),
            max(ref.c1, ref.c2),
        )
        if ref.kind == "cols":
            r1, r2 = 1, 1 << 21
        elif ref.kind == "rows":
            c1, c2 = 1, 1 << 15
        if (r2 - r1 + 1) * (c2 - c1 + 1) <= 4096:
            for r in range(r1, r2 + 1):
                for c in range(c1, c2 + 1):
                    if (sheet, r, c) in self.book.cells:
                        deps.add((sheet, r, c))
        else:
            for k in self._by_sheet.get(sheet, ()):
                if r1 <= k[1] <= r2 and c1 <= k[2] <= c2:
                    deps.add(k)

    def reads(self, sheet: str, formula: str) -> set:
        """The cells *formula* (standing in *sheet*) reads directly."""
        from .align import parse_cell

        p = parse_cell(Cell(sheet, 1, 1, formula))
        deps: set = set()
        upper = {s.upper(): s for s in self.book.sheets}
        for v, t, _ in p.toks:
            if t == "FUNC" and v.upper().rstrip("(").split(".")[-1] in ("OFFSET", "INDIRECT"):
                self.dynamic = True
        for _, ref in p.refs:
            self._add(ref, sheet, upper, deps)
        return deps

    def upstream_all(self, keys) -> set:
        """Every cell one of *keys* reads, directly or not."""
        seen: set = set()
        todo = [d for k in keys for d in self.pre.get(k, ())]
        while todo:
            k = todo.pop()
            if k in seen:
                continue
            seen.add(k)
            todo.extend(self.pre.get(k, ()))
        return seen

    def upstream(self, key) -> set:
        """Every cell *key* reads, directly or not (not the cell itself)."""
        seen: set = set()
        todo = list(self.pre.get(key, ()))
        while todo:
            k = todo.pop()
            if k in seen:
                continue
            seen.add(k)
            todo.extend(self.pre.get(k, ()))
        return seen

    def downstream(self, keys) -> set:
        """Every cell reading one of *keys*, directly or not."""
        if self._post is None:
            post: dict = {}
            for k, deps in self.pre.items():
                for d in deps:
                    post.setdefault(d, []).append(k)
            self._post = post
        seen: set = set()
        todo = [k for key in keys for k in self._post.get(key, ())]
        while todo:
            k = todo.pop()
            if k in seen:
                continue
            seen.add(k)
            todo.extend(self._post.get(k, ()))
        return seen


def _box_of(ref: str):
    r = parse_ref(ref)
    if r is None or r.kind not in ("cell", "area"):
        return None
    return min(r.r1, r.r2), min(r.c1, r.c2), max(r.r1, r.r2), max(r.c1, r.c2)


# ---------------------------------------------------------------------------------------
# the changes


@dataclass
class _Revert:
    """How to put one NEW cell back as OLD had it (for the engine runs)."""

    formula: str | None  # the OLD formula in NEW's addresses (None: a constant)
    value: object
    remove: bool = False  # the cell did not exist in OLD


def _has_saved(book: Book) -> bool:
    fs = book.formula_cells()
    return not fs or sum(c.has_cached for c in fs) >= 0.5 * len(fs)


def diff_books(old: Book, new: Book, causes: bool = True) -> Diff:
    """Every change between two revisions, each moved result with its ranked causes.

    Parameters
    ----------
    old, new : Book
        The two revisions as :func:`joulebook.faces.workbook.reader.read_book` reads them.
    causes : bool
        Recompute NEW with each change put back, to rank the causes of each moved result
        (else the causes are listed without their shares).
    """
    al = align(old, new)
    changes: list[Change] = []
    reverts: dict[tuple, _Revert] = {}  # NEW cell -> how OLD had it
    units: dict = {}  # a change put back as one: id -> (shown as, label, its NEW cells)
    gone: dict = {}  # a deletion (no put-back): id -> (shown as, label, its OLD cells)
    moved: dict[tuple, tuple] = {}  # NEW formula cell -> (old saved, new saved)
    aligned_cells = 0
    for s in al.renamed.items():
        changes.append(Change("renamed", "sheet", s[1], None, s[0], s[1]))
    for s in al.added_sheets:
        changes.append(Change("inserted", "sheet", s, None, None, s))
    for s in al.removed_sheets:
        changes.append(Change("deleted", "sheet", s, None, s, None))
    new_rows, new_cols = _index(new)
    old_rows, old_cols = _index(old)
    old_spill, new_spill = _spilled(old), _spilled(new)

    for m in al.sheets:
        # rows and columns inserted or deleted: one change each run
        matched_new_rows = set(m.rows.values())
        matched_new_cols = set(m.cols.values())
        ins_rows = sorted(r for (s, r) in new_rows if s == m.new and r not in matched_new_rows)
        del_rows = sorted(r for (s, r) in old_rows if s == m.old and r not in m.rows)
        ins_cols = sorted(c for (s, c) in new_cols if s == m.new and c not in matched_new_cols)
        del_cols = sorted(c for (s, c) in old_cols if s == m.old and c not in m.cols)
        extended_rows = {r for r in ins_rows if _extends_row(al, new_rows[(m.new, r)])}
        for run in _runs(ins_rows):
            cells = [k for r in run for k in new_rows[(m.new, r)]]
            ext = run[0] in extended_rows and all(r in extended_rows for r in run)
            if ext:
                c1 = min(k[2] for k in cells)
                c2 = max(k[2] for k in cells)
                a, b = f"{col_letters(c1)}{run[0]}", f"{col_letters(c2)}{run[-1]}"
                where = a if a == b else f"{a}:{b}"
                ch = Change(
                    "extended",
                    "row",
                    m.new,
                    where,
                    None,
                    _row_text(new, new_rows[(m.new, run[0])]),
                    label=_row_label(new, new_rows[(m.new, run[0])]),
                    note="a copied-down formula carried one row further"
                    if len(run) == 1
                    else f"copied-down formulas carried {len(run)} rows further",
                )
            else:
                where = f"{run[0]}:{run[-1]}"
                ch = Change(
                    "inserted",
                    "row",
                    m.new,
                    where,
                    None,
                    _row_text(new, new_rows[(m.new, run[0])]),
                    label=_row_label(new, new_rows[(m.new, run[0])]),
                )
            changes.append(ch)
            units[("rows", m.new, run[0])] = (f"{m.new}!{where}", ch.label, cells)
            for k in cells:
                reverts[k] = _Revert(None, None, remove=True)
        for run in _runs(del_rows):
            lab = _row_label(old, old_rows[(m.old, run[0])])
            changes.append(
                Change(
                    "deleted",
                    "row",
                    m.old,
                    f"{run[0]}:{run[-1]}",
                    _row_text(old, old_rows[(m.old, run[0])]),
                    None,
                    label=lab,
                )
            )
            cells = [k for r in run for k in old_rows[(m.old, r)]]
            gone[("rows", m.old, run[0])] = (f"{m.old}!{run[0]}:{run[-1]}", lab, cells)
        for run in _runs(ins_cols):
            a, b = col_letters(run[0]), col_letters(run[-1])
            cells = [k for c in run for k in new_cols[(m.new, c)] if k not in reverts]
            ch = Change(
                "inserted",
                "column",
                m.new,
                f"{a}:{b}",
                None,
                _col_text(new, new_cols[(m.new, run[0])]),
                label=_col_text(new, new_cols[(m.new, run[0])]),
            )
            changes.append(ch)
            units[("cols", m.new, run[0])] = (f"{m.new}!{a}:{b}", ch.label, cells)
            for k in cells:
                reverts[k] = _Revert(None, None, remove=True)
        for run in _runs(del_cols):
            a, b = col_letters(run[0]), col_letters(run[-1])
            cells = [k for c in run for k in old_cols[(m.old, c)]]
            lab = _col_text(old, old_cols[(m.old, run[0])])
            gone[("cols", m.old, run[0])] = (f"{m.old}!{a}:{b}", lab, cells)
            changes.append(
                Change(
                    "deleted",
                    "column",
                    m.old,
                    f"{a}:{b}",
                    _col_text(old, old_cols[(m.old, run[0])]),
                    None,
                    label=_col_text(old, old_cols[(m.old, run[0])]),
                )
            )
        # cell by cell over the matched rows and columns
        seen_new: set = set()
        for r in sorted(r for (s, r) in old_rows if s == m.old):
            nr = m.rows.get(r)
            if nr is None:
                continue
            for ko in old_rows[(m.old, r)]:
                nc = m.cols.get(ko[2])
                if nc is None:
                    continue
                kn = (m.new, nr, nc)
                seen_new.add(kn)
                co = old.cells[ko]
                if kn in new_spill or ko in old_spill:  # a value an array formula spilled
                    cn = new.cells.get(kn)
                    if cn is not None and kn in new_spill and not _same(co.cached, cn.cached):
                        moved[kn] = (co.cached, cn.cached)
                    aligned_cells += cn is not None
                    continue
                if not _content(new, kn):
                    lab = label_of(old, ko)
                    changes.append(
                        Change("deleted", "cell", m.old, _addr(ko), _cell_text(co), None, label=lab)
                    )
                    gone[("cell", ko)] = (_where(ko), lab, [ko])
                    continue
                aligned_cells += 1
                _compare_cell(al, ko, co, kn, new.cells[kn], changes, reverts, moved)
        for (s, r), keys in new_rows.items():
            if s != m.new or r not in matched_new_rows:
                continue
            for kn in keys:
                if kn in seen_new or kn[2] not in matched_new_cols or kn in new_spill:
                    continue
                kind = "extended" if _extends_cell(al, kn) else "inserted"
                lab = label_of(new, kn)
                changes.append(
                    Change(
                        kind,
                        "cell",
                        m.new,
                        _addr(kn),
                        None,
                        _cell_text(new.cells[kn]),
                        label=lab,
                        unit=unit_of(new, kn, lab),
                    )
                )
                reverts[kn] = _Revert(None, None, remove=True)
    changes = _copied_down(al, changes, units)
    changes.extend(_names_and_tables(al))
    in_unit = {k for _, _, ks in units.values() for k in ks}
    for k in reverts:
        if k not in in_unit:
            units[("cell", k)] = (_where(k), label_of(new, k), [k])

    n_old = sum(len(v) for v in old_rows.values())
    n_new = sum(len(v) for v in new_rows.values())
    share = aligned_cells / max(n_old, n_new) if max(n_old, n_new) else 1.0
    unrelated = max(n_old, n_new) > 0 and (share < UNRELATED or not al.sheets)
    saved = _has_saved(old) and _has_saved(new)
    notes = []
    if unrelated:
        notes.append(
            f"the workbooks look unrelated: {share:.0%} of their cells aligned; "
            "no list of changes is given"
        )
        return Diff(old, new, [], share, True, saved, notes)
    if not saved:
        which = " and ".join(n for n, b in (("OLD", old), ("NEW", new)) if not _has_saved(b))
        notes.append(
            f"{which} holds no saved values of its formulas: results were not compared "
            "(open and save it in a spreadsheet program, or recalc it, to compare them)"
        )
    d = Diff(old, new, changes, share, False, saved, notes)
    if saved and moved:
        _explain(al, d, reverts, units, moved, causes, gone)
    d.changes.sort(key=_order(al))
    return d


def _copied_down(al: Alignment, changes: list[Change], units: dict) -> list[Change]:
    """Formula changes of consecutive cells of one column whose OLD and NEW formulas are each
    one formula copied down become one change over the range (put back as one)."""
    from .align import parse_cell

    def shapes(ch: Change):
        k = (ch.sheet, *_rc(ch.cell))
        pn = al.new_parsed.get(k)
        if pn is None or not pn.formula or not isinstance(ch.old, str) or ch.old[:1] != "=":
            return None
        po = parse_cell(Cell(k[0], k[1], k[2], ch.old[1:]))
        return (content_key(po, k[1], k[2], "both"), content_key(pn, k[1], k[2], "both"))

    out: list[Change] = []
    runs: dict = {}  # (sheet, column) -> the open run: [first change, last row, shapes, cells]
    for ch in sorted(
        (c for c in changes if c.kind == "formula" and c.what == "cell"),
        key=lambda c: (c.sheet, _rc(c.cell)[1], _rc(c.cell)[0]),
    ):
        r, c = _rc(ch.cell)
        sh = shapes(ch)
        run = runs.get((ch.sheet, c))
        if run is not None and sh is not None and run[1] == r - 1 and run[2] == sh:
            run[1] = r
            run[3].append((ch.sheet, r, c))
            continue
        run = runs[(ch.sheet, c)] = [ch, r, sh, [(ch.sheet, r, c)]]
        out.append(ch)
    for first, last, _sh, cells in runs.values():
        if len(cells) > 1:
            r0, c0 = _rc(first.cell)
            first.cell = f"{first.cell}:{col_letters(c0)}{last}"
            first.note = (first.note + "; " if first.note else "") + (
                f"one formula copied down over {len(cells)} cells (the first shown)"
            )
            units[("copied", first.sheet, r0, c0)] = (first.where, first.label, cells)
    return [c for c in changes if not (c.kind == "formula" and c.what == "cell")] + out


def _rc(addr: str) -> tuple[int, int]:
    """(row, column) of a cell address such as ``B12`` (the first of a range)."""
    a = addr.split(":")[0]
    i = next(i for i, ch in enumerate(a) if ch.isdigit())
    from .refs import col_number

    return int(a[i:]), col_number(a[:i])


def _spilled(book: Book) -> set:
    """The cells holding a value an array formula spilled (not its anchor)."""
    out: set = set()
    for k, c in book.cells.items():
        if c.formula is not None and c.array_ref:
            box = _box_of(c.array_ref)
            if box is None or (box[2] - box[0] + 1) * (box[3] - box[1] + 1) > 1_000_000:
                continue
            for r in range(box[0], box[2] + 1):
                for cc in range(box[1], box[3] + 1):
                    if (k[0], r, cc) != k:
                        out.add((k[0], r, cc))
    return out


def _index(book: Book) -> tuple[dict, dict]:
    """The cells holding something, by (sheet, row) and by (sheet, column), in order."""
    rows: dict = {}
    cols: dict = {}
    for k in sorted(book.cells, key=lambda k: (k[0], k[1], k[2])):
        if _content(book, k):
            rows.setdefault((k[0], k[1]), []).append(k)
            cols.setdefault((k[0], k[2]), []).append(k)
    return rows, cols


def _order(al: Alignment):
    sheets = {s: i for i, s in enumerate(al.new.sheets)}
    rank = {k: i for i, k in enumerate(KINDS)}

    def key(c: Change):
        r = c.cell or ""
        digits = "".join(ch for ch in r.split(":")[0] if ch.isdigit())
        letters = "".join(ch for ch in r.split(":")[0] if ch.isalpha())
        return (
            rank[c.kind] if c.kind in ("unexplained", "result") else 2,
            sheets.get(c.sheet or "", -1),
            int(digits) if digits else 0,
            len(letters),
            letters,
        )

    return key


def _content(book: Book, key) -> bool:
    c = book.cells.get(key)
    if c is None:
        return False
    return c.formula is not None or (c.has_cached and c.cached is not None and c.cached != "")


def _runs(xs: list[int]) -> list[list[int]]:
    out: list[list[int]] = []
    for x in sorted(xs):
        if out and x == out[-1][-1] + 1:
            out[-1].append(x)
        else:
            out.append([x])
    return out


def _cell_text(c: Cell) -> object:
    return "=" + c.formula if c.formula is not None else _shown(c.cached)


def _plain(v) -> str:
    if isinstance(v, float) and v.is_integer() and abs(v) < 1e15:
        return str(int(v))
    if isinstance(v, float):
        return f"{v:.12g}"
    return str(v)


def _row_text(book: Book, keys: list) -> str:
    return " | ".join(_plain(_cell_text(book.cells[k])) for k in keys)[:200]


def _row_label(book: Book, keys: list) -> str:
    for k in keys:
        t = _text(book.cells[k])
        if t:
            return t
    return ""


def _col_text(book: Book, keys: list) -> str:
    return _row_label(book, keys)


def _shape(al: Alignment, key) -> tuple | None:
    p = al.new_parsed.get(key)
    if p is None or not p.formula:
        return None
    return content_key(p, key[1], key[2], "both")


def _extends_cell(al: Alignment, key) -> bool:
    """A NEW formula with the same relative form as the one above or below it."""
    sh = _shape(al, key)
    if sh is None:
        return False
    s, r, c = key
    return sh in (_shape(al, (s, r - 1, c)), _shape(al, (s, r + 1, c)))


def _extends_row(al: Alignment, keys: list) -> bool:
    """An inserted row each of whose formulas continues the formula above or below it, the
    constants beside them standing where the row above or below had one too."""
    book = al.new
    fs = [k for k in keys if book.cells[k].formula is not None]
    if not fs or not all(_extends_cell(al, k) for k in fs):
        return False
    for s, r, c in keys:
        if book.cells[(s, r, c)].formula is None:
            if not (_content(book, (s, r - 1, c)) or _content(book, (s, r + 1, c))):
                return False
    return True


def _compare_cell(al, ko, co: Cell, kn, cn: Cell, changes, reverts, moved) -> None:
    po, pn = al.old_parsed[ko], al.new_parsed[kn]
    new = al.new
    if not po.formula and not pn.formula:
        a, b = co.cached, cn.cached
        if not _same(a, b) or isinstance(a, bool) != isinstance(b, bool):
            label = label_of(new, kn)
            ch = Change(
                "input",
                "cell",
                kn[0],
                _addr(kn),
                _shown(co.cached),
                _shown(cn.cached),
                label=label,
                unit=unit_of(new, kn, label),
            )
            _delta(ch, co.cached, cn.cached)
            changes.append(ch)
            reverts[kn] = _Revert(None, co.cached)
        return
    if po.formula and pn.formula and same_moved(al, ko[0], po, kn[0], pn):
        if co.has_cached and cn.has_cached and not _same(co.cached, cn.cached):
            moved[kn] = (co.cached, cn.cached)
        return
    label = label_of(new, kn)
    old_text = translate(al, ko[0], po) if po.formula else None
    if pn.formula:
        new_text = formula_text(pn)
        if old_text is None or old_text.upper().replace(" ", "") != new_text.upper().replace(
            " ", ""
        ):
            ch = Change(
                "formula",
                "cell",
                kn[0],
                _addr(kn),
                "=" + old_text if old_text is not None else _shown(co.cached),
                "=" + new_text,
                label=label,
                unit=unit_of(new, kn, label),
                note="" if po.formula else "a typed value replaced by a formula",
            )
            if po.formula:
                # the OLD call's arguments shown in NEW's addresses
                translated = Parsed(True, _retokenize(old_text), (), None)
                ch.calls = _call_changes(_calls(translated), _calls(pn))
            changes.append(ch)
            reverts[kn] = _Revert(old_text, co.cached) if old_text else _Revert(None, co.cached)
        if co.has_cached and cn.has_cached and not _same(co.cached, cn.cached):
            moved[kn] = (co.cached, cn.cached)
        return
    # a formula in OLD, a typed value in NEW: the formula overwritten by hand
    changes.append(
        Change(
            "formula",
            "cell",
            kn[0],
            _addr(kn),
            "=" + (old_text or ""),
            _shown(cn.cached),
            label=label,
            unit=unit_of(new, kn, label),
            note="a formula replaced by a typed value"
            + (
                " (the value it saved)"
                if co.has_cached and _same(co.cached, cn.cached)
                else f" (it saved {_shown(co.cached)})"
                if co.has_cached
                else ""
            ),
        )
    )
    reverts[kn] = _Revert(old_text, co.cached)


def _retokenize(text: str | None) -> tuple:
    from .refs import tokens

    if not text:
        return ()
    try:
        return tokens(text)
    except Exception:
        return ()


def _delta(ch: Change, old, new) -> None:
    a, b = _num(old), _num(new)
    if a is None or b is None:
        return
    ch.delta = b - a
    ch.delta_pct = (b - a) / abs(a) * 100 if a else None


def _names_and_tables(al: Alignment) -> list[Change]:
    out = []
    old, new = al.old, al.new

    def tr(text: str, sheet: str | None) -> str:
        p = Parsed(True, _retokenize(text.lstrip("=")), (), None)
        refs = []
        for i, (v, t, sub) in enumerate(p.toks):
            if t == "OPERAND" and sub == "RANGE":
                ref = parse_ref(v)
                if ref is not None:
                    refs.append((i, ref))
        p.refs = tuple(refs)
        return translate(al, sheet or (old.sheets[0] if old.sheets else ""), p) or text

    o_names = dict(old.names)
    n_names = dict(new.names)
    for (sheet, name), text in old.local_names.items():
        o_names[f"{al.renamed.get(sheet, sheet)}!{name}"] = text
    for (sheet, name), text in new.local_names.items():
        n_names[f"{sheet}!{name}"] = text
    for name in sorted(set(o_names) | set(n_names)):
        a, b = o_names.get(name), n_names.get(name)
        if name.split("!")[-1].startswith(("_XLNM.", "JOULEBOOK")):
            continue  # print areas, filters; joulebook's own settings
        if a is None:
            out.append(Change("inserted", "name", None, name, None, b, label=name))
        elif b is None:
            out.append(Change("deleted", "name", None, name, a, None, label=name))
        elif tr(a, None).replace("$", "").upper() != b.replace("$", "").upper():
            out.append(Change("formula", "name", None, name, tr(a, None), b, label=name))
    to = {t.name.upper(): t for t in old.tables}
    tn = {t.name.upper(): t for t in new.tables}
    for name in sorted(set(to) | set(tn)):
        a, b = to.get(name), tn.get(name)
        if a is None:
            out.append(Change("inserted", "table", b.sheet, b.name, None, _table_text(b)))
        elif b is None:
            out.append(Change("deleted", "table", a.sheet, a.name, _table_text(a), None))
        else:
            m = al.by_old(a.sheet)
            r1 = m.row(a.r1, +1) if m else None
            r2 = m.row(a.r2, -1) if m else None
            c1 = m.col(a.c1, +1) if m else None
            c2 = m.col(a.c2, -1) if m else None
            if (r1, c1, r2, c2) != (b.r1, b.c1, b.r2, b.c2) or a.columns != b.columns:
                kind = (
                    "extended"
                    if a.columns == b.columns and r2 is not None and b.r2 > r2 and r1 == b.r1
                    else "formula"
                )
                out.append(Change(kind, "table", b.sheet, b.name, _table_text(a), _table_text(b)))
    return out


def _table_text(t) -> str:
    box = f"{col_letters(t.c1)}{t.r1}:{col_letters(t.c2)}{t.r2}"
    return f"{box} [{', '.join(t.columns)}]"


# ---------------------------------------------------------------------------------------
# why each result moved


def _explain(
    al: Alignment,
    d: Diff,
    reverts: dict,
    units: dict,
    moved: dict,
    rank: bool,
    gone: dict | None = None,
) -> None:
    new = al.new
    g = _Graph(new, al.new_parsed)
    moved_set = set(moved)
    changed = set(reverts)
    down = {u: g.downstream(ks) for u, (_, _, ks) in units.items()}
    touched = set().union(*down.values()) if down else set()
    # deletions cannot be put back: what they fed in OLD, found in NEW, names them
    by_deletion: dict = {}
    if gone:
        g_old = _Graph(al.old, al.old_parsed)
        for u, (_, _, ks) in gone.items():
            fed = {al.new_key(k) for k in g_old.downstream(ks)} & moved_set
            for k in fed:
                by_deletion.setdefault(k, []).append(u)
            touched |= fed
    # a result that moved though nothing it reads changed, nor anything it reads moved
    roots = moved_set - changed - touched - g.downstream(moved_set)
    for r in sorted(roots):
        units[("root", r)] = (_where(r), label_of(new, r), [r])
        down[("root", r)] = g.downstream([r])
    causes: dict = {k: list(by_deletion.get(k, ())) for k in moved}
    for u, ds in down.items():
        own = set(units[u][2]) if u[0] != "root" else set()
        for k in (ds | own) & moved_set:
            causes[k].append(u)
    # NEW recomputed as it is, then with changes put back (only what they reach; the cells
    # they read held at their values)
    needed = moved_set | g.upstream_all(moved_set)
    region = set(moved_set)  # every moved result gets its verdict
    for u in _causes_units(causes):
        if u in units:
            region |= (down[u] | set(units[u][2])) & needed
    effects: dict = {}
    base: dict = {}
    all_back: dict = {}
    statuses: dict = {}
    if rank and roots:
        # the verdict of each result that moved by itself: NEW recomputed as it is where the
        # unexplained moves reach (a stale save shows as differs)
        reach_roots = set(roots)
        for r in roots:
            reach_roots |= down[("root", r)] & needed
        sub = _region(new, g, reach_roots, {}, set(), reverts, roots, moved)
        out = Engine(sub).run()
        d.runs += 1
        statuses = {
            (r.sheet, r.cell): Status(r.status)
            for r in compare(sub, {k: out[k] for k in reach_roots if k in out}, RTOL, ATOL)
        }
        base = {k: o.value for k, o in out.items() if k in roots}
    if rank and region:
        groups = _groups({k: [u for u in us if u in units] for k, us in causes.items()})
        if groups is None or len(groups) + 1 > MAX_RUNS:
            d.notes.append(
                "too many changes feed the moved results together: their causes are listed "
                f"without shares (more than {MAX_RUNS} recalculations)"
            )
            rank = False
        else:
            for grp in groups:
                reach = set()
                for u in grp:
                    reach |= (down[u] | set(units[u][2])) & needed
                cells = {k for u in grp for k in units[u][2]}
                res = Engine(_region(new, g, reach, {}, cells, reverts, roots, moved)).run()
                d.runs += 1
                for k, us in causes.items():
                    for u in us:
                        if u in grp and k in res:
                            effects[(k, u)] = res[k].value
            multi = {k for k, us in causes.items() if len(us) > 1 and all(u in units for u in us)}
            if multi:  # every change put back at once, where results have several causes
                ab = {u for k in multi for u in causes[k]}
                cells = {k for u in ab for k in units[u][2]}
                reach = set()
                for u in ab:
                    reach |= down[u] | set(units[u][2])
                reach &= multi | g.upstream_all(multi)
                res = Engine(_region(new, g, reach, {}, cells, reverts, roots, moved)).run()
                d.runs += 1
                all_back = {k: res[k].value for k in moved if k in res}
            else:
                all_back = {k: effects.get((k, us[0])) for k, us in causes.items() if us}
    for k, (o, n) in moved.items():
        a = label_of(new, k)
        us = causes[k]
        ch = Change(
            "result" if us else "unexplained",
            "cell",
            k[0],
            _addr(k),
            _shown(o),
            _shown(n),
            label=a,
            unit=unit_of(new, k, a),
            status=statuses.get((k[0], _addr(k))),
            recomputed=_shown(base.get(k)) if k in base else None,
        )
        _delta(ch, o, n)
        if not us:
            ch.note = (
                "moved though nothing among its precedents changed: a property library or "
                "joulebook version, a value typed over the saved result, or a stale save"
            )
        total = _num(n) if rank else None  # the move as saved
        oldv = _num(o)
        shown = {**(gone or {}), **units}
        lost = any(u not in units for u in us)
        for u in sorted(us, key=lambda u: shown[u][0]):
            cause = Cause(shown[u][0], shown[u][1])
            single = _num(effects.get((k, u)))
            if rank and not lost and total is not None and single is not None:
                cause.effect = total - single
                move = total - oldv if oldv is not None else None
                cause.share = cause.effect / move if move else None
            ch.causes.append(cause)
        if lost:
            ch.note = "a deletion among its causes cannot be put back: no shares"
        elif rank and us and total is not None and oldv is not None:
            ch.causes.sort(key=lambda x: -abs(x.effect) if x.effect is not None else 0.0)
            back = _num(all_back.get(k))
            if back is not None:
                together = total - back
                single_sum = sum(x.effect for x in ch.causes if x.effect is not None)
                if len(us) > 1 and abs(together - single_sum) > INTERACT * max(abs(together), ATOL):
                    ch.interaction = together - single_sum
                rest = back - oldv
                if abs(rest) > ATOL + 1e-6 * max(abs(oldv), abs(total)):
                    ch.unexplained_part = rest
        if ch.status is Status.VOLATILE:
            ch.note = (
                "it depends on NOW, TODAY, RAND or RANDBETWEEN: it moves at every recalculation"
            )
        elif ch.status is not None and ch.status is not Status.PASS:
            ch.note = (ch.note + "; " if ch.note else "") + (
                f"NEW's saved value does not hold: {ch.status} ({ch.status.describe()})"
            )
        d.changes.append(ch)


def _causes_units(causes: dict) -> set:
    """Every change that is a cause of some moved result."""
    return set().union(*causes.values()) if causes else set()


def _groups(causes: dict) -> list[set] | None:
    """Changes put back together: no moved result has two causes in one group (a greedy
    colouring of the changes that share a result); None past MAX_RUNS groups."""
    conflicts: dict = {}
    for us in {frozenset(us) for us in causes.values()}:
        for u in us:
            conflicts.setdefault(u, set()).update(x for x in us if x != u)
    groups: list[set] = []
    for u in sorted(conflicts, key=lambda u: (-len(conflicts[u]), repr(u))):
        for grp in groups:
            if not (grp & conflicts[u]):
                grp.add(u)
                break
        else:
            if len(groups) >= MAX_RUNS:
                return None
            groups.append({u})
    return groups


def _region(
    new: Book, g: _Graph, compute: set, held: dict, back: set, reverts: dict, roots, moved
) -> Book:
    """A book of the cells to *compute*, the cells they read held at their values (*held*,
    else as saved), and the cells of *back* put back as OLD had them.  With run-time
    references (OFFSET, INDIRECT) the whole of NEW is computed."""
    if g.dynamic:
        cells = dict(new.cells)
    else:
        cells = {k: new.cells[k] for k in compute if k in new.cells}
        reads = set()
        for k in compute:
            reads |= g.pre.get(k, set())
        for k in back:
            rv = reverts.get(k)
            if rv is not None and rv.formula:
                reads |= g.reads(k[0], rv.formula)
        for k in reads - compute:
            c = new.cells.get(k)
            if c is None:
                continue
            if k in held:
                cells[k] = Cell(c.sheet, c.row, c.col, None, None, held[k], True)
            elif c.formula is not None:
                cells[k] = Cell(c.sheet, c.row, c.col, None, None, c.cached, c.has_cached)
            else:
                cells[k] = c
    for k in back:
        c = new.cells.get(k)
        if k in roots:  # a result that moved by itself: held at its OLD saved value
            cells[k] = Cell(c.sheet, c.row, c.col, None, None, moved[k][0], True)
            continue
        rv = reverts.get(k)
        if rv is None or c is None:
            continue
        if rv.remove:
            cells.pop(k, None)
        elif rv.formula is not None and "#REF!" not in rv.formula:
            cells[k] = Cell(c.sheet, c.row, c.col, rv.formula, None, rv.value, True, rv.formula)
        else:
            cells[k] = Cell(c.sheet, c.row, c.col, None, None, rv.value, True)
    return replace(new, cells=cells)


# ---------------------------------------------------------------------------------------
# reports


def failing(d: Diff, fail_on: list[str]) -> list[Change]:
    """The changes of the kinds *fail_on* names (words of :data:`FAIL_ON`)."""
    kinds: set = set()
    for w in fail_on:
        kinds |= FAIL_ON[w]
    if d.unrelated and kinds:
        return [Change("deleted", "sheet", None, None, d.old.path.name, d.new.path.name)]
    return [c for c in d.changes if c.kind in kinds]


def _jsonable(v):
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, tuple):
        return _shown(v)
    return v


def _change_dict(c: Change) -> dict:
    out = {
        "kind": c.kind,
        "what": c.what,
        "sheet": c.sheet,
        "cell": c.cell,
        "old": _jsonable(_shown(c.old)),
        "new": _jsonable(_shown(c.new)),
        "label": c.label,
        "unit": c.unit,
    }
    if c.kind in ("result", "unexplained"):
        out.update(
            delta=_jsonable(c.delta),
            delta_pct=_jsonable(c.delta_pct),
            causes=[x.where for x in c.causes],
            shares=[
                {
                    "cell": x.where,
                    "label": x.label,
                    "effect": _jsonable(x.effect),
                    "share": _jsonable(x.share),
                }
                for x in c.causes
            ],
            interaction=_jsonable(c.interaction),
            unexplained_part=_jsonable(c.unexplained_part),
            status=c.status.value if c.status is not None else None,
            recomputed=_jsonable(c.recomputed),
        )
    elif c.kind == "input":
        out.update(delta=_jsonable(c.delta), delta_pct=_jsonable(c.delta_pct))
    if c.calls:
        out["calls"] = c.calls
    if c.note:
        out["note"] = c.note
    return out


def summary(d: Diff) -> dict:
    return {k: d.count(k) for k in KINDS}


def to_json(d: Diff) -> str:
    """The diff as JSON (the shape of :func:`schema`)."""
    from joulebook.core.version import __version__

    doc = {
        "schema": "joulebook-diff/1",
        "joulebook": __version__,
        "old": {"path": d.old.path.name, "sha256": d.old.sha256},
        "new": {"path": d.new.path.name, "sha256": d.new.sha256},
        "aligned": round(d.aligned, 6),
        "unrelated": d.unrelated,
        "results_compared": d.results_compared,
        "summary": summary(d),
        "notes": d.notes,
        "changes": [_change_dict(c) for c in d.changes],
    }
    return json.dumps(doc, indent=1, ensure_ascii=False, default=str)


def schema() -> dict:
    """The JSON Schema of :func:`to_json` (shipped as ``workbook/diff.schema.json``)."""
    text = (
        resources.files("joulebook.faces.workbook").joinpath("diff.schema.json").read_text("utf-8")
    )
    return json.loads(text)


def fmt_value(v, unit: str = "") -> str:
    v = _shown(v)
    if v is None:
        return ""
    if isinstance(v, bool):
        return "TRUE" if v else "FALSE"
    if isinstance(v, float):
        s = f"{v:.6g}"
    else:
        s = str(v)
    return f"{s} {unit}".strip() if unit and _num(v) is not None else s


def fmt_delta(c: Change) -> str:
    if c.delta is None:
        return ""
    s = f"{c.delta:+.4g}"
    if c.unit:
        s += f" {c.unit}"
    if c.delta_pct is not None:
        s += f" ({c.delta_pct:+.2g} %)" if abs(c.delta_pct) < 0.1 else f" ({c.delta_pct:+.1f} %)"
    return s


def why(c: Change) -> str:
    """One line: the move and its causes, largest first."""
    parts = []
    for x in c.causes:
        s = f"{x.label or x.where} ({x.where}"
        if x.effect is not None:
            s += f", {x.effect:+.4g}{' ' + c.unit if c.unit else ''}"
        if x.share is not None:
            s += f", {x.share:.0%}"
        parts.append(s + ")")
    head = f"{c.label or c.where} {fmt_delta(c) or fmt_value(c.old) + ' → ' + fmt_value(c.new)}"
    if c.kind == "unexplained":
        return head + ": moved without a cause"
    tail = ""
    if c.interaction is not None:
        tail += f"; the changes interact ({c.interaction:+.4g} not accounted for singly)"
    if c.unexplained_part is not None:
        tail += f"; {c.unexplained_part:+.4g} left with every change put back (unexplained)"
    return f"{head}: " + ", ".join(parts) + tail


@dataclass
class Shown:
    """Moved results as a person reads them: a run of one copied-down formula with the same
    causes is one line (its first cell shown, the range and the spread of its moves)."""

    first: Change
    where: str
    count: int
    low: float | None = None  # the smallest and largest move over the run
    high: float | None = None


def shown_moves(d: Diff) -> list[Shown]:
    """The moved results, copied-down runs with the same causes grouped (DESIGN §4)."""
    out: list[Shown] = []
    last: tuple | None = None
    for c in [c for c in d.changes if c.kind in ("unexplained", "result")]:
        r, col = _rc(c.cell or "A1")
        sig = (c.kind, c.sheet, col, tuple(x.where for x in c.causes), _formula_shape(d, c))
        if out and last is not None and last[0] == sig and last[1] == r - 1 and sig[4]:
            g = out[-1]
            g.count += 1
            g.where = f"{g.first.where}:{col_letters(col)}{r}"
            if c.delta is not None and g.low is not None and g.high is not None:
                g.low, g.high = min(g.low, c.delta), max(g.high, c.delta)
            last = (sig, r)
            continue
        out.append(Shown(c, c.where, 1, c.delta, c.delta))
        last = (sig, r)
    return out


def _formula_shape(d: Diff, c: Change):
    from .align import parse_cell

    r, col = _rc(c.cell or "A1")
    cell = d.new.cells.get((c.sheet, r, col))
    if cell is None or cell.formula is None:
        return None
    return content_key(parse_cell(cell), r, col, "both")


def to_markdown(d: Diff) -> str:
    """A short Markdown summary for CI (counts, moved results and their causes)."""
    lines = [f"## joulebook diff: {d.old.path.name} → {d.new.path.name}", ""]
    for n in d.notes:
        lines.append(f"> {n}")
    if d.notes:
        lines.append("")
    if d.unrelated:
        return "\n".join(lines) + "\n"
    counts = summary(d)
    lines.append("| " + " | ".join(KINDS) + " |")
    lines.append("|" + "---|" * len(KINDS))
    lines.append("| " + " | ".join(str(counts[k]) for k in KINDS) + " |")
    lines.append("")
    un = [c for c in d.changes if c.kind == "unexplained"]
    if un:
        lines.append("**Moved without a cause**")
        lines.append("")
        for c in un:
            lines.append(f"- ⚠ `{c.where}` {why(c)}")
        lines.append("")
    res = [g for g in shown_moves(d) if g.first.kind == "result"]
    if res:
        lines.append("**Moved results**")
        lines.append("")
        for g in res[:50]:
            more = f" ({g.count} cells of one copied-down formula)" if g.count > 1 else ""
            lines.append(f"- `{g.where}`{more} {why(g.first)}")
        if len(res) > 50:
            lines.append(f"- … and {len(res) - 50} more")
        lines.append("")
    other = [c for c in d.changes if c.kind not in ("result", "unexplained")]
    if other:
        lines.append("**Changes**")
        lines.append("")
        for c in other[:100]:
            lines.append(
                f"- {c.kind} {c.what} `{c.where}` {c.label}: "
                f"{fmt_value(c.old, c.unit)} → {fmt_value(c.new, c.unit)}".rstrip()
            )
        if len(other) > 100:
            lines.append(f"- … and {len(other) - 100} more")
    return "\n".join(lines) + "\n"


#: the mark of each kind in the HTML report: a symbol and a word, never colour alone
MARKS = {
    "result": ("Δ", "moved"),
    "unexplained": ("⚠", "unexplained"),
    "input": ("✎", "input"),
    "formula": ("ƒ", "formula"),
    "inserted": ("+", "inserted"),
    "deleted": ("−", "deleted"),
    "renamed": ("↷", "renamed"),
    "extended": ("↓", "extended"),
}


def render_html(d: Diff, audit_href: str | None = None, anchors: dict | None = None) -> str:
    """The HTML report: summary first, the moved results with their causes, then each change
    by sheet (Jinja2, autoescaped).  *anchors* maps "Sheet!B4" to its audit entry id."""
    from datetime import datetime, timezone

    import jinja2

    from joulebook.core.version import __version__

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("joulebook.faces.workbook", "templates"),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
    )
    by_sheet: dict = {}
    for c in d.changes:
        if c.kind not in ("result", "unexplained"):
            by_sheet.setdefault(c.sheet or "(workbook)", []).append(c)
    return env.get_template("diff.html").render(
        d=d,
        kinds=KINDS,
        counts=summary(d),
        marks=MARKS,
        moved=shown_moves(d),
        by_sheet=by_sheet,
        fmt_value=fmt_value,
        fmt_delta=fmt_delta,
        why=why,
        audit_href=audit_href,
        anchors=anchors or {},
        version=__version__,
        generated=datetime.now(timezone.utc).strftime("%Y-%m-%d %H:%M UTC"),
    )
