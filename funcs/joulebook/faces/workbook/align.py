"""Alignment of two revisions of a workbook: sheets, rows and columns matched so that an
inserted or deleted row or column is one change and the cells it shifted are not changes.

Sheets are matched by name, then by content (a renamed sheet).  Columns are matched first,
on what each column holds with the *row* parts of its references dropped (an inserted row
does not change them); rows are then matched on what each row holds in the matched columns
with the *column* parts dropped.  Each sequence is matched exactly (``difflib``), and the
stretches left between two exact matches are paired by similarity (a row whose input
changed is the same row).  Formulas are compared in relative form (the tokenizer's
:meth:`Ref.key`), so ``=B5*2`` in C5 and ``=B6*2`` in C6 are one shape.

References
----------
.. [1] Python Software Foundation, "difflib.SequenceMatcher", The Python Standard Library.
.. [2] S. B. Needleman and C. D. Wunsch, "A general method applicable to the search for
   similarities in the amino acid sequence of two proteins", J. Mol. Biol. 48 (1970) 443-453.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from difflib import SequenceMatcher

from .reader import Book, Cell
from .refs import Ref, parse_ref, quote_sheet, tokens

__all__ = [
    "Parsed",
    "parse_cell",
    "SheetMap",
    "Alignment",
    "align",
    "translate",
    "similar",
]

#: the least similarity (shared contents over the larger) for two rows, columns or sheets to
#: pair when they are not identical and not alone between two exact matches
THRESHOLD = 0.5
#: the largest stretch of rows paired by similarity cell by cell (pairs compared); a larger
#: one is paired in order
_MAX_DP = 250_000


@dataclass(slots=True)
class Parsed:
    """A cell's contents as the alignment reads them."""

    formula: bool
    toks: tuple  # the formula's tokens, or ()
    refs: tuple  # (index of the token, Ref) of each reference operand of the formula
    value: object  # the constant of a non-formula cell
    skeleton: tuple | None = None  # content_key for aligning, once made


def parse_cell(c: Cell) -> Parsed:
    """The tokens and reference operands of a cell's formula (none for a constant)."""
    if c.formula is None:
        return Parsed(False, (), (), c.cached)
    try:
        toks = tokens(c.formula)
    except Exception:
        return Parsed(True, (("?" + c.formula, "TEXT", ""),), (), None)
    refs = []
    for i, (v, t, sub) in enumerate(toks):
        if t == "OPERAND" and sub == "RANGE":
            ref = parse_ref(v)
            if ref is not None:
                refs.append((i, ref))
    return Parsed(True, toks, tuple(refs), None)


def _ref_part(ref: Ref, row: int, col: int, axis: str) -> tuple:
    """The reference in relative form seen from (row, col) (*axis* "both"), or its skeleton
    for aligning (any other *axis*): absolute parts kept, relative ones only marked, since an
    inserted row or column between a cell and what it reads changes the offset though not
    the formula."""
    if ref.kind in ("name", "table") or axis == "both":
        return ref.key(row, col)
    return (
        ref.kind,
        ref.book,
        ref.sheet,
        ref.sheet2,
        ref.r1 if ref.abs_r1 else None,
        ref.c1 if ref.abs_c1 else None,
        ref.r2 if ref.abs_r2 else None,
        ref.c2 if ref.abs_c2 else None,
    )


def content_key(p: Parsed, row: int, col: int, axis: str = "align") -> tuple:
    """What a cell holds: for aligning (*axis* "align") a form that survives inserted rows
    and columns (the same wherever the cell stands), or ("both") the formula's full relative
    shape."""
    if not p.formula:
        v = p.value
        return ("v", round(v, 12) if isinstance(v, float) else v)
    if axis != "both" and p.skeleton is not None:
        return p.skeleton
    at = dict(p.refs)
    parts = []
    for i, (v, t, sub) in enumerate(p.toks):
        ref = at.get(i)
        if ref is not None:
            parts.append(_ref_part(ref, row, col, axis))
        elif t != "WHITE-SPACE":
            parts.append(v.upper() if t in ("FUNC", "OPERAND") and sub != "TEXT" else v)
    key = ("f", tuple(parts))
    if axis != "both":
        p.skeleton = key
    return key


def similar(a: Counter, b: Counter) -> float:
    """Shared contents over the larger of the two (0 for two empty ones)."""
    n = max(sum(a.values()), sum(b.values()))
    if n == 0:
        return 0.0
    return sum((a & b).values()) / n


