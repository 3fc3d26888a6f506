"""One suite over every catalog entry: a new entry is tested by construction."""

import re

import numpy as np
import pytest

import joulebook
from joulebook.catalog import CATALOG, FAMILIES, lookup
from joulebook.core.errors import BadInput, JoulebookError
from joulebook.core.units import KINDS

IDS = [f.name for f in CATALOG]
VBA_KEYWORDS = {
    "and",
    "as",
    "boolean",
    "byref",
    "byte",
    "byval",
    "call",
    "case",
    "const",
    "currency",
    "date",
    "decimal",
    "declare",
    "dim",
    "do",
    "double",
    "each",
    "else",
    "elseif",
    "empty",
    "end",
    "enum",
    "eqv",
    "erase",
    "error",
    "event",
    "exit",
    "false",
    "for",
    "friend",
    "function",
    "get",
    "global",
    "gosub",
    "goto",
    "if",
    "imp",
    "implements",
    "in",
    "integer",
    "is",
    "let",
    "lib",
    "like",
    "long",
    "loop",
    "lset",
    "me",
    "mod",
    "new",
    "next",
    "not",
    "nothing",
    "null",
    "object",
    "on",
    "option",
    "optional",
    "or",
    "paramarray",
    "preserve",
    "private",
    "property",
    "public",
    "raiseevent",
    "redim",
    "rem",
    "resume",
    "return",
    "rset",
    "select",
    "set",
    "single",
    "static",
    "step",
    "stop",
    "string",
    "sub",
    "then",
    "to",
    "true",
    "type",
    "typeof",
    "until",
    "variant",
    "wend",
    "while",
    "with",
    "xor",
    "text",
    "value_",
    "name",
}
CELL_LIKE = re.compile(r"^[A-Z]{1,3}[0-9]+$|^R[0-9]*C[0-9]*$")


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_names_obey_vba_rules(f):
    assert re.fullmatch(r"JB_[A-Z][A-Z0-9_]*", f.name)
    assert not CELL_LIKE.match(f.name)
    seen = set()
    for a in f.all_args:
        # VBA identifiers: a letter, then letters, digits, underscores; compared ignoring case
        assert re.fullmatch(r"[A-Z][A-Z0-9_]*", a.name.upper()), a.name
        assert a.name.lower() not in VBA_KEYWORDS, a.name
        assert not CELL_LIKE.match(a.name.upper()), a.name
        assert a.name.upper() != f.name.upper()
        assert a.name.upper() not in seen
        seen.add(a.name.upper())


def test_function_names_unique_ignoring_case():
    names = [f.name.upper() for f in CATALOG]
    assert len(names) == len(set(names))


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_help_units_and_docs_present(f):
    assert 20 <= len(f.help) <= 255
    assert f.family in FAMILIES
    assert f.equation and f.references
    for a in f.all_args:
        assert 5 <= len(a.help) <= 255, a.name
        assert a.type in ("number", "text", "range")
        if a.quantity is not None:
            assert a.quantity in KINDS
    assert f.result in KINDS or f.result in ("text", "asked", "number")
    # optional arguments come last
    flags = [a.optional for a in f.all_args]
    assert flags == sorted(flags) or all(flags[flags.index(True) :]), f.name


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_example_runs_and_matches(f):
    got = joulebook.call(f.name, *f.example.args)
    want = f.example.value
    if f.example.match == "prefix":
        assert isinstance(got, str) and got.startswith(want)
    else:
        _same(got, want, f.example.rtol)


def _same(got, want, rtol):
    if isinstance(want, list):
        got = got.tolist() if isinstance(got, np.ndarray) else got
        assert isinstance(got, list) and len(got) == len(want)
        for g, w in zip(got, want):
            _same(g, w, rtol)
    elif isinstance(want, str):
        assert got == want
    else:
        assert got == pytest.approx(want, rel=rtol, abs=1e-12)


