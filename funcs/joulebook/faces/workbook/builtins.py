"""Excel built-ins the formula library lacks or gets wrong, done here.

Each function follows Excel's function reference [1] (the behaviour documented there; where the
reference is silent, what Excel is seen to save, as the tests say beside each check).  They are
installed into the library's function table by :func:`install`, which the engine calls once;
the library's own version stays in use for everything not named here.

Corrections to the library's shared helpers, installed with them:
* a reference or array given to an aggregate (SUM, MAX, COUNT, AVERAGE, …) skips every text
  value, numeric-looking text included ("3.5" in a cell is text, not a number);
* text dates outside Excel's calendar (before 1900-01-01, after 9999-12-31) and text that is
  only a number are not dates (#VALUE!, as DATEVALUE("7/5/1800") in Excel);
* the criterion ``"<>x"`` (COUNTIF, SUMIF, …) matches every cell that does not match ``"=x"``:
  blanks, logical values and numbers included.

[1] Microsoft, Excel functions (alphabetical), support.microsoft.com, each function's page.
"""

from __future__ import annotations

import functools
import importlib
import math
import re
import types

import numpy as np

from .numfmt import FormatError, format_value

__all__ = ["install"]


# ---------------------------------------------------------------------------------------
# value coercion as Excel does for a parameter that takes one value


class _Fail(Exception):
    def __init__(self, code: str):
        self.code = code


def _one(v):
    if isinstance(v, np.ndarray):
        if v.size != 1:
            raise _Fail("#VALUE!")
        v = v.reshape(-1)[0]
    return v


def _err(v):
    from formulas.tokens.operand import XlError

    return isinstance(v, XlError)


def _empty(v) -> bool:
    import schedula as sh

    return v is sh.EMPTY or v is None


def _num(v) -> float:
    """A number from one value: TRUE is 1, a blank 0, text that reads as a number or a date
    its value; other text is #VALUE!; an error stays that error."""
    v = _one(v)
    if _err(v):
        raise _Fail(str(v))
    if _empty(v):
        return 0.0
    if isinstance(v, (bool, np.bool_)):
        return float(v)
    if isinstance(v, str):
        from formulas.functions import _text2num

        x = _text2num(v) if v.strip() else v
        if isinstance(x, str):
            raise _Fail("#VALUE!")
        return float(x)
    return float(v)


def _int(v) -> int:
    x = _num(v)
    if not math.isfinite(x) or abs(x) > 2**53:
        raise _Fail("#NUM!")
    return int(math.trunc(x))


def _general_text(x: float) -> str:
    if x == int(x) and abs(x) < 1e15:
        return str(int(x))
    return f"{x:.15g}"


def _text(v) -> str:
    v = _one(v)
    if _err(v):
        raise _Fail(str(v))
    if _empty(v):
        return ""
    if isinstance(v, (bool, np.bool_)):
        return "TRUE" if v else "FALSE"
    if isinstance(v, str):
        return v
    return _general_text(float(v))


def _error(code: str):
    from formulas.tokens.operand import Error

    return Error.errors[code]


def _guarded(fn):
    """*fn* with its failures as Excel's error values."""

    def one(*args):
        try:
            return fn(*args)
        except _Fail as e:
            return _error(e.code)
        except (OverflowError, ValueError, ZeroDivisionError):
            return _error("#NUM!")

    return one


def _scalar_function(fn):
    """Excel's value function: applied element by element over arrays (array formulas), an
    error value in, that error out; failures as Excel's error values."""
    one = _guarded(fn)

    def wrapper(*args):
        if any(isinstance(a, np.ndarray) and a.size != 1 for a in args):
            arrays = [np.asarray(a, dtype=object) if isinstance(a, np.ndarray) else a for a in args]
            shape = np.broadcast_shapes(*(a.shape for a in arrays if isinstance(a, np.ndarray)))
            out = np.empty(shape, dtype=object)
            for idx in np.ndindex(shape):
                out[idx] = one(*(
                    a[tuple(i if s > 1 else 0 for i, s in zip(idx, a.shape))]
                    if isinstance(a, np.ndarray) else a for a in arrays
                ))  # fmt: skip
            return out
        return one(*(_one(a) if isinstance(a, np.ndarray) else a for a in args))

    return functools.update_wrapper(wrapper, fn)


