"""What ``joulebook check`` prints on a console: failing cells as wrapped rows, never a value
or a message cut in the middle of a word, and a summary line in plain words."""

from __future__ import annotations

import shutil
import textwrap

from .check import fmt
from .status import STATUSES

__all__ = ["failing_rows", "summary_words"]

#: what a summary field reads as in a sentence (statuses are their own words)
_WORDS = {
    "saved_error_values": ("saved error value", "saved error values"),
    "errors_in_values": ("error in a value", "errors in values"),
}


def _n(count: int, one: str, many: str) -> str:
    return f"{count} {one if count == 1 else many}"


def summary_words(summary: dict) -> str:
    """The summary of a check as one line of plain words.

    >>> summary_words({"cells": 12, "pass": 10, "differs": 1, "error value": 1,
    ...                "saved_error_values": 1, "errors_in_values": 0})
    '12 formula cells: 10 pass, 1 differs, 1 error value (1 saved error value)'
    >>> summary_words({"cells": 1, "pass": 1, "saved_error_values": 0, "errors_in_values": 0})
    '1 formula cell: 1 pass'
    """
    cells = int(summary.get("cells", 0))
    parts = []
    for status in STATUSES:
        n = summary.get(str(status.value), 0)
        if n:
            parts.append(f"{n} {status.value}")
    known = {"cells", *(s.value for s in STATUSES), *_WORDS}
    for key, n in summary.items():  # a count added later still reads as words
        if key not in known and n:
            parts.append(f"{n} {key.replace('_', ' ')}")
    extra = [_n(summary[k], *_WORDS[k]) for k in _WORDS if summary.get(k)]
    text = _n(cells, "formula cell", "formula cells") + (": " + ", ".join(parts) if parts else "")
    return text + (f" ({', '.join(extra)})" if extra else "")


def failing_rows(rows: list[dict], width: int | None = None) -> list[str]:
    """The failing cells as a table whose long values, messages and formulas wrap onto
    continuation lines (breaking between words) instead of being cut.

    >>> rows = [{"sheet": "S", "cell": "B2", "status": "error", "cached": 1.0,
    ...          "recomputed": "BadInput: Q_dot = -5 W is below 0 W; give a heat input of 0 W or more",
    ...          "formula": "JB_TIME_HEATING(B1,-5)"}]
    >>> print("\\n".join(failing_rows(rows, width=72)))
    cell          status            saved           recomputed              formula
    S!B2          error             1               BadInput: Q_dot = -5 W  JB_TIME_HEATING(B1,-5)
                                                    is below 0 W; give a
                                                    heat input of 0 W or
                                                    more
    """
    width = width or max(80, min(shutil.get_terminal_size((120, 24)).columns, 200))
    cols = [("cell", 14), ("status", 18), ("saved", 16), ("recomputed", 24)]
    rest = max(20, width - sum(w for _, w in cols))
    head = "".join(f"{name:<{w}}" for name, w in cols) + "formula"
    out = [head]
    for r in rows:
        cells = [
            f"{r['sheet']}!{r['cell']}",
            str(r["status"]),
            fmt(r["cached"]),
            fmt(r["recomputed"]),
            str(r["formula"]).lstrip("="),
        ]
        widths = [w for _, w in cols] + [rest]
        wrapped = [
            textwrap.wrap(
                text, w - 1 if i < 4 else w, break_long_words=False, break_on_hyphens=False
            )
            or [""]
            for i, (text, w) in enumerate(zip(cells, widths))
        ]
        for line in range(max(len(x) for x in wrapped)):
            parts = [
                (x[line] if line < len(x) else "").ljust(w if i < 4 else 0)
                for i, (x, w) in enumerate(zip(wrapped, widths))
            ]
            out.append("".join(parts).rstrip())
    return out
