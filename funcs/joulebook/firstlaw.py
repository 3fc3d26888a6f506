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
    """Q = ΔU + ΔKE + ΔPE + W_b + W_other (J)."""
    return dU + _opt(dKE) + _opt(dPE) + W_b + _opt(W_other)


def gap(
    Q: float,
    W_b: float,
    dU: float,
    W_other: float | None = None,
    dKE: float | None = None,
    dPE: float | None = None,
) -> float:
    """Balance gap Q − W − ΔE (J): zero when the numbers in a workbook close the first law."""
    return Q - W_b - _opt(W_other) - (dU + _opt(dKE) + _opt(dPE))


def delta_ke(m: float, vel1: float, vel2: float) -> float:
    """ΔKE = m·(V2² − V1²)/2 (J)."""
    if not m >= 0:
        raise BadInput(f"m = {fmt_value(m)} kg: mass must be ≥ 0")
    return 0.5 * m * (vel2 * vel2 - vel1 * vel1)


def delta_pe(m: float, z1: float, z2: float, g: float | None = None) -> float:
    """ΔPE = m·g·(z2 − z1) (J), g = 9.80665 m/s² unless given."""
    if not m >= 0:
        raise BadInput(f"m = {fmt_value(m)} kg: mass must be ≥ 0")
    g = STANDARD_GRAVITY if g is None else g
    if not 0 < g < 100:
        raise BadInput(f"g = {fmt_value(g)} m/s2 is outside 0–100")
    return m * g * (z2 - z1)


def electrical_work_in(voltage: float, current: float, t: float) -> float:
    """Electrical energy delivered *to* the system, V·I·Δt (J); enter it as −W_other."""
    if not t >= 0:
        raise BadInput(f"time = {fmt_value(t)} s must be ≥ 0")
    return voltage * current * t


def shaft_work_in(torque: float, revolutions: float) -> float:
    """Shaft (paddle-wheel) work delivered *to* the system, 2π·N·τ (J); enter it as −W_other."""
    if not math.isfinite(revolutions):
        raise BadInput("revolutions is not a finite number")
    return 2.0 * math.pi * revolutions * torque
