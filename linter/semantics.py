"""Semantic changes: annotations of unit and meaning, compared across OLD and NEW.

Adapters read the annotations in their own syntax (Avro attributes, JSON Schema x-
keywords, Protobuf comments and options) and hand them here as plain mappings with the
keys ``unit`` and ``meaning``; this module is format-blind.
"""
from __future__ import annotations

from typing import Mapping

from .model import Change, Location

KEYS = ("unit", "meaning")
# Every change kind this module can produce; the catalogue must classify each of them.
KINDS = frozenset({"unit-added", "unit-removed", "unit-changed",
                   "meaning-added", "meaning-removed", "meaning-changed"})


def _norm_meaning(text: str) -> str:
    return " ".join(text.split()).casefold()


def annotation_changes(schema: str, path: str, old: Mapping[str, str], new: Mapping[str, str],
                       old_loc: Location | None = None, new_loc: Location | None = None) -> list[Change]:
    """Changes of the unit and meaning annotations of one paired node."""
    changes = []
    for key in KEYS:
        a, b = old.get(key), new.get(key)
        if a is None and b is None:
            continue
        facts = {"old_" + key: a, "new_" + key: b}
        if a is None:
            kind = f"{key}-added"
        elif b is None:
            kind = f"{key}-removed"
        elif key == "meaning" and _norm_meaning(a) != _norm_meaning(b):
            kind = "meaning-changed"
        elif key == "unit" and a.strip() != b.strip():
            kind = "unit-changed"
        else:
            continue
        changes.append(Change(kind, schema, path, a, b, old_loc, new_loc, facts))
    return changes
