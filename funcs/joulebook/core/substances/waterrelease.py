"""Water's surface tension by its IAPWS release, and the ranges of validity of the IAPWS
viscosity and thermal-conductivity formulations.

The property library evaluates water's viscosity [2]_ and thermal conductivity [3]_ by the
IAPWS formulations, but answers outside the ranges the releases validate them over; its
surface tension of water is a fitted correlation that departs from the IAPWS release [1]_ by
up to 23 % near the critical point.  Here the release's equation gives σ, and a state outside
a formulation's range is refused, naming the range.

Ranges of validity (from the releases, recalled from memory):

* viscosity, IAPWS 2008 [2]_: T_m(P) ≤ T ≤ 1173.15 K up to 300 MPa; to 873.15 K up to
  350 MPa; to 433.15 K up to 500 MPa; to 373.15 K up to 1000 MPa;
* thermal conductivity, IAPWS 2011 [3]_: T_m(P) ≤ T ≤ 1173.15 K up to 100 MPa; to 874 K up to
  250 MPa; to 573 K up to 687 MPa; to 403 K up to 785 MPa; to 348 K up to 1000 MPa.

The lower bound, the melting line (and the triple point below its pressure), is the equation
of state's own and is enforced where the state is fixed.

References
----------
.. [1] IAPWS R1-76(2014), "Revised Release on Surface Tension of Ordinary Water Substance".
.. [2] IAPWS R12-08, "Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary
   Water Substance"; M. L. Huber et al., J. Phys. Chem. Ref. Data 38 (2009) 101–125.
.. [3] IAPWS R15-11, "Release on the IAPWS Formulation 2011 for the Thermal Conductivity of
   Ordinary Water Substance"; M. L. Huber et al., J. Phys. Chem. Ref. Data 41 (2012) 033102.
"""

from __future__ import annotations

from ..errors import OutOfRange, fmt_value

__all__ = ["surface_tension", "check_transport_range", "T_C"]

T_C = 647.096  # K, critical temperature (IAPWS R1-76(2014) uses the IAPWS-95 value)
_B, _b, _MU = 235.8e-3, -0.625, 1.256  # N/m, -, -
T_LOW = 248.15  # K, the release's lowest temperature (supercooled liquid)

#: (P upper bound in Pa, T upper bound in K) of each pressure band, in increasing P
_VISCOSITY = ((300e6, 1173.15), (350e6, 873.15), (500e6, 433.15), (1000e6, 373.15))
_CONDUCTIVITY = (
    (100e6, 1173.15), (250e6, 874.0), (687e6, 573.0), (785e6, 403.0), (1000e6, 348.0),
)  # fmt: skip
_RANGES = {"viscosity": (_VISCOSITY, "IAPWS 2008"), "conductivity": (_CONDUCTIVITY, "IAPWS 2011")}


def surface_tension(T: float) -> float:
    r"""Surface tension of water against its vapour by IAPWS R1-76(2014).

    .. math:: \sigma = B\,\tau^{\mu}\,(1 + b\,\tau), \qquad \tau = 1 - T/T_c

    with B = 235.8 mN/m, b = −0.625, μ = 1.256, T_c = 647.096 K.

    Parameters
    ----------
    T : float
        Saturation temperature (K), from the triple point 273.16 K to T_c (the release
        extends the equation to the supercooled liquid at 248.15 K).

    Returns
    -------
    float
        σ (N/m); 0 at the critical point.

    Raises
    ------
    OutOfRange
        T outside 248.15 K – 647.096 K.

    References
    ----------
    .. [1] IAPWS R1-76(2014), "Revised Release on Surface Tension of Ordinary Water
       Substance", Eq. (1) and its table of values.

    Examples
    --------
    >>> round(surface_tension(373.15) * 1e3, 2)      # R1-76(2014) table: 58.91 mN/m
    58.91
    """
    if not T_LOW <= T <= T_C:
        raise OutOfRange(
            f"water: the surface tension (IAPWS R1-76(2014)) needs 248.15 ≤ T ≤ 647.096 K; "
            f"got T = {fmt_value(T)} K"
        )
    tau = 1.0 - T / T_C
    return _B * tau**_MU * (1.0 + _b * tau)


def check_transport_range(which: str, T: float, P: float) -> None:
    """Refuse a state outside the validity of water's viscosity or conductivity release.

    .. math:: T \\le T_{max}(P) \\text{ of the release's pressure band}

    Parameters
    ----------
    which : str
        ``"viscosity"`` (IAPWS 2008) or ``"conductivity"`` (IAPWS 2011).
    T : float
        Temperature (K).
    P : float
        Pressure (Pa).

    Raises
    ------
    OutOfRange
        Above the band's temperature bound, or above 1000 MPa; the message names the range.

    References
    ----------
    .. [1] IAPWS R12-08, "Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary
       Water Substance", range of validity.
    .. [2] IAPWS R15-11, "Release on the IAPWS Formulation 2011 for the Thermal Conductivity
       of Ordinary Water Substance", range of validity.

    Examples
    --------
    >>> check_transport_range("viscosity", 1000.0, 10e6)      # inside: no error
    >>> check_transport_range("conductivity", 600.0, 300e6)   # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    joulebook.core.errors.OutOfRange: water: the thermal conductivity (IAPWS 2011) ...
    """
    bands, release = _RANGES[which]
    word = "viscosity" if which == "viscosity" else "thermal conductivity"
    lo = 0.0
    for p_top, t_top in bands:
        if P <= p_top * (1 + 1e-12):
            if T <= t_top * (1 + 1e-12):
                return
            raise OutOfRange(
                f"water: the {word} ({release}) is valid to {fmt_value(t_top)} K at "
                f"{fmt_value(lo / 1e6)}–{fmt_value(p_top / 1e6)} MPa; got T = {fmt_value(T)} K "
                f"at P = {fmt_value(P / 1e6)} MPa"
            )
        lo = p_top
    raise OutOfRange(
        f"water: the {word} ({release}) is valid to 1000 MPa; got P = {fmt_value(P / 1e6)} MPa"
    )
