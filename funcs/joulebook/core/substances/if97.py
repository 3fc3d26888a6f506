"""Water by the industrial formulation IAPWS-IF97, for plant work and acceptance tests whose
steam tables are IF97's.

IF97 [1]_ is a set of fast equations, each valid in a region of the (T, P) plane, fitted to
IAPWS-95; it departs from IAPWS-95 by up to about 1e-3 relative (more near the critical
point), which is why a checker comparing with plant tables needs the same formulation.  The
property library's IF97 backend gives states from (T, P), (P, x) and (T, x) by the forward
equations; joulebook finds T or P with v, u, h or s by bracketed searches on those (so an
input read back is the input: the backward equations of IF97 would leave h off by up to
their permitted 25 mK), and refuses a pair that fits two states.

Validity: 273.15 K ≤ T ≤ 1073.15 K at P ≤ 100 MPa (regions 1 to 4); region 5 (to 2273.15 K)
is not offered by the property library's backend and is refused.

References
----------
.. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
   Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
   Power 122 (2000) 150–182.
"""

from __future__ import annotations

import math
import threading

import numpy as np

from ..errors import BadInput, OutOfRange, fmt_value
from ..roots import scan_roots

__all__ = ["NAME", "MODEL", "flash", "T_MIN", "T_MAX", "P_MAX", "T_CRIT", "P_CRIT"]

NAME = "water (IF97)"
T_MIN, T_MAX, P_MAX = 273.15, 1073.15, 100e6
T_CRIT, P_CRIT = 647.096, 22.064e6
P_TRIPLE = 611.212677
_local = threading.local()


def model_text() -> str:
    """The model's name with the property library's version, as results cite it.

    Returns
    -------
    str
        ``"IAPWS-IF97 (…) via CoolProp X.Y.Z"``.

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> model_text().startswith("IAPWS-IF97")
    True
    """
    import CoolProp

    return f"IAPWS-IF97 (IAPWS R7-97(2012), industrial formulation) via CoolProp {CoolProp.__version__}"


MODEL = "IAPWS-IF97 (IAPWS R7-97(2012), industrial formulation)"


def _state():
    st = getattr(_local, "st", None)
    if st is None:
        from CoolProp.CoolProp import AbstractState

        st = _local.st = AbstractState("IF97", "Water")
    return st


def _cp():
    import CoolProp.CoolProp as CP

    return CP


def _check_T(T: float) -> None:
    if not (T_MIN <= T <= T_MAX):
        raise OutOfRange(
            f"{NAME}: T = {fmt_value(T)} K is outside IF97's range here, 273.15–1073.15 K "
            "(region 5 above 1073.15 K is not offered)"
        )


def _check_P(P: float) -> None:
    if not (0 < P <= P_MAX):
        raise OutOfRange(f"{NAME}: P = {fmt_value(P / 1e3)} kPa is outside IF97's range 0–100 MPa")


def _read(st, two_phase: bool):
    """(T, P, v, u, h, s, x) of the current state."""
    T, P = st.T(), st.p()
    v = 1.0 / st.rhomass()
    x = st.Q() if two_phase else None
    return T, P, v, st.umass(), st.hmass(), st.smass(), x


def _update(key, a: float, b: float, two_phase: bool = False):
    st = _state()
    try:
        st.update(key, a, b)
        return _read(st, two_phase)  # the backend evaluates lazily: reading can fail too
    except (ValueError, IndexError) as e:  # the backend signals its range with either
        raise OutOfRange(f"{NAME}: no state for these inputs ({str(e)[:80]})") from None


def at_TP(T: float, P: float):
    """A single-phase state of water by IF97 at (T, P).

    Parameters
    ----------
    T : float
        Temperature (K), 273.15–1073.15.
    P : float
        Pressure (Pa), up to 100 MPa.

    Returns
    -------
    tuple of float
        ``(T, P, v, u, h, s, x)`` in K, Pa, m³/kg, J/kg, J/(kg·K); x is None off the
        saturation line.

    Raises
    ------
    BadInput
        (T, P) on the saturation line (give x or v).
    OutOfRange
        Outside regions 1 to 3 and 5's range offered.

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> round(at_TP(300.0, 3e6)[4] / 1e3, 6)        # IF97 Table 5: h = 115.331273 kJ/kg
    115.331273
    """
    _check_T(T)
    _check_P(P)
    if T < T_CRIT and abs(P - psat(T)) <= 1e-5 * P:
        raise BadInput(
            f"{NAME}: T = {fmt_value(T)} K and P = {fmt_value(P / 1e3)} kPa lie on the saturation "
            "line; give x or v"
        )
    return _update(_cp().PT_INPUTS, P, T)


