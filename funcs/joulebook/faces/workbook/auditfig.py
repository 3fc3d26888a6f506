"""The audit's figures: P–V paths and T–s paths with the saturation dome, as inline SVG.

What to draw comes from the catalog entry's working (``curve``: P as an expression of V;
``figure``: ``"path"`` for the end-state solver, ``"points"`` for measured P–V data); the axes
are in the units the calling cell works in.  The plots are line charts, drawn here as SVG
(axes with round-number ticks, a grid, the path with an arrow, a shaded area, an inset): no
plotting library is imported, so an audit costs little more than a check.  Every text is
escaped.
"""

from __future__ import annotations

import html
import math
import re

import numpy as np

from joulebook.core.errors import JoulebookError
from joulebook.core.working import Working, evaluate

__all__ = ["figure", "pretty_unit", "Panel"]

_BLUE, _FILL, _RED, _GREY = "#1d5c7a", "#8fc1d4", "#a3432b", "#999999"


def pretty_unit(u: str) -> str:
    """``m3`` → ``m³``, ``kJ/(kg*K)`` → ``kJ/(kg·K)``: one spelling of a unit in the report."""
    if not u:
        return u
    u = u.replace("*", "·")
    u = re.sub(r"(?<=[A-Za-z])3\b", "³", u)
    u = re.sub(r"(?<=[A-Za-z])2\b", "²", u)
    return u


def _e(x) -> str:
    return html.escape(str(x), quote=True)


def _ticks(lo: float, hi: float, n: int = 5) -> list[float]:
    """Round-number ticks (1, 2, 5 × 10^k) covering [lo, hi]."""
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        return [lo]
    raw = (hi - lo) / n
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    k0, k1 = math.ceil(lo / step - 1e-9), math.floor(hi / step + 1e-9)
    if not 0 <= k1 - k0 <= 4 * n:  # a span too small for the numbers' own precision
        return [lo, hi]
    return [0.0 if k == 0 else k * step for k in range(k0, k1 + 1)]


def _label(v: float) -> str:
    return f"{v:.6g}"


