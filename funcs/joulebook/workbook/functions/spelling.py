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

__all__ = ["normalized"]

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
