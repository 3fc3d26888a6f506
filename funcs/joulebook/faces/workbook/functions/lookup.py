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

import itertools
import weakref

import numpy as np

__all__ = ["generation", "install", "key_of", "remembered", "tag"]

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


# --- exact matches answered from an index ----------------------------------------------
# The engine tags each range it hands over from its per-run cache with a key naming the
# range and the run's generation of values; an exact MATCH, VLOOKUP or HLOOKUP over a tagged
# range finds its row in a dict built once per key, then lets the library answer on that one
# row (or on one row that cannot match), so results, shapes and errors stay the library's.

_TAGS: dict = {}  # id(array) -> (weak reference to it, key)
_INDEXES: dict = {}  # (key, part) -> {(type, value): first position}
_KEEP_INDEXES = 64
_GENERATIONS = itertools.count(1)


def generation() -> int:
    """A new number for a new set of values (a run, or after values changed in one)."""
    return next(_GENERATIONS)


def tag(arr: np.ndarray, key) -> np.ndarray:
    """Mark *arr* as the values of *key* (a range in one generation); returns *arr*."""
    i = id(arr)

    def gone(_ref, i=i):
        _TAGS.pop(i, None)

    _TAGS[i] = (weakref.ref(arr, gone), key)
    return arr


def key_of(arr):
    """The key *arr* was tagged with, or None."""
    return _key_of(arr)


def _key_of(arr):
    hit = _TAGS.get(id(arr))
    return hit[1] if hit is not None and hit[0]() is arr else None


def _exact_key(v):
    """(type, value) of a lookup value an exact match may answer from an index, else None."""
    from formulas.functions.look import _get_type_id

    if isinstance(v, np.ndarray):
        if v.size != 1:
            return None
        v = v.reshape(-1)[0]
    if not isinstance(v, (str, bool, int, float, np.number, np.bool_)):
        return None  # a reference, an error, a blank: the library's own way
    try:
        t = _get_type_id(v)
    except Exception:
        return None
    if t == 1:
        return None if any(ch in v for ch in "*?~") else (1, v.lower())
    if t == 0:
        return (0, float(v))
    if t == 2:
        return (2, bool(v))
    return None


def _index(key, part: str, values) -> dict:
    """The index of *values* (a callable giving them: read only when not yet built)."""
    found = _INDEXES.get((key, part))
    if found is None:
        found = {}
        for i, v in enumerate(values()):
            k = _exact_key(v)
            if k is not None and k not in found:
                found[k] = i
        if len(_INDEXES) >= _KEEP_INDEXES:
            _INDEXES.pop(next(iter(_INDEXES)))
        _INDEXES[(key, part)] = found
    return found


def _is_exact(match_type) -> bool:
    if isinstance(match_type, np.ndarray):
        if match_type.size != 1:
            return False
        match_type = match_type.reshape(-1)[0]
    return isinstance(match_type, (bool, int, float, np.number)) and not match_type


def _fast_table_lookup(original, rows: bool):
    """VLOOKUP (rows=True: the key column is the first) or HLOOKUP from an index."""

    def fn(val, vec, index, match_type=True):
        key = _key_of(vec) if isinstance(vec, np.ndarray) and vec.ndim == 2 else None
        want = _exact_key(val) if key is not None and _is_exact(match_type) else None
        if want is None:
            return original(val, vec, index, match_type)
        first = vec[:, 0] if rows else vec[0, :]
        i = _index(key, "col0" if rows else "row0", first.tolist).get(want)
        if i is None:  # one line that cannot match: the library's own not-found answer
            line = (vec[:1, :] if rows else vec[:, :1]).copy()
            import schedula as sh

            line[0, 0] = sh.EMPTY
            return original(val, line, index, match_type)
        return original(val, vec[i : i + 1, :] if rows else vec[:, i : i + 1], index, match_type)

    return fn


def _fast_match(original):
    def fn(val, arr, match_type=1):
        key = _key_of(arr) if isinstance(arr, np.ndarray) and 1 in arr.shape[:2] else None
        want = _exact_key(val) if key is not None and _is_exact(match_type) else None
        if want is None:
            return original(val, arr, match_type)
        flat = arr.reshape(-1)
        i = _index(key, "flat", flat.tolist).get(want)
        if i is None:
            import schedula as sh

            return original(val, np.array([[sh.EMPTY]], dtype=object), match_type)
        res = original(val, flat[i : i + 1].reshape(1, 1), match_type)  # position 1 of 1
        res = res.copy()
        res[...] = np.int64(i + 1)
        return res

    return fn


def _tag_kept(replace_empty):
    """The library's replace_empty (blanks in an array replaced by a value) keeping the tag
    of a tagged array on its result, with the value replaced named in the key."""

    def fn(x, empty=0):
        out = replace_empty(x, empty)
        if out is not x and isinstance(out, np.ndarray):
            key = _key_of(x)
            if key is not None:
                try:
                    tag(out, (key, "blank as", type(empty), empty))
                except TypeError:  # pragma: no cover - an unhashable replacement
                    pass
        return out

    fn.__wrapped__ = replace_empty  # type: ignore[attr-defined]
    return fn


def install(table: dict) -> None:
    """Use the remembered preparation in the library's lookup functions."""
    import formulas.functions as library
    from formulas.functions import get_error, look, wrap_ufunc

    if getattr(library.replace_empty, "__wrapped__", None) is None:
        library.replace_empty = _tag_kept(library.replace_empty)
    if getattr(look.args_parser_match_array, "__wrapped__", None) is None:
        look.args_parser_match_array = remembered(look.args_parser_match_array)
    # MATCH holds its preparation itself (the others look it up when they run)
    match = wrap_ufunc(
        look.xmatch,
        check_error=lambda *a: get_error(a[1]),
        excluded={3, 4, 5, 6, 7},
        args_parser=look.args_parser_match_array,
        input_parser=lambda *a: a,
    )
    table["MATCH"] = _fast_match(match)
    table["VLOOKUP"] = _fast_table_lookup(table["VLOOKUP"], rows=True)
    table["HLOOKUP"] = _fast_table_lookup(table["HLOOKUP"], rows=False)
