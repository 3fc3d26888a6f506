"""Units: phrases, systems, gauge pressure, temperature differences, cached factors."""

import math

import pytest

import joulebook
from joulebook.core.errors import BadInput, OutOfRange
from joulebook.core.units import convert, parse_phrase, parse_unit, unit_system


# NIST Special Publication 811 (2008 ed.), Appendix B.8/B.9 exact factors
@pytest.mark.parametrize(
    "unit, kind, si",
    [
        (
            "psi",
            "pressure_difference",
            6894.757293168361,
        ),  # NIST SP 811 B.9: psi = 6.894 757 293 168 E+03 Pa
        ("psia", "pressure", 6894.757293168361),
        ("Btu", "energy", 1055.05585262),  # NIST SP 811 B.9: Btu_IT = 1.055 055 852 62 E+03 J
        ("lbm", "mass", 0.45359237),  # NIST SP 811 B.9: pound (avoirdupois) = 0.453 592 37 kg exact
        ("ft3", "volume", 0.028316846592),  # NIST SP 811 B.9: cubic foot = 2.831 684 659 2 E-02 m3
        ("Btu/lbm", "specific_energy", 2326.0),  # NIST SP 811 B.9: Btu_IT/lb = 2326 J/kg exact
        (
            "Btu/lbm-R",
            "specific_entropy",
            4186.8,
        ),  # NIST SP 811 B.9: Btu_IT/(lb·°R) = 4186.8 J/(kg·K)
        ("bar", "pressure", 1e5),
        ("L", "volume", 1e-3),
        ("kWh", "energy", 3.6e6),
    ],
)
def test_factors_nist_sp811(unit, kind, si):
    c = parse_unit(unit, kind)
    assert c.offset == 0.0
    assert c.factor == pytest.approx(si, rel=1e-12)


def test_temperature_scales_nist_sp811():
    # NIST SP 811 B.9: T/K = (t/°F + 459.67)/1.8 ; T/K = (T/°R)/1.8 ; T/K = t/°C + 273.15
    assert convert(212.0, "degF", "K") == pytest.approx((212 + 459.67) / 1.8, rel=1e-14)
    assert convert(491.67, "R", "K") == pytest.approx(273.15, rel=1e-14)
    # common practice: 27 °C = 300.15 K
    assert convert(27.0, "degC", "K") == pytest.approx(300.15, abs=1e-12)
    assert convert(27.0, "°C", "K") == pytest.approx(300.15, abs=1e-12)


def test_specific_heat_per_kelvin_equals_per_degree_celsius():
    # common practice: kJ/(kg·K) and kJ/(kg·°C) are the same number (only differences enter)
    for a in ("kJ/kg.K", "kJ/(kg*K)", "kJ/kg-K", "kJ/(kg·K)"):
        for b in ("kJ/kg.°C", "kJ/(kg*degC)", "kJ/kg.C", "kJ/(kg·°C)"):
            assert parse_unit(a, "specific_entropy") == parse_unit(a, "specific_entropy")
            assert (
                parse_unit(a, "specific_entropy").factor
                == parse_unit(b, "specific_entropy").factor
                == 1000.0
            )
    assert (
        parse_unit("Btu/lbm-F", "specific_entropy").factor
        == parse_unit("Btu/lbm-R", "specific_entropy").factor
    )


def test_difference_versus_absolute():
    assert parse_unit("degC", "temperature").offset == 273.15
    d = parse_unit("degC", "temperature_difference")
    assert (d.factor, d.offset) == (1.0, 0.0)
    dF = parse_unit("degF", "temperature_difference")
    assert dF.offset == 0.0 and dF.factor == pytest.approx(5 / 9, rel=1e-15)


