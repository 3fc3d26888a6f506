"""Small, dependable one-dimensional root finding (bracketing only, never extrapolating)."""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

from .errors import NoConvergence

__all__ = ["brent", "golden_min", "scan_roots"]


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
    r"""Brent's method on a bracket ``[a, b]`` with ``f(a)·f(b) ≤ 0``.

    Inverse quadratic interpolation and the secant step where they stay inside the bracket,
    bisection otherwise, so the bracket shrinks every step:

    .. math:: f(x^*) = 0, \qquad |x - x^*| \le \mathrm{xtol} + \mathrm{rtol}\,|x|

    Parameters
    ----------
    f : callable
        A function of one float (in whatever unit *a* and *b* are in).
    a, b : float
        The bracket's ends.
    fa, fb : float, optional
        ``f(a)`` and ``f(b)`` when already known (saves two calls).
    xtol : float
        Absolute tolerance on the root.
    rtol : float
        Relative tolerance on the root.
    maxiter : int
        Iterations before giving up.
    what : str
        What is being solved, for the messages.

    Returns
    -------
    float
        The root.

    Raises
    ------
    NoConvergence
        No bracket (same signs at both ends) or no convergence within *maxiter*.

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall,
       1973, ch. 4.

    Examples
    --------
    >>> round(brent(lambda x: x * x - 2.0, 0.0, 2.0), 12)
    1.414213562373
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

    Points where *f* fails (raises ``ValueError`` or returns NaN) are skipped.  Two roots
    closer together than the grid's spacing leave no sign change; where three neighbouring
    points have one sign and the middle one is nearest zero, the extremum between them is
    found by golden-section search, and if *f* changes sign there both roots are kept.

    Parameters
    ----------
    f : callable
        A function of one float.
    grid : sequence of float
        Increasing points to scan.
    what : str
        What is being solved, for the messages.
    xtol : float
        Absolute tolerance of each root.

    Returns
    -------
    list of float
        The roots in increasing order (empty when there is none).

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall,
       1973, ch. 4.
    .. [2] J. Kiefer, "Sequential minimax search for a maximum", Proc. Amer. Math. Soc. 4
       (1953) 502–506.

    Examples
    --------
    >>> [round(r, 9) for r in scan_roots(lambda x: (x - 1.0) * (x - 3.0), [0.0, 2.0, 4.0])]
    [1.0, 3.0]
    """
    roots: list[float] = []
    pts: list[tuple[float, float] | None] = []
    prev_x = prev_f = None

    def value(t: float) -> float:
        try:
            return f(t)
        except ValueError:
            return float("nan")

    last = None  # the last point, valid or not
    for x in grid:
        fx = value(x)
        if (fx != fx) != (last is None or last[1] != last[1]) and last is not None:
            # the edge of where f is defined lies between the last point and this one: a
            # root may sit between the last valid point and that edge
            good, bad = (last, (x, fx)) if fx != fx else ((x, fx), last)
            lo, hi = good[0], bad[0]
            for _ in range(40):
                mid = 0.5 * (lo + hi)
                fm = value(mid)
                if fm != fm:
                    hi = mid
                else:
                    lo, fl = mid, fm
                    if (fl > 0) != (good[1] > 0) and good[1] != 0.0:
                        roots.append(brent(f, good[0], mid, good[1], fl, xtol=xtol, what=what))
                        break
        last = (x, fx)
        if fx != fx:  # NaN
            prev_x = prev_f = None
            pts.append(None)
            continue
        pts.append((x, fx))
        if fx == 0.0:
            roots.append(x)
        elif prev_f is not None and prev_f != 0.0 and (prev_f > 0) != (fx > 0):
            roots.append(brent(f, prev_x, x, prev_f, fx, xtol=xtol, what=what))
        prev_x, prev_f = x, fx
    for i in range(1, len(pts) - 1):
        a, m, b = pts[i - 1], pts[i], pts[i + 1]
        if a is None or m is None or b is None:
            continue
        if not ((a[1] > 0) == (m[1] > 0) == (b[1] > 0)) or abs(m[1]) >= min(abs(a[1]), abs(b[1])):
            continue
        sign = 1.0 if m[1] > 0 else -1.0
        try:
            xm, fm = golden_min(lambda t, sign=sign: sign * f(t), a[0], b[0], stop_below=0.0)
        except ValueError:
            continue
        if fm == fm and sign * fm < 0:  # f crosses zero twice between a and b
            fm = sign * fm
            roots.append(brent(f, a[0], xm, a[1], fm, xtol=xtol, what=what))
            roots.append(brent(f, xm, b[0], fm, b[1], xtol=xtol, what=what))
    return sorted(roots)


def golden_min(
    g: Callable[[float], float],
    a: float,
    b: float,
    iters: int = 60,
    stop_below: float | None = None,
):
    """The minimum of *g* on [a, b] by golden-section search.

    Each step keeps the part of the interval that holds the smaller value, shrinking it by
    the golden ratio r = (√5 − 1)/2.

    Parameters
    ----------
    g : callable
        A function of one float, unimodal on [a, b].
    a, b : float
        The interval.
    iters : int
        Number of steps (the interval shrinks by r each).
    stop_below : float, optional
        Stop as soon as a value under it is found.

    Returns
    -------
    tuple of float
        ``(x, g(x))`` at the smallest value found.

    References
    ----------
    .. [1] J. Kiefer, "Sequential minimax search for a maximum", Proc. Amer. Math. Soc. 4
       (1953) 502–506.

    Examples
    --------
    >>> x, gx = golden_min(lambda x: (x - 2.0) ** 2, 0.0, 5.0)
    >>> round(x, 6), round(gx, 12)
    (2.0, 0.0)
    """
    r = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - r * (b - a), a + r * (b - a)
    gc, gd = g(c), g(d)
    for _ in range(iters):
        if gc < gd:
            b, d, gd = d, c, gc
            c = b - r * (b - a)
            gc = g(c)
        else:
            a, c, gc = c, d, gd
            d = a + r * (b - a)
            gd = g(d)
        if stop_below is not None and min(gc, gd) < stop_below:
            break
    return (c, gc) if gc < gd else (d, gd)
