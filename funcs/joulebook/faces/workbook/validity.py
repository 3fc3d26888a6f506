"""The limits of each model's physics, read from the catalog and checked on every call.

A catalog entry declares its :class:`joulebook.catalog.Validity` checks (a wall's hoop
stress against a yield strength, a fitted exponent's band and R², a compression that
cools, a liquid where a gas expansion is meant); this module evaluates them for one call
and says which fail.  It never names a function: what it checks comes from the entry.

``check`` (through :func:`joulebook.faces.workbook.verdict.refine`) applies them to every cell
that is one joulebook call whose arguments are typed numbers, texts or references; a call
nested in a larger formula, or with an argument that is itself a formula expression, gets
no validity verdict here (the audit shows its working).
"""

from __future__ import annotations

import math

from joulebook.catalog import Func, Validity, lookup, working_call
from joulebook.core.errors import JoulebookError
from joulebook.core.units import unit_system
from joulebook.core.working import evaluate

from .reader import Book
from .refs import our_name, parse_ref, tokens

__all__ = ["violations", "call_arguments", "outside_model"]

_AS_IS = ("text", "number", "asked")


def _checked() -> tuple[str, ...]:
    """The names of the entries that declare validity checks."""
    global _CHECKED
    if _CHECKED is None:
        from joulebook.catalog import CATALOG

        _CHECKED = tuple(f.name for f in CATALOG if f.validity)
    return _CHECKED


_CHECKED: tuple[str, ...] | None = None


def _bound(b, vals: dict):
    if b is None or isinstance(b, (int, float)):
        return b
    return vals[b]


def _shown(x: float, kind: str | None) -> str:
    if kind == "pressure":
        return f"{x / 1e6:.4g} MPa"
    if kind in ("temperature", "temperature_difference"):
        return f"{x:.4g} K"
    return f"{x:.4g}"


def _source(v: Validity, name) -> str:
    for n, _val, src in v.defaults:
        if n == name:
            return f" ({n}: {src})"
    return ""


def violations(f: Func, si: dict, result, units: str | None = None) -> list[str]:
    """The validity checks of *f* that do not hold for one call, as flag texts.

    Parameters
    ----------
    f : Func
        The catalog entry.
    si : dict
        Its arguments by name: numbers in SI, texts as given, ranges as lists; an omitted
        argument is absent or None.
    result : object
        The call's result, SI (a row for a row result).
    units : str, optional
        The call's unit system (for the catalog calls an expression makes).
    """
    out = []
    run = working_call(units)
    for v in f.validity:
        vals = {k: x for k, x in si.items() if x is not None}
        vals["result"] = result
        for name, val, _src in v.defaults:
            vals.setdefault(name, val)
        try:
            if v.when and not evaluate(v.when, vals, run) > 0:
                continue
            x = evaluate(v.value, vals, run)
            if v.item is not None:
                while isinstance(x, (list, tuple)) and len(x) == 1:
                    x = x[0]
                x = x[v.item]
            lo, hi = _bound(v.low, vals), _bound(v.high, vals)
        except (KeyError, TypeError, ValueError, IndexError, ZeroDivisionError, JoulebookError):
            continue  # an argument left out or not a number: no verdict
        if hasattr(x, "item") and not isinstance(x, str):
            x = x.item()  # a numpy number
        if isinstance(x, str):
            if x in v.not_text:
                out.append(f"{v.says} is '{x}': outside the model ({v.model})")
            continue
        if not isinstance(x, (int, float)) or isinstance(x, bool) or not math.isfinite(x):
            continue
        if lo is not None and x < lo:
            out.append(
                f"{v.says} = {_shown(x, v.kind)} is below {_shown(lo, v.kind)}"
                f"{_source(v, v.low)}: outside the model ({v.model})"
            )
        elif hi is not None and x > hi:
            ratio = f", {x / hi:.3g}×" if hi > 0 else ""
            out.append(
                f"{v.says} = {_shown(x, v.kind)} is above {_shown(hi, v.kind)}{ratio}"
                f"{_source(v, v.high)}: outside the model ({v.model})"
            )
    return out


def call_arguments(book: Book, formula: str, sheet: str, values: dict):
    """(entry, arguments by name in SI, unit system text) of a formula that is one joulebook
    call whose arguments are typed values or references; None otherwise."""
    try:
        toks = [t for t in tokens(formula) if t[1] != "WHITE-SPACE"]
    except Exception:
        return None
    if len(toks) < 2 or toks[0][1] != "FUNC" or toks[0][2] != "OPEN" or toks[-1][1] != "FUNC":
        return None
    name = our_name(toks[0][0])
    if not name:
        return None
    try:
        f = lookup(name)
    except JoulebookError:
        return None
    args: list = [[]]
    depth = 0
    for t in toks[1:-1]:
        if t[1] in ("FUNC", "PAREN", "ARRAY"):
            depth += 1 if t[2] == "OPEN" else -1
        if t[1] == "SEP" and t[2] == "ARG" and depth == 0:
            args.append([])
        else:
            args[-1].append(t)
    raw = []
    for a in args:
        if not a:
            raw.append(None)
        elif len(a) > 1:
            return None  # an expression: no verdict here
        else:
            v, kind, sub = a[0]
            if sub == "NUMBER":
                raw.append(float(v))
            elif sub == "TEXT":
                raw.append(v[1:-1].replace('""', '"'))
            elif sub == "RANGE":
                ref = parse_ref(v)
                if ref is None or ref.book is not None or ref.kind not in ("cell", "area"):
                    return None
                s = ref.sheet or sheet
                if ref.kind == "cell":
                    raw.append(values.get((s, ref.r1, ref.c1)))
                else:
                    raw.append(
                        [
                            [values.get((s, r, c)) for c in range(ref.c1, ref.c2 + 1)]
                            for r in range(ref.r1, ref.r2 + 1)
                        ]
                    )
            else:
                return None
    names = [a.name for a in f.all_args]
    given = dict(zip(names, raw))
    units = given.get("units") if isinstance(given.get("units"), str) else None
    try:
        system = unit_system(units or None)
    except JoulebookError:
        return None
    si: dict = {}
    for a in f.args:
        v = given.get(a.name)
        if a.quantity and isinstance(v, float):
            v = system.conv(a.quantity).to_si(v)
        elif a.quantity and isinstance(v, list):
            v = [
                [system.conv(a.quantity).to_si(x) if isinstance(x, float) else x for x in row]
                for row in v
            ]
        si[a.name] = v
    return f, si, units


def outside_model(book: Book, formula: str, sheet: str, values: dict, result) -> list[str]:
    """The validity flags of a cell that is one joulebook call (empty when it holds, or
    when the call's arguments or result cannot be read)."""
    upper = formula.upper()
    if not any(name in upper for name in _checked()):
        return []
    got = call_arguments(book, formula, sheet, values)
    if got is None:
        return []
    f, si, units = got
    if not f.validity:
        return []
    if isinstance(result, float) and f.result not in _AS_IS:
        try:
            result = unit_system(units or None).conv(f.result).to_si(result)
        except JoulebookError:
            return []
    elif not isinstance(result, (float, str)):
        return []
    return violations(f, si, result, units)
