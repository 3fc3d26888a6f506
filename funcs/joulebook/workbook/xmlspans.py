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

from ..errors import BadInput

__all__ = [
    "SML",
    "SML_STRICT",
    "SML_NAMESPACES",
    "Element",
    "Attr",
    "scan",
    "tag_attrs",
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
    tag's ``>``), ``close`` (the ``</`` of its end tag, or ``tag_end`` when it is empty) and
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
    """The index after the ``>`` of the start tag beginning at *start* (quoted values skipped)."""
    i, n = start + 1, len(data)
    while i < n:
        ch = data[i]
        if ch == 0x3E:  # ">"
            return i + 1
        if ch in (0x22, 0x27):  # a quoted attribute value may hold ">"
            i = data.index(bytes([ch]), i + 1)
        i += 1
    raise ValueError("unterminated start tag")


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
    stack: list[int] = []  # indices of the open kept elements (-2: an element not kept)

    def start(name: str, attrs: dict[str, str]) -> None:
        bits = name.split("}")
        uri, local = (bits[0], bits[1]) if len(bits) > 1 else ("", bits[0])
        prefix = (bits[2] + ":").encode() if len(bits) > 2 else b""
        if keep is not None and local not in keep:
            stack.append(-2)
            return
        pos = parser.CurrentByteIndex
        tag_end = _tag_end(data, pos)
        empty = data[tag_end - 2] == 0x2F  # "/>"
        parents = [i for i in stack if i >= 0]
        parent = parents[-1] if parents else -1
        el = Element(uri, local, prefix, attrs, pos, tag_end, empty, len(stack), parent)
        if empty:
            el.close = el.end = tag_end
        if parent >= 0:
            out[parent].children.append(len(out))
        stack.append(len(out))
        out.append(el)

    def end(name: str) -> None:
        i = stack.pop()
        if i < 0:
            return
        el = out[i]
        if el.empty:
            return
        pos = parser.CurrentByteIndex
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
