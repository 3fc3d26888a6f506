"""joulebook: worksheet formulas for closed-system energy analysis.

The Python face: ``joulebook.call("JB_NAME", *cell_values)`` evaluates any worksheet function
exactly as a cell would.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "call"]


def call(name: str, *args):
    """Evaluate worksheet function *name* with cell values *args*, as a cell would.

    Raises one of :mod:`joulebook.errors`' types on bad input; see
    :func:`joulebook.catalog.call`.  (The catalog is imported on first use, after which this
    name is rebound to the catalog's own function.)
    """
    from .catalog import call as _call

    globals()["call"] = _call
    return _call(name, *args)