# ---------------------------------------------------------------------------------------
# information


def xtype(value=None):
    """TYPE(value): 1 number (and blank), 2 text, 4 logical value, 16 error value, 64 array."""
    if isinstance(value, np.ndarray):
        if value.size != 1:
            return 64
        value = value.reshape(-1)[0]
    if _err(value):
        return 16
    if isinstance(value, (bool, np.bool_)):
        return 4
    if isinstance(value, str) and not _empty(value):
        return 2
    return 1


# ---------------------------------------------------------------------------------------
# math


def _to_multiple(number, significance, mode, up: bool) -> float:
    """Round to a multiple of |significance| (default 1), up or down along the number line;
    a negative number with a non-zero mode goes the other way (away from or toward zero)."""
    x = _num(number)
    s = abs(_num(significance)) if significance is not None and not _empty(significance) else 1.0
    m = _num(mode) if mode is not None and not _empty(mode) else 0.0
    if s == 0:
        return 0.0
    if x < 0 and m != 0:
        up = not up
    return math.ceil(x / s - 1e-12) * s if up else math.floor(x / s + 1e-12) * s


def xceiling_math(number, significance=None, mode=None):
    """CEILING.MATH(number, [significance], [mode]): up to a multiple of |significance|
    (default 1); a negative number rounds toward zero, or away from it when mode is not 0."""
    return _to_multiple(number, significance, mode, up=True)


def xfloor_math(number, significance=None, mode=None):
    """FLOOR.MATH(number, [significance], [mode]): down to a multiple of |significance|
    (default 1); a negative number rounds away from zero, or toward it when mode is not 0."""
    return _to_multiple(number, significance, mode, up=False)


def xquotient(numerator, denominator):
    """QUOTIENT(numerator, denominator): the integer part of the division (toward zero)."""
    n, d = _num(numerator), _num(denominator)
    if d == 0:
        raise _Fail("#DIV/0!")
    return float(math.trunc(n / d))


def xcombin(number, number_chosen):
    """COMBIN(number, number_chosen): both truncated; #NUM! if number < 0, number_chosen < 0
    or number < number_chosen."""
    n, k = _int(number), _int(number_chosen)
    if n < 0 or k < 0 or n < k:
        raise _Fail("#NUM!")
    return float(math.comb(n, k))


def xcombina(number, number_chosen):
    """COMBINA(number, number_chosen): combinations with repetitions, C(n + k - 1, k)."""
    n, k = _int(number), _int(number_chosen)
    if n < 0 or k < 0 or n < k and n == 0 and k > 0:
        raise _Fail("#NUM!")
    if n == 0 and k == 0:
        return 1.0
    return float(math.comb(n + k - 1, k))


def xbase(number, radix, min_length=None):
    """BASE(number, radix, [min_length]): a number 0 ≤ n < 2^53 as text in radix 2–36."""
    n, r = _int(number), _int(radix)
    w = _int(min_length) if min_length is not None and not _empty(min_length) else 0
    if n < 0 or not 2 <= r <= 36 or not 0 <= w <= 255:
        raise _Fail("#NUM!")
    digits = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ"
    out = ""
    while n:
        n, d = divmod(n, r)
        out = digits[d] + out
    return (out or "0").rjust(w, "0")


def xseriessum(x, n, m, coefficients):
    """SERIESSUM(x, n, m, coefficients): sum of a_i·x^(n + i·m) over the coefficients (a
    reference or array of numbers; a non-number there is #VALUE!)."""
    xv, nv, mv = _num(x), _num(n), _num(m)
    a = coefficients.ravel() if isinstance(coefficients, np.ndarray) else [coefficients]
    total = 0.0
    for i, c in enumerate(a):
        if _err(c):
            raise _Fail(str(c))
        if isinstance(c, (bool, np.bool_, str)) or _empty(c):
            raise _Fail("#VALUE!")
        total += float(c) * xv ** (nv + i * mv)
    return total


