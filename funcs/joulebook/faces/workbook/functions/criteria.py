"""The criteria test of SUMIF, SUMIFS, COUNTIF(S), AVERAGEIF(S), MAXIFS, MINIFS, answered
once per distinct value of a range and remembered per (range, criterion).

A criteria range read by many formulas (``SUMIFS(C:C, $A:$A, $A2)`` copied down and across)
is the same values every time: the test of one criterion on one cell depends only on that
cell's value (and type), so the range is reduced to its distinct values once, each new
criterion is tested on those only, and the verdict is spread back to the cells with one numpy
take.  A criterion seen before on the same values is answered from memory.  The verdicts are
those of the wrapped test, value for value, so nothing about Excel's matching rules changes
here.

Examples
--------
>>> import numpy as np
>>> calls = []
>>> def test(rng, cond):
...     calls.append(len(rng["raw"]))
...     return np.array([v == cond for v in rng["raw"]])
>>> memo = remembered(test)
>>> raw = np.array(["a", "b", "a", "a"] * 8, dtype=object)
>>> first = memo({"raw": raw}, "a")
>>> again = memo({"raw": raw.copy()}, "a")
>>> first[:4].tolist(), int(again.sum()), calls  # the test ran once, on the 2 distinct values
([True, False, True, True], 24, [2])
"""

from __future__ import annotations

import numpy as np

__all__ = ["remembered"]

_MIN_CELLS = 16  # smaller ranges are tested directly
_KEEP_RANGES = 64  # distinct ranges remembered (the oldest dropped first)
_KEEP_VERDICTS = 4096  # verdicts remembered per range
_KEEP_CELLS = 4_000_000  # cells of the ranges remembered, all together


class _Reduced:
    """A range reduced to its distinct (type, value) pairs."""

    __slots__ = ("shape", "distinct", "inverse", "verdicts")

    def __init__(self, flat: list, shape: tuple):
        where: dict = {}
        inverse = np.empty(len(flat), dtype=np.intp)
        distinct = []
        for i, v in enumerate(flat):
            k = (type(v), v)
            j = where.get(k)
            if j is None:
                j = where[k] = len(distinct)
                distinct.append(v)
            inverse[i] = j
        arr = np.empty(len(distinct), dtype=object)
        arr[:] = distinct
        self.shape = shape
        self.distinct = arr
        self.inverse = inverse
        self.verdicts: dict = {}


def remembered(test):
    """*test(test_range, condition)* (a boolean array shaped as ``test_range["raw"]``)
    answered per distinct value and remembered; see the module's text."""
    ranges: dict = {}

    def memo(test_range, condition):
        raw = test_range.get("raw") if isinstance(test_range, dict) else None
        if not isinstance(raw, np.ndarray) or raw.size < _MIN_CELLS or len(test_range) != 1:
            return test(test_range, condition)
        from .lookup import key_of

        tagged = key_of(raw)  # a range the engine handed over in this run: known by name
        flat = raw.ravel().tolist() if tagged is None else None
        try:
            key = (
                ("range", tagged)
                if tagged is not None
                else (raw.shape, tuple(flat), tuple(map(type, flat)))
            )
            ckey = (type(condition), condition)
            hash(key), hash(ckey)
        except TypeError:  # an unhashable value: tested directly
            return test(test_range, condition)
        red = ranges.get(key)
        if red is None:
            while ranges and (
                len(ranges) >= _KEEP_RANGES
                or sum(r.inverse.size for r in ranges.values()) + raw.size > _KEEP_CELLS
            ):
                ranges.pop(next(iter(ranges)))  # the oldest first
            red = ranges[key] = _Reduced(raw.ravel().tolist() if flat is None else flat, raw.shape)
        got = red.verdicts.get(ckey)
        if got is None:
            on_distinct = np.asarray(test({"raw": red.distinct}, condition), dtype=bool)
            if on_distinct.shape != red.distinct.shape:  # not value by value: as it was
                return test(test_range, condition)
            if len(red.verdicts) >= _KEEP_VERDICTS:
                red.verdicts.clear()
            got = red.verdicts[ckey] = on_distinct
        return got[red.inverse].reshape(red.shape)

    memo.__wrapped__ = test  # type: ignore[attr-defined]
    return memo
