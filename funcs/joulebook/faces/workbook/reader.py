"""Safe, streaming reader of .xlsx/.xlsm packages.

Limits are checked on the zip directory before any XML is parsed (member count and sizes,
compression ratio); XML is parsed with defusedxml (no entities, no DTDs, no network) in one
streaming pass per part; the ``<dimension>`` tag is never trusted; cell and formula counts are
bounded while reading.  Nothing in the workbook is executed or fetched.
"""

from __future__ import annotations

import contextlib
import gc
import hashlib
import posixpath
import re
import struct
import zipfile
import zlib
from dataclasses import dataclass, field
from pathlib import Path

from defusedxml import DefusedXmlException
from defusedxml import ElementTree as SafeET

from joulebook.core.errors import BadInput

from .refs import col_letters, col_number, normalise

__all__ = [
    "Limits",
    "Cell",
    "Book",
    "read_book",
    "split_ref",
    "col_number",
    "col_letters",
]

NS = "{http://schemas.openxmlformats.org/spreadsheetml/2006/main}"
RNS = "{http://schemas.openxmlformats.org/officeDocument/2006/relationships}"
PKG_RNS = "{http://schemas.openxmlformats.org/package/2006/relationships}"
#: Strict Open XML (ISO/IEC 29500 Strict, which Excel can save) names the same elements
#: in other namespaces: read by renaming them to the transitional ones
_STRICT = {
    "http://purl.oclc.org/ooxml/spreadsheetml/main": NS[1:-1],
    "http://purl.oclc.org/ooxml/officeDocument/relationships": RNS[1:-1],
}


def _transitional(name: str) -> str:
    """An element or attribute name ("{uri}local" or "uri}local") in the transitional
    namespace when it is in a Strict one."""
    for strict, trans in _STRICT.items():
        if strict in name:
            return name.replace(strict, trans, 1)
    return name


def _to_transitional(root):
    """Rename every Strict element and attribute of a parsed part (in place)."""
    for el in root.iter():
        el.tag = _transitional(el.tag)
        for k in [k for k in el.attrib if k.startswith("{http://purl.oclc.org/")]:
            el.attrib[_transitional(k)] = el.attrib.pop(k)
    return root


@dataclass(frozen=True)
class Limits:
    """Bounds checked before and while reading (all configurable)."""

    max_members: int = 5_000
    max_member_bytes: int = 300 * 2**20  # uncompressed size of one part
    max_total_bytes: int = 1 * 2**30
    max_ratio: float = 200.0  # uncompressed / compressed, for parts over 1 MiB
    max_cells: int = 3_000_000
    max_formulas: int = 1_000_000
    max_text: int = 32_767  # Excel's own cell-text limit
    max_range_cells: int = 250_000  # cells of one declared range (array, shared, data table)
    max_formula_chars: int = 8_192  # Excel's own formula-length limit
    max_nesting: int = 64  # Excel's own limit of nested function calls


@dataclass(slots=True)
class Cell:
    sheet: str
    row: int
    col: int
    formula: str | None = None  # without the leading "="; our names normalised
    array_ref: str | None = None  # anchor of an array / spilled formula: its range
    cached: object = None  # float, str, bool, ("error", "#N/A") or None
    has_cached: bool = False
    raw_formula: str | None = None  # as saved

    @property
    def ref(self) -> str:
        return f"{col_letters(self.col)}{self.row}"


@dataclass
class Link:
    """The values another workbook had when this one last read it (an externalLink part)."""

    index: str
    target: str  # the linked file as the part names it
    sheets: list[str]
    values: dict[tuple[str, int, int], object] = field(default_factory=dict)

    def sheet_key(self, name: str) -> str | None:
        """The key the engine stores this link's sheet under ("[1]Sheet1"), or None."""
        for s in self.sheets:
            if s.upper() == name.upper():
                return f"[{self.index}]{s}"
        return None


@dataclass
class Table:
    """An Excel table (a table part): its name, sheet, range, header/totals rows, columns."""

    name: str
    sheet: str
    r1: int
    c1: int
    r2: int
    c2: int
    header_rows: int
    totals_rows: int
    columns: list[str]


