"""The calculation map of a sheet: inputs → joulebook cells → checks, as one SVG.

Cells are boxes with their address and label, precedents are arrows.  Columns are the depth
of a cell in its sheet's dependency graph (inputs first), so a checker sees the shape of the
calculation before reading the entries.  Drawn by hand as SVG (no layout library): every
text from the workbook is escaped.
"""

from __future__ import annotations

import html
from dataclasses import dataclass

__all__ = ["Node", "calc_map"]

_W, _H, _GX, _GY = 170, 34, 60, 12  # box size and gaps, px
MAX_NODES = 160  # past this the map shows the first cells and says how many it left out


@dataclass
class Node:
    key: tuple  # (sheet, row, col)
    ref: str  # "B12"
    label: str
    kind: str  # input | ours | formula | check | flagged
    precedents: list  # keys of nodes on the same sheet
    anchor: str = ""  # link to the entry


_FILL = {
    "input": "#eef1f3",
    "ours": "#d6e9f2",
    "formula": "#ffffff",
    "check": "#fbe9d0",
    "flagged": "#f6d5d0",
}


_LEGEND = (
    ("input", "input"),
    ("ours", "joulebook"),
    ("formula", "formula"),
    ("check", "comparison"),
    ("flagged", "flagged"),
)


def _e(x) -> str:
    return html.escape(str(x), quote=True)


def _short(text: str, n: int = 24) -> str:
    return text if len(text) <= n else text[: n - 1] + "…"


def calc_map(nodes: list[Node], title: str, wrap: int | None = None) -> str:
    """The SVG of one sheet's nodes (empty text when there is nothing to draw).  With
    *wrap*, at most that many columns of depth stand side by side and deeper ones continue
    in a band below, so a long chain stays legible on a printed page."""
    if not nodes:
        return ""
    left_out = max(0, len(nodes) - MAX_NODES)
    nodes = nodes[:MAX_NODES]
    by_key = {n.key: n for n in nodes}
    depth: dict = {}

    def d(n: Node, seen=()) -> int:
        if n.key in depth:
            return depth[n.key]
        pre = [by_key[p] for p in n.precedents if p in by_key and p not in seen]
        depth[n.key] = 0 if not pre else 1 + max(d(p, seen + (n.key,)) for p in pre)
        return depth[n.key]

    for n in nodes:
        d(n)
    cols: dict[int, list[Node]] = {}
    for n in sorted(nodes, key=lambda n: (n.key[1], n.key[2])):
        cols.setdefault(depth[n.key], []).append(n)
    per = wrap if wrap and wrap > 0 else max(cols) + 1
    bands = max(cols) // per + 1
    band_rows = [
        max((len(cols.get(c, [])) for c in range(b * per, (b + 1) * per)), default=0)
        for b in range(bands)
    ]
    top = [30 + sum(band_rows[:b]) * (_H + _GY) + b * 24 for b in range(bands)]
    pos = {}
    for c, ns in cols.items():
        for i, n in enumerate(ns):
            pos[n.key] = (10 + (c % per) * (_W + _GX), top[c // per] + i * (_H + _GY))
    width = max(20 + min(max(cols) + 1, per) * (_W + _GX) - _GX, 700)
    width = max(width, max(330, 24 + int(6.8 * (len(title) + 40))) + 330)
    height = top[-1] + 10 + band_rows[-1] * (_H + _GY) + (16 if left_out else 0)
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="calcmap" width="{width}" '
        f'height="{height}" viewBox="0 0 {width} {height}" role="img" '
        f'aria-label="calculation map of {_e(title)}">',
        '<defs><marker id="arr" viewBox="0 0 10 10" refX="10" refY="5" markerWidth="7" '
        'markerHeight="7" orient="auto-start-reverse"><path d="M0,0L10,5L0,10z" '
        'fill="#6b7b83"/></marker></defs>',
        f'<text x="10" y="18" font-size="12" font-weight="bold">{_e(title)}: inputs → '
        "joulebook cells → checks</text>",
    ]
    lx = max(330, 24 + int(6.8 * (len(title) + 40)))  # the legend, after the title
    for kind, word in _LEGEND:
        out.append(
            f'<rect x="{lx}" y="8" width="12" height="12" rx="2" fill="{_FILL[kind]}" '
            f'stroke="#8a9aa2"/><text x="{lx + 16}" y="18" font-size="10">{word}</text>'
        )
        lx += 18 + 6 * len(word)
    for n in nodes:
        x2, y2 = pos[n.key]
        for p in n.precedents:
            if p in pos:
                x1, y1 = pos[p]
                out.append(
                    f'<line x1="{x1 + _W}" y1="{y1 + _H / 2}" x2="{x2}" y2="{y2 + _H / 2}" '
                    'stroke="#6b7b83" stroke-width="1" marker-end="url(#arr)"/>'
                )
    for n in nodes:
        x, y = pos[n.key]
        box = (
            f'<rect x="{x}" y="{y}" width="{_W}" height="{_H}" rx="4" fill="{_FILL[n.kind]}" '
            'stroke="#8a9aa2"/>'
            f'<text x="{x + 6}" y="{y + 14}" font-size="11" font-weight="bold">{_e(n.ref)}</text>'
            f'<text x="{x + 6}" y="{y + 28}" font-size="10">{_e(_short(n.label or "—"))}</text>'
        )
        out.append(f'<a href="#{_e(n.anchor)}">{box}</a>' if n.anchor else box)
    if left_out:
        out.append(
            f'<text x="10" y="{height - 6}" font-size="10">… and {left_out} more cells '
            "(see the entries)</text>"
        )
    out.append("</svg>")
    return "".join(out)
