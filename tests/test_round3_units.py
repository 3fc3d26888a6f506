"""Issue 27, round 3 (units engineers type): kg/cm2, kg/cm2g, water columns, kJ/kgK, "deg C";
bare psi refused as an absolute pressure and read as a difference; the override message that
names the symbol needed; the wall's E_mod and poisson.

Factors name their source beside the check (NIST SP 811, from memory where recalled).
"""

import pytest

import joulebook
from joulebook import call
from joulebook.core.errors import BadInput
from joulebook.core.units import SYMBOLS, convert, parse_phrase, parse_unit, unit_system
from refcheck import check

NIST = "NIST SP 811 (2008) Appendix B.8 (from memory)"


@pytest.mark.parametrize(
    "unit, si",
    [
        ("kg/cm2", 98066.5),  # NIST SP 811 B.8: kilogram-force per square centimetre
        ("kgf/cm2", 98066.5),  # the same, written with its force
        ("KG/CM2", 98066.5),
        ("kg/cm²", 98066.5),
        ("kg/cm2a", 98066.5),
        ("mmH2O", 9.80665),  # NIST SP 811 B.8: millimetre of water, conventional
        ("mmWC", 9.80665),
        ("cmH2O", 98.0665),  # NIST SP 811 B.8: centimetre of water, conventional
        ("mWC", 9806.65),  # 1000 conventional millimetres of water (hand)
        ("mH2O", 9806.65),
    ],
)
def test_pressure_units_engineers_type(unit, si):
    c = parse_unit(unit, "pressure")
    assert c.offset == 0.0
    check(c.factor, si, rtol=1e-12, quantity="unit factor [Pa]", conditions=f"1 {unit}",
          source=NIST)  # fmt: skip


def test_kg_per_cm2_gauge_is_a_gauge_unit():
    # hand: 10 kg/cm2g = 10·98066.5 Pa + 101325 Pa (the standard atmosphere, as every gauge)
    for unit in ("kg/cm2g", "kgf/cm2g", "kg/cm2(g)", "KG/CM2G"):
        c = parse_unit(unit, "pressure")
        assert c.to_si(10.0) == pytest.approx(10 * 98066.5 + 101325.0, rel=1e-12), unit
    assert parse_unit("kg/cm2g @ 95 kPa", "pressure").to_si(0.0) == pytest.approx(95e3)
    with pytest.raises(BadInput, match="gauge pressure"):
        parse_unit("kg/cm2g", "modulus")


@pytest.mark.parametrize(
    "glued, plain",
    [
        ("kJ/kgK", "kJ/(kg*K)"),
        ("kJ/kgC", "kJ/(kg*K)"),
        ("J/kgK", "J/(kg*K)"),
        ("kJ/kg deg C", "kJ/(kg*K)"),
        ("Btu/lbmR", "Btu/(lbm*R)"),
        ("Btu/lbmF", "Btu/(lbm*R)"),
    ],
)
def test_glued_and_spaced_specific_heat_units(glued, plain):
    for kind in ("specific_heat", "specific_entropy"):
        assert parse_unit(glued, kind).factor == parse_unit(plain, kind).factor


@pytest.mark.parametrize("unit", ["deg C", "deg. C", "degrees C", "Deg C", "° C", "DEG C"])
def test_a_temperature_written_apart_from_its_scale(unit):
    c = parse_unit(unit, "temperature")
    assert (c.factor, c.offset) == (1.0, 273.15)


def test_deg_f_and_deg_k_written_apart():
    # NIST SP 811 B.9: T/K = (t/°F + 459.67)/1.8
    assert parse_unit("deg F", "temperature").to_si(212.0) == pytest.approx(373.15)
    assert parse_unit("deg K", "temperature").to_si(300.0) == 300.0


