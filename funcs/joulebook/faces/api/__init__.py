"""The Pythonic face: states, processes and energy terms with units, over the same core.

A notebook user writes a state with quantities and reads quantities back::

    >>> from joulebook import Q_, State
    >>> st = State("water", T=Q_(25, "degC"), P=Q_(2, "bar"), m=Q_(3, "kg"))
    >>> st.h.to("kJ/kg")                                   # doctest: +ELLIPSIS
    <Quantity(105.0..., 'kilojoule / kilogram')>
    >>> end = st.rigid(T2=Q_(30, "degC"))
    >>> end.P2.to("bar")                                   # doctest: +ELLIPSIS
    <Quantity(33.49..., 'bar')>

Everything here is a thin layer: values are converted to SI once, handed to the same core
functions the worksheet cells use (:mod:`joulebook.core.media`, :mod:`joulebook.core.processes`,
:mod:`joulebook.core.firstlaw`), and the SI results are wrapped as quantities of the project's
one pint registry (:func:`joulebook.core.units.registry`) [1]_.  Plain numbers are read as SI (K, Pa,
m³, kg, J).  numpy arrays broadcast element by element, as a worksheet column does (a
pandas Series is taken as its values, in order, and the results are numpy arrays in the same
order); the first failing element raises its project error (:class:`BadInput`,
:class:`OutOfRange`, :class:`NoConvergence`) with its index in the message.

Sign convention: heat *into* the system and work *done by* the system are positive, so
Q − W = ΔU for a closed system at rest [2]_.

References
----------
.. [1] H. E. Grecco et al., *Pint: makes units easy*, https://pint.readthedocs.io (the
   quantity type used here).
.. [2] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
   McGraw-Hill, 2019, ch. 4 (energy analysis of closed systems).
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from joulebook.catalog.quantities import StateLike
from joulebook.core import firstlaw
from joulebook.core.errors import BadInput, JoulebookError
from joulebook.core.media import Point, medium
from joulebook.core.processes import blockedin, solve, work
from joulebook.core.substances import fluids
from joulebook.core.units import KIND_WORDS, SYMBOLS, Conv, registry, unit_system

__all__ = [
    "Q_",
    "State",
    "Process",
    "work_isobaric",
    "work_isothermal",
    "work_polytropic",
    "work_linear",
    "work_pv",
    "heat",
    "balance_gap",
    "delta_ke",
    "delta_pe",
    "blocked_in_p2",
    "relief_thermal_flow",
]

#: anything the API takes for a number: a pint quantity, a float, an array or a Series
QuantityLike = Any

#: the SI unit each quantity kind is returned in (pint spelling)
_SI = {
    "temperature": "K",
    "temperature_difference": "K",
    "pressure": "Pa",
    "specific_volume": "m**3/kg",
    "density": "kg/m**3",
    "specific_energy": "J/kg",
    "specific_entropy": "J/(kg*K)",
    "specific_heat": "J/(kg*K)",
    "volume": "m**3",
    "mass": "kg",
    "energy": "J",
    "power": "W",
    "length": "m",
    "speed": "m/s",
    "acceleration": "m/s**2",
    "expansion_coefficient": "1/K",
    "compressibility": "1/Pa",
    "joule_thomson": "K/Pa",
    "dynamic_viscosity": "Pa*s",
    "kinematic_viscosity": "m**2/s",
    "thermal_conductivity": "W/(m*K)",
    "surface_tension": "N/m",
    "volume_flow": "m**3/s",
    "modulus": "Pa",
    "dimensionless": "dimensionless",
}
_POINT_FIELDS = ("T", "P", "v", "u", "h", "s")
_END_SPECS = solve.END_SPECS
_SI_SYSTEM = "K-Pa-J"


def Q_(value: QuantityLike, unit: str = "") -> Any:
    """A quantity of the project's one unit registry.

    Parameters
    ----------
    value : float or array_like
        The magnitude.
    unit : str
        A unit pint reads (``"degC"``, ``"bar"``, ``"kJ/kg"``, ``"L"``), plus the project's
        own definitions (``Btu_it``, ``TR``, ``scf``, ``inch_water``) and gauge pressures
        (``barg``, ``kPag``, ``MPag``, ``mbarg``, ``psig``, ``Pag``: offset units against
        the atmosphere :func:`joulebook.core.units.set_gauge_atmosphere` states, 101.325 kPa by
        default; like ``degC`` they are converted before arithmetic).  Empty: dimensionless.

    Returns
    -------
    pint.Quantity
        ``value`` in ``unit``, of the registry :func:`joulebook.core.units.registry` returns.

    Raises
    ------
    BadInput
        Unknown unit.

    References
    ----------
    .. [1] pint documentation, *Defining quantities*, https://pint.readthedocs.io.

    Examples
    --------
    >>> Q_(2, "bar").to("kPa")
    <Quantity(200.0, 'kilopascal')>
    >>> Q_(25, "degC").to("K")
    <Quantity(298.15, 'kelvin')>
    >>> Q_(0.5, "barg").to("kPa")                        # doctest: +ELLIPSIS
    <Quantity(151.325..., 'kilopascal')>
    """
    ureg = registry()
    if type(value).__module__.startswith("pandas"):
        value = np.asarray(value, dtype=float)  # a Series is taken as its values, in order
    try:
        return ureg.Quantity(value, unit or "dimensionless")
    except Exception:
        raise BadInput(f"unknown unit {unit!r}; write a unit such as degC, bar, kJ/kg") from None


# ---------------------------------------------------------------------------------------
# values in, values out


def _is_quantity(value: object) -> bool:
    if "pint" not in sys.modules:
        return False
    import pint

    return isinstance(value, pint.Quantity)


def _si(value: QuantityLike, kind: str, arg: str) -> np.ndarray:
    """*value* as SI floats of quantity *kind* (a quantity converted, a number as given)."""
    if value is None:
        raise BadInput(f"{arg} is missing: give a {KIND_WORDS[kind]}")
    if isinstance(value, str | bytes):
        raise BadInput(
            f"{arg} = {value!r} is text: give a number or a quantity such as Q_(25, 'degC')"
        )
    if _is_quantity(value):
        try:
            value = value.to(_SI[kind]).magnitude
        except Exception:
            raise BadInput(
                f"{arg} = {value:~P} is not a {KIND_WORDS[kind]}; give one in e.g. {_SI[kind]}"
            ) from None
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise BadInput(f"{arg} = {value!r} is not a number") from None
    if not np.all(np.isfinite(arr)):
        raise BadInput(f"{arg} holds a value that is not a finite number (NaN or inf)")
    return arr


def _out(values: Any, kind: str) -> Any:
    """SI *values* (a float or an array) as a quantity of *kind*."""
    if isinstance(values, np.ma.MaskedArray):
        return registry().Quantity(values.astype(float), _SI[kind])
    arr = np.asarray(values, dtype=float)
    mag: Any = float(arr) if arr.ndim == 0 else arr
    return registry().Quantity(mag, _SI[kind])


def _each(fn: Callable[..., Any], *arrays: np.ndarray) -> Any:
    """``fn`` applied element by element over the broadcast *arrays* (an object array, or a
    single value for scalars); the first project error is raised with its index."""
    try:
        grid = np.broadcast_arrays(*arrays)
    except ValueError:
        shapes = ", ".join(str(np.shape(a)) for a in arrays)
        raise BadInput(f"the arrays given do not broadcast together (shapes {shapes})") from None
    shape = grid[0].shape
    if shape == ():
        return fn(*(float(a) for a in grid))
    out = np.empty(shape, dtype=object)
    for idx in np.ndindex(shape):
        try:
            out[idx] = fn(*(float(a[idx]) for a in grid))
        except JoulebookError as e:
            raise type(e)(f"at index {idx}: {e.message}") from None
    return out


def _floats(values: Any) -> Any:
    """Floats of *values*; an object array holding None (masked states) as a masked array."""
    if isinstance(values, np.ma.MaskedArray):
        return values.astype(float)
    if isinstance(values, np.ndarray):
        missing = np.frompyfunc(lambda v: v is None, 1, 1)(values).astype(bool)
        if missing.any():
            filled = np.where(missing, 0.0, values)
            return np.ma.masked_array(filled.astype(float), mask=missing)
        return values.astype(float)
    return float(values)


def _conv_of(unit: Any) -> Conv:
    """The SI map of a pint unit, for messages in the unit the user gave (si = x·f + offset)."""
    ureg = registry()
    zero = ureg.Quantity(0.0, unit).to_base_units().magnitude
    one = ureg.Quantity(1.0, unit).to_base_units().magnitude
    return Conv(float(one - zero), float(zero), f"{unit:~P}")


# ---------------------------------------------------------------------------------------
# states


def _as_written(phrase: Any, value: float) -> Any:
    """A state text's value as a quantity in its own unit when pint reads that unit to the
    same SI value as the worksheet does (``25 degC``, ``2 barg``); else the SI number (a
    worksheet-only spelling such as ``m3/kg`` or ``kPag @ 95 kPa`` is never guessed at)."""
    si = float(phrase.conv.to_si(value))
    if not phrase.unit or phrase.kind not in _SI or phrase.kind == "dimensionless":
        return si
    try:
        q = registry().Quantity(value, phrase.unit)
        same = abs(float(q.to(_SI[phrase.kind]).magnitude) - si) <= 1e-12 * max(abs(si), 1.0)
    except Exception:  # pint does not read the worksheet spelling: keep the SI number
        return si
    return q if same else si


def _spec_of(med: Any, p: Point) -> tuple[str, float, str, float]:
    """Two properties that fix *p* again on its medium (for properties not in a Point)."""
    if p.x is not None:
        return "T", p.T, "x", p.x
    if type(med).__name__ == "RealMedium":
        return "T", p.T, "rho", 1.0 / p.v
    return "T", p.T, "P", p.P


class State(StateLike):
    """A state of a substance, fixed by two properties given as quantities or SI numbers.

    The properties read back are quantities in the units the state was given in (T given in
    degC reads back in degC, P in barg in barg; gauge units are read against the registry's
    atmosphere, see :func:`joulebook.core.units.set_gauge_atmosphere`), any other quantity in SI
    units; convert them with ``.to(...)`` or ``.m_as(...)``.  Range errors name the values in
    the units given.

    A state of arrays behaves as an array of states: ``len(st)``, ``st[3]``, ``st[1:4]``,
    ``st[st.mask == False]``, ``for one in st``, :meth:`to_dict`, :meth:`to_frame`.  With
    ``errors="mask"`` the elements that cannot be fixed are masked (:attr:`mask`) with the
    reason (:attr:`reasons`) instead of raising; their properties read as masked values.
    With the mass (``m``) or the total volume (``V``) the state is a closed system that the
    process methods (:meth:`rigid`, :meth:`isobaric`, :meth:`isothermal`,
    :meth:`isentropic`, :meth:`polytropic`, :meth:`linear`, :meth:`stops`) take to an end
    state.

    Parameters
    ----------
    substance : str
        Substance text as in a worksheet: ``"water"``, ``"R134a"``, ``"air (ideal gas)"``
        (c_p(T) of the gas's equation of state), ``"air | k = 1.4"`` (constant c_p),
        ``"water (IF97)"``, a mixture ``"methane 0.9, ethane 0.1"``.
    T, P, v, rho, u, h, s, x : quantity or float or array_like, optional
        Exactly two of: temperature (K), pressure (Pa, absolute), specific volume (m³/kg),
        density (kg/m³), specific internal energy (J/kg), specific enthalpy (J/kg), specific
        entropy (J/(kg·K)), quality (0–1).  Arrays broadcast against each other.
    m : quantity or float or array_like, optional
        Mass of the system (kg).
    V : quantity or float or array_like, optional
        Total volume of the system (m³); the mass is then m = V/v.  Give m or V, not both.
    errors : {"raise", "mask"}, optional
        For arrays: ``"raise"`` (default) raises the first failing element's error with its
        index; ``"mask"`` masks the failing elements and keeps their reasons.

    Raises
    ------
    BadInput
        Not exactly two properties, a value of the wrong dimension, unknown substance.
    OutOfRange
        The state lies outside the substance's model.

    See Also
    --------
    joulebook.core.media.medium : the substance text and the models behind it.

    Notes
    -----
    The state is found by the same flash as ``JB_PROP``; the thermodynamic relations are

    .. math:: v = 1/\\rho, \\qquad h = u + P\\,v .

    References
    ----------
    .. [1] E. W. Lemmon et al., reference equations of state via CoolProp, see
       :mod:`joulebook.core.substances.fluids`.

    Examples
    --------
    >>> from joulebook import Q_, State
    >>> st = State("water", T=Q_(25, "degC"), P=Q_(2, "bar"))
    >>> st.phase
    'compressed liquid'
    >>> round(st.cp.to("kJ/(kg*K)").magnitude, 4)
    4.181
    >>> hot = State("water", T=Q_([100, 200], "degC"), x=1)
    >>> hot.P.to("bar").magnitude.round(4)
    array([ 1.0142, 15.5493])
    >>> State("water", T=Q_(25, "degC"), P=Q_(0.5, "barg"))
    <State water: T = 25 °C, P = 0.5 barg, compressed liquid>
    >>> col = State("water", T=Q_([20, 150, 3000], "degC"), P=Q_(1, "bar"), errors="mask")
    >>> len(col), col.mask.tolist()
    (3, [False, False, True])
    >>> col[0].phase, col[1].phase
    ('compressed liquid', 'superheated vapor')
    """

    def __init__(
        self,
        substance: str,
        *,
        T: QuantityLike = None,
        P: QuantityLike = None,
        v: QuantityLike = None,
        rho: QuantityLike = None,
        u: QuantityLike = None,
        h: QuantityLike = None,
        s: QuantityLike = None,
        x: QuantityLike = None,
        m: QuantityLike = None,
        V: QuantityLike = None,
        errors: str = "raise",
    ) -> None:
        if not isinstance(substance, str) or not substance.strip():
            raise BadInput(f"substance must be a fluid name such as 'water' (got {substance!r})")
        given = {
            k: val
            for k, val in (
                ("T", T), ("P", P), ("v", v), ("rho", rho), ("u", u), ("h", h), ("s", s),
                ("x", x),
            )
            if val is not None
        }  # fmt: skip
        if len(given) != 2:
            names = ", ".join(given) or "none"
            raise BadInput(
                f"{substance}: give exactly two of T, P, v, rho, u, h, s, x (got {names})"
            )
        if errors not in ("raise", "mask"):
            raise BadInput(f"errors = {errors!r}: give 'raise' or 'mask'")
        (a, va), (b, vb) = given.items()
        self._med = medium(substance, unit_system(_SI_SYSTEM))
        self._units = {
            SYMBOLS[k]: val.units
            for k, val in (*given.items(), ("m", m), ("V", V))
            if _is_quantity(val) and SYMBOLS[k] != "dimensionless"
        }
        sa, sb = _si(va, SYMBOLS[a], a), _si(vb, SYMBOLS[b], b)
        try:
            ga, gb = np.broadcast_arrays(sa, sb)
        except ValueError:
            raise BadInput(
                f"{a} and {b} do not broadcast together (shapes {sa.shape}, {sb.shape})"
            ) from None
        self._spec: tuple[str, np.ndarray, str, np.ndarray] | None = (a, ga, b, gb)
        self._why: Any = None
        self._pts = self._fix(a, ga, b, gb, errors == "mask")
        self._m = self._mass(m, V)

    # --- construction ----------------------------------------------------------------
    @classmethod
    def _of(cls, med: Any, pts: Any, m: Any, units: dict | None = None) -> State:
        st = cls.__new__(cls)
        st._med, st._pts, st._spec, st._m = med, pts, None, m
        st._units, st._why = dict(units or {}), None
        return st

    def _shows(self) -> dict[str, Conv]:
        """Symbol -> the SI map of the unit given, for messages in the user's units."""
        return {
            sym: _conv_of(self._units[kind])
            for sym, kind in SYMBOLS.items()
            if kind in self._units and sym in ("T", "P", "v", "rho", "u", "h", "s")
        }

    def _fix(self, a: str, ga: np.ndarray, b: str, gb: np.ndarray, mask: bool) -> Any:
        """The points of the state (an object array for arrays); failures raise, with the
        index, or (*mask*) leave None and their error in ``self._why``."""
        med, shows = self._med, self._shows() or None
        if ga.shape == ():
            return med.point(a, float(ga), b, float(gb), shows)
        out = np.empty(ga.shape, dtype=object)
        why = np.full(ga.shape, None, dtype=object)
        for idx in np.ndindex(ga.shape):
            try:
                out[idx] = med.point(a, float(ga[idx]), b, float(gb[idx]), shows)
            except JoulebookError as e:
                if not mask:
                    raise type(e)(f"at index {idx}: {e.message}") from None
                why[idx] = e
        if mask:
            self._why = why
        return out

    def cell_text(self) -> Any:
        """The state text a worksheet call takes (an array of texts for an array state).

        Returns
        -------
        str or numpy.ndarray
            :attr:`text`, element by element for arrays.

        Raises
        ------
        BadInput
            Masked elements (take ``st[~st.mask]`` first).

        Examples
        --------
        >>> State("water", T=300, P=2e5).cell_text()
        'water | T = 300 K | P = 200000 Pa'
        """
        if not isinstance(self._pts, np.ndarray):
            return self.text
        if self.mask.any():
            raise BadInput("the state has masked elements: take st[~st.mask] first")
        out = np.empty(self._pts.shape, dtype=object)
        for idx in np.ndindex(self._pts.shape):
            out[idx] = self[idx].text
        return out

    # --- an array of states ----------------------------------------------------------
    def __len__(self) -> int:
        if not isinstance(self._pts, np.ndarray):
            raise TypeError("a single State has no len(); it is not an array of states")
        return len(self._pts)

    def __iter__(self) -> Any:
        for i in range(len(self)):
            yield self[i]

    def __getitem__(self, key: Any) -> State:
        pts = self._pts
        if not isinstance(pts, np.ndarray):
            raise TypeError("a single State cannot be indexed; it is not an array of states")
        if isinstance(key, State):
            raise TypeError("index a State with integers, slices or a boolean mask")
        try:
            sub = pts[key]
        except IndexError as e:
            raise IndexError(f"State index {key!r}: {e} (shape {pts.shape})") from None
        why = None if self._why is None else self._why[key]
        if isinstance(why, JoulebookError):  # a single masked element: its own error
            raise type(why)(f"element {key!r} is masked: {why.message}")
        st = State._of(self._med, sub, None, self._units)
        if self._spec is not None:
            a, ga, b, gb = self._spec
            st._spec = (a, ga[key], b, gb[key])
        if self._m is not None:
            st._m = np.broadcast_to(self._m, pts.shape)[key]
        if isinstance(sub, np.ndarray):
            st._why = why
        return st

    @property
    def mask(self) -> Any:
        """Boolean array, True where the element could not be fixed (``errors="mask"``);
        False for a single state."""
        if not isinstance(self._pts, np.ndarray):
            return False
        if self._why is None:
            return np.zeros(self._pts.shape, dtype=bool)
        return np.frompyfunc(lambda e: e is not None, 1, 1)(self._why).astype(bool)

    @property
    def reasons(self) -> Any:
        """Object array: the error message of each masked element, None elsewhere."""
        if not isinstance(self._pts, np.ndarray):
            return None
        if self._why is None:
            return np.full(self._pts.shape, None, dtype=object)
        return np.frompyfunc(lambda e: None if e is None else e.cell_text(), 1, 1)(self._why)

    def to_dict(self, *names: str) -> dict[str, Any]:
        """Properties by symbol, as quantities (masked where the state is masked).

        Parameters
        ----------
        *names : str
            Property symbols as :meth:`prop` takes (default ``T P v u h s phase``).

        Returns
        -------
        dict
            Symbol -> quantity (the phase: text); ``"reason"`` too when elements are masked.

        Examples
        --------
        >>> st = State("water", T=Q_([20, 40], "degC"), P=Q_(1, "bar"))
        >>> st.to_dict("T", "phase")["T"]
        <Quantity([20. 40.], 'degree_Celsius')>
        """
        out = {name: self.prop(name) for name in (names or _TABLE)}
        if isinstance(self._pts, np.ndarray) and self._why is not None and self.mask.any():
            out["reason"] = self.reasons
        return out

    def to_frame(self, *names: str) -> Any:
        """The properties as a pandas DataFrame, one row per state (pandas must be installed).

        Parameters
        ----------
        *names : str
            Property symbols (default ``T P v u h s phase``).

        Returns
        -------
        pandas.DataFrame
            Columns ``"T [°C]"``, ``"P [bar]"`` … (the unit in the header, floats below);
            masked rows hold no value (NaN) and a ``reason`` column says why.

        Raises
        ------
        BadInput
            pandas is not installed (use :meth:`to_dict`), or a state of more than one axis.

        Examples
        --------
        >>> st = State("water", T=Q_([20, 40], "degC"), P=Q_(1, "bar"))
        >>> list(st.to_frame("T", "P").columns)
        ['T [°C]', 'P [bar]']
        """
        try:
            import pandas as pd
        except ImportError:
            raise BadInput("to_frame needs pandas (pip install pandas); use to_dict()") from None
        if isinstance(self._pts, np.ndarray) and self._pts.ndim != 1:
            raise BadInput(f"to_frame takes a 1-D state (shape {self._pts.shape}); ravel it")
        cols: dict[str, Any] = {}
        for name, val in self.to_dict(*names).items():
            if _is_quantity(val):
                mag = val.magnitude
                data = mag.filled(np.nan) if isinstance(mag, np.ma.MaskedArray) else mag
                cols[f"{name} [{val.units:~P}]"] = np.atleast_1d(data)
            else:
                cols[name] = np.atleast_1d(np.asarray(val, dtype=object))
        return pd.DataFrame(cols)

    @classmethod
    def from_text(cls, text: str, m: QuantityLike = None, V: QuantityLike = None) -> State:
        """The state a worksheet state text fixes, e.g. ``water | T = 25 degC | P = 2 bar``.

        Parameters
        ----------
        text : str
            State text as ``JB_STATE`` writes it.
        m : quantity or float, optional
            Mass of the system (kg).
        V : quantity or float, optional
            Total volume of the system (m³).

        Returns
        -------
        State
            The same state as the text.

        References
        ----------
        .. [1] docs/design.md §3 (state text).

        Examples
        --------
        >>> st = State.from_text("water | T = 25 degC | P = 200 kPa")
        >>> st.P                                   # in the unit of the text, as pint reads it
        <Quantity(200.0, 'kilopascal')>
        """
        from joulebook.core.states import parse_state

        parsed = parse_state(text)
        given: dict[str, Any] = {}
        for phrase, value in parsed.specs:
            given[phrase.symbol] = _as_written(phrase, value)
        return cls(parsed.fluid, **given, m=m, V=V)

    def _mass(self, m: QuantityLike, V: QuantityLike) -> Any:
        if m is not None and V is not None:
            raise BadInput("give the mass m or the volume V of the system, not both")
        if m is not None:
            mass = _si(m, "mass", "m")
            if not np.all(mass > 0):
                raise BadInput("m: the mass of the system must be > 0")
            return mass
        if V is not None:
            vol = _si(V, "volume", "V")
            if not np.all(vol > 0):
                raise BadInput("V: the volume of the system must be > 0")
            return vol / _floats(self._field("v"))
        return None

    # --- reading -----------------------------------------------------------------------
    def _map(self, fn: Callable[[Any, Point], Any]) -> Any:
        """``fn(idx, point)`` over the points (masked elements give None; with errors="mask"
        a property that fails on an element is None there too)."""
        pts = self._pts
        if not isinstance(pts, np.ndarray):
            return fn((), pts)
        out = np.full(pts.shape, None, dtype=object)
        for idx in np.ndindex(pts.shape):
            if pts[idx] is None:
                continue
            try:
                out[idx] = fn(idx, pts[idx])
            except JoulebookError as e:
                if self._why is None:
                    raise type(e)(f"at index {idx}: {e.message}") from None
        return out

    def _field(self, name: str) -> Any:
        return self._map(lambda idx, p: getattr(p, name))

    def _read(self, want: str) -> Any:
        """SI values (floats or text) of property *want*."""
        if want in _POINT_FIELDS or want == "phase":
            return self._field(want)
        if want == "rho":
            return self._map(lambda idx, p: 1.0 / p.v)
        med = self._med
        if self._spec is not None:
            a, ga, b, gb = self._spec
            return self._map(lambda idx, p: med.read(want, a, float(ga[idx]), b, float(gb[idx])))
        return self._map(lambda idx, p: med.read(want, *_spec_of(med, p)))

    def prop(self, name: str) -> Any:
        """Any property the worksheet's ``JB_PROP`` offers, as a quantity in SI units.

        Parameters
        ----------
        name : str
            A property symbol: ``T P v rho u h s x cp cv k Z w beta kappa mu_JT Tsat Psat``,
            transport ``mu nu lambda Pr sigma`` (real fluids), or ``phase`` (text).

        Returns
        -------
        pint.Quantity or str or numpy.ndarray
            The value in SI units (K, Pa, m³/kg, J/kg, J/(kg·K), …); the phase is text.

        Raises
        ------
        BadInput
            Unknown property name.
        OutOfRange
            The property is not defined at this state (x of a superheated vapour, cp in the
            two-phase region, transport properties of an ideal gas).

        References
        ----------
        .. [1] docs/functions.md, ``JB_PROP`` (the list of properties and their models).

        Examples
        --------
        >>> st = State("water", T=Q_(20, "degC"), P=Q_(1, "atm"))
        >>> st.prop("beta")                                # doctest: +ELLIPSIS
        <Quantity(0.000206..., '1 / kelvin')>
        """
        if name == "phase":
            return self._read("phase")
        if name not in fluids.OUTPUTS or name not in SYMBOLS:
            raise BadInput(f"unknown property {name!r}; use one of {' '.join(fluids.OUTPUTS)}")
        return self._as_given(_out(_floats(self._read(name)), SYMBOLS[name]), SYMBOLS[name])

    def _as_given(self, q: Any, kind: str) -> Any:
        """*q* in the unit the state was given its quantity of *kind* in (else SI)."""
        unit = self._units.get(kind)
        return q if unit is None else q.to(unit)

    @property
    def T(self) -> Any:
        """Temperature (K)."""
        return self.prop("T")

    @property
    def P(self) -> Any:
        """Pressure, absolute (Pa)."""
        return self.prop("P")

    @property
    def v(self) -> Any:
        """Specific volume (m³/kg)."""
        return self.prop("v")

    @property
    def rho(self) -> Any:
        """Density (kg/m³)."""
        return self.prop("rho")

    @property
    def u(self) -> Any:
        """Specific internal energy (J/kg)."""
        return self.prop("u")

    @property
    def h(self) -> Any:
        """Specific enthalpy h = u + P·v (J/kg)."""
        return self.prop("h")

    @property
    def s(self) -> Any:
        """Specific entropy (J/(kg·K))."""
        return self.prop("s")

    @property
    def x(self) -> Any:
        """Quality, the vapour's mass fraction (saturated states only; OutOfRange else)."""
        return self.prop("x")

    @property
    def cp(self) -> Any:
        """Isobaric specific heat (J/(kg·K))."""
        return self.prop("cp")

    @property
    def cv(self) -> Any:
        """Isochoric specific heat (J/(kg·K))."""
        return self.prop("cv")

    @property
    def k(self) -> Any:
        """Ratio of specific heats cp/cv."""
        return self.prop("k")

    @property
    def Z(self) -> Any:
        """Compressibility factor P·v/(R·T)."""
        return self.prop("Z")

    @property
    def w(self) -> Any:
        """Speed of sound (m/s)."""
        return self.prop("w")

    @property
    def phase(self) -> Any:
        """The phase in words (``'compressed liquid'``, ``'saturated mixture'`` …)."""
        return self.prop("phase")

    @property
    def m(self) -> Any:
        """Mass of the system (kg); BadInput when the state was given without m or V."""
        return self._as_given(_out(self._need_mass(), "mass"), "mass")

    @property
    def V(self) -> Any:
        """Total volume m·v of the system (m³)."""
        vol = _out(self._need_mass() * _floats(self._field("v")), "volume")
        return self._as_given(vol, "volume")

    @property
    def substance(self) -> str:
        """The substance text of the state's model (``'water'``, ``'air (ideal gas)'``)."""
        return str(self._med.text())

    @property
    def text(self) -> str:
        """The state as worksheet state text (SI units, every digit kept); scalars only."""
        if isinstance(self._pts, np.ndarray):
            raise BadInput("a state of arrays has no single state text; index it first")
        from joulebook.core.states import format_number

        a, va, b, vb = (
            (self._spec[0], float(self._spec[1][()]), self._spec[2], float(self._spec[3][()]))
            if self._spec is not None
            else _spec_of(self._med, self._pts)
        )
        unit = {"T": "K", "P": "Pa", "v": "m3/kg", "rho": "kg/m3", "u": "J/kg", "h": "J/kg"}
        unit.update({"s": "J/(kg*K)", "x": ""})
        parts = [self.substance]
        for sym, val in ((a, va), (b, vb)):
            parts.append(f"{sym} = {format_number(val)} {unit[sym]}".rstrip())
        return " | ".join(parts)

    def __repr__(self) -> str:
        pts = self._pts
        if isinstance(pts, np.ndarray):
            masked = int(self.mask.sum())
            tail = f", {masked} masked" if masked else ""
            return f"<State {self.substance}: {pts.size} states, shape {pts.shape}{tail}>"
        T, P = self.T, self.P
        return (
            f"<State {self.substance}: T = {T.magnitude:.6g} {T.units:~P}, "
            f"P = {P.magnitude:.6g} {P.units:~P}, {pts.phase}>"
        )

    def _need_mass(self) -> Any:
        if self._m is None:
            raise BadInput(
                "the state has no mass: give m (kg) or V (m3) to State(...) or to the process"
            )
        return self._m

    # --- processes ----------------------------------------------------------------------
    def process(self, path: str, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """The end state along *path* with one end condition, and the energy it takes.

        The first law of the closed system at rest closes every result:

        .. math:: Q - W = \\Delta U = m\\,(u_2 - u_1)

        Parameters
        ----------
        path : str
            Path text as in ``JB_PROCESS`` with SI numbers: ``"rigid"``, ``"isobaric"``,
            ``"isothermal"``, ``"isentropic"``, ``"polytropic n = 1.3"``,
            ``"linear slope = 2e6 Pa/m3"``, ``"stops P = 5e5 Pa"``.
        m : quantity or float or array_like, optional
            Mass (kg); defaults to the state's own (given as m or V).
        **end : quantity or float or array_like
            Exactly one end condition: ``V2`` (m³), ``v2`` (m³/kg), ``P2`` (Pa), ``T2`` (K),
            ``x2``, ``Q`` (J, heat in) or ``W`` (J, work by the system).

        Returns
        -------
        Process
            End state, work, heat, ΔU and ΔH.

        Raises
        ------
        BadInput
            Unknown path, not exactly one end condition, no mass.
        OutOfRange
            The end condition is not reached within the property model.

        References
        ----------
        .. [1] Y. A. Çengel, M. A. Boles, *Thermodynamics: An Engineering Approach*, 9th ed.,
           2019, §4-1 to §4-5.

        Examples
        --------
        >>> gas = State("air (ideal gas)", T=Q_(300, "K"), P=Q_(1, "bar"), m=Q_(1, "kg"))
        >>> r = gas.process("isobaric", T2=Q_(400, "K"))
        >>> round(r.W.to("kJ").magnitude, 3)               # m·R·ΔT
        28.705
        """
        if len(end) != 1 or next(iter(end)) not in _END_SPECS:
            raise BadInput(
                f"give exactly one end condition of {', '.join(_END_SPECS)} "
                f"(got {', '.join(end) or 'none'})"
            )
        ((sym, val),) = end.items()
        pth = solve.parse_path(path, unit_system(_SI_SYSTEM))
        value = _si(val, "volume" if sym == "V2" else _END_KIND[sym], sym)
        mass = self._need_mass() if m is None else _si(m, "mass", "m")
        if isinstance(self._pts, np.ndarray) and self.mask.any():
            raise BadInput("the state has masked elements: take st[~st.mask] first")
        med, pts = self._med, self._pts
        pts_arr = pts if isinstance(pts, np.ndarray) else np.asarray(pts, dtype=object)
        index = np.arange(pts_arr.size).reshape(pts_arr.shape)

        shows = self._shows() or None  # messages in the units the state was given in

        def one(i: float, mm: float, target: float) -> solve.Result:
            p1 = pts_arr.reshape(-1)[int(i)]
            if sym == "V2":
                return solve.solve(med, p1, mm, pth, "v2", target / mm, shows)
            return solve.solve(med, p1, mm, pth, sym, target, shows)

        res = _each(one, index, mass, value)
        return Process._from(self, path, res)

    def rigid(self, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """Constant volume: W = 0, Q = ΔU.  End condition as in :meth:`process`.

        Examples
        --------
        >>> st = State("water", T=Q_(20, "degC"), P=Q_(1, "bar"), m=Q_(1, "kg"))
        >>> round(st.rigid(T2=Q_(25, "degC")).P2.to("bar").magnitude, 1)
        26.8
        """
        return self.process("rigid", m=m, **end)

    def isobaric(self, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """Constant pressure: W = m·P·(v2 − v1), Q = ΔH.  End condition as in :meth:`process`.

        Examples
        --------
        >>> pot = State("water", P=Q_(1, "atm"), x=0, m=Q_(1, "kg"))
        >>> round(pot.isobaric(x2=1).Q.to("kJ").magnitude, 1)  # h_fg at 1 atm
        2256.5
        """
        return self.process("isobaric", m=m, **end)

    def isothermal(self, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """Constant temperature, reversible: Q = m·T·(s2 − s1), W = Q − ΔU.

        Examples
        --------
        >>> gas = State("nitrogen (ideal gas)", T=300, P=1e5, m=1)
        >>> r = gas.isothermal(P2=Q_(2, "bar"))
        >>> round(float(r.W / (r.Q)), 12)                 # ΔU = 0 for an ideal gas
        1.0
        """
        return self.process("isothermal", m=m, **end)

    def isentropic(self, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """Constant entropy: Q = 0, W = −ΔU.  End condition as in :meth:`process`.

        Examples
        --------
        >>> gas = State("air | k = 1.4", T=300, P=1e5, m=1)
        >>> round(gas.isentropic(P2=Q_(8, "bar")).T2.magnitude, 1)  # 300·8^(0.4/1.4)
        543.4
        """
        return self.process("isentropic", m=m, **end)

    def polytropic(self, n: float, *, m: QuantityLike = None, **end: QuantityLike) -> Process:
        """Along P·vⁿ = const with exponent *n*.  End condition as in :meth:`process`.

        Parameters
        ----------
        n : float
            Polytropic exponent (−50…50).
        m : quantity or float, optional
            Mass (kg); defaults to the state's own.
        **end : quantity or float
            One end condition, as in :meth:`process`.

        Returns
        -------
        Process
            End state, W, Q, ΔU, ΔH.

        Examples
        --------
        >>> gas = State("air | k = 1.4", T=300, P=1e5, V=Q_(1, "L"))
        >>> r = gas.polytropic(1.3, P2=Q_(10, "bar"))
        >>> round(r.W.to("J").magnitude, 1)  # (P1·V1 − P2·V2)/(n − 1), negative: compression
        -233.8
        """
        return self.process(f"polytropic n = {float(n)!r}", m=m, **end)

    def linear(
        self, slope: QuantityLike, *, m: QuantityLike = None, **end: QuantityLike
    ) -> Process:
        """Pressure linear in volume, P = P1 + slope·(V − V1) (a spring-loaded piston).

        Parameters
        ----------
        slope : quantity or float
            dP/dV of the spring (Pa/m³).
        m : quantity or float, optional
            Mass (kg); defaults to the state's own.
        **end : quantity or float
            One end condition, as in :meth:`process`.

        Returns
        -------
        Process
            End state, W = (P1 + P2)/2·(V2 − V1), Q, ΔU, ΔH.

        Examples
        --------
        >>> gas = State("air | k = 1.4", T=300, P=1e5, V=Q_(1, "L"))
        >>> r = gas.linear(Q_(100, "kPa/L"), V2=Q_(2, "L"))
        >>> r.W.to("J")                                      # doctest: +ELLIPSIS
        <Quantity(150.0..., 'joule')>
        """
        k = float(_si_slope(slope))
        return self.process(f"linear slope = {k!r} Pa/m3", m=m, **end)

    def stops(
        self,
        *,
        P_lift: QuantityLike = None,
        V_stop: QuantityLike = None,
        m: QuantityLike = None,
        **end: QuantityLike,
    ) -> Process:
        """A piston on stops: rigid until P reaches *P_lift*, then isobaric at it (or
        isobaric until the volume reaches *V_stop*, then rigid).

        Parameters
        ----------
        P_lift : quantity or float, optional
            Lift-off pressure of the piston (Pa).
        V_stop : quantity or float, optional
            Volume at which the piston lands on the stops (m³).
        m : quantity or float, optional
            Mass (kg); defaults to the state's own.
        **end : quantity or float
            One end condition, as in :meth:`process`.

        Returns
        -------
        Process
            End state, W, Q, ΔU, ΔH.

        Examples
        --------
        >>> st = State("air | k = 1.4", T=300, P=1e5, V=Q_(1, "L"))
        >>> r = st.stops(P_lift=Q_(2, "bar"), T2=Q_(900, "K"))
        >>> r.W.to("J")                                      # doctest: +ELLIPSIS
        <Quantity(100.0..., 'joule')>
        """
        if (P_lift is None) == (V_stop is None):
            raise BadInput("stops: give the lift-off pressure P_lift or the stop volume V_stop")
        if P_lift is not None:
            p = float(_si(P_lift, "pressure", "P_lift"))
            return self.process(f"stops P = {p!r} Pa", m=m, **end)
        vol = float(_si(V_stop, "volume", "V_stop"))
        return self.process(f"stops V = {vol!r} m3", m=m, **end)


#: the properties of to_dict and to_frame by default
_TABLE = ("T", "P", "v", "u", "h", "s", "phase")

_END_KIND = {
    "v2": "specific_volume",
    "P2": "pressure",
    "T2": "temperature",
    "x2": "dimensionless",
    "Q": "energy",
    "W": "energy",
}


def _si_slope(slope: QuantityLike) -> np.ndarray:
    if _is_quantity(slope):
        try:
            return np.asarray(slope.to("Pa/m**3").magnitude, dtype=float)
        except Exception:
            raise BadInput(f"slope = {slope:~P} is not a pressure per volume (Pa/m3)") from None
    return _si(slope, "pressure", "slope")


@dataclass(frozen=True)
class Process:
    """The result of a process: start and end states and the energy terms, as quantities.

    Attributes
    ----------
    start, end : State
        The states before and after (with the mass).
    path : str
        The path text solved.
    W : pint.Quantity
        Boundary work done by the system (J).
    Q : pint.Quantity
        Heat into the system (J), Q = ΔU + W.
    dU, dH : pint.Quantity
        Changes of internal energy and enthalpy m·(u2 − u1), m·(h2 − h1) (J).

    References
    ----------
    .. [1] docs/sign-convention.md (the project's sign convention).

    Examples
    --------
    >>> st = State("air | k = 1.4", T=300, P=1e5, m=1)
    >>> r = st.rigid(T2=600)
    >>> r.Q == r.dU, r.W.magnitude
    (True, 0.0)
    """

    start: State
    end: State
    path: str
    W: Any
    Q: Any
    dU: Any
    dH: Any

    @classmethod
    def _from(cls, start: State, path: str, res: Any) -> Process:
        def take(fn: Callable[[solve.Result], Any]) -> Any:
            if isinstance(res, np.ndarray):
                return np.vectorize(fn, otypes=[object])(res)
            return fn(res)

        end = State._of(
            start._med, take(lambda r: r.p2), _floats(take(lambda r: r.m)), start._units
        )
        return cls(
            start,
            end,
            path,
            _out(_floats(take(lambda r: r.W)), "energy"),
            _out(_floats(take(lambda r: r.Q)), "energy"),
            _out(_floats(take(lambda r: r.dU)), "energy"),
            _out(_floats(take(lambda r: r.dH)), "energy"),
        )

    @property
    def T2(self) -> Any:
        """End temperature (K)."""
        return self.end.T

    @property
    def P2(self) -> Any:
        """End pressure (Pa)."""
        return self.end.P

    @property
    def V2(self) -> Any:
        """End volume (m³)."""
        return self.end.V

    @property
    def x2(self) -> Any:
        """End quality (saturated end states only)."""
        return self.end.x


# ---------------------------------------------------------------------------------------
# work, first law, blocked-in liquid


def _apply(fn: Callable[..., float], args: list[tuple[QuantityLike, str, str]], kind: str) -> Any:
    """*fn* over the SI values of *args* ((value, kind, name) each), as a quantity of *kind*."""
    arrays = [_si(a, k, name) for a, k, name in args]
    return _out(_floats(_each(fn, *arrays)), kind)


def _opt(value: QuantityLike) -> QuantityLike:
    return 0.0 if value is None else value


def work_isobaric(P: QuantityLike, V1: QuantityLike, V2: QuantityLike) -> Any:
    """Boundary work at constant pressure.

    .. math:: W = P\\,(V_2 - V_1)

    Parameters
    ----------
    P : quantity or float or array_like
        Pressure (Pa).
    V1, V2 : quantity or float or array_like
        Initial and final volume (m³).

    Returns
    -------
    pint.Quantity
        Work done by the system (J), positive on expansion.

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 4-2 (common practice).

    Examples
    --------
    >>> work_isobaric(Q_(2, "bar"), Q_(1, "L"), Q_(3, "L"))
    <Quantity(400.0, 'joule')>
    """
    return _apply(
        work.isobaric, [(P, "pressure", "P"), (V1, "volume", "V1"), (V2, "volume", "V2")], "energy"
    )


def work_isothermal(P1: QuantityLike, V1: QuantityLike, V2: QuantityLike) -> Any:
    """Boundary work of an ideal gas at constant temperature.

    .. math:: W = P_1 V_1 \\ln(V_2/V_1)

    Parameters
    ----------
    P1 : quantity or float or array_like
        Initial pressure (Pa, absolute).
    V1, V2 : quantity or float or array_like
        Initial and final volume (m³).

    Returns
    -------
    pint.Quantity
        Work done by the system (J).

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 4-7.

    Examples
    --------
    >>> round(work_isothermal(Q_(1, "bar"), Q_(1, "L"), Q_(2, "L")).magnitude, 3)
    69.315
    """
    return _apply(
        work.isothermal,
        [(P1, "pressure", "P1"), (V1, "volume", "V1"), (V2, "volume", "V2")],
        "energy",
    )


def work_polytropic(P1: QuantityLike, V1: QuantityLike, V2: QuantityLike, n: QuantityLike) -> Any:
    """Boundary work along P·Vⁿ = const.

    .. math:: W = \\frac{P_2 V_2 - P_1 V_1}{1 - n}, \\quad P_2 = P_1 (V_1/V_2)^n

    (continuous through n = 1, where it is P1·V1·ln(V2/V1)).

    Parameters
    ----------
    P1 : quantity or float or array_like
        Initial pressure (Pa, absolute).
    V1, V2 : quantity or float or array_like
        Initial and final volume (m³).
    n : float or array_like
        Polytropic exponent.

    Returns
    -------
    pint.Quantity
        Work done by the system (J).

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 4-9.

    Examples
    --------
    >>> round(work_polytropic(Q_(1, "bar"), Q_(1, "L"), Q_(0.5, "L"), 1.3).magnitude, 2)
    -77.05
    """
    return _apply(
        work.polytropic_n,
        [
            (P1, "pressure", "P1"),
            (V1, "volume", "V1"),
            (V2, "volume", "V2"),
            (n, "dimensionless", "n"),
        ],
        "energy",
    )


def work_linear(P1: QuantityLike, V1: QuantityLike, P2: QuantityLike, V2: QuantityLike) -> Any:
    """Boundary work with P linear in V (a spring-loaded piston).

    .. math:: W = \\frac{P_1 + P_2}{2} (V_2 - V_1)

    Parameters
    ----------
    P1, P2 : quantity or float or array_like
        Initial and final pressure (Pa).
    V1, V2 : quantity or float or array_like
        Initial and final volume (m³).

    Returns
    -------
    pint.Quantity
        Work done by the system (J).

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, §4-1 (area under a straight
       line, common practice).

    Examples
    --------
    >>> work_linear(Q_(1, "bar"), Q_(1, "L"), Q_(3, "bar"), Q_(2, "L"))
    <Quantity(200.0, 'joule')>
    """
    return _apply(
        work.linear,
        [
            (P1, "pressure", "P1"),
            (V1, "volume", "V1"),
            (P2, "pressure", "P2"),
            (V2, "volume", "V2"),
        ],
        "energy",
    )


def work_pv(P: QuantityLike, V: QuantityLike, method: str = "trapezoid") -> Any:
    """Boundary work ∫P dV of measured (P, V) pairs.

    .. math:: W \\approx \\sum_i \\frac{P_i + P_{i+1}}{2} (V_{i+1} - V_i)

    Parameters
    ----------
    P : quantity or array_like
        Pressures (Pa), in path order.
    V : quantity or array_like
        Volumes (m³), same length.
    method : str
        ``trapezoid`` (default) or ``polytropic`` (each step along its own P·Vⁿ).

    Returns
    -------
    pint.Quantity
        Work done by the system along the points (J).

    References
    ----------
    .. [1] Trapezoidal rule of integration (common practice).

    Examples
    --------
    >>> work_pv(Q_([1, 2, 3], "bar"), Q_([1, 2, 3], "L"))
    <Quantity(400.0, 'joule')>
    """
    p = _si(P, "pressure", "P")
    vol = _si(V, "volume", "V")
    return _out(work.from_pv(p, vol, method), "energy")


def heat(
    dU: QuantityLike,
    W_b: QuantityLike,
    W_other: QuantityLike = None,
    dKE: QuantityLike = None,
    dPE: QuantityLike = None,
) -> Any:
    """Heat into a closed system by its first law.

    .. math:: Q = \\Delta U + \\Delta KE + \\Delta PE + W_b + W_{other}

    Parameters
    ----------
    dU : quantity or float or array_like
        Change of internal energy (J).
    W_b : quantity or float or array_like
        Boundary work done by the system (J).
    W_other : quantity or float or array_like, optional
        Other work done by the system (J); work done *on* it (a stirrer, a heater) is
        negative.
    dKE, dPE : quantity or float or array_like, optional
        Changes of kinetic and potential energy (J).

    Returns
    -------
    pint.Quantity
        Heat into the system (J).

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 4-11.

    Examples
    --------
    >>> heat(Q_(10, "kJ"), Q_(2, "kJ"), W_other=Q_(-3, "kJ")).to("kJ")
    <Quantity(9.0, 'kilojoule')>
    """
    return _apply(
        firstlaw.heat,
        [
            (dU, "energy", "dU"),
            (W_b, "energy", "W_b"),
            (_opt(W_other), "energy", "W_other"),
            (_opt(dKE), "energy", "dKE"),
            (_opt(dPE), "energy", "dPE"),
        ],
        "energy",
    )


def balance_gap(
    Q: QuantityLike,
    W_b: QuantityLike,
    dU: QuantityLike,
    W_other: QuantityLike = None,
    dKE: QuantityLike = None,
    dPE: QuantityLike = None,
) -> Any:
    """What a set of energy terms misses of closing the first law.

    .. math:: \\text{gap} = Q - W_b - W_{other} - (\\Delta U + \\Delta KE + \\Delta PE)

    Parameters
    ----------
    Q : quantity or float or array_like
        Heat into the system (J).
    W_b : quantity or float or array_like
        Boundary work done by the system (J).
    dU : quantity or float or array_like
        Change of internal energy (J).
    W_other, dKE, dPE : quantity or float or array_like, optional
        Other work by the system, changes of kinetic and potential energy (J).

    Returns
    -------
    pint.Quantity
        The gap (J); zero when the terms close the balance.

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 4-11.

    Examples
    --------
    >>> balance_gap(Q_(9, "kJ"), Q_(2, "kJ"), Q_(10, "kJ"), W_other=Q_(-3, "kJ"))
    <Quantity(0.0, 'joule')>
    """
    return _apply(
        firstlaw.gap,
        [
            (Q, "energy", "Q"),
            (W_b, "energy", "W_b"),
            (dU, "energy", "dU"),
            (_opt(W_other), "energy", "W_other"),
            (_opt(dKE), "energy", "dKE"),
            (_opt(dPE), "energy", "dPE"),
        ],
        "energy",
    )


def delta_ke(m: QuantityLike, vel1: QuantityLike, vel2: QuantityLike) -> Any:
    """Change of kinetic energy.

    .. math:: \\Delta KE = \\tfrac12 m (V_2^2 - V_1^2)

    Parameters
    ----------
    m : quantity or float or array_like
        Mass (kg).
    vel1, vel2 : quantity or float or array_like
        Initial and final speed (m/s).

    Returns
    -------
    pint.Quantity
        ΔKE (J).

    References
    ----------
    .. [1] Çengel & Boles, *Thermodynamics*, 9th ed., 2019, eq. 2-7.

    Examples
    --------
    >>> delta_ke(Q_(2, "kg"), 0, Q_(10, "m/s"))
    <Quantity(100.0, 'joule')>
    """
    return _apply(
        firstlaw.delta_ke,
        [(m, "mass", "m"), (vel1, "speed", "vel1"), (vel2, "speed", "vel2")],
        "energy",
    )


def delta_pe(m: QuantityLike, z1: QuantityLike, z2: QuantityLike, g: QuantityLike = None) -> Any:
    """Change of potential energy.

    .. math:: \\Delta PE = m\\,g\\,(z_2 - z_1)

    Parameters
    ----------
    m : quantity or float or array_like
        Mass (kg).
    z1, z2 : quantity or float or array_like
        Initial and final height (m).
    g : quantity or float, optional
        Acceleration of gravity (m/s²), 9.80665 unless given.

    Returns
    -------
    pint.Quantity
        ΔPE (J).

    References
    ----------
    .. [1] CGPM 1901, standard acceleration of gravity 9.80665 m/s² (common practice).

    Examples
    --------
    >>> delta_pe(Q_(1, "kg"), 0, Q_(10, "m"))
    <Quantity(98.0665, 'joule')>
    """
    gg = firstlaw.STANDARD_GRAVITY if g is None else g
    return _apply(
        firstlaw.delta_pe,
        [(m, "mass", "m"), (z1, "length", "z1"), (z2, "length", "z2"), (gg, "acceleration", "g")],
        "energy",
    )


def blocked_in_p2(
    state: State,
    T2: QuantityLike,
    *,
    shape: str = "rigid",
    D: QuantityLike = None,
    wall: QuantityLike = None,
    E_mod: QuantityLike = None,
    poisson: float | None = None,
    alpha_wall: QuantityLike = None,
    E: QuantityLike = None,
    nu: float | None = None,
) -> Any:
    """Pressure of a liquid-full, blocked-in line or vessel heated to *T2*.

    The liquid's volume follows the wall, which grows with temperature and stretches with
    pressure:

    .. math:: v(T_2, P_2) = v_1 (1 + \\alpha\\,\\Delta T)^3 (1 + c\\,(P_2 - P_1))

    with the thin-wall compliance c = D·(5 − 4ν)/(4·t·E) of a closed cylinder or
    3·D·(1 − ν)/(4·t·E) of a sphere; a rigid wall (c = 0, α = 0) is the upper bound.

    Parameters
    ----------
    state : State
        The liquid when it is blocked in (compressed or saturated liquid).
    T2 : quantity or float or array_like
        The temperature it is heated to (K).
    shape : str
        ``rigid`` (default), ``cylinder`` (closed ends) or ``sphere``.
    D : quantity or float, optional
        Mean diameter of the wall (m); cylinder and sphere only.
    wall : quantity or float, optional
        Wall thickness (m).
    E_mod : quantity or float, optional
        Young's modulus of the wall (Pa).
    poisson : float, optional
        Poisson's ratio ν of the wall.
    alpha_wall : quantity or float, optional
        Linear thermal expansion coefficient of the wall (1/K), 0 unless given.
    E, nu : optional
        The former names of *E_mod* and *poisson* (before issue 27), still taken; give one
        name of each, not both.

    Returns
    -------
    pint.Quantity
        End pressure P2 (Pa, absolute).

    Raises
    ------
    BadInput
        A state that is not liquid, wall data missing for a cylinder or sphere, or given for
        a rigid wall.
    OutOfRange
        The pressure would leave the fluid's model, or vapour would form.

    References
    ----------
    .. [1] W. C. Young, R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
       2002, Table 13.1.
    .. [2] API Standard 521, §4.4.12 (hydraulic expansion), from memory.

    Examples
    --------
    >>> line = State("water", T=Q_(15, "degC"), P=Q_(4, "bar"))
    >>> p = blocked_in_p2(line, Q_([25, 35], "degC"))
    >>> p.to("bar").magnitude.round(0)
    array([ 50., 120.])

    Caution: engineering estimates; pressure equipment is governed by the applicable codes
    and the judgement of a competent, licensed engineer.
    """
    from joulebook.catalog.adapters import _wall_compliance

    if not isinstance(state, State):
        raise BadInput("state must be a State, e.g. State('water', T=Q_(15, 'degC'), P=...)")
    for new, old, old_name in ((E_mod, E, "E"), (poisson, nu, "nu")):
        if new is not None and old is not None:
            raise BadInput(
                f"{old_name} is the former name of the wall's {new!r}: give one, not both"
            )
    E_mod = E if E_mod is None else E_mod
    poisson = nu if poisson is None else poisson
    data = {"D": (D, "length"), "wall": (wall, "length"), "E_mod": (E_mod, "modulus")}
    si = {k: None if v is None else float(_si(v, kind, k)) for k, (v, kind) in data.items()}
    nu_si = None if poisson is None else float(_si(poisson, "dimensionless", "poisson"))
    c = _wall_compliance(shape, si["D"], si["wall"], si["E_mod"], nu_si)
    alpha = (
        0.0 if alpha_wall is None else float(_si(alpha_wall, "expansion_coefficient", "alpha_wall"))
    )
    med = state._med
    pts = state._pts
    if isinstance(pts, np.ndarray):
        raise BadInput("state: give one starting state (the array goes in T2)")
    return _apply(
        lambda t2: blockedin.elastic_p2(med, pts, t2, c, alpha),
        [(T2, "temperature", "T2")],
        "pressure",
    )


def relief_thermal_flow(state: State, Q_dot: QuantityLike) -> Any:
    """Volume flow a thermal-relief valve passes to hold a heated blocked-in liquid.

    .. math:: q = \\frac{\\beta\\,\\dot Q}{\\rho\\,c_p}

    Parameters
    ----------
    state : State
        The liquid at the relief set pressure and its temperature.
    Q_dot : quantity or float or array_like
        Heat input (W).

    Returns
    -------
    pint.Quantity
        Volume flow (m³/s).

    Raises
    ------
    BadInput
        A state that is not liquid, or no heat input.

    References
    ----------
    .. [1] API Standard 521, §4.4.12 (hydraulic expansion), from memory.

    Examples
    --------
    >>> liquid = State("water", T=Q_(25, "degC"), P=Q_(10, "bar"))
    >>> q = relief_thermal_flow(liquid, Q_(10, "kW"))
    >>> round(q.to("L/hour").magnitude, 2)
    2.23
    """
    if not isinstance(state, State) or isinstance(state._pts, np.ndarray):
        raise BadInput("state must be one State of a liquid")
    p1 = state._pts
    if p1.x is not None or "liquid" not in p1.phase:
        raise BadInput(f"state is {p1.phase}: the thermal-relief flow is for a liquid")
    beta = float(state._read("beta"))
    cp = float(state._read("cp"))
    rho = 1.0 / p1.v
    return _apply(
        lambda q: blockedin.relief_flow(beta, q, rho, cp),
        [(Q_dot, "power", "Q_dot")],
        "volume_flow",
    )
