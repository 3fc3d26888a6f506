"""MATCH, XMATCH, VLOOKUP, HLOOKUP, LOOKUP and XLOOKUP over a range that many formulas read:
the lookup array's preparation (each value's type, text folded to one case) done once per
range and remembered, not once per formula.

The formula library prepares the lookup array anew on every call, element by element in
Python — 10,000 copied-down ``VLOOKUP(…,Data!$A:$C,3,FALSE)`` over 10,000 rows is 10⁸ such
steps.  Here the prepared array is kept per (values of the range, way of folding text); the
lookup itself (numpy comparisons) is the library's, so its results are unchanged.

Examples
--------
>>> import numpy as np
>>> calls = []
>>> def prepare(val, arr, match_type=1):
...     calls.append(np.size(arr))
...     a = np.ravel(arr)
...     return (0, val, val, np.arange(1, a.size + 1), a * 0, a, a, match_type)
>>> fast = remembered(prepare)
>>> arr = np.arange(100.0)
>>> fast(3.0, arr)[3][:3].tolist(), fast(4.0, arr.copy())[1], calls
([1, 2, 3], 4.0, [100, 0])
"""

from __future__ import annotations

import numpy as np

__all__ = ["install", "remembered"]

_MIN_CELLS = 64  # smaller arrays are prepared directly
_KEEP = 32  # prepared arrays remembered (the oldest dropped first)
_KEEP_CELLS = 4_000_000  # their cells, all together


def remembered(prepare):
    """*prepare(val, arr, …)* → ``(val_types, val, val_raw, index, arr_types, array,
    array_raw, match_type)`` with its array part remembered per content of *arr*."""
    kept: dict = {}

    def fast(val, arr, *rest, **kw):
        raw = np.ravel(arr)
        if raw.size < _MIN_CELLS or raw.dtype != object and raw.dtype.kind not in "fiub":
            return prepare(val, arr, *rest, **kw)
        flat = raw.tolist()
        try:
            key = (tuple(flat), tuple(map(type, flat)), tuple(kw.items()))
            hash(key)
        except TypeError:
            return prepare(val, arr, *rest, **kw)
        part = kept.get(key)
        if part is None:
            whole = prepare(val, arr, *rest, **kw)
            part = tuple(whole[3:7])
            while kept and (
                len(kept) >= _KEEP or sum(p[0].size for p in kept.values()) > _KEEP_CELLS
            ):
                kept.pop(next(iter(kept)))
            kept[key] = part
            return whole
        head = prepare(val, np.empty(0, dtype=object), *rest, **kw)
        return (*head[:3], *(p.copy() for p in part), *head[7:])

    fast.__wrapped__ = prepare  # type: ignore[attr-defined]
    return fast


def install(table: dict) -> None:
    """Use the remembered preparation in the library's lookup functions."""
    from formulas.functions import get_error, look, wrap_ufunc

    if getattr(look.args_parser_match_array, "__wrapped__", None) is None:
        look.args_parser_match_array = remembered(look.args_parser_match_array)
    # MATCH holds its preparation itself (the others look it up when they run)
    table["MATCH"] = wrap_ufunc(
        look.xmatch,
        check_error=lambda *a: get_error(a[1]),
        excluded={3, 4, 5, 6, 7},
        args_parser=look.args_parser_match_array,
        input_parser=lambda *a: a,
    )