class Panel:
    """One plot area of a figure: data ranges, axes, and the marks drawn on it.

    Parameters
    ----------
    x, y : float
        Top-left corner of the panel in the figure (px).
    w, h : float
        Size of the panel, axes labels included (px).
    """

    def __init__(self, x: float, y: float, w: float, h: float, small: bool = False):
        self.x, self.y, self.w, self.h, self.small = x, y, w, h, small
        pad = (4, 4, 4, 4) if small else (58, 12, 24, 40)  # left, right, top, bottom
        self.ax, self.ay = x + pad[0], y + pad[2]
        self.aw, self.ah = w - pad[0] - pad[1], h - pad[2] - pad[3]
        self.parts: list[str] = []
        self.xlim = self.ylim = (0.0, 1.0)
        self.title = self.xlabel = self.ylabel = ""

    def limits(self, xs, ys, margin: float = 0.04, ybottom: float | None = None) -> None:
        """Set the data ranges to hold *xs* and *ys* (with a margin), ticks rounded."""
        x0, x1 = float(np.min(xs)), float(np.max(xs))
        y0, y1 = float(np.min(ys)), float(np.max(ys))
        if ybottom is not None:
            y0 = min(y0, ybottom)
        for lo, hi, attr in ((x0, x1, "xlim"), (y0, y1, "ylim")):
            span = hi - lo
            if span <= 1e-9 * max(abs(lo), abs(hi)):  # one value (a rigid path): show ±5 %
                lo = hi = (lo + hi) / 2
                span = 0.1 * abs(hi) or 1.0
                lo, hi = lo - span / 2, hi + span / 2
            lo2 = lo - margin * span if not (attr == "ylim" and ybottom is not None) else lo
            setattr(self, attr, (lo2, hi + margin * span))

    def px(self, xv, yv):
        (x0, x1), (y0, y1) = self.xlim, self.ylim
        X = self.ax + (np.asarray(xv, dtype=float) - x0) / (x1 - x0) * self.aw
        Y = self.ay + self.ah - (np.asarray(yv, dtype=float) - y0) / (y1 - y0) * self.ah
        return X, Y

    def line(self, xs, ys, color: str, width: float = 1.8, arrow: bool = False, dots=False):
        X, Y = self.px(xs, ys)
        pts = " ".join(f"{a:.1f},{b:.1f}" for a, b in zip(X, Y))
        end = ' marker-end="url(#jb-arrow)"' if arrow else ""
        self.parts.append(
            f'<polyline points="{pts}" fill="none" stroke="{color}" stroke-width="{width}"'
            f' stroke-linejoin="round"{end}/>'
        )
        if dots:
            for a, b in zip(X, Y):
                self.parts.append(f'<circle cx="{a:.1f}" cy="{b:.1f}" r="2.2" fill="{color}"/>')

    def area(self, xs, ys, base: float | None = 0.0):
        """Shade between the curve and *base* (None: the closed polygon of the points)."""
        X, Y = self.px(xs, ys)
        pts = [f"{a:.1f},{b:.1f}" for a, b in zip(X, Y)]
        if base is not None:
            _, yb = self.px([xs[-1], xs[0]], [base, base])
            pts += [f"{X[-1]:.1f},{yb[0]:.1f}", f"{X[0]:.1f},{yb[1]:.1f}"]
        self.parts.append(
            f'<polygon points="{" ".join(pts)}" fill="{_FILL}" fill-opacity="0.45" stroke="none"/>'
        )

    def render(self, cid: str, arrow: str) -> str:
        """The panel as SVG; *cid* names its clip path, *arrow* the arrow marker."""
        out = [
            f'<clipPath id="{cid}"><rect x="{self.ax:.1f}" y="{self.ay:.1f}" '
            f'width="{self.aw:.1f}" height="{self.ah:.1f}"/></clipPath>',
            f'<rect x="{self.ax:.1f}" y="{self.ay:.1f}" width="{self.aw:.1f}" '
            f'height="{self.ah:.1f}" fill="#ffffff" stroke="#555555" stroke-width="0.8"/>',
        ]
        if not self.small:
            for t in _ticks(*self.xlim):
                X, _ = self.px([t], [self.ylim[0]])
                out.append(
                    f'<line x1="{X[0]:.1f}" y1="{self.ay:.1f}" x2="{X[0]:.1f}" '
                    f'y2="{self.ay + self.ah:.1f}" stroke="#dddddd" stroke-width="0.6"/>'
                    f'<text x="{X[0]:.1f}" y="{self.ay + self.ah + 13:.1f}" font-size="9.5" '
                    f'text-anchor="middle">{_e(_label(t))}</text>'
                )
            for t in _ticks(*self.ylim):
                _, Y = self.px([self.xlim[0]], [t])
                out.append(
                    f'<line x1="{self.ax:.1f}" y1="{Y[0]:.1f}" x2="{self.ax + self.aw:.1f}" '
                    f'y2="{Y[0]:.1f}" stroke="#dddddd" stroke-width="0.6"/>'
                    f'<text x="{self.ax - 4:.1f}" y="{Y[0] + 3:.1f}" font-size="9.5" '
                    f'text-anchor="end">{_e(_label(t))}</text>'
                )
            out.append(
                f'<text x="{self.ax + self.aw / 2:.1f}" y="{self.y + self.h - 6:.1f}" '
                f'font-size="10.5" text-anchor="middle">{_e(self.xlabel)}</text>'
                f'<text transform="translate({self.x + 12:.1f},{self.ay + self.ah / 2:.1f}) '
                f'rotate(-90)" font-size="10.5" text-anchor="middle">{_e(self.ylabel)}</text>'
                f'<text x="{self.ax + self.aw / 2:.1f}" y="{self.y + 14:.1f}" font-size="9.5" '
                f'text-anchor="middle">{_e(self.title)}</text>'
            )
        marks = "".join(self.parts).replace("url(#jb-arrow)", f"url(#{arrow})")
        out.append(f'<g clip-path="url(#{cid})">{marks}</g>')
        return "".join(out)


