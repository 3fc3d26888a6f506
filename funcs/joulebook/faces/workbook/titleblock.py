"""The title block and document control of a calculation workbook.

Where joulebook looks, first match wins for each field (docs/package.md):

1. a **defined name** of the workbook naming one cell, by any of the field's names below
   (case, underscores, dots and spaces ignored: ``CALC_NUMBER``, ``Calc.No``);
2. a **labelled cell**: a text cell reading one of the field's labels (case ignored, a final
   colon ignored), its value in the first filled cell to the right in the same row (up to
   four columns), else in the cell below;
3. the file's **document properties** (``docProps/core.xml``): title, subject (scope),
   creator (prepared by), modified date.

A **revision table** is a row of headings holding "rev" or "revision" and "date" or
"description" (or "by"), and the filled rows under it.  A field found nowhere is listed as
missing, and a workbook with no title at all is titled by its file name.
"""

from __future__ import annotations

import datetime as _dt
import re
import zipfile
from dataclasses import dataclass, field

from .reader import Book, col_letters
from .refs import parse_ref

__all__ = ["FIELDS", "Field", "TitleBlock", "read_title_block"]

#: field -> (what a person reads, defined names, cell labels)
FIELDS: dict[str, tuple[str, tuple[str, ...], tuple[str, ...]]] = {
    "calc_number": (
        "calc number",
        ("CALCNUMBER", "CALCNO", "CALCULATIONNUMBER", "DOCNUMBER", "DOCUMENTNUMBER"),
        (
            "calc number",
            "calc no",
            "calc no.",
            "calculation number",
            "calculation no",
            "calculation no.",
            "document number",
            "doc no",
            "doc no.",
        ),
    ),
    "title": (
        "title",
        ("CALCTITLE", "TITLE", "CALCULATIONTITLE"),
        ("title", "calc title", "calculation title", "subject"),
    ),
    "project": (
        "project / job",
        ("PROJECT", "JOB", "PROJECTNUMBER", "JOBNUMBER", "PROJECTNAME"),
        (
            "project",
            "job",
            "project / job",
            "project/job",
            "job no",
            "job no.",
            "job number",
            "project number",
            "project no",
            "project no.",
        ),
    ),
    "revision": (
        "revision",
        ("REVISION", "REV", "CALCREVISION"),
        ("revision", "rev", "rev.", "issue"),
    ),
    "date": (
        "date",
        ("CALCDATE", "DATE", "ISSUEDATE"),
        ("date", "calc date", "issue date", "date of issue"),
    ),
    "prepared_by": (
        "prepared by",
        ("PREPAREDBY", "AUTHOR", "ORIGINATOR"),
        ("prepared by", "prepared", "author", "originator"),
    ),
    "checked_by": (
        "checked by",
        ("CHECKEDBY", "CHECKER"),
        ("checked by", "checked", "checker"),
    ),
    "approved_by": (
        "approved by",
        ("APPROVEDBY", "APPROVER"),
        ("approved by", "approved", "approver"),
    ),
    "scope": (
        "scope",
        ("SCOPE", "DESCRIPTION", "CALCSCOPE", "PURPOSE"),
        ("scope", "description", "purpose", "objective"),
    ),
}
_CORE = {
    "title": "{http://purl.org/dc/elements/1.1/}title",
    "subject": "{http://purl.org/dc/elements/1.1/}subject",
    "creator": "{http://purl.org/dc/elements/1.1/}creator",
    "description": "{http://purl.org/dc/elements/1.1/}description",
    "keywords": "{http://schemas.openxmlformats.org/package/2006/metadata/core-properties}keywords",
    "last modified by": (
        "{http://schemas.openxmlformats.org/package/2006/metadata/core-properties}lastModifiedBy"
    ),
    "created": "{http://purl.org/dc/terms/}created",
    "modified": "{http://purl.org/dc/terms/}modified",
}
#: which document property stands in for a field nothing else gave
_FROM_CORE = {"title": "title", "scope": "subject", "prepared_by": "creator", "date": "modified"}


@dataclass
class Field:
    key: str
    label: str
    value: str
    source: str  # "defined name CALC_NUMBER (Cover!C3)", "label 'Calc no.' (Cover!B3)", …


@dataclass
class TitleBlock:
    fields: dict[str, Field] = field(default_factory=dict)
    properties: dict[str, str] = field(default_factory=dict)  # docProps/core.xml
    revisions: list[list[str]] = field(default_factory=list)  # headings first
    revisions_at: str = ""
    file_name: str = ""

    def get(self, key: str) -> str:
        f = self.fields.get(key)
        return f.value if f is not None else ""

    @property
    def title(self) -> str:
        return self.get("title") or self.file_name

    @property
    def missing(self) -> list[str]:
        """The fields found nowhere, as a person reads them."""
        return [FIELDS[k][0] for k in FIELDS if k not in self.fields]


def _plain(text: str) -> str:
    return re.sub(r"[\s_.\-]+", "", text).upper()


def _label_text(text: str) -> str:
    return re.sub(r"\s+", " ", text.strip().rstrip(":").strip()).lower()


def _shown(v: object, is_date: bool = False) -> str:
    if v is None:
        return ""
    if isinstance(v, bool):
        return "TRUE" if v else "FALSE"
    if isinstance(v, float):
        if is_date and 1 <= v < 2_958_466:  # a spreadsheet date serial (1900 system)
            day = _dt.date(1899, 12, 30) + _dt.timedelta(days=int(v))
            return day.isoformat()
        return f"{v:g}" if v != int(v) else str(int(v))
    if isinstance(v, tuple):
        return str(v[-1])
    return str(v).strip()


