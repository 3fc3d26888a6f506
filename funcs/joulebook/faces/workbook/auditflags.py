"""The checks a checker makes by eye, made for every formula cell of the audit.

Each function looks at one kind of slip and returns flag texts; none knows any worksheet
function by name: what a formula reads and returns comes from the catalog (argument kinds,
the unit system in force) through :mod:`joulebook.faces.workbook.audit`.

- a label or header naming a unit (``°F``, ``psig``, ``gal``, ``Btu`` …) other than the unit
  the formula reads the cell in;
- gauge compared with absolute, and a value compared with a limit in another unit;
- a temperature under 200 K (or °R) that looks like a °C or °F value fed as absolute;
- inputs typed as constants inside formulas instead of labelled cells.
"""

from __future__ import annotations

import re

from joulebook.core.units import known_unit

from .refs import parse_ref, tokens

__all__ = ["label_unit", "same_unit", "unit_kind", "is_gauge", "comparisons", "GAUGE_WORDS"]

#: kinds a unit named in a label is tried as, in order
_KINDS = (
    "temperature",
    "pressure",
    "volume",
    "energy",
    "mass",
    "specific_energy",
    "specific_entropy",
    "specific_volume",
    "length",
    "power",
    "time",
)
GAUGE_WORDS = ("gauge", "gage", "barg", "psig", "kpag", "mpag", "(g)")
_ABS_WORDS = ("absolute", "(abs", "abs)", "psia", "bara", " abs ")
_COMPARE = {"<", ">", "<=", ">=", "=", "<>"}

# a unit written in a label: in brackets or parentheses, or after "in", or as the last word
_BRACKETED = re.compile(r"[\[(]\s*([^\[\]()]{1,24}?)\s*[\])]")
_AFTER_IN = re.compile(r"\bin\s+([A-Za-z°³²/·*^0-9.-]{1,16})\s*$")
_LAST_WORD = re.compile(r"[\s,:]([A-Za-z°³²/·*^0-9.-]{1,16})\s*$")


def _units_named(label: str) -> list[str]:
    if not label:
        return []
    out = [m.group(1) for m in _BRACKETED.finditer(label)]
    for rx in (_AFTER_IN, _LAST_WORD):
        m = rx.search(label)
        if m:
            out.append(m.group(1))
    return out


def label_unit(label: str, kind: str):
    """The unit of *kind* a label names (its conversion), or None."""
    for text in _units_named(label):
        for word in (text, text.split(",")[0].strip(), text.split()[-1] if text.split() else ""):
            if not word or word.lower() in ("abs", "absolute", "gauge", "g", "a"):
                continue
            conv = known_unit(word, kind)
            if conv is not None:
                return conv
    return None


def unit_kind(unit: str) -> tuple[str, object] | None:
    """(kind, conversion) of a unit text, or None when it names no quantity we convert."""
    for kind in _KINDS:
        conv = known_unit(unit, kind)
        if conv is not None:
            return kind, conv
    return None


def same_unit(a, b) -> bool:
    """Two conversions to SI are the same unit (factor and offset)."""
    return abs(a.factor / b.factor - 1) < 1e-9 and abs(a.offset - b.offset) <= 1e-9 * max(
        1.0, abs(a.offset), abs(b.offset)
    )


def is_gauge(label: str, unit: str = "") -> bool | None:
    """True (gauge), False (absolute) or None (cannot tell) from a label and a unit."""
    u = unit.strip().lower()
    if u.endswith("g") and u in ("kpag", "barg", "psig", "mpag", "pag"):
        return True
    if u in ("psia", "bara"):
        return False
    lab = f" {label.lower()} "
    if any(w in lab for w in GAUGE_WORDS):
        return True
    if any(w in lab for w in _ABS_WORDS):
        return False
    if unit and unit_kind(unit) and unit_kind(unit)[0] == "pressure":
        return False  # a pressure in an absolute unit (kPa, bar, psia)
    return None


def comparisons(formula: str) -> list[tuple[str, str, str]]:
    """(left operand, operator, right operand) of each comparison whose two sides are a
    single reference or number, from the formula's tokens."""
    try:
        toks = [t for t in tokens(formula) if t[1] != "WHITE-SPACE"]
    except Exception:
        return []

    def bound(tok) -> bool:  # a side ends here: start or end, a separator, a parenthesis
        return tok is None or tok[1] in ("SEP", "FUNC", "PAREN")

    out = []
    for i, (v, t, _sub) in enumerate(toks):
        if t == "OPERATOR-INFIX" and v in _COMPARE and 0 < i < len(toks) - 1:
            left, right = toks[i - 1], toks[i + 1]
            before = toks[i - 2] if i >= 2 else None
            after = toks[i + 2] if i + 2 < len(toks) else None
            if left[1] == "OPERAND" and right[1] == "OPERAND" and bound(before) and bound(after):
                out.append((left[0], v, right[0]))
    return out


def operand_cell(text: str, here: str):
    """(sheet, row, col) of an operand that is one cell, or None."""
    ref = parse_ref(text)
    if ref is not None and ref.kind == "cell" and ref.book is None and not ref.sheet2:
        return (ref.sheet or here, ref.r1, ref.c1)
    return None


def is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True
