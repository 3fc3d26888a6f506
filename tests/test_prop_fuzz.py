"""A fast property-based sample: any input pair gives a finite number or a project error.

(The long nightly-style run belongs to the hardening issue; this is the default-suite sample.)
"""

import math

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import joulebook
from joulebook.core.errors import JoulebookError

SPECS = {
    "T in K": st.floats(min_value=-50, max_value=3000),
    "P in kPa": st.floats(min_value=-10, max_value=2e6),
    "v in m3/kg": st.floats(min_value=1e-4, max_value=1e3),
    "rho in kg/m3": st.floats(min_value=-1, max_value=1500),
    "u in kJ/kg": st.floats(min_value=-100, max_value=5000),
    "h in kJ/kg": st.floats(min_value=-100, max_value=5000),
    "s in kJ/kg.K": st.floats(min_value=-1, max_value=12),
    "x": st.floats(min_value=-0.2, max_value=1.2),
}
WANTS = ["T", "P", "v", "rho", "u", "h", "s", "cp", "cv", "k", "x", "Z", "Tsat", "Psat", "phase"]


@st.composite
def queries(draw):
    a, b = draw(st.lists(st.sampled_from(sorted(SPECS)), min_size=2, max_size=2, unique=True))
    return (
        draw(st.sampled_from(["water", "CO2", "R134a", "nitrogen", "air"])),
        draw(st.sampled_from(WANTS)),
        a,
        draw(SPECS[a]),
        b,
        draw(SPECS[b]),
    )


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(queries())
def test_prop_is_a_finite_number_or_a_project_error(q):
    try:
        r = joulebook.call("JB_PROP", *q)
    except JoulebookError as e:
        assert 0 < len(e.message) <= 200
        return
    if q[1] == "phase":
        assert isinstance(r, str) and r
    else:
        assert isinstance(r, float) and math.isfinite(r)
