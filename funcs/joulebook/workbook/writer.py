"""Write a recalculated copy: every member copied as it was, only cached values patched.

The worksheet XML of a formula cell is rewritten in place: its ``<v>`` (and the ``t`` type
attribute that goes with it) get the recomputed value; the formula, style and every other
byte stay.  ``fullCalcOnLoad`` is dropped from ``xl/workbook.xml`` because the values are now
fresh.  The output is written to a temporary file beside the target and renamed into place,
so an interrupted run leaves the old output or none, never a truncated file.  The input is
never written.
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

from ..errors import BadInput
from ..files import atomic_write
from .reader import Book, split_ref

__all__ = ["write_copy", "patch_sheet_xml", "atomic_write"]

_CELL = re.compile(
    rb"<(?P<p>(?:\w+:)?)c\b(?P<attrs>[^>]*?)(?:/>|>(?P<body>.*?)</(?P=p)c>)", re.DOTALL
)
_ATTR_T = re.compile(rb'\s+t="[^"]*"')
_ATTR_R = re.compile(rb'\br="([A-Za-z]+\d+)"')
_V = re.compile(rb"<(?:\w+:)?v>.*?</(?:\w+:)?v>|<(?:\w+:)?v\s*/>", re.DOTALL)
_IS = re.compile(rb"<(?:\w+:)?is>.*?</(?:\w+:)?is>", re.DOTALL)
_FULLCALC = re.compile(rb'\s+fullCalcOnLoad="(?:1|true)"')


def xml_text(text: str) -> str:
    """Text as a spreadsheet part holds it: characters XML 1.0 cannot carry (control
    characters, lone surrogates) as ``_xHHHH_`` escapes, and a literal ``_xHHHH_`` escaped in
    turn (ECMA-376 Part 1, §22.9.2.19 ST_Xstring)."""
    out = []
    n = len(text)
    for i, ch in enumerate(text):
        o = ord(ch)
        if (o < 0x20 and ch not in "\t\n\r") or 0xD800 <= o <= 0xDFFF or o in (0xFFFE, 0xFFFF):
            out.append(f"_x{o:04X}_")
        elif (
            ch == "_"
            and i + 6 < n
            and text[i + 1] == "x"
            and text[i + 6] == "_"
            and all(c in "0123456789abcdefABCDEF" for c in text[i + 2 : i + 6])
        ):
            out.append("_x005F_")
        else:
            out.append(ch)
    return escape("".join(out))


def _encode(value) -> tuple[bytes | None, bytes]:
    """(t attribute or None, <v> text) for a plain cell value."""
    if isinstance(value, tuple) and value and value[0] == "error":
        return b"e", escape(value[1]).encode()
    if isinstance(value, bool):
        return b"b", b"1" if value else b"0"
    if isinstance(value, float):
        if value != value or value in (float("inf"), float("-inf")):
            return b"e", b"#NUM!"
        text = repr(value)
        return None, text[:-2].encode() if text.endswith(".0") else text.encode()
    if value is None:
        return b"str", b""
    return b"str", xml_text(str(value)).encode("utf-8")


def _cell_xml(ref: bytes, value, p: bytes = b"") -> bytes:
    t, v = _encode(value)
    attrs = b' r="' + ref + b'"' + (b' t="' + t + b'"' if t is not None else b"")
    return b"<" + p + b"c" + attrs + b"><" + p + b"v>" + v + b"</" + p + b"v></" + p + b"c>"


_ROW = re.compile(
    rb'<(?P<p>(?:\w+:)?)row\b(?P<attrs>[^>]*?\br="(?P<r>\d+)"[^>]*?)(?:/>|>(?P<body>.*?)</(?P=p)row>)',
    re.DOTALL,
)
_SHEETDATA = re.compile(
    rb"<(?P<p>(?:\w+:)?)sheetData\s*/>|<(?P<q>(?:\w+:)?)sheetData>(?P<body>.*?)</(?P=q)sheetData>",
    re.DOTALL,
)


def patch_sheet_xml(
    xml: bytes, values: dict[tuple[int, int], object], prefix: bytes = b""
) -> bytes:
    """Patch the cached values of the cells in *values* ({(row, col): value}).

    Cells that have no ``<c>`` element yet (the spill range of an array formula written by a
    program that saved only its anchor) are inserted in row and column order.
    """
    seen: set[tuple[int, int]] = set()

    def sub(m: re.Match) -> bytes:
        attrs = m.group("attrs")
        rm = _ATTR_R.search(attrs)
        if not rm:
            return m.group(0)
        key = split_ref(rm.group(1).decode())
        if key not in values:
            return m.group(0)
        seen.add(key)
        t, v = _encode(values[key])
        attrs = _ATTR_T.sub(b"", attrs)
        if t is not None:
            attrs += b' t="' + t + b'"'
        body = m.group("body") or b""
        body = _IS.sub(b"", body)
        p = m.group("p")
        new_v = b"<" + p + b"v>" + v + b"</" + p + b"v>"
        if _V.search(body):
            body = _V.sub(lambda _m: new_v, body, count=1)
        else:
            body = body + new_v
        return b"<" + p + b"c" + attrs + b">" + body + b"</" + p + b"c>"

    xml = _CELL.sub(sub, xml)
    missing = [k for k in values if k not in seen]
    if not missing:
        return xml
    from .reader import col_letters

    by_row: dict[int, list[tuple[int, bytes]]] = {}
    for r, c in missing:
        ref = f"{col_letters(c)}{r}".encode()
        by_row.setdefault(r, []).append((c, _cell_xml(ref, values[(r, c)])))

    def fix_row(m: re.Match) -> bytes:
        r = int(m.group("r"))
        if r not in by_row:
            return m.group(0)
        p = m.group("p")
        cells = [
            (split_ref(_ATTR_R.search(cm.group("attrs")).group(1).decode())[1], cm.group(0))
            for cm in _CELL.finditer(m.group("body") or b"")
        ]
        cells += by_row.pop(r)
        cells.sort(key=lambda x: x[0])
        return (
            b"<"
            + p
            + b"row"
            + m.group("attrs")
            + b">"
            + b"".join(x[1] for x in cells)
            + b"</"
            + p
            + b"row>"
        )

    xml = _ROW.sub(fix_row, xml)
    if by_row:  # rows that do not exist yet

        def fix_data(m: re.Match) -> bytes:
            p = m.group("p") or m.group("q") or b""
            body = m.group("body") or b""
            rows = [(int(rm.group("r")), rm.group(0)) for rm in _ROW.finditer(body)]
            rows += [
                (
                    r,
                    b"<"
                    + p
                    + b'row r="%d">' % r
                    + b"".join(x[1] for x in sorted(cs))
                    + b"</"
                    + p
                    + b"row>",
                )
                for r, cs in by_row.items()
            ]
            rows.sort(key=lambda x: x[0])
            return (
                b"<" + p + b"sheetData>" + b"".join(x[1] for x in rows) + b"</" + p + b"sheetData>"
            )

        xml = _SHEETDATA.sub(fix_data, xml, count=1)
    return xml


def write_copy(book: Book, outcomes: dict, out: str | Path, force: bool = False) -> Path:
    """Write *book* with the recomputed values of *outcomes* to *out*."""
    out = Path(out)
    if out.resolve() == Path(book.path).resolve():
        raise BadInput(
            "the output must not be the input file; joulebook never writes over its input"
        )
    if out.exists() and not force:
        raise BadInput(f"{out} exists; use --force to replace it")
    if not out.parent.exists():
        raise BadInput(f"folder {out.parent} does not exist")
    per_part: dict[str, dict[tuple[int, int], object]] = {}
    for (sheet, r, c), o in outcomes.items():
        if o.kept:  # not computed here (unsupported, circular, …): keep what was saved
            continue
        per_part.setdefault(book.sheet_parts[sheet], {})[(r, c)] = o.value

    def write(fh):
        with zipfile.ZipFile(book.path) as zin, zipfile.ZipFile(fh, "w") as zout:
            for info in zin.infolist():
                data = zin.read(info)
                if info.filename in per_part:
                    data = patch_sheet_xml(data, per_part[info.filename])
                elif info.filename == "xl/workbook.xml":
                    data = _FULLCALC.sub(b"", data)
                zout.writestr(info, data, compress_type=info.compress_type)

    atomic_write(out, write)
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
                        data = data.replace(
                            b"</Types>",
                            b'<Override PartName="/'
                            + part.encode()
                            + b'" ContentType="application/'
                            b'vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/></Types>',
                        )
                    elif info.filename == "xl/_rels/workbook.xml.rels":
                        data = data.replace(
                            b"</Relationships>",
                            b'<Relationship Id="'
                            + rid
                            + b'" Type="http://schemas.openxmlformats.org/'
                            b'officeDocument/2006/relationships/worksheet" Target="worksheets/sheet'
                            + str(n).encode()
                            + b'.xml"/></Relationships>',
                        )
                    elif info.filename == "xl/workbook.xml":
                        next_id = str(
                            max([int(x) for x in re.findall(rb'sheetId="(\d+)"', data)] or [0]) + 1
                        )
                        data = re.sub(
                            rb"</(\w+:)?sheets>",
                            lambda m: (
                                b'<sheet name="'
                                + escape(sheet_name).encode()
                                + b'" sheetId="'
                                + next_id.encode()  # noqa: B023 - used at once
                                + b'" r:id="'
                                + rid
                                + b'" xmlns:r="http://schemas.'
                                b'openxmlformats.org/officeDocument/2006/relationships"/></'
                                + (m.group(1) or b"")
                                + b"sheets>"
                            ),
                            data,
                            count=1,
                        )
                    zout.writestr(info, data, compress_type=info.compress_type)
                zout.writestr(part, sheet_xml)

        atomic_write(out, write)
    return out