def psat(T: float) -> float:
    r"""Saturation pressure of water by IF97 (region 4).

    .. math:: \vartheta = T + \frac{n_9}{T - n_{10}},\quad
              P_{sat} = \left(\frac{2C}{-B + \sqrt{B^2 - 4AC}}\right)^4 \text{ MPa}

    with A, B, C quadratics in ϑ (the region-4 saturation equation, IF97 Eq. 30).

    Parameters
    ----------
    T : float
        Temperature (K), 273.15 to the critical 647.096.

    Returns
    -------
    float
        P_sat (Pa).

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> round(psat(300.0) / 1e6, 11)                 # IF97 Table 35: 0.00353658941 MPa
    0.00353658941
    """
    if not T_MIN <= T <= T_CRIT:
        raise OutOfRange(
            f"{NAME}: saturation needs 273.15 ≤ T ≤ 647.096 K; got T = {fmt_value(T)} K"
        )
    n = _N4
    th = T + n[8] / (T - n[9])
    A = th * th + n[0] * th + n[1]
    B = n[2] * th * th + n[3] * th + n[4]
    C = n[5] * th * th + n[6] * th + n[7]
    return (2.0 * C / (-B + math.sqrt(B * B - 4.0 * A * C))) ** 4 * 1e6


#: IF97 region 4, the saturation equation's coefficients n1…n10 (IAPWS R7-97(2012), Table 34)
_N4 = (
    0.11670521452767e04, -0.72421316703206e06, -0.17073846940092e02, 0.12020824702470e05,
    -0.32325550322333e07, 0.14915108613530e02, -0.48232657361591e04, 0.40511340542057e06,
    -0.23855557567849e00, 0.65017534844798e03,
)  # fmt: skip


def sat(by: str, value: float, x: float):
    """A saturated state of water by IF97 at T or P with quality x.

    Parameters
    ----------
    by : str
        ``"T"`` or ``"P"``.
    value : float
        The saturation temperature (K) or pressure (Pa).
    x : float
        Quality, 0–1.

    Returns
    -------
    tuple of float
        ``(T, P, v, u, h, s, x)`` in K, Pa, m³/kg, J/kg, J/(kg·K); x is None off the
        saturation line.

    Raises
    ------
    OutOfRange
        Above the critical point or below the triple point.

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> round(sat("P", 101325.0, 0.0)[0], 2)
    373.12
    """
    CP = _cp()
    if by == "T":
        _check_T(value)
        if value >= T_CRIT:
            raise OutOfRange(f"{NAME}: no saturation above the critical temperature 647.096 K")
        try:
            return _update(CP.QT_INPUTS, x, value, True)
        except OutOfRange:
            if value < T_MIN + 1e-3:  # the backend's saturation starts a hair above 273.15 K
                raise OutOfRange(
                    f"{NAME}: saturated states at T = {fmt_value(value)} K are not offered by "
                    "the property library's IF97 (from 273.151 K); give T above it"
                ) from None
            raise
    _check_P(value)
    if not P_TRIPLE <= value < P_CRIT:
        raise OutOfRange(f"{NAME}: saturation needs 0.611 kPa ≤ P < 22064 kPa")
    return _update(CP.PQ_INPUTS, value, x, True)


_IDX = {"T": 0, "P": 1, "v": 2, "u": 3, "h": 4, "s": 5}
_UNIT = {"T": "K", "P": "Pa", "v": "m3/kg", "u": "J/kg", "h": "J/kg", "s": "J/(kg K)"}


