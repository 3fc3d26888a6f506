"""Formula text as the formula library reads it, for spellings Excel stores that the library
does not parse: number literals without an exponent sign (``1e6``, ``2.5E3``), an OFFSET whose
height and width are left empty (``OFFSET(A1,1,0,,)``, Excel: the reference's own size), and
white space or a line break ending the formula.

Examples
--------
>>> normalized("1e6+1")
'1E+6+1'
>>> normalized("SUM(OFFSET(A1,0,0,2,))")
'SUM(OFFSET(A1,0,0,2))'
>>> normalized("A1*2\\n")
'A1*2'
>>> normalized("OFFSET(A1,,)")
'OFFSET(A1,,)'
"""

from __future__ import annotations

import re

from ..refs import tokens

__all__ = ["final_sum", "normalized", "ADD", "SUB"]

#: the functions that stand for a formula's last + or - (Excel's cancellation, see
#: joulebook.faces.workbook.functions.operators)
ADD, SUB = "_XLJB.ADD", "_XLJB.SUB"
_NOT_SUM = frozenset({"=", "<>", "<", ">", "<=", ">=", "&", ":", ",", " "})

_BARE_EXPONENT = re.compile(r"^(\d*\.?\d*)[eE](\d+)$")
_MAYBE_EXPONENT = re.compile(r"\d[eE]\d")


def normalized(formula: str) -> str:
    """*formula* (without ``=``) in the spelling the formula library parses; the same text
    when nothing needs to change."""
    text = formula.rstrip(" \t\r\n")
    upper = text.upper()
    if not (_MAYBE_EXPONENT.search(text) or "OFFSET(" in upper):
        return text
    try:
        toks = [list(t) for t in tokens(text)]
    except Exception:
        return text  # refused later, with its reason
    changed = False
    for t in toks:
        if t[1] == "OPERAND" and t[2] == "NUMBER":
            m = _BARE_EXPONENT.match(t[0])
            if m and m.group(1) not in ("", "."):
                t[0] = f"{m.group(1)}E+{m.group(2)}"
                changed = True
    # an OFFSET's empty height and width are left out (its first three arguments stay)
    stack: list = []  # per open function: None, or the places of an OFFSET's separators
    for i, (value, typ, sub) in enumerate(toks):
        if typ == "FUNC" and sub == "OPEN":
            stack.append([] if value.upper() == "OFFSET(" else None)
        elif typ == "SEP" and sub == "ARG" and stack and stack[-1] is not None:
            stack[-1].append(i)
        elif typ == "FUNC" and sub == "CLOSE" and stack:
            seps = stack.pop()
            end = i
            while seps and len(seps) > 2 and _empty_between(toks, seps[-1], end):
                toks[seps[-1]][0] = ""
                end = seps.pop()
                changed = True
    if not changed:
        return text
    return "".join(t[0] for t in toks)


def _empty_between(toks: list, a: int, b: int) -> bool:
    return all(t[1] == "WHITE-SPACE" for t in toks[a + 1 : b])


def final_sum(formula: str) -> str:
    """*formula* whose last operation is a ``+`` or ``-`` outside any function, written as a
    call of ADD or SUB (``A1-B1`` → ``_XLJB.SUB(A1,B1)``): Excel takes a sum that cancels to
    within 15 significant digits as 0 only there, never inside (``=1*(.5-.4-.1)``, or
    ``=A1-B1=0``, keep their residue).  Any other formula is returned as it is.

    >>> final_sum("0.5-0.4-0.1"), final_sum("(A1+B1)"), final_sum("A1-B1=0")
    ('_XLJB.SUB(0.5-0.4,0.1)', '(_XLJB.ADD(A1,B1))', 'A1-B1=0')
    """
    if "+" not in formula and "-" not in formula:
        return formula
    try:
        toks = tokens(formula)
    except Exception:
        return formula
    return _final_sum(list(toks)) or formula


def _final_sum(toks: list) -> str | None:
    depth, last, first_open, closes_at = 0, None, None, None
    for i, (value, typ, sub) in enumerate(toks):
        if sub == "OPEN":
            if depth == 0 and first_open is None and i == _first_real(toks):
                first_open = i
            depth += 1
        elif sub == "CLOSE":
            depth -= 1
            if depth == 0 and first_open is not None and closes_at is None:
                closes_at = i
        elif depth == 0 and typ == "OPERATOR-INFIX":
            if value in _NOT_SUM:
                return None
            if value in ("+", "-"):
                last = i
    if last is not None:
        left = "".join(t[0] for t in toks[:last]).strip()
        right = "".join(t[0] for t in toks[last + 1 :]).strip()
        if not left or not right:
            return None
        return f"{ADD if toks[last][0] == '+' else SUB}({left},{right})"
    # one pair of parentheses around the whole formula: its inside
    if first_open is not None and toks[first_open][1] == "PAREN" and closes_at == _last_real(toks):
        inner = _final_sum(toks[first_open + 1 : closes_at])
        if inner is not None:
            return "(" + inner + ")"
    return None


def _first_real(toks: list) -> int:
    return next((i for i, t in enumerate(toks) if t[1] != "WHITE-SPACE"), -1)


def _last_real(toks: list) -> int:
    return max((i for i, t in enumerate(toks) if t[1] != "WHITE-SPACE"), default=-1)
