"""joulebook: worksheet formulas for closed-system energy analysis.

The Python faces:

* ``joulebook.call("JB_NAME", *cell_values)`` evaluates any worksheet function exactly as a
  cell would;
* ``joulebook.State``, ``joulebook.Q_`` and the helpers of :mod:`joulebook.faces.api` take and
  return pint quantities (or SI numbers, numpy arrays) over the same core.

Importing the package is instant: the API, pint and the property library load on first use.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the real types for type checkers; at run time they load on first use
    from joulebook.core.units import registry, set_gauge_atmosphere
    from joulebook.faces.api import (
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

from .core.version import __version__

__all__ = [
    "__version__",
    "call",
    "Q_",
    "State",
    "Process",
    "registry",
    "set_gauge_atmosphere",
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

#: names served lazily by joulebook.faces.api (and the registry by joulebook.core.units)
_API = frozenset(__all__) - {"__version__", "call", "registry", "set_gauge_atmosphere"}


def __dir__() -> list[str]:
    """The API only: the names of ``__all__`` (served on first use); no helper names, no
    modules imported so far (tab completion finds State, call …)."""
    return sorted(__all__)


def __getattr__(name: str) -> Any:
    """Names served on first use, so ``import joulebook`` stays light.

    ``joulebook.call`` is the catalog's own function (:func:`joulebook.catalog.call`:
    evaluate worksheet function *name* with cell values, as a cell would), bound here when
    first named so a call pays no wrapper; the Pythonic API (:mod:`joulebook.faces.api`) and the
    unit registry load when first named.
    """
    if name == "call":
        from .catalog import call

        globals()["call"] = call
        return call
    if name in _API:
        from joulebook.faces import api

        return getattr(api, name)
    if name in ("registry", "set_gauge_atmosphere"):
        from joulebook.core import units

        return getattr(units, name)
    raise AttributeError(f"module 'joulebook' has no attribute {name!r}")