@pytest.mark.parametrize(
    "unit, kind",
    [
        ("m3", "volume"),
        ("kg/m3", "density"),
        ("°C", "temperature"),
        ("degC", "temperature"),
        ("kJ/kg.K", "specific_entropy"),
        ("kJ/(kg*K)", "specific_entropy"),
        ("bara", "pressure"),
        ("barg", "pressure"),
        ("psia", "pressure"),
        ("psig", "pressure"),
        ("L", "volume"),
        ("m³", "volume"),
        ("ft3/lbm", "specific_volume"),
        ("kPag", "pressure"),
        ("MPa", "pressure"),
    ],
)
def test_spellings_engineers_type(unit, kind):
    c = parse_unit(unit, kind)
    assert c.factor > 0


def test_gauge_pressure_reference():
    # standard atmosphere 101.325 kPa (common practice / ISO 2533) unless written
    assert parse_unit("kPag", "pressure").to_si(0.0) == 101325.0
    assert parse_unit("barg", "pressure").to_si(1.0) == pytest.approx(201325.0)
    assert parse_unit("psig", "pressure").to_si(0.0) == 101325.0
    assert parse_unit("kPag @ 95 kPa", "pressure").to_si(100.0) == pytest.approx(195000.0)
    assert parse_unit("psig @ 14.2 psia", "pressure").to_si(0.0) == pytest.approx(
        14.2 * 6894.757293168361
    )
    with pytest.raises(OutOfRange, match="50–110 kPa"):
        parse_unit("kPag @ 5 kPa", "pressure")


@pytest.mark.parametrize(
    "unit, kind, words",
    [
        ("kPa", "temperature", "pressure unit"),
        ("degC", "pressure", "temperature unit"),
        ("blorps", "pressure", "unknown unit"),
        ("psig", "temperature", "gauge"),
        ("kg", "energy", "mass unit"),
    ],
)
def test_mismatched_and_unknown_units_are_clear(unit, kind, words):
    with pytest.raises(BadInput, match=words) as e:
        parse_unit(unit, kind)
    assert repr(unit) in e.value.message and len(e.value.message) < 200


def test_unit_systems():
    s = unit_system("degF-psia-Btu")
    assert s.unit("temperature") == "degF"
    assert s.unit("specific_energy") == "Btu/lbm"
    assert s.conv("specific_entropy").factor == pytest.approx(4186.8, rel=1e-12)
    assert s.conv("temperature_difference").factor == pytest.approx(5 / 9)
    assert unit_system("K-Pa-J").conv("specific_energy").factor == 1.0
    assert unit_system(None).unit("pressure") == "kPa"
    o = unit_system("P=psig, V=L")
    assert o.unit("pressure") == "psig" and o.unit("volume") == "L" and o.unit("temperature") == "K"
    assert unit_system("degC-bar-kJ; V=L").unit("temperature") == "degC"
    with pytest.raises(BadInput, match="not a temperature, pressure or energy"):
        unit_system("degC-kg-kJ")
    with pytest.raises(BadInput, match="unknown symbol"):
        unit_system("Q7=kJ")


def test_phrases():
    p = parse_phrase("T in degC")
    assert p.symbol == "T" and p.conv.to_si(25) == pytest.approx(298.15)
    assert parse_phrase("h").unit == "kJ/kg"
    assert parse_phrase("h", unit_system("K-Pa-J")).unit == "J/kg"
    with pytest.raises(BadInput, match="unknown property"):
        parse_phrase("zz in kJ")
    with pytest.raises(BadInput, match="pressure unit"):
        parse_phrase("T in kPa")


def test_factors_are_cached_not_rebuilt():
    parse_unit.cache_clear()
    parse_unit("kJ/kg", "specific_energy")
    before = parse_unit.cache_info()
    for _ in range(100):
        parse_unit("kJ/kg", "specific_energy")
    after = parse_unit.cache_info()
    assert after.misses == before.misses and after.hits == before.hits + 100


