"""Where each element of an XML part lies, as the XML parser itself found it.

The writer patches a part by replacing the bytes of the elements it owns (a cell's cached
value) and leaving every other byte as it was: quote styles, spaces around ``=``, namespace
prefixes and declarations, comments, cells and attributes it does not own.  The positions come
from defusedxml's hardened expat parser (the reader's parser): each start tag's first byte from
``CurrentByteIndex``, its last by walking the tag's attributes (quoted values may hold ``>``),
each end tag from the parser's index of it.  Nothing is searched for with regular expressions.
"""

from __future__ import annotations

import codecs
from dataclasses import dataclass, field

from defusedxml import ElementTree as SafeET

from joulebook.core.errors import BadInput

__all__ = [
    "SML",
    "SML_STRICT",
    "SML_NAMESPACES",
    "Element",
    "Attr",
    "scan",
    "tag_attrs",
    "cell_ref",
]

SML = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
SML_STRICT = "http://purl.oclc.org/ooxml/spreadsheetml/main"
SML_NAMESPACES = (SML, SML_STRICT)

_WS = b" \t\r\n"


@dataclass(frozen=True, slots=True)
class Attr:
    """One attribute of a start tag: its raw name and the byte span it takes (from the space
    before its name to its closing quote), relative to the tag."""

    name: bytes
    start: int
    end: int


@dataclass(slots=True)
class Element:
    """An element's place in the part: ``start`` (its ``<``), ``tag_end`` (after its start
    tag's ``>``; see :meth:`head`), ``close`` (the ``</`` of its end tag, or ``tag_end`` when it is empty) and
    ``end`` (after its last byte).  ``prefix`` is b"x:" for ``<x:c>``, b"" for the default
    namespace; ``attrs`` as the parser gave them (namespaced ones as ``uri}local``)."""

    uri: str
    local: str
    prefix: bytes
    attrs: dict[str, str]
    start: int
    tag_end: int
    empty: bool
    depth: int
    parent: int  # index of the parent in the scan's list (-1 for the root)
    close: int = -1
    end: int = -1
    children: list[int] = field(default_factory=list)

    def head(self, data: bytes) -> int:
        """The index after the ``>`` of this element's start tag in *data* (its part)."""
        if self.tag_end < 0:
            self.tag_end = _tag_end(data, self.start)
        return self.tag_end


def tag_attrs(tag: bytes) -> tuple[list[Attr], int]:
    """The attributes of a start tag the parser accepted (``<name a="1" b = '2'/>``) and the
    index where its closing ``/>`` or ``>`` begins."""
    n = len(tag)
    i = 1
    while i < n and tag[i] not in b" \t\r\n/>":
        i += 1
    out = []
    while True:
        j = i
        while tag[i] in _WS:
            i += 1
        if tag[i] in b"/>":
            return out, i
        k = i
        while tag[i] not in b" \t\r\n=":
            i += 1
        name = tag[k:i]
        while tag[i] in _WS:
            i += 1
        i += 1  # "="
        while tag[i] in _WS:
            i += 1
        q = tag[i]
        e = tag.index(bytes([q]), i + 1)
        out.append(Attr(name, j, e + 1))
        i = e + 1


def _tag_end(data: bytes, start: int) -> int:
    """The index after the ``>`` of the start tag beginning at *start* (quoted values, which
    may hold ``>``, skipped)."""
    i = start + 1
    while True:
        gt = data.index(b">", i)
        dq = data.find(b'"', i, gt)
        sq = data.find(b"'", i, gt)
        if dq < 0 and sq < 0:
            return gt + 1
        q = dq if sq < 0 or (0 <= dq < sq) else sq
        i = data.index(data[q : q + 1], q + 1) + 1  # after the closing quote


_COLUMNS: dict[str, int] = {}  # "AB" -> 28, filled as references are read


