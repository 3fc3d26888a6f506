"""Mixtures by composition and refrigerant blends, on the property library's multi-fluid
mixture model.

A mixture is written as components and fractions, ``"methane 0.9, ethane 0.06, nitrogen
0.03, CO2 0.01"`` (mole fractions), or ``"R32 0.5, R125 0.5 (mass)"`` for mass fractions.
The fractions must add up to 1.  The refrigerant blends R404A, R407C, R410A and R507A by
name are their pseudo-pure equations of state (substances/fluids.py) in every function, with
their bubble and dew lines; written as a composition (:data:`BLENDS` holds the nominal ones
[2]_) a blend is this mixture model instead, on its components' reference states.

The model is the multi-fluid Helmholtz-energy mixture model of the GERG-2008 form [1]_: each
component's reference equation of state with binary departure and reducing functions (the
GERG-2008 parameters for the natural-gas components, fitted parameters for refrigerant
pairs), evaluated by the property library.  States: T–P in a single phase, and T or P with a
vapour fraction x from 0 (bubble point) to 1 (dew point).  A (T, P) between the bubble and
the dew point is two-phase and refused (give x); near the critical locus the model's
saturation solver may not converge, and that is refused too.

References
----------
.. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
   other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.
.. [2] ANSI/ASHRAE Standard 34, Designation and safety classification of refrigerants:
   R404A = R125/R143a/R134a 44/52/4, R407C = R32/R125/R134a 23/25/52, R410A = R32/R125
   50/50, R507A = R125/R143a 50/50 (mass %); recalled from memory.
"""

from __future__ import annotations

import math
import re
import threading
from dataclasses import dataclass
from functools import lru_cache

from ..errors import BadInput, OutOfRange, fmt_value
from . import fluids

__all__ = ["Mixture", "parse", "BLENDS", "MODEL", "is_mixture_text"]

MODEL = (
    "multi-fluid Helmholtz mixture model of the GERG-2008 form (Kunz & Wagner, J. Chem. Eng. "
    "Data 57, 3032, 2012)"
)
BLENDS = {
    "R404A": "R125 0.44, R143a 0.52, R134a 0.04 (mass)",
    "R407C": "R32 0.23, R125 0.25, R134a 0.52 (mass)",
    "R410A": "R32 0.5, R125 0.5 (mass)",
    "R507A": "R125 0.5, R143a 0.5 (mass)",
}
_PART = re.compile(r"^\s*(?P<name>.+?)\s+(?P<frac>[0-9]*\.?[0-9]+(?:[eE][-+]?\d+)?)\s*$")
_MASS = re.compile(r"\(\s*(mass|mole|molar)(?:\s+fractions?)?\s*\)\s*$", re.IGNORECASE)
_local = threading.local()


@dataclass(frozen=True)
class Mixture:
    """A mixture by composition (mole fractions).

    Parameters
    ----------
    text : str
        The composition as shown: ``"methane 0.9, ethane 0.1 (mole)"``.
    internal : tuple of str
        The property library's names of the components.
    mole : tuple of float
        Mole fractions, adding up to 1.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> parse("methane 0.9, ethane 0.1").mole
    (0.9, 0.1)
    """

    text: str  # as shown: "methane 0.9, ethane 0.1"
    internal: tuple[str, ...]
    mole: tuple[float, ...]


def is_mixture_text(name: str) -> bool:
    """Does *name* read as a composition ("a 0.5, b 0.5")?

    Parameters
    ----------
    name : str
        Substance text.

    Returns
    -------
    bool
        True for two or more ``component fraction`` parts.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> is_mixture_text("R32 0.5, R125 0.5 (mass)"), is_mixture_text("water")
    (True, False)
    """
    name = _MASS.sub("", str(name)).strip()
    parts = [p for p in name.split(",") if p.strip()]
    return len(parts) >= 2 and all(_PART.match(p) for p in parts)


