"""Refusals where a number would mislead: invalid inputs give a project error that names the
argument, the value and the valid range, never a number.

Sources: the physical rules stated beside each check ("common practice": absolute
temperature, absolute pressure and mass are above zero, a volume is not below zero; an
adiabatic process is isentropic only when reversible).
"""

import math

import pytest

from joulebook import call
from joulebook.core.errors import BadInput


@pytest.mark.parametrize(
    "args, words",
    [
        (("JB_WORK_ISOBARIC", -200, 0.1, 0.3), ["P = -200 kPa", "absolute pressure", "above 0"]),
        (("JB_WORK_LINEAR", 100, -0.1, 300, -0.2), ["V_1 = -0.1", "volume must not be below 0"]),
        (("JB_WORK_ISOBARIC", -150, 0.1, 0.3, "P=kPag"), ["-150 kPag", "perfect vacuum"]),
        (("JB_GAS_CP", "air", -300, "degC-bar-kJ"), ["T = -300 degC", "absolute zero"]),
        (("JB_GAS_CP", "air", 0), ["T = 0 K", "above 0 K"]),
        (("JB_WORK_PV", [[100], [-5]], [[0.1], [0.2]]), ["P_values (item 2,1) = -5"]),
        (("JB_BALANCE_DELTA_KE", -2, 0, 10), ["m = -2", "mass must be above 0"]),
        (("JB_CONVERT", -300, "degC", "K"), ["below absolute zero", "-273.15 degC"]),
        (("JB_CONVERT", -200, "kPag", "kPa"), ["below a perfect vacuum", "-101.325 kPag"]),
    ],
)
def test_absolute_quantities_must_be_above_zero(args, words):
    with pytest.raises(BadInput) as e:
        call(*args)
    for w in words:
        assert w in str(e.value), (w, str(e.value))
    assert len(str(e.value)) < 200


def test_gauge_vacuum_and_differences_still_convert():
    # common practice: −50 kPag is 51.325 kPa absolute (atmosphere 101.325 kPa); a
    # temperature difference may be negative (−20 K is −36 °F of difference)
    assert call("JB_WORK_ISOBARIC", -50, 0.1, 0.3, "P=kPag") == pytest.approx(51.325 * 0.2)
    assert call("JB_CONVERT", -50, "kPag", "kPa") == pytest.approx(51.325)
    assert call("JB_CONVERT", -20, "delta_degC", "delta_degF") == pytest.approx(-36.0)
    # a volume may start at zero: a bag filled from flat against 1 atm (W = P·V)
    assert call("JB_WORK_ISOBARIC", 101.325, 0, 0.5) == pytest.approx(50.6625)


@pytest.mark.parametrize(
    "args",
    [
        ("JB_BALANCE_GAP", 125, 30, 120, math.nan),
        ("JB_WORK_ISOBARIC", 100, math.nan, 0.3),
        ("JB_GAS_CP", "air", math.nan),
    ],
)
def test_nan_is_bad_input_everywhere(args):
    with pytest.raises(BadInput, match="not a finite number"):
        call(*args)


def test_adiabatic_is_not_silently_isentropic():
    s1 = call("JB_STATE", "air (ideal gas)", "T in K", 300, "P in kPa", 100)
    with pytest.raises(BadInput) as e:
        call("JB_PROCESS", s1, "adiabatic", "P2 in kPa", 500, "T2 in K")
    assert "isentropic" in str(e.value) and "irreversible" in str(e.value)


@pytest.mark.parametrize(
    "args, words",
    [
        (("JB_GAS_CP", "air | M = 0", 300), ["M = 0", "above 0"]),
        (("JB_WORK_POLYTROPIC_N", 200, 0.1, 0.01, 1000), ["n = 1000", "−50…50"]),
        (("JB_WORK_POLYTROPIC_N", 200, 0.1, 1e-300, 45), ["beyond any finite number"]),
        (("JB_STORED_ISENTROPIC", "CO2 | P = 30 bar | T = 20 degC", 1), ["triple-point", "solid"]),
    ],
)
def test_messages_name_the_argument_not_an_exception_class(args, words):
    from joulebook.core.errors import JoulebookError

    with pytest.raises(JoulebookError) as e:
        call(*args)
    msg = str(e.value)
    for w in words:
        assert w in msg, (w, msg)
    assert "Error)" not in msg and len(msg) < 200


def test_end_spec_without_the_2_means_the_end_state():
    s1 = call("JB_STATE", "air (ideal gas)", "T in K", 300, "P in kPa", 100)
    for short, full, value in (("T in degC", "T2 in degC", 100), ("P in kPa", "P2 in kPa", 500)):
        path = "isobaric" if short.startswith("T") else "isentropic"
        assert call("JB_PROCESS", s1, path, short, value, "W") == call(
            "JB_PROCESS", s1, path, full, value, "W"
        )


def test_an_input_read_back_equals_the_input():
    # common practice: 1 bar absolute is −0.01325 barg exactly (101.325 kPa atmosphere)
    assert call("JB_PROP", "water | T = 25 degC | P = 1 bar", "P in barg") == -0.01325
    assert call("JB_PROP", "water", "T in degC", "T in degC", 25, "P in bar", 1) == 25.0
    s1 = call("JB_STATE", "air (ideal gas)", "T in K", 300, "P in kPa", 100)
    table = {row[0]: row[1] for row in call("JB_PROCESS_TABLE", s1, "isobaric", "Q in kJ", 500)}
    assert table["Q"] == 500.0
    assert call("JB_PROCESS", s1, "isobaric", "Q in kJ", 500, "Q in J") == 500000.0
