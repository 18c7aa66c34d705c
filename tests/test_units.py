"""Unit codes and conversions, checked against published values.

Sources, named beside each check:
- SI Brochure: BIPM, The International System of Units, 9th edition (2019).
- NIST SP 811: Guide for the Use of the International System of Units, 2008 edition,
  Appendix B.8 (factors for units listed alphabetically) and B.9 (by kind of quantity).
- UCUM: The Unified Code for Units of Measure (Regenstrief Institute), version 2.1,
  syntax (§1-§7) and the tables of prefixes and units.
Section numbers are given from memory where marked.
"""
import math

import pytest
from hypothesis import given, strategies as st

from linter import units

# SI Brochure, 9th edition, Table 7: the SI prefixes (UCUM Table 1 uses the same values,
# writing micro as "u").
SI_PREFIXES = {
    "Y": 1e24, "Z": 1e21, "E": 1e18, "P": 1e15, "T": 1e12, "G": 1e9, "M": 1e6, "k": 1e3,
    "h": 1e2, "da": 1e1, "d": 1e-1, "c": 1e-2, "m": 1e-3, "u": 1e-6, "n": 1e-9, "p": 1e-12,
    "f": 1e-15, "a": 1e-18, "z": 1e-21, "y": 1e-24,
}
# UCUM Table 1 (from memory): the binary prefixes of IEC 60027-2.
BINARY_PREFIXES = {"Ki": 2**10, "Mi": 2**20, "Gi": 2**30, "Ti": 2**40}


def factor(old, new):
    rel = units.relate(old, new)
    assert rel.kind in ("scale", "same"), rel
    return rel.factor


@pytest.mark.parametrize("prefix,value", sorted(SI_PREFIXES.items()))
def test_every_si_prefix_on_metre_and_gram(prefix, value):
    # SI Brochure, 9th edition, Table 7.
    assert math.isclose(factor(prefix + "m", "m"), value, rel_tol=1e-12)
    assert math.isclose(factor(prefix + "g", "g"), value, rel_tol=1e-12)


@pytest.mark.parametrize("prefix,value", sorted(BINARY_PREFIXES.items()))
def test_binary_prefixes(prefix, value):
    # UCUM Table 1 (binary prefixes; from memory); 1 By = 8 bit (UCUM, information units).
    assert factor(prefix + "By", "By") == value
    assert factor("By", "bit") == 8


@pytest.mark.parametrize("old,new,expected,source", [
    ("L", "dm3", 1.0, "SI Brochure 9th ed., Table 8: 1 L = 1 dm3"),
    ("L", "m3", 1e-3, "SI Brochure 9th ed., Table 8: 1 L = 10^-3 m3"),
    ("l", "m3", 1e-3, "UCUM: l and L are both the litre"),
    ("mL", "cm3", 1.0, "SI Brochure 9th ed., Table 8: 1 mL = 1 cm3"),
    ("min", "s", 60.0, "SI Brochure 9th ed., Table 8: 1 min = 60 s"),
    ("h", "s", 3600.0, "SI Brochure 9th ed., Table 8: 1 h = 3600 s"),
    ("d", "s", 86400.0, "SI Brochure 9th ed., Table 8: 1 d = 86 400 s"),
    ("t", "kg", 1000.0, "SI Brochure 9th ed., Table 8: 1 t = 10^3 kg"),
    ("ms", "s", 1e-3, "SI Brochure 9th ed., Table 7: milli = 10^-3"),
    ("kW.h", "MJ", 3.6, "NIST SP 811, B.8: kilowatt hour = 3.6 E+06 J"),
    ("W.h", "J", 3600.0, "NIST SP 811, B.8: watt hour = 3.6 E+03 J"),
    ("bar", "kPa", 100.0, "NIST SP 811, B.8: bar = 1.0 E+05 Pa (UCUM: bar = 100 kPa)"),
    ("kPa", "bar", 0.01, "NIST SP 811, B.8: bar = 1.0 E+05 Pa"),
    ("Pa", "N/m2", 1.0, "SI Brochure 9th ed., Table 4: Pa = N/m2"),
    ("J", "N.m", 1.0, "SI Brochure 9th ed., Table 4: J = N m"),
    ("W", "J/s", 1.0, "SI Brochure 9th ed., Table 4: W = J/s"),
    ("Hz", "s-1", 1.0, "SI Brochure 9th ed., Table 4: Hz = s^-1"),
    ("m/s", "km/h", 3.6, "SI Brochure 9th ed., Tables 7-8: 1 m/s = 3.6 km/h"),
    ("L/min", "m3/h", 0.06, "SI Brochure 9th ed., Table 8: litre and hour"),
    ("[in_i]", "cm", 2.54, "NIST SP 811, B.8: inch = 2.54 E-02 m exactly"),
    ("[ft_i]", "m", 0.3048, "NIST SP 811, B.8: foot = 3.048 E-01 m exactly"),
    ("[lb_av]", "kg", 0.45359237, "NIST SP 811, B.8: pound (avoirdupois) = 4.535 924 E-01 kg"),
    ("atm", "kPa", 101.325, "NIST SP 811, B.8: standard atmosphere = 1.013 25 E+05 Pa"),
    ("%", "1", 0.01, "UCUM: % = 10^-2"),
    ("[ppm]", "1", 1e-6, "UCUM: [ppm] = 10^-6"),
    ("10*3/L", "/mL", 1.0, "UCUM: 10* is the number ten, with an exponent"),
    ("kg/(m.s2)", "Pa", 1.0, "UCUM §7 (from memory): parentheses group a term"),
])
def test_published_factors(old, new, expected, source):
    assert math.isclose(factor(old, new), expected, rel_tol=1e-9), source


