"""State text: a real-fluid state written out in full, e.g. ``water | T = 25 degC | P = 200 kPa``.

The text *is* the state: there is no hidden object store, so a formula gives the same result
in Excel and headless.  Every property function accepts a state text in place of a substance
and two specifications.  Formatting uses the shortest decimal that reads back to the same
float, so text → state → text round-trips exactly.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from .errors import BadInput
from .media import medium, split_substance
from .substances import fluids
from .units import Phrase, UnitSystem, parse_phrase, unit_system

__all__ = ["State", "parse_state", "format_state", "is_state_text", "format_number", "spec_phrase"]

#: the symbols a state may be fixed by
STATE_INPUTS = fluids.INPUTS


@dataclass(frozen=True)
class State:
    """A fluid and two specifications, each with the value as written and its unit phrase.

    Parameters
    ----------
    fluid : str
        Substance text of the medium: ``"water"``, ``"air (ideal gas)"``, ``"air | k = 1.4"``.
    specs : tuple
        Two ``(Phrase, value)`` pairs, the value in the phrase's unit.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> st = parse_state("water | T = 25 degC | P = 200 kPa")
    >>> st.si()
    ('T', 298.15, 'P', 200000.0)
    """

    fluid: str  # substance text of the medium: "water", "air (ideal gas)", "air | k = 1.4"
    specs: tuple[tuple[Phrase, float], tuple[Phrase, float]]

    @property
    def medium(self):
        """The medium (:func:`joulebook.core.media.medium`) of the state's fluid."""
        return medium(self.fluid)

    def si(self) -> tuple[str, float, str, float]:
        """The two specifications in SI: ``(symbol1, value1, symbol2, value2)``."""
        (p1, v1), (p2, v2) = self.specs
        return p1.symbol, p1.conv.to_si(v1), p2.symbol, p2.conv.to_si(v2)

    def shows(self) -> dict:
        """The unit each specification was written in, for messages (symbol → Conv)."""
        return {p.symbol: p.conv for p, _ in self.specs}


def format_number(x: float) -> str:
    """Shortest text that reads back to the same float (``25`` not ``25.0``).

    Parameters
    ----------
    x : float
        The number.

    Returns
    -------
    str
        Its shortest round-tripping text.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> format_number(25.0), format_number(0.1 + 0.2)
    ('25', '0.30000000000000004')
    """
    x = float(x)
    if math.isfinite(x) and x == int(x) and abs(x) < 1e15:
        return str(int(x))
    return repr(x)


def is_state_text(text: object) -> bool:
    """True for text that fixes a state (a substance plus two ``SYMBOL = value`` parts).

    Parameters
    ----------
    text : object
        A cell value.

    Returns
    -------
    bool
        Whether it is (or tries to be) state text.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> is_state_text("water | T = 25 degC | P = 2 bar"), is_state_text("water")
    (True, False)
    """
    if not isinstance(text, str) or "|" not in text:
        return False
    try:
        return len(split_substance(text)[2]) >= 1
    except BadInput:
        return True  # malformed state text: let the parser explain


def spec_phrase(text: object, arg: str, system: UnitSystem) -> Phrase:
    """The unit phrase of a state specification (``"T in degC"``), checked.

    Parameters
    ----------
    text : object
        The phrase as given.
    arg : str
        The argument's name, for messages.
    system : UnitSystem
        Unit system of a bare symbol.

    Returns
    -------
    Phrase
        Symbol (one of T P v rho u h s x), kind, unit and SI map.

    Raises
    ------
    BadInput
        Not text, or not a state property with a unit of its quantity.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> from joulebook.core.units import unit_system
    >>> spec_phrase("P in bar", "spec1", unit_system(None)).conv.factor
    100000.0
    """
    if not isinstance(text, str) or not text.strip():
        raise BadInput(f"{arg} must be a property phrase such as 'T in degC' (got {text!r})")
    try:
        return parse_phrase(text, system, STATE_INPUTS)
    except BadInput as e:
        raise BadInput(f"{arg}: {e.message}") from None


def format_state(st: State) -> str:
    """The state text of *st*: ``substance | SYM = value unit | SYM = value unit``.

    Parameters
    ----------
    st : State
        The state.

    Returns
    -------
    str
        Its text; reading it back with :func:`parse_state` gives the same state.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> format_state(parse_state("water|T=25 degC|P=200 kPa"))
    'water | T = 25 degC | P = 200 kPa'
    """
    parts = [st.fluid]
    for p, v in st.specs:
        unit = f" {p.unit}" if p.unit else ""
        parts.append(f"{p.symbol} = {format_number(v)}{unit}")
    return " | ".join(parts)


_SPEC = re.compile(
    r"^\s*(?P<sym>[A-Za-z]+)\s*=\s*(?P<num>[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(?P<unit>.*?)\s*$"
)


@lru_cache(maxsize=4096)
def parse_state(text: str) -> State:
    """Parse state text ``substance | SYM = value unit | SYM = value unit``.

    Parameters
    ----------
    text : str
        The state text, e.g. ``water | T = 25 degC | P = 200 kPa``.

    Returns
    -------
    State
        The fluid and its two specifications.

    Raises
    ------
    BadInput
        Malformed text, unknown fluid, symbol or unit.

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> parse_state("air | k = 1.4 | T = 300 K | P = 1 bar").fluid
    'air | k = 1.4'
    """
    name, consts, parts = split_substance(text)
    if len(parts) != 2:
        raise BadInput(
            f"state text {text[:60]!r} needs a substance and two specs: 'water | T = 25 degC | P = 200 kPa'"
        )
    med = medium(" | ".join([p for p in (name, *consts) if p]))
    specs = []
    system = unit_system(None)
    for part in parts:
        m = _SPEC.match(part)
        if not m:
            raise BadInput(f"state text: {part!r} is not 'SYMBOL = number unit'")
        unit = m.group("unit")
        phrase = parse_phrase(
            f"{m.group('sym')} in {unit}" if unit else m.group("sym"), system, STATE_INPUTS
        )
        if not unit and phrase.kind != "dimensionless":
            raise BadInput(
                f"state text: {part!r} needs its unit (e.g. {phrase.symbol} = 1 {phrase.unit})"
            )
        specs.append((phrase, float(m.group("num"))))
    return State(med.text(), (specs[0], specs[1]))


def make_state(fluid: str, spec1, value1: float, spec2, value2: float, system: UnitSystem) -> State:
    """Build a :class:`State` from worksheet arguments (values in the phrases' units).

    Parameters
    ----------
    fluid : str
        Substance text.
    spec1, spec2 : str
        Unit phrases of the two specifications (``"T in degC"``).
    value1, value2 : float
        Their values, in the phrases' units.
    system : UnitSystem
        Unit system of bare symbols.

    Returns
    -------
    State
        The state (not yet checked against the fluid's model).

    References
    ----------
    .. [1] docs/design.md §3 (state text: the text is the state).

    Examples
    --------
    >>> from joulebook.core.units import unit_system
    >>> format_state(make_state("water", "T in degC", 25, "P in bar", 2, unit_system(None)))
    'water | T = 25 degC | P = 2 bar'
    """
    med = medium(fluid, system)
    p1 = spec_phrase(spec1, "spec1", system)
    p2 = spec_phrase(spec2, "spec2", system)
    return State(med.text(), ((p1, float(value1)), (p2, float(value2))))
