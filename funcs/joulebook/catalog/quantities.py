"""Pint quantities and states as worksheet-call arguments (:func:`joulebook.call`).

A cell takes numbers in its unit system; a Python caller may hand a pint quantity instead.
Each quantity is converted by the catalog's own argument quantity (``Arg.quantity``) to SI
and then to the unit the call's unit system reads for that quantity, so the function sees
exactly the number a cell in that system would hold.  Nothing is guessed: a quantity given
for an argument with no quantity, or of another dimension, is refused with the argument named.
A state object (any :class:`StateLike`, such as :class:`joulebook.State`) goes where the
catalog takes a state text.
"""

from __future__ import annotations

import sys
from typing import Any

import numpy as np

from joulebook.core.errors import BadInput
from joulebook.core.units import KIND_WORDS, KINDS, UnitSystem

__all__ = ["StateLike", "cell_values"]


class StateLike:
    """A state a worksheet call takes as its state text (base of :class:`joulebook.State`)."""

    def cell_text(self) -> Any:
        """The state text (one text, or an array of texts for an array of states)."""
        raise NotImplementedError


def _is_quantity(value: object) -> bool:
    if "pint" not in sys.modules:
        return False
    import pint

    return isinstance(value, pint.Quantity)


def _takes_state(arg: Any) -> bool:
    return arg.type == "text" and ("state text" in arg.help or arg.name.startswith("state"))


def _one(arg: Any, value: Any, system: UnitSystem) -> Any:
    if isinstance(value, StateLike):
        if not _takes_state(arg):
            raise BadInput(
                f"{arg.name}: a State was given where the function takes {arg.help[:80]}"
            )
        return value.cell_text()
    if not _is_quantity(value):
        return value
    if arg.type == "text":
        raise BadInput(f"{arg.name} = {value:~P} is a quantity; this argument takes a text")
    kind = arg.quantity or "dimensionless"
    if arg.quantity is None and not value.dimensionless:
        raise BadInput(
            f"{arg.name} = {value:~P}: this argument has no quantity of its own (its unit is "
            "named in another argument, or it is a pure number); give a plain number"
        )
    si_unit = KINDS[kind][1]
    try:
        si = np.asarray(value.to(si_unit if kind != "dimensionless" else "dimensionless").magnitude)
    except Exception:
        raise BadInput(
            f"{arg.name} = {value:~P} is not a {KIND_WORDS[kind]}; give one in e.g. "
            f"{KINDS[kind][0] or 'no unit'}"
        ) from None
    if kind != "dimensionless":
        si = system.conv(kind).from_si(si.astype(float))
    out = np.asarray(si, dtype=float)
    return float(out) if out.ndim == 0 else out


def cell_values(f: Any, values: tuple, system: UnitSystem) -> tuple:
    """*values* with each quantity and state converted to the cell value it stands for.

    Parameters
    ----------
    f : joulebook.catalog.Func
        The worksheet function called (its arguments carry their quantities).
    values : tuple
        The call's values; quantities, states or anything a cell holds.
    system : UnitSystem
        The unit system of the call (the trailing ``units`` argument, or the default).

    Returns
    -------
    tuple
        The values, quantities as numbers (or arrays) in *system*'s units of the argument's
        quantity, states as their state text; the rest unchanged.

    Raises
    ------
    BadInput
        A quantity of the wrong dimension, or given where the argument takes text or no
        quantity (the argument is named); a state where no state text is taken.

    References
    ----------
    .. [1] pint documentation, *Converting quantities*, https://pint.readthedocs.io.

    Examples
    --------
    >>> from joulebook import Q_
    >>> from joulebook.catalog import lookup
    >>> from joulebook.core.units import unit_system
    >>> f = lookup("JB_WORK_ISOBARIC")
    >>> P, V1, V2 = cell_values(f, (Q_(2, "bar"), Q_(1, "L"), Q_(3, "L")), unit_system(None))
    >>> P, round(V1, 12), round(V2, 12)                # kPa and m³ of the default system
    (200.0, 0.001, 0.003)
    """
    if not any(isinstance(v, StateLike) or _is_quantity(v) for v in values):
        return values
    out = list(values)
    for i, arg in enumerate(f.args[: len(values)]):
        out[i] = _one(arg, values[i], system)
    return tuple(out)
