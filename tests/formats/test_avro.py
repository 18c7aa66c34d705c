"""The Avro adapter: loading, bad input, field paths and locations.

Verdicts per rule live in tests/cases/avro/; the codec cross-checks in test_avro_codec.py.
"""
import json
from pathlib import Path

import click
import pytest
from click.testing import CliRunner
from hypothesis import given
from hypothesis import strategies as st

from linter.cli import main
from linter.errors import InputError
from linter.formats import avro

GOOD = {"type": "record", "name": "MeterReading", "namespace": "utility.metering", "fields": [
    {"name": "meter_id", "type": "string"},
    {"name": "volume", "type": "long", "default": 0},
]}


def write(tmp_path, name, data):
    path = tmp_path / name
    path.write_text(data if isinstance(data, str) else json.dumps(data, indent=2))
    return path


@click.command(context_settings={"ignore_unknown_options": True})
@click.argument("args", nargs=-1, type=click.UNPROCESSED)
def _entry(args):
    # linter.cli.main maps errors onto exit statuses; run it as a user would.
    main(list(args))


def cli(args):
    return CliRunner().invoke(_entry, args)


BAD = {
    "malformed-json": ('{"type": "record", "name": "X", "fields": [}', "invalid JSON", (1, 44)),
    "unknown-type": ({"type": "record", "name": "R", "fields": [{"name": "volume", "type": "Litres"}]},
                     "unknown type name 'Litres'", (1,)),
    "duplicate-field": ({"type": "record", "name": "R", "fields": [{"name": "volume", "type": "long"},
                                                                   {"name": "volume", "type": "int"}]},
                        "two fields named 'volume'", None),
    "wrong-default": ({"type": "record", "name": "R", "fields": [{"name": "volume", "type": "long",
                                                                  "default": "abc"}]},
                      "field 'volume' default 'abc' is not a long", None),
    "wrong-union-default": ({"type": "record", "name": "R", "fields": [{"name": "note", "type": ["null", "int"],
                                                                        "default": "x"}]},
                            "matches no branch", None),
    "enum-default-not-a-symbol": ({"type": "enum", "name": "E", "symbols": ["A"], "default": "B"},
                                  "is not one of its symbols", None),
    "fixed-without-size": ({"type": "fixed", "name": "Digest"}, "needs a 'size'", None),
    "nested-union": (["null", ["int", "long"]], "may not immediately contain another union", None),
    "union-twice-one-type": (["int", "int"], "holds 'int' twice", None),
    "redefined-type": ({"type": "record", "name": "R", "fields": [
        {"name": "a", "type": {"type": "fixed", "name": "F", "size": 2}},
        {"name": "b", "type": {"type": "fixed", "name": "F", "size": 2}}]}, "defined twice", None),
    "bad-name": ({"type": "record", "name": "9lives", "fields": []}, "not a valid Avro name", None),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_input_exits_2_with_one_line(tmp_path, case):
    text, words, _ = BAD[case]
    bad = write(tmp_path, "new.avsc", text)
    good = write(tmp_path, "old.avsc", GOOD)
    result = cli(["check", str(good), str(bad)])
    assert result.exit_code == 2, result.output
    lines = [l for l in result.output.splitlines() if l.strip()]
    assert len(lines) == 1, result.output
    assert str(bad) in lines[0] and words in lines[0], lines[0]
    assert "Traceback" not in result.output


def test_positions_point_at_the_offending_field(tmp_path):
    bad = write(tmp_path, "bad.avsc", BAD["duplicate-field"][0])
    with pytest.raises(InputError) as info:
        avro.load(bad, "bad.avsc")
    # json.dumps(indent=2): the second field's first member is on line 10, column 7.
    assert (info.value.line, info.value.column) == (10, 7)


def test_malformed_json_position(tmp_path):
    bad = write(tmp_path, "bad.avsc", BAD["malformed-json"][0])
    result = cli(["check", str(bad), str(bad)])
    assert result.exit_code == 2 and f"{bad}:1:44:" in result.output


def test_missing_file_exits_2(tmp_path):
    good = write(tmp_path, "old.avsc", GOOD)
    result = cli(["check", str(good), str(tmp_path / "nope.avsc")])
    assert result.exit_code == 2 and "nope.avsc" in result.output and "Traceback" not in result.output


def test_fields_and_roots_cover_nested_records(tmp_path):
    schema = {"type": "record", "name": "MeterReading", "namespace": "utility.metering", "fields": [
        {"name": "site", "type": {"type": "record", "name": "Site", "fields": [
            {"name": "id", "type": "string"},
            {"name": "parent", "type": ["null", "Site"], "default": None}]}},
        {"name": "readings", "type": {"type": "array", "items": {"type": "record", "name": "Reading",
                                                                  "fields": [{"name": "volume", "type": "long"}]}}},
    ]}
    loaded = avro.load(write(tmp_path, "m.avsc", schema), "m.avsc")
    assert loaded.roots == ("utility.metering.MeterReading",)
    assert loaded.fields["utility.metering.MeterReading"] == {
        "site", "site.id", "site.parent", "readings", "readings.volume"}


def test_top_level_union_and_primitive_roots(tmp_path):
    union = avro.load(write(tmp_path, "u.avsc", ["null", GOOD]), "u.avsc")
    assert union.roots == ("utility.metering.MeterReading", "u.avsc")
    prim = avro.load(write(tmp_path, "p.avsc", '"long"'), "p.avsc")
    assert prim.roots == ("p.avsc",) and prim.fields == {"p.avsc": frozenset()}


def test_every_change_carries_locations(tmp_path):
    old = dict(GOOD, fields=GOOD["fields"] + [{"name": "pressure", "type": "float", "unit": "bar"}])
    new = dict(GOOD, fields=[GOOD["fields"][0], {"name": "volume", "type": "double", "default": 1},
                             {"name": "pressure", "type": "double", "unit": "kPa"},
                             {"name": "battery", "type": "int"}])
    changes = avro.diff(avro.load(write(tmp_path, "o.avsc", old), "o.avsc"),
                        avro.load(write(tmp_path, "n.avsc", new), "n.avsc"))
    assert {c.kind for c in changes} == {"avro-type-promoted-lossy", "avro-field-default-changed",
                                         "avro-type-promoted", "unit-rescaled",
                                         "avro-field-added-without-default"}
    for c in changes:
        assert c.old_loc or c.new_loc
        for loc in (c.old_loc, c.new_loc):
            assert loc is None or loc.line is not None
    added = next(c for c in changes if c.kind == "avro-field-added-without-default")
    assert added.old_loc is None and added.new_loc.file == "n.avsc" and added.path == "battery"


def test_recursive_types_terminate(tmp_path):
    seg = {"type": "record", "name": "Segment", "fields": [
        {"name": "next", "type": ["null", "Segment"], "default": None},
        {"name": "length", "type": "int"}]}
    seg2 = json.loads(json.dumps(seg).replace('"int"', '"long"'))
    changes = avro.diff(avro.load(write(tmp_path, "o.avsc", seg), "o.avsc"),
                        avro.load(write(tmp_path, "n.avsc", seg2), "n.avsc"))
    assert [(c.kind, c.path) for c in changes] == [("avro-type-promoted", "length")]


def test_avsc_with_json_extension_is_detected(tmp_path):
    from linter.formats import detect

    path = write(tmp_path, "reading.json", GOOD)
    assert detect(path, "reading.json") == "avro"


def test_the_example_scenario_shows_each_kind_of_outcome(validate_report):
    import linter

    root = Path(__file__).resolve().parents[2] / "schemas_example"
    report = validate_report(linter.check(root / "v1", root / "v2", mode="backward").to_json())
    verdicts = {Path(c["old"]).name: c["compatibility"] for c in report["comparisons"] if c["format"] == "avro"}
    assert verdicts == {"billing_period.avsc": "backward", "leak_alert.avsc": "breaking",
                        "meter_reading.avsc": "breaking"}
    found = {(f["schema"], f["path"], f["rule"]) for f in report["findings"]}
    assert ("utility.metering.MeterReading", "volume", "S003") in found        # L -> m3
    assert ("utility.leaks.LeakAlert", "estimated_loss", "S012") in found      # meaning changed
    assert ("utility.leaks.LeakAlert", "raised_at", "A070") in found           # millis -> micros


def test_every_avro_rule_has_a_case_folder():
    from linter import catalogue

    cases = Path(__file__).resolve().parents[1] / "cases" / "avro"
    covered = set()
    for expected in cases.glob("*/expected.json"):
        covered |= set(json.loads(expected.read_text())["rules"])
    rules = {r.id for r in catalogue.load() if r.format == "avro" and r.status != "removed"}
    assert sorted(rules - covered) == []


@pytest.mark.parametrize("depth", [600, 3000])
def test_deeply_nested_schema_is_bad_input_not_a_crash(tmp_path, depth):
    # 600 levels pass the JSON decoder and fail deeper down; 3000 fail in the decoder.
    path = tmp_path / "deep.avsc"
    path.write_text('{"type": "array", "items": ' * depth + '"long"' + "}" * depth)
    result = cli(["check", str(path), str(path)])
    assert result.exit_code in (0, 2), result.output
    assert "Traceback" not in result.output and "internal error" not in result.output
    if result.exit_code == 2:
        assert "nested too deeply" in result.output or "recursion" in result.output, result.output


@given(st.text(alphabet="aZ_09é\n .-", max_size=6) | st.text(max_size=4))
def test_the_name_check_is_the_spec_pattern(text):
    # Avro specification 1.12.0, "Names": [A-Za-z_][A-Za-z0-9_]*. The adapter tests it
    # as an ASCII Python identifier (linter/formats/avro_schema.py).
    import re

    assert (text.isascii() and text.isidentifier()) == bool(re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", text))


@pytest.mark.parametrize("second", [{"name": "volume", "type": "int"},
                                    {"name": "volume", "type": "int", "default": 0},
                                    {"name": "volume", "type": {"type": "record", "name": "V", "fields": []}}])
def test_a_second_field_of_one_name_is_refused_where_it_stands(tmp_path, second):
    # Avro specification 1.12.0, "Complex Types", records: field names are unique within
    # a record. The message names the field; the position is that of the second one.
    from linter.errors import InputError
    from linter.formats import avro

    data = {"type": "record", "name": "R", "fields": [{"name": "volume", "type": "long", "doc": "d"},
                                                      {"name": "flow", "type": "long"}, second]}
    path = write(tmp_path, "dup.avsc", data)
    with pytest.raises(InputError) as caught:
        avro.load(path, "dup.avsc")
    text = path.read_text().splitlines()
    expected = [i for i, line in enumerate(text, 1) if '"name": "volume"' in line][1]
    assert "two fields named 'volume'" in caught.value.message
    assert caught.value.line == expected
