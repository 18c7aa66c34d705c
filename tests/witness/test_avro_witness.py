"""Avro witnesses against fastavro, on evolutions written here (independent of the adapter).

Each breaking evolution follows the Avro specification, Schema Resolution ("if the two
schemas do not match, it is an error"); each compatible one follows its promotion and
default rules. The witness must be confirmed by running fastavro, and random writer data
must never fail in a direction the specification calls compatible.
"""
import json
import random

import pytest

from linter.model import Comparison, Compat, Finding
from linter.verify import sample
from linter.witness import avro, witness_for

ROOT = "utility.metering.MeterReading"


def reading(**overrides):
    fields = {
        "meter_id": "string",
        "count": "long",
        "state": {"type": "enum", "name": "State", "symbols": ["OK", "LEAK", "OFF"]},
        "site": ["null", {"type": "record", "name": "Site",
                          "fields": [{"name": "id", "type": "string"}, {"name": "district", "type": "int"}]}],
        "volume": {"type": "double", "unit": "L"},
        "tag": {"type": "fixed", "name": "Tag", "size": 4},
        "battery": "int",
        "read_at": {"type": "long", "logicalType": "timestamp-millis"},
    }
    extra = overrides.pop("_extra", [])
    fields.update(overrides)
    return {"type": "record", "name": "MeterReading", "namespace": "utility.metering",
            "fields": [{"name": k, "type": v} for k, v in fields.items() if v is not None] + extra}


def write_pair(tmp_path, old, new):
    (tmp_path / "old.avsc").write_text(json.dumps(old))
    (tmp_path / "new.avsc").write_text(json.dumps(new))
    return avro.open_pair(tmp_path / "old.avsc", tmp_path / "new.avsc", "old.avsc", "new.avsc")


def finding(path, compat=Compat.BREAKING, semantic=False, facts=None):
    return Finding("A999", "test-kind", ROOT, path, compat, semantic, "error", "m", "a", "r", facts=facts or {})


# (name, new schema, path, compatibility the specification gives)
BREAKING = [
    ("long read as int", reading(count="int"), "count", Compat.FORWARD),
    ("enum symbol removed", reading(state={"type": "enum", "name": "State", "symbols": ["OK", "LEAK"]}),
     "state", Compat.FORWARD),
    ("union branch removed", reading(site={"type": "record", "name": "Site", "fields": [
        {"name": "id", "type": "string"}, {"name": "district", "type": "int"}]}), "site", Compat.FORWARD),
    ("nested type changed", reading(site=["null", {"type": "record", "name": "Site", "fields": [
        {"name": "id", "type": "string"}, {"name": "district", "type": "string"}]}]), "site.district",
     Compat.BREAKING),
    ("field added without default", reading(_extra=[{"name": "pressure", "type": "double"}]), "pressure",
     Compat.FORWARD),
    ("fixed size changed", reading(tag={"type": "fixed", "name": "Tag", "size": 8}), "tag", Compat.BREAKING),
    ("record renamed without alias", {**reading(), "name": "Reading"}, "", Compat.BREAKING),
]


@pytest.mark.parametrize("name,new,path,compat", BREAKING, ids=[b[0] for b in BREAKING])
def test_breaking_evolution_has_a_confirmed_witness(tmp_path, name, new, path, compat):
    pair = write_pair(tmp_path, reading(), new)
    w = witness_for(finding(path, compat), "avro", pair)
    assert w is not None and w.confirmed, w
    assert w.direction == compat.breaks()[0]
    # The datum is writer data: it encodes with the writer schema.
    writer, _ = pair.sides(w.direction)
    assert w.datum is not None and w.outcome


def test_targeted_datum_carries_the_removed_symbol(tmp_path):
    pair = write_pair(tmp_path, reading(), reading(state={"type": "enum", "name": "State", "symbols": ["OK", "LEAK"]}))
    w = witness_for(finding("state", Compat.FORWARD), "avro", pair)
    assert w.datum["state"] == "OFF" and "OFF" in w.outcome


def test_targeted_long_does_not_fit_an_int(tmp_path):
    pair = write_pair(tmp_path, reading(), reading(count="int"))
    w = witness_for(finding("count", Compat.FORWARD), "avro", pair)
    assert w.datum["count"] > 2**31 - 1


def test_each_change_of_a_file_gets_its_own_outcome(tmp_path):
    # Both changes fail every datum; the enum finding must still name its symbol.
    new = reading(count="int", state={"type": "enum", "name": "State", "symbols": ["OK", "LEAK"]})
    pair = write_pair(tmp_path, reading(), new)
    w = witness_for(finding("state", Compat.FORWARD), "avro", pair)
    assert w.confirmed and "OFF" in w.outcome, w.outcome


