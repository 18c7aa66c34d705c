"""The Avro parser lists the JSON containers in document preorder as it walks, so the
source map need not walk the tree again (linter/formats/avro_schema.py, ``preorder``).
Checked against the source map's own walk of the parsed tree."""
import json
from pathlib import Path

import pytest
from hypothesis import given

from linter.errors import InputError
from linter.formats import avro_schema
from linter.sourcemap import preorder

from avro_strategies import evolution

CASES = sorted(Path(__file__).parent.parent.joinpath("cases", "avro").glob("*/*.avsc"))


def parsed(data, previous=None):
    return avro_schema.parse(data, "x.avsc", lambda obj: None, previous)


def ids(containers):
    # Containers by identity: equal dicts at two places must not stand for each other.
    return [None if c is None else id(c) for c in containers]


def agrees(listed, walked):
    # A shared record's containers are listed as gaps (None): only their number counts.
    return len(listed) == len(walked) and all(a is None or a is b for a, b in zip(listed, walked))


@pytest.mark.parametrize("path", CASES, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_every_case_file_is_listed_in_preorder(path):
    data = json.loads(path.read_text())
    try:
        model = parsed(data)
    except InputError:
        return
    assert ids(model.preorder) == ids(preorder(data))


def test_odd_placements_of_containers_are_listed_in_key_order():
    # Containers before and after the type, in fields, records, arrays, enums and fixed.
    data = {"aliases": ["Old"], "type": "record", "name": "R", "x-tags": {"a": [1, {"b": 2}]}, "fields": [
        {"default": [1, 2], "type": {"type": "array", "items": "int", "x-note": {"n": 1}}, "name": "a"},
        {"name": "b", "doc": {"odd": "doc"}, "type": {"type": "record", "name": "S", "fields": []}},
        {"name": "c", "type": ["null", {"x": [], "type": "enum", "name": "E", "symbols": ["A"]}], "default": None},
        {"name": "d", "type": {"type": {"type": "fixed", "name": "F", "size": 2, "aliases": ["G"]}}},
        {"name": "e", "type": {"type": "map", "values": {"type": "long", "logicalType": "x", "p": [[]]}}},
        {"name": "f", "aliases": ["g"], "type": "S", "x": {}},
    ], "trailer": [{}]}
    assert ids(parsed(data).preorder) == ids(preorder(data))


@given(evolution(logical=True))
def test_generated_schemas_are_listed_in_preorder_alone_and_beside(evo):
    old, new = evo
    try:
        o = parsed(old)
        n = parsed(new, o)
    except InputError:
        return
    assert ids(o.preorder) == ids(preorder(old))
    assert agrees(n.preorder, preorder(new))