def _svg(panels: list[Panel], width: float, height: float, label: str) -> str:
    """Panels as one SVG; its ids are unique to its content, so many figures can share a page."""
    import hashlib

    uid = hashlib.sha256("".join("".join(p.parts) for p in panels).encode()).hexdigest()[:10]
    arrow = f"jb-arrow-{uid}"
    head = (
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width:.0f}" height="{height:.0f}" '
        f'viewBox="0 0 {width:.0f} {height:.0f}" role="img" aria-label="{_e(label)}" '
        'font-family="DejaVu Sans, sans-serif">'
        f'<defs><marker id="{arrow}" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" '
        f'markerHeight="7" orient="auto-start-reverse"><path d="M0,0L10,5L0,10z" fill="{_BLUE}"/>'
        "</marker></defs>"
    )
    body = [p.render(f"jb-clip-{uid}-{i}", arrow) for i, p in enumerate(panels)]
    return head + "".join(body) + "</svg>"


def figure(w: Working, si: dict, system, call) -> str:
    """The figure of one call: *si* its arguments (numbers with a quantity in SI), *system*
    the calling cell's unit system (the axes' units), *call* the catalog call path."""
    try:
        if w.figure == "path":
            return _path(si, system)
        if w.figure == "points":
            return _points(si, system)
        if w.curve:
            return _curve(w, si, system, call)
    except (JoulebookError, KeyError, TypeError, ValueError, ZeroDivisionError, ArithmeticError):
        return ""
    return ""


def _axis(system, kind: str) -> tuple:
    conv = system.conv(kind)
    return conv, pretty_unit(system.unit(kind))


def _panel(x: float = 0.0, w: float = 380.0) -> Panel:
    return Panel(x, 0.0, w, 280.0)


def _pv(p: Panel, V, P, units) -> None:
    V, P = np.asarray(V, dtype=float), np.asarray(P, dtype=float)
    span, top = float(np.ptp(P)), float(np.max(np.abs(P)))
    zoomed = 0 < span < 0.2 * top  # a short path: zoom to it
    p.limits(V, P, ybottom=None if zoomed else 0.0)
    if not zoomed and float(np.min(P)) >= 0:
        p.ylim = (0.0, p.ylim[1])
    if float(np.ptp(V)) > 1e-9 * float(np.max(np.abs(V))):  # no area under a rigid path
        p.area(V, P, base=p.ylim[0])
    p.line(V, P, _BLUE, arrow=len(V) > 1)
    p.xlabel, p.ylabel = f"V [{units[0]}]", f"P [{units[1]}]"
    p.title = "P–V path" + (" (zoomed)" if zoomed else "") + "; shaded area = boundary work"


def _curve(w: Working, si: dict, system, call) -> str:
    V1, V2 = si["V_1"], si["V_2"]
    V = np.linspace(V1, V2, 60)
    vals = dict(si)
    for st in w.steps:
        vals[st.symbol] = evaluate(st.expr, vals, call)
    vals["V"] = V
    P = evaluate(w.curve, vals, call)
    P = np.full_like(V, P) if np.ndim(P) == 0 else np.asarray(P, dtype=float)
    if not np.all(np.isfinite(P)):
        return ""
    cv, uv = _axis(system, "volume")
    cp, up = _axis(system, "pressure")
    p = _panel()
    _pv(p, cv.from_si(V), cp.from_si(P), (uv, up))
    return _svg([p], 380, 280, "P–V path")


def _points(si: dict, system) -> str:
    P, V = si.get("P_values"), si.get("V_values")
    if not isinstance(P, list) or not isinstance(V, list) or len(P) != len(V) or len(P) < 2:
        return ""
    cv, uv = _axis(system, "volume")
    cp, up = _axis(system, "pressure")
    x, y = cv.from_si(np.array(V)), cp.from_si(np.array(P))
    p = _panel()
    p.limits(x, y)
    # a closed record (last point back at the first) encloses the net work; an open branch
    # encloses nothing
    closed = abs(x[-1] - x[0]) <= 0.02 * (np.ptp(x) or 1) and abs(y[-1] - y[0]) <= 0.02 * (
        np.ptp(y) or 1
    )
    if closed:
        p.area(x, y, base=None)
    p.line(x, y, _BLUE, width=1.4, dots=True)
    p.xlabel, p.ylabel = f"V [{uv}]", f"P [{up}]"
    p.title = "measured P–V points" + ("; enclosed area = net work" if closed else "")
    return _svg([p], 380, 280, "measured P–V points")