def xsearch(find_text, within_text, start_num=1):
    """SEARCH(find_text, within_text, [start_num]): the position of the first match at or
    after start_num, ignoring case, with Excel's wildcards (``?``, ``*``, ``~``); #VALUE!
    when there is none or start_num is outside 1..len(within_text)+1."""
    find, within = _text(find_text), _text(within_text)
    start = 1 if _empty(_one(start_num)) else _int(start_num)
    if start < 1 or start > len(within) + 1:
        raise _Fail("#VALUE!")
    if find == "":
        return start
    m = wildcard(find, always=True).search(within, start - 1)
    if m is None:
        raise _Fail("#VALUE!")
    return m.start() + 1


def xrept(text, number_times):
    """REPT(text, number_times): #VALUE! for a negative count; the result at most 32,767
    characters."""
    t, n = _text(text), _int(number_times)
    if n < 0 or len(t) * n > 32767:
        raise _Fail("#VALUE!")
    return t * n


def _numbers(args) -> list[float]:
    """The numbers SUM, PRODUCT and SUMSQ add up: from a reference or an array only its
    numbers (text, logical values and blanks skipped); a value typed as an argument is
    converted (TRUE is 1, "3" is 3, other text is #VALUE!)."""
    from formulas.functions import raise_errors

    raise_errors(args)
    out: list[float] = []
    for a in args:
        if isinstance(a, np.ndarray):
            for v in a.ravel():
                if isinstance(v, (bool, np.bool_, str)) or _empty(v):
                    continue
                out.append(float(v))
        elif not _empty(a):
            out.append(_num(a))
    return out


def xsum(*args):
    """SUM(number1, [number2], …)."""
    try:
        return float(math.fsum(_numbers(args)))
    except _Fail as e:
        return _error(e.code)


def xproduct(*args):
    """PRODUCT(number1, [number2], …): 0 when there is no number."""
    try:
        v = _numbers(args)
    except _Fail as e:
        return _error(e.code)
    return float(np.prod(v)) if v else 0.0


def xsumsq(*args):
    """SUMSQ(number1, [number2], …)."""
    try:
        return float(math.fsum(x * x for x in _numbers(args)))
    except _Fail as e:
        return _error(e.code)


# ---------------------------------------------------------------------------------------
# engineering: number bases.  Negative numbers are 10-digit two's complements; a negative
# result ignores places.


_BASES = {"BIN": 2, "OCT": 8, "DEC": 10, "HEX": 16}
_LIMIT = {2: 512, 8: 536870912, 16: 549755813888}  # 10 digits: the negative half starts here


def _from_base(value, base: int) -> int:
    v = _one(value)
    if isinstance(v, (bool, np.bool_)):
        raise _Fail("#VALUE!")
    t = _text(v).strip().upper() if not isinstance(v, float) else _general_text(v)
    if t == "":
        return 0
    if len(t) > 10:
        raise _Fail("#NUM!")
    try:
        n = int(t, base)
    except ValueError:
        raise _Fail("#NUM!") from None
    if t.startswith("-"):
        raise _Fail("#NUM!")
    full = base**10
    return n - full if len(t) == 10 and n >= full // 2 else n


def _to_base(n: int, base: int, places) -> str:
    lim = _LIMIT[base]
    if not -lim <= n < lim:
        raise _Fail("#NUM!")
    digits = "0123456789ABCDEF"
    if n < 0:
        n += base**10
        out = ""
        for _ in range(10):
            n, d = divmod(n, base)
            out = digits[d] + out
        return out
    out = ""
    while n:
        n, d = divmod(n, base)
        out = digits[d] + out
    out = out or "0"
    if places is not None and not _empty(_one(places)):
        p = int(_num(places))
        if p < len(out):
            raise _Fail("#NUM!")
        out = out.rjust(p, "0")
    return out