@dataclass(frozen=True)
class DataTable:
    """A What-If data table: its range of results and the input cells it varies.  A table of
    one input down a column has its formulas in the row above the range and the values in the
    column to its left (``row_input`` None); across a row, the other way round
    (``col_input`` None); with two inputs, one formula above-left of the range."""

    sheet: str
    box: tuple[int, int, int, int]  # r1, c1, r2, c2 of the results
    row_input: tuple[int, int] | None  # the cell the values of the row above stand in for
    col_input: tuple[int, int] | None  # the cell the values of the column at left stand in for


@dataclass
class Book:
    path: Path
    sha256: str
    sheets: list[str]
    sheet_parts: dict[str, str]
    cells: dict[tuple[str, int, int], Cell] = field(default_factory=dict)
    names: dict[str, str] = field(default_factory=dict)  # defined names (global) -> reference text
    full_calc_on_load: bool = False
    external_links: int = 0
    local_names: dict[tuple[str, str], str] = field(default_factory=dict)  # (sheet, NAME) -> text
    links: dict[str, Link] = field(default_factory=dict)  # "1" -> the cache of [1]
    tables: list[Table] = field(default_factory=list)
    hidden_rows: dict[str, set[int]] = field(default_factory=dict)  # sheet -> hidden row numbers
    filtered: set[str] = field(default_factory=set)  # sheets with an AutoFilter
    data_tables: list[DataTable] = field(default_factory=list)  # What-If data tables
    strict: bool = False  # saved in Strict Open XML (read as the transitional namespace)

    def formula_cells(self) -> list[Cell]:
        return [c for c in self.cells.values() if c.formula is not None]


_REF = re.compile(r"^\$?([A-Za-z]{1,3})\$?([0-9]{1,7})$")


def split_ref(ref: str) -> tuple[int, int]:
    """'B12' -> (12, 2); a reference beyond XFD1048576 (Excel's last cell) is refused."""
    m = _REF.match(ref)
    if not m:
        raise BadInput(f"cell reference {ref[:40]!r} is not like A1")
    row, col = int(m.group(2)), col_number(m.group(1))
    if not (1 <= row <= 1_048_576 and col <= 16_384):
        raise BadInput(f"cell reference {ref!r} lies outside A1:XFD1048576")
    return row, col


def _check_package(zf: zipfile.ZipFile, limits: Limits) -> None:
    infos = zf.infolist()
    if len(infos) > limits.max_members:
        raise BadInput(f"workbook has {len(infos)} parts; the limit is {limits.max_members}")
    total = 0
    for i in infos:
        if i.file_size > limits.max_member_bytes:
            raise BadInput(
                f"part {i.filename[:60]!r} unpacks to {i.file_size // 2**20} MiB; "
                f"the limit is {limits.max_member_bytes // 2**20} MiB"
            )
        if i.file_size > 2**20 and i.file_size / max(i.compress_size, 1) > limits.max_ratio:
            raise BadInput(
                f"part {i.filename[:60]!r} is compressed {i.file_size / max(i.compress_size, 1):.0f}:1; "
                f"the limit is {limits.max_ratio:.0f}:1 (zip bomb?)"
            )
        total += i.file_size
    if total > limits.max_total_bytes:
        raise BadInput(
            f"workbook unpacks to {total // 2**20} MiB; the limit is {limits.max_total_bytes // 2**20} MiB"
        )
    # every member is unpacked and its checksum checked once, so that check (which reads
    # some parts) and recalc (which copies them all) agree on what is readable
    for i in infos:
        try:
            with zf.open(i) as fh:
                while fh.read(1 << 20):
                    pass
        except Exception as e:  # bad CRC, damaged deflate stream, unknown method, …
            raise BadInput(
                f"part {i.filename[:60]!r} cannot be unpacked ({type(e).__name__}: "
                f"{str(e)[:80]}): a damaged or unsupported zip package"
            ) from None


def _is_strict(zf: zipfile.ZipFile) -> bool:
    """True when xl/workbook.xml is in the Strict SpreadsheetML namespace (its first bytes)."""
    try:
        with zf.open("xl/workbook.xml") as fh:
            head = fh.read(4096)
    except KeyError:
        return False
    return b"http://purl.oclc.org/ooxml/spreadsheetml/main" in head


