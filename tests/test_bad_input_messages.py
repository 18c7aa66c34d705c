"""Bad input, per format: exit 2 and one line naming the file, the line (and column where the
parser gives one) and what is wrong, in the words of the schema's author.

Each row: a broken NEW file, the fragments the message must hold (case-insensitive), and
whether a column is expected. Rows of formats whose adapter has not landed are skipped.
"""
from __future__ import annotations

import json
import re

import pytest
from harness import landed, run_main

SHAPE = re.compile(r"^evolint: error: (?P<file>.+?):(?P<line>\d+)(?::(?P<column>\d+))?: (?P<text>.+)$")

AVRO_BASE = {"type": "record", "name": "MeterReading", "namespace": "utility.metering",
             "fields": [{"name": "meter_id", "type": "string"}]}


def avro_with(*fields, **top) -> str:
    doc = {**AVRO_BASE, **top, "fields": AVRO_BASE["fields"] + list(fields)}
    return json.dumps(doc, indent=2)


JS_BASE = {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": "urn:utility:service-notice",
           "type": "object", "properties": {"notice_id": {"type": "string"}}}


def js_with(**props) -> str:
    return json.dumps({**JS_BASE, "properties": {**JS_BASE["properties"], **props}}, indent=2)


PROTO_BASE = 'syntax = "proto3";\npackage utility.telemetry;\n\nmessage PumpStatus {\n  string pump_id = 1;\n'

# (format, id, new text, fragments, column expected)
ROWS = [
    ("avro", "default-not-a-long", avro_with({"name": "volume", "type": "long", "default": "abc"}),
     ["volume", "abc", "long"], False),
    ("avro", "default-not-in-enum", avro_with({"name": "state", "type": {
        "type": "enum", "name": "State", "symbols": ["OK", "LEAK"]}, "default": "BURST"}),
     ["state", "BURST"], False),
    ("avro", "unknown-type-name", avro_with({"name": "site", "type": "Sitee"}), ["site", "Sitee"], False),
    ("avro", "record-without-name", json.dumps({"type": "record", "fields": []}, indent=2), ["name"], False),
    ("avro", "field-without-type", avro_with({"name": "volume"}), ["volume", "type"], False),
    ("avro", "duplicate-field", avro_with({"name": "meter_id", "type": "long"}), ["meter_id"], False),
    ("avro", "fixed-without-size", avro_with({"name": "serial", "type": {"type": "fixed", "name": "Serial"}}),
     ["Serial", "size"], False),
    ("avro", "trailing-comma", '{"type": "record", "name": "A",\n "fields": [],\n}', ["JSON"], True),
    ("jsonschema", "trailing-comma", '{"type": "object",\n  "properties": {},\n}', ["JSON"], True),
    ("jsonschema", "type-is-a-number", js_with(duration={"type": 12}), ["duration", "type", "12"], False),
    ("jsonschema", "required-not-a-list", json.dumps({**JS_BASE, "required": "notice_id"}, indent=2),
     ["required", "notice_id"], False),
    ("jsonschema", "missing-definition", js_with(district={"$ref": "#/$defs/district"}),
     ["#/$defs/district"], False),
    ("jsonschema", "bad-pattern", js_with(notice_id={"type": "string", "pattern": "SN-[0-9"}),
     ["pattern", "SN-[0-9"], False),
    ("protobuf", "missing-semicolon", PROTO_BASE + "  double pressure = 2\n}\n", ["expected", ";"], True),
    ("protobuf", "duplicate-number", PROTO_BASE + "  double pressure = 1;\n}\n", ["number 1", "pump_id"], True),
    ("protobuf", "unknown-type", PROTO_BASE + "  Alrm alarm = 2;\n}\n", ["Alrm"], True),
    ("protobuf", "missing-import", 'syntax = "proto3";\nimport "missing/alarm.proto";\nmessage A {}\n',
     ["missing/alarm.proto"], False),
]
OLD = {"avro": (avro_with(), ".avsc"), "jsonschema": (js_with(), ".json"), "protobuf": (PROTO_BASE + "}\n", ".proto")}


@pytest.mark.parametrize("fmt, name, text, fragments, column", ROWS, ids=[f"{r[0]}-{r[1]}" for r in ROWS])
def test_bad_input_message(tmp_path, fmt, name, text, fragments, column):
    if not landed(f"linter.formats.{fmt}"):
        pytest.skip(f"linter.formats.{fmt} has not landed")
    old_text, ext = OLD[fmt]
    old, new = tmp_path / f"old{ext}", tmp_path / f"new{ext}"
    old.write_text(old_text)
    new.write_text(text)
    status, out, err = run_main(["check", str(old), str(new), "--output", "json"])
    assert status == 2, out
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    match = SHAPE.match(lines[0])
    assert match, f"not 'file:line[:column]: message': {lines[0]}"
    assert match["file"] == str(new)
    assert 1 <= int(match["line"]) <= text.count("\n") + 1
    if column:
        assert match["column"], lines[0]
    missing = [f for f in fragments if f.lower() not in match["text"].lower()]
    assert not missing, f"message lacks {missing}: {lines[0]}"
    assert "Traceback" not in err and "Error(" not in err  # the user's words, not an exception repr


def test_the_shape_rejects_a_message_without_position():
    assert not SHAPE.match("evolint: error: new.avsc: something is wrong")
    assert SHAPE.match("evolint: error: new.avsc:3:7: field 'volume' default 'abc' is not a long")