def _value(book: Book, key) -> object:
    c = book.cells.get(key)
    if c is None:
        return None
    return c.cached if c.has_cached or c.formula is None else None


def _where(key) -> str:
    return f"{key[0]}!{col_letters(key[2])}{key[1]}"


def _from_names(book: Book) -> dict[str, Field]:
    out: dict[str, Field] = {}
    by_plain = {_plain(n): (n, t) for n, t in book.names.items()}
    for k, (label, names, _labels) in FIELDS.items():
        for n in names:
            if n not in by_plain:
                continue
            name, target = by_plain[n]
            ref = parse_ref(target.lstrip("="))
            if ref is None or ref.kind != "cell" or not ref.sheet:
                continue
            sheet = next((s for s in book.sheets if s.upper() == ref.sheet.upper()), None)
            if sheet is None:
                continue
            key = (sheet, ref.r1, ref.c1)
            text = _shown(_value(book, key), k == "date")
            if text:
                out[k] = Field(k, label, text, f"defined name {name} ({_where(key)})")
                break
    return out


def _from_labels(book: Book, skip: tuple = ()) -> tuple[dict[str, Field], set]:
    by_label = {lab: k for k, (_, _, labels) in FIELDS.items() for lab in labels}
    out: dict[str, Field] = {}
    used: set = set()
    for (sheet, row, col), c in sorted(
        book.cells.items(), key=lambda kv: (book.sheets.index(kv[0][0]), kv[0][1], kv[0][2])
    ):
        if c.formula is not None or not isinstance(c.cached, str):
            continue
        if skip and sheet == skip[0] and skip[1] <= row <= skip[2]:
            continue  # the revision table's own headings and rows
        k = by_label.get(_label_text(c.cached))
        if k is None or k in out:
            continue
        candidates = [(sheet, row, col + i) for i in range(1, 5)] + [(sheet, row + 1, col)]
        for key in candidates:
            v = _value(book, key)
            if v is None or (isinstance(v, str) and not v.strip()):
                continue
            if isinstance(v, str) and _label_text(v) in by_label:
                break  # the next label, not a value
            out[k] = Field(
                k,
                FIELDS[k][0],
                _shown(v, k == "date"),
                f"label '{c.cached.strip()}' ({_where(key)})",
            )
            used.add(key)
            break
    return out, used


def _core_properties(book: Book) -> dict[str, str]:
    from defusedxml.ElementTree import fromstring

    try:
        with zipfile.ZipFile(book.path) as zf:
            info = zf.getinfo("docProps/core.xml")
            if info.file_size > 1_000_000:
                return {}
            root = fromstring(zf.read(info))
    except (KeyError, OSError, zipfile.BadZipFile, ValueError):
        return {}
    except Exception:  # a malformed part: no properties, never a failure of the report
        return {}
    out = {}
    for word, tag in _CORE.items():
        el = root.find(tag)
        if el is not None and el.text and el.text.strip():
            out[word] = el.text.strip()
    return out


def _revisions(book: Book) -> tuple[list[list[str]], str, tuple]:
    for sheet in book.sheets:
        rows: dict[int, dict[int, object]] = {}
        for (s, r, c), cell in book.cells.items():
            if s == sheet and cell.formula is None and cell.cached is not None:
                rows.setdefault(r, {})[c] = cell.cached
        for r in sorted(rows):
            heads = {c: _label_text(v) for c, v in rows[r].items() if isinstance(v, str)}
            has_rev = any(h in ("rev", "rev.", "revision") for h in heads.values())
            has_more = any(
                h in ("date", "description", "by", "reason", "change") for h in heads.values()
            )
            if not (has_rev and has_more):
                continue
            cols = sorted(heads)
            table = [[str(rows[r][c]).strip() for c in cols]]
            nxt = r + 1
            while nxt in rows and any(c in rows[nxt] for c in cols):
                date_cols = {c for c in cols if heads[c] == "date"}
                table.append([_shown(rows[nxt].get(c), c in date_cols) for c in cols])
                nxt += 1
            if len(table) > 1:
                return table, f"{sheet}!{col_letters(cols[0])}{r}", (sheet, r, nxt - 1)
    return [], "", ()


def read_title_block(book: Book) -> TitleBlock:
    """The title block of *book*: defined names, then labelled cells, then the document
    properties; the revision table if there is one."""
    tb = TitleBlock(file_name=book.path.name)
    tb.revisions, tb.revisions_at, where = _revisions(book)
    labelled, _ = _from_labels(book, where)
    tb.fields = {**labelled, **_from_names(book)}
    tb.properties = _core_properties(book)
    for k, prop in _FROM_CORE.items():
        if k not in tb.fields and tb.properties.get(prop):
            value = tb.properties[prop]
            if k == "date":
                value = value[:10]
            tb.fields[k] = Field(k, FIELDS[k][0], value, f"document properties ({prop})")
    if "revision" not in tb.fields and len(tb.revisions) > 1:
        last = tb.revisions[-1][0]
        if last:
            tb.fields["revision"] = Field(
                "revision", "revision", last, f"revision table ({tb.revisions_at})"
            )
    tb.fields = {k: tb.fields[k] for k in FIELDS if k in tb.fields}
    return tb