@pytest.mark.parametrize(
    "f", [f for f in CATALOG if any(not a.optional for a in f.args)], ids=lambda f: f.name
)
def test_blank_required_argument_is_a_clear_error(f):
    args = list(f.example.args)
    i = next(i for i, a in enumerate(f.args) if not a.optional)
    args[i] = None
    with pytest.raises(BadInput) as e:
        joulebook.call(f.name, *args)
    assert f.args[i].name in e.value.message and len(e.value.message) < 200


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_wrong_types_are_clear_errors(f):
    for i, a in enumerate(f.args[: len(f.example.args)]):
        args = list(f.example.args)
        args[i] = True if a.type == "number" else 3.5
        if a.type == "range":
            for bad in ("abc", [[1.0], ["abc"]], [[True]], "#DIV/0!"):
                args[i] = bad
                with pytest.raises(BadInput, match=f"{a.name}"):
                    joulebook.call(f.name, *args)
        elif a.type == "number":
            with pytest.raises(BadInput, match="TRUE/FALSE"):
                joulebook.call(f.name, *args)
            args[i] = "abc"
            with pytest.raises(BadInput, match=f"{a.name}"):
                joulebook.call(f.name, *args)
            args[i] = "#N/A"
            with pytest.raises(BadInput, match="error value"):
                joulebook.call(f.name, *args)
        else:
            with pytest.raises(BadInput, match=f"{a.name}"):
                joulebook.call(f.name, *args)


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_too_many_arguments(f):
    with pytest.raises(BadInput, match="at most"):
        joulebook.call(f.name, *([None] * (len(f.all_args) + 1)))


def _numeric_positions(f):
    return [i for i, a in enumerate(f.args[: len(f.example.args)]) if a.type == "number"]


@pytest.mark.parametrize(
    "f", [f for f in CATALOG if f.elementwise and _numeric_positions(f)], ids=lambda f: f.name
)
def test_a_column_spills_the_same_values(f):
    """Any numeric argument given as a column returns a column equal to per-cell calls."""
    i = _numeric_positions(f)[0]
    args = list(f.example.args)
    col = [[args[i]], [None], [args[i]]]
    args[i] = col
    out = joulebook.call(f.name, *args)
    single = joulebook.call(f.name, *f.example.args)
    assert out.shape == (3, 1)
    assert out[1, 0] is None  # blank in, blank out
    for r in (0, 2):
        assert out[r, 0] == single


@pytest.mark.parametrize(
    "f",
    [f for f in CATALOG if f.elementwise and not _numeric_positions(f) and f.args],
    ids=lambda f: f.name,
)
def test_a_text_column_spills_too(f):
    args = list(f.example.args)
    args[0] = [[args[0]], [args[0]]]
    out = joulebook.call(f.name, *args)
    assert out.shape == (2, 1) and out[0, 0] == out[1, 0] == joulebook.call(f.name, *f.example.args)


def test_results_are_never_nan_or_inf():
    for f in CATALOG:
        r = joulebook.call(f.name, *f.example.args)
        if isinstance(r, float):
            assert np.isfinite(r)


def test_unknown_function():
    with pytest.raises(BadInput, match="unknown joulebook function"):
        joulebook.call("JB_NOPE")
    assert lookup("jb_prop").name == "JB_PROP"


def test_errors_are_project_types_only():
    for f in CATALOG:
        try:
            joulebook.call(f.name, *([None] * len(f.all_args)))
        except JoulebookError:
            pass


@pytest.mark.parametrize("f", CATALOG, ids=IDS)
def test_entry_points_at_its_adapter_by_reference(f):
    """An entry holds its adapter itself (a reader can follow it), not a name in a string."""
    import joulebook.catalog.adapters as adapters

    assert callable(f.impl) and getattr(adapters, f.impl.__name__) is f.impl
    assert f.column is None or getattr(adapters, f.column.__name__) is f.column