def _two_phase(by: str, value: float, sym: str, target: float):
    """The wet state at T or P whose *sym* is *target*, or None when it lies outside."""
    if (by == "T" and value >= T_CRIT) or (by == "P" and not P_TRIPLE <= value < P_CRIT):
        return None
    f, g = sat(by, value, 0.0), sat(by, value, 1.0)
    lo, hi = f[_IDX[sym]], g[_IDX[sym]]
    if not lo <= target <= hi:
        return None
    x = (target - lo) / (hi - lo)
    return sat(by, value, x)


def _P_of(z: float) -> float:
    """The pressure of a grid point in ln P, never past the formulation's 100 MPa."""
    return min(math.exp(z), P_MAX)


def _single(solve_over: str, fixed: float, sym: str, target: float):
    """Single-phase states with *sym* = *target* on an isotherm (solve over ln P) or an isobar
    (solve over T)."""

    def f(z: float) -> float:
        try:
            st = at_TP(fixed, _P_of(z)) if solve_over == "P" else at_TP(z, fixed)
        except (OutOfRange, BadInput):
            return float("nan")
        return st[_IDX[sym]] - target

    if solve_over == "P":
        grid = np.linspace(math.log(P_TRIPLE / 100), math.log(P_MAX), 160)
        zs = scan_roots(f, grid, what=f"{NAME} state", xtol=1e-13)
        states = [(fixed, _P_of(z)) for z in zs]
    else:
        grid = np.linspace(T_MIN, T_MAX, 200)
        states = [(T, fixed) for T in scan_roots(f, grid, what=f"{NAME} state", xtol=1e-9)]
    # a root on the formulation's edge (100 MPa, 273.15 K, 1073.15 K) makes no sign change
    for end in (grid[0], grid[-1]):
        edge = (fixed, _P_of(end)) if solve_over == "P" else (float(end), fixed)
        near = any(abs(T - edge[0]) <= 1e-7 and abs(P / edge[1] - 1) <= 1e-7 for T, P in states)
        if not near and abs(f(end)) <= 1e-9 * abs(target) + 1e-9:
            states.append(edge)
    out = []
    for T, P in states:
        # a "root" where the property jumps across the saturation line is none
        try:
            st = at_TP(T, P)
        except (OutOfRange, BadInput):
            continue
        if abs(st[_IDX[sym]] - target) <= 1e-7 * abs(target) + 1e-9:
            out.append(st)
    return out


def _phases(states, by: str) -> str:
    """'wet at P = 19.9 kPa, single-phase at P = 10000 kPa': the states a refusal names."""
    words = []
    for st in states:
        kind = "wet" if st[6] is not None else "single-phase"
        at = f"P = {fmt_value(st[1] / 1e3)} kPa" if by == "T" else f"T = {fmt_value(st[0])} K"
        words.append(f"{kind} at {at}")
    return ", ".join(words)


def flash(a: str, va: float, b: str, vb: float):
    """(T, P, v, u, h, s, x) of water by IF97 at the pair (a, b), SI.

    Parameters
    ----------
    a, b : str
        Symbols of the fixing properties: T–P, P–x, T–x, or T or P with v, u, h or s.
    va, vb : float
        Their SI values.

    Returns
    -------
    tuple of float
        ``(T, P, v, u, h, s, x)`` in K, Pa, m³/kg, J/kg, J/(kg·K); x is None off the
        saturation line.

    Raises
    ------
    BadInput
        A pair IF97 does not take here, or one that fits two states.
    OutOfRange
        Outside the formulation's range.

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> st = flash("P", 3e6, "h", 115331.273)
    >>> round(st[0], 4)
    300.0
    """
    _cp()
    pair = {a: va, b: vb}
    if a == b:
        raise BadInput(f"{NAME}: the two state properties must differ (both are {a})")
    if "rho" in pair:
        pair["v"] = 1.0 / pair.pop("rho")
    keys = set(pair)
    for k, v in pair.items():
        if not math.isfinite(v):
            raise BadInput(f"{NAME}: {k} is not a finite number")
    if keys == {"T", "P"}:
        return at_TP(pair["T"], pair["P"])
    if keys == {"P", "x"} or keys == {"T", "x"}:
        by = "T" if "T" in keys else "P"
        if not 0 <= pair["x"] <= 1:
            raise OutOfRange(f"{NAME}: quality x = {fmt_value(pair['x'])} is outside 0 to 1")
        return sat(by, pair[by], pair["x"])
    for by in ("T", "P"):
        if by in keys:
            other = next(iter(keys - {by}))
            if other not in ("v", "u", "h", "s"):
                break
            fixed, target = pair[by], pair[other]
            (_check_T if by == "T" else _check_P)(fixed)
            found = _single("P" if by == "T" else "T", fixed, other, target)
            wet = _two_phase(by, fixed, other, target)
            if wet is not None:
                # a single-phase root on the saturation line is the wet state's end, not a
                # second state; any other single-phase root is a second state
                i = 1 if by == "T" else 0
                found = [s for s in found if abs(s[i] - wet[i]) > 1e-7 * wet[i]] + [wet]
            if not found:
                raise OutOfRange(
                    f"{NAME}: no state has {by} = {fmt_value(fixed)} and {other} = "
                    f"{fmt_value(target)} within IF97's range"
                )
            if len(found) > 1:
                raise BadInput(
                    f"{NAME}: {by} = {fmt_value(fixed)} {_UNIT[by]} and {other} = "
                    f"{fmt_value(target)} {_UNIT[other]} fit "
                    f"{len(found)} states ({_phases(found, by)}); give another pair"
                )
            return found[0]
    raise BadInput(
        f"{NAME}: the pair {a}, {b} is not offered for IF97; use T–P, P–x, T–x, or T or P with "
        "v, u, h or s"
    )


