"""Every catalog entry's working (joulebook.core.working) reproduces the entry's own result.

The working is what the audit shows a checker and docs/functions.md prints: the result as an
expression of the entry's arguments, with intermediate steps.  Evaluated on each entry's
example (numbers in SI, catalog functions called through the cell path), it must give the
value the entry itself gives — so the explanation cannot drift from the code.
"""

import math

import pytest

from joulebook.catalog import _AS_IS, CATALOG, UNITS_ARG, call, working_call
from joulebook.core.units import unit_system
from joulebook.core.working import Working, evaluate, names_in, show, work_out

WITH = [f for f in CATALOG if f.working is not None]
IDS = [f.name for f in WITH]


def _si_args(f):
    system = unit_system(None)
    vals = {}
    for a, v in zip(f.args, f.example.args + (None,) * len(f.args)):
        if a.quantity and isinstance(v, (int, float)):
            v = system.conv(a.quantity).to_si(float(v))
        elif isinstance(v, int):
            v = float(v)
        vals[a.name] = v
    return vals


def test_the_closed_forms_in_the_catalog_are_many():
    assert len([f for f in WITH if f.working.result]) >= 35


@pytest.mark.parametrize("f", WITH, ids=IDS)
def test_working_names_are_the_entry_arguments(f):
    w: Working = f.working
    known = {a.name for a in f.args} | {s.symbol for s in w.steps} | {"V"}
    for expr in [s.expr for s in w.steps] + [w.result, w.curve]:
        if expr:
            assert names_in(expr) <= known, (expr, names_in(expr) - known)
            assert show(expr)  # renders
    for name, _ in w.defaults:
        assert name in {a.name for a in f.args}
    if w.band:
        assert w.band[0] in known | {"="}
    assert UNITS_ARG not in f.args


@pytest.mark.parametrize("f", [f for f in WITH if f.working.result], ids=lambda f: f.name)
def test_working_reproduces_the_example(f):
    """Source: the entry's own value (common practice: an explanation must equal the code)."""
    vals = _si_args(f)
    steps, res = work_out(f.working, vals, working_call(None), lambda v, k: str(v))
    assert all(not s.error for s in steps), [(s.symbol, s.error) for s in steps]
    assert res is not None and not res.error, res
    got = call(f.name, *f.example.args)
    if f.result not in _AS_IS:
        got = unit_system(None).conv(f.result).to_si(got)
    assert math.isclose(res.value, got, rel_tol=1e-9, abs_tol=1e-12), (res.value, got)


@pytest.mark.parametrize("f", [f for f in WITH if f.working.steps], ids=lambda f: f.name)
def test_working_steps_evaluate_on_the_example(f):
    steps, _ = work_out(f.working, _si_args(f), working_call(None), lambda v, k: str(v))
    for s in steps:
        assert not s.error, (s.symbol, s.error)
        assert isinstance(s.value, (float, str)), s


def test_expressions_are_parsed_not_executed():
    for bad in ("__import__('os')", "x.real", "[1, 2]", "lambda: 1", "a if b else c", "x < 1"):
        with pytest.raises((ValueError, SyntaxError)):
            evaluate(bad, {"x": 1.0, "a": 1.0, "b": 1.0, "c": 1.0})


def test_rendering_keeps_precedence():
    assert show("a - (b - c)") == "a − (b − c)"
    assert show("a/(b*c)") == "a/(b·c)"
    assert show("(a*b)**2") == "(a·b)^2"
    assert show("-x**2") == "−x^2"
    assert show("T_1*(P_2/P_1)**((n - 1)/n)") == "T1·(P2/P1)^((n − 1)/n)"
    assert evaluate("2*pi*N*tau", {"N": 1.0, "tau": 1.0}) == pytest.approx(2 * math.pi)
