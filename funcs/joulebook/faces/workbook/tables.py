"""Structured references to Excel tables: ``Table1[Amount]``, ``[@Qty]``,
``Table1[[#Totals],[Amount]]``, ``Table1[[#This Row],[A]:[C]]``, ``Table1[#All]``.

The table parts give each table's name, range, header and totals rows and column names
(:class:`joulebook.faces.workbook.reader.Table`); this module turns one structured reference, as the
tokenizer gives it, into the box it stands for.

References
----------
.. [1] ECMA-376 Part 1, Office Open XML File Formats, §18.5 (tables) and §18.17.6.8
   (structured references).
"""

from __future__ import annotations

__all__ = ["resolve", "parse_structured"]

_SPECIALS = {"#ALL", "#DATA", "#HEADERS", "#TOTALS", "#THIS ROW"}


def _items(body: str) -> list[str]:
    """The top-level pieces of a bracket body: ``[#Totals],[Amount]`` → ['[#Totals]', ',',
    '[Amount]']; the apostrophe escapes the next character inside a column name."""
    out, i, n = [], 0, len(body)
    while i < n:
        ch = body[i]
        if ch == "[":
            j, depth = i + 1, 1
            while j < n and depth:
                if body[j] == "'":
                    j += 2
                    continue
                if body[j] == "[":
                    depth += 1
                elif body[j] == "]":
                    depth -= 1
                j += 1
            out.append(body[i:j])
            i = j
        elif ch in ",:":
            out.append(ch)
            i += 1
        elif ch == " ":
            i += 1
        else:
            raise LookupError(f"structured reference piece {body[i:]!r} not understood")
    return out


def _unquote(name: str) -> str:
    out, i = [], 0
    while i < len(name):
        if name[i] == "'" and i + 1 < len(name):
            out.append(name[i + 1])
            i += 2
        else:
            out.append(name[i])
            i += 1
    return "".join(out).strip()


def parse_structured(text: str) -> tuple[str, set[str], list[str]]:
    """``Table1[[#Totals],[A]:[C]]`` → ('Table1', {'#TOTALS'}, ['A', 'C'])."""
    lb = text.find("[")
    if lb < 0 or not text.endswith("]"):
        raise LookupError(f"structured reference {text!r} not understood")
    table, body = text[:lb], text[lb + 1 : -1]
    specials: set[str] = set()
    cols: list[str] = []
    if body.startswith("@"):
        specials.add("#THIS ROW")
        body = body[1:]
        if body and not body.startswith("["):
            body = "[" + body + "]"
    if body == "":
        return table, specials, cols
    if not body.startswith("["):
        body = "[" + body + "]"
    pieces = _items(body)
    for p in pieces:
        if p in (",", ":"):
            continue
        inner = p[1:-1]
        if inner.upper() in _SPECIALS:
            specials.add(inner.upper())
        elif inner.startswith("@"):
            specials.add("#THIS ROW")
            if inner[1:]:
                cols.append(_unquote(inner[1:].strip("[]")))
        else:
            cols.append(_unquote(inner))
    if len(cols) > 2:
        raise LookupError(f"structured reference {text!r}: more than a column span")
    return table, specials, cols


def resolve(book, text: str, here: str, row: int, col: int):
    """(sheets, (r1, c1, r2, c2)) of a structured reference written in (here, row, col)."""
    name, specials, cols = parse_structured(text)
    if name:
        tables = [t for t in book.tables if t.name.upper() == name.upper()]
    else:  # [@Qty] inside a table: the table holding the formula
        tables = [
            t
            for t in book.tables
            if t.sheet == here and t.r1 <= row <= t.r2 and t.c1 <= col <= t.c2
        ]
    if not tables:
        raise LookupError(f"table {name or 'around the cell'!r} not found")
    t = tables[0]
    upper = [c.upper() for c in t.columns]
    if cols:
        try:
            idx = [upper.index(c.upper()) for c in cols]
        except ValueError:
            raise LookupError(f"table {t.name!r} has no column {cols!r}") from None
        c1, c2 = t.c1 + min(idx), t.c1 + max(idx)
    else:
        c1, c2 = t.c1, t.c2
    data1 = t.r1 + t.header_rows
    data2 = t.r2 - t.totals_rows
    if "#THIS ROW" in specials:
        if not (data1 <= row <= data2):
            raise LookupError(f"[#This Row] of table {t.name!r} used outside its data rows")
        r1 = r2 = row
    elif not specials or specials == {"#DATA"}:
        r1, r2 = data1, data2
    elif "#ALL" in specials:
        r1, r2 = t.r1, t.r2
    else:
        rows = []
        if "#HEADERS" in specials:
            if not t.header_rows:
                raise LookupError(f"table {t.name!r} has no header row")
            rows += [t.r1, data1 - 1]
        if "#DATA" in specials:
            rows += [data1, data2]
        if "#TOTALS" in specials:
            if not t.totals_rows:
                raise LookupError(f"table {t.name!r} has no totals row")
            rows += [data2 + 1, t.r2]
        r1, r2 = min(rows), max(rows)
    if r2 < r1:
        raise LookupError(f"table {t.name!r} has no data rows")
    return (t.sheet,), (r1, c1, r2, c2)