def cell_ref(ref: str) -> tuple[int, int]:
    """(row, column) of a cell reference such as ``B12`` (checked as the reader checks it;
    the column of letters seen before taken from a table)."""
    letters = ref.rstrip("0123456789")
    col = _COLUMNS.get(letters)
    digits = ref[len(letters) :]
    if col is None or not digits or len(digits) > 7 or digits[0] == "0":
        from .reader import split_ref

        row, col = split_ref(ref)
        if len(_COLUMNS) < 20_000:
            _COLUMNS[letters] = col
        return row, col
    row = int(digits)
    if row > 1_048_576:
        from .reader import split_ref

        return split_ref(ref)  # refused there, by name
    return row, col


def _check_encoding(data: bytes, part: str) -> None:
    """Byte positions are spliced in the part's own bytes: it must be UTF-8 (XML's default),
    as every spreadsheet program writes it."""
    if data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE, codecs.BOM_UTF32_LE)):
        raise BadInput(f"part {part!r} is UTF-16/32 encoded; joulebook writes UTF-8 parts only")
    head = data[:200]
    if head.startswith(b"<?xml"):
        decl = head[: head.find(b"?>") + 1].lower()
        k = decl.find(b"encoding")
        if k >= 0:
            rest = decl[k + 8 :].lstrip(b" \t\r\n=").lstrip(b" \t\r\n")
            enc = rest[1:].split(rest[:1])[0] if rest[:1] in (b'"', b"'") else b""
            if enc.replace(b"-", b"").replace(b"_", b"") not in (b"utf8", b"usascii", b"ascii"):
                raise BadInput(
                    f"part {part!r} declares encoding {enc.decode('ascii', 'replace')!r}; "
                    "joulebook writes UTF-8 parts only"
                )


def scan(data: bytes, part: str = "part", keep=None) -> list[Element]:
    """Every element of *data* (or those whose local name is in *keep*, with their parents'
    indices pointing at kept elements only), in document order, with its byte span.

    Raises
    ------
    BadInput
        The part is not well-formed XML, is unsafe (entities, DTDs), or is not UTF-8.
    """
    _check_encoding(data, part)
    parser = SafeET.DefusedXMLParser().parser  # defused: no entities, no DTD, no network
    parser.namespace_prefixes = True
    parser.ordered_attributes = False
    out: list[Element] = []
    open_: list[bool] = []  # per open element: kept or not
    kept: list[int] = []  # indices of the open kept elements
    names: dict[str, tuple[str, str, bytes] | None] = {}  # name -> (uri, local, prefix)

    def start(name: str, attrs: dict[str, str]) -> None:
        split = names.get(name, False)
        if split is False:
            bits = name.split("}")
            uri, local = (bits[0], bits[1]) if len(bits) > 1 else ("", bits[0])
            prefix = (bits[2] + ":").encode() if len(bits) > 2 else b""
            split = names[name] = (
                None if keep is not None and local not in keep else (uri, local, prefix)
            )
        if split is None:
            open_.append(False)
            return
        parent = kept[-1] if kept else -1
        el = Element(*split, attrs, parser.CurrentByteIndex, -1, False, len(open_), parent)
        if parent >= 0:
            out[parent].children.append(len(out))
        open_.append(True)
        kept.append(len(out))
        out.append(el)

    def end(name: str) -> None:
        if not open_.pop():
            return
        el = out[kept.pop()]
        pos = parser.CurrentByteIndex
        # an empty element's end is reported after its "/>" (expat); an end tag at its "</"
        if (
            data[pos - 2 : pos] == b"/>"
            and not el.children
            and (data.find(b">", el.start) == pos - 1 or _tag_end(data, el.start) == pos)
        ):
            el.empty = True
            el.tag_end = el.close = el.end = pos
            return
        if data[pos : pos + 2] != b"</":
            raise ValueError(f"end tag of {el.local} not where the parser put it")
        el.close = pos
        el.end = data.index(b">", pos) + 1

    parser.StartElementHandler = start
    parser.EndElementHandler = end
    try:
        parser.Parse(data, True)
    except BadInput:
        raise
    except Exception as e:  # defusedxml refusals and malformed XML
        raise BadInput(f"part {part!r} is not safe, well-formed XML ({type(e).__name__})") from None
    return out