def _converter(src: str, dst: str):
    b1, b2 = _BASES[src], _BASES[dst]

    def fn(number, places=None):
        if places is not None and b2 != 10:
            # places is checked first, even for a negative number (whose result is always
            # ten digits) and before the number itself: "E" with places 0 is #NUM!
            p = _num(places)
            if not 1 <= p <= 10 and not (p == 0 and _empty(_one(places))):
                raise _Fail("#NUM!")
        if b1 == 10:
            v = _one(number)
            if isinstance(v, (bool, np.bool_)):
                raise _Fail("#VALUE!")
            n = _num(v)
            if not math.isfinite(n):
                raise _Fail("#NUM!")
            n = int(math.trunc(n))
        else:
            n = _from_base(number, b1)
        if b2 == 10:
            return float(n)
        return _to_base(n, b2, places)

    fn.__name__ = f"x{src.lower()}2{dst.lower()}"
    fn.__doc__ = f"{src}2{dst}(number{'' if b2 == 10 else ', [places]'})"
    return fn


# ---------------------------------------------------------------------------------------
# financial


def _ddb_term(cost, salvage, life, period, factor):
    rate = factor / life
    if rate >= 1.0:
        rate = 1.0
        old = cost if period == 1.0 else 0.0
    else:
        old = cost * (1.0 - rate) ** (period - 1.0)
    new = cost * (1.0 - rate) ** period
    ddb = old - salvage if new < salvage else old - new
    return max(ddb, 0.0)


def _vdb_whole(cost, salvage, life, life1, period, factor):
    """Depreciation over the first *period* periods, switching to straight line when that is
    larger (the last period may be partial)."""
    total, end = 0.0, math.ceil(period)
    value, sln, straight = cost - salvage, 0.0, False
    for i in range(1, int(end) + 1):
        if not straight:
            ddb = _ddb_term(cost, salvage, life, float(i), factor)
            sln = value / (life1 - (i - 1))
            if sln > ddb:
                term, straight = sln, True
            else:
                term = ddb
                value -= ddb
        else:
            term = sln
        if i == end:
            term *= period + 1.0 - end
        total += term
    return total


def xvdb(cost, salvage, life, start_period, end_period, factor=None, no_switch=None):
    """VDB(cost, salvage, life, start_period, end_period, [factor], [no_switch]): declining
    balance at *factor* (default 2) between two periods, partial periods pro rata, switching
    to straight line when that is larger unless no_switch is TRUE."""
    cost, salvage, life = _num(cost), _num(salvage), _num(life)
    start, end = _num(start_period), _num(end_period)
    f = 2.0 if factor is None or _empty(factor) else _num(factor)
    ns = False if no_switch is None or _empty(no_switch) else bool(_num(no_switch))
    if start < 0 or end < start or end > life or cost < 0 or salvage > cost or f <= 0:
        raise _Fail("#NUM!")
    if life <= 0:
        raise _Fail("#NUM!")
    i0, i1 = math.floor(start), math.ceil(end)
    if ns:
        total = 0.0
        for i in range(int(i0) + 1, int(i1) + 1):
            term = _ddb_term(cost, salvage, life, float(i), f)
            if i == i0 + 1:
                term *= min(end, i0 + 1.0) - start
            elif i == i1:
                term *= end + 1.0 - i1
            total += term
        return total
    part = 0.0
    if not math.isclose(start, i0) or not math.isclose(end, i1):
        if not math.isclose(start, i0):
            left = cost - _vdb_whole(cost, salvage, life, life, i0, f)
            part += (start - i0) * _vdb_whole(left, salvage, life, life - i0, 1.0, f)
        if not math.isclose(end, i1):
            left = cost - _vdb_whole(cost, salvage, life, life, i1 - 1.0, f)
            part += (i1 - end) * _vdb_whole(left, salvage, life, life - (i1 - 1.0), 1.0, f)
    rest = cost - _vdb_whole(cost, salvage, life, life, i0, f)
    return _vdb_whole(rest, salvage, life, life - i0, i1 - i0, f) - part


# ---------------------------------------------------------------------------------------
# text