def test_unconfirmed_when_nothing_fails(tmp_path):
    pair = write_pair(tmp_path, reading(), reading())
    w = witness_for(finding("count", Compat.FORWARD), "avro", pair)
    assert w is not None and not w.confirmed


COMPATIBLE = [
    ("int promoted to long", reading(battery="long")),
    ("int promoted to double", reading(battery="double")),
    ("long promoted to double", reading(count="double")),
    ("field added with default", reading(_extra=[{"name": "pressure", "type": "double", "default": 0.0}])),
    ("enum symbol added", reading(state={"type": "enum", "name": "State", "symbols": ["OK", "LEAK", "OFF", "DRY"]})),
    ("field removed", reading(battery=None)),
    ("union widened", reading(site=["null", "string", {"type": "record", "name": "Site", "fields": [
        {"name": "id", "type": "string"}, {"name": "district", "type": "int"}]}])),
]


@pytest.mark.parametrize("name,new", COMPATIBLE, ids=[c[0] for c in COMPATIBLE])
def test_backward_compatible_evolution_never_fails_on_random_data(tmp_path, name, new):
    write_pair(tmp_path, reading(), new)
    comparison = Comparison(str(tmp_path / "old.avsc"), str(tmp_path / "new.avsc"), "avro", ())
    pair = avro.open_pair(tmp_path / "old.avsc", tmp_path / "new.avsc", comparison.old, comparison.new)
    result = sample(avro, pair, comparison, ROOT, "backward", 300, seed=1)
    assert result.samples == 300 and result.failures == 0, result.example
    assert result.verdict == "agree"


def test_sampling_reports_a_static_verdict_the_codec_contradicts(tmp_path):
    # No findings means "compatible"; long -> int fails, so sampling must call it a bug.
    write_pair(tmp_path, reading(), reading(count="int"))
    comparison = Comparison(str(tmp_path / "old.avsc"), str(tmp_path / "new.avsc"), "avro", ())
    pair = avro.open_pair(tmp_path / "old.avsc", tmp_path / "new.avsc", comparison.old, comparison.new)
    result = sample(avro, pair, comparison, ROOT, "backward", 20, seed=1)
    assert result.failures == 20 and result.verdict == "bug"


def test_sampling_is_deterministic(tmp_path):
    write_pair(tmp_path, reading(), reading(state={"type": "enum", "name": "State", "symbols": ["OK", "LEAK"]}))
    comparison = Comparison(str(tmp_path / "old.avsc"), str(tmp_path / "new.avsc"), "avro", ())
    pair = avro.open_pair(tmp_path / "old.avsc", tmp_path / "new.avsc", comparison.old, comparison.new)
    a = sample(avro, pair, comparison, ROOT, "backward", 50, seed=7)
    b = sample(avro, pair, comparison, ROOT, "backward", 50, seed=7)
    assert (a.failures, a.example) == (b.failures, b.example) and 0 < a.failures < 50


def test_unit_change_reads_back_silently(tmp_path):
    new = reading(volume={"type": "double", "unit": "m3"}, count="int")  # a second change must not mask it
    pair = write_pair(tmp_path, reading(), new)
    w = witness_for(finding("volume", semantic=True, facts={"old_unit": "L", "new_unit": "m3"}), "avro", pair)
    assert w.confirmed and w.datum["volume"] == 1500.0
    assert "1000 times" in w.outcome


def test_random_data_are_writer_data(tmp_path):
    pair = write_pair(tmp_path, reading(), reading())
    writer, _ = pair.sides("backward")
    rng = random.Random(3)
    for _ in range(100):
        datum = avro.random_datum(writer, ROOT, rng)
        assert avro.encode(writer, ROOT, datum) is not None
        assert not avro.run(writer, writer, ROOT, datum).failed


def test_json_form_of_a_datum():
    assert avro.jsonable({"a": b"\x00\xff", "u": ("x.Site", {"id": "1"})}) == {"a": "\x00\xff", "u": {"x.Site": {"id": "1"}}}


def test_promotions_compare_by_value():
    assert avro.same_leaf(2**53 + 1, float(2**53 + 1))  # long -> double rounds, as the spec permits
    assert avro.same_leaf("é", "é".encode())
    assert not avro.same_leaf(1, 2)
    assert not avro.same_leaf(True, 1)
