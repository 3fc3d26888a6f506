"""Write a recalculated copy: every member copied as it was, only cached values patched.

A sheet part is parsed (:mod:`.xmlspans`, the reader's hardened parser) and the cells whose
values were recomputed are patched where the parser found them: their ``<v>`` (and the ``t``
type attribute that goes with it) get the recomputed value; the formula, style, every other
cell and every other byte (quote styles, namespace prefixes, comments) stay.  The same parse
gives ``xl/workbook.xml``'s ``fullCalcOnLoad``, dropped because the values are now fresh.
The output is written to a temporary file beside the target, proved equal to the input
outside the cached values listed (:mod:`.roundtrip`), and only then renamed into place, so
an interrupted or refused run leaves the old output or none, never a truncated or damaged
file.  The input is never written.
"""

from __future__ import annotations

import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

from joulebook.core.errors import BadInput

from ..files import atomic_write
from .cellcodec import encode_value, same_value, xml_text
from .reader import Book
from .refs import col_letters
from .xmlspans import SML_NAMESPACES, Element, cell_ref, scan, tag_attrs

__all__ = ["write_copy", "patch_sheet_xml", "atomic_write", "encode_value", "xml_text"]


def _v(prefix: bytes, v: bytes) -> bytes:
    return b"<" + prefix + b"v>" + v + b"</" + prefix + b"v>"


def _new_cell(prefix: bytes, row: int, col: int, value) -> bytes:
    t, v = encode_value(value)
    ref = f"{col_letters(col)}{row}".encode()
    attrs = b' r="' + ref + b'"' + (b' t="' + t + b'"' if t is not None else b"")
    return b"<" + prefix + b"c" + attrs + b">" + _v(prefix, v) + b"</" + prefix + b"c>"


def _without(tag: bytes, name: bytes) -> tuple[bytes, int]:
    """*tag* without its unprefixed attribute *name*, and where its closing begins."""
    attrs, close = tag_attrs(tag)
    out, at = [], 0
    for a in attrs:
        if a.name == name:
            out.append(tag[at : a.start])
            at = a.end
    out.append(tag[at:])
    cut = sum(a.end - a.start for a in attrs if a.name == name)
    return b"".join(out), close - cut


def _patched_cell(xml: bytes, els: list[Element], i: int, value) -> bytes:
    """The bytes of cell *i* with *value* cached: its ``t`` attribute and ``<v>``/``<is>``
    children replaced, every other attribute and child (``<f>``, ``extLst``) kept."""
    c = els[i]
    t, v = encode_value(value)
    tag, close = _without(xml[c.start : c.head(xml)], b"t")
    head = tag[:close].rstrip(b" \t\r\n") + (b' t="' + t + b'"' if t is not None else b"")
    new_v = _v(c.prefix, v)
    if c.empty:
        return head + b">" + new_v + b"</" + c.prefix + b"c>"
    body, at, placed = [], c.head(xml), False
    for k in c.children:
        ch = els[k]
        if ch.uri not in SML_NAMESPACES or ch.local not in ("f", "v", "is"):
            continue
        if ch.depth != c.depth + 1:  # not the cell's own (the reader reads its own only)
            continue
        if ch.local == "f":
            body.append(xml[at : ch.end])
            at = ch.end
            if not placed:
                body.append(new_v)
                placed = True
            continue
        body.append(xml[at : ch.start])  # an old value: dropped
        at = ch.end
    rest = xml[at : c.close]
    if not placed:
        body.insert(0, new_v)  # no formula: the value comes first (f?, v?, is?)
    return head + b">" + b"".join(body) + rest + xml[c.close : c.end]


