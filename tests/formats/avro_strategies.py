"""Hypothesis strategies for Avro schema evolutions and for data of a schema.

A pair (OLD, NEW) is drawn from one pool of field names, so that the two versions share
fields, named types (``E_<field>``, ``F_<field>``, ``N_<field>``) and symbols: type
changes, added and removed fields, defaults, renames with aliases, enum symbols and union
branches all come up often, in both compatible and breaking shapes.
"""
from __future__ import annotations

import string

from hypothesis import strategies as st

NUMERIC = ["int", "long", "float", "double"]
SCALARS = ["boolean", "int", "long", "float", "double", "string", "bytes"]
SYMBOLS = ["LOW", "HIGH", "BURST", "UNKNOWN"]
FIELDS = ["f0", "f1", "f2", "f3", "f4"]
NAMESPACE = "utility.test"

# Defaults that are valid for each scalar type (Avro specification 1.12.0, field defaults).
DEFAULTS = {"boolean": [False, True], "int": [0, 7], "long": [0, 2**40], "float": [0.0, 1.5],
            "double": [0.0, 2.25], "string": ["", "none"], "bytes": ["", "\u00ff"]}


def scalar():
    return st.sampled_from(SCALARS)


# Logical types on their physical types (Avro specification 1.12.0, Logical Types).
LOGICAL = [{"type": "long", "logicalType": "timestamp-millis"}, {"type": "long", "logicalType": "timestamp-micros"},
           {"type": "long", "logicalType": "local-timestamp-millis"}, {"type": "int", "logicalType": "date"},
           {"type": "bytes", "logicalType": "decimal", "precision": 10, "scale": 2},
           {"type": "bytes", "logicalType": "decimal", "precision": 10, "scale": 3},
           {"type": "bytes", "logicalType": "decimal", "precision": 12, "scale": 2},
           {"type": "string", "logicalType": "uuid"}]


@st.composite
def field_type(draw, owner: str, depth: int = 0, logical: bool = False):
    """A field type; named types are named after the field so OLD and NEW share them."""
    shape = draw(st.sampled_from(["scalar"] * 4 + ["enum", "fixed", "array", "map", "union", "optional"]
                                 + (["record"] if depth == 0 else []) + (["logical"] * 2 if logical else [])))
    if shape == "scalar":
        return draw(scalar())
    if shape == "logical":
        return dict(draw(st.sampled_from(LOGICAL)))
    if shape == "enum":
        symbols = draw(st.lists(st.sampled_from(SYMBOLS), min_size=1, max_size=4, unique=True))
        out = {"type": "enum", "name": f"E_{owner}", "symbols": symbols}
        if draw(st.booleans()):
            out["default"] = draw(st.sampled_from(symbols))
        return out
    if shape == "fixed":
        return {"type": "fixed", "name": f"F_{owner}", "size": draw(st.sampled_from([2, 4]))}
    if shape == "array":
        return {"type": "array", "items": draw(scalar())}
    if shape == "map":
        return {"type": "map", "values": draw(scalar())}
    if shape == "optional":
        return ["null", draw(scalar())]
    if shape == "union":
        return draw(st.lists(scalar(), min_size=2, max_size=3, unique=True))
    fields = draw(st.lists(st.sampled_from(["a", "b", "c"]), min_size=1, max_size=3, unique=True))
    return {"type": "record", "name": f"N_{owner}",
            "fields": [{"name": f"{owner}_{n}", "type": draw(scalar())} for n in fields]}


def default_for(type_, draw):
    """A valid default for a type, or None when this sketch has none to offer."""
    if isinstance(type_, dict) and "logicalType" in type_:
        type_ = type_["type"]
    if isinstance(type_, str):
        return draw(st.sampled_from(DEFAULTS[type_]))
    if isinstance(type_, list):
        first = type_[0]
        return None if first == "null" else draw(st.sampled_from(DEFAULTS[first]))
    kind = type_["type"]
    if kind == "enum":
        return draw(st.sampled_from(type_["symbols"]))
    if kind == "fixed":
        return "\u0000" * type_["size"]
    if kind == "array":
        return []
    if kind == "map":
        return {}
    return {f["name"]: draw(st.sampled_from(DEFAULTS[f["type"]])) for f in type_["fields"]}


@st.composite
def field(draw, name: str, type_=None, logical: bool = False):
    type_ = type_ if type_ is not None else draw(field_type(name, logical=logical))
    out = {"name": name, "type": type_}
    if draw(st.booleans()):
        out["default"] = default_for(type_, draw)
    return out


@st.composite
def record(draw, names, logical=False):
    return {"type": "record", "name": "Reading", "namespace": NAMESPACE,
            "fields": [draw(field(n, logical=logical)) for n in names]}


@st.composite
def evolution(draw, logical: bool = False):
    """(OLD, NEW): NEW keeps, drops, adds, retypes and renames OLD's fields.

    ``logical`` adds logical types, which fastavro converts on reading (so the codec
    checks leave them out)."""
    old_names = draw(st.lists(st.sampled_from(FIELDS), min_size=1, max_size=4, unique=True))
    old = draw(record(old_names, logical))
    new_fields = []
    for f in old["fields"]:
        action = draw(st.sampled_from(["keep"] * 2 + ["tweak"] * 3 + ["retype", "redefault", "drop", "rename"]))
        if action == "keep":
            new_fields.append(dict(f))
        elif action == "tweak":
            g = dict(f, type=draw(tweak(f["type"])))
            if "default" in g and draw(st.booleans()):
                g["default"] = default_for(g["type"], draw)
            if "default" in g and not _default_fits(g):
                del g["default"]
            new_fields.append(g)
        elif action == "retype":
            new_fields.append(draw(field(f["name"], logical=logical)))
        elif action == "redefault":
            g = {k: v for k, v in f.items() if k != "default"}
            if draw(st.booleans()):
                g["default"] = default_for(g["type"], draw)
            new_fields.append(g)
        elif action == "rename":
            g = dict(f, name=f["name"] + "_v2")
            if draw(st.booleans()):
                g["aliases"] = [f["name"]]
            new_fields.append(g)
    for n in draw(st.lists(st.sampled_from([n for n in FIELDS if n not in old_names] or ["f9"]),
                           max_size=2, unique=True)):
        new_fields.append(draw(field(n, logical=logical)))
    new_fields = draw(st.permutations(new_fields))
    return old, dict(old, fields=list(new_fields))