def _parse(zf: zipfile.ZipFile, name: str):
    try:
        with zf.open(name) as fh:
            root = SafeET.parse(fh).getroot()
    except KeyError:
        return None
    except Exception as e:  # defusedxml refusals and malformed XML
        raise BadInput(f"part {name!r} is not safe, well-formed XML ({type(e).__name__})") from None
    if root.tag.startswith("{http://purl.oclc.org/"):
        _to_transitional(root)
    return root


def unescape_text(text: str) -> str:
    """Decode the ``_xHHHH_`` escapes of a spreadsheet string (ECMA-376 Part 1,
    §22.9.2.19 ST_Xstring): ``_x000D_`` is a carriage return, ``_x005F_`` a literal ``_``."""
    if "_x" not in text:
        return text
    out, i, n = [], 0, len(text)
    while i < n:
        if (
            text.startswith("_x", i)
            and i + 6 < n
            and text[i + 6] == "_"
            and all(c in "0123456789abcdefABCDEF" for c in text[i + 2 : i + 6])
        ):
            out.append(chr(int(text[i + 2 : i + 6], 16)))
            i += 7
        else:
            out.append(text[i])
            i += 1
    return "".join(out)


def _text_of(elem) -> str:
    """Concatenated text of <t> runs (phonetic runs excluded), escapes decoded."""
    parts = []
    skip = set()
    for node in elem.iter():
        if node.tag == NS + "rPh":
            skip.update(id(x) for x in node.iter())
            continue
        if node.tag == NS + "t" and node.text and id(node) not in skip:
            parts.append(node.text)
    return unescape_text("".join(parts))


_CFB = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"  # an OLE compound file ([MS-CFB] 2.2)


def _not_a_package(data: bytes) -> str:
    """Why *data* is not an .xlsx/.xlsm package, in words a user can act on.

    An encrypted workbook is a compound file holding the streams ``EncryptionInfo`` and
    ``EncryptedPackage`` ([MS-OFFCRYPTO] 2.3.4); a legacy .xls holds ``Workbook`` (or ``Book``)
    ([MS-XLS] 2.1.2).  Directory entry names are UTF-16LE ([MS-CFB] 2.6.1)."""
    if data.startswith(_CFB):
        if "EncryptedPackage".encode("utf-16-le") in data:
            return (
                "password-protected (encrypted): save an unprotected copy to check it, or "
                "check it where the password may be used"
            )
        if "Workbook".encode("utf-16-le") in data or "Book".encode("utf-16-le") in data:
            return "a legacy binary .xls workbook: save it as .xlsx or .xlsm to check it"
        return "an OLE compound file, not an .xlsx/.xlsm package"
    if data[:4] == b"PK\x03\x04":
        return "a damaged zip package (truncated or corrupt): joulebook reads .xlsx/.xlsm"
    if not data:
        return "an empty file, not an .xlsx/.xlsm package"
    head = data[:512]
    if b"\x00" not in head and (b"," in head or b";" in head or b"\t" in head):
        return "text (it looks like CSV), not an .xlsx/.xlsm package: open it and save as .xlsx"
    return "not a zip package; joulebook reads .xlsx/.xlsm workbooks"


