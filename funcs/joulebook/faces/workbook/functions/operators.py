"""Excel's arithmetic operators where the formula library differs from Excel.

- ``+`` and ``-`` as the last operation of a formula: a result that cancels to within 15
  significant digits of its larger operand is 0, as Excel stores it (``=0.5-0.4-0.1`` is 0,
  not -2.8e-17); inside, the residue stays (``=A1-B1=0`` is FALSE for such a pair) [1]_.
- ``^``: a negative number to a fractional power is ``#NUM!`` (not ``#VALUE!``), ``0^0`` is
  ``#NUM!``, ``0`` to a negative power ``#DIV/0!``, an overflow ``#NUM!`` [2]_.
- Text in arithmetic is read as ``VALUE`` reads it: numbers, and dates and times such as
  ``"12:30"`` (``="12:30"+13/24`` is 1.0625) [2]_.
- A number turned into text (``&``, text functions) is written as Excel's General format
  writes it: at most 15 significant digits, ``1.00000013E+48`` for a large one [2]_.

References
----------
.. [1] Microsoft support, "Floating-point arithmetic may give inaccurate results in Excel"
   (the example ``=.5-.4-.1`` shows 0; ``=1*(.5-.4-.1)`` does not) — from memory.
.. [2] Excel's function and operator reference (POWER, VALUE, the General number format) —
   common practice.

Examples
--------
>>> cancel_sum(0.5 - 0.4, -0.1)
0.0
>>> power(-8.0, 1 / 3)
'#NUM!'
>>> round(text_number("12:30") + 13 / 24, 12)
1.0625
>>> general_text(1.00000013e48), general_text(1 / 3), general_text(25.0)
('1.00000013E+48', '0.333333333333333', '25')
"""

from __future__ import annotations

import math
import re

__all__ = ["cancel_sum", "general_text", "install", "power", "text_number"]

_CANCEL = 1e-15  # relative size below which a sum is taken as exactly 0
_TIME = re.compile(r"^\s*(\d{1,4}):(\d{1,2})(?::(\d{1,2}(?:\.\d*)?))?\s*([AaPp][Mm])?\s*$")


def cancel_sum(x: float, y: float) -> float:
    """``x + y``, 0 when it cancels to within 15 significant digits of the larger operand."""
    r = x + y
    if r != 0.0 and abs(r) <= _CANCEL * max(abs(x), abs(y)):
        return 0.0
    return r


def power(x: float, y: float):
    """``x ^ y`` as Excel: an error code (text) where Excel gives one."""
    if x == 0.0:
        if y == 0.0:
            return "#NUM!"
        if y < 0.0:
            return "#DIV/0!"
        return 0.0
    if x < 0.0 and not float(y).is_integer():
        return "#NUM!"
    try:
        r = math.pow(x, y)
    except OverflowError:
        return "#NUM!"
    except ValueError:
        return "#NUM!"
    if math.isinf(r) or math.isnan(r):
        return "#NUM!"
    return r


def text_number(v) -> float:
    """A value of an arithmetic operand as a number: text read as VALUE reads it (numbers,
    dates, times); ValueError when it is not one."""
    if isinstance(v, str):
        try:
            return float(v)
        except ValueError:
            pass
        t = _TIME.match(v)
        if t:  # a time of day alone: a fraction of a day (the library would add today)
            h, m, sec = int(t.group(1)), int(t.group(2)), float(t.group(3) or 0)
            half = (t.group(4) or "").upper()
            if half and not 1 <= h <= 12:
                raise ValueError(f"text {v!r} is not a time")
            h = h % 12 + (12 if half == "PM" else 0) if half else h
            if m > 59 or sec >= 60:
                raise ValueError(f"text {v!r} is not a time")
            return (h * 3600 + m * 60 + sec) / 86400
        from formulas.functions.text import xvalue

        try:
            r = xvalue(v)
        except Exception:
            raise ValueError(f"text {v!r} is not a number") from None
        if not isinstance(r, (int, float)) or isinstance(r, bool):
            raise ValueError(f"text {v!r} is not a number")
        return float(r)
    return float(v)


def general_text(x: float) -> str:
    """A number as text in Excel's General format: 15 significant digits at most, an
    exponent (``E+48``) from 1E+15 up."""
    if x.is_integer() and abs(x) < 1e15:
        return f"{int(x)}"
    if x != 0.0 and abs(x) < 1e-4:
        return str(x)  # as the formula library writes it (left as it was)
    s = f"{x:.15g}"
    if "e" in s:
        mant, exp = s.split("e")
        e = int(exp)
        return f"{mant}E{'+' if e >= 0 else '-'}{abs(e):02d}"
    return s


def num(*a):
    """The operands as numbers: float first (the common case, at C speed), then text read
    as VALUE reads it."""
    try:
        return tuple(map(float, a))
    except (ValueError, TypeError):
        return tuple(map(text_number, a))


def install(operators: dict) -> None:
    """Put Excel's ``+ - * / ^`` into the formula library's operator table."""
    from formulas.functions import Error, wrap_ufunc

    def err(code):
        return Error.errors[code]

    def div(x, y):
        return (x / y) if y else err("#DIV/0!")

    def pw(x, y):
        r = power(x, y)
        return err(r) if isinstance(r, str) else r

    for op, fn in (
        ("+", lambda x, y: x + y),
        ("-", lambda x, y: x - y),
        ("*", lambda x, y: x * y),
        ("/", div),
        ("^", pw),
    ):
        operators[op] = wrap_ufunc(fn, input_parser=num)


def install_final_sums(table: dict) -> None:
    """The functions a formula's last ``+``/``-`` is written as (see
    :func:`joulebook.faces.workbook.functions.spelling.final_sum`): the sum with Excel's
    cancellation."""
    from formulas.functions import wrap_ufunc

    from .spelling import ADD, SUB

    table[ADD] = wrap_ufunc(cancel_sum, input_parser=num)
    table[SUB] = wrap_ufunc(lambda x, y: cancel_sum(x, -y), input_parser=num)