def _pair_block(old: list, new: list, sim) -> list[tuple[int, int]]:
    """Pairs (i, j) of the most similar items of two stretches, in order (a Needleman-Wunsch
    alignment maximising the summed similarity of pairs at or over THRESHOLD)."""
    n, m = len(old), len(new)
    if n == m and n <= 1:
        return [(0, 0)] if n else []
    if n * m > _MAX_DP:
        return [(k, k) for k in range(min(n, m))]
    s = [[sim(old[i], new[j]) for j in range(m)] for i in range(n)]
    best = [[0.0] * (m + 1) for _ in range(n + 1)]
    for i in range(n - 1, -1, -1):
        for j in range(m - 1, -1, -1):
            take = s[i][j] + best[i + 1][j + 1] if s[i][j] >= THRESHOLD else -1.0
            best[i][j] = max(take, best[i + 1][j], best[i][j + 1])
    pairs = []
    i = j = 0
    while i < n and j < m:
        if s[i][j] >= THRESHOLD and best[i][j] == s[i][j] + best[i + 1][j + 1]:
            pairs.append((i, j))
            i += 1
            j += 1
        elif best[i][j] == best[i + 1][j]:
            i += 1
        else:
            j += 1
    return pairs


def match_sequences(old_keys: list, new_keys: list, old_items: list, new_items: list, sim):
    """Pairs (i, j) of positions: equal keys first (difflib), then each stretch between two
    exact matches paired by similarity of its items."""
    sm = SequenceMatcher(None, old_keys, new_keys, autojunk=False)
    pairs: list[tuple[int, int]] = []
    for tag, i1, i2, j1, j2 in sm.get_opcodes():
        if tag == "equal":
            pairs.extend(zip(range(i1, i2), range(j1, j2)))
        elif tag == "replace":
            if i2 - i1 == j2 - j1 and i2 - i1 <= 2:  # a row or two changed in place
                pairs.extend(zip(range(i1, i2), range(j1, j2)))
                continue
            for a, b in _pair_block(old_items[i1:i2], new_items[j1:j2], sim):
                pairs.append((i1 + a, j1 + b))
    return pairs


@dataclass
class SheetMap:
    """The rows and columns of one OLD sheet matched to one NEW sheet."""

    old: str
    new: str
    rows: dict[int, int] = field(default_factory=dict)  # old row -> new row
    cols: dict[int, int] = field(default_factory=dict)
    old_rows: int = 0  # the used rows and columns of each side
    new_rows: int = 0
    old_cols: int = 0
    new_cols: int = 0

    def row(self, r: int, toward: int = 0) -> int | None:
        """The NEW row of OLD row *r*; past the used part, shifted as the last matched row;
        a deleted row is None, or (for the corner of a range, *toward* +1/-1) the nearest
        matched row inward."""
        return _place(self.rows, r, self.old_rows, toward)

    def col(self, c: int, toward: int = 0) -> int | None:
        return _place(self.cols, c, self.old_cols, toward)


def _place(m: dict[int, int], x: int, used: int, toward: int) -> int | None:
    if x in m:
        return m[x]
    if x > used:
        last = max(m) if m else 0
        return x + (m[last] - last if m else 0)
    if toward:
        y = x
        while 1 <= y <= used:
            y += toward
            if y in m:
                return m[y]
    return None


@dataclass
class Alignment:
    old: Book
    new: Book
    sheets: list[SheetMap]
    renamed: dict[str, str]  # old name -> new name, matched by content
    added_sheets: list[str]
    removed_sheets: list[str]
    old_parsed: dict
    new_parsed: dict

    def by_old(self, name: str) -> SheetMap | None:
        for m in self.sheets:
            if m.old.upper() == name.upper():
                return m
        return None

    def new_key(self, old_key) -> tuple | None:
        """The NEW (sheet, row, col) of an OLD cell, or None where it was deleted."""
        m = self.by_old(old_key[0])
        if m is None:
            return None
        r, c = m.rows.get(old_key[1]), m.cols.get(old_key[2])
        return None if r is None or c is None else (m.new, r, c)


def _by_sheet(book: Book, parsed: dict) -> dict[str, dict]:
    out: dict[str, dict] = {s: {} for s in book.sheets}
    for k in book.cells:
        c = book.cells[k]
        if c.formula is None and (not c.has_cached or c.cached is None or c.cached == ""):
            continue  # a styled blank
        out.setdefault(k[0], {})[(k[1], k[2])] = parsed[k]
    return out


def _sheet_bag(cells: dict) -> Counter:
    return Counter(content_key(p, r, c, "both") for (r, c), p in cells.items())


