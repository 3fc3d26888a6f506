"""What a cell gets from a joulebook call, shared by the two cell faces (xlwings, engine).

Arguments arrive as cell values or 2-D lists (a single cell ``[[v]]``, a column
``[[a], [b], …]``, blanks ``None``, cell errors as their text ``"#N/A"``).  1×1 lists are
unwrapped; everything else goes through :func:`joulebook.catalog.call`, the path of the
Python face.

Results: a number, a text, a blank, or a 2-D list that spills.  Two rules hold in every face:

* **A blank required input gives a blank result** (a copied-down row not filled in yet), not
  an error; an argument of the wrong kind, out of range or unknown is an error.
* **Failures**, by the workbook's error style (the defined name ``JB_ERRORS``):

  - ``"text"`` (the default, no name): the readable cell text ``Label: message``;
  - ``"values"``: a spreadsheet error value that ``IFERROR``/``ISERROR`` catch and charts
    leave out — ``#VALUE!`` for bad input, ``#NUM!`` out of range, ``#N/A`` no convergence
    (``#VALUE!`` for a defect of ours) — with the message kept for ``JB_WHY(cell)`` and the
    audit.

Never a traceback, NaN, inf or a silent 0.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .catalog import as_rows, call
from .errors import INTERNAL_LABEL, BadInput, BlankInput, JoulebookError, cell_text, message_in

__all__ = [
    "ERRORS_NAME",
    "ERROR_CODES",
    "ErrorValue",
    "cell",
    "error_style",
    "message_of",
    "to_cell",
    "unwrap",
]

#: the workbook-level defined name that sets the error style ("text" or "values")
ERRORS_NAME = "JB_ERRORS"
STYLES = ("text", "values")

#: the error value of each failure label in the "values" style
ERROR_CODES = {
    "BadInput": "#VALUE!",
    "OutOfRange": "#NUM!",
    "NoConvergence": "#N/A",
    INTERNAL_LABEL: "#VALUE!",
}
_PREFIXES = tuple(f"{label}: " for label in ERROR_CODES)


@dataclass(frozen=True)
class ErrorValue:
    """A failure as a spreadsheet error value: ``code`` is shown, ``message`` is kept."""

    code: str
    message: str


def error_style(text) -> str:
    """The error style named by the ``JB_ERRORS`` defined name's content (absent: "text").

    Accepts ``values`` / ``text`` as the name's constant, with or without the formula's
    ``=`` and quotes, in any case."""
    if text is None:
        return "text"
    word = str(text).strip().lstrip("=").strip().strip('"').strip().lower()
    if word in STYLES:
        return word
    raise BadInput(
        f"the defined name {ERRORS_NAME} = {str(text)[:40]!r} is not an error style; "
        f'use "text" (readable messages in cells) or "values" (error values + JB_WHY)'
    )


def message_of(value) -> str:
    """The joulebook message a cell value carries ("" when it carries none)."""
    if isinstance(value, ErrorValue):
        return value.message
    return message_in(value)


def unwrap(value):
    """``[[v]]`` → ``v``; any other value unchanged."""
    if type(value) is list and len(value) == 1:
        row = value[0]
        if type(row) is list and len(row) == 1:
            return row[0]
    return value


def _failure(text: str, errors: str):
    if errors == "values":
        return ErrorValue(ERROR_CODES[text.split(":", 1)[0]], text)
    return text


def to_cell(result, errors: str = "text"):
    """A call result as a cell value or a 2-D list (blank elements stay None → empty cells)."""
    if isinstance(result, (np.ndarray, list)):
        rows = as_rows(result)
        out = []
        for row in rows:
            line = []
            for v in row:
                if isinstance(v, np.floating):
                    v = float(v)
                elif errors == "values" and isinstance(v, str) and v.startswith(_PREFIXES):
                    v = _failure(v, errors)
                line.append(v)
            out.append(line)
        return out
    if isinstance(result, np.floating):
        return float(result)
    return result


def cell(name: str, *args, errors: str = "text"):
    """Evaluate catalog function *name* for a cell in the given error style."""
    try:
        return to_cell(call(name, *(unwrap(a) for a in args)), errors)
    except BlankInput:
        return None
    except JoulebookError as e:
        return _failure(e.cell_text(), errors)
    except Exception as e:  # never a traceback in a cell
        return _failure(cell_text(e), errors)