def _text_value(value):
    """The value TEXT formats: a number, or text (logical values as TRUE/FALSE, text that
    does not read as a number as it is)."""
    v = _one(value)
    if isinstance(v, (bool, np.bool_)):
        return _text(v)
    try:
        return _num(v)
    except _Fail:
        if isinstance(v, str):
            return v
        raise


def xtext(value, format_text):
    """TEXT(value, format_text): the value shown in a number format (see numfmt)."""
    fmt = _text(format_text)
    try:
        return format_value(_text_value(value), fmt)
    except FormatError:
        raise _Fail("#VALUE!") from None


def xdollar(number, decimals=None):
    """DOLLAR(number, [decimals]): currency text, ``$#,##0.00`` with negatives in
    parentheses (the United States regional format); decimals default 2, negative rounds
    to the left of the point."""
    x = _num(number)
    d = 2 if decimals is None else _int(decimals)  # omitted: 2; a blank cell: 0
    if d > 127:
        raise _Fail("#VALUE!")
    if d < 0:
        q = 10.0 ** (-d)
        x = math.copysign(math.floor(abs(x) / q + 0.5) * q, x)
        d = 0
    body = "#,##0" + ("." + "0" * d if d else "")
    return format_value(x, f"${body}_);(${body})").rstrip()


def xhyperlink(link_location, friendly_name=None):
    """HYPERLINK(link_location, [friendly_name]): the cell shows the friendly name, else
    the link text."""
    if friendly_name is None:
        return _text(link_location)
    v = _one(friendly_name)
    if _err(v):
        raise _Fail(str(v))
    return 0.0 if _empty(v) else v


# ---------------------------------------------------------------------------------------
# dynamic arrays


def xsequence(rows, columns=None, start=None, step=None):
    """SEQUENCE(rows, [columns], [start], [step]): a rows × columns array counting from start
    (default 1) by step (default 1), row by row."""
    rows, columns, start, step = (
        _one(a) if isinstance(a, np.ndarray) else a for a in (rows, columns, start, step)
    )
    r = _int(rows)
    c = 1 if columns is None or _empty(columns) else _int(columns)
    s = 1.0 if start is None or _empty(start) else _num(start)
    d = 1.0 if step is None or _empty(step) else _num(step)
    if r < 1 or c < 1:
        raise _Fail("#CALC!" if r == 0 or c == 0 else "#VALUE!")
    if r * c > 1_048_576 * 16_384:
        raise _Fail("#NUM!")
    out = np.empty((r, c), dtype=object)
    for i in range(r):
        for j in range(c):
            out[i, j] = s + d * (i * c + j)
    return out


def _array_function(fn):
    """A function some of whose parameters take arrays: arguments handed over as they are."""
    return functools.update_wrapper(_guarded(fn), fn)


# ---------------------------------------------------------------------------------------
# the library's statistics module, without scipy until a function needs it

_SCIPY_PARTS = ("scipy.stats", "scipy.linalg", "scipy.interpolate")


class _Deferred(types.ModuleType):
    """Stands for a scipy module while the library's statistics module is imported: any
    attribute read later (``stats.norm``, ``interp1d(...)``) imports the real module then.
    The library imports scipy's statistics, linear algebra and interpolation at the top of
    that module (about 0.8 s), though only a few distribution and fitting functions use them;
    AVERAGE, MAX or COUNTIF never do."""

    def __getattr__(self, attr):
        if attr.startswith("__"):
            raise AttributeError(attr)
        return getattr(importlib.import_module(self.__name__), attr)


class _DeferredCall:
    """A function of a deferred module (``from scipy.interpolate import interp1d``)."""

    def __init__(self, module: str, name: str):
        self.module, self.name = module, name

    def __call__(self, *args, **kwargs):
        return getattr(importlib.import_module(self.module), self.name)(*args, **kwargs)


