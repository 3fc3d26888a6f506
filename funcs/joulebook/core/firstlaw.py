"""The first law for a closed system, and the energy terms that enter it.

Sign convention: heat *into* the system is positive; work *done by* the system is positive
(boundary work W_b and any other work W_other: shaft, paddle wheel, electrical).  Then

    Q = ΔU + ΔKE + ΔPE + W_b + W_other

and for a constant-pressure process, where W_b = P·ΔV, Q − W_other = ΔH.  Work done *on*
the system (a paddle wheel turned by a motor, an electric heater inside the system) enters as
a *negative* W_other.  All values SI (J, kg, m, s).
"""

from __future__ import annotations

import math

from .errors import BadInput, fmt_value

__all__ = [
    "STANDARD_GRAVITY",
    "heat",
    "gap",
    "delta_ke",
    "delta_pe",
    "electrical_work_in",
    "shaft_work_in",
]

#: standard acceleration of gravity, m/s² (CGPM 1901; common practice)
STANDARD_GRAVITY = 9.80665


def _opt(x: float | None) -> float:
    return 0.0 if x is None else x


def heat(
    dU: float,
    W_b: float,
    W_other: float | None = None,
    dKE: float | None = None,
    dPE: float | None = None,
) -> float:
    r"""Heat into a closed system by its first law.

    .. math:: Q = \Delta U + \Delta KE + \Delta PE + W_b + W_{other}

    Parameters
    ----------
    dU : float
        Change of internal energy (J).
    W_b : float
        Boundary work done by the system (J).
    W_other : float, optional
        Other work done by the system (J); work done *on* it enters negative.
    dKE : float, optional
        Change of kinetic energy (J).
    dPE : float, optional
        Change of potential energy (J).

    Returns
    -------
    float
        Q (J), positive into the system.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> heat(10e3, 2e3, W_other=-3e3)
    9000.0
    """
    return dU + _opt(dKE) + _opt(dPE) + W_b + _opt(W_other)


def gap(
    Q: float,
    W_b: float,
    dU: float,
    W_other: float | None = None,
    dKE: float | None = None,
    dPE: float | None = None,
) -> float:
    r"""Balance gap of a set of energy terms: zero when they close the first law.

    .. math:: \text{gap} = Q - W_b - W_{other} - (\Delta U + \Delta KE + \Delta PE)

    Parameters
    ----------
    Q : float
        Heat into the system (J).
    W_b : float
        Boundary work done by the system (J).
    dU : float
        Change of internal energy (J).
    W_other : float, optional
        Other work done by the system (J).
    dKE : float, optional
        Change of kinetic energy (J).
    dPE : float, optional
        Change of potential energy (J).

    Returns
    -------
    float
        The gap (J).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> gap(9e3, 2e3, 10e3, W_other=-3e3)
    0.0
    """
    return Q - W_b - _opt(W_other) - (dU + _opt(dKE) + _opt(dPE))


def delta_ke(m: float, vel1: float, vel2: float) -> float:
    r"""Change of kinetic energy.

    .. math:: \Delta KE = \tfrac12\,m\,(V_2^2 - V_1^2)

    Parameters
    ----------
    m : float
        Mass (kg), ≥ 0.
    vel1, vel2 : float
        Initial and final speed (m/s).

    Returns
    -------
    float
        ΔKE (J).

    Raises
    ------
    BadInput
        A negative mass.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> delta_ke(2.0, 0.0, 10.0)
    100.0
    """
    if not m >= 0:
        raise BadInput(f"m = {fmt_value(m)} kg: mass must be ≥ 0")
    return 0.5 * m * (vel2 * vel2 - vel1 * vel1)


def delta_pe(m: float, z1: float, z2: float, g: float | None = None) -> float:
    r"""Change of potential energy.

    .. math:: \Delta PE = m\,g\,(z_2 - z_1)

    Parameters
    ----------
    m : float
        Mass (kg), ≥ 0.
    z1, z2 : float
        Initial and final height (m).
    g : float, optional
        Acceleration of gravity (m/s²); 9.80665 (standard gravity, CGPM 1901) unless given.

    Returns
    -------
    float
        ΔPE (J).

    Raises
    ------
    BadInput
        A negative mass, or g outside 0–100 m/s².

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> delta_pe(1.0, 0.0, 10.0)
    98.06649999999999
    """
    if not m >= 0:
        raise BadInput(f"m = {fmt_value(m)} kg: mass must be ≥ 0")
    g = STANDARD_GRAVITY if g is None else g
    if not 0 < g < 100:
        raise BadInput(f"g = {fmt_value(g)} m/s2 is outside 0–100")
    return m * g * (z2 - z1)


def electrical_work_in(voltage: float, current: float, t: float) -> float:
    r"""Electrical energy delivered *to* the system; enter it as −W_other.

    .. math:: W_{e,in} = V\,I\,\Delta t

    Parameters
    ----------
    voltage : float
        Voltage (V).
    current : float
        Current (A).
    t : float
        Duration (s), ≥ 0.

    Returns
    -------
    float
        Energy delivered (J).

    Raises
    ------
    BadInput
        A negative duration.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> electrical_work_in(120.0, 2.0, 300.0)
    72000.0
    """
    if not t >= 0:
        raise BadInput(f"time = {fmt_value(t)} s must be ≥ 0")
    return voltage * current * t


def shaft_work_in(torque: float, revolutions: float) -> float:
    r"""Shaft (paddle-wheel) work delivered *to* the system; enter it as −W_other.

    .. math:: W_{sh,in} = 2\pi\,N\,\tau

    Parameters
    ----------
    torque : float
        Torque on the shaft (N·m).
    revolutions : float
        Number of revolutions N.

    Returns
    -------
    float
        Work delivered (J).

    Raises
    ------
    BadInput
        Revolutions not a finite number.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §2-6 and §4-1 (the energy balance of a closed system).

    Examples
    --------
    >>> round(shaft_work_in(10.0, 100.0), 3)
    6283.185
    """
    if not math.isfinite(revolutions):
        raise BadInput("revolutions is not a finite number")
    return 2.0 * math.pi * revolutions * torque
