"""The UNO type library of the Calc extension, written without LibreOffice's SDK.

Calc finds an add-in's functions by introspecting an interface type, so the extension carries
a type library (``types.rdb``) declaring ``org.joulebook.calc.XFunctions``: one method per
worksheet function.  LibreOffice reads type libraries in its binary UNOIDL format; this module
writes the small part of it an add-in needs — nested modules and one interface whose methods
take ``in`` parameters — so that ``joulebook calc-extension`` works wherever joulebook is
installed.

Layout (all integers little-endian, unsigned 32-bit unless said otherwise) [1]_:

* header: the 8 bytes ``UNOIDL\\xff\\0``, the root map's offset, the root map's entry count;
* a *name* is a 32-bit length and that many ASCII bytes (written in place; LibreOffice also
  accepts a back-reference with the high bit set, which is not used here);
* an interface entity: a kind byte (5 = interface), mandatory bases (count + names), optional
  bases (count 0), attributes (count 0), methods (count, then per method: name, return type,
  parameter count and per parameter a direction byte (0 = in), its name and type; the
  exception count 0);
* a module: a kind byte 0, its entry count and entries; an entry is the offset of its
  NUL-terminated name and the offset of its entity; entries are sorted by name (LibreOffice
  looks them up by binary search); the root map is a module without the kind byte and count.

References
----------
.. [1] LibreOffice, ``unoidl/source/unoidlprovider.cxx`` and ``unoidl-write`` (MPL-2.0),
   the reader and writer of the format.
"""

from __future__ import annotations

import struct

__all__ = ["MAGIC", "type_library"]

MAGIC = b"UNOIDL\xff\x00"
_INTERFACE = 5
_MODULE = 0
_IN = 0


def _u32(value: int) -> bytes:
    return struct.pack("<I", value)


def _name(text: str) -> bytes:
    raw = text.encode("ascii")
    return _u32(len(raw)) + raw


def _interface(methods, base: str) -> bytes:
    out = bytearray([_INTERFACE])
    out += _u32(1) + _name(base) + _u32(0) + _u32(0) + _u32(len(methods))
    for name, returns, params in methods:
        out += _name(name) + _name(returns) + _u32(len(params))
        for pname, ptype in params:
            out += bytes([_IN]) + _name(pname) + _name(ptype)
        out += _u32(0)  # no exceptions
    return bytes(out)


def type_library(qualified: str, methods, base: str = "com.sun.star.uno.XInterface") -> bytes:
    """The type library declaring one interface.

    Parameters
    ----------
    qualified : str
        The interface's full name, e.g. ``"org.joulebook.calc.XFunctions"``.
    methods : sequence of (str, str, sequence of (str, str))
        Per method: its name, its return type and its ``in`` parameters (name, type); types in
        UNO's spelling (``any``, ``[][]any``, ``com.sun.star.beans.XPropertySet``).
    base : str
        The interface it inherits.

    Returns
    -------
    bytes
        The file's content.

    Examples
    --------
    >>> data = type_library("org.example.XDemo", [("TWICE", "any", [("x", "any")])])
    >>> data[:8] == MAGIC
    True
    """
    *modules, leaf = qualified.split(".")
    if not modules or not all(p.isidentifier() and p.isascii() for p in [*modules, leaf]):
        raise ValueError(f"not a qualified UNO name: {qualified!r}")
    out = bytearray(MAGIC + _u32(0) + _u32(0))
    entity = len(out)
    out += _interface(methods, base)
    entries = [(leaf, entity)]
    for depth in range(len(modules), -1, -1):
        placed = []
        for name, data in sorted(entries):
            placed.append((len(out), data))
            out += name.encode("ascii") + b"\0"
        offset = len(out)
        if depth:
            out += bytes([_MODULE]) + _u32(len(placed))
        for name_at, data_at in placed:
            out += _u32(name_at) + _u32(data_at)
        if not depth:
            out[8:16] = _u32(offset) + _u32(len(placed))
            break
        entries = [(modules[depth - 1], offset)]
    return bytes(out)
