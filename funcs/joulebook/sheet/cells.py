"""Cell conversion for the sheet face: what xlwings hands a UDF in, what a cell gets back.

Arguments arrive as 2-D lists (every wrapper reads its arguments with ``ndim=2`` and
``err_to_str=True``): a single cell is ``[[v]]``, a column ``[[a], [b], …]``, blanks ``None``,
cell errors their text (``"#N/A"``), dates ``datetime``.  1×1 lists are unwrapped; everything
else goes through :func:`joulebook.catalog.call`, the same path as the Python face and the
headless engine.

Results: a number, a text, or a 2-D list that spills.  A failure becomes the readable cell
text ``Label: message`` (never a traceback, NaN, inf or a silent 0).
"""

from __future__ import annotations

import numpy as np

from ..catalog import as_rows, call
from ..errors import JoulebookError, cell_text

__all__ = ["cell", "to_cell", "unwrap"]


def unwrap(value):
    """``[[v]]`` → ``v``; any other value unchanged."""
    if type(value) is list and len(value) == 1:
        row = value[0]
        if type(row) is list and len(row) == 1:
            return row[0]
    return value


def to_cell(result):
    """A call result as a cell value or a 2-D list (blank elements stay None → empty cells)."""
    if isinstance(result, (np.ndarray, list)):
        rows = as_rows(result)
        return [[float(v) if isinstance(v, np.floating) else v for v in row] for row in rows]
    if isinstance(result, np.floating):
        return float(result)
    return result


def cell(name: str, *args):
    """Evaluate catalog function *name* for a cell; failures become the cell's text."""
    try:
        return to_cell(call(name, *(unwrap(a) for a in args)))
    except JoulebookError as e:
        return e.cell_text()
    except Exception as e:  # never a traceback in a cell
        return cell_text(e)