def _position(els: list[Element], xml: bytes, wanted: set[int] | None = None):
    """The sheet's ``<sheetData>``, its rows and cells as the reader numbers them: a row's
    ``r`` or the one after the previous row; a cell's ``r`` or the column after the
    previous cell's (ECMA-376 Part 1, §18.3.1.73 and §18.3.1.4); a row without ``r`` is
    its first cell's row.  The reader refuses a cell outside its row."""
    data = next(
        (
            i
            for i, e in enumerate(els)
            if e.local == "sheetData" and e.uri in SML_NAMESPACES and e.depth == 1
        ),
        None,
    )
    rows: list[tuple[int, int, list[tuple[int, int]]]] = []  # (row, index, [(col, index)])
    if data is None:
        return None, rows
    r = 0
    for ri in els[data].children:
        row = els[ri]
        if row.local != "row" or row.uri not in SML_NAMESPACES:
            continue
        rr = row.attrs.get("r")
        mine = [
            ci
            for ci in row.children
            if els[ci].local == "c"
            and els[ci].uri in SML_NAMESPACES
            and els[ci].depth == row.depth + 1
        ]
        if rr and rr.isdigit():
            r = int(rr)
        elif mine and els[mine[0]].attrs.get("r"):  # a row without r: its first cell's
            r = cell_ref(els[mine[0]].attrs["r"])[0]
        else:
            r += 1
        cells, col = [], 0
        if wanted is not None and r not in wanted:  # no cell of it is written
            rows.append((r, ri, cells))
            continue
        for ci in mine:
            ref = els[ci].attrs.get("r")
            col = cell_ref(ref)[1] if ref else col + 1
            cells.append((col, ci))
        rows.append((r, ri, cells))
    return data, rows


def patch_sheet_xml(xml: bytes, values: dict[tuple[int, int], object], part: str = "") -> bytes:
    """Patch the cached values of the cells in *values* ({(row, col): value}).

    Cells that have no ``<c>`` element yet (the spill range of an array formula written by a
    program that saved only its anchor) are inserted in row and column order.
    """
    els = scan(xml, part or "sheet", keep={"worksheet", "sheetData", "row", "c", "f", "v", "is"})
    data, rows = _position(els, xml, {r for r, _c in values})
    if data is None:
        raise BadInput(f"part {part or 'sheet'!r} has no <sheetData>: not a worksheet")
    edits: list[tuple[int, int, bytes]] = []  # (start, end, new bytes)
    todo = dict(values)
    for r, _ri, cells in rows:
        for col, ci in cells:
            if (r, col) in values:
                edits.append(
                    (els[ci].start, els[ci].end, _patched_cell(xml, els, ci, values[(r, col)]))
                )
                todo.pop((r, col), None)
    if todo:
        edits += _insertions(xml, els, data, rows, todo)
    return _apply(xml, edits)


def _opened(xml: bytes, el: Element, inside: bytes) -> bytes:
    """An empty element (``<row r="5"/>``) opened to hold *inside*, its attributes kept."""
    head = xml[el.start : el.head(xml)]
    close = tag_attrs(head)[1]
    return head[:close] + b">" + inside + b"</" + el.prefix + el.local.encode() + b">"


def _insertions(xml, els, data, rows, todo) -> list[tuple[int, int, bytes]]:
    """Edits adding the cells of *todo* that have no ``<c>`` yet, in row and column order."""
    edits = []
    sd = els[data]
    by_row: dict[int, list[int]] = {}
    for r, c in todo:
        by_row.setdefault(r, []).append(c)
    known = {r: (ri, cells) for r, ri, cells in rows}
    new_rows = []
    for r, cols in sorted(by_row.items()):
        cols.sort()
        if r in known:
            ri, cells = known[r]
            row = els[ri]
            if row.empty:  # <row r="5"/>: opened to hold its cells
                inside = b"".join(_new_cell(row.prefix, r, c, todo[(r, c)]) for c in cols)
                edits.append((row.start, row.end, _opened(xml, row, inside)))
                continue
            for c in cols:
                after = [els[ci].start for col, ci in cells if col > c]
                at = after[0] if after else row.close
                edits.append((at, at, _new_cell(row.prefix, r, c, todo[(r, c)])))
            continue
        p = sd.prefix
        new = (
            b"<"
            + p
            + b'row r="%d">' % r
            + b"".join(_new_cell(p, r, c, todo[(r, c)]) for c in cols)
            + b"</"
            + p
            + b"row>"
        )
        new_rows.append((r, new))
    if new_rows and sd.empty:
        edits.append((sd.start, sd.end, _opened(xml, sd, b"".join(n for _, n in new_rows))))
    elif new_rows:
        for r, new in new_rows:
            later = [els[ri].start for rr, ri, _ in rows if rr > r]
            at = later[0] if later else sd.close
            edits.append((at, at, new))
    return edits


