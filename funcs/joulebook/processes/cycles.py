"""Closed cycles: net work and heat, closure of the energy balance, thermal efficiency.

Over a cycle the system returns to its initial state, ΔE_cycle = 0, so Q_net = W_net.  The
closure gap Q_net − W_net shows a list of process results that does not close.  Thermal
efficiency η = W_net / Q_in, with Q_in the sum of the positive heats.
"""

from __future__ import annotations

import numpy as np

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = ["net", "gap", "efficiency"]


def _vals(x, name: str) -> np.ndarray:
    a = np.asarray(x, dtype=float).reshape(-1)
    a = a[~np.isnan(a)]
    if a.size == 0:
        raise BadInput(f"{name} holds no numbers")
    return a


def net(values, name: str = "values") -> float:
    """Σ of the process values (blanks ignored)."""
    return float(np.sum(_vals(values, name)))


def gap(Q_values, W_values) -> float:
    """Q_net − W_net: zero for a cycle whose process results close the first law."""
    return net(Q_values, "Q_values") - net(W_values, "W_values")


def efficiency(Q_values, W_values, tolerance: float = 1e-6) -> float:
    """η = W_net / Q_in; refuses a cycle whose balance does not close (|gap| > tolerance·Q_in)."""
    Q = _vals(Q_values, "Q_values")
    W = _vals(W_values, "W_values")
    q_in = float(Q[Q > 0].sum())
    if not q_in > 0:
        raise OutOfRange("no positive heat in Q_values: a cycle needs heat input for an efficiency")
    g = float(Q.sum() - W.sum())
    if abs(g) > tolerance * q_in:
        raise OutOfRange(
            f"the cycle does not close: Q_net − W_net = {fmt_value(g)} J; "
            "check signs (heat in +, work by the system +)"
        )
    return float(W.sum()) / q_in
