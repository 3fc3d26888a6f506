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
    r"""Sum of the process values of a cycle (blanks ignored).

    .. math:: X_{net} = \sum_i X_i

    Parameters
    ----------
    values : array_like
        Heats or works of the processes (J); NaN = blank.
    name : str
        The argument's name, for messages.

    Returns
    -------
    float
        The sum (J).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §6-3 (thermal efficiency) and §2-6 (ΔE = 0 over a cycle).

    Examples
    --------
    >>> net([100.0, -40.0, float("nan")])
    60.0
    """
    return float(np.sum(_vals(values, name)))


def gap(Q_values, W_values) -> float:
    r"""Closure gap of a cycle: zero for process results that close the first law.

    .. math:: \text{gap} = Q_{net} - W_{net}

    Parameters
    ----------
    Q_values : array_like
        Heats into the system of each process (J).
    W_values : array_like
        Works done by the system of each process (J).

    Returns
    -------
    float
        The gap (J).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §6-3 (thermal efficiency) and §2-6 (ΔE = 0 over a cycle).

    Examples
    --------
    >>> gap([500.0, -300.0], [0.0, 200.0])
    0.0
    """
    return net(Q_values, "Q_values") - net(W_values, "W_values")


def efficiency(Q_values, W_values, tolerance: float = 1e-6) -> float:
    r"""Thermal efficiency of a cycle.

    .. math:: \eta = \frac{W_{net}}{Q_{in}}, \qquad Q_{in} = \sum_{Q_i > 0} Q_i

    Parameters
    ----------
    Q_values : array_like
        Heats into the system of each process (J).
    W_values : array_like
        Works done by the system of each process (J).
    tolerance : float
        Largest absolute gap accepted, relative to Q_in.

    Returns
    -------
    float
        η (dimensionless).

    Raises
    ------
    OutOfRange
        No heat in, or a balance that does not close (absolute gap > tolerance·Q_in).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §6-3 (thermal efficiency) and §2-6 (ΔE = 0 over a cycle).

    Examples
    --------
    >>> efficiency([500.0, -300.0], [0.0, 200.0])
    0.4
    """
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