@pytest.mark.parametrize("old,new,expected,digits,source", [
    ("[psi]", "kPa", 6.894757, 7, "NIST SP 811, B.8: pound-force per square inch = 6.894 757 E+03 Pa"),
    ("[gal_us]", "L", 3.785412, 7, "NIST SP 811, B.8: gallon (U.S.) = 3.785 412 E-03 m3"),
    ("[gal_br]", "L", 4.54609, 6, "NIST SP 811, B.8: gallon [Canadian and U.K. (Imperial)] = 4.546 09 E-03 m3"),
    ("mm[Hg]", "Pa", 133.3224, 6, "NIST SP 811, B.8: millimeter of mercury, conventional = 1.333 224 E+02 Pa; "
                                  "UCUM defines m[Hg] = 133.3220 kPa, equal to 6 digits"),
    ("[Btu_IT]", "J", 1055.056, 7, "NIST SP 811, B.8: British thermal unit_IT = 1.055 056 E+03 J"),
])
def test_published_non_si_factors(old, new, expected, digits, source):
    got = factor(old, new)
    assert f"{got:.{digits}g}" == f"{expected:.{digits}g}", source


def test_celsius_to_fahrenheit_is_affine():
    # NIST SP 811, B.9 (temperature; from memory): t/degF = (9/5) t/degC + 32.
    rel = units.relate("Cel", "[degF]")
    assert rel.kind == "affine"
    assert rel.factor == pytest.approx(1.8) and rel.offset == pytest.approx(32.0)
    assert rel.apply(100.0) == pytest.approx(212.0)


def test_kelvin_to_celsius_moves_the_zero():
    # SI Brochure 9th ed., 2.3.1 (from memory): t/degC = T/K - 273.15.
    rel = units.relate("K", "Cel")
    assert rel.kind == "affine"
    assert rel.factor == pytest.approx(1.0) and rel.offset == pytest.approx(-273.15)


def test_rankine_is_a_pure_scale_of_kelvin():
    # NIST SP 811, B.9 (from memory): T/K = (5/9) T/degR.
    assert factor("[degR]", "K") == pytest.approx(5 / 9)


def test_a_temperature_in_a_rate_is_an_interval():
    # Common practice: a rate of change has no zero to move, only the step changes.
    assert factor("Cel/min", "[degF]/min") == pytest.approx(1.8)
    assert units.relate("K/h", "Cel/h").kind == "same"


@pytest.mark.parametrize("old,new", [
    ("m", "meter"), ("L", "l"), ("kW.h", "kWh"), ("L", "dm3"), ("Cel", "degC"),
    ("s-1", "Hz"), ("m3", "m^3"), ("kg/(m.s2)", "Pa"), ("10*3", "1000"), ("m3/h", "m3 / h"),
])
def test_same_unit_spelled_differently(old, new):
    # UCUM for the codes; the second spellings are read leniently (common practice).
    assert units.relate(old, new).kind == "same"
    assert units.relate(new, old).kind == "same"


@pytest.mark.parametrize("old,new", [
    ("kg", "L"), ("m3", "kW.h"), ("s", "m"), ("kPa", "m"), ("Cel", "Pa"),
    ("{reading}/h", "{pulse}/h"), ("{reading}", "1"),
])
def test_dimension_changes(old, new):
    rel = units.relate(old, new)
    assert rel.kind == "dimension", rel
    assert rel.old_dimension != rel.new_dimension


@pytest.mark.parametrize("text", [
    "", "m s", "kg..m", "(m", "m)", "{reading", "[psi", "glugs", "10*", "K/", "m2.",
    "mCel", "Cel2",
])
def test_not_ucum(text):
    # UCUM syntax (from memory, §1-§7): no blanks, balanced brackets, known atoms; and
    # (common practice) no prefix or power on a temperature scale that has an offset.
    with pytest.raises(units.UnitSyntaxError):
        units.parse(text)


@pytest.mark.parametrize("text", ["mCel", "Cel2", "glugs", "kg..m", "2 +"])
def test_unreadable(text):
    # Neither UCUM nor a spelling pint knows (the lenient reading refuses them too).
    with pytest.raises(units.UnitSyntaxError):
        units.read(text)


