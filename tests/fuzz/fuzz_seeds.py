"""Valid seed schemas (an invented water utility) and strategies shared by the fuzz tests."""
from __future__ import annotations

import copy
import json

from hypothesis import strategies as st

AVRO_SEED = {
    "type": "record", "name": "MeterReading", "namespace": "utility.metering",
    "doc": "One reading of a customer's water meter.",
    "fields": [
        {"name": "meter_id", "type": "string"},
        {"name": "site", "type": {"type": "record", "name": "Site", "fields": [
            {"name": "id", "type": "string"},
            {"name": "district", "type": ["null", "string"], "default": None}]}},
        {"name": "read_at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
        {"name": "volume", "type": "double", "unit": "L", "meaning": "cumulative volume"},
        {"name": "flow_rate", "type": ["null", "float"], "default": None, "unit": "L/min"},
        {"name": "state", "type": {"type": "enum", "name": "State", "symbols": ["OK", "LEAK", "OFF"],
                                   "default": "OK"}},
        {"name": "serial", "type": {"type": "fixed", "name": "Serial", "size": 8}},
        {"name": "history", "type": {"type": "array", "items": "Site"}, "default": []},
        {"name": "tags", "type": {"type": "map", "values": "string"}, "default": {}},
        {"name": "charge", "type": {"type": "bytes", "logicalType": "decimal", "precision": 9,
                                    "scale": 2}},
    ],
}

JSONSCHEMA_SEED = {
    "$schema": "https://json-schema.org/draft/2020-12/schema",
    "$id": "urn:utility:service-notice",
    "type": "object",
    "required": ["notice_id", "starts_at"],
    "properties": {
        "notice_id": {"type": "string", "pattern": "^SN-[0-9]+$"},
        "starts_at": {"type": "string", "format": "date-time"},
        "duration": {"type": "number", "minimum": 0, "x-unit": "h"},
        "districts": {"type": "array", "items": {"$ref": "#/$defs/district"}, "minItems": 1},
        "kind": {"enum": ["planned", "emergency"]},
        "contact": {"oneOf": [{"type": "string"}, {"type": "null"}]},
    },
    "additionalProperties": False,
    "$defs": {"district": {"type": "string", "maxLength": 40, "x-meaning": "district code"}},
}

PROTO_SEED = '''syntax = "proto3";

package utility.telemetry;

import "google/protobuf/timestamp.proto";

// The state of one pumping station.
message PumpStatus {
  string pump_id = 1;
  google.protobuf.Timestamp reported_at = 2;
  // Outlet pressure. @unit: bar
  double pressure = 3;
  repeated Alarm alarms = 4;
  oneof power {
    bool mains = 5;
    int32 battery_percent = 6;
  }
  map<string, string> labels = 7;
  reserved 8, 9;
  reserved "legacy";
  enum Mode {
    MODE_UNSPECIFIED = 0;
    MODE_AUTO = 1;
  }
  Mode mode = 10;
}

message Alarm {
  string code = 1;
  int64 raised_ms = 2; // @unit: ms
}
'''

AVRO_WORDS = ["type", "name", "namespace", "fields", "default", "items", "values", "symbols",
              "size", "aliases", "logicalType", "precision", "scale", "doc", "order", "unit",
              "meaning", "record", "enum", "fixed", "array", "map", "null", "boolean", "int",
              "long", "float", "double", "bytes", "string", "error", "decimal", "uuid",
              "timestamp-millis", "MeterReading", "Site", "utility.metering.Site", ""]

JSONSCHEMA_WORDS = ["type", "properties", "required", "items", "$ref", "$defs", "definitions",
                    "enum", "const", "minimum", "maximum", "exclusiveMinimum", "additionalProperties",
                    "allOf", "anyOf", "oneOf", "not", "pattern", "format", "x-unit", "x-meaning",
                    "$schema", "$id", "if", "then", "else", "prefixItems", "minItems", "maxLength",
                    "default", "dependentRequired", "patternProperties", "object", "string",
                    "number", "integer", "array", "null", "boolean",
                    "#", "#/$defs/district", "#/properties/duration", "#/$defs/missing",
                    "other.json", "https://example.invalid/remote.json", "../../outside.json",
                    "http://json-schema.org/draft-07/schema#",
                    "https://json-schema.org/draft/2020-12/schema", "^[a-z]+$", "(a+)+$"]

scalars = (st.none() | st.booleans() | st.integers(-2**70, 2**70)
           | st.floats(allow_nan=False, allow_infinity=False) | st.text(max_size=12))


def json_values(words: list[str]) -> st.SearchStrategy:
    """Random JSON whose keys and strings lean on a format's vocabulary, to get past the
    first checks more often than uniform random text would."""
    leaf = scalars | st.sampled_from(words)
    key = st.sampled_from(words) | st.text(max_size=8)
    return st.recursive(leaf, lambda kids: st.lists(kids, max_size=5)
                        | st.dictionaries(key, kids, max_size=6), max_leaves=30)


def _containers(node, trail=()):
    yield trail, node
    items = node.items() if isinstance(node, dict) else enumerate(node) if isinstance(node, list) else ()
    for k, v in items:
        if isinstance(v, (dict, list)):
            yield from _containers(v, trail + (k,))


@st.composite
def mutated(draw, seed, words: list[str], max_edits: int = 4):
    """The seed with a few random edits: a member removed, replaced, added, or a list shuffled."""
    doc = copy.deepcopy(seed)
    values = json_values(words)
    for _ in range(draw(st.integers(1, max_edits))):
        spots = list(_containers(doc))
        _, node = draw(st.sampled_from(spots))
        op = draw(st.sampled_from(["drop", "replace", "add", "reverse"]))
        if isinstance(node, dict):
            keys = list(node)
            if op == "drop" and keys:
                del node[draw(st.sampled_from(keys))]
            elif op == "replace" and keys:
                node[draw(st.sampled_from(keys))] = draw(values)
            else:
                node[draw(st.sampled_from(words))] = draw(values)
        elif isinstance(node, list):
            if op == "drop" and node:
                node.pop(draw(st.integers(0, len(node) - 1)))
            elif op == "replace" and node:
                node[draw(st.integers(0, len(node) - 1))] = draw(values)
            elif op == "reverse":
                node.reverse()
            else:
                node.append(draw(values))
    return doc


PROTO_TOKENS = ["message", "enum", "oneof", "map<string, int32>", "repeated", "optional", "required",
                "reserved", "syntax", "package", "import", "option", "service", "rpc", "returns",
                "extend", "group", "{", "}", ";", "=", "1", "0", "-1", "536870912", "19000",
                "\"proto2\"", "\"proto3\"", "\"editions\"", "\"missing.proto\"", "\"../../outside.proto\"",
                "\"http://example.invalid/x.proto\"", "int32", "string", "bytes", "PumpStatus",
                "Alarm", "// @unit: ms", "/*", "*/", "[deprecated = true]", "[json_name = \"x\"]",
                "\n", " ", "\"", "\\", "\u00e9", "\x00"]


@st.composite
def token_edits(draw, text: str, tokens, keep_lines: bool = False):
    """``text`` with one to four space-separated tokens deleted, inserted or replaced."""
    parts = (text.replace("\n", " \n ") if keep_lines else text).split(" ")
    for _ in range(draw(st.integers(1, 4))):
        i = draw(st.integers(0, len(parts) - 1))
        op = draw(st.sampled_from(["drop", "insert", "replace"]))
        if op == "drop":
            parts.pop(i)
        elif op == "insert":
            parts.insert(i, draw(tokens))
        else:
            parts[i] = draw(tokens)
    return " ".join(parts)


def proto_mutated(seed: str = PROTO_SEED):
    """The seed .proto with a few tokens deleted, inserted or swapped."""
    return token_edits(seed, st.sampled_from(PROTO_TOKENS) | st.text(max_size=6), keep_lines=True)


def dumps(doc) -> str:
    return json.dumps(doc, indent=1)
