"""Small, dependable one-dimensional root finding (bracketing only, never extrapolating)."""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

from .errors import NoConvergence

__all__ = ["brent", "scan_roots"]


def brent(
    f: Callable[[float], float],
    a: float,
    b: float,
    fa: float | None = None,
    fb: float | None = None,
    xtol: float = 1e-13,
    rtol: float = 4e-16,
    maxiter: int = 200,
    what: str = "root",
) -> float:
    """Brent's method on a bracket ``[a, b]`` with ``f(a)·f(b) ≤ 0``.

    References
    ----------
    R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall, 1973, ch. 4.
    """
    fa = f(a) if fa is None else fa
    fb = f(b) if fb is None else fb
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if (fa > 0) == (fb > 0):
        raise NoConvergence(f"{what}: the interval does not bracket a solution")
    c, fc = a, fa
    d = e = b - a
    for _ in range(maxiter):
        if (fb > 0) == (fc > 0):
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 2.0 * rtol * abs(b) + 0.5 * xtol
        m = 0.5 * (c - b)
        if abs(m) <= tol or fb == 0.0:
            return b
        if abs(e) >= tol and abs(fa) > abs(fb):
            s = fb / fa
            if a == c:
                p, q = 2.0 * m * s, 1.0 - s
            else:
                q, r = fa / fc, fb / fc
                p = s * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0))
                q = (q - 1.0) * (r - 1.0) * (s - 1.0)
            if p > 0:
                q = -q
            p = abs(p)
            if 2.0 * p < min(3.0 * m * q - abs(tol * q), abs(e * q)):
                e, d = d, p / q
            else:
                d = e = m
        else:
            d = e = m
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, m)
        fb = f(b)
    raise NoConvergence(f"{what}: no convergence after {maxiter} iterations")


def scan_roots(
    f: Callable[[float], float],
    grid: Sequence[float],
    what: str = "root",
    xtol: float = 1e-13,
) -> list[float]:
    """All roots of *f* found by sign changes on *grid*, each polished with :func:`brent`.

    Points where *f* fails (raises ``ValueError`` or returns NaN) are skipped.
    """
    roots: list[float] = []
    prev_x = prev_f = None
    for x in grid:
        try:
            fx = f(x)
        except ValueError:
            prev_x = prev_f = None
            continue
        if fx != fx:  # NaN
            prev_x = prev_f = None
            continue
        if fx == 0.0:
            roots.append(x)
        elif prev_f is not None and prev_f != 0.0 and (prev_f > 0) != (fx > 0):
            roots.append(brent(f, prev_x, x, prev_f, fx, xtol=xtol, what=what))
        prev_x, prev_f = x, fx
    return roots