@pytest.mark.parametrize("text,atoms", [
    ("mm[Hg]", (("m", "m[Hg]", 1),)),
    ("kW.h", (("k", "W", 1), ("", "h", 1))),
    ("m3/h", (("", "m", 3), ("", "h", -1))),
    ("s-1", (("", "s", -1),)),
    ("kg/m.s2", (("k", "g", 1), ("", "m", -1), ("", "s", 2))),  # UCUM §7: left to right
    ("kg/(m.s2)", (("k", "g", 1), ("", "m", -1), ("", "s", -2))),
    ("/min", (("", "min", -1),)),
    ("cd", (("", "cd", 1),)),            # candela, not centi-day: a whole atom wins
    ("dam", (("da", "m", 1),)),          # deka is the two-letter prefix
    ("Pa", (("", "Pa", 1),)),
    ("10*-3", (("", "10*", -3),)),
])
def test_parse_structure(text, atoms):
    # UCUM syntax (§1-§7, from memory): prefixes only on metric atoms, exponents follow
    # the symbol, '.' and '/' read left to right.
    assert units.parse(text).atoms == atoms


def test_prefix_only_on_metric_atoms():
    # UCUM: a prefix may only precede a metric unit; "kmin" is not a unit.
    with pytest.raises(units.UnitSyntaxError):
        units.parse("kmin")
    with pytest.raises(units.UnitSyntaxError):
        units.parse("k[psi]")


def test_annotations_are_kept_apart():
    code = units.parse("{reading}/h")
    assert code.annotations == ("reading",) and code.atoms == (("", "h", -1),)


def test_unreadable_relation_names_the_side():
    rel = units.relate("glugs", "m")
    assert rel.kind == "unreadable" and rel.problem.startswith("old unit")
    rel = units.relate("m", "glugs")
    assert rel.kind == "unreadable" and rel.problem.startswith("new unit")


# --- properties -----------------------------------------------------------------------

METRIC = ["m", "g", "s", "L", "Pa", "W", "J", "bar", "mol", "A", "V"]
OTHER = ["min", "h", "d", "[in_i]", "[ft_i]", "[gal_us]", "[psi]", "[lb_av]", "%", "[ppm]"]
PREFIX = st.sampled_from(["", "k", "m", "u", "M", "c", "d", "da", "h", "G", "n"])


@st.composite
def simple(draw):
    if draw(st.booleans()):
        symbol = draw(PREFIX) + draw(st.sampled_from(METRIC))
    else:
        symbol = draw(st.sampled_from(OTHER))
    exponent = draw(st.sampled_from(["", "2", "3", "-1"]))
    return symbol + exponent


@st.composite
def unit_text(draw):
    text = draw(simple())
    for _ in range(draw(st.integers(0, 2))):
        text += draw(st.sampled_from([".", "/"])) + draw(simple())
    return text


@given(unit_text(), unit_text())
def test_relation_is_symmetric(a, b):
    # Common practice (algebra of units): a -> b and b -> a are inverse conversions.
    ab, ba = units.relate(a, b), units.relate(b, a)
    assert (ab.kind == "dimension") == (ba.kind == "dimension")
    if ab.kind in ("scale", "same"):
        assert ba.kind in ("scale", "same")
        assert math.isclose(ab.factor * ba.factor, 1.0, rel_tol=1e-9)


@given(unit_text())
def test_a_unit_is_the_same_as_itself_with_parentheses(a):
    assert units.relate(a, f"({a})").kind == "same"


@given(PREFIX, st.sampled_from(METRIC))
def test_a_prefix_scales_by_its_value(prefix, atom):
    # SI Brochure 9th ed., Table 7.
    expected = float(units.PREFIXES.get(prefix, 1))
    assert math.isclose(factor(prefix + atom, atom), expected, rel_tol=1e-12)


TEMPERATURES = ["Cel", "[degF]", "K", "[degR]", "mK"]


@given(st.sampled_from(TEMPERATURES), st.sampled_from(TEMPERATURES),
       st.floats(-300, 1e4, allow_nan=False))
def test_temperature_conversions_invert(a, b, value):
    # Common practice: converting a temperature there and back returns it.
    ab, ba = units.relate(a, b), units.relate(b, a)
    assert ab.kind != "dimension"
    assert ba.apply(ab.apply(value)) == pytest.approx(value, rel=1e-9, abs=1e-7)
    if ab.kind == "affine":
        assert ba.kind == "affine"
        assert ba.factor == pytest.approx(1 / ab.factor, rel=1e-9)
        assert ba.offset == pytest.approx(-ab.offset / ab.factor, rel=1e-9, abs=1e-9)


@given(unit_text(), unit_text(), unit_text())
def test_factors_compose(a, b, c):
    # Common practice: converting a -> b -> c is converting a -> c.
    ab, bc, ac = units.relate(a, b), units.relate(b, c), units.relate(a, c)
    if {ab.kind, bc.kind} <= {"scale", "same"}:
        assert ac.kind in ("scale", "same")
        assert math.isclose(ab.factor * bc.factor, ac.factor, rel_tol=1e-9)
