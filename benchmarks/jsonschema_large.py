"""Benchmark: the JSON Schema inclusion analysis on a large generated schema.

A schema with 10,000 properties, each a chain of $ref hops through $defs (DEPTH deep),
compared with a copy in which every 100th property's maxLength was tightened. Prints
the time of each stage and the ratios of analysis time over parse and metaschema
validation time.

    python benchmarks/jsonschema_large.py [--properties N] [--depth D]
"""
from __future__ import annotations

import argparse
import json
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))


def generate(properties: int, depth: int, tightened: bool) -> dict:
    defs = {}
    props = {}
    for i in range(properties):
        chain = [f"p{i}_{d}" for d in range(depth)]
        for here, there in zip(chain, chain[1:]):
            defs[here] = {"$ref": f"#/$defs/{there}"}
        limit = 40 if not (tightened and i % 100 == 0) else 20
        defs[chain[-1]] = {"type": "string", "maxLength": limit, "x-unit": "1"}
        props[f"reading_{i}"] = {"$ref": f"#/$defs/{chain[0]}"}
    return {"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": "urn:utility:bench",
            "type": "object", "properties": props, "additionalProperties": False, "$defs": defs}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--properties", type=int, default=10_000)
    parser.add_argument("--depth", type=int, default=8)
    args = parser.parse_args()

    from jsonschema import Draft202012Validator

    from linter.formats import Options, jsonschema as adapter, parse_json

    with tempfile.TemporaryDirectory() as tmp:
        old_path, new_path = Path(tmp) / "old.json", Path(tmp) / "new.json"
        old_path.write_text(json.dumps(generate(args.properties, args.depth, False)))
        new_path.write_text(json.dumps(generate(args.properties, args.depth, True)))

        t0 = time.perf_counter()
        for path in (old_path, new_path):
            parse_json(path.read_text(), str(path))
        parse = time.perf_counter() - t0

        t0 = time.perf_counter()
        for path in (old_path, new_path):
            data = json.loads(path.read_text())
            for _ in Draft202012Validator(Draft202012Validator.META_SCHEMA).iter_errors(data):
                pass
        validation = time.perf_counter() - t0

        t0 = time.perf_counter()
        old = adapter.load(old_path, "old.json", Options())
        new = adapter.load(new_path, "new.json", Options())
        load = time.perf_counter() - t0

        t0 = time.perf_counter()
        changes = adapter.diff(old, new)
        analysis = time.perf_counter() - t0

    expected = (args.properties + 99) // 100
    print(f"properties={args.properties} ref-depth={args.depth} changes={len(changes)} (expected {expected})")
    print(f"parse (json.loads, both)           {parse:8.3f} s")
    print(f"metaschema validation (both)       {validation:8.3f} s")
    print(f"evolint load (both: parse, validate, references, fields) {load:8.3f} s")
    print(f"inclusion analysis                 {analysis:8.3f} s")
    print(f"ratio analysis / parse             {analysis / parse:8.1f}")
    print(f"ratio analysis / validation        {analysis / validation:8.2f}")
    print(f"ratio analysis / load              {analysis / load:8.2f}")
    if len(changes) != expected:
        sys.exit(f"wrong number of changes: {len(changes)}")


if __name__ == "__main__":
    main()
