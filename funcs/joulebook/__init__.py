"""joulebook: worksheet formulas for closed-system energy analysis.

The Python face: ``joulebook.call("JB_NAME", *cell_values)`` evaluates any worksheet function
exactly as a cell would.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "call"]


def __getattr__(name: str):
    """``joulebook.call`` is the catalog's own function (:func:`joulebook.catalog.call`:
    evaluate worksheet function *name* with cell values, as a cell would), imported when it
    is first named, so ``import joulebook`` stays light and a call pays no wrapper."""
    if name == "call":
        from .catalog import call

        globals()["call"] = call
        return call
    raise AttributeError(f"module 'joulebook' has no attribute {name!r}")