@contextlib.contextmanager
def paused_gc():
    """Python's cyclic garbage collector paused while a workbook is read or computed.

    Reading and computing make one or more objects per cell, none of them in reference
    cycles; the collector, triggered by the count of new objects, would walk every one of
    them again and again (a 100,000-cell workbook took twice as long).  Reference counting
    frees everything as before; the collector resumes afterwards as it was.  The objects
    made meanwhile join the oldest generation without a walk (``gc.freeze`` then
    ``gc.unfreeze`` moves every tracked object there), unless the program has frozen
    objects of its own, which stay as they are."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if gc.get_freeze_count() == 0:
            gc.freeze()
            gc.unfreeze()
        if was:
            gc.enable()


def read_book(path: str | Path, limits: Limits | None = None) -> Book:
    """Read a saved workbook: formulas, shared and array formulas, names, cached values.

    Raises
    ------
    BadInput
        Not an .xlsx/.xlsm package (an .xls, a CSV, an encrypted file), over a limit, or
        malformed / unsafe XML.
    """
    with paused_gc():
        try:
            return _read_book(path, limits)
        except (BadInput, OSError, MemoryError):
            raise
        except _DAMAGED as e:  # malformed content the checks above did not name
            from ..runio import shown

            raise BadInput(
                f"{shown(Path(path).name)}: cannot be read, damaged or unsupported content "
                f"({type(e).__name__}: {str(e)[:80]})"
            ) from None


#: what malformed package content raises in the libraries the reader uses
_DAMAGED = (
    ValueError,  # int()/float() of a bad attribute, a bad escape
    KeyError,
    IndexError,
    EOFError,
    zipfile.BadZipFile,
    zlib.error,
    NotImplementedError,  # an unknown compression method
    OverflowError,
    RecursionError,
    struct.error,
)


def _read_book(path: str | Path, limits: Limits | None) -> Book:
    limits = limits or Limits()
    path = Path(path)
    data = path.read_bytes()
    sha = hashlib.sha256(data).hexdigest()
    try:
        zf = zipfile.ZipFile(path)
    except zipfile.BadZipFile:
        raise BadInput(f"{path.name}: {_not_a_package(data)}") from None
    with zf:
        _check_package(zf, limits)
        strict = _is_strict(zf)
        wb = _parse(zf, "xl/workbook.xml")
        if wb is None:
            if "mimetype" in zf.namelist() and b"opendocument" in zf.read("mimetype")[:100]:
                raise BadInput(
                    f"{path.name}: an OpenDocument spreadsheet (.ods); save it as .xlsx "
                    "(File → Save As → Excel 2007-365) and check that"
                )
            raise BadInput(f"{path.name}: no xl/workbook.xml: not an Excel workbook package")
        if wb.tag != NS + "workbook":
            raise BadInput(
                f"{path.name}: xl/workbook.xml is not a SpreadsheetML workbook (its root is "
                f"{wb.tag[:80]!r}); joulebook reads the transitional and Strict namespaces"
            )
        rels = _parse(zf, "xl/_rels/workbook.xml.rels")
        targets, types = {}, {}
        ext_links = 0
        if rels is not None:
            for r in rels.iter(PKG_RNS + "Relationship"):
                t = r.get("Target", "")
                part = (
                    t.lstrip("/")
                    if t.startswith("/")
                    else posixpath.normpath(posixpath.join("xl", t))
                )
                targets[r.get("Id")] = part
                types[r.get("Id")] = r.get("Type", "")
                if r.get("Type", "").endswith("/externalLink"):
                    ext_links += 1
        sheets, parts = [], {}
        for s in wb.iter(NS + "sheet"):
            name = s.get("name")
            rid = s.get(RNS + "id")
            if rid not in targets:
                raise BadInput(
                    f"{path.name}: sheet {str(name)[:40]!r} names relationship {str(rid)[:20]!r}, "
                    "which the workbook does not hold: its cells cannot be read"
                )
            # a worksheet by its relationship's type (wherever its part lies); chart,
            # dialog and macro sheets hold no cells of a calculation
            if types[rid].endswith("/worksheet") or (
                not types[rid] and targets[rid].startswith("xl/worksheets/")
            ):
                sheets.append(name)
                parts[name] = targets[rid]
        names, local_names = {}, {}
        all_sheets = [s.get("name") for s in wb.iter(NS + "sheet")]
        for dn in wb.iter(NS + "definedName"):
            if not dn.text or not dn.get("name"):
                continue
            lid = dn.get("localSheetId")
            if lid is None:
                names[dn.get("name").upper()] = dn.text
            elif lid.isdigit() and int(lid) < len(all_sheets):
                local_names[(all_sheets[int(lid)], dn.get("name").upper())] = dn.text
        ext_ids = [
            e.get(RNS + "id") for e in wb.iter(NS + "externalReference") if e.get(RNS + "id")
        ]
        calc = next(wb.iter(NS + "calcPr"), None)
        book = Book(
            path,
            sha,
            sheets,
            parts,
            names=names,
            full_calc_on_load=calc is not None and calc.get("fullCalcOnLoad") in ("1", "true"),
            external_links=ext_links,
            local_names=local_names,
            strict=strict,
        )
        for i, rid in enumerate(ext_ids, start=1):
            if rid in targets:
                link = _read_link(zf, targets[rid], str(i))
                if link is not None:
                    book.links[str(i)] = link
        shared = _shared_strings(zf, limits)
        counts = [0, 0]
        for sheet in sheets:
            _read_sheet(zf, parts[sheet], sheet, book, shared, limits, counts)
            book.tables.extend(_read_tables(zf, parts[sheet], sheet))
    return book


def _rels(zf: zipfile.ZipFile, part: str) -> dict[str, tuple[str, str]]:
    """Relationships of a part: id -> (type, target part or external target)."""
    folder, name = posixpath.split(part)
    root = _parse(zf, posixpath.join(folder, "_rels", name + ".rels"))
    out = {}
    if root is None:
        return out
    for r in root.iter(PKG_RNS + "Relationship"):
        t = r.get("Target", "")
        if r.get("TargetMode") != "External":
            t = (
                t.lstrip("/")
                if t.startswith("/")
                else posixpath.normpath(posixpath.join(folder, t))
            )
        out[r.get("Id")] = (r.get("Type", ""), t)
    return out


def _cache_value(el, t: str):
    v = el.find(NS + "v")
    raw = v.text if v is not None else None
    if raw is None:
        return None
    if t == "b":
        return raw == "1"
    if t == "e":
        return ("error", raw)
    if t in ("s", "str", "inlineStr"):
        return unescape_text(raw)
    try:
        return float(raw)
    except ValueError:
        return unescape_text(raw)


def _read_link(zf: zipfile.ZipFile, part: str, index: str) -> Link | None:
    root = _parse(zf, part)
    if root is None:
        return None
    eb = root.find(NS + "externalBook")
    if eb is None:
        return None
    rels = _rels(zf, part)
    target = rels.get(eb.get(RNS + "id"), ("", ""))[1]
    sheets = [s.get("val") for s in eb.iter(NS + "sheetName")]
    link = Link(index, target, sheets)
    for sd in eb.iter(NS + "sheetData"):
        sid = sd.get("sheetId")
        if sid is None or not sid.isdigit() or int(sid) >= len(sheets):
            continue
        key = f"[{index}]{sheets[int(sid)]}"
        for c in sd.iter(NS + "cell"):
            ref = c.get("r")
            if not ref:
                continue
            try:
                row, col = split_ref(ref)
            except BadInput:
                continue
            v = _cache_value(c, c.get("t", "n"))
            if v is not None:
                link.values[(key, row, col)] = v
    return link


def _read_tables(zf: zipfile.ZipFile, part: str, sheet: str) -> list[Table]:
    out = []
    for typ, target in _rels(zf, part).values():
        if not typ.endswith("/table"):
            continue
        root = _parse(zf, target)
        if root is None or not root.get("ref"):
            continue
        try:
            r1, c1, r2, c2 = _table_box(root.get("ref"))
        except BadInput:
            continue
        cols = [tc.get("name", "") for tc in root.iter(NS + "tableColumn")]
        out.append(
            Table(
                root.get("displayName") or root.get("name") or "",
                sheet,
                r1,
                c1,
                r2,
                c2,
                int(root.get("headerRowCount", "1") or 1),
                int(root.get("totalsRowCount", "0") or 0),
                [unescape_text(c) for c in cols],
            )
        )
    return out


def _table_box(ref: str) -> tuple[int, int, int, int]:
    """(r1, c1, r2, c2) of a table's range: ``A1:E20``, or whole columns ``A:E`` (as
    LibreOffice saves a table over whole columns) or whole rows ``1:20``."""
    a, _, b = ref.partition(":")
    b = b or a
    if a.isascii() and b.isascii() and a.isalpha() and b.isalpha():  # whole columns
        return 1, col_number(a.upper()), 1_048_576, col_number(b.upper())
    if a.isdigit() and b.isdigit():  # whole rows
        return int(a), 1, int(b), 16_384
    r1, c1 = split_ref(a)
    r2, c2 = split_ref(b)
    return r1, c1, r2, c2


def _shared_strings(zf: zipfile.ZipFile, limits: Limits) -> list[str]:
    out: list[str] = []
    try:
        fh = zf.open("xl/sharedStrings.xml")
    except KeyError:
        return out
    with fh:
        try:
            for _ev, el in SafeET.iterparse(fh, events=("end",)):
                if _transitional(el.tag) == NS + "si":
                    if el.tag != NS + "si":
                        _to_transitional(el)
                    out.append(_text_of(el)[: limits.max_text])
                    el.clear()
        except Exception as e:
            raise BadInput(
                f"shared strings are not safe, well-formed XML ({type(e).__name__})"
            ) from None
    return out


_M = NS[1:]  # element names as the parser gives them: "uri}local"
_C, _F, _V, _IS, _T, _RPH, _ROW, _AUTOFILTER, _SHEETDATA = (
    _M + x for x in ("c", "f", "v", "is", "t", "rPh", "row", "autoFilter", "sheetData")
)


def _streaming_parser(handler):
    """defusedxml's hardened expat parser (no entity declarations, no external references:
    its refusals raise while parsing), handing elements to *handler*'s start/end/data
    instead of building a tree: a sheet is read in one pass with nothing kept but cells."""
    expat = SafeET.DefusedXMLParser().parser  # the defused handlers stay installed
    expat.ordered_attributes = False
    expat.StartElementHandler = handler.start
    expat.EndElementHandler = handler.end
    expat.CharacterDataHandler = handler.data
    return expat


class _SheetHandler:
    """The cells of one sheet part, element by element (see :func:`_read_sheet`)."""

    def __init__(self, sheet, book: Book, shared, limits: Limits, counts):
        self.sheet, self.book, self.shared, self.limits, self.counts = (
            sheet,
            book,
            shared,
            limits,
            counts,
        )
        self.masters: dict[str, tuple[str, str]] = {}  # shared-formula id -> (text, master ref)
        self.data_tables: list[tuple[str, str, str]] = []  # (range, row input, column input)
        self.c = None  # the attributes of the <c> being read
        self.f = None  # its <f> attributes
        self.f_text = self.v_text = None
        self.has_v = False
        self.inline = None  # the <t> texts of its inline string
        self.buf = None  # text being collected
        self.phonetic = 0  # depth inside <rPh> (phonetic runs are not the text)
        self.root = None  # the name of the part's root element
        self.row_no = 0  # the row being read: its r, or the one after the previous row
        self.row_given = False  # the row being read states its r
        self.col_no = 0  # the column of the last cell read in it
        # a cell is a <c> of a <row> of the one <sheetData> of the <worksheet> (ECMA-376
        # Part 1, §18.3.1.99), its value and formula its own children: as the writer finds it
        self.depth = 0
        self.in_data = False
        self.data_seen = False

    def start(self, name, attrs):
        self.depth += 1
        d = self.depth
        if self.root is None:
            self.root = name
            if name != _M + "worksheet":
                raise BadInput(
                    f"sheet {self.sheet!r}: its root element is {name[:80]!r}, not a "
                    "SpreadsheetML worksheet; its cells cannot be read"
                )
        if name == _C:
            if d != 4 or not self.in_data:
                return  # not a cell of the sheet's data
            self.c, self.f, self.f_text, self.v_text, self.inline = attrs, None, None, None, None
            self.has_v = False
        elif self.c is None:
            if name == _SHEETDATA and d == 2:
                if self.data_seen:
                    raise BadInput(f"sheet {self.sheet!r} has two <sheetData> parts of its cells")
                self.in_data = self.data_seen = True
            elif name == _ROW and d == 3 and self.in_data:
                r = attrs.get("r")
                self.row_given = bool(r and r.isdigit())
                self.row_no = int(r) if self.row_given else self.row_no + 1
                self.col_no = 0
                if attrs.get("hidden") in ("1", "true"):
                    self.book.hidden_rows.setdefault(self.sheet, set()).add(self.row_no)
            elif name == _AUTOFILTER:
                self.book.filtered.add(self.sheet)
        elif d == 5 and name == _F:
            self.f, self.buf = attrs, []
        elif d == 5 and name == _V:
            self.buf, self.has_v = [], True
        elif d == 5 and name == _IS:
            self.inline = []
        elif name == _RPH:
            self.phonetic += 1
        elif name == _T and self.inline is not None and not self.phonetic:
            self.buf = []

    def data(self, text):
        if self.buf is not None:
            self.buf.append(text)

    def end(self, name):
        d = self.depth
        self.depth -= 1
        if name == _C and d == 4:
            if self.c is not None:
                self._cell()
            self.c = None
        elif self.c is None:
            if name == _SHEETDATA and d == 2:
                self.in_data = False
            return
        elif d == 5 and name == _F:
            self.f_text, self.buf = "".join(self.buf or ()) or None, None
        elif d == 5 and name == _V:
            self.v_text, self.buf = "".join(self.buf or ()) or None, None
        elif name == _RPH:
            self.phonetic -= 1
        elif name == _T and self.buf is not None and self.inline is not None:
            self.inline.append("".join(self.buf))
            self.buf = None

    def _cell(self) -> None:
        el, limits, counts, sheet = self.c, self.limits, self.counts, self.sheet
        ref = el.get("r")
        if ref is None:  # a cell without r is the one after the previous (§18.3.1.4)
            row, col = self.row_no, self.col_no + 1
            ref = f"{col_letters(col)}{row}"
        else:
            row, col = split_ref(ref)
            if row != self.row_no:
                if self.row_given or self.col_no:
                    raise BadInput(f"{sheet}!{ref} lies in row {self.row_no} of the sheet")
                self.row_no = row  # a row without r is its first cell's
        self.col_no = col
        counts[0] += 1
        if counts[0] > limits.max_cells:
            raise BadInput(
                f"more than {limits.max_cells} cells; raise the limit to read this workbook"
            )
        cell = Cell(sheet, row, col)
        t = el.get("t", "n")
        f = self.f
        if f is not None:
            counts[1] += 1
            if counts[1] > limits.max_formulas:
                raise BadInput(f"more than {limits.max_formulas} formula cells; raise the limit")
            ftype = f.get("t", "normal")
            text = self.f_text
            where = f"{sheet}!{ref}"
            if text and len(text) > limits.max_formula_chars:
                raise BadInput(
                    f"{where}: formula of {len(text):,} characters; the limit is "
                    f"{limits.max_formula_chars:,} (Excel's own)"
                )
            if text and _nesting(text) > limits.max_nesting:
                raise BadInput(
                    f"{where}: formula nests more than {limits.max_nesting} levels of "
                    "parentheses (Excel's own limit)"
                )
            if ftype in ("array", "shared", "dataTable") and f.get("ref"):
                box = declared_range(f.get("ref"), where, limits)
                counts[0] += (box[2] - box[0] + 1) * (box[3] - box[1] + 1) - 1
                if ftype == "array" and box[:2] != (row, col):
                    raise BadInput(
                        f"{where}: array formula range {f.get('ref')!r} does not start at its "
                        "own cell"
                    )
            if ftype == "shared":
                from openpyxl.formula.translate import Translator

                si = f.get("si")
                if text:
                    self.masters[si] = (text, ref)
                elif si in self.masters:
                    mt, mref = self.masters[si]
                    text = Translator("=" + mt, origin=mref).translate_formula(ref)[1:]
            if ftype == "array":
                cell.array_ref = _box_text(box) if f.get("ref") else ref
            if ftype == "dataTable":
                # a What-If data table: every cell of its range is the table's formula
                # recomputed with other inputs; written as Excel shows it, TABLE(row
                # input, column input), so the engine can name it
                one, two = f.get("r1") or "", f.get("r2") or ""
                if f.get("dt2D") == "1":
                    row_in, col_in = one, two
                else:
                    row_in, col_in = (one, "") if f.get("dtr") == "1" else ("", one)
                self.data_tables.append((f.get("ref") or ref, row_in, col_in))
                text = f"TABLE({row_in},{col_in})"
            if text:
                cell.raw_formula = text
                cell.formula = normalise(text)
        raw = self.v_text  # None for <v/> as for no <v> (the tree reader's .text)
        if self.has_v or t == "inlineStr":
            cell.has_cached = True
            if t == "s" and raw is not None:
                i = int(raw)
                cell.cached = self.shared[i] if 0 <= i < len(self.shared) else ""
            elif t in ("str",):
                cell.cached = unescape_text(raw or "")[: limits.max_text]
            elif t == "inlineStr":
                cell.cached = unescape_text("".join(self.inline)) if self.inline else ""
            elif t == "b":
                cell.cached = raw == "1"
            elif t == "e":
                cell.cached = ("error", raw or "#N/A")
            elif raw in (None, ""):
                cell.has_cached = False  # an empty <v/>: nothing was saved
            else:
                cell.cached = float(raw)
        if cell.formula is not None or cell.has_cached:
            if (sheet, row, col) in self.book.cells:
                raise BadInput(f"{sheet}!{ref} appears twice in the sheet")
            self.book.cells[(sheet, row, col)] = cell


def _nesting(text: str) -> int:
    """The deepest nesting of parentheses in a formula, outside its string literals."""
    if text.count("(") <= 64:
        return text.count("(")
    depth = deepest = 0
    quoted = False
    for ch in text:
        if ch == '"':
            quoted = not quoted
        elif quoted:
            continue
        elif ch == "(":
            depth += 1
            deepest = max(deepest, depth)
        elif ch == ")":
            depth -= 1
    return deepest


def _box_text(box: tuple[int, int, int, int]) -> str:
    r1, c1, r2, c2 = box
    a = f"{col_letters(c1)}{r1}"
    return a if (r1, c1) == (r2, c2) else f"{a}:{col_letters(c2)}{r2}"


def declared_range(text: str, where: str, limits: Limits) -> tuple[int, int, int, int]:
    """The box (r1, c1, r2, c2) of a range a part declares (``ref="A1:B4"``), its corners
    put in order (a reversed ``B4:A1`` is the same box), refused when it is not a range or
    holds more cells than *limits* allow, before anything is allocated for it."""
    a, _, b = text.partition(":")
    try:
        r1, c1 = split_ref(a.strip())
        r2, c2 = split_ref((b or a).strip())
    except BadInput:
        raise BadInput(f"{where}: range {text[:40]!r} is not like A1:B4") from None
    r1, r2 = min(r1, r2), max(r1, r2)
    c1, c2 = min(c1, c2), max(c1, c2)
    if r2 > 1_048_576 or c2 > 16_384:
        raise BadInput(f"{where}: range {text[:40]!r} lies beyond the sheet's last cell XFD1048576")
    n = (r2 - r1 + 1) * (c2 - c1 + 1)
    if n > limits.max_range_cells:
        raise BadInput(
            f"{where}: range {text[:40]!r} declares {n:,} cells; the limit is "
            f"{limits.max_range_cells:,}"
        )
    return r1, c1, r2, c2


def _read_sheet(zf, part, sheet, book: Book, shared, limits: Limits, counts) -> None:
    try:
        fh = zf.open(part)
    except KeyError:
        raise BadInput(f"sheet {sheet!r}: part {part!r} is missing") from None
    handler = _SheetHandler(sheet, book, shared, limits, counts)
    with fh:
        try:
            expat = _streaming_parser(handler)
            if book.strict:  # element names renamed to the transitional namespace
                start, end = handler.start, handler.end
                expat.StartElementHandler = lambda n, a: start(_transitional(n), a)
                expat.EndElementHandler = lambda n: end(_transitional(n))
            while chunk := fh.read(1 << 16):
                expat.Parse(chunk, False)
            expat.Parse(b"", True)
        except BadInput:
            raise
        except (ValueError, IndexError, KeyError, OverflowError) as e:
            if isinstance(e, DefusedXmlException):  # an entity, a DTD: refused
                raise BadInput(
                    f"sheet {sheet!r} is not safe, well-formed XML ({type(e).__name__})"
                ) from None
            raise BadInput(  # raised by a cell: int() of a bad attribute, …
                f"sheet {sheet!r} holds a cell that cannot be read ({type(e).__name__}: "
                f"{str(e)[:60]})"
            ) from None
        except Exception as e:
            raise BadInput(
                f"sheet {sheet!r} is not safe, well-formed XML ({type(e).__name__})"
            ) from None
    data_tables = handler.data_tables
    if data_tables:
        from openpyxl.utils.cell import range_boundaries
    for box, row_in, col_in in data_tables:
        text = f"TABLE({row_in},{col_in})"
        try:
            c1, r1, c2, r2 = range_boundaries(box)
            inputs = tuple(split_ref(x) if x else None for x in (row_in, col_in))
        except (ValueError, BadInput):
            continue
        book.data_tables.append(DataTable(sheet, (r1, c1, r2, c2), *inputs))
        for (s_, r, c), cell in book.cells.items():
            if s_ == sheet and r1 <= r <= r2 and c1 <= c <= c2 and cell.formula is None:
                cell.formula = cell.raw_formula = text