def test_properties_with_the_new_spellings_are_the_same_state():
    # the same state written two ways gives the same property (hand: 1 kg/cm2 = 0.980665 bar)
    a = call("JB_PROP", "water", "s in kJ/kgK", "T in deg C", 120, "P in kg/cm2", 10)
    b = call("JB_PROP", "water", "s in kJ/(kg*K)", "T in degC", 120, "P in bar", 9.80665)
    assert a == pytest.approx(b, rel=1e-12)


# ------------------------------------------------------------------ bare psi


@pytest.mark.parametrize("text", ["psi", "PSI", "Psi"])
def test_bare_psi_is_refused_as_an_absolute_pressure_naming_psia_and_psig(text):
    with pytest.raises(BadInput, match="psia .absolute. or psig .gauge."):
        parse_unit(text, "pressure")
    with pytest.raises(BadInput, match="psia"):
        call("JB_PROP", "water", "h", "T in degF", 200, f"P in {text}", 50)
    with pytest.raises(BadInput, match="psig"):
        unit_system(f"P={text}")
    with pytest.raises(BadInput, match="psia"):
        unit_system(f"degF-{text}-Btu")


def test_psia_and_psig_are_still_taken():
    # clean twins (NIST SP 811 B.8: psi = 6894.757 Pa; psig adds the standard atmosphere)
    a = call("JB_PROP", "water", "h", "T in degF", 200, "P in psia", 50)
    b = call("JB_PROP", "water", "h", "T in degF", 200, "P in psig", 50 - 14.695948775513)
    assert a == pytest.approx(b, rel=1e-9)
    assert unit_system("P=psia").unit("pressure") == "psia"


def test_psi_is_a_pressure_difference():
    # NIST SP 811 B.8: psi = 6.894 757 293 168 E+03 Pa; a difference converts by its factor
    assert convert(100, "psi", "kPa") == pytest.approx(689.4757293168361, rel=1e-12)
    assert call("JB_CONVERT", 100, "psi", "kPa") == pytest.approx(689.4757293168361, rel=1e-12)
    assert call("JB_CONVERT", 1, "psi", "kg/cm2") == pytest.approx(6894.757293168361 / 98066.5)
    assert parse_unit("psi", "pressure_difference").factor == pytest.approx(6894.757293168361)
    assert parse_unit("psi", "modulus").factor == pytest.approx(6894.757293168361)
    assert unit_system("dP=psi").unit("pressure_difference") == "psi"
    assert unit_system("degF-psia-Btu").unit("pressure_difference") == "psi"
    with pytest.raises(BadInput, match="gauge pressure, not a pressure difference"):
        convert(100, "psi", "psig")


def test_a_negative_psi_difference_converts():
    # a difference may be negative: no absolute-pressure rule applies
    assert convert(-10, "psi", "kPa") == pytest.approx(-68.94757293168361)


# ------------------------------------------------------------------ override messages


@pytest.mark.parametrize("sym", sorted(set(SYMBOLS) - {"Tsat", "Psat"}))
def test_an_unknown_override_names_the_symbol_of_its_unit_before_any_cut(sym):
    # a misspelt symbol with a unit of the intended quantity: the message, clipped to its
    # 200 characters, still names the symbol meant (the old list was cut at 120)
    kind = SYMBOLS[sym]
    unit = unit_system(None).unit(kind) or "%"
    typo = sym + "q"
    with pytest.raises(BadInput) as e:
        unit_system(f"{typo}={unit}")
    msg = str(e.value)
    assert "did you mean" in msg
    meant = msg.split("did you mean", 1)[1].split("?", 1)[0]
    assert sym in meant.replace(" or ", " ").split(), (sym, msg)


def test_an_override_message_for_a_quantity_word_names_its_symbol():
    with pytest.raises(BadInput, match=r"did you mean P\?"):
        unit_system("pressure=kPa")


# ------------------------------------------------------------------ E_mod and poisson


