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

__all__ = ["Mixture", "parse", "BLENDS", "MODEL", "is_mixture_text", "Envelope", "envelope"]

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


@dataclass(frozen=True)
class Envelope:
    """The phase envelope of a mixture: the bubble (Q = 0) and dew (Q = 1) lines traced by
    the model from low pressure round the critical point, with its extremes.

    Parameters
    ----------
    T, P, Q : tuple of float
        The traced points (K, Pa, 0 bubble / 1 dew), in order along the line.
    cricondenbar : float
        The highest pressure of two phases (Pa).
    cricondentherm : float
        The highest temperature of two phases (K).
    feed, incipient : tuple of tuple of float
        Per point, the mole fractions of the feed and of the incipient phase.
    rho_feed, rho_incipient : tuple of float
        Per point, their molar densities (mol/m³).

    References
    ----------
    .. [1] M. L. Michelsen, "Calculation of phase envelopes and critical points for
       multicomponent mixtures", Fluid Phase Equilib. 4 (1980) 1–10.

    Examples
    --------
    >>> env = envelope(parse("methane 0.9, ethane 0.1"))
    >>> env.cricondenbar > 5e6
    True
    """

    T: tuple[float, ...]
    P: tuple[float, ...]
    Q: tuple[float, ...]
    cricondenbar: float
    cricondentherm: float
    feed: tuple[tuple[float, ...], ...] = ()
    incipient: tuple[tuple[float, ...], ...] = ()
    rho_feed: tuple[float, ...] = ()
    rho_incipient: tuple[float, ...] = ()


@lru_cache(maxsize=64)
def envelope(mix: Mixture) -> Envelope | None:
    """The mixture's phase envelope, or None when the model cannot trace it.

    Parameters
    ----------
    mix : Mixture
        The mixture.

    Returns
    -------
    Envelope or None
        The traced bubble and dew lines.

    References
    ----------
    .. [1] M. L. Michelsen, "Calculation of phase envelopes and critical points for
       multicomponent mixtures", Fluid Phase Equilib. 4 (1980) 1–10.

    Examples
    --------
    >>> env = envelope(parse("propane 0.7, n-butane 0.3"))
    >>> round(env.cricondentherm)                     # K
    391
    """
    import CoolProp.CoolProp as CP

    st = CP.AbstractState("HEOS", "&".join(mix.internal))
    st.set_mole_fractions(list(mix.mole))
    try:
        st.build_phase_envelope("")
        pe = st.get_phase_envelope_data()
        T, P, Q = (tuple(float(v) for v in a) for a in (pe.T, pe.p, pe.Q))
        # the library keeps the feed as "y" and the incipient phase as "x" on both lines
        feed = [tuple(float(c[i]) for c in pe.y) for i in range(len(T))]
        inc = [tuple(float(c[i]) for c in pe.x) for i in range(len(T))]
        r_feed, r_inc = list(pe.rhomolar_vap), list(pe.rhomolar_liq)
    except (ValueError, RuntimeError, IndexError):
        return None
    ok = [i for i in range(len(T)) if math.isfinite(T[i]) and math.isfinite(P[i]) and P[i] > 0]
    if len(ok) < 10:
        return None
    T, P, Q = (tuple(a[i] for i in ok) for a in (T, P, Q))
    return Envelope(
        T, P, Q, max(P), max(T),
        tuple(feed[i] for i in ok), tuple(inc[i] for i in ok),
        tuple(float(r_feed[i]) for i in ok), tuple(float(r_inc[i]) for i in ok),
    )  # fmt: skip


def _crossings(env: Envelope, by: str, value: float, branch: float | None):
    """Where the envelope crosses the isobar (by P) or isotherm (by T): (T, P, Q) of each
    crossing, interpolated in (T, ln P) between the traced points; *branch* 0 or 1 keeps
    only the bubble or the dew line, None keeps both and closes the curve at low pressure."""
    n = len(env.T)
    pairs = [(i, i + 1) for i in range(n - 1)]
    if branch is None:
        pairs.append((n - 1, 0))
    out = []
    for i, j in pairs:
        a, b = (env.P[i], env.P[j]) if by == "P" else (env.T[i], env.T[j])
        if a == b or (a - value) * (b - value) > 0:
            continue
        if by == "P":
            f = (math.log(value) - math.log(a)) / (math.log(b) - math.log(a))
        else:
            f = (value - a) / (b - a)
        q = env.Q[i] if f < 0.5 else env.Q[j]
        if branch is not None and q != branch:
            continue
        T = env.T[i] + f * (env.T[j] - env.T[i])
        P = math.exp(math.log(env.P[i]) + f * (math.log(env.P[j]) - math.log(env.P[i])))
        if not any(abs(T - c[0]) < 1e-9 and abs(P - c[1]) < 1e-6 for c in out):
            out.append((T, P, q, i, j, f))
    return out


