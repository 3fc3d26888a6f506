"""Compare recomputed values with the values Excel saved, and report for people and CI."""

from __future__ import annotations

import json
import math
from dataclasses import asdict, dataclass
from xml.sax.saxutils import escape, quoteattr

from joulebook.core.errors import INTERNAL_LABEL, BadInput, NoConvergence, OutOfRange

from .engine import Outcome
from .reader import Book, col_letters
from .status import Status

__all__ = ["Row", "compare", "failing", "summary", "to_json", "to_junit", "fmt", "json_value"]


@dataclass
class Row:
    sheet: str
    cell: str
    formula: str
    cached: object
    recomputed: object
    status: Status  # one of the statuses of workbook/status.py (a str: "pass" …)
    note: str = ""
    cause: Status | None = None  # for a cell not checked: the status of the cell it depends on


def fmt(v) -> str:
    if isinstance(v, tuple) and len(v) == 2 and v[0] == "error":
        return v[1]
    if isinstance(v, float):
        return f"{v:.10g}"
    return "" if v is None else str(v)


def _same(a, b, rtol: float, atol: float) -> bool:
    """Equal within the tolerances; a number that is not finite (a saved ``1e999``, a NaN)
    is never the same as anything, itself included: it cannot pass."""
    if isinstance(a, bool) or isinstance(b, bool):
        return a == b
    if isinstance(a, float) and isinstance(b, float):
        if not (math.isfinite(a) and math.isfinite(b)):
            return False
        return abs(a - b) <= atol + rtol * abs(b)
    return a == b


def _not_finite(v) -> bool:
    return isinstance(v, float) and not math.isfinite(v)


def json_value(v):
    """A cell value as strict JSON holds it: an error value as ``{"error": "#N/A"}``, a
    number that is not finite as ``{"number": "inf"}`` (``"-inf"``, ``"nan"``), since JSON
    has no token for it (RFC 8259 §6)."""
    if isinstance(v, tuple):
        return {"error": v[1]}
    if _not_finite(v):
        return {"number": "nan" if v != v else ("inf" if v > 0 else "-inf")}
    return v


#: the labels of joulebook's failure text in a cell (``BadInput: …``), from the error types
_ERROR_LABELS = frozenset(
    [c.label for c in (BadInput, OutOfRange, NoConvergence)] + [INTERNAL_LABEL]
)


def _is_our_error_text(v) -> bool:
    return isinstance(v, str) and v.split(":", 1)[0] in _ERROR_LABELS


def compare(
    book: Book, outcomes: dict, rtol: float = 1e-9, atol: float = 1e-12, signed: bool = True
) -> list[Row]:
    """One row per recomputed cell, in sheet and row order.

    With *signed* (the default) a pass is a verdict a checker can sign: a cell computing on
    a refusal or a blank required input, or mixing units, carries that status instead
    (:func:`joulebook.faces.workbook.verdict.refine`)."""
    order = {s: i for i, s in enumerate(book.sheets)}
    rows = []
    for key in sorted(outcomes, key=lambda k: (order.get(k[0], 0), k[1], k[2])):
        o: Outcome = outcomes[key]
        cell = book.cells.get(key)
        formula = cell.raw_formula if cell and cell.raw_formula else ""
        cached = cell.cached if cell and cell.has_cached else None
        has = bool(cell and cell.has_cached)
        status: Status
        if o.problem:
            status, note = (o.kind or Status.ERROR), o.problem
        elif not has:
            status, note = Status.NO_CACHED_VALUE, "the file holds no saved value for this cell"
        elif _same(o.value, cached, rtol, atol):
            status, note = Status.PASS, ""
        else:
            status, note = Status.DIFFERS, ""
            if _not_finite(cached) or _not_finite(o.value):
                which = "saved" if _not_finite(cached) else "recomputed"
                note = f"the {which} value is not a finite number: it never passes"
        if status is Status.PASS and o.message:
            # a joulebook failure (its text, or an error value in a workbook whose JB_ERRORS
            # is "values") is a failed cell even when the file saved the same
            status, note = Status.ERROR, "joulebook error in the value: " + o.message[:200]
        elif status is Status.PASS and isinstance(o.value, tuple):
            # the same error as saved is no pass: a sheet of #DIV/0! must not go green
            status = Status.ERROR_VALUE
            note = f"the cell holds the error value {o.value[1]} (the file saved the same)"
        if o.note:
            note = (note + "; " if note else "") + o.note
        rows.append(
            Row(
                key[0],
                f"{col_letters(key[2])}{key[1]}",
                formula,
                cached,
                o.value,
                status,
                note,
                o.cause,
            )
        )
    if signed:
        from .verdict import refine

        refine(book, outcomes, rows)
    return rows


