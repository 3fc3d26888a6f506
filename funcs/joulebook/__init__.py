"""joulebook: worksheet formulas for closed-system energy analysis.

The Python faces:

* ``joulebook.call("JB_NAME", *cell_values)`` evaluates any worksheet function exactly as a
  cell would;
* ``joulebook.State``, ``joulebook.Q_`` and the helpers of :mod:`joulebook.api` take and
  return pint quantities (or SI numbers, numpy arrays) over the same core.

Importing the package is instant: the API, pint and the property library load on first use.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the real types for type checkers; at run time they load on first use
    from .api import (
        Q_,
        Process,
        State,
        balance_gap,
        blocked_in_p2,
        delta_ke,
        delta_pe,
        heat,
        relief_thermal_flow,
        work_isobaric,
        work_isothermal,
        work_linear,
        work_polytropic,
        work_pv,
    )
    from .units import registry

__version__ = "0.1.0"

__all__ = [
    "__version__",
    "call",
    "Q_",
    "State",
    "Process",
    "registry",
    "work_isobaric",
    "work_isothermal",
    "work_polytropic",
    "work_linear",
    "work_pv",
    "heat",
    "balance_gap",
    "delta_ke",
    "delta_pe",
    "blocked_in_p2",
    "relief_thermal_flow",
]

#: names served lazily by joulebook.api (and the registry by joulebook.units)
_API = frozenset(__all__) - {"__version__", "call", "registry"}


def call(name: str, *args: Any) -> Any:
    """Evaluate worksheet function *name* with cell values *args*, as a cell would.

    Parameters
    ----------
    name : str
        A worksheet function name, ``"JB_PROP"``, ``"JB_PROCESS"``, … (docs/functions.md).
    *args : object
        Cell values: numbers, text, ``None`` for a blank, nested lists for a range.

    Returns
    -------
    object
        What the cell shows: a number, text, or a 2-D list for a spilled table.

    Raises
    ------
    BadInput, OutOfRange, NoConvergence
        The project errors (:mod:`joulebook.errors`), where a cell would show their text.

    References
    ----------
    .. [1] docs/design.md §1 (the Python face) and docs/functions.md.

    Examples
    --------
    >>> round(call("JB_PROP", "water", "h in kJ/kg", "T in degC", 25, "P in bar", 2), 3)
    105.011

    The catalog is imported on first use, after which this name is rebound to
    :func:`joulebook.catalog.call` itself.
    """
    from .catalog import call as _call

    globals()["call"] = _call
    return _call(name, *args)


def __getattr__(name: str) -> Any:
    if name in _API:
        from . import api

        return getattr(api, name)
    if name == "registry":
        from .units import registry

        return registry
    raise AttributeError(f"module 'joulebook' has no attribute {name!r}")
