"""The sheet face's cell call: xlwings hands a UDF its arguments and the calling range.

The conversion of arguments and results, the blank rule and the error styles are shared with
the headless engine (:mod:`joulebook.catalog.cellvalues`).  What is particular to Excel:

* the error style is read from the calling workbook's defined name ``JB_ERRORS`` (kept for
  a few seconds per workbook, so that a sheet of thousands of calls reads it a few times);
* in the ``"values"`` style a failure is returned as a COM error value (``VT_ERROR`` with
  Excel's code, so the cell shows ``#NUM!``, ``#VALUE!`` or ``#N/A``), and its message is
  kept by the calling cell's address for ``JB_WHY(cell)`` in this Excel session.
"""

from __future__ import annotations

import time

from joulebook.catalog.cellvalues import (
    ERRORS_NAME,
    ErrorValue,
    error_style,
    message_of,
    to_cell,
    unwrap,
)
from joulebook.catalog.cellvalues import cell as shared_cell
from joulebook.core.errors import JoulebookError

__all__ = ["cell", "why", "to_cell", "unwrap", "com_error", "COM_ERROR_CODES"]

#: Excel's error values as COM SCODEs (xlErrValue 2015 etc. + 0x800A0000), as Excel reads
#: them from a VT_ERROR variant
COM_ERROR_CODES = {
    "#NULL!": -2146826288,
    "#DIV/0!": -2146826281,
    "#VALUE!": -2146826273,
    "#REF!": -2146826265,
    "#NAME?": -2146826259,
    "#NUM!": -2146826252,
    "#N/A": -2146826246,
}

_STYLE_TTL = 2.0  # seconds a workbook's error style is kept
_STYLES: dict[str, tuple[float, str]] = {}
_MESSAGES: dict[tuple, str] = {}  # (workbook, sheet, cell) -> message of its last failure
_MAX_MESSAGES = 100_000


def _book_key(caller) -> str | None:
    try:
        return str(caller.sheet.book.fullname)
    except Exception:  # no workbook (called from VBA or the function wizard)
        return None


def _style(caller) -> str:
    """The calling workbook's error style ("text" when there is no caller or no name)."""
    book = _book_key(caller) if caller is not None else None
    if book is None:
        return "text"
    now = time.monotonic()
    hit = _STYLES.get(book)
    if hit is not None and now - hit[0] < _STYLE_TTL:
        return hit[1]
    try:
        names = caller.sheet.book.names
        text = names[ERRORS_NAME].refers_to if ERRORS_NAME in [n.name for n in names] else None
    except Exception:
        text = None
    try:
        style = error_style(text)
    except JoulebookError:
        style = "text"  # an unknown word: the readable text style, which names no value
    _STYLES[book] = (now, style)
    return style


def _where(rng) -> tuple | None:
    try:
        return (_book_key(rng), str(rng.sheet.name), str(rng.address).split(":")[0])
    except Exception:
        return None


def com_error(code: str):
    """Excel's error value *code* ("#NUM!") as the COM variant a UDF returns."""
    import pythoncom
    from win32com.client import VARIANT

    return VARIANT(pythoncom.VT_ERROR, COM_ERROR_CODES[code])


def cell(name: str, *args, caller=None):
    """Evaluate catalog function *name* for the calling cell, in its workbook's error style."""
    style = _style(caller)
    out = shared_cell(name, *args, errors=style)
    if style != "values":
        return out
    where = _where(caller) if caller is not None else None
    first = ""
    if isinstance(out, list):
        for row in out:
            for j, v in enumerate(row):
                if isinstance(v, ErrorValue):
                    first = first or v.message
                    row[j] = com_error(v.code)
    elif isinstance(out, ErrorValue):
        first, out = out.message, com_error(out.code)
    if where is not None:
        if first:
            if len(_MESSAGES) >= _MAX_MESSAGES:
                _MESSAGES.clear()
            _MESSAGES[where] = first
        else:
            _MESSAGES.pop(where, None)
    return out


def why(name: str, target, caller=None):
    """A message reader (JB_WHY): *target* is the referenced range; its value is read as
    text, its kept message (in the "values" style) looked up by its address."""
    where = _where(target)
    message = _MESSAGES.get(where, "") if where is not None else ""
    if not message:
        try:
            message = message_of(unwrap(target.value))
        except Exception:
            message = message_of(unwrap(target))  # a value, not a range
    return shared_cell(name, message or None, errors="text")
