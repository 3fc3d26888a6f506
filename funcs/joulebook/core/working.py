"""The working of a worksheet function: its equation in named arguments, evaluated and shown.

A catalog entry carries a :class:`Working`: the result as an expression of the entry's own
argument names (and of intermediate steps), the intermediate quantities a checker wants to
see, a plausibility band and the P–V curve of a path.  The audit shows it with the numbers
of a cell substituted, the docs print it, and a generic test evaluates it on every entry's
example and requires the entry's own result — so the working cannot drift from the code.

The expression language is a small, safe subset of Python's: numbers, quoted text, argument
and step names, ``+ - * / **``, the functions of :data:`MATH`, and calls of other catalog
functions by name (``JB_GAS_R(gas)``), evaluated in SI.  Expressions are parsed with
:mod:`ast` (never ``eval``); anything else is refused when the catalog is tested.

Examples
--------
>>> w = Working("W", "P_1*V_1*ln(V_2/V_1)")
>>> show(w.result)
'P1·V1·ln(V2/V1)'
>>> evaluate(w.result, {"P_1": 1e5, "V_1": 1.0, "V_2": 2.0})
69314.71805599453
"""

from __future__ import annotations

import ast
import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache

__all__ = ["Step", "Working", "Worked", "MATH", "evaluate", "show", "names_in", "work_out"]

#: functions an expression may use (SI in, SI out)
MATH: dict[str, Callable] = {
    "ln": math.log,
    "exp": math.exp,
    "sqrt": math.sqrt,
    "sin": math.sin,
    "cos": math.cos,
    "acos": math.acos,
    "abs": abs,
    "max": max,
    "min": min,
}
_CONST = {"pi": math.pi}


@dataclass(frozen=True)
class Step:
    """An intermediate quantity of a working: ``symbol = expr``, shown in the unit of *kind*.

    Parameters
    ----------
    symbol : str
        The quantity's symbol (``n``, ``P_2``, ``cp``); later steps and the result use it.
    expr : str
        Its expression in the entry's argument names and earlier steps, SI.
    kind : str or None
        Its units kind (``"pressure"``); None for a plain number, ``"text"`` for text.

    Examples
    --------
    >>> st = Step("n", "ln(P_2/P_1)/ln(V_1/V_2)")
    >>> round(evaluate(st.expr, {"P_1": 1e5, "P_2": 2e5, "V_1": 2.0, "V_2": 1.0}), 6)
    1.0

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """

    symbol: str
    expr: str
    kind: str | None = None  # a units kind; None: a plain number; "text": a text result


@dataclass(frozen=True)
class Working:
    """How the result of an entry is worked out, in the entry's own argument names.

    Parameters
    ----------
    symbol : str
        The result's symbol as the trade writes it (``W``, ``n``, ``Q``).
    result : str
        The result as an expression of arguments and steps (SI); empty where the result comes
        from a property model or a solver and only the steps are shown.
    steps : tuple of Step
        Intermediate quantities, evaluated in order (a step may use earlier ones).
    band : tuple (name, low, high, what), optional
        A plausibility band of an argument, step or the result (``"="``): outside it the
        audit raises a flag naming *what* the band is.
    zero : tuple of str
        Names whose magnitudes scale a result that must be zero (a balance that closes).
    curve : str
        Pressure as an expression of the volume ``V`` along the path from ``V_1`` to ``V_2``
        (a P–V figure of the path).
    figure : str
        ``"path"`` for an end-state solver (P–V and T–s of the solved path), ``"points"``
        for measured P–V points (arguments ``P_values``, ``V_values``).
    defaults : tuple of (name, value)
        The SI values the function takes for omitted optional arguments.
    columns : tuple of str
        Headings of a spilled result that carries none of its own (the audit's table).

    Examples
    --------
    >>> w = Working("W", "P*(V_2 - V_1)", curve="P")
    >>> round(evaluate(w.result, {"P": 2e5, "V_1": 0.1, "V_2": 0.3}), 6)
    40000.0

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """

    symbol: str = ""
    result: str = ""
    steps: tuple[Step, ...] = ()
    band: tuple[str, float, float, str] | None = None
    zero: tuple[str, ...] = ()
    curve: str = ""
    figure: str = ""
    defaults: tuple[tuple[str, float], ...] = ()  # SI values of omitted optional arguments
    columns: tuple[str, ...] = ()  # headings of a spilled row or table that has none