@lru_cache(maxsize=256)
def parse(text: str) -> Mixture:
    r"""The mixture written as components and fractions (mole, or mass with '(mass)').

    Mass fractions become mole fractions by

    .. math:: x_i = \frac{w_i / M_i}{\sum_j w_j / M_j}

    Parameters
    ----------
    text : str
        ``"methane 0.9, ethane 0.1"`` or ``"R32 0.5, R125 0.5 (mass)"``.

    Returns
    -------
    Mixture
        The components and mole fractions.

    Raises
    ------
    BadInput
        A malformed part, an unknown or repeated component, fractions not adding up to 1.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> m = parse("R32 0.5, R125 0.5 (mass)")
    >>> round(m.mole[0], 6)
    0.697615
    """
    raw = str(text).strip()
    basis = _MASS.search(raw)
    mass = bool(basis) and basis.group(1).lower() == "mass"
    body = _MASS.sub("", raw).strip()
    names, internal, fr = [], [], []
    for part in [p for p in body.split(",") if p.strip()]:
        m = _PART.match(part)
        if not m:
            raise BadInput(f"mixture {raw[:60]!r}: {part.strip()!r} is not 'component fraction'")
        info = fluids.fluid_info(m.group("name"))
        if not info.pure:
            raise BadInput(f"mixture component {info.name} is itself a mixture; give its parts")
        if info.internal in internal:
            raise BadInput(f"mixture {raw[:60]!r}: {info.name} is named twice")
        names.append(info.name)
        internal.append(info.internal)
        fr.append(float(m.group("frac")))
    if len(internal) < 2:
        raise BadInput(f"mixture {raw[:60]!r}: give at least two components with fractions")
    total = sum(fr)
    if any(f <= 0 for f in fr) or abs(total - 1.0) > 1e-4:
        raise BadInput(
            f"mixture {raw[:60]!r}: the fractions must be above 0 and add up to 1 (they add "
            f"up to {fmt_value(total)})"
        )
    fr = [f / total for f in fr]
    if mass:
        moles = [f / fluids.fluid_info(n).molar_mass for f, n in zip(fr, internal)]
        fr = [m / sum(moles) for m in moles]
    shown = ", ".join(f"{n} {fmt_value(f)}" for n, f in zip(names, [float(x) for x in fr]))
    return Mixture(shown + " (mole)", tuple(internal), tuple(fr))


def _state(mix: Mixture):
    cache = getattr(_local, "states", None)
    if cache is None:
        cache = _local.states = {}
    st = cache.get(mix)
    if st is None:
        import CoolProp.CoolProp as CP

        st = CP.AbstractState("HEOS", "&".join(mix.internal))
        st.set_mole_fractions(list(mix.mole))
        cache[mix] = st
    return st


def _fresh(mix: Mixture):
    _local.states.pop(mix, None)
    return _state(mix)


def _do(mix: Mixture, key, a: float, b: float, what: str):
    st = _state(mix)
    try:
        st.update(key, a, b)
        vals = (st.T(), st.p(), 1.0 / st.rhomass(), st.umass(), st.hmass(), st.smass())
    except (ValueError, RuntimeError) as e:
        _fresh(mix)
        raise OutOfRange(
            f"mixture: the model found no {what} ({str(e)[:70]}); near the critical locus or "
            "outside the components' ranges"
        ) from None
    if not all(math.isfinite(v) for v in vals):
        raise OutOfRange(f"mixture: the model found no {what}")
    return st, vals


