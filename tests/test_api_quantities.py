"""Quantities everywhere and array states (issue 32, items 1, 3 and the ``dir()`` part of 4).

Sources
-------
* ISO 2533:1975, *Standard Atmosphere*: 101.325 kPa, the default reference of gauge units.
* NIST SP 811 (2008), Appendix B: 1 psi = 6894.757 Pa, 1 bar = 100 kPa.
* The `iapws` package 1.5.5 (PyPI), an independent implementation of IAPWS-95.
* ``joulebook.call`` with plain numbers (the cell path): a quantity must give the very cell
  value a number in the call's unit system gives.
"""

from __future__ import annotations

import numpy as np
import pytest
from iapws import IAPWS95

import joulebook
from joulebook import Q_, State
from joulebook.catalog import CATALOG, UNITS_ARG
from joulebook.core.errors import BadInput, OutOfRange
from joulebook.core.units import KINDS, set_gauge_atmosphere, unit_system
from refcheck import check

IAPWS = "iapws 1.5.5 (PyPI), independent IAPWS-95 implementation"

# ---------------------------------------------------------------------------------------
# gauge pressure in the registry


@pytest.mark.parametrize(
    ("gauge", "unit", "kpa"),
    [
        (0.5, "barg", 151.325),  # ISO 2533 atmosphere + 0.5 bar (NIST SP 811: 1 bar = 100 kPa)
        (0.0, "psig", 101.325),  # ISO 2533
        (10.0, "psig", 101.325 + 68.94757293168),  # NIST SP 811: 1 psi = 6894.757 Pa
        (1.0, "MPag", 1101.325),
        (20.0, "kPag", 121.325),
        (30.0, "mbarg", 104.325),
        (500.0, "Pag", 101.825),
    ],
)
def test_gauge_units_are_absolute_plus_the_standard_atmosphere(gauge, unit, kpa):
    assert Q_(gauge, unit).to("kPa").magnitude == pytest.approx(kpa, rel=1e-12)
    assert Q_(kpa, "kPa").to(unit).magnitude == pytest.approx(gauge, rel=1e-9, abs=1e-9)


def test_the_atmosphere_of_gauge_units_can_be_changed_and_restored():
    before = set_gauge_atmosphere(Q_(95, "kPa"))
    try:
        assert before == 101325.0
        assert Q_(0.5, "barg").to("kPa").magnitude == pytest.approx(145.0, rel=1e-12)
        st = State("water", T=Q_(25, "degC"), P=Q_(0.5, "barg"))
        check(st.rho.to("kg/m**3").magnitude, IAPWS95(T=298.15, P=0.145).rho, rtol=1e-7,
              quantity="rho", conditions="25 °C, 0.5 barg at a 95 kPa atmosphere",
              source=IAPWS)  # fmt: skip
    finally:
        assert set_gauge_atmosphere(before) == 95000.0
    assert Q_(0.5, "barg").to("kPa").magnitude == pytest.approx(151.325, rel=1e-12)


@pytest.mark.parametrize("bad", [40_000.0, Q_(2, "bar"), "high"])
def test_an_atmosphere_out_of_range_or_of_another_kind_is_refused(bad):
    with pytest.raises((BadInput, OutOfRange), match="atmosphere"):
        set_gauge_atmosphere(bad)
    assert Q_(0, "barg").to("Pa").magnitude == 101325.0  # unchanged


# ---------------------------------------------------------------------------------------
# a State in the user's units


def test_a_state_in_gauge_pressure_and_celsius_works_and_prints_in_them():
    st = State("water", T=Q_(25, "degC"), P=Q_(0.5, "barg"))
    assert repr(st) == "<State water: T = 25 °C, P = 0.5 barg, compressed liquid>"
    assert str(st.T.units) == "degree_Celsius" and str(st.P.units) == "barg"
    assert st.T.magnitude == pytest.approx(25.0, rel=1e-12)
    assert st.P.m_as("kPa") == pytest.approx(151.325, rel=1e-9)
    ref = IAPWS95(T=298.15, P=0.151325)
    cond = "water 25 °C, 0.5 barg (151.325 kPa)"
    check(st.h.m_as("kJ/kg"), ref.h, rtol=1e-6, quantity="h", conditions=cond, source=IAPWS)
    check(st.rho.m_as("kg/m**3"), ref.rho, rtol=1e-7, quantity="rho", conditions=cond,
          source=IAPWS)  # fmt: skip
    # the same state given absolute, in SI: the same numbers
    twin = State("water", T=298.15, P=151325.0)
    assert st.h.m_as("J/kg") == pytest.approx(twin.h.magnitude, rel=1e-12)
    assert repr(twin).startswith("<State water: T = 298.15 K, P = 151325 Pa")


