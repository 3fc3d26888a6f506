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

from joulebook.catalog import as_rows, call
from joulebook.core.errors import (
    INTERNAL_LABEL,
    BadInput,
    BlankInput,
    JoulebookError,
    cell_text,
    message_in,
)

__all__ = [
    "ERRORS_NAME",
    "NEW_WORKBOOK_STYLE",
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
#: the style a workbook joulebook makes declares (design §3): real error values, so that SUM,
#: MAX and every reader propagate a refusal in Excel and Calc too; a workbook without the
#: name keeps the text style it always had
NEW_WORKBOOK_STYLE = "values"

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
    """A failure as a spreadsheet error value: ``code`` is shown, ``message`` is kept.

    Parameters
    ----------
    code : str
        The error value a cell shows: ``#VALUE!``, ``#NUM!`` or ``#N/A``.
    message : str
        The failure's text ``Label: message``, for ``JB_WHY`` and the audit.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> cell("JB_PROP", "water", "h", "T in K", 5000, "P in kPa", 100, errors="values").code
    '#NUM!'
    """

    code: str
    message: str


def error_style(text) -> str:
    """The error style named by the ``JB_ERRORS`` defined name's content (absent: "text").

    Accepts ``values`` / ``text`` as the name's constant, with or without the formula's
    ``=`` and quotes, in any case.

    Parameters
    ----------
    text : object
        The defined name's content, or None when the workbook has no such name.

    Returns
    -------
    str
        ``"text"`` or ``"values"``.

    Raises
    ------
    BadInput
        Any other content.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> error_style('="Values"'), error_style(None)
    ('values', 'text')
    """
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
    """The joulebook message a cell value carries ("" when it carries none).

    Parameters
    ----------
    value : object
        A cell value: a number, text, or an :class:`ErrorValue`.

    Returns
    -------
    str
        The failure's text ``Label: message``, or the empty string.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> message_of(ErrorValue("#NUM!", "OutOfRange: x = 2 is outside 0–1"))
    'OutOfRange: x = 2 is outside 0–1'
    >>> message_of(3.5)
    ''
    """
    if isinstance(value, ErrorValue):
        return value.message
    return message_in(value)


def unwrap(value):
    """``[[v]]`` → ``v``; any other value unchanged.

    Parameters
    ----------
    value : object
        A cell value or a 2-D list.

    Returns
    -------
    object
        The single cell's value of a 1×1 list, else *value* itself.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> unwrap([[4.0]]), unwrap([[1.0], [2.0]])
    (4.0, [[1.0], [2.0]])
    """
    if type(value) is list and len(value) == 1:
        row = value[0]
        if type(row) is list and len(row) == 1 and not isinstance(row[0], (list, tuple)):
            return row[0]  # a deeper list stays, and is refused by name
    return value


def _failure(text: str, errors: str):
    if errors == "values":
        return ErrorValue(ERROR_CODES[text.split(":", 1)[0]], text)
    return text


def to_cell(result, errors: str = "text"):
    """A call result as a cell value or a 2-D list (blank elements stay None → empty cells).

    Parameters
    ----------
    result : object
        What :func:`joulebook.catalog.call` returned: a number, text, None, an array or a list.
    errors : str
        The error style, ``"text"`` or ``"values"`` (failure texts inside a table become
        :class:`ErrorValue` in the latter).

    Returns
    -------
    object
        A float, text, None, or a list of rows.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> import numpy as np
    >>> to_cell(np.array([[1.0], [2.0]]))
    [[1.0], [2.0]]
    """
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
    """Evaluate catalog function *name* for a cell in the given error style.

    A blank required input gives a blank (None); a failure gives its cell text or its
    :class:`ErrorValue`; never an exception.

    Parameters
    ----------
    name : str
        A worksheet function name, ``"JB_PROP"`` …
    *args : object
        The cell values of its arguments (1×1 lists unwrapped).
    errors : str
        The error style, ``"text"`` (default) or ``"values"``.

    Returns
    -------
    object
        What the cell shows.

    References
    ----------
    .. [1] docs/design.md §4 (errors: the error style and the blank rule of both cell faces).

    Examples
    --------
    >>> cell("JB_WORK_ISOBARIC", 200, [[0.001]], 0.003)                 # kJ: 200 kPa · 2 L
    0.4
    >>> cell("JB_WORK_ISOBARIC", 200, None, 0.003) is None               # a blank input
    True
    >>> cell("JB_PROP", "water", "h", "T in K", 5000, "P in kPa", 100)[:12]
    'OutOfRange: '
    """
    try:
        return to_cell(call(name, *(unwrap(a) for a in args)), errors)
    except BlankInput:
        return None
    except JoulebookError as e:
        return _failure(e.cell_text(), errors)
    except Exception as e:  # never a traceback in a cell
        return _failure(cell_text(e), errors)