def _align_sheet(so: str, sn: str, oc: dict, nc: dict) -> SheetMap:
    m = SheetMap(so, sn)
    m.old_rows = max((r for r, _ in oc), default=0)
    m.new_rows = max((r for r, _ in nc), default=0)
    m.old_cols = max((c for _, c in oc), default=0)
    m.new_cols = max((c for _, c in nc), default=0)
    # columns: what each holds, rows dropped from its references
    ocol = [Counter() for _ in range(m.old_cols)]
    ncol = [Counter() for _ in range(m.new_cols)]
    for (r, c), p in oc.items():
        ocol[c - 1][content_key(p, r, c)] += 1
    for (r, c), p in nc.items():
        ncol[c - 1][content_key(p, r, c)] += 1
    okeys = [hash(frozenset(x.items())) for x in ocol]
    nkeys = [hash(frozenset(x.items())) for x in ncol]
    for i, j in match_sequences(okeys, nkeys, ocol, ncol, similar):
        m.cols[i + 1] = j + 1
    # rows: what each holds in the matched columns, columns dropped from its references
    rank = {c: k for k, c in enumerate(sorted(m.cols))}
    nrank = {m.cols[c]: k for c, k in rank.items()}
    orow: list[list] = [[] for _ in range(m.old_rows)]
    nrow: list[list] = [[] for _ in range(m.new_rows)]
    for (r, c), p in oc.items():
        if c in rank:
            orow[r - 1].append((rank[c], content_key(p, r, c)))
    for (r, c), p in nc.items():
        if c in nrank:
            nrow[r - 1].append((nrank[c], content_key(p, r, c)))
    okeys = [tuple(sorted(x)) for x in orow]
    nkeys = [tuple(sorted(x)) for x in nrow]
    obags = [Counter(x) for x in okeys]
    nbags = [Counter(x) for x in nkeys]
    for i, j in match_sequences(okeys, nkeys, obags, nbags, similar):
        m.rows[i + 1] = j + 1
    return m


def align(old: Book, new: Book) -> Alignment:
    """Match the sheets, rows and columns of two revisions."""
    seen: dict = {}  # formula text -> Parsed: a formula both revisions hold is read once

    def parsed(c: Cell) -> Parsed:
        if c.formula is None:
            return Parsed(False, (), (), c.cached)
        p = seen.get(c.formula)
        if p is None:
            p = seen[c.formula] = parse_cell(c)
        return p

    old_parsed = {k: parsed(c) for k, c in old.cells.items()}
    new_parsed = {k: parsed(c) for k, c in new.cells.items()}
    ocells, ncells = _by_sheet(old, old_parsed), _by_sheet(new, new_parsed)
    new_upper = {s.upper(): s for s in new.sheets}
    pairs: list[tuple[str, str]] = []
    left_old = []
    for s in old.sheets:
        t = new_upper.get(s.upper())
        if t is not None:
            pairs.append((s, t))
        else:
            left_old.append(s)
    taken = {t for _, t in pairs}
    left_new = [s for s in new.sheets if s not in taken]
    renamed: dict[str, str] = {}
    if left_old and left_new:
        bags_new = {s: _sheet_bag(ncells[s]) for s in left_new}
        for s in left_old:
            bag = _sheet_bag(ocells[s])
            best = max(left_new, key=lambda t: similar(bag, bags_new[t]), default=None)
            if best is not None and bag and similar(bag, bags_new[best]) >= THRESHOLD:
                renamed[s] = best
                pairs.append((s, best))
                left_new.remove(best)
    left_old = [s for s in left_old if s not in renamed]
    maps = [_align_sheet(s, t, ocells[s], ncells[t]) for s, t in pairs]
    order = {s: i for i, s in enumerate(new.sheets)}
    maps.sort(key=lambda m: order.get(m.new, 0))
    return Alignment(old, new, maps, renamed, left_new, left_old, old_parsed, new_parsed)


# ---------------------------------------------------------------------------------------
# an OLD formula written in NEW's addresses


def _letters(n: int) -> str:
    s = ""
    while n:
        n, r = divmod(n - 1, 26)
        s = chr(65 + r) + s
    return s


def _render(ref: Ref, sheet_text: str, r1, c1, r2, c2) -> str:
    def cell(r, c, ar, ac):
        return f"{'$' if ac else ''}{_letters(c)}{'$' if ar else ''}{r}"

    if ref.kind == "cell":
        body = cell(r1, c1, ref.abs_r1, ref.abs_c1)
    elif ref.kind == "area":
        body = cell(r1, c1, ref.abs_r1, ref.abs_c1) + ":" + cell(r2, c2, ref.abs_r2, ref.abs_c2)
    elif ref.kind == "cols":
        a, b = "$" if ref.abs_c1 else "", "$" if ref.abs_c2 else ""
        body = f"{a}{_letters(c1)}:{b}{_letters(c2)}"
    else:
        a, b = "$" if ref.abs_r1 else "", "$" if ref.abs_r2 else ""
        body = f"{a}{r1}:{b}{r2}"
    return sheet_text + body


