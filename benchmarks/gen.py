"""Generated schemas of a chosen size, for the benchmarks (invented water-utility names).

Each generator returns (old_text, new_text): NEW is OLD with a handful of typical edits
(a field added with a default, a doc changed, a unit changed), so the differ walks the
whole tree and still has something to report. Fields are spread over nested records of
ten fields each, the shape real event schemas take, rather than one flat list.
"""
from __future__ import annotations

import json

PER_RECORD = 10
AVRO_TYPES = ["long", "double", "string", "int", "boolean"]


def _groups(n_fields: int) -> list[int]:
    """Field counts of the nested records: (n_fields // 10) records of ten, plus the rest."""
    full, rest = divmod(n_fields, PER_RECORD)
    return [PER_RECORD] * full + ([rest] if rest else [])


def avro(n_fields: int) -> tuple[str, str]:
    def build(new: bool) -> dict:
        fields = []
        for g, count in enumerate(_groups(n_fields)):
            inner = []
            for i in range(count):
                f = {"name": f"reading_{i}", "type": AVRO_TYPES[i % len(AVRO_TYPES)],
                     "doc": f"Register {i} of channel {g}."}
                if i == 0:
                    f["unit"] = "L" if not (new and g % 97 == 0) else "m3"
                inner.append(f)
            if new and g % 101 == 0:
                inner.append({"name": "quality_flag", "type": "int", "default": 0})
            fields.append({"name": f"channel_{g}",
                           "type": {"type": "record", "name": f"Channel{g}", "fields": inner}})
        return {"type": "record", "name": "MeterReading", "namespace": "utility.metering",
                "fields": fields}

    return json.dumps(build(False), indent=2), json.dumps(build(True), indent=2)


def jsonschema(n_fields: int) -> tuple[str, str]:
    def build(new: bool) -> dict:
        props = {}
        for g, count in enumerate(_groups(n_fields)):
            inner = {}
            for i in range(count):
                p = {"type": ["integer", "number", "string", "boolean"][i % 4],
                     "description": f"Register {i} of channel {g}."}
                if i == 0:
                    p["x-unit"] = "L" if not (new and g % 97 == 0) else "m3"
                inner[f"reading_{i}"] = p
            if new and g % 101 == 0:
                inner["quality_flag"] = {"type": "integer"}
            props[f"channel_{g}"] = {"type": "object", "properties": inner,
                                     "required": ["reading_0"] if count else []}
        return {"$schema": "https://json-schema.org/draft/2020-12/schema",
                "$id": "urn:utility:meter-reading", "type": "object", "properties": props}

    return json.dumps(build(False), indent=2), json.dumps(build(True), indent=2)


PROTO_TYPES = ["int64", "double", "string", "int32", "bool"]


def protobuf(n_fields: int) -> tuple[str, str]:
    def build(new: bool) -> str:
        groups = _groups(n_fields)
        out = ['syntax = "proto3";', "", "package utility.telemetry;", ""]
        for g, count in enumerate(groups):
            out.append(f"message Channel{g} {{")
            for i in range(count):
                unit = "L" if not (new and g % 97 == 0) else "m3"
                comment = f"  // Register {i} of channel {g}." + (f" @unit: {unit}" if i == 0 else "")
                out.append(comment)
                out.append(f"  {PROTO_TYPES[i % len(PROTO_TYPES)]} reading_{i} = {i + 1};")
            if new and g % 101 == 0:
                out.append(f"  int32 quality_flag = {count + 1};")
            out.append("}")
            out.append("")
        out.append("message PumpStatus {")
        for g in range(len(groups)):
            out.append(f"  Channel{g} channel_{g} = {g + 1};")
        out.append("}")
        return "\n".join(out) + "\n"

    return build(False), build(True)


GENERATORS = {"avro": (avro, ".avsc"), "jsonschema": (jsonschema, ".json"),
              "protobuf": (protobuf, ".proto")}


def write_pair(fmt: str, n_fields: int, folder) -> tuple:
    """Write old/new files of one format into folder/old and folder/new; return both paths."""
    from pathlib import Path

    make, ext = GENERATORS[fmt]
    old_text, new_text = make(n_fields)
    folder = Path(folder)
    paths = []
    for side, text in (("old", old_text), ("new", new_text)):
        (folder / side).mkdir(parents=True, exist_ok=True)
        path = folder / side / f"schema_{n_fields}{ext}"
        path.write_text(text)
        paths.append(path)
    return tuple(paths)
