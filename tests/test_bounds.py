"""Bounds everywhere (issue 34, item 4): text a cell can hold (32,767 characters, Excel's
limit) is refused or read in time that does not grow with the square of its length, and a
formula over Excel's own length or nesting limit is refused by name."""

import time

import pytest

from joulebook.catalog import call
from joulebook.core.errors import BadInput
from joulebook.core.units import MAX_UNIT_CHARS

CELL_MAX = 32_767  # Excel's cell-text limit (Microsoft, "Excel specifications and limits")

# each took from 0.4 s to 36 s at 32,767 characters before the bound (pint's preprocessing
# regular expressions backtrack over one long word; the phrase pattern over long spaces)
LONG_UNITS = {
    "one long word": "a" * CELL_MAX,
    "digits": "1" * CELL_MAX,
    "underscores": "_x" * (CELL_MAX // 2),
    "parentheses": "kJ/" + "(" * (CELL_MAX - 3),
}


@pytest.mark.parametrize("kind", list(LONG_UNITS))
def test_a_unit_of_a_full_cell_is_refused_at_once(kind):
    call("JB_CONVERT", 1.0, "kJ", "Btu")  # the unit parser loaded before the clock starts
    t = time.perf_counter()
    for args in ((1.0, LONG_UNITS[kind], "m"), (1.0, "m", LONG_UNITS[kind])):
        with pytest.raises(
            BadInput,
            match=f"unit text of [0-9,]+ characters .*; the limit is {MAX_UNIT_CHARS} characters",
        ):
            call("JB_CONVERT", *args)
    assert time.perf_counter() - t < 0.5


def test_a_quantity_phrase_of_a_full_cell_is_refused_at_once():
    call("JB_PROP", "water", "h", "T in degC", 25, "P in kPa", 101.325)
    t = time.perf_counter()
    for want in ("T in " + " " * CELL_MAX + "x", "T" + "a" * CELL_MAX):
        with pytest.raises(BadInput, match="quantity text of"):
            call("JB_PROP", "water", want, "T in degC", 25, "P in kPa", 101.325)
    assert time.perf_counter() - t < 0.5


def test_units_within_the_bound_still_convert():
    # 1 Btu (IT) = 1.05505585262 kJ (NIST SP 811 (2008), Appendix B.8)
    padded = "kJ" + " " * 300  # trailing spaces are not the unit
    assert call("JB_CONVERT", 1.0, "Btu", padded) == pytest.approx(1.05505585262)
    # 1 kJ/(kg K) = 0.238845896627 Btu/(lb °F) (NIST SP 811 (2008), Appendix B.8)
    assert call("JB_CONVERT", 1.0, "kJ/(kg*K)", "Btu/(lb*degF)") == pytest.approx(0.238845896627)
