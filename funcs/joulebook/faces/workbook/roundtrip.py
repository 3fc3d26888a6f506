"""The proof that a recalculated copy lost nothing: run on every ``recalc`` before the copy
replaces its target.

The written package is re-read and compared with the input:

* every member the writer did not patch is byte for byte the same, in the same order;
* each patched sheet part has the same elements, attributes, namespaces and text as the
  input, except the ``t`` attribute and the ``<v>``/``<is>`` of the cells whose values were
  recomputed and the cells added to hold a spilled value (a streaming comparison by hash);
* read back by the reader, every cell that was not recomputed is identical (value, type,
  formula), every recomputed cell keeps its formula and holds exactly the value written, and
  the names, tables, links and sheets are the same;
* only formula cells and the ranges of array formulas and data tables are written.

Any difference raises :class:`CopyMismatch`: the copy is deleted, the target left as it was.
"""

from __future__ import annotations

import math
import zipfile
from pathlib import Path

from defusedxml import ElementTree as SafeET

from .cellcodec import expected_cached
from .reader import Book, read_book, split_ref
from .xmlspans import SML_NAMESPACES, cell_ref

__all__ = ["CopyMismatch", "prove_copy", "expected_cached"]


class CopyMismatch(Exception):
    """The written copy differs from the input outside the recomputed values (a defect of
    joulebook, never of the workbook): nothing is written."""


def _same(a, b) -> bool:
    if isinstance(a, float) and isinstance(b, float) and math.isnan(a) and math.isnan(b):
        return True
    return type(a) is type(b) and a == b


def _where(key) -> str:
    from .refs import col_letters

    return f"{key[0]}!{col_letters(key[2])}{key[1]}"


def _boxes(book: Book) -> dict[str, list[tuple[int, int, int, int]]]:
    """The ranges a recalculation may write beyond formula cells: array formulas' ranges
    and data tables' results, per sheet."""
    out: dict[str, list[tuple[int, int, int, int]]] = {}
    for c in book.cells.values():
        if c.formula is not None and c.array_ref:
            a, _, b = c.array_ref.partition(":")
            r1, c1 = split_ref(a)
            r2, c2 = split_ref(b or a)
            out.setdefault(c.sheet, []).append((r1, c1, r2, c2))
    for t in book.data_tables:
        out.setdefault(t.sheet, []).append(t.box)
    return out


def _owned(book: Book, per_part: dict) -> dict[tuple[str, int, int], object]:
    """Every cell to be written, by (sheet, row, col), checked to be one a recalculation
    may write."""
    sheet_of = {part: s for s, part in book.sheet_parts.items()}
    boxes = _boxes(book)
    out = {}
    for part, values in per_part.items():
        sheet = sheet_of[part]
        for (r, c), v in values.items():
            key = (sheet, r, c)
            cell = book.cells.get(key)
            if cell is None or cell.formula is None:
                inside = any(
                    r1 <= r <= r2 and c1 <= c <= c2 for r1, c1, r2, c2 in boxes.get(sheet, ())
                )
                if not inside:
                    raise CopyMismatch(
                        f"{_where(key)} holds no formula and lies in no array or data table, "
                        "yet a value was to be written there"
                    )
            out[key] = v
    return out


_ROW, _CELL, _VALUE = 1, 2, 3  # the kinds of element the signature tells apart


def _kind(name: str) -> int:
    """The kind of an element named ``uri}local[}prefix]`` (0: any other)."""
    uri, _, rest = name.partition("}")
    if uri not in SML_NAMESPACES:
        return 0
    local = rest.partition("}")[0]
    return {"row": _ROW, "c": _CELL, "v": _VALUE, "is": _VALUE}.get(local, 0)


class _Signature:
    """Every element (name with its prefix, attributes, depth) and text of a sheet part, in
    order, outside the owned cells' values (their ``t`` attribute and ``<v>``/``<is>``);
    cells owned but not in *present*, and rows not in *rows_present* (added by the writer),
    are left out whole."""

    def __init__(self, owned: set[tuple[int, int]], present, rows_present):
        self.out: list = []
        self.owned, self.present, self.rows_present = owned, present, rows_present
        self.owned_rows = {r for r, _c in owned}
        self.in_owned_row = False
        self.row_given = True
        self.found: set[tuple[int, int]] = set()
        self.rows: set[int] = set()
        self.kinds: dict[str, int] = {}
        self.added_row = False  # inside a row the writer added
        self.depth = 0
        self.row = 0
        self.col = 0
        self.row_depth = -1
        self.skip_at = -1  # depth below which nothing is recorded
        self.cell_at = -1  # depth of an owned cell being read

    def start(self, name: str, attrs: dict) -> None:
        self.depth += 1
        d = self.depth
        kind = self.kinds.get(name)
        if kind is None:
            kind = self.kinds[name] = _kind(name)
        if self.added_row:  # every cell of an added row must be one written
            if kind == _CELL and d == self.row_depth + 1:
                ref = attrs.get("r")
                self.col = cell_ref(ref)[1] if ref else self.col + 1
                key = (self.row, self.col)
                self.found.add(key)
                if key not in self.owned:
                    self.out.append("a cell the writer did not own, in a row it added")
            return
        if self.skip_at >= 0:
            return
        if kind == _ROW and d == 3:
            r = attrs.get("r")
            self.row = int(r) if r and r.isdigit() else self.row + 1  # (a cell may say)
            self.row_given = bool(r and r.isdigit())
            self.col, self.row_depth = 0, d
            self.in_owned_row = self.row in self.owned_rows
            self.rows.add(self.row)
            if (
                self.rows_present is not None
                and self.row_given  # the writer states r on every row it adds
                and self.row not in self.rows_present
            ):
                self.added_row = True
                return
        elif (
            kind == _CELL and d == self.row_depth + 1 and (self.in_owned_row or not self.row_given)
        ):
            ref = attrs.get("r")
            if ref:
                row, self.col = cell_ref(ref)
                if not self.row_given and self.row != row:  # a row without r: its cell's
                    self.rows.discard(self.row)
                    self.row = row
                    self.rows.add(row)
                    self.in_owned_row = row in self.owned_rows
                    self.row_given = True
            else:
                self.col += 1
            if not self.in_owned_row:
                self.out.append((d, name, attrs))
                return
            key = (self.row, self.col)
            if key in self.owned:
                self.found.add(key)
                if self.present is not None and key not in self.present:
                    self.skip_at = d  # a cell the writer added
                    return
                attrs = dict(attrs)
                attrs.pop("t", None)
                self.cell_at = d
        elif kind == _VALUE and self.cell_at >= 0 and d == self.cell_at + 1:
            self.skip_at = d
            return
        self.out.append((d, name, attrs))

    def end(self, name: str) -> None:
        d = self.depth
        self.depth -= 1
        if self.added_row:
            if d == self.row_depth:
                self.added_row, self.row_depth = False, -1
            return
        if self.skip_at >= 0:
            if d == self.skip_at:
                self.skip_at = -1
            return
        if d == self.cell_at:
            self.cell_at = -1
        if d == self.row_depth:
            self.row_depth = -1
        self.out.append(d)

    def data(self, text: str) -> None:
        if self.skip_at < 0 and not self.added_row:
            out = self.out
            if out and type(out[-1]) is str:  # text split by the parser: one run
                out[-1] += text
            else:
                out.append(text)


