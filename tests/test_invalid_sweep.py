"""A randomized sweep over every catalog function: invalid arguments give a project error,
never a number, and no argument of any kind gives a traceback, NaN or inf.

Invalid, by the rules in docs/units.md (common practice): NaN or ±inf anywhere; an absolute
temperature, absolute pressure or mass at or below zero; a volume below zero.
"""

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from joulebook import call
from joulebook.catalog import CATALOG
from joulebook.core.errors import JoulebookError

_NUMERIC = [(f, i) for f in CATALOG for i, a in enumerate(f.args) if a.type == "number"]


def _with(f, i, value) -> list:
    """The entry's example arguments with argument *i* set (optional ones between, blank)."""
    args = list(f.example.args)
    args += [None] * (i + 1 - len(args))
    args[i] = value
    return args


def _invalid_values(quantity):
    vals = [math.nan, math.inf, -math.inf]
    if quantity in ("temperature", "mass", "pressure"):
        vals += [0.0, -1.0, -1e6]
    if quantity == "volume":
        vals += [-1e-9, -5.0]
    return vals


def _finite(result) -> bool:
    if isinstance(result, str) or result is None:
        return True
    if isinstance(result, (list, tuple, np.ndarray)):
        return all(_finite(r) for r in np.asarray(result, dtype=object).ravel())
    return isinstance(result, (int, float)) and math.isfinite(result)


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(_NUMERIC), st.data())
def test_an_invalid_number_is_refused_by_every_function(entry, data):
    f, i = entry
    bad = data.draw(st.sampled_from(_invalid_values(f.args[i].quantity)))
    with pytest.raises(JoulebookError):
        call(f.name, *_with(f, i, bad))


def test_negative_absolute_pressure_is_refused_where_pressure_is_absolute():
    # in the default unit system pressure is absolute (kPa): zero or less is refused
    for f, i in _NUMERIC:
        if f.args[i].quantity != "pressure":
            continue
        with pytest.raises(JoulebookError):
            call(f.name, *_with(f, i, -10.0))


_ANY = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(-(10**6), 10**6),
    st.text(max_size=12),
    st.booleans(),
    st.none(),
    st.lists(st.floats(-1e4, 1e4), min_size=1, max_size=3).map(lambda r: [[x] for x in r]),
)


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(CATALOG), st.data())
def test_any_arguments_give_a_project_error_or_a_finite_value(f, data):
    args = list(f.example.args)
    k = data.draw(st.integers(0, max(0, len(args) - 1)))
    if args:
        args[k] = data.draw(_ANY)
    try:
        result = call(f.name, *args)
    except JoulebookError:
        return
    assert _finite(result), (f.name, args, result)
