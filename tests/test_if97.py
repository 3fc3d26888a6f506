"""Water by the industrial formulation IAPWS-IF97.

Source: IAPWS R7-97(2012), the computer-program verification tables 5 (region 1), 15
(region 2) and 33 (region 3) — the values recalled from memory; they agree with the property
library's IF97 backend to the digits given.  Region 3 is reached here through (T, P), which
the property library evaluates by the supplementary backward equations v(p, T) (IAPWS
SR5-05): Table 33's pressures are met to their stated consistency, 2e-4 here.
"""

import pytest

from joulebook import call
from joulebook.core.errors import OutOfRange
from refcheck import check

IF97 = "IAPWS R7-97(2012) verification tables (from memory)"

# T [K], P [MPa], v [m3/kg], h [kJ/kg], u [kJ/kg], s [kJ/(kg K)], cp [kJ/(kg K)], w [m/s]
TABLE_5_15 = [
    ("Table 5", 300, 3, 0.100215168e-2, 0.115331273e3, 0.112324818e3, 0.392294792, 0.417301218e1, 0.150773921e4),
    ("Table 5", 300, 80, 0.971180894e-3, 0.184142828e3, 0.106448356e3, 0.368563852, 0.401008987e1, 0.163469054e4),
    ("Table 5", 500, 3, 0.120241800e-2, 0.975542239e3, 0.971934985e3, 0.258041912e1, 0.465580682e1, 0.124071337e4),
    ("Table 15", 300, 0.0035, 0.394913866e2, 0.254991145e4, 0.241169160e4, 0.852238967e1, 0.191300162e1, 0.427920172e3),
    ("Table 15", 700, 0.0035, 0.923015898e2, 0.333568375e4, 0.301262819e4, 0.101749996e2, 0.208141274e1, 0.644289068e3),
    ("Table 15", 700, 30, 0.542946619e-2, 0.263149474e4, 0.246861076e4, 0.517540298e1, 0.103505092e2, 0.480386523e3),
]  # fmt: skip


@pytest.mark.parametrize("row", TABLE_5_15, ids=lambda r: f"{r[0]}-{r[1]}K-{r[2]}MPa")
def test_if97_verification_tables_regions_1_and_2(row):
    table, T, P, v, h, u, s, cp, w = row
    cond = f"IF97 {table}, T = {T} K, P = {P} MPa"
    args = ("T in K", T, "P in MPa", P)
    for want, ref, q in (("v in m3/kg", v, "v [m3/kg]"), ("h in kJ/kg", h, "h [kJ/kg]"),
                         ("u in kJ/kg", u, "u [kJ/kg]"), ("s in kJ/(kg*K)", s, "s [kJ/(kg K)]"),
                         ("cp in kJ/(kg*K)", cp, "cp [kJ/(kg K)]"), ("w in m/s", w, "w [m/s]")):  # fmt: skip
        check(call("JB_PROP", "water (IF97)", want, *args), ref, rtol=1e-8, quantity=q,
              conditions=cond, source=IF97)  # fmt: skip


@pytest.mark.parametrize(
    "T, rho, P, h, s",
    [(650, 500, 0.255837018e2, 0.186343019e4, 0.405427273e1),
     (650, 200, 0.222930643e2, 0.237512401e4, 0.485438792e1),
     (750, 500, 0.783095639e2, 0.225868845e4, 0.446971906e1)],
)  # fmt: skip
def test_if97_verification_table_33_region_3(T, rho, P, h, s):
    cond = f"IF97 Table 33, T = {T} K, rho = {rho} kg/m3"
    args = ("T in K", T, "rho in kg/m3", rho)
    check(call("JB_PROP", "water (IF97)", "P in MPa", *args), P, rtol=2e-4,
          quantity="P [MPa]", conditions=cond, source=IF97)  # fmt: skip
    check(call("JB_PROP", "water (IF97)", "h in kJ/kg", *args), h, rtol=2e-5,
          quantity="h [kJ/kg]", conditions=cond, source=IF97)  # fmt: skip
    check(call("JB_PROP", "water (IF97)", "s in kJ/(kg*K)", *args), s, rtol=2e-5,
          quantity="s [kJ/(kg K)]", conditions=cond, source=IF97)  # fmt: skip


def test_if97_states_read_back_their_inputs_and_work_in_processes():
    # an input read back is the input (the backward equations are not used for P–h)
    assert call("JB_PROP", "water (IF97)", "T in K", "P in MPa", 3, "h in kJ/kg", 115.331273) == (
        pytest.approx(300.0, abs=1e-6)
    )
    s1 = call("JB_STATE", "water (IF97)", "P in bar", 1, "x", 0.5)
    q97 = call("JB_PROCESS", s1, "rigid", "P2 in bar", 5, "Q in kJ")
    q95 = call("JB_PROCESS", call("JB_STATE", "water", "P in bar", 1, "x", 0.5), "rigid",
               "P2 in bar", 5, "Q in kJ")  # fmt: skip
    assert q97 == pytest.approx(q95, rel=1e-3)  # IF97 is fitted to IAPWS-95 (hand: < 1e-3)
    with pytest.raises(OutOfRange, match="IF97"):
        call("JB_PROP", "water (IF97)", "h", "T in K", 1500, "P in MPa", 1)
    with pytest.raises(OutOfRange, match="IAPWS-95"):
        call("JB_PROP", "water (IF97)", "mu", "T in K", 300, "P in MPa", 1)
