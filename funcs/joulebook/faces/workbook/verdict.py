"""The verdict a checker can sign (design §3): a recomputed cell that matches its saved
value passes only when nothing it depends on was refused or left blank and its units agree.

:func:`refine` takes the rows of :func:`joulebook.faces.workbook.check.compare` and turns a pass
into, first match wins:

- ``refusal used``: a cell it reads, directly or through other cells, holds a joulebook
  refusal or error (its text, or an error value with its message), whatever the error
  style, even where SUM or MAX skipped it;
- ``blank input``: a joulebook call it reads returned blank because a required argument is
  blank, and the result flowed on (the blank call itself carries it too when read);
- ``outside the model``: the cell is one joulebook call and a validity check its catalog
  entry declares does not hold (:mod:`joulebook.faces.workbook.validity`);
- ``unit clash``: its formula combines quantities whose units disagree, or gives a unit
  its own label contradicts (:mod:`joulebook.faces.workbook.cellunits`).

A pass reading a cell that is outside the model or a unit clash, directly or through
other cells, carries that status too, its reason naming the chain.

Only passing cells are refined: a cell that differs, errs or could not be evaluated keeps
that status and its reason (a circular or unsupported cell gets no unit verdict).
"""

from __future__ import annotations

from joulebook.catalog import lookup
from joulebook.core.errors import (
    INTERNAL_LABEL,
    BadInput,
    JoulebookError,
    NoConvergence,
    OutOfRange,
)

from .reader import Book, col_letters, split_ref
from .refs import cell_refs, our_name, parse_ref, tokens
from .status import Status

__all__ = ["refine", "precedent_boxes"]

_LABELS = frozenset([c.label for c in (BadInput, OutOfRange, NoConvergence)] + [INTERNAL_LABEL])


def _where(key) -> str:
    return f"{key[0]}!{col_letters(key[2])}{key[1]}"


def _refusal_text(v) -> str | None:
    if isinstance(v, str) and v.split(":", 1)[0] in _LABELS:
        return v
    return None


#: built-ins that look at a value without using it (a test of an error is no use of it)
_INSPECTORS = frozenset(
    {"ISERROR", "ISERR", "ISNA", "ISTEXT", "ISNUMBER", "ISBLANK", "ISLOGICAL", "ERROR.TYPE"}
)


def _inspects(func_token: str) -> bool:
    """The call only inspects its argument: an IS… test, or a joulebook function that
    reads a cell's message (catalog ``reads_message``)."""
    name = func_token[:-1].upper().removeprefix("_XLFN.")
    if name in _INSPECTORS:
        return True
    ours = our_name(func_token)
    if ours:
        try:
            return lookup(ours).reads_message
        except JoulebookError:
            return False
    return False


def precedent_boxes(
    book: Book, formula: str, sheet: str, inspect_only: bool = False
) -> list[tuple]:
    """The boxes (sheet, r1, c1, r2, c2) a formula reads: cells, areas, whole rows and
    columns, defined names that are references (from the tokenizer).  With
    *inspect_only* True, references only inspected (inside ISERROR, ISNA …, or a
    joulebook call that reads a cell's message) are left out."""
    try:
        toks = tokens(formula)
    except Exception:
        return []
    out = []
    stack: list[bool] = []  # per open call: does it (or one around it) only inspect?
    for v, t, sub in toks:
        if t == "FUNC" and sub == "OPEN":
            stack.append(bool(stack and stack[-1]) or _inspects(v))
            continue
        if t == "FUNC" and sub == "CLOSE" and stack:
            stack.pop()
            continue
        if t != "OPERAND" or sub != "RANGE" or (inspect_only and stack and stack[-1]):
            continue
        ref = parse_ref(v)
        if ref is not None and ref.kind == "name":
            target = book.local_names.get((sheet, ref.text.upper())) or book.names.get(ref.text)
            ref = parse_ref(target) if isinstance(target, str) else None
        if ref is None or ref.book is not None or ref.kind in ("name", "table"):
            continue
        box = ref.placed(0, 0)
        if box is None:
            continue
        sheets = [ref.sheet or sheet]
        if ref.sheet2 and ref.sheet in book.sheets and ref.sheet2 in book.sheets:
            i, j = book.sheets.index(ref.sheet), book.sheets.index(ref.sheet2)
            sheets = book.sheets[min(i, j) : max(i, j) + 1]
        out += [(s, *box) for s in sheets]
    return out


def _one_call_of_ours(formula: str) -> bool:
    """The formula is one joulebook call (its blank is the call's own)."""
    try:
        toks = [t for t in tokens(formula) if t[1] != "WHITE-SPACE"]
    except Exception:
        return False
    if len(toks) < 2 or toks[0][1] != "FUNC" or not our_name(toks[0][0]):
        return False
    depth = 0
    for i, (_v, t, sub) in enumerate(toks):
        if t in ("FUNC", "PAREN", "ARRAY"):
            depth += 1 if sub == "OPEN" else -1
            if depth == 0:
                return i == len(toks) - 1
    return False