def test_properties_of_a_kind_given_read_back_in_the_unit_given():
    st = State("water", T=Q_(77, "degF"), h=Q_(1500, "kJ/kg"), m=Q_(500, "g"))
    assert str(st.T.units) == "degree_Fahrenheit"
    assert st.h.m_as("kJ/kg") == pytest.approx(1500.0, rel=1e-9)
    assert str(st.u.units) == "kilojoule / kilogram"  # the same kind as h
    assert str(st.m.units) == "gram" and st.m.magnitude == pytest.approx(500.0)
    assert str(st.s.units) == "joule / kelvin / kilogram"  # not given: SI
    # an end state keeps the units of its start
    r = State("water", T=Q_(20, "degC"), P=Q_(1, "barg"), m=Q_(1, "kg")).rigid(T2=Q_(25, "degC"))
    assert str(r.P2.units) == "barg" and str(r.T2.units) == "degree_Celsius"


@pytest.mark.parametrize(
    ("T", "shown"),
    [(Q_(3000, "degC"), "3000 °C"), (Q_(5000, "degF"), "5000 °F"), (Q_(250, "K"), "250 K")],
)
def test_a_range_error_names_the_value_in_the_unit_given(T, shown):
    with pytest.raises(OutOfRange) as e:
        State("water", T=T, P=Q_(1, "bar"))
    assert shown in e.value.message
    if str(T.units) != "kelvin":
        assert " K" not in e.value.message  # the model's range too, in the user's unit
    # clean twin: inside the range it is a state
    assert State("water", T=Q_(900, "degC"), P=Q_(1, "bar")).phase.startswith("gas above")


def test_an_end_condition_out_of_range_is_named_in_the_start_state_s_units():
    start = State("water", T=Q_(20, "degC"), P=Q_(1, "barg"), m=Q_(1, "kg"))
    with pytest.raises(OutOfRange, match="2000 °C is outside the model's range 0 °C"):
        start.rigid(T2=Q_(2000, "degC"))
    # clean twin: an end condition inside the range
    assert start.rigid(T2=Q_(25, "degC")).T2.m_as("degC") == pytest.approx(25.0, rel=1e-9)


@pytest.mark.parametrize(
    ("text", "T_unit", "P_unit"),
    [
        ("water | T = 25 degC | P = 2.01 barg", "degree_Celsius", "barg"),
        ("water | T = 25 C | P = 302.325 kPa", "kelvin", "kilopascal"),  # pint: C is coulomb
        ("water | T = 25 degC | P = 207 kPag @ 95.325 kPa", "degree_Celsius", "pascal"),
    ],
)
def test_a_state_text_keeps_its_units_where_pint_reads_them_alike(text, T_unit, P_unit):
    st = State.from_text(text)
    assert str(st.T.units) == T_unit and str(st.P.units) == P_unit
    # the same state whatever the spelling: 25 °C and 302.325 kPa absolute
    assert st.P.m_as("kPa") == pytest.approx(302.325, rel=1e-9)
    assert st.h.m_as("J/kg") == pytest.approx(
        State("water", T=298.15, P=302325.0).h.magnitude, rel=1e-12
    )


# ---------------------------------------------------------------------------------------
# joulebook.call takes quantities and States


def _as_quantity(value: float, kind: str | None, system) -> object:
    """*value* (a cell number in *system*) as the quantity it stands for, in SI."""
    if kind is None:
        return Q_(value, "")
    return Q_(system.conv(kind).to_si(value), KINDS[kind][1])


def _quantity_args(f) -> tuple[tuple, tuple, int]:
    args = list(f.example.args)
    units = args[len(f.args)] if f.units and len(args) > len(f.args) else None
    system = unit_system(units)
    swapped = 0
    for i, arg in enumerate(f.args[: len(args)]):
        v = args[i]
        if arg.type == "number" and arg.quantity and type(v) in (int, float):
            args[i] = _as_quantity(float(v), arg.quantity, system)
            swapped += 1
        elif arg.type == "range" and arg.quantity and isinstance(v, list | tuple):
            cells = np.asarray(v, dtype=float)  # a range of numbers: one array quantity
            args[i] = Q_(system.conv(arg.quantity).to_si(cells), KINDS[arg.quantity][1])
            swapped += 1
    return tuple(f.example.args), tuple(args), swapped


