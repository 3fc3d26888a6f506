"""The wall of a pressurized pipe or vessel: thin-wall membrane stresses and the yield
strength they are judged against, at room temperature and in a fire.

A thin closed cylinder of mean diameter D and wall t under a pressure difference ΔP carries
the membrane stresses [1]_

    hoop   σ_θ = ΔP·D/(2t)
    axial  σ_a = ΔP·D/(4t)      (also the stress in every direction of a thin sphere)

The thin-wall forms are within about 5 % of the thick-wall (Lamé) mean stresses for
t ≤ D/20; thicker walls are refused above t = D/4 (use a thick-wall method there).

The default yield strength is the minimum of structural carbon steel S235 for walls up to
16 mm, 235 MPa (EN 10025-2, from memory); give the wall's own minimum yield strength from
its material standard.  In a fire the yield strength falls with the steel temperature by the
reduction factor k_y(θ) of EN 1993-1-2 Table 3.1 [2]_ (1 to 400 °C, 0.78 at 500 °C, 0.47 at
600 °C, 0.23 at 700 °C, 0.11 at 800 °C, 0.06 at 900 °C, 0.04 at 1000 °C, 0.02 at 1100 °C,
0 at 1200 °C; linear between; from memory).

Caution: engineering estimates of the membrane stress only (no end, nozzle, weld or local
stresses, no corrosion allowance, no code design margin).  Pressure equipment is governed by
the applicable codes and standards and by the judgement of a competent, licensed engineer.

References
----------
.. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
   McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels).
.. [2] EN 1993-1-2:2005, *Eurocode 3: Design of steel structures — Part 1-2: Structural fire
   design*, §3.2.1 and Table 3.1 (reduction factors of carbon steel at elevated
   temperature), from memory.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import BadInput, OutOfRange, fmt_value

__all__ = ["hoop_stress", "axial_stress", "yield_reduction", "YIELD_DEFAULT", "YIELD_SOURCE"]

#: minimum yield strength of structural steel S235, t ≤ 16 mm (Pa)
YIELD_DEFAULT = 235e6
YIELD_SOURCE = "S235 structural steel, t ≤ 16 mm: 235 MPa (EN 10025-2, from memory)"

# EN 1993-1-2 Table 3.1, k_y,θ of carbon steel (°C, factor), from memory
_KY_C = np.array([20.0, 400.0, 500.0, 600.0, 700.0, 800.0, 900.0, 1000.0, 1100.0, 1200.0])
_KY = np.array([1.0, 1.0, 0.78, 0.47, 0.23, 0.11, 0.06, 0.04, 0.02, 0.0])


def _check_wall(D: float, t: float) -> None:
    if not (math.isfinite(D) and D > 0):
        raise BadInput(f"D = {fmt_value(D)} m: the mean diameter must be above 0")
    if not (math.isfinite(t) and 0 < t <= D / 4):
        raise BadInput(
            f"wall = {fmt_value(t)} m: the thin-wall stress needs a wall above 0 and at most "
            f"D/4 = {fmt_value(D / 4)} m (thicker walls need a thick-wall method)"
        )


def _check_dp(dP: float) -> None:
    if not math.isfinite(dP):
        raise BadInput(f"the pressure difference {fmt_value(dP)} Pa must be a finite number")


def hoop_stress(dP: float, D: float, t: float) -> float:
    r"""Hoop (circumferential) membrane stress of a thin cylinder.

    .. math:: \sigma_\theta = \frac{\Delta P\,D}{2\,t}

    Parameters
    ----------
    dP : float
        Pressure difference inside − outside (Pa); negative under vacuum (compression).
    D : float
        Mean diameter (m).
    t : float
        Wall thickness (m), 0 < t ≤ D/4.

    Returns
    -------
    float
        σ_θ (Pa).

    Raises
    ------
    BadInput
        A diameter or wall out of range.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels).

    Examples
    --------
    >>> hoop_stress(10e6, 0.2, 0.01) / 1e6  # MPa
    100.0
    """
    _check_wall(D, t)
    _check_dp(dP)
    return dP * D / (2.0 * t)


def axial_stress(dP: float, D: float, t: float) -> float:
    r"""Axial (longitudinal) membrane stress of a thin closed cylinder; a thin sphere's stress.

    .. math:: \sigma_a = \frac{\Delta P\,D}{4\,t}

    Parameters
    ----------
    dP : float
        Pressure difference inside − outside (Pa).
    D : float
        Mean diameter (m).
    t : float
        Wall thickness (m), 0 < t ≤ D/4.

    Returns
    -------
    float
        σ_a (Pa).

    Raises
    ------
    BadInput
        A diameter or wall out of range.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       McGraw-Hill, 2002, Table 13.1 (thin-walled pressure vessels).

    Examples
    --------
    >>> axial_stress(10e6, 0.2, 0.01) / 1e6  # MPa
    50.0
    """
    _check_wall(D, t)
    _check_dp(dP)
    return dP * D / (4.0 * t)


def yield_reduction(T: float) -> float:
    r"""Reduction factor of the yield strength of carbon steel at temperature T.

    .. math:: f_{y,\theta} = k_{y,\theta}(\theta)\, f_y

    with k_y,θ linear between the points of EN 1993-1-2 Table 3.1 (1 up to 400 °C, 0 at
    1200 °C).

    Parameters
    ----------
    T : float
        Steel temperature (K), up to 1473.15 K; 1 below 20 °C.

    Returns
    -------
    float
        k_y,θ (-).

    Raises
    ------
    OutOfRange
        Above 1200 °C (the table's end).

    References
    ----------
    .. [1] EN 1993-1-2:2005, Table 3.1 (reduction factors of carbon steel at elevated
       temperature), from memory.

    Examples
    --------
    >>> yield_reduction(273.15 + 550.0)
    0.625
    """
    theta = T - 273.15
    if not math.isfinite(theta) or theta > 1200.0 + 1e-9:
        raise OutOfRange(
            f"T_wall = {fmt_value(T)} K: the steel's strength table ends at 1200 °C (1473.15 K)"
        )
    return float(np.interp(theta, _KY_C, _KY))