def _sources(book: Book, outcomes: dict) -> dict:
    """Cells whose value must not flow on: key -> (status, reason)."""
    out: dict = {}
    for key, c in book.cells.items():
        if c.formula is None and c.has_cached and _refusal_text(c.cached):
            out[key] = (Status.REFUSAL_USED, f"{_where(key)} holds the refusal '{c.cached[:160]}'")
    for key, o in outcomes.items():
        if o.problem:
            continue
        msg = o.message or _refusal_text(o.value)
        if msg:
            out[key] = (Status.REFUSAL_USED, f"{_where(key)} holds the refusal '{msg[:160]}'")
            continue
        cell = book.cells.get(key)
        if (o.value is None or o.value == "") and cell is not None and cell.formula:
            if _one_call_of_ours(cell.formula):  # =IF(A1="","",JB_…) is a deliberate blank
                blank = [
                    _where(k)
                    for k in cell_refs(cell.formula, key[0])
                    if book.cells.get(k) is None or book.cells[k].cached in (None, "")
                ]
                what = f" ({', '.join(blank[:4])} blank)" if blank else ""
                out[key] = (
                    Status.BLANK_INPUT,
                    f"{_where(key)} returned blank: a required argument is blank{what}",
                )
    return out


def refine(book: Book, outcomes: dict, rows: list) -> list:
    """*rows* with each pass that cannot be signed turned into its status and reason
    (the rows are changed in place and returned)."""
    rows_by_key = {(r.sheet, *split_ref(r.cell)): r for r in rows}
    boxes = {
        (c.sheet, c.row, c.col): precedent_boxes(book, c.formula or "", c.sheet, True)
        for c in book.formula_cells()
    }
    sources = _sources(book, outcomes)
    tainted, read_sources = _spread(boxes, sources)
    for key in read_sources:
        if sources[key][0] is Status.BLANK_INPUT:
            tainted.setdefault(key, sources[key])
    _mark(rows_by_key, tainted)
    values = {k: c.cached for k, c in book.cells.items() if c.formula is None and c.has_cached}
    values.update({k: o.value for k, o in outcomes.items()})
    _validity_verdicts(book, values, rows_by_key)
    _unit_verdicts(book, values, rows_by_key)
    # a result computed from a cell outside its model or mixing units is no better
    bad = {
        k: (r.status, f"{_where(k)} is {r.status}: {r.note}"[:240])
        for k, r in rows_by_key.items()
        if r.status in (Status.OUTSIDE_MODEL, Status.UNIT_CLASH)
    }
    if bad:
        _mark(rows_by_key, _spread(boxes, bad)[0])
    return rows


def _mark(rows_by_key: dict, tainted: dict) -> None:
    for key, (status, reason) in tainted.items():
        r = rows_by_key.get(key)
        if r is not None and r.status is Status.PASS:
            r.status, r.note = status, reason[:400]


def _spread(boxes: dict, sources: dict) -> tuple[dict, set]:
    """The formula cells reading a source, directly or through each other: key ->
    (the source's status, the chain as a reason); and the sources read."""
    tainted: dict = {}
    read_sources: set = set()
    frontier = dict(sources)
    while frontier:
        by_sheet: dict = {}
        for k in frontier:
            by_sheet.setdefault(k[0], []).append(k)
        new: dict = {}
        for key, bx in boxes.items():
            if key in tainted or key in sources:
                continue
            for s, r1, c1, r2, c2 in bx:
                if r1 == r2 and c1 == c2:  # one cell: a look-up
                    hit = (s, r1, c1) if (s, r1, c1) in frontier else None
                else:
                    hit = next(
                        (k for k in by_sheet.get(s, ()) if r1 <= k[1] <= r2 and c1 <= k[2] <= c2),
                        None,
                    )
                if hit is None:
                    continue
                status, why = frontier[hit]
                if hit in sources:
                    read_sources.add(hit)
                    reason = f"reads {_where(hit)}: {why}"
                else:
                    reason = f"reads {_where(hit)}, which {why}"
                new[key] = (status, reason)
                break
        tainted.update(new)
        frontier = new
    return tainted, read_sources


def _validity_verdicts(book: Book, values: dict, rows_by_key: dict) -> None:
    """A pass whose one joulebook call breaks a validity check of its catalog entry."""
    from .validity import outside_model

    for key, r in rows_by_key.items():
        cell = book.cells.get(key)
        if r.status is not Status.PASS or cell is None or not cell.formula:
            continue
        flags = outside_model(book, cell.formula, key[0], values, values.get(key))
        if flags:
            r.status, r.note = Status.OUTSIDE_MODEL, "; ".join(flags)[:400]


def _unit_verdicts(book: Book, values: dict, rows_by_key: dict) -> None:
    from .cellunits import infer

    cu = infer(book, values)
    for key, text in cu.clashes.items():
        r = rows_by_key.get(key)
        if r is not None and r.status is Status.PASS:
            r.status, r.note = Status.UNIT_CLASH, text[:400]
    for key, why in cu.unknown.items():
        r = rows_by_key.get(key)
        if r is not None and not r.note:
            r.note = f"unit unknown: {why}, a unit joulebook does not know (no unit verdict)"
    if not cu.unknown:
        return
    for key, r in rows_by_key.items():  # a formula reading an input of unknown unit says so
        cell = book.cells.get(key)
        if r.note or cell is None or not cell.formula:
            continue
        unknown = [k for k in cell_refs(cell.formula, key[0]) if k in cu.unknown]
        if unknown:
            k = unknown[0]
            r.note = (
                f"unit unknown: {_where(k)} — {cu.unknown[k]}, a unit joulebook does not "
                "know (no unit verdict)"
            )