def _guesses(env: Envelope, crossing, x: float):
    """The library's starting values for a bubble or dew point from an envelope crossing."""
    import CoolProp.CoolProp as CP

    T, P, _, i, j, f = crossing

    def mix(a, b):
        return [u + f * (v - u) for u, v in zip(a, b)]

    g = CP.PyGuessesStructure()
    g.T, g.p = T, P
    feed, inc = mix(env.feed[i], env.feed[j]), mix(env.incipient[i], env.incipient[j])
    rf = env.rho_feed[i] + f * (env.rho_feed[j] - env.rho_feed[i])
    ri = env.rho_incipient[i] + f * (env.rho_incipient[j] - env.rho_incipient[i])
    if x == 0:  # bubble: the feed is the liquid
        g.x, g.y, g.rhomolar_liq, g.rhomolar_vap = feed, inc, rf, ri
    else:
        g.x, g.y, g.rhomolar_liq, g.rhomolar_vap = inc, feed, ri, rf
    return g


def _incipient_differs(st, x: float, mix: Mixture) -> bool:
    """Does the incipient phase of a bubble (x = 0) or dew (x = 1) point differ from the
    feed?  The trivial solution (both phases the feed) is no saturation point."""
    try:
        other = st.mole_fractions_vapor() if x == 0 else st.mole_fractions_liquid()
    except (ValueError, RuntimeError):
        return False
    return max(abs(a - b) for a, b in zip(other, mix.mole)) > 1e-6


def _solve_on_envelope(mix: Mixture, by: str, value: float, x: float, crossing):
    """The bubble or dew point the model's solver finds from the envelope's crossing, taken
    only near that crossing and off the trivial solution; None otherwise."""
    import CoolProp.CoolProp as CP

    key, a, b = (CP.QT_INPUTS, x, value) if by == "T" else (CP.PQ_INPUTS, value, x)
    env = envelope(mix)
    for with_guess in (True, False):
        st = CP.AbstractState("HEOS", "&".join(mix.internal))
        st.set_mole_fractions(list(mix.mole))
        try:
            if with_guess and env is not None:
                st.update_with_guesses(key, a, b, _guesses(env, crossing, x))
            else:
                st.update(key, a, b)
            T, P = st.T(), st.p()
            vals = (T, P, 1.0 / st.rhomass(), st.umass(), st.hmass(), st.smass())
        except (ValueError, RuntimeError):
            continue
        near = abs(T - crossing[0]) <= 0.5 + 2e-3 * crossing[0]
        near = near and abs(math.log(P / crossing[1])) <= 0.02
        if near and _incipient_differs(st, x, mix) and all(math.isfinite(v) for v in vals):
            return vals
    return None


def _edge_word(env: Envelope, by: str) -> str:
    if by == "P":
        return f"the cricondenbar {fmt_value(env.cricondenbar / 1e3)} kPa"
    return f"the cricondentherm {fmt_value(env.cricondentherm)} K"