def import_statistics() -> None:
    """Import the library's statistics module with scipy's parts deferred to first use."""
    import sys

    if "formulas.functions.stat" in sys.modules:
        return
    missing = [m for m in _SCIPY_PARTS if m not in sys.modules]
    stand_ins = {m: _Deferred(m) for m in missing}
    if "scipy.interpolate" in stand_ins:
        stand_ins["scipy.interpolate"].interp1d = _DeferredCall("scipy.interpolate", "interp1d")
    sys.modules.update(stand_ins)
    try:
        import formulas.functions.stat  # noqa: F401
    finally:
        for m, mod in stand_ins.items():
            if sys.modules.get(m) is mod:
                del sys.modules[m]


# ---------------------------------------------------------------------------------------
# the library's shared helpers, corrected


_PLAIN = frozenset({float, int, bool, str})


def _patch_library() -> None:
    import schedula as sh
    from formulas import functions as lib
    from formulas.errors import FoundError
    from formulas.functions import date as libdate

    original_flatten = lib.flatten
    is_number = lib.is_number

    def numeric_check(check) -> bool:
        return check is is_number or (
            isinstance(check, functools.partial) and check.func is is_number
        )

    def flatten(v, check=is_number, drop_empty=False):
        if type(v) in _PLAIN:  # one value: what the library's flatten does, without its walk
            if not check or check(v):
                yield v
            return
        if type(v) is tuple:  # the values of one call (its error test): each, as the library
            for x in v:
                if type(x) in _PLAIN:
                    if not check or check(x):
                        yield x
                else:
                    yield from flatten(x, check, drop_empty)
            return
        if isinstance(v, np.ndarray) and numeric_check(check):
            inner = check

            def check(x, inner=inner):  # text in a reference or an array is never a number
                return not isinstance(x, str) and inner(x)

            if drop_empty:
                v = v[v != np.array(sh.EMPTY, dtype=object)]
            yield from filter(check, v.ravel())
            return
        yield from original_flatten(v, check, drop_empty)

    import formulas.functions.eng
    import formulas.functions.financial
    import formulas.functions.info
    import formulas.functions.logic
    import formulas.functions.look
    import formulas.functions.math

    import_statistics()
    import formulas.functions.text  # noqa: F401

    for mod in (lib, lib.stat, lib.math, lib.financial, lib.info, lib.logic, lib.look,
                lib.text, lib.eng, libdate):  # fmt: skip
        if getattr(mod, "flatten", None) is original_flatten:
            mod.flatten = flatten

    original_nan = lib.convert_nan

    def convert_nan(value, *default):
        # the library's test of every elementwise result: a plain float is finite exactly
        # when x - x is 0 (inf - inf and nan - nan are nan), without a numpy call per value
        if type(value) is float and not default:
            return value if value - value == 0.0 else _error("#NUM!")
        return original_nan(value, *default)

    if lib.convert_nan is original_nan:
        lib.convert_nan = convert_nan

    original_parse = libdate._text2datetime

    def text2datetime(date_text):
        t = str(date_text).strip()
        try:
            float(t)
        except ValueError:
            pass
        else:
            raise FoundError(err=_error("#VALUE!"))  # a bare number is not a date
        out = original_parse(date_text)
        if not 1900 <= out[0] <= 9999:
            raise FoundError(err=_error("#VALUE!"))
        return out

    libdate._text2datetime = text2datetime


def _reads_as_number(t: str) -> bool:
    try:
        float(t)
    except ValueError:
        return False
    return True


def wildcard(pattern: str, always: bool = False):
    """The test of Excel's wildcard pattern [1]_ (``?`` one character, ``*`` any run, ``~``
    before either or before ``~`` takes it literally) against a whole text, ignoring case;
    None when the pattern holds no wildcard.

    .. [1] Excel's function reference: COUNTIF, MATCH, SEARCH ("use the wildcard
       characters"); criteria compare text without regard to case.  With *always*, the test
       of a pattern without wildcards too (its ``~`` escapes read)."""
    out, wild, i = [], False, 0
    while i < len(pattern):
        ch = pattern[i]
        if ch == "~" and i + 1 < len(pattern) and pattern[i + 1] in "?*~":
            out.append(re.escape(pattern[i + 1]))
            i += 2
            continue
        if ch in "?*":
            wild = True
            out.append("." if ch == "?" else ".*")
        else:
            out.append(re.escape(ch))
        i += 1
    if not wild and not always:
        return None
    return re.compile("".join(out), re.IGNORECASE | re.DOTALL)