def test_convert_function(call):
    assert call("JB_CONVERT", 100, "psig", "kPa") == pytest.approx(689.4757293168361 + 101.325)
    assert call("JB_CONVERT", 1, "Btu/lbm", "kJ/kg") == pytest.approx(2.326)
    with pytest.raises(BadInput, match="cannot convert"):
        call("JB_CONVERT", 1, "kPa", "K")
    assert math.isclose(joulebook.call("JB_CONVERT", 300.15, "K", "degC"), 27.0, abs_tol=1e-12)


_SYSTEMS = ["K-kPa-kJ", "K-Pa-J", "degC-bar-kJ", "degF-psia-Btu", "R-psia-Btu"]


def test_every_quantity_has_its_unit_in_every_named_system_as_documented():
    # docs/units.md states the unit of each quantity in each named system; the table must
    # be what the systems do
    from pathlib import Path

    from joulebook.core.units import KIND_WORDS, KINDS, unit_system

    doc = (Path(__file__).resolve().parents[1] / "docs" / "units.md").read_text()
    for kind in KINDS:
        if kind == "dimensionless":
            continue
        row = f"| {KIND_WORDS[kind]} | " + " | ".join(
            f"`{unit_system(s).unit(kind)}`" for s in _SYSTEMS
        )
        assert row in doc, row


@pytest.mark.parametrize("system", ["degF-psia-Btu", "R-psia-Btu"])
def test_english_systems_leave_no_catalog_argument_in_si_units(system):
    # every numeric argument of every catalog entry reads English units in an English
    # system (a speed in ft/s, a torque in lbf·ft), except the electrical ones and time
    from joulebook.catalog import CATALOG
    from joulebook.core.units import unit_system

    us = unit_system(system)
    for f in CATALOG:
        for a in f.args:
            if a.quantity in (None, "voltage", "current", "time"):
                continue
            unit = us.unit(a.quantity)
            assert not any(t in unit for t in ("kg", "m3", "m/s", "N*m", "kJ", "kPa")), (
                f.name,
                a.name,
                unit,
            )
            assert unit not in ("m", "J", "Pa", "K"), (f.name, a.name, unit)


def test_kinetic_energy_in_english_units():
    # hand: ΔKE = ½·1200 lbm·(25 ft/s)² = 375,000 lbm·ft²/s² = 14.978 Btu
    # (1 Btu = 25,037 lbm·ft²/s², from Btu_IT = 1055.05585262 J and the lbm and ft definitions)
    from joulebook import call

    assert call("JB_BALANCE_DELTA_KE", 1200, 0, 25, "degF-psia-Btu") == pytest.approx(
        14.9779191745, rel=1e-9
    )


@pytest.mark.parametrize(
    "value, unit, to, expected",
    [
        (100, "PSIG", "psig", 100),  # common practice: spellings without regard to case
        (1, "KPA", "Pa", 1000),
        (2, "barA", "kPa", 200),
        (2, "bar(g)", "kPa", 301.325),  # absolute = gauge + 101.325 kPa
        (2, "bar(a)", "kPa", 200),
        (760, "Torr", "kPa", 101.325),  # NIST SP 811: 1 atm = 760 Torr
        (1, "inH2O", "Pa", 249.08891),  # NIST SP 811: conventional inch of water
        (1, "inHg", "Pa", 3386.389),  # NIST SP 811: conventional inch of mercury
        (100, "celsius", "fahrenheit", 212),
        (1, "MMBtu", "Btu", 1e6),
        (1, "TR", "Btu/hour", 12000),  # ton of refrigeration
        (1, "kcal", "J", 4186.8),  # International Table calorie (NIST SP 811)
        (1, "kcal_th", "J", 4184),  # thermochemical calorie
        (1, "oil_bbl", "m3", 0.158987294928),  # 42 US gal
        (1, "liquid_bbl", "m3", 0.119240471196),  # 31.5 US gal
        (1, "scf", "mol", 1.19528694),  # hand: 101325 Pa·0.0283168 m³/(R·288.7056 K)
        (1, "Nm3", "mol", 44.615033),  # hand: 101325 Pa·1 m³/(R·273.15 K)
        (1000, "scf", "Nm3", 26.7911),  # common practice: about 37.3 scf per Nm³
    ],
)
def test_spellings_convert_to_their_stated_values(value, unit, to, expected):
    assert convert(value, unit, to) == pytest.approx(expected, rel=1e-6)


