"""Pressure tests: the stored energy of a pneumatic and of a hydrostatic test, its TNT
equivalent, and cube-root distance scaling.

**Pneumatic test** (the common code formula [1]_): the energy an isentropic expansion of the
test gas from the absolute test pressure P to the atmosphere would release,

    E = 2.5·P·V·[1 − (P_amb/P)^0.286],

the ideal-gas result P·V/(k − 1)·[1 − (P_amb/P)^((k−1)/k)] for k = 1.4 with its exponent
rounded (0.2857 → 0.286).  In US units the same law reads E = 360·P·V·[…] ft·lbf with P in
psia and V in ft³ (the 144 in²/ft² folded into the 2.5).

**Hydrostatic test**: the liquid's own expansion energy on its equation of state,
m·(u1 − u2s) to the atmosphere at constant entropy, plus the elastic energy of the stretched
container, ½·c·V·(P − P_amb)² (c its volumetric compliance, see blockedin.compliance).
Both are orders of magnitude below the pneumatic energy at the same pressure: that is why a
hydrostatic test is preferred wherever it is possible.

**TNT equivalent**: W = E / e_TNT with e_TNT = 4.184 MJ/kg, the conventional basis (one tonne
of TNT is defined as 4.184 GJ) [2]_.  **Distance**: Hopkinson–Cranz cube-root scaling
R = Z·W^(1/3) [3]_, with the scaled distance Z (m/kg^(1/3)) taken from the applicable code for
the overpressure it limits; joulebook does not choose Z.

Caution: these are estimates for planning a pressure test.  Pressure tests, their exclusion
zones and their procedures are governed by the applicable codes and standards and by a
competent, licensed engineer.

References
----------
.. [1] ASME PCC-2, Repair of Pressure Equipment and Piping, Article 501 (pressure testing),
   mandatory appendix on stored energy; recalled from memory.
.. [2] The convention of the "ton of TNT" as 4.184 × 10⁹ J (NIST SP 811, Appendix B, note on
   the ton of TNT).
.. [3] G. F. Kinney, K. J. Graham, *Explosive Shocks in Air*, 2nd ed., Springer, 1985, ch. 5
   (cube-root scaling of blast parameters).
"""

from __future__ import annotations

import math

from ..errors import BadInput, fmt_value
from .stored import _check

__all__ = ["pneumatic_energy", "container_energy", "tnt_equivalent", "scaled_distance", "E_TNT"]

E_TNT = 4.184e6  # J per kg of TNT, the conventional basis


def pneumatic_energy(P: float, V: float, P_amb: float = 101_325.0) -> float:
    r"""Stored energy of a pneumatic test by the code formula (air, k = 1.4).

    .. math:: E = 2.5\,P\,V\left[1 - \left(\frac{P_{amb}}{P}\right)^{0.286}\right]

    Parameters
    ----------
    P : float
        Test pressure (Pa, absolute).
    V : float
        Volume (m³).
    P_amb : float
        Ambient pressure (Pa, absolute).

    Returns
    -------
    float
        E (J).

    References
    ----------
    .. [1] ASME PCC-2, Repair of Pressure Equipment and Piping, Article 501 (pressure testing),
       mandatory appendix on stored energy; recalled from memory.

    Examples
    --------
    >>> round(pneumatic_energy(1.2e6, 2.0) / 1e6, 4)
    3.041
    """
    _check(P, V, P_amb)  # the stored-energy estimates' own rule
    return 2.5 * P * V * (1.0 - (P_amb / P) ** 0.286)


def container_energy(c: float, V: float, dP: float) -> float:
    r"""Elastic energy of a wall of volumetric compliance *c* holding *V* at *dP*.

    .. math:: E = \tfrac12\,c\,V\,\Delta P^2

    Parameters
    ----------
    c : float
        Volumetric compliance of the wall (1/Pa).
    V : float
        Volume (m³).
    dP : float
        Pressure above ambient (Pa).

    Returns
    -------
    float
        E (J).

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       2002, Table 13.1 (the compliance); the energy is ∫ΔP dV of a linear wall.

    Examples
    --------
    >>> container_energy(1e-9, 1.0, 1e7)
    50000.0
    """
    if not c >= 0:
        raise BadInput(f"the wall compliance {fmt_value(c)} 1/Pa must not be negative")
    return 0.5 * c * V * dP * dP


def tnt_equivalent(E: float, basis: float = E_TNT) -> float:
    r"""TNT equivalent of an energy.

    .. math:: W = E / e_{TNT}, \qquad e_{TNT} = 4.184\ \mathrm{MJ/kg}

    Parameters
    ----------
    E : float
        Energy (J).
    basis : float
        Energy per kg of TNT (J/kg).

    Returns
    -------
    float
        W (kg of TNT).

    References
    ----------
    .. [1] The convention of the "ton of TNT" as 4.184 × 10⁹ J (NIST SP 811, Appendix B).

    Examples
    --------
    >>> round(tnt_equivalent(4.184e6), 12)
    1.0
    """
    if not E >= 0 or not math.isfinite(E):
        raise BadInput(f"E = {fmt_value(E)} J: the stored energy must be 0 or above")
    if not basis > 0:
        raise BadInput(f"basis = {fmt_value(basis)} J/kg: the TNT energy must be above 0")
    return E / basis


def scaled_distance(W: float, Z: float) -> float:
    r"""Distance at a scaled distance Z from a TNT charge (cube-root scaling).

    .. math:: R = Z\,W^{1/3}

    Parameters
    ----------
    W : float
        Charge (kg of TNT).
    Z : float
        Scaled distance (m/kg^(1/3)).

    Returns
    -------
    float
        R (m).

    References
    ----------
    .. [1] G. F. Kinney, K. J. Graham, *Explosive Shocks in Air*, 2nd ed., Springer, 1985,
       ch. 5 (cube-root scaling of blast parameters).

    Examples
    --------
    >>> round(scaled_distance(8.0, 10.0), 9)
    20.0
    """
    if not W >= 0:
        raise BadInput(f"W = {fmt_value(W)} kg: the TNT mass must be 0 or above")
    if not Z > 0:
        raise BadInput(
            f"Z = {fmt_value(Z)} m/kg^(1/3): give the scaled distance the applicable code sets "
            "for the overpressure it limits (above 0)"
        )
    return Z * W ** (1.0 / 3.0)
