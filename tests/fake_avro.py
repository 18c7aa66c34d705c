"""A stand-in Avro adapter for workflow tests while the real adapter is not on this branch.

It pairs top-level fields by name and reports unit annotation changes through the real
semantics module, so the findings it yields carry real catalogue rules.
"""
from __future__ import annotations

import json

from linter.formats import Schema, parse_json, read_text
from linter.model import Location
from linter.semantics import annotation_changes

name = "avro"
KINDS = frozenset()


def load(path, display, options):
    data = parse_json(read_text(path, display), display)
    full = f"{data['namespace']}.{data['name']}"
    return Schema("avro", display, (full,), {full: frozenset(f["name"] for f in data["fields"])}, data)


def diff(old, new):
    full = old.roots[0]
    olds = {f["name"]: f for f in old.model["fields"]}
    changes = []
    for field in new.model["fields"]:
        before = olds.get(field["name"])
        if before is not None:
            changes += annotation_changes(full, field["name"], {"unit": before.get("unit")},
                                          {"unit": field.get("unit")}, Location(old.file, 1), Location(new.file, 1))
    return changes


def use_avro(monkeypatch):
    """The real Avro adapter when it is installed, else this stand-in (in this process and forks)."""
    import importlib
    import sys

    try:
        importlib.import_module("linter.formats.avro")
        return "real"
    except ModuleNotFoundError:
        from linter import api

        real = api.adapter
        monkeypatch.setattr(api, "adapter", lambda fmt: sys.modules[__name__] if fmt == "avro" else real(fmt))
        return "fake"