def derivative(T: float, P: float, want: str) -> float:
    """cp, cv, k or w of a single-phase state (T, P).

    Parameters
    ----------
    T : float
        Temperature (K).
    P : float
        Pressure (Pa).
    want : str
        ``cp``, ``cv``, ``k`` or ``w``.

    Returns
    -------
    float
        The value, SI (J/(kg·K), m/s, or k dimensionless).

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> round(derivative(300.0, 3e6, "w"), 5)        # IF97 Table 5: 1507.73921 m/s
    1507.73921
    """
    st = _state()
    try:
        st.update(_cp().PT_INPUTS, P, T)
        cp, cv = st.cpmass(), st.cvmass()
        val = {"cp": cp, "cv": cv, "k": cp / cv, "w": st.speed_sound()}[want]
    except (ValueError, IndexError):
        raise OutOfRange(f"{NAME}: {want} is not defined at this state") from None
    return val


def saturation(by: str, value: float, want: str) -> float:
    """A saturation property of water by IF97 at a given T or P.

    .. math:: y_{fg} = y_g - y_f

    Parameters
    ----------
    by : str
        ``"T"`` or ``"P"``.
    value : float
        The saturation temperature (K) or pressure (Pa).
    want : str
        ``Tsat``, ``Psat``, or ``vf vg vfg uf ug ufg hf hg hfg sf sg sfg``.

    Returns
    -------
    float
        The value, SI.

    Raises
    ------
    BadInput
        An unknown *want*.
    OutOfRange
        Outside the triple point – critical point range of region 4.

    References
    ----------
    .. [1] IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
       Thermodynamic Properties of Water and Steam"; W. Wagner et al., J. Eng. Gas Turbines
       Power 122 (2000) 150–182.

    Examples
    --------
    >>> round(saturation("T", 373.15, "Psat") / 1e6, 9)   # IF97 region 4 at 373.15 K, MPa
    0.101417978
    """
    if by not in ("T", "P"):
        raise BadInput(f"{NAME}: saturation is given by T or P, not {by!r}")
    if want in ("Tsat", "Psat"):
        if by == want[0]:
            return value
        if by == "T":
            return psat(value) if value < T_CRIT else sat("T", value, 0.0)[1]
        return sat("P", value, 0.0)[0]
    if len(want) < 2 or want[0] not in "vuhs" or want[1:] not in ("f", "g", "fg"):
        raise BadInput(
            f"unknown saturation output {want!r}; use Tsat Psat vf vg uf ug hf hg sf sg hfg"
        )
    i, side = _IDX[want[0]], want[1:]
    f = sat(by, value, 0.0)[i] if side != "g" else 0.0
    g = sat(by, value, 1.0)[i] if side != "f" else 0.0
    return f if side == "f" else g if side == "g" else g - f