def _path(si: dict, system) -> str:
    from joulebook.catalog.adapters import _solved
    from joulebook.core.processes.solve import path_points

    med, res = _solved(
        si["state1"], si["path"], si["end_spec"], si["end_value"], si.get("mass"), system
    )
    pts = path_points(med, res, 41)
    cv, uv = _axis(system, "volume")
    cp, up = _axis(system, "pressure")
    ct, ut = _axis(system, "temperature")
    cs, us = _axis(system, "specific_entropy")
    V = cv.from_si(np.array([res.m * p.v for p in pts]))
    P = cp.from_si(np.array([p.P for p in pts]))
    left = _panel()
    _pv(left, V, P, (uv, up))
    if med.ideal:
        return _svg([left], 380, 280, "P–V path")
    T = ct.from_si(np.array([p.T for p in pts]))
    s = cs.from_si(np.array([p.s for p in pts]))
    panels = [left] + _ts(med, T, s, ct, cs, (us, ut))
    return _svg(panels, 760, 280, "P–V and T–s paths")


def _ts(med, T, s, ct, cs, units) -> list[Panel]:
    from joulebook.core.substances.fluids import saturation

    info = med.info
    lo = info.T_triple * 1.001 if info.T_triple > 0 else info.T_min
    Ts = np.linspace(lo, info.T_crit * 0.9999, 80)
    dome = None
    try:
        sf = [saturation(info.name, "T", t, "sf") for t in Ts]
        sg = [saturation(info.name, "T", t, "sg") for t in Ts]
        dome = (cs.from_si(np.array(sf + sg[::-1])), ct.from_si(np.concatenate([Ts, Ts[::-1]])))
    except JoulebookError:
        pass
    p = _panel(380.0)
    p.xlabel, p.ylabel = f"s [{units[0]}]", f"T [{units[1]}]"
    if dome is None:
        p.limits(s, T)
        p.line(s, T, _RED)
        p.title = "T–s path"
        return [p]
    # the path is short when it would fill little of a view holding both it and the dome
    ds = float(max(np.max(s), np.max(dome[0])) - min(np.min(s), np.min(dome[0]))) or 1.0
    dT = float(max(np.max(T), np.max(dome[1])) - min(np.min(T), np.min(dome[1]))) or 1.0
    short = np.ptp(s) < 0.25 * ds or np.ptp(T) < 0.25 * dT
    if not short:
        p.limits(np.concatenate([s, dome[0]]), np.concatenate([T, dome[1]]))
        p.line(*dome, _GREY, width=1.0)
        p.line(s, T, _RED)
        p.title = "T–s path with saturation dome"
        return [p]
    # a short path: zoom to it, the whole dome in an inset with the path marked
    ms, mT = max(np.ptp(s), 0.02 * ds), max(np.ptp(T), 0.02 * dT)
    p.limits(
        [np.min(s) - 0.3 * ms, np.max(s) + 0.3 * ms],
        [np.min(T) - 0.3 * mT, np.max(T) + 0.3 * mT],
        0,
    )
    p.line(*dome, _GREY, width=1.0)
    p.line(s, T, _RED)
    p.title = "T–s path (zoomed; inset: the dome)"
    ins = Panel(p.ax + 0.62 * p.aw, p.ay + 0.58 * p.ah, 0.36 * p.aw, 0.38 * p.ah, small=True)
    ins.limits(np.concatenate([s, dome[0]]), np.concatenate([T, dome[1]]))
    ins.line(*dome, _GREY, width=0.8)
    ins.line(s, T, _RED, width=2.5)
    return [p, ins]
