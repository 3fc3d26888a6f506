"""Workbooks written by hand for the file-handling tests (issue 34): a small sheet of labels,
inputs and formulas with stale saved values, in any quote style, spacing or namespace prefix.
The scenario (a receiver's pressure and volume) is invented."""

from pathlib import Path

import openpyxl

from wbtools import rewrite_part

MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
SHEET = "xl/worksheets/sheet1.xml"


def _sheet(q: str = '"', eq: str = "=", prefix: str = "", extra: str = "") -> bytes:
    """A sheet of 3 labels, 2 inputs, 2 formulas with stale saved values (30, 1), a styled
    blank cell and a boolean; *q* the attribute quote, *eq* the ``=`` with its spaces,
    *prefix* the namespace prefix, *extra* more attributes on every cell, before its ``r``."""
    p = prefix + ":" if prefix else ""
    decl = f"xmlns:{prefix}{eq}{q}{MAIN}{q}" if prefix else f"xmlns{eq}{q}{MAIN}{q}"

    def a(name, value):
        return f" {name}{eq}{q}{value}{q}"

    def c(ref, body="", t=None):
        return (
            f"<{p}c{extra}{a('r', ref)}{a('t', t) if t else ''}>{body}</{p}c>"
            if body
            else f"<{p}c{extra}{a('r', ref)}{a('s', '0')}/>"
        )

    def v(x):
        return f"<{p}v>{x}</{p}v>"

    def inline(text):
        return f"<{p}is><{p}t>{text}</{p}t></{p}is>"

    rows = [
        (1, [c("A1", inline("Receiver R-7 (invented)"), "inlineStr")]),
        (2, [c("A2", inline("P in kPa"), "inlineStr"), c("B2", v(250))]),
        (3, [c("A3", inline("V in m3"), "inlineStr"), c("B3", v(2))]),
        (4, [c("A4", inline("P*V in kJ"), "inlineStr"), c("B4", f"<{p}f>B2*B3</{p}f>" + v(30))]),
        (5, [c("A5"), c("B5", f"<{p}f>B4&gt;400</{p}f>" + v(0), "b"), c("C5", v(1), "b")]),
    ]
    body = "".join(f"<{p}row{a('r', r)}>{''.join(cs)}</{p}row>" for r, cs in rows)
    return (
        f'<?xml version="1.0" encoding="UTF-8"?>\n<{p}worksheet {decl}'
        + (f" xmlns:q{eq}{q}urn:joulebook-test{q}" if "q:" in extra else "")
        + f"><{p}sheetData>{body}</{p}sheetData></{p}worksheet>"
    ).encode()


def _book(tmp: Path, name: str, sheet: bytes) -> Path:
    base = tmp / f"base-{name}"
    wb = openpyxl.Workbook()
    wb.active["A1"] = 0.0
    wb.save(base)
    return rewrite_part(base, tmp / name, SHEET, lambda _old: sheet)