def _criteria_not_equal(criteria):
    """Excel's criteria where the library differs: ``"<>x"`` is the complement of ``"=x"``
    (it matches blanks, logical values and numbers too: COUNTIF(A1:A4,"<>abc") counts every
    cell that is not "abc"); ``"<>"`` is not blank and ``"="`` is blank; a comparison with a
    number (``">2"``) matches numbers only, never text that looks like one."""

    def test(test_range, condition):
        if condition == "<>":  # not blank
            raw = np.asarray(test_range["raw"], dtype=object)
            return np.vectorize(lambda v: not (isinstance(v, str) and v == ""), otypes=[bool])(raw)
        if condition == "=":  # blank (or empty text)
            raw = np.asarray(test_range["raw"], dtype=object)
            return np.vectorize(lambda v: isinstance(v, str) and v == "", otypes=[bool])(raw)
        if isinstance(condition, str) and condition.startswith("<>"):
            return ~np.asarray(test(test_range, "=" + condition[2:]), dtype=bool)
        if isinstance(condition, str) and condition[:1] not in "<>":
            match = wildcard(condition[1:] if condition[:1] == "=" else condition)
            if match is not None:  # the whole text, any case (the library: its start, case)
                raw = np.asarray(test_range["raw"], dtype=object)
                return np.vectorize(
                    lambda v: isinstance(v, str) and match.fullmatch(v) is not None, otypes=[bool]
                )(raw)
        b = criteria(test_range, condition)
        if (
            isinstance(condition, str)
            and condition[:1] in "<>"
            and _reads_as_number(condition.lstrip("<>="))
        ):
            # a comparison with a number matches numbers only: "3.5" stored as text is not
            # counted by COUNTIF(A1:A9,">2") (an equality criterion does match it)
            raw = np.asarray(test_range["raw"], dtype=object)
            b = np.asarray(b, dtype=bool) & ~np.vectorize(
                lambda v: isinstance(v, str), otypes=[bool]
            )(raw)
        return b

    return test


def install(table: dict) -> None:
    """Put the functions of this module into the library's function *table*."""
    from formulas.functions import wrap_func

    _patch_library()
    import formulas.functions as library_functions

    key = "__xfilter"
    library_functions.__dict__[key] = _criteria_not_equal(library_functions.__dict__[key])

    def put(name: str, fn, prefixed: bool = False) -> None:
        table[name] = wrap_func(fn)
        if prefixed:
            table["_XLFN." + name] = table[name]

    put("TYPE", xtype)
    put("SUM", xsum)
    put("PRODUCT", xproduct)
    put("SUMSQ", xsumsq)
    for name, fn in (("CEILING.MATH", xceiling_math), ("FLOOR.MATH", xfloor_math)):
        put(name, _scalar_function(fn), prefixed=True)
    put("QUOTIENT", _scalar_function(xquotient))
    put("COMBIN", _scalar_function(xcombin))
    put("COMBINA", _scalar_function(xcombina), prefixed=True)
    put("BASE", _scalar_function(xbase), prefixed=True)
    put("REPT", _scalar_function(xrept))
    put("SEARCH", _scalar_function(xsearch))
    put("SERIESSUM", _array_function(xseriessum))
    for src in _BASES:
        for dst in _BASES:
            if src != dst and "DEC" in (src, dst) or src != dst and "DEC" not in (src, dst):
                put(f"{src}2{dst}", _scalar_function(_converter(src, dst)))
    put("VDB", _scalar_function(xvdb))
    put("TEXT", _scalar_function(xtext))
    put("DOLLAR", _scalar_function(xdollar))
    put("HYPERLINK", _scalar_function(xhyperlink))
    put("SEQUENCE", _array_function(xsequence), prefixed=True)