_WITH_QUANTITIES = [f for f in CATALOG if _quantity_args(f)[2]]


def test_most_catalog_functions_take_a_quantity_argument():
    # a floor that fails loudly if the sweep below silently shrinks: 72 of the 83 functions
    # at the time of writing (the others take only texts, labels and numbers whose unit is
    # named in another argument; States for their state texts are tested below)
    assert len(_WITH_QUANTITIES) >= 70


@pytest.mark.parametrize("f", _WITH_QUANTITIES, ids=lambda f: f.name)
def test_every_quantity_argument_gives_the_cell_value_of_its_number(f):
    plain, quantities, _ = _quantity_args(f)
    want = joulebook.call(f.name, *plain)
    got = joulebook.call(f.name, *quantities)
    _same(got, want)


def _same(got: object, want: object) -> None:
    """Numbers alike to rounding (SI and back), texts and tables cell by cell."""
    if isinstance(want, float):
        assert got == pytest.approx(want, rel=1e-9, abs=1e-12)
    elif isinstance(want, list | tuple | np.ndarray):
        assert len(got) == len(want)
        for g, w in zip(got, want, strict=True):
            _same(g, w)
    else:
        assert got == want


def test_call_converts_by_the_call_s_unit_system_never_by_guessing():
    # JB_WORK_ISOBARIC(P, V1, V2): default K-kPa-kJ gives kJ, degC-bar-kJ the same kJ
    qs = (Q_(2, "bar"), Q_(1, "L"), Q_(3, "L"))
    assert joulebook.call("JB_WORK_ISOBARIC", *qs) == pytest.approx(0.4, rel=1e-12)
    assert joulebook.call("JB_WORK_ISOBARIC", *qs, "degC-bar-kJ") == pytest.approx(0.4)
    assert joulebook.call("JB_WORK_ISOBARIC", *qs, "K-Pa-J") == pytest.approx(400.0)
    # gauge quantities: absolute before the call
    assert joulebook.call(
        "JB_WORK_ISOBARIC", Q_(0, "barg"), Q_(0, "L"), Q_(1, "m**3")
    ) == pytest.approx(101.325, rel=1e-12)
    # arrays of quantities broadcast as a range of cells does
    out = joulebook.call("JB_WORK_ISOBARIC", Q_([1, 2], "bar"), Q_(1, "L"), Q_(3, "L"))
    assert [float(x) for x in out] == pytest.approx([0.2, 0.4], rel=1e-12)


@pytest.mark.parametrize(
    ("args", "match"),
    [
        ((Q_(2, "kg"), 0.001, 0.003), r"^P = 2 kg is not a pressure"),
        ((200, Q_(1, "K"), 0.003), r"^V_1 = 1 K is not a volume"),
    ],
)
def test_a_quantity_of_the_wrong_dimension_is_bad_input_naming_the_argument(args, match):
    with pytest.raises(BadInput, match=match):
        joulebook.call("JB_WORK_ISOBARIC", *args)
    # clean twin: the same arguments with the right dimension
    assert joulebook.call("JB_WORK_ISOBARIC", Q_(2, "bar"), Q_(1, "L"), Q_(3, "L")) > 0


def test_a_quantity_where_a_text_or_a_unit_named_elsewhere_is_taken_is_refused():
    with pytest.raises(BadInput, match="^substance = 2 bar is a quantity"):
        joulebook.call("JB_PROP", Q_(2, "bar"), "h", "T in degC", 25, "P in bar", 2)
    with pytest.raises(BadInput, match="its unit is named in another argument"):
        joulebook.call("JB_PROP", "water", "h", "T in degC", Q_(25, "degC"), "P in bar", 2)


def test_a_state_goes_where_a_state_text_is_taken():
    st = State("water", T=Q_(25, "degC"), P=Q_(2, "bar"))
    text = joulebook.call("JB_STATE", "water", "T in degC", 25, "P in bar", 2)
    assert joulebook.call("JB_PROP", st, "h in kJ/kg") == pytest.approx(
        joulebook.call("JB_PROP", text, "h in kJ/kg"), rel=1e-12
    )
    assert joulebook.call("JB_PHASE", st) == "compressed liquid"
    col = State("water", T=Q_([25, 50], "degC"), P=Q_(2, "bar"))
    out = joulebook.call("JB_PROP", col, "h in kJ/kg")
    assert [float(x) for x in out] == pytest.approx(
        [joulebook.call("JB_PROP", one, "h in kJ/kg") for one in col], rel=1e-12
    )
    with pytest.raises(BadInput, match="^P: a State was given"):
        joulebook.call("JB_WORK_ISOBARIC", st, 0.001, 0.003)