def test_barrel_is_ambiguous():
    with pytest.raises(BadInput, match="oil_bbl .*liquid_bbl"):
        convert(1, "bbl", "m3")


def test_factors_carry_no_last_bit_noise():
    # the foot is 0.3048 m by definition; pint's arithmetic gives 0.30479999999999996
    assert parse_unit("ft/s", "speed").factor == 0.3048
    assert parse_unit("lbm", "mass").factor == 0.45359237


def test_rates_and_heat_flux_units():
    # NIST SP 811: 1 Btu_IT/h = 0.29307107 W; 1 Btu_IT/(h·ft²) = 3.1545907 W/m²
    assert convert(1, "Btu/(h*ft2)", "W/m2") == pytest.approx(3.1545907, rel=1e-7)
    assert convert(1, "kW", "Btu/h") == pytest.approx(1000 / 0.29307107, rel=1e-7)
    assert convert(2, "kW/m2", "W/m2") == 2000.0
    # the first law per unit time: dE/dt = Q_dot − W_dot (hand)
    assert joulebook.call("JB_BALANCE_RATE", 12, 5) == 7.0


def test_unit_seed_holds_exactly_what_pint_computes():
    # the seed (joulebook.core.unitseed) spares a check the import of pint for the common units;
    # each entry must be pint's own result (pint, the version installed), and regenerating
    # it must give the committed table
    from joulebook.core import units, unitseed
    from joulebook.tools import unitseedgen

    for (pint_text, kind), (factor, offset) in unitseed.CONVS.items():
        assert units._pint_conv(pint_text, kind, pint_text) == (factor, offset), pint_text
    for pint_text, kind in unitseed.KINDS.items():
        assert units._pint_kind(pint_text, pint_text, False) == kind, pint_text
    for pint_text, dims in unitseed.DIMS.items():
        assert unitseedgen.dimensions(pint_text) == dims, pint_text
    # generated in a process of its own, as `python -m joulebook.tools.unitseedgen` does (in this one,
    # caches filled by other tests would hide some of the units the examples read)
    import ast
    import subprocess
    import sys

    code = "from joulebook.tools.unitseedgen import generate; print(repr(generate()))"
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    fresh = ast.literal_eval(done.stdout)
    assert fresh == (unitseed.CONVS, unitseed.KINDS, unitseed.DIMS), (
        "joulebook/core/unitseed.py is stale: run `python -m joulebook.tools.unitseedgen`"
    )
    assert parse_unit("kJ/kg", "specific_energy").factor == 1000.0


@pytest.mark.parametrize(
    "unit, kind", [("J", "temperature"), ("kJ/kg", "pressure"), ("m3", "mass"), ("K", "energy")]
)
def test_a_unit_of_another_quantity_is_refused_alike_with_or_without_the_seed(unit, kind):
    from joulebook.core import units

    with pytest.raises(BadInput) as seeded:
        parse_unit(unit, kind)
    saved = dict(units._SEED_DIMS), dict(units._SEED_CONVS), dict(units._SEED_KINDS)
    for table in (units._SEED_DIMS, units._SEED_CONVS, units._SEED_KINDS):
        table.clear()
    parse_unit.cache_clear()
    try:
        with pytest.raises(BadInput) as by_pint:
            parse_unit(unit, kind)
    finally:
        units._SEED_DIMS.update(saved[0])
        units._SEED_CONVS.update(saved[1])
        units._SEED_KINDS.update(saved[2])
        parse_unit.cache_clear()
    assert str(seeded.value) == str(by_pint.value)
