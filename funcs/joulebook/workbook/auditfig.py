"""The audit's figures: P–V paths and T–s paths with the saturation dome, as inline SVG.

What to draw comes from the catalog entry's working (``curve``: P as an expression of V;
``figure``: ``"path"`` for the end-state solver, ``"points"`` for measured P–V data); the axes
are in the units the calling cell works in.  matplotlib is imported only when a figure is
drawn; each distinct figure is drawn once (the audit refers back to the first).
"""

from __future__ import annotations

import io
import re

import numpy as np

from ..errors import JoulebookError
from ..working import Working, evaluate

__all__ = ["figure", "pretty_unit"]


def pretty_unit(u: str) -> str:
    """``m3`` → ``m³``, ``kJ/(kg*K)`` → ``kJ/(kg·K)``: one spelling of a unit in the report."""
    if not u:
        return u
    u = u.replace("*", "·")
    u = re.sub(r"(?<=[A-Za-z])3\b", "³", u)
    u = re.sub(r"(?<=[A-Za-z])2\b", "²", u)
    return u


def _new(ncols: int = 1, width: float = 3.8):
    """A bare matplotlib figure and its axes (no pyplot: no GUI state, a lighter import)."""
    import matplotlib

    matplotlib.rcParams["svg.fonttype"] = "none"
    matplotlib.rcParams["svg.hashsalt"] = "joulebook"  # the same figure gives the same SVG
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, 2.8))
    return fig, fig.subplots(1, ncols)


def _svg(fig) -> str:
    buf = io.StringIO()
    fig.savefig(buf, format="svg", bbox_inches="tight", metadata={"Date": None})
    text = buf.getvalue()
    text = re.sub(r"<metadata>.*?</metadata>", "", text, flags=re.DOTALL)  # no dates or URIs
    return text[text.index("<svg") :]


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


def _curve(w: Working, si: dict, system, call) -> str:
    V1, V2 = si["V_1"], si["V_2"]
    V = np.linspace(V1, V2, 60)
    vals = dict(si)
    for st in w.steps:
        vals[st.symbol] = evaluate(st.expr, vals, call)
    vals["V"] = V
    P = evaluate(w.curve, vals, call)
    P = np.full_like(V, P) if np.ndim(P) == 0 else np.asarray(P, dtype=float)
    fig, ax = _new()
    cv, uv = _axis(system, "volume")
    cp, up = _axis(system, "pressure")
    _pv(ax, cv.from_si(V), cp.from_si(P), (uv, up))
    return _svg(fig)


def _points(si: dict, system) -> str:
    P, V = si.get("P_values"), si.get("V_values")
    if not isinstance(P, list) or not isinstance(V, list) or len(P) != len(V) or len(P) < 2:
        return ""
    cv, uv = _axis(system, "volume")
    cp, up = _axis(system, "pressure")
    fig, ax = _new()
    x, y = cv.from_si(np.array(V)), cp.from_si(np.array(P))
    ax.plot(x, y, "o-", color="#1d5c7a", ms=3, lw=1.4)
    ax.fill(x, y, color="#8fc1d4", alpha=0.45, lw=0)
    ax.set_xlabel(f"V [{uv}]")
    ax.set_ylabel(f"P [{up}]")
    ax.set_title("measured P–V points; enclosed area = net work", fontsize=8)
    ax.grid(alpha=0.3)
    return _svg(fig)


def _path(si: dict, system) -> str:
    from ..formulas import _solved
    from ..processes.solve import path_points

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
    T = ct.from_si(np.array([p.T for p in pts]))
    s = cs.from_si(np.array([p.s for p in pts]))
    fig, axes = _new(1 if med.ideal else 2, 3.8 if med.ideal else 7.2)
    ax = axes if med.ideal else axes[0]
    _pv(ax, V, P, (uv, up))
    if not med.ideal:
        _ts(axes[1], med, T, s, ct, cs, (us, ut))
    fig.tight_layout()
    return _svg(fig)


def _pv(ax, V, P, units) -> None:
    ax.plot(V, P, color="#1d5c7a", lw=1.8)
    ax.fill_between(V, 0, P, color="#8fc1d4", alpha=0.45, lw=0)
    if len(V) > 1:
        ax.annotate(
            "",
            xy=(V[-1], P[-1]),
            xytext=(V[-2], P[-2]),
            arrowprops=dict(arrowstyle="->", color="#1d5c7a"),
        )
    ax.set_xlabel(f"V [{units[0]}]")
    ax.set_ylabel(f"P [{units[1]}]")
    ax.set_title("P–V path; shaded area = boundary work", fontsize=8)
    span = max(P) - min(P)
    if 0 < span < 0.2 * max(abs(max(P)), 1e-300):  # a short path: zoom to it
        ax.set_ylim(min(P) - 0.5 * span - 1e-9, max(P) + 0.5 * span + 1e-9)
        ax.set_title("P–V path (zoomed); shaded area = boundary work", fontsize=8)
    else:
        ax.set_ylim(bottom=0)
    ax.grid(alpha=0.3)


def _ts(ax, med, T, s, ct, cs, units) -> None:
    from ..substances.fluids import saturation

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
    ax.plot(s, T, color="#a3432b", lw=1.8)
    ax.set_xlabel(f"s [{units[0]}]")
    ax.set_ylabel(f"T [{units[1]}]")
    ax.grid(alpha=0.3)
    if dome is None:
        ax.set_title("T–s path", fontsize=8)
        return
    # the path is short when it would fill little of a view holding both it and the dome
    ds = float(max(np.max(s), np.max(dome[0])) - min(np.min(s), np.min(dome[0]))) or 1.0
    dT = float(max(np.max(T), np.max(dome[1])) - min(np.min(T), np.min(dome[1]))) or 1.0
    short = np.ptp(s) < 0.25 * ds or np.ptp(T) < 0.25 * dT
    if not short:
        ax.plot(*dome, color="#999", lw=1)
        ax.set_title("T–s path with saturation dome", fontsize=8)
        return
    # a short path: zoom to it, the whole dome in an inset with the path marked
    ms, mT = max(np.ptp(s), 0.02 * ds), max(np.ptp(T), 0.02 * dT)
    ax.set_xlim(min(s) - 0.3 * ms, max(s) + 0.3 * ms)
    ax.set_ylim(min(T) - 0.3 * mT, max(T) + 0.3 * mT)
    ax.plot(*dome, color="#999", lw=1)
    ax.set_title("T–s path (zoomed; inset: the dome)", fontsize=8)
    ins = ax.inset_axes([0.62, 0.08, 0.34, 0.34])
    ins.plot(*dome, color="#999", lw=0.8)
    ins.plot(s, T, color="#a3432b", lw=2.5)
    ins.plot([s[0]], [T[0]], "o", color="#a3432b", ms=3)
    ins.set_xticks([])
    ins.set_yticks([])
