"""A record's fields as the parser hands them over, read against the JSON they come from.

The plainest fields (a name, a primitive type by name, strings for doc, unit and meaning)
keep their JSON object until the record is first opened (``Node.fields``,
linter/formats/avro_schema.py); every field must then hold what the Avro specification
1.12.0 ("Complex Types", Records) says its attributes mean: ``order`` ascending and
``aliases`` empty when absent, a default only where one is written; and the unit and
meaning annotations are the strings written there, stripped (docs/annotations.md), none
where they are absent or not strings.
"""
import json
from pathlib import Path

import pytest
from hypothesis import given, strategies as st

from linter.errors import InputError
from linter.formats import avro_schema
from linter.formats.avro_schema import Field
from linter.sourcemap import preorder

from avro_strategies import evolution

ROOT = Path(__file__).resolve().parents[2]
FILES = sorted(ROOT.joinpath("tests", "cases", "avro").glob("*/*.avsc")) + sorted(
    ROOT.joinpath("schemas_example").glob("*/*.avsc"))


def parsed(data, previous=None):
    return avro_schema.parse(data, "x.avsc", lambda obj: None, previous)


def as_written(record_json: dict) -> list[tuple]:
    """Each field's attributes read straight from the JSON, with the spec's defaults."""
    return [(raw["name"], i, raw["doc"] if isinstance(raw.get("doc"), str) else None,
             "default" in raw, raw.get("default"), tuple(raw.get("aliases") or ()), raw.get("order", "ascending"),
             {k: raw[k].strip() for k in ("unit", "meaning") if isinstance(raw.get(k), str)}, raw)
            for i, raw in enumerate(record_json["fields"])]


def as_parsed(fields: list[Field]) -> list[tuple]:
    return [(f.name, f.position, f.doc, f.has_default, f.default, f.aliases, f.order, f.annotations, f.raw)
            for f in fields]


def check_records(model) -> None:
    for node in model.defined:
        if node.kind != "record":
            continue
        fields = node.fields
        assert all(isinstance(f, Field) for f in fields)
        assert as_parsed(fields) == as_written(node.raw)
        for f in fields:
            if isinstance(f.raw["type"], str) and f.raw["type"] in avro_schema.PRIMITIVES:
                assert f.type.kind == f.raw["type"]
        assert node.fields is fields, "built once: the differ compares fields by identity"


@pytest.mark.parametrize("path", FILES, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_fields_of_every_record_hold_what_the_file_says(path):
    data = json.loads(path.read_text())
    try:
        model = parsed(data)
    except InputError:
        return
    check_records(model)


def test_plain_fields_wait_until_the_record_is_opened():
    data = {"type": "record", "name": "Reading", "fields": [
        {"name": "litres", "type": "long", "doc": "Volume since the last reading."},
        {"name": "site", "type": {"type": "record", "name": "Site", "fields": [
            {"name": "code", "type": "string"}]}},
        {"name": "flow", "type": "double", "default": 0.0, "unit": "L/s"}]}
    model = parsed(data)
    reading = model.names["Reading"]
    assert reading._fields[0] is data["fields"][0]  # still its JSON
    assert isinstance(reading._fields[1], Field) and isinstance(reading._fields[2], Field)
    assert [f.name for f in reading.fields] == ["litres", "site", "flow"]
    assert reading.field("litres").type.kind == "long"
    assert reading.field("site").type is model.names["Site"]
    assert reading.field("flow").annotations == {"unit": "L/s"}
    assert reading._pending is None


def test_annotated_fields_of_strings_wait_too():
    data = {"type": "record", "name": "Reading", "fields": [
        {"name": "litres", "type": "long", "unit": " L ", "doc": "Volume."},
        {"name": "kind", "type": "string", "meaning": "meter model"},
        {"name": "flow", "type": "double", "unit": ["L/s"]},      # a container: listed, so built now
        {"name": "head", "type": "double", "doc": None, "unit": "m"}]}
    model = parsed(data)
    reading = model.names["Reading"]
    assert reading._fields[0] is data["fields"][0] and reading._fields[1] is data["fields"][1]
    assert isinstance(reading._fields[2], Field) and isinstance(reading._fields[3], Field)
    assert [f.annotations for f in reading.fields] == [{"unit": "L"}, {"meaning": "meter model"}, {}, {"unit": "m"}]
    assert [f.doc for f in reading.fields] == ["Volume.", None, None, None]
    assert [id(c) for c in model.preorder] == [id(c) for c in preorder(data)]


TEXTS = st.one_of(st.sampled_from([" L ", "m3", "", "meter model"]), st.none(), st.integers(0, 3),
                  st.lists(st.just("L"), max_size=1), st.dictionaries(st.just("u"), st.just("L"), max_size=1))


@given(st.lists(st.tuples(st.sampled_from(["long", "double", "string", {"type": "int"}]),
                          st.dictionaries(st.sampled_from(["doc", "unit", "meaning"]), TEXTS)),
                min_size=1, max_size=5))
def test_fields_with_any_doc_unit_and_meaning(specs):
    fields = [{"name": f"f{i}", "type": t, **extra} for i, (t, extra) in enumerate(specs)]
    data = {"type": "record", "name": "Reading", "fields": fields}
    model = parsed(data)
    check_records(model)
    assert [id(c) for c in model.preorder] == [id(c) for c in preorder(data)]


@given(evolution())
def test_generated_records_alone_and_beside(pair):
    old, new = pair
    try:
        o = parsed(old)
        n = parsed(new, o)
    except InputError:
        return
    check_records(o)
    check_records(n)