def _apply(xml: bytes, edits: list[tuple[int, int, bytes]]) -> bytes:
    """*xml* with each span replaced (insertions at one point in the order given, before a
    replacement starting there)."""
    order = sorted(range(len(edits)), key=lambda i: (edits[i][0], edits[i][1], i))
    out, at = [], 0
    for i in order:
        s, e, b = edits[i]
        if s < at:
            raise ValueError("overlapping edits of one part")
        out.append(xml[at:s])
        out.append(b)
        at = e
    out.append(xml[at:])
    return b"".join(out)


def drop_full_calc(xml: bytes) -> bytes:
    """``xl/workbook.xml`` without ``fullCalcOnLoad`` on its ``<calcPr>`` (the values are
    fresh); every other byte kept."""
    for el in scan(xml, "xl/workbook.xml", keep={"calcPr"}):
        if el.uri in SML_NAMESPACES and "fullCalcOnLoad" in el.attrs:
            end = el.head(xml)
            tag, _ = _without(xml[el.start : end], b"fullCalcOnLoad")
            return xml[: el.start] + tag + xml[end:]
    return xml


def _listed(book: Book, outcomes: dict) -> dict[str, dict[tuple[int, int], object]]:
    """The cached values to write, per sheet part: computed cells only (a cell the engine
    could not compute keeps what was saved)."""
    per_part: dict[str, dict[tuple[int, int], object]] = {}
    for key, o in outcomes.items():
        if o.kept:  # not computed here (unsupported, circular, …): keep what was saved
            continue
        cell = book.cells.get(key)
        if cell is not None and cell.has_cached and same_value(cell.cached, o.value):
            continue  # saved as it would be written: its bytes stay as they are
        per_part.setdefault(book.sheet_parts[key[0]], {})[key[1:]] = o.value
    return per_part


def write_copy(book: Book, outcomes: dict, out: str | Path, force: bool = False) -> Path:
    """Write *book* with the recomputed values of *outcomes* to *out*, after proving that
    the written package re-reads as *book* with only those cached values changed.

    Raises
    ------
    BadInput
        *out* is the input, exists without *force*, or its folder does not exist.
    joulebook.faces.workbook.roundtrip.CopyMismatch
        The written copy would differ from the input outside the values listed (a defect of
        joulebook); nothing is written.
    """
    from .roundtrip import prove_copy

    out = Path(out)
    if out.resolve() == Path(book.path).resolve():
        raise BadInput(
            "the output must not be the input file; joulebook never writes over its input"
        )
    if out.exists() and not force:
        raise BadInput(f"{out} exists; use --force to replace it")
    if not out.parent.exists():
        raise BadInput(f"folder {out.parent} does not exist")
    per_part = _listed(book, outcomes)

    def write(fh):
        with zipfile.ZipFile(book.path) as zin, zipfile.ZipFile(fh, "w") as zout:
            for info in zin.infolist():
                data = zin.read(info)
                if info.filename in per_part:
                    data = patch_sheet_xml(data, per_part[info.filename], info.filename)
                elif info.filename == "xl/workbook.xml" and book.full_calc_on_load:
                    data = drop_full_calc(data)
                zout.writestr(info, data, compress_type=info.compress_type)

    atomic_write(out, write, verify=lambda tmp: prove_copy(book, tmp, per_part))
    return out


def _inline(text: str) -> bytes:
    t = xml_text(str(text)[:32_767])
    return b'<c t="inlineStr"><is><t xml:space="preserve">' + t.encode("utf-8") + b"</t></is></c>"


