"""The checker's calculation package: the audit arranged as a document a checker files.

Built over an :class:`~joulebook.faces.workbook.audit.Audit` (nothing is recomputed here):

- **items**: the audit's entries with copied-down formulas (:mod:`.groups`) as one item —
  the formula and its working once, with the first row's numbers, then a table of every row
  (the inputs that change from row to row, the result, its verdict); a row that fails, or
  raises a flag the first row does not, is listed again on its own, in full;
- the **title block** and document control (:mod:`.titleblock`);
- **scope**, **inputs** (every cell a formula reads that is not a formula: label, value,
  unit and where the unit came from), **results** (cells the workbook names as results, else
  the last cells of each chain), **assumptions and references** (the models of the catalog
  functions used and their references, each once with its number, plus any the workbook
  lists), **cautions**, **flags**, the **working**, a **sign-off block** left blank;
- a **map** per sheet with groups as one node, cross-sheet precedents drawn, split by chain
  when large.

Rendered as one HTML file (Jinja2, autoescaped) that prints on A4 or US Letter, and as PDF
through WeasyPrint (imported only when a PDF is asked for).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

from joulebook.catalog import lookup

from . import auditflags as eye
from .audit import CAUTION, Audit, Entry
from .auditfig import pretty_unit
from .calcmap import Node, calc_map
from .check import fmt
from .groups import Run, runs
from .reader import Book, col_letters
from .refs import cell_refs
from .status import Status
from .titleblock import TitleBlock, read_title_block

__all__ = [
    "GroupRow",
    "Item",
    "InputRow",
    "Package",
    "PAPERS",
    "ROW_LIMIT",
    "build_package",
    "render_package",
    "write_pdf",
]

#: rows of a group's table shown in full; past it the first and last rows are shown and the
#: passing rows between are counted (a failing row is always listed on its own)
ROW_LIMIT = 150
_HEAD_ROWS, _TAIL_ROWS = 120, 20
#: paper sizes of the printed package (CSS @page sizes)
PAPERS = {"a4": "A4", "letter": "letter"}
#: nodes past which a sheet's map is split into one map per chain
MAP_SPLIT = 24
#: columns of depth side by side in a map (deeper ones continue below): legible on A4
MAP_COLUMNS = 3
RESULT_NAME = re.compile(r"^RESULTS?([_.]|$)", re.I)


@dataclass
class GroupRow:
    cell: str
    anchor: str
    values: list[str]
    result: str
    status: str
    good: bool
    own: bool  # listed again on its own


@dataclass
class Item:
    """One entry of the working: a single formula cell or a group of copied-down cells."""

    entry: Entry  # the first cell (its formula and working are the group's)
    members: list[Entry]
    span: str
    columns: list[str] = field(default_factory=list)  # the inputs that change row to row
    rows: list[GroupRow] = field(default_factory=list)
    elided: int = 0  # passing rows between the first and the last rows shown
    own: list[Entry] = field(default_factory=list)  # rows listed again on their own
    flag_rows: dict[str, int] = field(default_factory=dict)  # first row's flag -> rows raising it

    @property
    def size(self) -> int:
        return len(self.members)

    @property
    def grouped(self) -> bool:
        return len(self.members) > 1

    @property
    def good(self) -> bool:
        return all(_good(m) for m in self.members)

    @property
    def failing(self) -> int:
        return sum(not _good(m) for m in self.members)


@dataclass
class InputRow:
    where: str
    label: str
    value: str
    unit: str
    unit_from: str


@dataclass
class ResultRow:
    where: str
    label: str
    value: str
    unit: str
    status: str
    good: bool
    anchor: str


@dataclass
class Package:
    audit: Audit
    title: TitleBlock
    items: list[Item]
    inputs: list[InputRow]
    results: list[ResultRow]
    results_from: str  # how the results were chosen
    references: list[str]  # numbered from 1
    models: list[tuple[str, str, list[int]]]  # (function, model, reference numbers)
    listed_references: list[str]  # the workbook's own list
    assumptions: list[str]  # the workbook's own list
    cautions: list[tuple[str, str]]  # (function, its safety note)
    flags: list[tuple[Item, str, str]]  # (item, cell or span, flag)
    maps: list[tuple[str, str]]  # (heading, SVG)
    scope: str
    paper: str = "A4"
    #: "Sheet!B12" -> its sensitivity result (u_c, U, k), when input uncertainties were given
    uncertainty: dict = field(default_factory=dict)

    @property
    def sheets(self) -> list[str]:
        return list(dict.fromkeys(i.entry.sheet for i in self.items))


# ---------------------------------------------------------------------------------------
# items


#: the verdicts of a value that recomputes but cannot be signed (workbook/verdict.py)
_SIGNED = (Status.UNIT_CLASH, Status.REFUSAL_USED, Status.BLANK_INPUT, Status.OUTSIDE_MODEL)


def _good(e: Entry) -> bool:
    return e.status == Status.PASS and not isinstance(e.result, tuple)


_NUMBERS = re.compile(r"(\$?[A-Z]{1,3}\$?\d+|[-+]?\d+(\.\d+)?([eE][-+]?\d+)?)")


def _shape(flag: str) -> str:
    """A flag with its cell addresses and numbers blanked: the same slip on every row."""
    return _NUMBERS.sub("#", flag)


def _shown(v) -> str:
    if isinstance(v, float):
        return fmt(v)
    if isinstance(v, tuple):
        return str(v[-1])
    if v is None:
        return ""
    if isinstance(v, list):
        return f"{len(v)} values"
    return str(v)


def _show(v, unit: str = "") -> str:
    """A value with its unit (a range as its count and extremes), as the audit shows it."""
    if isinstance(v, list):
        nums = [x for x in v if isinstance(x, float)]
        return f"{len(v)} values, {fmt(min(nums))} … {fmt(max(nums))}" if nums else "no numbers"
    text = fmt(v)
    return f"{text} {pretty_unit(unit)}".strip() if unit and isinstance(v, float) else text


def _item(run: Run, by_key: dict[tuple, Entry]) -> Item:
    members = [by_key[k] for k in run.keys]
    head = members[0]
    it = Item(head, members, run.span)
    if not it.grouped:
        return it
    shapes = {_shape(f) for f in head.flags}
    raised = [{_shape(f) for f in m.flags} for m in members]
    it.flag_rows = {f: sum(_shape(f) in r for r in raised) for f in head.flags}
    n = min(len(m.inputs) for m in members)
    varying = [
        i
        for i in range(n)
        if len({repr(m.inputs[i].value) for m in members}) > 1
        or len({m.inputs[i].source for m in members}) > 1
        and head.inputs[i].source.startswith(("cell", "formula"))
    ]
    it.columns = [_column_name(head.inputs[i]) for i in varying]
    for m in members:
        # a row failing as the first row does, for the same reason (a unit clash copied
        # down), is no row of its own: its status shows in the table
        same = m.status == head.status in _SIGNED and _shape(m.note) == _shape(head.note)
        own = (not _good(m) and not same) or any(_shape(f) not in shapes for f in m.flags)
        if own and m is not head:
            it.own.append(m)
        it.rows.append(
            GroupRow(
                m.cell,
                m.anchor,
                [_shown(m.inputs[i].value) for i in varying],
                _shown(m.result) + (" " + pretty_unit(m.result_unit) if m.result_unit else ""),
                str(m.status),
                _good(m),
                own,
            )
        )
    if len(it.rows) > ROW_LIMIT:
        keep = set(range(_HEAD_ROWS)) | set(range(len(it.rows) - _TAIL_ROWS, len(it.rows)))
        shown = [r for i, r in enumerate(it.rows) if i in keep or r.own]
        it.elided = len(it.rows) - len(shown)
        it.rows = shown
    return it


def _rows_note(it: Item, flag: str) -> str:
    n = it.flag_rows.get(flag, 1)
    if n == it.size:
        return f" (on each of the {it.size} rows)"
    return f" (on {n} of the {it.size} rows, the first among them)"


def _column_name(i) -> str:
    """An input column's heading: the argument's name and its source cell's label; an
    ordinary formula's input (named by a cell that moves row to row) by the label alone, else
    its column."""
    m = re.search(r"\((.+)\)$", i.source)
    label = m.group(1) if m and i.source.startswith(("cell", "formula")) else ""
    if "!" in i.name:
        return label or "column " + re.sub(r"\d+$", "", i.name.split("!")[-1])
    return f"{i.name} · {label}" if label else i.name


# ---------------------------------------------------------------------------------------
# inputs, results, references


def _label(book: Book, sheet: str, row: int, col: int) -> str:
    """The nearest text to the left in the row, else the heading above in the column."""
    for c in range(col - 1, max(0, col - 6), -1):
        cell = book.cells.get((sheet, row, c))
        if cell and cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
    for r in range(row - 1, 0, -1):
        cell = book.cells.get((sheet, r, col))
        if cell is None:
            continue
        if cell.formula is None and isinstance(cell.cached, str) and cell.cached.strip():
            return cell.cached.strip()
        if r < row - 1000:
            break
    return ""


_IN_BRACKETS = re.compile(r"[\[(]\s*([^\[\]()]{1,24}?)\s*[\])]")
_LAST = re.compile(r"(?:,|\bin)\s+([A-Za-z°³²/·*^0-9.-]{1,16})\s*$")


def _label_unit(label: str) -> str:
    for m in list(_IN_BRACKETS.finditer(label)) + list(_LAST.finditer(label)):
        text = m.group(1).strip()
        if eye.unit_kind(text) is not None:
            return text
    return ""


def _inputs(book: Book, items: list[Item], _refs) -> list[InputRow]:
    """Every cell a formula reads that is not a formula; a group's column of inputs as one
    row (its range, how many values, first and last)."""
    call_units: dict[tuple, tuple[str, str]] = {}
    for it in items:
        for m in it.members:
            for sc in m.calls:
                for i in sc.inputs:
                    if i.unit and i.source.startswith("cell "):
                        call_units.setdefault(
                            _key_of(i.source[5:].split(" (")[0], m.sheet),
                            (i.unit, f"the call's unit system ({sc.function}, {i.name})"),
                        )
    seen: dict[tuple, None] = {}
    spilled = _spills(book, items)
    for it in items:
        for m in it.members:
            for k in _refs(m):
                c = book.cells.get(k)
                if (c is None or c.formula is None) and k not in spilled:
                    seen.setdefault(k, None)
    keys = sorted(
        seen, key=lambda k: (book.sheets.index(k[0]) if k[0] in book.sheets else 0, k[2], k[1])
    )
    out: list[InputRow] = []
    i = 0
    while i < len(keys):
        s, r, c = keys[i]
        j = i
        while j + 1 < len(keys) and keys[j + 1] == (s, keys[j][1] + 1, c):
            j += 1
        block = keys[i : j + 1]
        lab = _label(book, s, r, c)
        # a column of values (a table's column under one heading) is one row; inputs that
        # each carry a label of their own stay rows of their own, whatever their layout
        if len(block) > 3 and not any(_left_text(book, k) for k in block[1:]):
            vals = [_cell_value(book, k) for k in block]
            where = f"{s}!{col_letters(c)}{r}:{col_letters(c)}{block[-1][1]}"
            unit, src = _unit_of(book, block[0], lab, call_units)
            out.append(
                InputRow(where, lab, f"{len(block)} values, {vals[0]} … {vals[-1]}", unit, src)
            )
        else:
            for k in block:
                lab = _label(book, *k)
                unit, src = _unit_of(book, k, lab, call_units)
                where = f"{k[0]}!{col_letters(k[2])}{k[1]}"
                out.append(InputRow(where, lab, _cell_value(book, k), unit, src))
        i = j + 1
    return out


def _left_text(book: Book, key: tuple) -> bool:
    """True when the cell just left of *key* holds text: *key* has a label of its own."""
    s, r, c = key
    left = book.cells.get((s, r, c - 1))
    return bool(
        left is not None
        and left.formula is None
        and isinstance(left.cached, str)
        and left.cached.strip()
    )


def _spills(book: Book, items: list[Item]) -> dict[tuple, Item]:
    """Every cell of an array or spilled result, mapped to the item whose formula fills it."""
    from .refs import parse_ref

    out: dict[tuple, Item] = {}
    for it in items:
        for m in it.members:
            c = book.cells.get(m.key)
            if c is None or not c.array_ref or ":" not in c.array_ref:
                continue
            r = parse_ref(c.array_ref)
            if r is None or r.kind != "area" or (r.r2 - r.r1 + 1) * (r.c2 - r.c1 + 1) > 100_000:
                continue
            for row in range(r.r1, r.r2 + 1):
                for col in range(r.c1, r.c2 + 1):
                    out.setdefault((m.sheet, row, col), it)
    return out


def _key_of(where: str, sheet: str) -> tuple:
    from .refs import parse_ref

    s, _, ref = where.rpartition("!")
    r = parse_ref(ref)
    if r is None:
        return ()
    return (s.strip("'") or sheet, r.r1, r.c1)


def _cell_value(book: Book, k) -> str:
    c = book.cells.get(k)
    return "(blank)" if c is None or c.cached is None else _shown(c.cached)


def _unit_of(book: Book, k, lab: str, call_units: dict) -> tuple[str, str]:
    u = _label_unit(lab)
    if u:
        return u, "its label"
    right = book.cells.get((k[0], k[1], k[2] + 1))
    if right is not None and isinstance(right.cached, str) and right.formula is None:
        if eye.unit_kind(right.cached.strip()) is not None:
            return right.cached.strip(), "the unit cell to its right"
    if k in call_units:
        return call_units[k]
    return "", "none written: a pure number, or a unit the workbook does not say"


def _results(book: Book, items: list[Item], by_key: dict, _refs) -> tuple[list[ResultRow], str]:
    named = []
    for name, target in book.names.items():
        if RESULT_NAME.match(name):
            k = _key_of(target.lstrip("=").replace("$", ""), "")
            e = by_key.get(k)
            if e is not None:
                named.append(e)
    if named:
        chosen, how = named, "cells the workbook names RESULT…"
    else:
        read: set = set()
        for it in items:
            for m in it.members:
                read.update(_refs(m))
        chosen = [
            it.members[-1]
            for it in items
            if not any(m.key in read for m in it.members) and not isinstance(it.entry.result, str)
        ]
        how = "the last cells of each chain (no formula reads them)"
    rows = []
    for e in chosen:
        rows.append(
            ResultRow(
                f"{e.sheet}!{e.cell}",
                e.label,
                _shown(e.result),
                pretty_unit(e.result_unit) if e.result_unit else "",
                str(e.status),
                _good(e),
                e.anchor,
            )
        )
    return rows, how


_LIST_WORDS = {
    "references": "references",
    "reference": "references",
    "assumptions": "assumptions",
    "assumption": "assumptions",
}


def _listed(book: Book) -> dict[str, list[str]]:
    """The workbook's own lists: a cell reading 'References' or 'Assumptions' and the text
    cells under it (or beside it, one column right) until a blank."""
    out: dict[str, list[str]] = {"references": [], "assumptions": []}
    for (s, r, c), cell in book.cells.items():
        if cell.formula is not None or not isinstance(cell.cached, str):
            continue
        word = _LIST_WORDS.get(cell.cached.strip().rstrip(":").strip().lower())
        if word is None or out[word]:
            continue
        for dc in (0, 1):
            got = []
            rr = r + 1 if dc == 0 else r
            while True:
                x = book.cells.get((s, rr, c + dc))
                if x is None or x.cached is None or not str(x.cached).strip():
                    break
                got.append(_shown(x.cached))
                rr += 1
                if len(got) >= 100:
                    break
            if got:
                out[word] = got
                break
    return out


def _references(items: list[Item]) -> tuple[list[str], list[tuple[str, str, list[int]]]]:
    refs: list[str] = []
    models: dict[tuple[str, str], list[int]] = {}
    for it in items:
        for sc in it.entry.calls:
            f = lookup(sc.function)
            nums = []
            for ref in f.references:
                if ref not in refs:
                    refs.append(ref)
                nums.append(refs.index(ref) + 1)
            models.setdefault((f.name, sc.model), nums)
    return refs, [(f, m, n) for (f, m), n in models.items()]


def _cautions(items: list[Item]) -> list[tuple[str, str]]:
    out: dict[str, str] = {}
    for it in items:
        for sc in it.entry.calls:
            f = lookup(sc.function)
            if f.caution or f.family in ("process", "stored", "work", "blocked", "fire"):
                out.setdefault(f.name, f.notes or "")
    return sorted(out.items())


# ---------------------------------------------------------------------------------------
# maps


def _maps(book: Book, items: list[Item], _refs) -> list[tuple[str, str]]:
    """One map per sheet (one per chain when a sheet's map is large): a group is one node,
    a precedent on another sheet is a node named by its sheet, an input by its label or its
    address."""
    owner: dict[tuple, Item] = {**_spills(book, items)}  # a spilled cell is its formula's
    owner.update({m.key: it for it in items for m in it.members})
    out = []
    for sheet in dict.fromkeys(it.entry.sheet for it in items):
        nodes: dict = {}
        edges: dict = {}
        for it in (x for x in items if x.entry.sheet == sheet):
            e = it.entry
            kind = (
                "flagged"
                if any(m.flags for m in it.members)
                else "ours"
                if e.calls
                else "check"
                if eye.comparisons(e.formula)
                else "formula"
            )
            ref = f"{it.span} ×{it.size}" if it.grouped else it.span
            cell = book.cells.get(e.key)
            if not it.grouped and cell is not None and cell.array_ref and ":" in cell.array_ref:
                ref = cell.array_ref  # a spilled result: its whole range
            nodes[e.key] = Node(e.key, ref, e.label or "(no label)", kind, [], e.anchor)
            pre: dict = {}
            pinned = set(_refs(e)) & set(_refs(it.members[-1]))
            for m in it.members:
                for p in _refs(m):
                    src = owner.get(p)
                    if src is not None:
                        if src is not it:
                            pre[src.entry.key] = src
                        continue
                    column = it.grouped and p not in pinned
                    pre.setdefault((f"\x00in {p[0]}", e.key[1], p[2]) if column else p, p)
            edges[e.key] = pre
        for k, pre in edges.items():
            for pk, p in pre.items():
                if pk in nodes:
                    nodes[k].precedents.append(pk)
                    continue
                if isinstance(p, Item):  # a formula cell on another sheet
                    pe = p.entry
                    nodes[pk] = Node(
                        pk,
                        f"{pe.sheet}!{p.span}",
                        pe.label or "(no label)",
                        "input",
                        [],
                        pe.anchor,
                    )
                elif pk[0].startswith("\x00in "):  # a group's column of inputs: one node
                    ref = (
                        f"column {col_letters(p[2])}"
                        if p[0] == sheet
                        else (f"{p[0]}!{col_letters(p[2])}")
                    )
                    nodes[pk] = Node(pk, ref, _label(book, *p) or "(no label)", "input", [])
                else:
                    ref = f"{col_letters(p[2])}{p[1]}"
                    if p[0] != sheet:
                        ref = f"{p[0]}!{ref}"
                    nodes[pk] = Node(pk, ref, _label(book, *p) or f"cell {ref}", "input", [])
                nodes[k].precedents.append(pk)
        chains = _chains(list(nodes.values())) if len(nodes) > MAP_SPLIT else [list(nodes.values())]
        for i, chain in enumerate(chains):
            title = sheet if len(chains) == 1 else f"{sheet}, chain {i + 1} of {len(chains)}"
            ordered = sorted(chain, key=_node_order)
            svg = calc_map(ordered, title, wrap=MAP_COLUMNS)
            if svg:
                out.append((title, svg))
    return out


def _node_order(n: Node):
    return (n.key[1], n.key[2])


def _chains(nodes: list[Node]) -> list[list[Node]]:
    """Connected parts of the map (precedent links either way), first cell first."""
    parent = {n.key: n.key for n in nodes}

    def find(k):
        while parent[k] != k:
            parent[k] = parent[parent[k]]
            k = parent[k]
        return k

    for n in nodes:
        for p in n.precedents:
            if p in parent:
                parent[find(n.key)] = find(p)
    parts: dict = {}
    for n in nodes:
        parts.setdefault(find(n.key), []).append(n)
    out = sorted(parts.values(), key=lambda ns: min(_node_order(n) for n in ns))
    # many tiny chains (one cell each) read better together: pack them up to MAP_SPLIT nodes
    packed: list[list[Node]] = []
    for part in out:
        if packed and len(packed[-1]) + len(part) <= MAP_SPLIT:
            packed[-1].extend(part)
        else:
            packed.append(list(part))
    return packed


# ---------------------------------------------------------------------------------------
# the package


def build_package(audit: Audit, paper: str = "a4") -> Package:
    """The calculation package of an audit (nothing recomputed)."""
    if paper.lower() not in PAPERS:
        from joulebook.core.errors import BadInput

        raise BadInput(f"paper {paper!r} is not one of {', '.join(PAPERS)}")
    book = audit.book
    by_key = {e.key: e for e in audit.entries}
    reads = {e.key: cell_refs(e.formula.lstrip("="), e.sheet) for e in audit.entries}

    def _refs(e: Entry) -> list:
        return reads[e.key]

    rs = runs((e.key, e.formula) for e in audit.entries)
    items = [_item(r, by_key) for r in rs]
    tb = read_title_block(book)
    refs, models = _references(items)
    listed = _listed(book)
    results, how = _results(book, items, by_key, _refs)
    flags: list[tuple[Item, str, str]] = []
    for it in items:
        for f in it.entry.flags:
            where = (
                f"{it.entry.sheet}!{it.span}" if it.grouped else f"{it.entry.sheet}!{it.entry.cell}"
            )
            flags.append((it, where, f + (_rows_note(it, f) if it.grouped else "")))
        for m in it.own:
            for f in m.flags:
                if f not in it.entry.flags:
                    flags.append((it, f"{m.sheet}!{m.cell}", f))
    return Package(
        audit,
        tb,
        items,
        _inputs(book, items, _refs),
        results,
        how,
        refs,
        models,
        listed["references"],
        listed["assumptions"],
        _cautions(items),
        flags,
        _maps(book, items, _refs),
        tb.get("scope"),
        PAPERS[paper.lower()],
    )


def render_package(pkg: Package) -> str:
    """The package as one self-contained HTML file (prints on the package's paper)."""
    import jinja2
    from markupsafe import Markup, escape

    env = jinja2.Environment(
        loader=jinja2.PackageLoader("joulebook.faces.workbook", "templates"),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )

    def breakable(text) -> Markup:
        s = str(escape(text))
        for ch in (",", "(", "+", "*", "/", "&amp;", ";"):
            s = s.replace(ch, ch + "<wbr>")
        return Markup(s)

    env.filters["breakable"] = breakable
    env.filters["shown"] = _show
    env.filters["unit"] = pretty_unit
    env.filters["fmt"] = fmt
    a = pkg.audit
    items = pkg.items
    counts = [
        ("formula cells audited", len(a.entries)),
        ("entries (copied-down cells grouped)", len(items)),
        ("groups of copied-down cells", sum(it.grouped for it in items)),
        ("cells in those groups", sum(it.size for it in items if it.grouped)),
        ("largest group", max((it.size for it in items), default=0)),
        ("cells that pass (recomputed = saved, not an error)", sum(_good(e) for e in a.entries)),
        ("cells that do not pass", sum(not _good(e) for e in a.entries)),
        ("flags raised (a group's flag once)", len(pkg.flags)),
    ]
    tpl = env.get_template("package.html")
    return tpl.render(
        p=pkg,
        a=a,
        tb=pkg.title,
        counts=counts,
        good=_good,
        svg=lambda text: Markup(text),
        caution=CAUTION,
    )


def write_pdf(html: str, path: Path, base: Path | None = None) -> int:
    """Print the package HTML to *path* as PDF (WeasyPrint, imported here only); the number
    of pages."""
    try:
        import weasyprint
    except (ImportError, OSError) as e:  # OSError: the Pango library is missing
        from joulebook.core.errors import BadInput

        raise BadInput(
            "a PDF needs WeasyPrint (pip install weasyprint) and the Pango library (Debian: "
            f"apt-get install libpango-1.0-0 libpangoft2-1.0-0): {str(e)[:80]}"
        ) from None
    from ..files import atomic_write

    doc = weasyprint.HTML(string=html, base_url=str(base or Path.cwd())).render()
    data = doc.write_pdf()
    atomic_write(path, lambda fh: fh.write(data))
    return len(doc.pages)
