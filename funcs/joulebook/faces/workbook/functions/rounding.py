"""MROUND and IPMT where the formula library differs from Excel.

- ``MROUND(number, multiple)``: a midpoint rounds away from zero (``MROUND(2.5,1)`` is 3,
  ``MROUND(-2.5,-1)`` is -3), the quotient read to 15 significant digits first; signs that
  differ are ``#NUM!``; a multiple of 0 gives 0 [1]_.
- ``IPMT(rate, per, nper, pv, [fv], [type])``: the interest part of a payment for any sign
  of the present value (the library refuses a negative one) [1]_ [2]_:
  ``IPMT = rate · FV(rate, per-1, PMT, pv)`` for payments at the end of a period, and
  ``rate · (FV(rate, per-2, PMT, pv, 1) - PMT)`` (0 in the first period) at the start.

References
----------
.. [1] Excel's function reference (MROUND, IPMT, PMT, FV) — common practice.
.. [2] ECMA-376 Part 1, §18.17.7 (IPMT, PMT and FV formulas).

Examples
--------
>>> mround(2.5, 1), mround(-2.5, -1), mround(7.5, 5)
(3.0, -3.0, 10.0)
>>> ipmt(0.01, 1, 12, -1000)
10.0
"""

from __future__ import annotations

import math

__all__ = ["install", "ipmt", "mround"]


def mround(number: float, multiple: float):
    """Excel's MROUND; an error code (text) where Excel gives one."""
    if multiple == 0:
        return 0.0
    if number != 0 and (number > 0) != (multiple > 0):
        return "#NUM!"
    q = float(f"{number / multiple:.15g}")
    n = math.floor(abs(q) + 0.5)
    return math.copysign(n, q) * multiple if n else 0.0


def _pmt(rate, nper, pv, fv, kind):
    if rate == 0:
        return -(pv + fv) / nper
    g = (1 + rate) ** nper
    return -(rate * (pv * g + fv)) / ((1 + rate * kind) * (g - 1))


def _fv(rate, n, pmt, pv, kind):
    if rate == 0:
        return -(pv + pmt * n)
    g = (1 + rate) ** n
    return -(pv * g + pmt * (1 + rate * kind) * (g - 1) / rate)


def ipmt(rate: float, per: float, nper: float, pv: float, fv: float = 0.0, kind: float = 0.0):
    """Excel's IPMT; an error code (text) where Excel gives one."""
    kind = 1.0 if kind else 0.0
    if nper == 0 or not 1 <= per <= nper:
        return "#NUM!"
    try:
        pmt = _pmt(rate, nper, pv, fv, kind)
        if kind:
            if per < 2:
                return 0.0
            r = (_fv(rate, per - 2, pmt, pv, 1.0) - pmt) * rate
        else:
            r = _fv(rate, per - 1, pmt, pv, 0.0) * rate
    except (OverflowError, ZeroDivisionError):
        return "#NUM!"
    return r if math.isfinite(r) else "#NUM!"


def install(table: dict) -> None:
    """Put MROUND and IPMT into the formula library's function *table*."""
    from formulas.functions import Error, wrap_ufunc

    def coded(fn):
        def run(*args):
            r = fn(*args)
            return Error.errors[r] if isinstance(r, str) else r

        return run

    table["MROUND"] = wrap_ufunc(coded(mround))
    table["IPMT"] = wrap_ufunc(coded(ipmt))