# ---------------------------------------------------------------------------------------
# array states


@pytest.fixture(scope="module")
def column():
    return State("water", T=Q_([20.0, 60.0, 100.0, 150.0], "degC"), P=Q_(2, "bar"))


def test_an_array_state_has_a_length_indexes_slices_and_iterates(column):
    assert len(column) == 4
    h = column.h.m_as("J/kg")
    for i, one in enumerate(column):
        assert one.h.m_as("J/kg") == pytest.approx(h[i], rel=1e-14)
    assert column[-1].phase == "superheated vapor" and column[0].phase == "compressed liquid"
    assert column[1:3].T.m_as("degC").tolist() == pytest.approx([60.0, 100.0])
    sub = column[np.array([True, False, False, True])]
    assert len(sub) == 2 and sub.T.m_as("degC").tolist() == pytest.approx([20.0, 150.0])
    # a single state: one text, no length
    assert joulebook.call("JB_PROP", column[0].text, "T in degC") == pytest.approx(20.0)
    with pytest.raises(TypeError, match="no len"):
        len(column[0])
    with pytest.raises(IndexError, match="shape"):
        column[7]


def test_to_dict_and_to_frame(column):
    d = column.to_dict("T", "h", "phase")
    assert list(d) == ["T", "h", "phase"] and "reason" not in d
    assert d["h"].m_as("J/kg").tolist() == pytest.approx(column.h.m_as("J/kg").tolist())
    frame = column.to_frame("T", "P", "phase")
    assert list(frame.columns) == ["T [°C]", "P [bar]", "phase"]
    assert frame["T [°C]"].tolist() == pytest.approx([20.0, 60.0, 100.0, 150.0])
    assert frame["phase"].iloc[-1] == "superheated vapor"


def test_errors_mask_keeps_the_valid_elements_and_the_reasons():
    T = Q_([20.0, 3000.0, 80.0, -300.0], "degC")
    with pytest.raises(OutOfRange, match=r"at index \(1,\)"):
        State("water", T=T, P=Q_(1, "bar"))  # the default: the first failure raises
    st = State("water", T=T, P=Q_(1, "bar"), errors="mask")
    assert st.mask.tolist() == [False, True, False, True]
    reasons = st.reasons.tolist()
    assert reasons[0] is None and reasons[2] is None
    assert "3000 °C" in reasons[1] and "-300 °C" in reasons[3]
    h = st.h
    assert h.magnitude.mask.tolist() == [False, True, False, True]
    for i in (0, 2):
        one = State("water", T=T[i], P=Q_(1, "bar"))
        assert h.magnitude[i] == pytest.approx(one.h.magnitude, rel=1e-14)
    assert repr(st) == "<State water: 4 states, shape (4,), 2 masked>"
    with pytest.raises(OutOfRange, match="element 1 is masked"):
        st[1]
    with pytest.raises(BadInput, match="masked"):
        st.isobaric(T2=Q_(90, "degC"), m=1)
    good = st[~st.mask]
    assert len(good) == 2 and not good.mask.any()
    assert good.isobaric(T2=Q_(90, "degC"), m=1).Q.m_as("J").shape == (2,)
    frame = st.to_frame("T", "h")
    assert np.isnan(frame["h [J/kg]"].iloc[1]) and "3000 °C" in frame["reason"].iloc[1]
    # clean twin: nothing to mask, nothing masked
    clean = State("water", T=Q_([20.0, 80.0], "degC"), P=Q_(1, "bar"), errors="mask")
    assert not clean.mask.any() and "reason" not in clean.to_dict()
    assert not isinstance(clean.h.magnitude, np.ma.MaskedArray)


def test_errors_takes_raise_or_mask_only():
    with pytest.raises(BadInput, match="errors = 'ignore'"):
        State("water", T=300, P=1e5, errors="ignore")


# ---------------------------------------------------------------------------------------
# the package lists its API only


def test_dir_lists_the_api_only():
    names = dir(joulebook)
    for helper in ("Any", "TYPE_CHECKING", "annotations", "_API"):
        assert helper not in names
    assert names == sorted(joulebook.__all__)
    for name in names:
        assert getattr(joulebook, name) is not None


def test_units_arg_is_never_given_a_quantity():
    with pytest.raises(BadInput):
        joulebook.call("JB_WORK_ISOBARIC", 200, 0.001, 0.003, Q_(1, "bar"))
    assert UNITS_ARG.type == "text"
