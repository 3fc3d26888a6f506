"""End states of closed-system processes of a fixed mass, on a real fluid or an ideal gas.

Sign convention (stated in every help line): heat *into* the system is positive, work *done
by* the system is positive, so the first law of a closed system at rest reads

    Q − W = ΔU = m·(u2 − u1).

A process is a path from state 1 and one end condition.  Paths::

    ``rigid``                 v constant; W = 0 exactly
    ``isobaric``              P constant; W = m·P·(v2 − v1), Q = m·(h2 − h1)
    ``isothermal``            T constant; reversible, Q = m·T·(s2 − s1), W = Q − ΔU
                              (= −ΔA: the isotherm's ∫P dv on the equation of state, across the
                              saturation dome included)
    ``isentropic``            s constant; Q = 0, W = −ΔU
    ``polytropic n = …``      P·vⁿ = C; W = m·P1·v1·ln(r)·φ((1 − n)·ln r), r = v2/v1
    ``linear slope = … kPa/m3``  P = P1 + slope·(V − V1) (spring-loaded piston);
                              W = (P1 + P2)/2·(V2 − V1)
    ``stops P = …``           piston resting on stops: rigid until P reaches the lift-off
                              pressure, then isobaric at it
    ``stops V = …``           the reverse: isobaric at P1 until the volume reaches the stops,
                              then rigid

End conditions: V2, v2, P2, T2, x2, Q or W.  Every result has Q = ΔU + W by construction, and
an end condition given as Q or W is met to the root-finder's tolerance (≪ 1e-9 relative).
All values are SI.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

from ..errors import BadInput, JoulebookError, OutOfRange, fmt_value
from ..media import Point
from ..roots import brent
from ..units import UnitSystem, parse_unit
from .work import phi

__all__ = ["Path", "parse_path", "Segment", "Result", "solve", "END_SPECS", "path_points"]

END_SPECS = ("V2", "v2", "P2", "T2", "x2", "Q", "W")
PATHS = ("rigid", "isobaric", "isothermal", "isentropic", "polytropic", "linear", "stops")


@dataclass(frozen=True)
class Path:
    """A process path, its parameters in SI.

    Parameters
    ----------
    kind : str
        ``rigid``, ``isobaric``, ``isothermal``, ``isentropic``, ``polytropic``, ``linear`` or
        ``stops``.
    n : float, optional
        Polytropic exponent.
    slope : float, optional
        dP/dV of a linear path (Pa/m³).
    P_lift : float, optional
        Lift-off pressure of a piston on stops (Pa).
    V_stop : float, optional
        Volume at which the piston lands on the stops (m³).
    text : str
        The path text as written.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.units import unit_system
    >>> parse_path("polytropic n = 1.3", unit_system(None)).n
    1.3
    """

    kind: str
    n: float | None = None  # polytropic exponent
    slope: float | None = None  # Pa/m³, linear path on total volume
    P_lift: float | None = None  # Pa, stops: lift-off pressure
    V_stop: float | None = None  # m³, stops: volume at which the piston lands
    text: str = ""


_PARAM = re.compile(
    r"^\s*(?P<key>[A-Za-z]+)\s*=\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$"
)


def parse_path(text: str, system: UnitSystem) -> Path:
    """Parse path text such as ``"polytropic n = 1.3"`` or ``"stops P = 500 kPa"``.

    Parameters
    ----------
    text : str
        A path word and its parameters with units: ``rigid``, ``isobaric``, ``isothermal``,
        ``isentropic``, ``polytropic n = 1.3``, ``linear slope = 2000 kPa/m3``,
        ``stops P = 500 kPa`` or ``stops V = 0.1 m3``.
    system : UnitSystem
        Unit system of parameters written without a unit.

    Returns
    -------
    Path
        The path, SI.

    Raises
    ------
    BadInput
        Unknown path word, missing or malformed parameter.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.units import unit_system
    >>> parse_path("linear slope = 2000 kPa/m3", unit_system(None)).slope
    2000000.0
    """
    if not isinstance(text, str) or not text.strip():
        raise BadInput(f"path must be one of {', '.join(PATHS)} (got {text!r})")
    t = text.strip()
    word, _, rest = t.partition(" ")
    word = word.lower().rstrip(",:")
    aliases = {
        "constant-volume": "rigid",
        "isochoric": "rigid",
        "constant-pressure": "isobaric",
        "spring": "linear",
    }
    word = aliases.get(word, word)
    if word == "adiabatic":
        raise BadInput(
            f"path {text!r}: write isentropic for a reversible adiabatic process; an "
            "irreversible adiabatic one needs its work or its end state (Q = 0: W = -ΔU)"
        )
    if word not in PATHS:
        raise BadInput(f"path {text!r}: use one of {', '.join(PATHS)}")
    params = {}
    for part in [p for p in re.split(r"[,;]", rest) if p.strip()]:
        m = _PARAM.match(part)
        if not m:
            raise BadInput(f"path {text!r}: {part.strip()!r} is not 'name = value unit'")
        params[m.group("key")] = (float(m.group("num")), m.group("unit"))

    def need(key: str, example: str):
        if key not in params:
            raise BadInput(f"path {word} needs {key}, e.g. '{example}'")
        return params.pop(key)

    kw: dict = {}
    if word == "polytropic":
        n, unit = need("n", "polytropic n = 1.3")
        if unit:
            raise BadInput(f"path {text!r}: n has no unit")
        if not math.isfinite(n) or abs(n) > 50:
            raise OutOfRange(
                f"polytropic n = {fmt_value(n)} is outside −50…50 (use rigid for constant volume)"
            )
        kw["n"] = n
    elif word == "linear":
        val, unit = need("slope", "linear slope = 2000 kPa/m3")
        if "/" in unit:
            pu, vu = unit.rsplit("/", 1)
            k = parse_unit(pu, "pressure").factor / parse_unit(vu, "volume").factor
        elif unit:
            raise BadInput(f"path {text!r}: slope needs a pressure/volume unit such as kPa/m3")
        else:
            k = system.conv("pressure").factor / system.conv("volume").factor
        kw["slope"] = val * k
    elif word == "stops":
        for key, kind, field_name, words in (
            ("P", "pressure", "P_lift", "lift-off pressure"),
            ("V", "volume", "V_stop", "volume at the stops"),
        ):
            if key in params:
                val, unit = params.pop(key)
                conv = parse_unit(unit, kind) if unit else system.conv(kind)
                kw[field_name] = conv.to_si(val)
                if not kw[field_name] > 0:
                    raise OutOfRange(
                        f"stops {key} ({words}) must be > 0" + (" absolute" if key == "P" else "")
                    )
                break
        else:
            raise BadInput(
                "path stops needs P (lift-off pressure) or V (stop volume), e.g. 'stops P = 500 kPa'"
            )
    if params:
        raise BadInput(f"path {text!r}: unexpected parameter(s) {', '.join(params)}")
    return Path(word, text=t, **kw)


@dataclass
class Segment:
    """One piece of a solved path (a piston on stops has two).

    Parameters
    ----------
    kind : str
        The path word of the piece.
    start, end : Point
        Its end states.
    W : float
        Work done by the system over the piece (J).
    n : float, optional
        Polytropic exponent.
    slope : float, optional
        dP/dV of a linear piece (Pa/m³).

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> res = solve(air, air.point("T", 300.0, "P", 1e5), 1.0, Path("rigid"), "T2", 600.0)
    >>> [s.kind for s in res.segments], res.segments[0].W
    (['rigid'], 0.0)
    """

    kind: str
    start: Point
    end: Point
    W: float  # J, work by the system over the segment
    n: float | None = None
    slope: float | None = None


@dataclass
class Result:
    r"""The end state of a process and the energy it takes.

    .. math:: Q - W = \Delta U = m\,(u_2 - u_1)

    Parameters
    ----------
    m : float
        Mass (kg).
    p1, p2 : Point
        Initial and end states.
    W : float
        Work done by the system (J).
    segments : list of Segment
        The pieces of the path.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> res = solve(air, air.point("T", 300.0, "P", 1e5), 1.0, Path("isobaric"), "T2", 400.0)
    >>> round(res.Q - res.W - res.dU, 9)
    0.0
    """

    m: float
    p1: Point
    p2: Point
    W: float
    segments: list[Segment] = field(default_factory=list)

    @property
    def dU(self) -> float:
        """ΔU = m·(u2 − u1) (J)."""
        return self.m * (self.p2.u - self.p1.u)

    @property
    def dH(self) -> float:
        """ΔH = m·(h2 − h1) (J)."""
        return self.m * (self.p2.h - self.p1.h)

    @property
    def Q(self) -> float:
        """Heat into the system by the first law, Q = ΔU + W (J)."""
        return self.dU + self.W  # the first law, Q − W = ΔU


# ---------------------------------------------------------------------------------------
# segments: each returns (end point, W) for a target within it


def _work_isothermal(m: float, a: Point, b: Point) -> float:
    return m * (a.T * (b.s - a.s) - (b.u - a.u))


def _work_poly(m: float, a: Point, v2: float, n: float) -> float:
    lnr = math.log(v2 / a.v)
    return m * a.P * a.v * lnr * phi((1.0 - n) * lnr)


def _path_search(f, x0: float, what: str, lo_limit: float, hi_limit: float) -> float:
    """Root of f near x0 searching outward in both directions (geometric steps); unique."""
    f0 = f(x0)
    if f0 == 0.0:
        return x0
    found = []
    for direction in (1.0, -1.0):
        prev_x, prev_f = x0, f0
        step = 1e-3
        while True:
            x = x0 + direction * step
            if x < lo_limit or x > hi_limit:
                break
            try:
                fx = f(x)
            except JoulebookError:
                break
            if fx != fx:
                break
            if (fx > 0) != (prev_f > 0) or fx == 0.0:
                found.append(brent(f, prev_x, x, prev_f, fx, xtol=1e-15, rtol=1e-15, what=what))
                break
            prev_x, prev_f = x, fx
            step *= 1.6
    if not found:
        raise OutOfRange(
            f"{what}: the end condition is not reached along this path within the model"
        )
    if len(found) > 1:
        raise BadInput(
            f"{what}: the end condition is met both on expansion and on compression; give V2 or P2"
        )
    return found[0]


def _solve_param(
    med,
    p1: Point,
    m: float,
    state_at,
    work_at,
    end: str,
    value: float,
    what: str,
    x0: float,
    lo: float,
    hi: float,
):
    """Generic end-state search along a one-parameter path."""

    def f(x: float) -> float:
        p = state_at(x)
        if end == "T2":
            return p.T - value
        if end == "P2":
            return p.P - value
        if end == "v2":
            return p.v - value
        if end == "x2":
            if p.x is None:
                # outside the dome: continue the sign smoothly through the saturated ends
                return (
                    1.5
                    if p.phase
                    in (
                        "superheated vapor",
                        "gas above the critical temperature",
                        "supercritical fluid",
                    )
                    else -0.5
                ) - value
            return p.x - value
        if end == "W":
            return work_at(x, p) - value
        if end == "Q":
            return m * (p.u - p1.u) + work_at(x, p) - value
        raise BadInput(f"end condition {end} is not supported on this path")

    x = _path_search(f, x0, what, lo, hi)
    p = state_at(x)
    return p, work_at(x, p)


def _rigid(med, p1: Point, m: float, end: str, value: float, shows):
    rho = 1.0 / p1.v
    if end in ("V2", "v2"):
        if abs(value - p1.v) > 1e-12 * p1.v:
            raise BadInput(f"a rigid path keeps v = {fmt_value(p1.v)} m3/kg; V2 cannot change")
        raise BadInput("a rigid path keeps V constant: give P2, T2, x2 or Q as the end condition")
    if end == "W":
        if value != 0.0:
            raise BadInput("a rigid path does no boundary work (W = 0): give P2, T2, x2 or Q")
        raise BadInput("W = 0 on every rigid state: give P2, T2, x2 or Q")
    if end == "Q":
        p2 = med.point("rho", rho, "u", p1.u + value / m, shows)
    else:
        sym = {"P2": "P", "T2": "T", "x2": "x"}[end]
        p2 = med.point("rho", rho, sym, value, shows)
    return p2, 0.0


def _isobaric(med, p1: Point, m: float, end: str, value: float, shows, P: float | None = None):
    P = p1.P if P is None else P
    if end == "P2":
        raise BadInput("an isobaric path keeps P constant: give V2, T2, x2, Q or W")
    if end == "T2":
        p2 = med.point("P", P, "T", value, shows)
    elif end == "x2":
        p2 = med.point("P", P, "x", value, shows)
    elif end in ("V2", "v2"):
        p2 = med.point("P", P, "rho", 1.0 / (value / m if end == "V2" else value), shows)
    elif end == "Q":  # Q − W_other = ΔH at constant pressure (W_other = 0 here)
        p2 = med.point("P", P, "h", p1.h + value / m, shows)
    else:  # W = m·P·(v2 − v1)
        v2 = p1.v + value / (m * P)
        if not v2 > 0:
            raise OutOfRange(
                f"W = {fmt_value(value)} J would need a negative volume at this pressure"
            )
        p2 = med.point("P", P, "rho", 1.0 / v2, shows)
    return p2, m * P * (p2.v - p1.v)


def _isothermal(med, p1: Point, m: float, end: str, value: float, shows):
    T = p1.T
    if end == "T2":
        raise BadInput("an isothermal path keeps T constant: give V2, P2, x2, Q or W")
    if end == "Q":
        p2 = med.point("T", T, "s", p1.s + value / (m * T), shows)
    elif end == "P2":
        p2 = med.point("T", T, "P", value, shows)
    elif end == "x2":
        p2 = med.point("T", T, "x", value, shows)
    elif end in ("V2", "v2"):
        p2 = med.point("T", T, "rho", 1.0 / (value / m if end == "V2" else value), shows)
    else:

        def state_at(lnv):
            return med.point("T", T, "rho", math.exp(-lnv), shows)

        return _solve_param(
            med,
            p1,
            m,
            state_at,
            lambda x, p: _work_isothermal(m, p1, p),
            end,
            value,
            "isothermal path",
            math.log(p1.v),
            math.log(p1.v) - 30,
            math.log(p1.v) + 30,
        )
    return p2, _work_isothermal(m, p1, p2)


def _isentropic(med, p1: Point, m: float, end: str, value: float, shows):
    s = p1.s
    if end == "Q":
        if value != 0.0:
            raise BadInput("an isentropic path exchanges no heat (Q = 0): give V2, P2, T2, x2 or W")
        raise BadInput("Q = 0 on every isentropic state: give V2, P2, T2, x2 or W")
    if end == "W":
        p2 = med.point("s", s, "u", p1.u - value / m, shows)
    else:
        sym = {"P2": "P", "T2": "T", "x2": "x", "V2": "rho", "v2": "rho"}[end]
        val = 1.0 / (value / m if end == "V2" else value) if end in ("V2", "v2") else value
        p2 = med.point("s", s, sym, val, shows)
    return p2, -m * (p2.u - p1.u)


def _polytropic(med, p1: Point, m: float, end: str, value: float, shows, n: float):
    C = p1.P * p1.v**n

    def state_at_v(v):
        return med.point("P", C / v**n, "rho", 1.0 / v, shows)

    if end in ("V2", "v2", "P2"):
        if end == "P2":
            if n == 0.0:
                raise BadInput("polytropic n = 0 is isobaric: P2 cannot change")
            if not value > 0:
                raise OutOfRange("P2 must be > 0 (absolute)")
            v2 = p1.v * (p1.P / value) ** (1.0 / n)
        else:
            v2 = value / m if end == "V2" else value
            if not v2 > 0:
                raise OutOfRange("V2 must be > 0")
        p2 = state_at_v(v2)
        return p2, _work_poly(m, p1, v2, n)

    def state_at(lnv):
        return state_at_v(math.exp(lnv))

    return _solve_param(
        med,
        p1,
        m,
        state_at,
        lambda x, p: _work_poly(m, p1, math.exp(x), n),
        end,
        value,
        f"polytropic path n = {fmt_value(n)}",
        math.log(p1.v),
        math.log(p1.v) - 30,
        math.log(p1.v) + 30,
    )


def _linear(med, p1: Point, m: float, end: str, value: float, shows, slope: float):
    V1 = m * p1.v

    def state_at_V(V):
        P = p1.P + slope * (V - V1)
        if not P > 0:
            raise OutOfRange(
                f"the spring line reaches P = {fmt_value(P)} Pa ≤ 0 at V = {fmt_value(V)} m3"
            )
        return med.point("P", P, "rho", m / V, shows)

    def work(V, p):
        return 0.5 * (p1.P + p.P) * (V - V1)

    if end in ("V2", "v2", "P2"):
        if end == "P2":
            if slope == 0.0:
                raise BadInput("a zero slope is isobaric: P2 cannot change")
            V2 = V1 + (value - p1.P) / slope
        else:
            V2 = value if end == "V2" else value * m
        if not V2 > 0:
            raise OutOfRange("the end volume must be > 0")
        p2 = state_at_V(V2)
        return p2, work(V2, p2)
    return _solve_param(
        med, p1, m, state_at_V, work, end, value, "linear (spring) path", V1, V1 * 1e-6, V1 * 1e6
    )


def _stops(med, p1: Point, m: float, end: str, value: float, shows, path: Path) -> Result:
    """Piston on stops: two segments, the end condition decides where the process stops."""
    if path.P_lift is not None:
        P_lift = path.P_lift
        if p1.P >= P_lift * (1 - 1e-12):
            raise BadInput(
                f"stops P = {fmt_value(P_lift / 1e3)} kPa: the initial pressure {fmt_value(p1.P / 1e3)} kPa "
                "already lifts the piston; use isobaric"
            )
        pA, _ = _rigid(med, p1, m, "P2", P_lift, shows)  # the piston just lifts
        seg1 = ("rigid", p1, pA, 0.0)
        first_done = {
            "T2": (value - p1.T) * (value - pA.T) <= 0,
            "P2": value <= P_lift,
            "Q": value <= m * (pA.u - p1.u),
            "x2": pA.x is not None and p1.x is not None and (value - p1.x) * (value - pA.x) <= 0,
            "V2": False,
            "v2": False,
            "W": value <= 0.0,
        }[end]
        if first_done:
            p2, W = _rigid(med, p1, m, end, value, shows)
            return Result(m, p1, p2, W, [Segment("rigid", p1, p2, W)])
        rest = value - m * (pA.u - p1.u) if end == "Q" else value
        p2, W2 = _isobaric(med, pA, m, end, rest, shows)
        return Result(m, p1, p2, W2, [Segment(*seg1), Segment("isobaric", pA, p2, W2)])
    # landing on stops: isobaric at P1 down to V_stop, then rigid
    v_stop = path.V_stop / m
    if v_stop >= p1.v * (1 - 1e-12):
        raise BadInput(
            f"stops V = {fmt_value(path.V_stop)} m3 is not below the initial volume {fmt_value(m * p1.v)} m3"
        )
    pA, WA = _isobaric(med, p1, m, "v2", v_stop, shows)
    QA = m * (pA.u - p1.u) + WA
    first_done = {
        "T2": (value - p1.T) * (value - pA.T) <= 0,
        "Q": value >= QA,
        "W": value >= WA,
        "V2": value >= path.V_stop,
        "v2": value >= v_stop,
        "x2": pA.x is not None and p1.x is not None and (value - p1.x) * (value - pA.x) <= 0,
        "P2": False,
    }[end]
    if first_done:
        p2, W = _isobaric(med, p1, m, end, value, shows)
        return Result(m, p1, p2, W, [Segment("isobaric", p1, p2, W)])
    if end == "W":
        raise BadInput("below the stops the volume is fixed: W cannot exceed the isobaric part")
    rest = value - QA if end == "Q" else value
    p2, _ = _rigid(med, pA, m, end, rest, shows)
    return Result(m, p1, p2, WA, [Segment("isobaric", p1, pA, WA), Segment("rigid", pA, p2, 0.0)])


def solve(med, p1: Point, m: float, path: Path, end: str, value: float, shows=None) -> Result:
    r"""End state of mass *m* from *p1* along *path* until *end* = *value* (SI).

    Every result closes the first law of the closed system at rest:

    .. math:: Q = \Delta U + W, \qquad W = \int P\,dV

    Parameters
    ----------
    med : medium
        The substance (:func:`joulebook.core.media.medium`).
    p1 : Point
        The initial state.
    m : float
        Mass (kg), > 0.
    path : Path
        The path (:func:`parse_path`).
    end : str
        The end condition: one of ``V2 v2 P2 T2 x2 Q W``.
    value : float
        Its SI value.
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    Result
        End state, work and the segments of the path.

    Raises
    ------
    BadInput
        End condition that the path cannot change (P2 on an isobar …) or an ambiguous one.
    OutOfRange
        The end condition is not reached within the property model.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> water = medium("water")
    >>> res = solve(water, water.point("P", 101325.0, "x", 0.0), 1.0, Path("isobaric"), "x2", 1.0)
    >>> round(res.Q / 1e3, 2)                                     # h_fg at 1 atm, kJ
    2256.47
    """
    if not m > 0 or not math.isfinite(m):
        raise BadInput(f"mass = {fmt_value(m)} must be > 0")
    if end not in END_SPECS:
        raise BadInput(f"end condition {end!r}: use one of {', '.join(END_SPECS)}")
    if not math.isfinite(value):
        raise BadInput("end_value is not a finite number")
    if end == "x2" and med.ideal:
        raise BadInput(f"{med.name} is modelled as an ideal gas: it has no quality x")
    k = path.kind
    if k == "stops":
        return _stops(med, p1, m, end, value, shows, path)
    if k == "rigid":
        p2, W = _rigid(med, p1, m, end, value, shows)
    elif k == "isobaric":
        p2, W = _isobaric(med, p1, m, end, value, shows)
    elif k == "isothermal":
        p2, W = _isothermal(med, p1, m, end, value, shows)
    elif k == "isentropic":
        p2, W = _isentropic(med, p1, m, end, value, shows)
    elif k == "polytropic":
        p2, W = _polytropic(med, p1, m, end, value, shows, path.n)
    elif k == "linear":
        p2, W = _linear(med, p1, m, end, value, shows, path.slope)
    else:  # pragma: no cover - parse_path admits only the kinds above
        raise BadInput(f"unknown path {k}")
    return Result(m, p1, p2, W, [Segment(k, p1, p2, W, n=path.n, slope=path.slope)])


# ---------------------------------------------------------------------------------------
# points along a solved path, for charts


def _segment_points(med, seg: Segment, m: float, N: int, shows) -> list[Point]:
    a, b = seg.start, seg.end
    k = seg.kind
    pts = []
    for i in range(N):
        f = i / (N - 1) if N > 1 else 1.0
        if i == 0:
            pts.append(a)
            continue
        if i == N - 1:
            pts.append(b)
            continue
        if k == "rigid":
            pts.append(med.point("rho", 1.0 / a.v, "u", a.u + f * (b.u - a.u), shows))
        elif k == "isobaric":
            pts.append(med.point("P", a.P, "h", a.h + f * (b.h - a.h), shows))
        elif k == "isothermal":
            v = a.v * (b.v / a.v) ** f
            pts.append(med.point("T", a.T, "rho", 1.0 / v, shows))
        elif k == "isentropic":
            v = a.v * (b.v / a.v) ** f
            pts.append(med.point("s", a.s, "rho", 1.0 / v, shows))
        elif k == "polytropic":
            v = a.v * (b.v / a.v) ** f
            pts.append(med.point("P", a.P * (a.v / v) ** seg.n, "rho", 1.0 / v, shows))
        elif k == "linear":
            V = m * (a.v + f * (b.v - a.v))
            pts.append(med.point("P", a.P + seg.slope * (V - m * a.v), "rho", m / V, shows))
        else:  # pragma: no cover
            raise BadInput(f"no points for path {k}")
    return pts


def path_points(med, res: Result, N: int, shows=None) -> list[Point]:
    """N points from state 1 to state 2 along the solved path (shared corners once).

    Parameters
    ----------
    med : medium
        The substance.
    res : Result
        A solved process.
    N : int
        Number of points, 2–10000.
    shows : dict, optional
        Units the inputs were written in, for messages.

    Returns
    -------
    list of Point
        The states along the path, first and last the end states.

    Raises
    ------
    BadInput
        N outside 2–10000.

    References
    ----------
    .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
       McGraw-Hill, 2019, §4-1 to §4-5 (closed systems: boundary work, energy balance).

    Examples
    --------
    >>> from joulebook.core.media import medium
    >>> air = medium("air | k = 1.4")
    >>> res = solve(air, air.point("T", 300.0, "P", 1e5), 1.0, Path("isothermal"), "P2", 2e5)
    >>> pts = path_points(air, res, 5)
    >>> len(pts), {round(p.T, 9) for p in pts}
    (5, {300.0})
    """
    if not 2 <= N <= 10_000:
        raise BadInput(f"points = {N}: use 2 to 10000")
    segs = res.segments
    if len(segs) == 1:
        return _segment_points(med, segs[0], res.m, N, shows)
    n1 = max(2, N // 2)
    n2 = max(2, N - n1 + 1)
    first = _segment_points(med, segs[0], res.m, n1, shows)
    second = _segment_points(med, segs[1], res.m, n2, shows)
    return first + second[1:]