@lru_cache(maxsize=512)
def _parse(expr: str) -> ast.expr:
    tree = ast.parse(expr, mode="eval").body
    for node in ast.walk(tree):
        ok = isinstance(
            node,
            (
                ast.BinOp,
                ast.UnaryOp,
                ast.Name,
                ast.Constant,
                ast.Call,
                ast.Load,
                ast.operator,
                ast.unaryop,
            ),
        )
        if isinstance(node, ast.Call) and (
            node.keywords
            or not isinstance(node.func, ast.Name)
            or not (node.func.id in MATH or node.func.id.startswith("JB_"))
        ):
            ok = False
        if isinstance(node, ast.BinOp) and not isinstance(
            node.op, (ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow)
        ):
            ok = False
        if not ok:
            raise ValueError(f"working expression {expr!r}: {type(node).__name__} not allowed")
    return tree


def names_in(expr: str) -> set[str]:
    """The names an expression reads (arguments and steps; not functions or constants).

    Parameters
    ----------
    expr : str
        A working expression.

    Returns
    -------
    set of str
        The argument and step names it reads.

    Examples
    --------
    >>> sorted(names_in("2*pi*revolutions*torque"))
    ['revolutions', 'torque']

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """
    return set(_names(expr))


@lru_cache(maxsize=512)
def _names(expr: str) -> frozenset[str]:
    out = set()
    for node in ast.walk(_parse(expr)):
        if isinstance(node, ast.Name) and node.id not in _CONST:
            out.add(node.id)
    for node in ast.walk(_parse(expr)):
        if isinstance(node, ast.Call):
            out.discard(node.func.id)  # type: ignore[attr-defined]
    return frozenset(out)


def evaluate(expr: str, values: dict, call: Callable | None = None):
    """The value of a working expression.

    Parameters
    ----------
    expr : str
        The expression (the safe subset of :func:`_parse`).
    values : dict
        Argument and step values: numbers in SI, text as given, None for an omitted argument.
    call : callable, optional
        ``call(name, *args)`` runs a catalog function (SI in, SI out); needed only when the
        expression calls one.

    Returns
    -------
    float or str
        The value, SI.

    Raises
    ------
    KeyError
        A name without a value, or a catalog call without *call*; and whatever the functions
        it calls raise.

    Examples
    --------
    >>> evaluate("P_1*V_1*ln(V_2/V_1)", {"P_1": 1e5, "V_1": 1.0, "V_2": 2.0})
    69314.71805599453

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """

    def ev(n):
        if isinstance(n, ast.Constant):
            return n.value
        if isinstance(n, ast.Name):
            if n.id in values:
                return values[n.id]  # None: an omitted argument (a call takes its default)
            if n.id in _CONST:
                return _CONST[n.id]
            raise KeyError(n.id)
        if isinstance(n, ast.UnaryOp):
            v = ev(n.operand)
            return -v if isinstance(n.op, ast.USub) else +v
        if isinstance(n, ast.BinOp):
            a, b = ev(n.left), ev(n.right)
            op = n.op
            if isinstance(op, ast.Add):
                return a + b
            if isinstance(op, ast.Sub):
                return a - b
            if isinstance(op, ast.Mult):
                return a * b
            if isinstance(op, ast.Div):
                return a / b
            return a**b
        if isinstance(n, ast.Call):
            name = n.func.id  # type: ignore[attr-defined]
            args = [ev(a) for a in n.args]
            if name in MATH:
                return MATH[name](*args)
            if call is None:
                raise KeyError(name)
            return call(name, *args)
        raise ValueError(type(n).__name__)

    return ev(_parse(expr))


_PREC = {ast.Add: 1, ast.Sub: 1, ast.Mult: 2, ast.Div: 2, ast.Pow: 4}
_SIGN = {ast.Add: " + ", ast.Sub: " − ", ast.Mult: "·", ast.Div: "/", ast.Pow: "^"}


def _name(name: str) -> str:
    """``P_1`` → ``P1`` (the trade's way of writing an initial or final value)."""
    head, _, tail = name.rpartition("_")
    return head + tail if head and tail.isdigit() else name


