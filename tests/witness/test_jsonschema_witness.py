"""JSON Schema witnesses against jsonschema, on evolutions written here.

Instance-set directions (DESIGN.md): backward = every instance valid under OLD is valid
under NEW. Each breaking pair below has an instance valid under one side only (JSON Schema
Validation 2020-12: 6.1.2 enum, 6.2.2 maximum, 6.5.3 required, 10.3.2.3
additionalProperties); the witness must be that instance, confirmed by jsonschema.
"""
import json
import random

import pytest

from linter.model import Comparison, Compat, Finding
from linter.verify import sample
from linter.witness import jsonschema as js
from linter.witness import witness_for

ID = "urn:utility:service-notice"


def notice(**extra):
    schema = {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": ID, "type": "object",
              "properties": {"kind": {"enum": ["planned", "emergency"]},
                             "hours": {"type": "integer", "minimum": 0, "maximum": 48},
                             "streets": {"type": "array", "items": {"type": "string", "maxLength": 80}}},
              "required": ["kind"]}
    for key, value in extra.items():
        if key == "properties":
            schema["properties"] = {**schema["properties"], **value}
        else:
            schema[key] = value
    return schema


def pair_of(tmp_path, old, new):
    (tmp_path / "old.json").write_text(json.dumps(old))
    (tmp_path / "new.json").write_text(json.dumps(new))
    return js.open_pair(tmp_path / "old.json", tmp_path / "new.json", "old.json", "new.json")


def finding(path, compat):
    return Finding("J999", "test-kind", ID, path, compat, False, "error", "m", "a", "r")


BREAKING = [
    ("enum value removed", notice(properties={"kind": {"enum": ["planned"]}}), "kind", Compat.FORWARD),
    ("maximum tightened", notice(properties={"hours": {"type": "integer", "minimum": 0, "maximum": 24}}),
     "hours", Compat.FORWARD),
    ("required added", notice(required=["kind", "hours"]), "hours", Compat.FORWARD),
    ("closed to other members", notice(additionalProperties=False), "", Compat.FORWARD),
    ("item length tightened", notice(properties={"streets": {"type": "array", "items": {"type": "string", "maxLength": 60}}}),
     "streets", Compat.FORWARD),
    ("type widened", notice(properties={"hours": {"type": "number"}}), "hours", Compat.BACKWARD),
]


@pytest.mark.parametrize("name,new,path,compat", BREAKING, ids=[b[0] for b in BREAKING])
def test_breaking_change_has_a_confirmed_instance(tmp_path, name, new, path, compat):
    pair = pair_of(tmp_path, notice(), new)
    w = witness_for(finding(path, compat), "jsonschema", pair)
    assert w is not None and w.confirmed, w
    writer, reader = pair.sides(w.direction)
    assert writer.valid(w.datum) and not reader.valid(w.datum)
    assert "the reader rejects it" in w.outcome


def test_maximum_witness_sits_just_past_the_new_bound(tmp_path):
    pair = pair_of(tmp_path, notice(), notice(properties={"hours": {"type": "integer", "maximum": 24}}))
    w = witness_for(finding("hours", Compat.FORWARD), "jsonschema", pair)
    assert 24 < w.datum["hours"] <= 48


def test_compatible_change_never_fails_on_random_instances(tmp_path):
    pair_of(tmp_path, notice(), notice(properties={"hours": {"type": "integer", "minimum": 0, "maximum": 72}}))
    comparison = Comparison(str(tmp_path / "old.json"), str(tmp_path / "new.json"), "jsonschema", ())
    pair = js.open_pair(tmp_path / "old.json", tmp_path / "new.json", comparison.old, comparison.new)
    result = sample(js, pair, comparison, ID, "backward", 200, seed=2)
    assert result.samples > 150 and result.failures == 0
    tighter = sample(js, pair, comparison, ID, "forward", 200, seed=2)
    assert tighter.failures > 0 and tighter.verdict == "bug"  # no findings given: "compatible" is wrong


def test_generated_instances_are_mostly_valid(tmp_path):
    pair = pair_of(tmp_path, notice(), notice())
    writer, _ = pair.sides("backward")
    rng = random.Random(0)
    data = [js.random_datum(writer, ID, rng) for _ in range(100)]
    assert all(d is js.NOTHING or writer.valid(d) for d in data)
    assert sum(d is not js.NOTHING for d in data) > 90


def test_references_resolve_locally(tmp_path):
    old = notice(properties={"hours": {"$ref": "#/$defs/hours"}}, **{"$defs": {"hours": {"type": "integer", "maximum": 48}}})
    new = notice(properties={"hours": {"$ref": "#/$defs/hours"}}, **{"$defs": {"hours": {"type": "integer", "maximum": 12}}})
    pair = pair_of(tmp_path, old, new)
    w = witness_for(finding("hours", Compat.FORWARD), "jsonschema", pair)
    assert w.confirmed and 12 < w.datum["hours"] <= 48


def test_patterns_are_generated_so_required_members_can_be_written(tmp_path):
    old = notice(properties={"notice_id": {"type": "string", "pattern": "^SN-[0-9]{6}$"}},
                 required=["kind", "notice_id"])
    pair = pair_of(tmp_path, old, old)
    writer, _ = pair.sides("backward")
    rng = random.Random(5)
    data = [js.random_datum(writer, ID, rng) for _ in range(50)]
    assert sum(d is not js.NOTHING for d in data) > 40


def test_the_error_reported_is_the_one_at_the_finding(tmp_path):
    # Two changes: a closed object and a removed enum value; the enum finding names its value.
    new = notice(properties={"kind": {"enum": ["planned"]}}, additionalProperties=False)
    pair = pair_of(tmp_path, notice(), new)
    w = witness_for(finding("kind", Compat.FORWARD), "jsonschema", pair)
    assert w.confirmed and "keyword enum" in w.outcome, w.outcome