#: the statuses each relaxing option lets through (see `failing`); a cell not checked
#: because of one of them is let through with it
RELAX: dict[str, frozenset[Status]] = {
    "allow_errors": frozenset({Status.ERROR, Status.ERROR_VALUE}),
    "allow_unsupported": frozenset({Status.UNSUPPORTED}),
    "allow_refusals": frozenset({Status.REFUSAL_USED, Status.BLANK_INPUT}),
    "allow_unit_clash": frozenset({Status.UNIT_CLASH}),
}


def failing(
    rows: list[Row],
    allow_errors: bool = False,
    allow_unsupported: bool = False,
    allow_refusals: bool = False,
    allow_unit_clash: bool = False,
):
    """The rows that fail a strict check: anything but pass, except what was relaxed —
    joulebook errors, engine errors and cells holding an error value the file saved alike
    (--allow-errors); unsupported cells and the cells not checked because of them
    (--allow-unsupported); cells computing on a refusal or a blank required input
    (--allow-refusals); cells combining quantities whose units disagree
    (--allow-unit-clash)."""
    chosen = {
        "allow_errors": allow_errors,
        "allow_unsupported": allow_unsupported,
        "allow_refusals": allow_refusals,
        "allow_unit_clash": allow_unit_clash,
    }
    let: set[Status] = set()
    for name, on in chosen.items():
        if on:
            let |= RELAX[name]
    out = []
    for r in rows:
        if r.status is Status.PASS or r.status in let:
            continue
        if r.status is Status.NOT_CHECKED and r.cause is Status.UNSUPPORTED and allow_unsupported:
            continue
        out.append(r)
    return out


def summary(rows: list[Row]) -> dict:
    out = {"cells": len(rows)}
    for r in rows:
        out[r.status.value] = out.get(r.status.value, 0) + 1
    out["saved_error_values"] = sum(1 for r in rows if r.status is Status.ERROR_VALUE)
    not_values = {
        Status.UNSUPPORTED,
        Status.CIRCULAR,
        Status.ERROR,
        Status.NOT_CHECKED,
        Status.VOLATILE,
    }
    out["errors_in_values"] = sum(
        1
        for r in rows
        if r.status not in not_values
        and (_is_our_error_text(r.recomputed) or isinstance(r.recomputed, tuple))
    )
    return out


def to_json(book: Book, rows: list[Row], rtol: float, atol: float) -> str:
    enc = json_value
    return json.dumps(
        {
            "workbook": str(book.path),
            "sha256": book.sha256,
            "tolerance": {"rtol": rtol, "atol": atol},
            "summary": summary(rows),
            "cells": [
                {**asdict(r), "cached": enc(r.cached), "recomputed": enc(r.recomputed)}
                for r in rows
            ],
        },
        indent=2,
        allow_nan=False,
    )


#: statuses about the value a cell holds (JUnit failures); the others are cells that could
#: not be checked (JUnit errors)
VALUE_STATUSES = frozenset(
    {
        Status.DIFFERS,
        Status.NO_CACHED_VALUE,
        Status.ERROR,
        Status.ERROR_VALUE,
        Status.UNIT_CLASH,
        Status.REFUSAL_USED,
        Status.BLANK_INPUT,
        Status.OUTSIDE_MODEL,
    }
)


def to_junit(book: Book, rows: list[Row], bad: list[Row] | None = None) -> str:
    """JUnit XML: one test case per cell; the failing ones (*bad*, by default every cell not
    passing) are failures (values) or errors (cells that could not be checked)."""
    bad_ids = {id(r) for r in (rows if bad is None else bad) if r.status != "pass"}
    value_kinds = VALUE_STATUSES
    fails = sum(id(r) in bad_ids and r.status in value_kinds for r in rows)
    errs = sum(id(r) in bad_ids and r.status not in value_kinds for r in rows)
    out = [
        '<?xml version="1.0" encoding="utf-8"?>',
        f'<testsuite name={quoteattr("joulebook check " + book.path.name)} tests="{len(rows)}" '
        f'failures="{fails}" errors="{errs}">',
    ]
    for r in rows:
        name = quoteattr(f"{r.sheet}!{r.cell}")
        body = ""
        msg = f"saved {fmt(r.cached)}, recomputed {fmt(r.recomputed)}"
        if id(r) in bad_ids and r.status in value_kinds:
            text = r.status + ": " + msg + (f"; {r.note}" if r.note else "")
            body = f"<failure message={quoteattr(text)}>{escape(r.formula)}</failure>"
        elif id(r) in bad_ids:
            body = f"<error message={quoteattr(r.note)}>{escape(r.formula)}</error>"
        out.append(f"  <testcase classname={quoteattr(r.sheet)} name={name}>{body}</testcase>")
    out.append("</testsuite>")
    return "\n".join(out) + "\n"