def show(expr: str, subst: dict[str, str] | None = None) -> str:
    """*expr* written as the trade writes it (``·``, ``−``, ``^``).

    Parameters
    ----------
    expr : str
        A working expression.
    subst : dict, optional
        Text to write in place of a name (a value with its unit); names without one are
        written as the trade writes them (``P_1`` → ``P1``).

    Returns
    -------
    str
        The expression as text, parentheses only where precedence needs them.

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).

    Examples
    --------
    >>> show("(P_2*V_2 - P_1*V_1)/(1 - n)")
    '(P2·V2 − P1·V1)/(1 − n)'
    >>> show("P*(V_2 - V_1)", {"P": "500 kPa", "V_1": "0.1 m³", "V_2": "0.3 m³"})
    '500 kPa·(0.3 m³ − 0.1 m³)'
    """
    subst = subst or {}

    def r(n, parent: int = 0, right: bool = False) -> str:
        if isinstance(n, ast.Constant):
            return repr(n.value) if isinstance(n.value, str) else _num(n.value)
        if isinstance(n, ast.Name):
            return subst.get(n.id, _name(n.id))
        if isinstance(n, ast.UnaryOp):
            inner = r(n.operand, 3)
            text = ("−" if isinstance(n.op, ast.USub) else "+") + inner
            return f"({text})" if parent >= 3 else text
        if isinstance(n, ast.BinOp):
            p = _PREC[type(n.op)]
            left = r(n.left, p + (1 if isinstance(n.op, ast.Pow) else 0))
            right_text = r(n.right, p + (0 if isinstance(n.op, ast.Pow) else 1), True)
            text = left + _SIGN[type(n.op)] + right_text
            return f"({text})" if p < parent else text
        if isinstance(n, ast.Call):
            fn = n.func.id  # type: ignore[attr-defined]
            return f"{fn}({', '.join(r(a) for a in n.args)})"
        raise ValueError(type(n).__name__)

    return r(_parse(expr))


def _num(v: float) -> str:
    if isinstance(v, bool):
        return str(v)
    if isinstance(v, int):
        return str(v)
    return f"{v:.10g}"


@dataclass
class Worked:
    """One line of a working: ``symbol = formula = substituted = value``.

    Parameters
    ----------
    symbol : str
        The symbol as the trade writes it (``P2``).
    formula : str
        The expression as written (:func:`show`).
    substituted : str
        The expression with the values put in.
    value : float, str or None
        The value (SI), None when the line could not be evaluated.
    kind : str or None
        Its units kind.
    error : str
        Why the line could not be evaluated (empty when it was).

    Examples
    --------
    >>> Worked("n", "ln(P2/P1)", "ln(2)", 0.693, None).error
    ''

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """

    symbol: str
    formula: str
    substituted: str
    value: object
    kind: str | None
    error: str = ""


def work_out(
    w: Working,
    values: dict,
    call: Callable,
    display: Callable[[object, str | None], str],
    kinds: dict | None = None,
    text: Callable[[str], str] | None = None,
) -> tuple[list[Worked], Worked | None]:
    """Evaluate the steps and the result of a working, line by line.

    Parameters
    ----------
    w : Working
        The working of a catalog entry.
    values : dict
        The entry's arguments: SI for numbers with a quantity, as given otherwise, None for
        omitted ones (which take *w*'s defaults).
    call : callable
        ``call(name, *args)`` runs catalog functions (SI in, SI out).
    display : callable
        ``display(value, kind)`` writes a value with its unit for the substituted lines.
    kinds : dict, optional
        The units kind of each argument (for *display*).
    text : callable, optional
        A rewrite of each expression for the lines shown (the unit phrases of its calls in
        the units the values are shown in); the values come from the expression as written.

    Returns
    -------
    steps : list of Worked
        One line per step; a line that cannot be evaluated carries its error.
    result : Worked or None
        The result line, None when the working has no closed form.

    Examples
    --------
    >>> w = Working("W", "P*(V_2 - V_1)")
    >>> steps, res = work_out(w, {"P": 2e5, "V_1": 0.1, "V_2": 0.3}, None, lambda v, k: f"{v:g}")
    >>> res.substituted
    '200000·(0.3 − 0.1)'

    References
    ----------
    .. [1] Python Software Foundation, "ast — Abstract Syntax Trees", The Python Standard
       Library documentation (the parser the expressions go through; never ``eval``).
    """
    vals = dict(values)
    for name, v in w.defaults:
        if vals.get(name) is None:
            vals[name] = v
    kinds = dict(kinds or {})
    out: list[Worked] = []

    def line(symbol: str, expr: str, kind: str | None) -> Worked:
        subst = {}
        for n in names_in(expr):
            if vals.get(n) is not None:
                subst[n] = display(vals[n], kinds.get(n))
        try:
            v = evaluate(expr, vals, call)
            err = ""
        except Exception as e:  # shown on the line: the working never breaks the audit
            v, err = None, getattr(e, "message", None) or type(e).__name__
        shown = text(expr) if text is not None else expr
        return Worked(_name(symbol), show(shown), show(shown, subst), v, kind, err)

    for st in w.steps:
        wk = line(st.symbol, st.expr, st.kind)
        out.append(wk)
        vals[st.symbol] = wk.value
        kinds[st.symbol] = st.kind
    res = line(w.symbol or "result", w.result, None) if w.result else None
    return out, res