def saturation(mix: Mixture, by: str, value: float, x: float):
    """(T, P, v, u, h, s) at T or P with vapour fraction x (0 bubble, 1 dew).

    The bubble and dew points are found on the mixture's phase envelope: above its
    cricondenbar (by P) or cricondentherm (by T) there is none; where the line is crossed
    twice (the retrograde region near the critical point) the two points are named and
    refused; the model's solver is taken only where it lands on the envelope's crossing and
    off the trivial solution (incipient phase = feed).

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
    OutOfRange, BadInput
        No saturation state there, two of them, or the model's solver failed (near the
        critical locus).

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.
    .. [2] M. L. Michelsen, "Calculation of phase envelopes and critical points for
       multicomponent mixtures", Fluid Phase Equilib. 4 (1980) 1–10.

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
    unit, shown = ("K", fmt_value(value)) if by == "T" else ("kPa", fmt_value(value / 1e3))
    env = envelope(mix)
    if env is not None:
        top = env.cricondenbar if by == "P" else env.cricondentherm
        if value > top:
            raise OutOfRange(
                f"mixture: no {word} at {by} = {shown} {unit}: above {_edge_word(env, by)}, "
                "the mixture is single-phase"
            )
        ends = [q for q in (0.0, 1.0) if x in (0.0, 1.0) and q == x] or [0.0, 1.0]
        found = {q: _crossings(env, by, value, q) for q in ends}
        for q, cr in found.items():
            w = "bubble point" if q == 0 else "dew point"
            if not cr:
                raise OutOfRange(
                    f"mixture: no {w} at {by} = {shown} {unit} (near the critical point, "
                    f"below {_edge_word(env, by)}, only one of the two lines is crossed)"
                )
            if len(cr) > 1:
                other = "T" if by == "P" else "P"
                at = ", ".join(
                    fmt_value(c[0]) + " K" if other == "T" else fmt_value(c[1] / 1e3) + " kPa"
                    for c in cr
                )
                raise BadInput(
                    f"mixture: {by} = {shown} {unit} crosses the {w} line {len(cr)} times "
                    f"({other} = {at}; retrograde region near the critical point); give {other}"
                )
        if x in (0.0, 1.0):
            got = _solve_on_envelope(mix, by, value, x, found[x][0])
            if got is None:
                raise OutOfRange(
                    f"mixture: the model's solver found no {word} at {by} = {shown} {unit} on "
                    "the phase envelope (near the critical locus)"
                )
            return got
    key, a, b = (CP.QT_INPUTS, x, value) if by == "T" else (CP.PQ_INPUTS, value, x)
    st, vals = _do(mix, key, a, b, word)
    if x in (0.0, 1.0) and not _incipient_differs(st, x, mix):
        _fresh(mix)
        raise OutOfRange(f"mixture: the model found only the trivial solution for the {word}")
    return vals


def at_TP(mix: Mixture, T: float, P: float):
    """(T, P, v, u, h, s) of a single-phase state; refused inside the phase envelope.

    The phase is decided on the mixture's phase envelope (an isobar crossing the envelope's
    lines an odd number of times below T lies inside), its crossings near T refined by the
    model's bubble and dew solver; where no envelope can be traced the bubble and dew points
    at P decide, and when neither can be found the state is refused rather than assumed
    single-phase.

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
    BadInput, OutOfRange
        A two-phase (T, P), one whose phase cannot be established, or one outside the model.

    References
    ----------
    .. [1] O. Kunz, W. Wagner, "The GERG-2008 wide-range equation of state for natural gases and
       other mixtures", J. Chem. Eng. Data 57 (2012) 3032–3091.
    .. [2] M. L. Michelsen, "Calculation of phase envelopes and critical points for
       multicomponent mixtures", Fluid Phase Equilib. 4 (1980) 1–10.

    Examples
    --------
    >>> ng = parse("methane 0.9, ethane 0.1")
    >>> round(1 / at_TP(ng, 300.0, 5e6)[2], 2)                       # density, kg/m3
    38.94
    """
    import CoolProp.CoolProp as CP

    if not (T > 0 and P > 0):
        raise BadInput("T and P of a mixture must be above 0 (absolute)")
    inside, lines = _inside(mix, T, P)
    if inside:
        raise BadInput(
            f"mixture: T = {fmt_value(T)} K, P = {fmt_value(P / 1e3)} kPa lies inside the phase "
            f"envelope ({lines}): two phases; give x"
        )
    return _do(mix, CP.PT_INPUTS, P, T, "single-phase state")[1]


def _inside(mix: Mixture, T: float, P: float) -> tuple[bool, str]:
    """Is (T, P) two-phase?  With the words naming the lines crossed at P."""
    env = envelope(mix)
    if env is not None and (P > env.cricondenbar or T > env.cricondentherm):
        return False, ""
    if env is not None and P >= min(env.P):
        cr = _crossings(env, "P", P, None)
        temps = []
        for c in cr:
            Tc, q = c[0], c[2]
            if abs(Tc - T) < 0.5:  # close to a line: the model's own point there decides
                got = _solve_on_envelope(mix, "P", P, q, c)
                Tc = got[0] if got is not None else Tc
            temps.append((Tc, q))
        below = sum(1 for Tc, _ in temps if Tc < T)
        words = ", ".join(
            f"{'bubble' if q == 0 else 'dew'} point {fmt_value(Tc)} K" for Tc, q in sorted(temps)
        )
        return below % 2 == 1, words
    # no envelope (or below its lowest pressure): the bubble and dew points at P decide
    try:
        tb = saturation(mix, "P", P, 0.0)[0]
        td = saturation(mix, "P", P, 1.0)[0]
    except (OutOfRange, BadInput):
        raise OutOfRange(
            f"mixture: the phase at T = {fmt_value(T)} K, P = {fmt_value(P / 1e3)} kPa cannot "
            "be established (the model finds no bubble and dew point there); not answered"
        ) from None
    if tb > td:
        raise OutOfRange(
            f"mixture: the model's bubble point {fmt_value(tb)} K lies above its dew point "
            f"{fmt_value(td)} K at P = {fmt_value(P / 1e3)} kPa; the phase is not established"
        )
    return tb < T < td, f"bubble point {fmt_value(tb)} K, dew point {fmt_value(td)} K"


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