def saturation(mix: Mixture, by: str, value: float, x: float):
    """(T, P, v, u, h, s) at T or P with vapour fraction x (0 bubble, 1 dew).

    Parameters
    ----------
    mix : Mixture
        The mixture.
    by : str
        ``"T"`` or ``"P"``.
    value : float
        Temperature (K) or pressure (Pa).
    x : float
        Vapour fraction, 0–1.

    Returns
    -------
    tuple of float
        ``(T, P, v, u, h, s)`` in K, Pa, m³/kg, J/kg, J/(kg·K).

    Raises
    ------
    OutOfRange, NoConvergence
        No saturation state there, or the model's solver failed (near the critical locus).

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> T, P = saturation(parse("R32 0.5, R125 0.5 (mass)"), "P", 1e6, 0.0)[:2]
    >>> round(T - 273.15, 1)                                         # R410A bubble point
    7.2
    """
    import CoolProp.CoolProp as CP

    if not 0 <= x <= 1:
        raise OutOfRange(f"x = {fmt_value(x)}: the vapour fraction lies in 0 to 1")
    word = "bubble point" if x == 0 else "dew point" if x == 1 else "two-phase state"
    if by == "T":
        return _do(mix, CP.QT_INPUTS, x, value, word)[1]
    return _do(mix, CP.PQ_INPUTS, value, x, word)[1]


def at_TP(mix: Mixture, T: float, P: float):
    """(T, P, v, u, h, s) of a single-phase state; refused between bubble and dew point.

    Parameters
    ----------
    mix : Mixture
        The mixture.
    T : float
        Temperature (K).
    P : float
        Pressure (Pa).

    Returns
    -------
    tuple of float
        ``(T, P, v, u, h, s)`` in K, Pa, m³/kg, J/kg, J/(kg·K).

    Raises
    ------
    OutOfRange
        A two-phase (T, P), or one outside the model.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> ng = parse("methane 0.9, ethane 0.1")
    >>> round(1 / at_TP(ng, 300.0, 5e6)[2], 2)                       # density, kg/m3
    38.94
    """
    import CoolProp.CoolProp as CP

    if not (T > 0 and P > 0):
        raise BadInput("T and P of a mixture must be above 0 (absolute)")
    try:
        tb = saturation(mix, "P", P, 0.0)[0]
        td = saturation(mix, "P", P, 1.0)[0]
    except OutOfRange:
        tb = td = None  # above the cricondenbar, or the solver did not converge: no check
    if tb is not None and min(tb, td) < T < max(tb, td):
        raise BadInput(
            f"mixture: T = {fmt_value(T)} K lies between the bubble point {fmt_value(tb)} K and "
            f"the dew point {fmt_value(td)} K at this pressure: two phases; give x"
        )
    return _do(mix, CP.PT_INPUTS, P, T, "single-phase state")[1]


def derivative(mix: Mixture, T: float, P: float, want: str) -> float:
    """cp, cv, k or w of a single-phase state (T, P) of the mixture.

    Parameters
    ----------
    mix : Mixture
        The mixture.
    T : float
        Temperature (K).
    P : float
        Pressure (Pa).
    want : str
        ``cp``, ``cv``, ``k`` or ``w``.

    Returns
    -------
    float
        The value, SI.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> ng = parse("methane 0.9, ethane 0.1")
    >>> derivative(ng, 300.0, 5e6, "k") > 1.0
    True
    """
    import CoolProp.CoolProp as CP

    st = _do(mix, CP.PT_INPUTS, P, T, "single-phase state")[0]
    cp, cv = st.cpmass(), st.cvmass()
    val = {"cp": cp, "cv": cv, "k": cp / cv, "w": st.speed_sound()}[want]
    if not (math.isfinite(val) and val > 0):
        raise OutOfRange(f"mixture: {want} is not defined at this state")
    return val


def molar_mass(mix: Mixture) -> float:
    r"""Molar mass of the mixture.

    .. math:: M = \sum_i x_i M_i

    Parameters
    ----------
    mix : Mixture
        The mixture.

    Returns
    -------
    float
        M (kg/mol).

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.

    Examples
    --------
    >>> round(molar_mass(parse("methane 0.5, ethane 0.5")) * 1e3, 3)     # g/mol
    23.056
    """
    return sum(x * fluids.fluid_info(n).molar_mass for n, x in zip(mix.internal, mix.mole))
