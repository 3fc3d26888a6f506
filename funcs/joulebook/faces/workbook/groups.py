"""Copied-down formulas as groups: cells whose formulas are the same in relative form.

A formula filled down a column (or across a row) is one piece of work written many times:
``=B2*100``, ``=B3*100``, … read the same from each cell.  Two formulas have the same
*relative form* when their tokens are equal once every reference is written relative to the
cell that holds it (an R1C1 reading: rows and columns counted from the cell unless the
reference pins them with ``$``).  A *group* is a run of such cells next to one another in one
column (or one row) of one sheet; a cell with no like neighbour is a group of one.

Everything a person reads treats a group as one thing: the package writes the formula and
its working once, then a table of every row; the map draws it as one node.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

from .reader import col_letters
from .refs import parse_ref, tokens

__all__ = ["Run", "relative_form", "runs"]


def relative_form(sheet: str, formula: str, row: int, col: int) -> tuple | None:
    """The formula in (sheet, row, col) in relative form; None when it cannot be read (a
    formula the tokenizer refuses): such a cell stays a group of its own.

    >>> relative_form("S", "=B2*100", 2, 3) == relative_form("S", "=B7*100", 7, 3)
    True
    >>> relative_form("S", "=$B$2*100", 2, 3) == relative_form("S", "=$B$2*100", 7, 3)
    True
    >>> relative_form("S", "=B2*100", 2, 3) == relative_form("S", "=B2*100", 7, 3)
    False
    """
    try:
        toks = tokens(formula.lstrip("="))
    except Exception:
        return None
    parts: list = [sheet]
    for v, t, sub in toks:
        if t == "OPERAND" and sub == "RANGE":
            ref = parse_ref(v)
            parts.append(("ref", ref.key(row, col)) if ref is not None else ("text", v))
        else:
            parts.append((v, t, sub))
    return tuple(parts)


@dataclass
class Run:
    """Cells of one sheet next to one another in a column or a row, one relative form."""

    sheet: str
    keys: list[tuple[str, int, int]]  # (sheet, row, col), in order

    @property
    def size(self) -> int:
        return len(self.keys)

    @property
    def span(self) -> str:
        """``B2:B501`` (or ``B2`` for a group of one)."""
        (_, r1, c1), (_, r2, c2) = self.keys[0], self.keys[-1]
        a, b = f"{col_letters(c1)}{r1}", f"{col_letters(c2)}{r2}"
        return a if a == b else f"{a}:{b}"


def runs(cells: Iterable[tuple[tuple[str, int, int], str]]) -> list[Run]:
    """Group formula cells ``((sheet, row, col), formula)`` into runs of one relative form:
    down a column first, then what is left across a row.  Every cell is in exactly one run;
    runs come in the order of their first cell (sheet order as given, then row, column).

    >>> rs = runs([(("S", r, 2), f"=A{r}*2") for r in range(1, 6)] + [(("S", 9, 2), "=1")])
    >>> [(r.span, r.size) for r in rs]
    [('B1:B5', 5), ('B9', 1)]
    """
    items = list(cells)
    order = {k: i for i, (k, _) in enumerate(items)}
    form = {k: relative_form(k[0], f, k[1], k[2]) for k, f in items}
    taken: dict[tuple, Run] = {}
    out: list[Run] = []

    def grow(k, step) -> list:
        chain = [k]
        while True:
            s, r, c = chain[-1]
            nxt = (s, r + step[0], c + step[1])
            if nxt in form and nxt not in taken and form[nxt] is not None:
                if form[nxt] == form[k]:
                    chain.append(nxt)
                    continue
            return chain

    for direction in ((1, 0), (0, 1)):
        for k, _ in items:
            if k in taken or form[k] is None:
                continue
            s, r, c = k
            before = (s, r - direction[0], c - direction[1])
            if before in form and before not in taken and form[before] == form[k]:
                continue  # not the start of its run
            chain = grow(k, direction)
            if len(chain) > 1:
                run = Run(s, chain)
                for m in chain:
                    taken[m] = run
                out.append(run)
    for k, _ in items:
        if k not in taken:
            run = Run(k[0], [k])
            taken[k] = run
            out.append(run)
    out.sort(key=lambda r: order[r.keys[0]])
    return out