NEIGHBOURS = {"int": ["long", "float", "double"], "long": ["int", "float", "double"],
              "float": ["int", "long", "double"], "double": ["int", "long", "float"],
              "string": ["bytes"], "bytes": ["string"], "boolean": ["int"]}


@st.composite
def tweak(draw, type_):
    """A small edit of a type: the changes the spec's resolution rules single out."""
    if isinstance(type_, str):
        return draw(st.sampled_from(NEIGHBOURS[type_] + [["null", type_], [type_, "string" if type_ != "string" else "int"]]))
    if isinstance(type_, list):
        options = [type_[1:] if len(type_) > 1 else type_, type_ + [b for b in ["int", "long", "string", "double"] if b not in type_][:1],
                   [draw(st.sampled_from(NEIGHBOURS[type_[-1]]))] + type_[:-1] if type_[-1] in NEIGHBOURS else type_,
                   list(reversed(type_))]
        out = draw(st.sampled_from(options))
        out = [b for i, b in enumerate(out) if b not in out[:i]]
        return out[0] if len(out) == 1 else out
    if "logicalType" in type_:
        out = draw(st.sampled_from([t for t in LOGICAL if t["type"] == type_["type"]] + [type_["type"]]))
        return dict(out) if isinstance(out, dict) else out
    kind = type_["type"]
    if kind in ("enum", "fixed", "record") and draw(st.integers(0, 4)) == 0:
        # Renamed, with an alias for the old name (full or relative), or without one.
        alias = draw(st.sampled_from([None, type_["name"], f"{NAMESPACE}.{type_['name']}", "Elsewhere"]))
        out = dict(type_, name=type_["name"] + "_v2")
        if alias:
            out["aliases"] = [alias]
        return out
    if kind == "enum":
        symbols = list(type_["symbols"])
        edit = draw(st.sampled_from(["add", "remove", "default", "reorder"]))
        out = {k: v for k, v in type_.items()}
        if edit == "add":
            extra = [s for s in SYMBOLS if s not in symbols]
            symbols += extra[:1]
        elif edit == "remove" and len(symbols) > 1:
            symbols = symbols[1:]
        elif edit == "reorder":
            symbols = list(reversed(symbols))
        out["symbols"] = symbols
        if edit == "default" or out.get("default") not in symbols:
            out.pop("default", None)
            if draw(st.booleans()):
                out["default"] = draw(st.sampled_from(symbols))
        return out
    if kind == "fixed":
        return dict(type_, size=6 - type_["size"]) if draw(st.booleans()) else ["null", type_]
    if kind in ("array", "map"):
        key = "items" if kind == "array" else "values"
        return dict(type_, **{key: draw(st.sampled_from(NEIGHBOURS[type_[key]]))})
    fields = type_["fields"]
    edit = draw(st.sampled_from(["add", "add-default", "remove", "retype"]))
    if edit.startswith("add"):
        g = {"name": f"{type_['name']}_z", "type": "int"}
        if edit == "add-default":
            g["default"] = 0
        return dict(type_, fields=fields + [g])
    if edit == "remove" and len(fields) > 1:
        return dict(type_, fields=fields[1:])
    first = dict(fields[0], type=draw(st.sampled_from(NEIGHBOURS[fields[0]["type"]])))
    return dict(type_, fields=[first] + fields[1:])


def _default_fits(f):
    from linter.formats.avro_schema import default_problem, parse

    try:
        node = parse(f["type"], "x", lambda obj: None).root
    except Exception:  # noqa: BLE001 - a type naming nothing known: let the caller drop it
        return False
    return default_problem(node, f["default"]) is None


# -- data ---------------------------------------------------------------------------
def datum(node):
    """A strategy for values of an evolint ``Node`` that fastavro can write."""
    k = node.kind
    if k == "null":
        return st.none()
    if k == "boolean":
        return st.booleans()
    if k == "int":
        return st.integers(-2**31, 2**31 - 1)
    if k == "long":
        return st.one_of(st.integers(-2**63, 2**63 - 1), st.integers(-1000, 1000))
    if k == "float":
        return st.floats(width=32, allow_nan=False)
    if k == "double":
        return st.floats(allow_nan=False)
    if k == "string":
        return st.text(string.printable + "äö€", max_size=5)
    if k == "bytes":
        return st.binary(max_size=5)
    if k == "fixed":
        return st.binary(min_size=node.size, max_size=node.size)
    if k == "enum":
        return st.sampled_from(node.symbols)
    if k == "array":
        return st.lists(datum(node.items), max_size=3)
    if k == "map":
        return st.dictionaries(st.text(string.ascii_lowercase, max_size=3), datum(node.items), max_size=3)
    if k == "union":
        return st.one_of([datum(b) for b in node.branches])
    return st.fixed_dictionaries({f.name: datum(f.type) for f in node.fields})
