"""The cell-call path: ranges, blanks, per-element errors, state text."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import joulebook
from joulebook.core.errors import BadInput, cell_text
from joulebook.core.states import format_state, parse_state


def test_column_in_column_out():
    T = [[20.0], [40.0], [60.0], [80.0]]
    out = joulebook.call("JB_PROP", "water", "h in kJ/kg", "T in degC", T, "P in kPa", 101.325)
    assert out.shape == (4, 1)
    for (t,), h in zip(T, out[:, 0]):
        assert h == joulebook.call(
            "JB_PROP", "water", "h in kJ/kg", "T in degC", t, "P in kPa", 101.325
        )


def test_row_times_column_broadcasts():
    T = [[20.0], [40.0]]
    P = [[100.0, 1000.0, 10000.0]]
    out = joulebook.call("JB_PROP", "water", "rho", "T in degC", T, "P in kPa", P)
    assert out.shape == (2, 3)
    assert out[1, 2] == joulebook.call(
        "JB_PROP", "water", "rho", "T in degC", 40.0, "P in kPa", 10000.0
    )


def test_want_as_a_row_spills_several_properties():
    out = joulebook.call(
        "JB_PROP",
        "water",
        [["h in kJ/kg", "s in kJ/kg.K", "phase"]],
        "T in degC",
        25,
        "P in kPa",
        100,
    )
    assert out.shape == (1, 3) and out[0, 2] == "compressed liquid"


def test_bad_element_shows_its_error_the_rest_survive():
    out = joulebook.call(
        "JB_PROP", "water", "h", "T in degC", [[25.0], [5000.0], ["abc"]], "P in kPa", 100
    )
    assert isinstance(out[0, 0], float)
    assert out[1, 0].startswith("OutOfRange:")
    assert out[2, 0].startswith("BadInput:") and "value1" in out[2, 0]


def test_mismatched_shapes():
    with pytest.raises(BadInput, match="different shapes"):
        joulebook.call(
            "JB_PROP", "water", "h", "T", [[300.0], [310.0]], "P", [[100.0], [200.0], [300.0]]
        )


def test_state_text_in_place_of_specs():
    text = joulebook.call("JB_STATE", "water", "T in degC", 25, "P in kPa", 200)
    assert text == "water | T = 25 degC | P = 200 kPa"
    assert joulebook.call("JB_PROP", text, "h in kJ/kg") == joulebook.call(
        "JB_PROP", "water", "h in kJ/kg", "T in degC", 25, "P in kPa", 200
    )
    assert joulebook.call("JB_PHASE", text) == "compressed liquid"
    with pytest.raises(BadInput, match="leave value1"):
        joulebook.call("JB_PROP", text, "h", None, 5)


def test_state_text_uses_explicit_units_even_from_defaults():
    text = joulebook.call("JB_STATE", "steam", "T", 450, "P", 500, "degC-bar-kJ")
    assert text == "water | T = 450 degC | P = 500 bar"
    assert (
        joulebook.call("JB_STATE", "steam", "T", 450, "x", 0.25) == "water | T = 450 K | x = 0.25"
    )


def test_invalid_state_is_not_written_as_text():
    with pytest.raises(Exception, match="outside"):
        joulebook.call("JB_STATE", "water", "T in degC", 5000, "P in kPa", 100)


@settings(max_examples=200, deadline=None)
@given(
    T=st.floats(min_value=0.5, max_value=1500, allow_nan=False),
    P=st.floats(min_value=1.0, max_value=50_000, allow_nan=False),
    tu=st.sampled_from(["degC", "K", "degF"]),
    pu=st.sampled_from(["kPa", "bar", "psia", "MPa"]),
)
def test_state_text_round_trips_exactly(T, P, tu, pu):
    text = f"water | T = {T!r} {tu} | P = {P!r} {pu}"
    st_ = parse_state(text)
    again = format_state(st_)
    assert parse_state(again) == st_
    assert format_state(parse_state(again)) == again


def test_cell_text_of_library_errors_is_labelled():
    assert cell_text(ValueError("x")).startswith("InternalError:")
    assert cell_text(BadInput("y")) == "BadInput: y"


def test_messages_are_short():
    long = "x" * 500
    assert len(BadInput(long).message) <= 200


def test_numpy_inputs_accepted():
    out = joulebook.call("JB_GAS_CP", "air", np.array([300.0, 400.0]))
    assert out.shape == (2,) and out[0] == joulebook.call("JB_GAS_CP", "air", 300.0)


def test_blank_value_of_a_named_property_is_a_blank_result_in_every_path(tmp_path):
    """A copied-down row not filled in yet: the single-cell path, the column path and the
    engine agree (common practice; design §4).  A property left unnamed is a bad formula."""
    import openpyxl

    from joulebook.catalog.cellvalues import cell
    from joulebook.faces.workbook.engine import Engine
    from joulebook.faces.workbook.reader import read_book

    args = ("water", "h", "T in degC")
    assert cell("JB_PROP", *args, None, "P in kPa", 100) is None
    assert cell("JB_PROP", *args, [[None], [20]], "P in kPa", 100)[0] == [None]
    assert cell("JB_PROP", "water", "h", "T in degC", 20, None, 100).startswith("BadInput:")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws["A1"], ws["A3"] = 20, 30
    for r in (1, 2, 3):
        ws[f"B{r}"] = f'=JB_PROP("water","h","T in degC",A{r},"P in kPa",100)'
    ws["C1"] = '=JB_PROP("water","h","T in degC",A2,"P in kPa",100)'
    wb.save(tmp_path / "b.xlsx")
    out = Engine(read_book(tmp_path / "b.xlsx")).run()
    sheet = ws.title
    assert isinstance(out[(sheet, 1, 2)].value, float) and isinstance(
        out[(sheet, 3, 2)].value, float
    )
    assert out[(sheet, 2, 2)].value in (None, "") and out[(sheet, 1, 3)].value in (None, "")
    assert not out[(sheet, 2, 2)].message