def translate(al: Alignment, sheet: str, p: Parsed) -> str | None:
    """The OLD formula *p* standing in OLD sheet *sheet*, written in NEW's addresses
    (``#REF!`` for a reference to a deleted row or column), without its ``=``; None for a
    constant."""
    if not p.formula:
        return None
    at = dict(p.refs)
    out = []
    for i, (v, _t, _sub) in enumerate(p.toks):
        ref = at.get(i)
        if ref is None or ref.kind in ("name", "table") or ref.book is not None:
            out.append(v)
            continue
        m = al.by_old(ref.sheet or sheet)
        if m is None:
            out.append("#REF!")
            continue
        prefix = ""
        if ref.sheet is not None and ref.sheet2:
            n2 = _new_name(al, ref.sheet2)
            names = f"{m.new}:{n2}"
            plain = quote_sheet(m.new) == m.new and quote_sheet(n2) == n2
            prefix = (names if plain else "'" + names.replace("'", "''") + "'") + "!"
        elif ref.sheet is not None:
            prefix = quote_sheet(m.new) + "!"
        if ref.kind == "cell":
            r1, c1 = m.row(ref.r1), m.col(ref.c1)
            r2, c2 = r1, c1
        else:
            r1 = m.row(ref.r1, +1) if ref.kind != "cols" else ref.r1
            r2 = m.row(ref.r2, -1) if ref.kind != "cols" else ref.r2
            c1 = m.col(ref.c1, +1) if ref.kind != "rows" else ref.c1
            c2 = m.col(ref.c2, -1) if ref.kind != "rows" else ref.c2
        if None in (r1, c1, r2, c2):
            out.append("#REF!")
            continue
        out.append(_render(ref, prefix, r1, c1, r2, c2))
    return "".join(out)


def same_moved(al: Alignment, old_sheet: str, po: Parsed, new_sheet: str, pn: Parsed) -> bool:
    """True when OLD's formula, its references moved as the alignment moved their cells,
    is NEW's formula token for token (a quick test; :func:`translate` writes the text)."""
    if len(po.toks) != len(pn.toks) or len(po.refs) != len(pn.refs):
        return False
    for (i, a), (j, b) in zip(po.refs, pn.refs):
        if i != j or a.kind != b.kind or a.book is not None or b.book is not None:
            return False
        if a.kind in ("name", "table"):
            if a.text.upper() != b.text.upper() or a.sheet != b.sheet:
                return False
            continue
        if (a.abs_r1, a.abs_c1, a.abs_r2, a.abs_c2) != (b.abs_r1, b.abs_c1, b.abs_r2, b.abs_c2):
            return False
        if a.sheet2 or b.sheet2:
            return False
        m = al.by_old(a.sheet or old_sheet)
        if m is None or m.new != (b.sheet and _real(al, b.sheet) or new_sheet):
            return False
        if (a.sheet is None) != (b.sheet is None):
            return False
        if a.kind == "cell":
            moved = (m.row(a.r1), m.col(a.c1), m.row(a.r1), m.col(a.c1))
        else:
            moved = (
                m.row(a.r1, +1) if a.kind != "cols" else a.r1,
                m.col(a.c1, +1) if a.kind != "rows" else a.c1,
                m.row(a.r2, -1) if a.kind != "cols" else a.r2,
                m.col(a.c2, -1) if a.kind != "rows" else a.c2,
            )
        if moved != (b.r1, b.c1, b.r2, b.c2):
            return False
    at = {i for i, _ in po.refs}
    for i, ((v, t, _s), (w, u, _)) in enumerate(zip(po.toks, pn.toks)):
        if i in at:
            continue
        if t != u or (v != w and v.upper() != w.upper()):
            return False
    return True


def _real(al: Alignment, name: str) -> str | None:
    for s in al.new.sheets:
        if s.upper() == name.upper():
            return s
    return None


def _new_name(al: Alignment, old_name: str) -> str:
    m = al.by_old(old_name)
    return m.new if m is not None else old_name


def formula_text(p: Parsed) -> str:
    """A formula's text from its tokens (as :func:`translate` writes an OLD one)."""
    return "".join(v for v, _, _ in p.toks)
