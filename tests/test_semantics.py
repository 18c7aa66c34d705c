"""annotation_changes: the unit and meaning annotations of one paired node.

The classification of units is checked against published values in test_units.py; here
the kinds, facts and rendered findings are checked (evolint annotation conventions,
docs/annotations.md, and shared/DESIGN.md: added is informational, removed a warning,
changed semantic and breaking).
"""
import json
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import given, strategies as st

import linter
from linter import catalogue, engine, semantics
from linter.model import Compat, Location

SCHEMA = "utility.metering.MeterReading"
CAT = catalogue.load()


def changes(old, new, **kw):
    return semantics.annotation_changes(SCHEMA, "volume", old, new, Location("a.avsc", 3),
                                        Location("b.avsc", 3), **kw)


def kinds(old, new, **kw):
    return sorted(c.kind for c in changes(old, new, **kw))


def finding(old, new, **kw):
    found = engine.judge(changes(old, new, **kw), CAT, engine.Policy(mode="backward"))
    assert len(found) == 1, found
    return found[0]


@pytest.mark.parametrize("old,new,expected", [
    ({}, {}, []),
    ({"unit": "L"}, {"unit": "L"}, []),
    ({"unit": "L"}, {"unit": " L "}, []),
    ({"unit": "L"}, {"unit": "l"}, []),
    ({"unit": "m"}, {"unit": "meter"}, []),
    ({"unit": "kW.h"}, {"unit": "kWh"}, []),
    ({}, {"unit": "L"}, ["unit-added"]),
    ({"unit": ""}, {"unit": "L"}, ["unit-added"]),
    ({"unit": "L"}, {}, ["unit-removed"]),
    ({"unit": "L"}, {"unit": None}, ["unit-removed"]),
    ({"unit": "ms"}, {"unit": "s"}, ["unit-rescaled"]),
    ({"unit": "L"}, {"unit": "m3"}, ["unit-rescaled"]),
    ({"unit": "Cel"}, {"unit": "[degF]"}, ["unit-offset-changed"]),
    ({"unit": "kg"}, {"unit": "L"}, ["unit-dimension-changed"]),
    ({"unit": "litres"}, {"unit": "glugs"}, ["unit-unreadable-changed"]),
    ({}, {"unit": "glugs"}, ["unit-added", "unit-unreadable"]),
    ({}, {"meaning": "water delivered"}, ["meaning-added"]),
    ({"meaning": "water delivered"}, {}, ["meaning-removed"]),
    ({"meaning": "Water  delivered"}, {"meaning": "water delivered\n"}, []),
    ({"meaning": "total billed, refunds included"}, {"meaning": "total billed, refunds excluded"},
     ["meaning-changed"]),
    ({"unit": "ms", "meaning": "a"}, {"unit": "s", "meaning": "b"}, ["meaning-changed", "unit-rescaled"]),
])
def test_kinds(old, new, expected):
    assert kinds(old, new) == expected


def test_every_kind_is_listed_and_classified():
    for kind in semantics.KINDS:
        assert CAT.for_kind(kind) is not None, kind
    assert set(semantics.UNIT_KINDS.values()) <= semantics.KINDS


def test_rescaled_finding_carries_factor_example_and_advice():
    f = finding({"unit": "ms"}, {"unit": "s"})
    assert f.rule == "S003" and f.semantic and f.compatibility is Compat.BREAKING
    assert f.severity == "error"
    assert f.facts["factor"] == 0.001
    assert f.facts["old_unit"] == "ms" and f.facts["new_unit"] == "s"
    assert "x 0.001" in f.message and "1500 read as ms is now 1.5 s" in f.message
    assert "new field" in f.advice and "deprecate" in f.advice


def test_offset_finding_carries_scale_and_offset():
    # NIST SP 811 (from memory, B.9): t/degF = 1.8 t/degC + 32.
    f = finding({"unit": "Cel"}, {"unit": "[degF]"})
    assert f.rule == "S004" and f.semantic
    assert f.facts["factor"] == pytest.approx(1.8) and f.facts["offset"] == pytest.approx(32)
    assert "new = 1.8 x old + 32" in f.message and "20 read as Cel is now 68 [degF]" in f.message


def test_dimension_finding_names_both_quantities():
    f = finding({"unit": "m3"}, {"unit": "kW.h"})
    assert f.rule == "S005" and f.semantic
    assert "[length] ** 3" in f.message and "[mass]" in f.facts["new_dimension"]


def test_unreadable_change_is_compared_as_text():
    f = finding({"unit": "m3"}, {"unit": "glugs"})
    assert f.rule == "S006" and f.semantic
    assert "glugs" in f.facts["problem"]


def test_meaning_change_quotes_both_texts():
    f = finding({"meaning": "total billed, refunds included"}, {"meaning": "total billed, refunds excluded"})
    assert f.rule == "S012" and f.semantic and f.compatibility is Compat.BREAKING
    assert "refunds included" in f.message and "refunds excluded" in f.message