def test_wall_arguments_are_e_mod_and_poisson():
    from joulebook.catalog import lookup

    for name in ("JB_BLOCKED_IN_P2", "JB_TEST_HYDRO_ENERGY"):
        args = [a.name for a in lookup(name).args]
        assert "E_mod" in args and "poisson" in args and "E" not in args and "nu" not in args
    # the override symbol E_mod is the argument's own: 29 007.5 psi is 200 GPa (NIST SP 811)
    state = "water | T = 15 degC | P = 4 bar"
    wall = ("cylinder", 0.1, 0.005)
    gpa = call("JB_BLOCKED_IN_P2", state, 318.15, *wall, 200, 0.3)
    psi = call("JB_BLOCKED_IN_P2", state, 318.15, *wall, 200e9 / 6894.757293168361, 0.3, None,
               "E_mod=psi")  # fmt: skip
    assert psi == pytest.approx(gpa, rel=1e-12)
    with pytest.raises(BadInput, match="pressure unit; energy needs"):
        call("JB_BLOCKED_IN_P2", state, 318.15, *wall, 200, 0.3, None, "E=GPa")


def test_the_api_takes_the_new_and_the_former_wall_keywords():
    from joulebook import Q_, State

    line = State("water", T=Q_(15, "degC"), P=Q_(4, "bar"))
    common = dict(shape="cylinder", D=Q_(100, "mm"), wall=Q_(5, "mm"))
    new = joulebook.blocked_in_p2(line, Q_(45, "degC"), E_mod=Q_(200, "GPa"), poisson=0.3,
                                  **common)  # fmt: skip
    old = joulebook.blocked_in_p2(line, Q_(45, "degC"), E=Q_(200, "GPa"), nu=0.3, **common)
    assert new.to("Pa").magnitude == old.to("Pa").magnitude
    with pytest.raises(BadInput, match="former name"):
        joulebook.blocked_in_p2(line, Q_(45, "degC"), E_mod=Q_(200, "GPa"), E=Q_(200, "GPa"),
                                poisson=0.3, **common)  # fmt: skip


def test_the_wall_messages_name_the_new_arguments():
    with pytest.raises(BadInput, match="needs poisson"):
        call("JB_BLOCKED_IN_P2", "water | T = 15 degC | P = 4 bar", 318.15, "cylinder", 0.1,
             0.005, 200)  # fmt: skip
    with pytest.raises(BadInput, match="E_mod = 0 Pa"):
        call("JB_BLOCKED_IN_P2", "water | T = 15 degC | P = 4 bar", 318.15, "cylinder", 0.1,
             0.005, 0, 0.3, None, "K-Pa-J")  # fmt: skip
    assert parse_phrase("E in kJ").kind == "energy"  # E stays an energy in phrases


def test_the_new_spellings_are_seeded_so_labels_are_read_without_pint():
    # a label such as "Pressure (kg/cm2g)" is read from the unit seed (hand: the same maps)
    from joulebook.core.units import known_unit
    from joulebook.core.unitseed import CONVS

    assert CONVS[("millimeter_water", "pressure")] == (9.80665, 0.0)
    assert CONVS[("meter_water", "pressure")] == (9806.65, 0.0)
    assert CONVS[("kgf/(cm**2)", "pressure")] == (98066.5, 0.0)
    c = known_unit("kg/cm2g", "pressure")
    assert c is not None and (c.factor, c.offset) == (98066.5, 101325.0)
    assert known_unit("psi", "pressure") is None  # ambiguous: no label reading


@pytest.mark.parametrize(
    "phrase, meant",
    [("Twetbulb in degC", "Twb"), ("Pres in psig", "P"), ("sigmaa in N/m", "sigma"),
     ("lamda in W/(m*K)", "lambda")],
)  # fmt: skip
def test_an_unknown_property_names_the_symbol_meant_before_any_cut(phrase, meant):
    with pytest.raises(BadInput) as e:
        parse_phrase(phrase)
    likely = str(e.value).split("did you mean", 1)[1].split("?", 1)[0]
    assert meant in likely.replace(" or ", " ").split(), str(e.value)