def _signature(data: bytes, owned, present=None, rows=None):
    sig = _Signature(owned, present, rows)
    parser = SafeET.DefusedXMLParser().parser
    parser.namespace_prefixes = True
    parser.ordered_attributes = False
    parser.StartElementHandler = sig.start
    parser.EndElementHandler = sig.end
    parser.CharacterDataHandler = sig.data
    parser.Parse(data, True)
    return sig.out, sig.found, sig.rows


def _compare_parts(book: Book, tmp: Path, per_part: dict) -> None:
    with zipfile.ZipFile(book.path) as a, zipfile.ZipFile(tmp) as b:
        names_a = [i.filename for i in a.infolist()]
        names_b = [i.filename for i in b.infolist()]
        if names_a != names_b:
            raise CopyMismatch("the copy's members are not the input's, in the same order")
        for name in names_a:
            old, new = a.read(name), b.read(name)
            if name in per_part:
                owned = set(per_part[name])
                h_old, present, rows = _signature(old, owned)
                h_new, found, _ = _signature(new, owned, present, rows)
                if h_old != h_new:
                    raise CopyMismatch(
                        f"part {name!r} differs from the input outside the recomputed values"
                    )
                if found != owned:
                    missing = sorted(owned - found)[:3]
                    raise CopyMismatch(f"part {name!r}: cells {missing} were not written")
            elif name == "xl/workbook.xml" and book.full_calc_on_load:
                continue  # compared below through the reader (only fullCalcOnLoad dropped)
            elif old != new:
                raise CopyMismatch(f"member {name!r} changed though nothing in it was recomputed")


def _compare_books(book: Book, again: Book, owned: dict) -> None:
    for attr in (
        "sheets",
        "sheet_parts",
        "names",
        "local_names",
        "external_links",
        "tables",
        "hidden_rows",
        "filtered",
        "data_tables",
    ):
        if getattr(book, attr) != getattr(again, attr):
            raise CopyMismatch(f"the copy's {attr.replace('_', ' ')} differ from the input's")
    if set(book.links) != set(again.links) or any(
        (x.target, x.sheets, x.values)
        != (again.links[k].target, again.links[k].sheets, again.links[k].values)
        for k, x in book.links.items()
    ):
        raise CopyMismatch("the copy's external link caches differ from the input's")
    if again.full_calc_on_load:
        raise CopyMismatch("the copy still asks for a full recalculation on load")
    for key in set(book.cells) | set(again.cells):
        old, new = book.cells.get(key), again.cells.get(key)
        if new is None:
            raise CopyMismatch(f"{_where(key)} is missing from the copy")
        if key in owned:
            want = expected_cached(owned[key])
            same_formula = (old.formula, old.raw_formula, old.array_ref) if old else (None,) * 3
            if (new.formula, new.raw_formula, new.array_ref) != same_formula:
                raise CopyMismatch(f"{_where(key)}: its formula changed in the copy")
            if not new.has_cached or not _same(new.cached, want):
                raise CopyMismatch(
                    f"{_where(key)}: the copy holds {new.cached!r}, not the value written "
                    f"({want!r})"
                )
            continue
        if old is None:
            raise CopyMismatch(f"{_where(key)} appeared in the copy")
        if (old.formula, old.raw_formula, old.array_ref, old.has_cached) != (
            new.formula,
            new.raw_formula,
            new.array_ref,
            new.has_cached,
        ) or not _same(old.cached, new.cached):
            raise CopyMismatch(f"{_where(key)} changed in the copy though it was not recomputed")


def prove_copy(book: Book, tmp: Path, per_part: dict) -> None:
    """Raise :class:`CopyMismatch` unless the package at *tmp* is *book* with only the
    cached values of *per_part* ({part: {(row, col): value}}) changed."""
    owned = _owned(book, per_part)
    _compare_parts(book, tmp, per_part)
    _compare_books(book, read_book(tmp), owned)