@pytest.mark.parametrize("old,new,rule,severity", [
    ({}, {"unit": "L"}, "S001", "info"),
    ({"unit": "L"}, {}, "S002", "warning"),
    ({}, {"meaning": "x"}, "S010", "info"),
    ({"meaning": "x"}, {}, "S011", "warning"),
])
def test_added_is_information_removed_is_a_warning(old, new, rule, severity):
    # shared/DESIGN.md, Annotations: added informational, removed a warning.
    f = finding(old, new)
    assert (f.rule, f.severity, f.semantic, f.compatibility) == (rule, severity, False, Compat.FULL)


def test_details_are_json():
    f = finding({"unit": "Cel"}, {"unit": "[degF]"})
    json.dumps(dict(f.facts))


def test_non_text_annotations_are_read_as_text():
    assert kinds({"unit": 1}, {"unit": "1"}) == []
    assert kinds({"meaning": ["a"]}, {"meaning": "a"}) == ["meaning-changed"]


# --- a type's unit applies to its fields --------------------------------------------

def test_inherit_fills_only_a_missing_unit():
    assert semantics.inherit({"unit": "kPa", "meaning": "m"}, {}) == {"unit": "kPa"}
    assert semantics.inherit({"unit": "kPa"}, {"unit": "bar"}) == {"unit": "bar"}
    assert semantics.inherit(None, {"meaning": "x"}) == {"meaning": "x"}


def test_inherited_on_both_sides_is_reported_at_the_type_only():
    assert kinds({}, {}, old_type={"unit": "kPa"}, new_type={"unit": "bar"}) == []


def test_own_unit_replaced_by_an_inherited_one_is_compared():
    assert kinds({"unit": "kPa"}, {}, old_type={}, new_type={"unit": "kPa"}) == []
    assert kinds({"unit": "kPa"}, {}, old_type={}, new_type={"unit": "bar"}) == ["unit-rescaled"]
    assert kinds({}, {"unit": "bar"}, old_type={"unit": "kPa"}, new_type={"unit": "kPa"}) == ["unit-rescaled"]


# --- start-up cost ---------------------------------------------------------------------

def _modules_after(code: str) -> set:
    out = subprocess.run([sys.executable, "-c", code + "\nimport sys, json; print(json.dumps(sorted(sys.modules)))"],
                         capture_output=True, text=True, check=True)
    return set(json.loads(out.stdout.splitlines()[-1]))


def test_pint_is_not_imported_for_equal_or_plain_ucum_texts():
    loaded = _modules_after(
        "from linter import semantics\n"
        "semantics.annotation_changes('t', 'f', {'unit': 'L', 'meaning': 'a'}, {'unit': 'L', 'meaning': 'A'})\n"
        "semantics.annotation_changes('t', 'f', {}, {'unit': 'kW.h'})\n")
    assert "pint" not in loaded


def test_pint_is_imported_when_unit_texts_differ():
    loaded = _modules_after(
        "from linter import semantics\n"
        "semantics.annotation_changes('t', 'f', {'unit': 'L'}, {'unit': 'l'})\n")
    assert "pint" in loaded


# --- properties --------------------------------------------------------------------------

UNITS = st.sampled_from(["ms", "s", "min", "h", "L", "l", "m3", "dm3", "mL", "[gal_us]", "kPa", "bar",
                         "[psi]", "Pa", "Cel", "[degF]", "K", "kW.h", "MJ", "W", "%", "[ppm]", "1",
                         "L/min", "m3/h", "{reading}", "{reading}/h", "glugs", "meter", "m"])


@given(UNITS, UNITS)
def test_unit_findings_are_symmetric(a, b):
    # Common practice (algebra of units): the change b -> a undoes a -> b, so it has the
    # same class, and its factor is the inverse.
    there, back = changes({"unit": a}, {"unit": b}), changes({"unit": b}, {"unit": a})
    assert [c.kind for c in there] == [c.kind for c in back]
    if there and there[0].kind in ("unit-rescaled", "unit-offset-changed"):
        assert there[0].facts["factor"] * back[0].facts["factor"] == pytest.approx(1.0, rel=1e-9)
    for c in there:
        assert c.facts["old_unit"] == a and c.facts["new_unit"] == b


# --- end to end: the JSON report ---------------------------------------------------------

def test_json_report_carries_the_factor(validate_report):
    folder = Path(__file__).parent / "cases" / "avro" / "semantic-unit-rescaled"
    data = validate_report(linter.check(folder / "old.avsc", folder / "new.avsc").to_json())
    [f] = data["findings"]
    assert f["rule"] == "S003" and f["semantic"] is True and f["compatibility"] == "breaking"
    assert f["details"]["old_unit"] == "L" and f["details"]["new_unit"] == "m3"
    assert f["details"]["factor"] == 0.001
    assert data["passed"] is False