def add_sheet_copy(
    src: str | Path, out: str | Path, sheet_name: str, rows: list[list[object]], force: bool = False
) -> Path:
    """Write a copy of *src* with one more worksheet holding *rows* (text and numbers).

    Every existing member is copied byte for byte except the three that must list the new
    part: ``[Content_Types].xml``, ``xl/workbook.xml`` and its relationships.
    """
    src, out = Path(src), Path(out)
    if out.resolve() == src.resolve():
        raise BadInput(
            "the output must not be the input file; joulebook never writes over its input"
        )
    if out.exists() and not force:
        raise BadInput(f"{out} exists; use --force to replace it")
    with zipfile.ZipFile(src) as zin:
        names = zin.namelist()
        n = 1
        while f"xl/worksheets/sheet{n}.xml" in names:
            n += 1
        part = f"xl/worksheets/sheet{n}.xml"
        body = []
        for i, row in enumerate(rows, start=1):
            cells = []
            for v in row:
                if isinstance(v, float) and v == v and abs(v) != float("inf"):
                    cells.append(b"<c><v>" + repr(v).encode() + b"</v></c>")
                else:
                    cells.append(_inline("" if v is None else v))
            body.append(b'<row r="%d">' % i + b"".join(cells) + b"</row>")
        sheet_xml = (
            b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
            b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
            b"<sheetData>" + b"".join(body) + b"</sheetData></worksheet>"
        )
        rid = b"rIdJoulebookAudit"

        def write(fh):
            with zipfile.ZipFile(fh, "w", zipfile.ZIP_DEFLATED) as zout:
                for info in zin.infolist():
                    data = zin.read(info)
                    if info.filename == "[Content_Types].xml":
                        data = _append_to_root(
                            data,
                            info.filename,
                            b'<Override PartName="/'
                            + part.encode()
                            + b'" ContentType="application/'
                            b'vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>',
                        )
                    elif info.filename == "xl/_rels/workbook.xml.rels":
                        data = _append_to_root(
                            data,
                            info.filename,
                            b'<Relationship Id="'
                            + rid
                            + b'" Type="http://schemas.openxmlformats.org/'
                            b'officeDocument/2006/relationships/worksheet" Target="worksheets/sheet'
                            + str(n).encode()
                            + b'.xml"/>',
                        )
                    elif info.filename == "xl/workbook.xml":
                        data = _add_sheet_entry(data, sheet_name, rid)
                    zout.writestr(info, data, compress_type=info.compress_type)
                zout.writestr(part, sheet_xml)

        atomic_write(out, write)
    return out


def _append_to_root(xml: bytes, part: str, new: bytes) -> bytes:
    """*xml* with *new* added as the last child of its root element."""
    r = scan(xml, part)[0]
    if r.empty:
        return xml[: r.start] + _opened(xml, r, new) + xml[r.end :]
    return xml[: r.close] + new + xml[r.close :]


def _add_sheet_entry(xml: bytes, name: str, rid: bytes) -> bytes:
    """``xl/workbook.xml`` listing one more sheet, *name*, as relationship *rid*."""
    els = scan(xml, "xl/workbook.xml", keep={"sheets", "sheet"})
    sheets = next((e for e in els if e.local == "sheets" and e.uri in SML_NAMESPACES), None)
    if sheets is None:
        raise BadInput("xl/workbook.xml lists no <sheets>: not a workbook")
    ids = [
        int(e.attrs["sheetId"])
        for e in els
        if e.local == "sheet" and e.attrs.get("sheetId", "").isdigit()
    ]
    p = sheets.prefix
    new = (
        b"<"
        + p
        + b"sheet"
        + b' name="'
        + escape(name, {'"': "&quot;"}).encode()
        + b'" sheetId="'
        + str(max(ids or [0]) + 1).encode()
        + b'" r:id="'
        + rid
        + b'" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"/>'
    )
    if sheets.empty:
        return xml[: sheets.start] + _opened(xml, sheets, new) + xml[sheets.end :]
    return xml[: sheets.close] + new + xml[sheets.close :]
