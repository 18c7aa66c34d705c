"""Semantic changes: annotations of unit and meaning, compared across OLD and NEW.

Adapters read the annotations in their own syntax (Avro attributes, JSON Schema x-
keywords, Protobuf comments and options) and hand them here as plain mappings with the
keys ``unit`` and ``meaning``; this module is format-blind. Units are compared by what
they measure (``linter.units``), meanings as text up to whitespace and case.
"""
from __future__ import annotations

import json
from typing import Any, Mapping

from .model import Change, Location

KEYS = ("unit", "meaning")
# Every change kind this module can produce; the catalogue must classify each of them.
KINDS = frozenset({
    "unit-added", "unit-removed", "unit-unreadable",
    "unit-rescaled", "unit-offset-changed", "unit-dimension-changed", "unit-unreadable-changed",
    "meaning-added", "meaning-removed", "meaning-changed",
})
# A unit relation (linter.units.Relation.kind) -> the change kind it is reported as.
UNIT_KINDS = {"scale": "unit-rescaled", "affine": "unit-offset-changed",
              "dimension": "unit-dimension-changed", "unreadable": "unit-unreadable-changed"}
# The example values a message converts: a count-like one, and a temperature-like one
# for scales with an offset.
SAMPLE, SAMPLE_AFFINE = 1500.0, 20.0


def _text(value: Any) -> str | None:
    """An annotation's text; absent, null and blank count as no annotation."""
    if value is None:
        return None
    if not isinstance(value, str):
        value = json.dumps(value, ensure_ascii=False)
    value = value.strip()
    return value or None


def _norm_meaning(text: str) -> str:
    return " ".join(text.split()).casefold()


def inherit(type_annotations: Mapping[str, Any] | None, field_annotations: Mapping[str, Any] | None) -> dict:
    """A field's annotations with its type's unit where the field has none of its own.

    A unit on a record, message or object applies to every field in it; a meaning does
    not (it describes the type, not each value), so only ``unit`` is inherited.
    """
    out = dict(field_annotations or {})
    if _text(out.get("unit")) is None and type_annotations and _text(type_annotations.get("unit")):
        out["unit"] = type_annotations["unit"]
    return out


def annotation_changes(schema: str, path: str, old: Mapping[str, Any], new: Mapping[str, Any],
                       old_loc: Location | None = None, new_loc: Location | None = None, *,
                       old_type: Mapping[str, Any] | None = None,
                       new_type: Mapping[str, Any] | None = None) -> list[Change]:
    """Changes of the unit and meaning annotations of one paired node.

    ``old_type``/``new_type`` are the annotations of the enclosing type, when the node is
    a field: the field's unit is then compared as inherited (``inherit``). Where neither
    side has a unit of its own, nothing is reported here: the type's own comparison
    reports the change once, at the type's path, which covers every field in it.
    """
    old, new = old or {}, new or {}
    changes = []
    a, b = _text(old.get("unit")), _text(new.get("unit"))
    if old_type is not None or new_type is not None:
        if a is None and b is None:
            a = b = None  # both inherited: reported at the type
        else:
            a = _text(inherit(old_type, old).get("unit"))
            b = _text(inherit(new_type, new).get("unit"))
    changes.extend(_unit_changes(schema, path, a, b, old_loc, new_loc))
    a, b = _text(old.get("meaning")), _text(new.get("meaning"))
    kind = _presence_kind("meaning", a, b)
    if kind is None and a is not None and _norm_meaning(a) != _norm_meaning(b):
        kind = "meaning-changed"
    if kind:
        changes.append(Change(kind, schema, path, a, b, old_loc, new_loc,
                              {"old_meaning": a, "new_meaning": b}))
    return changes


def _presence_kind(key: str, a: str | None, b: str | None) -> str | None:
    if a is None and b is not None:
        return f"{key}-added"
    if a is not None and b is None:
        return f"{key}-removed"
    return None


def _unit_changes(schema, path, a, b, old_loc, new_loc) -> list[Change]:
    facts: dict[str, Any] = {"old_unit": a, "new_unit": b}

    def change(kind, **more):
        return Change(kind, schema, path, a, b, old_loc, new_loc, {**facts, **more})

    kind = _presence_kind("unit", a, b)
    if kind == "unit-added":
        out = [change(kind)]
        problem = _unreadable(b)
        if problem:
            out.append(change("unit-unreadable", problem=problem))
        return out
    if kind:
        return [change(kind)]
    if a is None or a == b:
        return []  # no pint for equal texts: start-up time matters
    from . import units

    rel = units.relate(a, b)
    if rel.kind == "same":
        return []
    if rel.kind == "unreadable":
        return [change(UNIT_KINDS[rel.kind], problem=rel.problem)]
    if rel.kind == "dimension":
        return [change(UNIT_KINDS[rel.kind], old_dimension=rel.old_dimension,
                       new_dimension=rel.new_dimension)]
    sample = SAMPLE_AFFINE if rel.kind == "affine" else SAMPLE
    example = (f"a value of {units.number(sample)} read as {a} is now "
               f"{units.number(rel.apply(sample))} {b}")
    if rel.kind == "scale":
        return [change(UNIT_KINDS[rel.kind], factor=rel.factor, factor_text=units.number(rel.factor),
                       example=example)]
    return [change(UNIT_KINDS[rel.kind], factor=rel.factor, offset=rel.offset,
                   conversion=f"new = {units.number(rel.factor)} x old {'+' if rel.offset >= 0 else '-'} "
                              f"{units.number(abs(rel.offset))}",
                   example=example)]


def _unreadable(text: str) -> str | None:
    """Why a unit text cannot be read, or None; pint only if it is not plain UCUM."""
    from . import units

    try:
        units.parse(text)
        return None
    except units.UnitSyntaxError:
        pass
    try:
        units.read(text)
        return None
    except units.UnitSyntaxError as exc:
        return str(exc)
