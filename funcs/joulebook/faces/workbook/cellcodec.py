"""How a cell value is written into a spreadsheet part and how it reads back: the one
encoding shared by the writer and the round-trip proof of a written copy."""

from __future__ import annotations

from xml.sax.saxutils import escape, unescape

from .reader import unescape_text

__all__ = ["xml_text", "encode_value", "expected_cached", "same_value"]


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


def encode_value(value) -> tuple[bytes | None, bytes]:
    """(``t`` attribute or None, ``<v>`` text) for a plain cell value.  A non-finite number
    is written as the error value ``#NUM!`` (a spreadsheet cannot hold it)."""
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
    return b"str", xml_text(str(value)).encode("utf-8", "surrogatepass")


def expected_cached(value, max_text: int = 32_767):
    """The saved value the reader gives back for *value* written by the writer."""
    t, v = encode_value(value)
    text = unescape(v.decode("utf-8", "surrogatepass"))
    if t is None:
        return float(text)
    if t == b"b":
        return text == "1"
    if t == b"e":
        return ("error", text)
    return unescape_text(text)[:max_text]


def same_value(saved, value) -> bool:
    """True when *value*, written, reads back as *saved* (a NaN as a NaN)."""
    want = expected_cached(value)
    if isinstance(saved, float) and isinstance(want, float) and saved != saved:
        return want != want
    return type(saved) is type(want) and saved == want
