"""Avro witnesses: encode with the writer schema, decode with the reader's (fastavro).

A run writes the datum with ``fastavro.schemaless_writer`` and reads the bytes twice:
with the writer schema alone (what the writer meant) and resolved against the reader
schema (``schemaless_reader(buf, writer, reader)``, Avro specification, Schema
Resolution). The outcome is the decoder's error, or the first value that came back
changed. Values are compared as the specification promotes them (int -> long, float,
double; string <-> bytes), so a permitted promotion is not reported as a change.

Data are written with logical types stripped (the physical value is what goes on the
wire; the Avro specification, Logical Types) and read with them kept.
"""
from __future__ import annotations

import datetime
import decimal
import io
import math
import struct
import uuid
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import InputError
from ..formats import parse_json, read_text
from . import Pair, Trial

PRIMITIVES = {"null", "boolean", "int", "long", "float", "double", "bytes", "string"}
NAMED = {"record", "error", "enum", "fixed"}
# Avro specification, Schema Resolution: what a writer's primitive may be read as.
PROMOTIONS = {"int": {"long", "float", "double"}, "long": {"float", "double"},
              "float": {"double"}, "string": {"bytes"}, "bytes": {"string"}}
INT32 = (-2**31, 2**31 - 1)
INT64 = (-2**63, 2**63 - 1)
ALPHABET = "abcxyz0129 -_.éß水"
MAX_DEPTH = 6
TARGETED = 8
# Physical ranges that every codec converts without overflow (common practice: years 1970-2096).
LOGICAL_RANGES = {
    "date": (0, 46000), "time-millis": (0, 86_399_999), "time-micros": (0, 86_399_999_999),
    "timestamp-millis": (0, 4 * 10**12), "timestamp-micros": (0, 4 * 10**15),
    "timestamp-nanos": (0, 4 * 10**18), "local-timestamp-millis": (0, 4 * 10**12),
    "local-timestamp-micros": (0, 4 * 10**15), "local-timestamp-nanos": (0, 4 * 10**18),
}
NOTHING = object()


def _fastavro():
    import fastavro

    return fastavro


def _strip_logical(raw: Any) -> Any:
    if isinstance(raw, dict):
        return {k: _strip_logical(v) for k, v in raw.items() if k != "logicalType"}
    if isinstance(raw, list):
        return [_strip_logical(v) for v in raw]
    return raw


@dataclass
class Side:
    """One schema file, parsed twice: with logical types (to read) and without (to write)."""

    display: str
    raw: Any
    parsed: Any
    plain: Any
    names: dict = field(default_factory=dict)

    def resolve(self, node: Any) -> Any:
        seen = 0
        while isinstance(node, str) and node in self.names and seen < 64:
            node, seen = self.names[node], seen + 1
        return node

    def roots(self) -> dict[str, tuple[Any, Any]]:
        """Root full name -> (schema to read with, schema to write with)."""
        if isinstance(self.parsed, dict) and self.parsed.get("name"):
            return {self.parsed["name"]: (self.parsed, self.plain)}
        if isinstance(self.parsed, list):
            out = {}
            fa = _fastavro()
            for i, branch in enumerate(self.parsed):
                branch = self.resolve(branch)
                if isinstance(branch, dict) and branch.get("name"):
                    # A branch of a top-level union refers to its siblings by name: expand it
                    # into a schema of its own.
                    try:
                        read = fa.parse_schema(fa.schema.expand_schema(self.raw)[i])
                        write = fa.parse_schema(fa.schema.expand_schema(_strip_logical(self.raw))[i])
                    except Exception:  # noqa: BLE001 - e.g. a recursive type cannot be expanded
                        continue
                    out[branch["name"]] = (read, write)
            return out
        return {}

    def root(self, name: str) -> tuple[Any, Any] | None:
        roots = self.roots()
        if name in roots:
            return roots[name]
        if len(roots) == 1:
            return next(iter(roots.values()))
        if not roots and self.parsed is not None:
            return self.parsed, self.plain  # an unnamed top-level type
        return None


def _side(path: Path, display: str) -> Side:
    fa = _fastavro()
    raw = parse_json(read_text(path, display), display)
    names: dict = {}
    try:
        plain = fa.parse_schema(_strip_logical(raw), named_schemas={})
    except Exception as exc:  # noqa: BLE001 - fastavro raises several unrelated types
        raise InputError(f"not an Avro schema fastavro accepts: {exc}", display) from None
    try:
        parsed = fa.parse_schema(raw, named_schemas=names)
    except Exception:  # noqa: BLE001
        # fastavro refuses some invalid logical types (a decimal with scale > precision);
        # the specification reads them as their underlying type (Logical Types).
        names = {}
        raw = _strip_logical(raw)
        parsed = fa.parse_schema(raw, named_schemas=names)
    return Side(display, raw, parsed, plain, names)


def open_pair(old: Path, new: Path, old_display: str, new_display: str, options=None) -> Pair:
    return Pair(_side(old, old_display), _side(new, new_display))


def roots(writer: Side, reader: Side) -> list[str]:
    return sorted(set(writer.roots()) & set(reader.roots()))


# --- schema walking -------------------------------------------------------------------

def kind_of(node: Any) -> str:
    if isinstance(node, list):
        return "union"
    if isinstance(node, dict):
        return node.get("type") if isinstance(node.get("type"), str) else "union"
    return node


def _children(side: Side, node: Any) -> list:
    """The nodes paths look through: union branches, array items, map values."""
    node = side.resolve(node)
    if isinstance(node, list):
        return [side.resolve(b) for b in node]
    k = kind_of(node)
    if k == "array":
        return [side.resolve(node["items"])]
    if k == "map":
        return [side.resolve(node["values"])]
    return []


def _field(side: Side, node: Any, name: str, depth: int = 0):
    """The field called ``name`` (or aliased so) in a record reachable through unions, arrays, maps."""
    node = side.resolve(node)
    if depth > 8:
        return None
    if kind_of(node) in ("record", "error"):
        for f in node["fields"]:
            if f["name"] == name or name in (f.get("aliases") or ()):
                return f
        return None
    for child in _children(side, node):
        found = _field(side, child, name, depth + 1)
        if found is not None:
            return found
    return None


def node_at(side: Side, root: Any, path: str) -> Any:
    node = root
    for seg in path.split(".") if path else ():
        f = _field(side, node, seg)
        if f is None:
            return None
        node = f["type"]
    return side.resolve(node)


def _leads(side: Side, node: Any, seg: str) -> bool:
    return _field(side, node, seg) is not None


def _short(name: str) -> str:
    return name.rsplit(".", 1)[-1]


def matches(wside: Side, w: Any, rside: Side, r: Any) -> bool:
    """Whether a writer (non-union) node can be read as a reader node (Schema Resolution)."""
    w, r = wside.resolve(w), rside.resolve(r)
    if isinstance(r, list):
        return any(matches(wside, w, rside, b) for b in r)
    kw, kr = kind_of(w), kind_of(r)
    if kw == "union":
        return all(matches(wside, b, rside, r) for b in w)
    if kw in NAMED or kr in NAMED:
        if kw != kr:
            return False
        names = {_short(r["name"]), *(_short(a) for a in r.get("aliases") or ())}
        return _short(w["name"]) in names
    if kw == kr:
        return True
    return kr in PROMOTIONS.get(kw, ())


# --- data generation -------------------------------------------------------------------

def _f32(x: float) -> float:
    return struct.unpack("<f", struct.pack("<f", x))[0]


def _int(rng, lo: int, hi: int) -> int:
    pick = rng.random()
    if pick < 0.4:
        return rng.randint(max(lo, -100), min(hi, 100))
    if pick < 0.55:
        return rng.choice((lo, hi, 0, -1, 1))
    return rng.randint(lo, hi)


def _logical_value(node: dict, rng) -> Any:
    logical = node.get("logicalType")
    if logical in LOGICAL_RANGES:
        return rng.randint(*LOGICAL_RANGES[logical])
    if logical == "uuid" and node.get("type") == "string":
        return str(uuid.UUID(int=rng.getrandbits(128), version=4))
    return NOTHING


TAME = {"int": (0, 100), "long": (0, 100_000)}
TAME_WORDS = ("m-17", "north", "d-4", "ok", "")


def _primitive(kind: str, node: Any, rng, tame: bool = False) -> Any:
    if isinstance(node, dict) and node.get("logicalType"):
        value = _logical_value(node, rng)
        if value is not NOTHING:
            return value
    if tame:  # readable values for a witness: the pressed value carries the point
        if kind in TAME:
            return rng.randint(*TAME[kind])
        if kind in ("float", "double"):
            return float(rng.randint(0, 40)) / 4
        if kind == "string":
            return rng.choice(TAME_WORDS)
        if kind == "bytes":
            return rng.choice(TAME_WORDS).encode()
    if kind == "null":
        return None
    if kind == "boolean":
        return rng.random() < 0.5
    if kind == "int":
        return _int(rng, *INT32)
    if kind == "long":
        return _int(rng, *INT64)
    if kind == "float":
        return _f32(rng.choice((0.0, 1.5, -2.25, rng.uniform(-1e6, 1e6))))
    if kind == "double":
        return rng.choice((0.0, 0.1, -3.5, 1e300, rng.uniform(-1e9, 1e9)))
    if kind == "string":
        return "".join(rng.choice(ALPHABET) for _ in range(rng.randint(0, 8)))
    if kind == "bytes":
        return rng.randbytes(rng.randint(0, 8))
    raise ValueError(f"not an Avro primitive: {kind!r}")


def _tag(branch: Any, value: Any, union: list, side: Side) -> Any:
    """A union value fastavro writes to exactly this branch (tuple notation for named types)."""
    branch = side.resolve(branch)
    if kind_of(branch) in NAMED:
        return (branch["name"], value)
    return value


def _branch_order(side: Side, union: list, focus, rng, depth: int) -> list:
    branches = [side.resolve(b) for b in union]
    if focus:
        leading = [b for b in branches if _leads(side, b, focus[0])]
        if leading:
            return [rng.choice(leading)]
    if depth >= MAX_DEPTH:
        flat = [b for b in branches if kind_of(b) in PRIMITIVES | {"enum", "fixed"}]
        if flat:
            return [flat[0]]
    return [rng.choice(branches)]


def generate(side: Side, node: Any, rng, focus: list[str] | None = None, press=None, depth: int = 0,
             tame: bool = False) -> Any:
    """A random datum of ``node``; along ``focus`` (remaining path segments), ``press`` picks the target."""
    node = side.resolve(node)
    at_target = focus is not None and not focus
    if at_target and press is not None:
        pressed = press(node)
        if pressed is not NOTHING:
            kind, value = pressed
            if kind == "branch":
                return _tag(value, generate(side, value, rng, None, None, depth + 1, tame), node, side)
            return value
    if isinstance(node, list):
        branch = _branch_order(side, node, focus, rng, depth)[0]
        return _tag(branch, generate(side, branch, rng, focus, press, depth + 1, tame), node, side)
    kind = kind_of(node)
    if kind in ("record", "error"):
        out = {}
        for f in node["fields"]:
            sub = focus[1:] if focus and focus[0] == f["name"] else None
            out[f["name"]] = generate(side, f["type"], rng, sub, press, depth + 1, tame)
        return out
    if kind == "array":
        n = rng.randint(1, 2) if focus is not None else rng.randint(0, 3 if depth < MAX_DEPTH else 0)
        return [generate(side, node["items"], rng, focus, press, depth + 1, tame) for _ in range(n)]
    if kind == "map":
        n = rng.randint(1, 2) if focus is not None else rng.randint(0, 2 if depth < MAX_DEPTH else 0)
        keys = {f"k{rng.randint(0, 999)}" for _ in range(n)}
        return {k: generate(side, node["values"], rng, focus, press, depth + 1, tame) for k in sorted(keys)}
    if kind == "enum":
        return rng.choice(node["symbols"])
    if kind == "fixed":
        return rng.randbytes(node["size"])
    return _primitive(kind, node, rng, tame)


def _press(wside: Side, rside: Side, rnode: Any, rng):
    """At the finding's node: a writer value the reader node cannot take, where one is known."""

    def press(w):
        if rnode is None:
            return NOTHING
        if isinstance(w, list):
            lost = [b for b in w if not matches(wside, b, rside, rnode)]
            return ("branch", rng.choice(lost)) if lost else NOTHING
        kw, r = kind_of(w), rside.resolve(rnode)
        kr = kind_of(r)
        if kw == "enum" and kr == "enum":
            lost = [s for s in w["symbols"] if s not in r["symbols"]]
            return ("value", rng.choice(lost)) if lost else NOTHING
        if kw == "long" and kr == "int":
            return ("value", 2**31 + rng.randint(0, 10**6))  # one more than an int holds
        if kw == "double" and kr == "float":
            return ("value", 1e39)  # beyond the largest float
        if kw == "bytes" and kr == "string":
            return ("value", b"\xff\xfe" + rng.randbytes(2))  # not UTF-8
        wd, rd = _decimal(w), _decimal(r)
        if wd and rd and wd != rd:
            # As many digits as the writer's precision allows: more than a narrower reader holds.
            unscaled = 10 ** wd[0] - 1
            size = w.get("size") or (unscaled.bit_length() // 8 + 1)
            return ("value", unscaled.to_bytes(size, "big", signed=True))
        return NOTHING

    return press


def targeted(finding, writer: Side, reader: Side, rng):
    """Writer data aimed at the finding's node: the value its change cannot carry."""
    wroot, rroot = writer.root(finding.schema), reader.root(finding.schema)
    if wroot is None:
        return
    focus = finding.path.split(".") if finding.path else []
    rnode = node_at(reader, rroot[0], finding.path) if rroot is not None else None
    press = _press(writer, reader, rnode, rng)
    for i in range(TARGETED):
        yield generate(writer, wroot[0], rng, list(focus), press, tame=i < TARGETED // 2)


def random_datum(writer: Side, root: str, rng) -> Any:
    wroot = writer.root(root)
    return generate(writer, wroot[0], rng) if wroot is not None else None


# --- running ---------------------------------------------------------------------------

def jsonable(value: Any) -> Any:
    """A datum as JSON: unions as {branch: value}, bytes as code points 0-255 (Avro JSON encoding)."""
    if isinstance(value, tuple) and len(value) == 2 and isinstance(value[0], str):
        return {value[0]: jsonable(value[1])}
    if isinstance(value, dict):
        return {str(k): jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [jsonable(v) for v in value]
    if isinstance(value, (bytes, bytearray)):
        return bytes(value).decode("latin-1")
    if isinstance(value, float) and not math.isfinite(value):
        return str(value)
    if isinstance(value, (datetime.date, datetime.time, datetime.datetime)):
        return value.isoformat()
    if isinstance(value, (decimal.Decimal, uuid.UUID)):
        return str(value)
    return value


def same_leaf(w: Any, r: Any) -> bool:
    """Equal as the specification promotes: numbers by value, string and bytes by UTF-8."""
    if isinstance(w, bool) or isinstance(r, bool):
        return type(w) is type(r) and w == r
    if isinstance(r, float) and isinstance(w, (int, float)):
        # A long read as float may land on the nearest float32 or float64.
        return r == float(w) or (abs(w) < 3.4e38 and r == _f32(float(w)))
    if isinstance(w, bytes) and isinstance(r, str):
        return w == r.encode("utf-8")
    if isinstance(w, str) and isinstance(r, bytes):
        return w.encode("utf-8") == r
    return type(w) is type(r) and w == r


def changed(side: Side, node: Any, w: Any, r: Any, path: str = "") -> list[tuple[str, Any, Any]]:
    """Paths whose value the reader got differently from the writer, guided by the writer schema."""
    node = side.resolve(node)
    kind = kind_of(node)
    if kind == "union":
        branches = [side.resolve(b) for b in (node if isinstance(node, list) else [node])]
        if isinstance(w, dict):
            for b in branches:
                if kind_of(b) in ("record", "error") and set(w) == {f["name"] for f in b["fields"]}:
                    return changed(side, b, w, r, path)
            for b in branches:
                if kind_of(b) == "map":
                    return changed(side, b, w, r, path)
        if isinstance(w, list):
            for b in branches:
                if kind_of(b) == "array":
                    return changed(side, b, w, r, path)
        return [] if same_leaf(w, r) else [(path, w, r)]
    if kind in ("record", "error"):
        if not isinstance(r, dict):
            return [(path, w, r)]
        out = []
        for f in node["fields"]:
            if f["name"] in r and f["name"] in w:
                sub = f"{path}.{f['name']}" if path else f["name"]
                out.extend(changed(side, f["type"], w[f["name"]], r[f["name"]], sub))
        return out
    if kind == "array":
        if not isinstance(r, list) or len(r) != len(w):
            return [(path, w, r)]
        return [c for a, b in zip(w, r) for c in changed(side, node["items"], a, b, path)]
    if kind == "map":
        if not isinstance(r, dict) or set(r) != set(w):
            return [(path, w, r)]
        return [c for k in w for c in changed(side, node["values"], w[k], r[k], path)]
    return [] if same_leaf(w, r) else [(path, w, r)]


def _show(value: Any) -> str:
    import json

    return json.dumps(jsonable(value), ensure_ascii=False, default=str)


def encode(writer: Side, root: str, datum: Any) -> bytes | None:
    fa = _fastavro()
    wroot = writer.root(root)
    buf = io.BytesIO()
    try:
        fa.schemaless_writer(buf, wroot[1], datum)
    except Exception:  # noqa: BLE001 - a datum the writer cannot encode is not a witness
        return None
    return buf.getvalue()


def run(writer: Side, reader: Side, root: str, datum: Any, encoding: str | None = None) -> Trial | None:
    """Write ``datum`` with the writer schema, read it with the reader's; None if the writer refuses it."""
    fa = _fastavro()
    wroot, rroot = writer.root(root), reader.root(root)
    if wroot is None or rroot is None:
        return None
    data = encode(writer, root, datum)
    if data is None:
        return None
    shown = jsonable(datum)
    written = fa.schemaless_reader(io.BytesIO(data), wroot[0], None)
    try:
        read = fa.schemaless_reader(io.BytesIO(data), wroot[0], rroot[0])
    except Exception as exc:  # noqa: BLE001 - the decoder's error is the outcome
        departure = None
        if isinstance(exc, UnicodeDecodeError):
            departure = ("fastavro fails on bytes that are not UTF-8 read as string; the Avro "
                         "specification promotes bytes to string (Schema Resolution)")
        return Trial(shown, True, f"the reader fails: {type(exc).__name__}: {_one_line(exc)}", error=True,
                     departure=departure)
    diffs = [d for d in changed(writer, wroot[0], written, read) if not _enum_default(reader, rroot[0], *d)]
    if diffs:
        path, w, r = diffs[0]
        return Trial(shown, True, f"{path or '(value)'} was written as {_show(w)} and read as {_show(r)}",
                     tuple(p for p, _, _ in diffs))
    return Trial(shown, False, "read back with every value kept")


def _enum_default(reader: Side, rroot: Any, path: str, w: Any, r: Any) -> bool:
    """A symbol the reader does not know, replaced by its enum's default (Schema Resolution)."""
    node = node_at(reader, rroot, path)
    for b in node if isinstance(node, list) else [node]:
        b = reader.resolve(b)
        if kind_of(b) == "enum" and "default" in b and w not in b["symbols"] and r == b["default"]:
            return True
    return False


def _decimal(node: Any) -> tuple[int, int] | None:
    if isinstance(node, dict) and node.get("logicalType") == "decimal":
        return int(node.get("precision", 0)), int(node.get("scale", 0))
    return None


def _too_wide(reader: Side, rroot: Any, path: str, value: Any) -> str | None:
    """Why a decoded decimal does not fit the reader's decimal(precision, scale), if it does not."""
    spec = _decimal(node_at(reader, rroot, path))
    if spec is None or not isinstance(value, decimal.Decimal):
        return None
    precision, scale = spec
    unscaled = int(value.scaleb(scale).to_integral_value())
    if len(str(abs(unscaled))) > precision:
        return f"{value} has more digits than the reader's decimal({precision}, {scale}) holds"
    return None


def _physical(side: Side, node: Any) -> Any:
    node = side.resolve(node)
    return kind_of(node), (node.get("size") if isinstance(node, dict) else None)


def reinterpret(finding, writer: Side, reader: Side, rng) -> Trial | None:
    """The same bytes read with the reader schema as their own: what a reader assuming it sees.

    Only where the finding's node has the same physical type on both sides (a change of
    logical type or of its parameters), with only this change applied to the reader.
    """
    fa = _fastavro()
    alone = isolate(finding, writer, reader)
    if alone is not None:
        reader = alone
    wroot, rroot = writer.root(finding.schema), reader.root(finding.schema)
    if wroot is None or rroot is None:
        return None
    wnode, rnode = node_at(writer, wroot[0], finding.path), node_at(reader, rroot[0], finding.path)
    if wnode is None or rnode is None or _physical(writer, wnode) != _physical(reader, rnode):
        return None
    for datum in targeted(finding, writer, reader, rng):
        data = encode(writer, finding.schema, datum)
        if data is None:
            continue
        meant = fa.schemaless_reader(io.BytesIO(data), wroot[0], None)
        try:
            seen = fa.schemaless_reader(io.BytesIO(data), rroot[0], None)
        except Exception as exc:  # noqa: BLE001
            return Trial(jsonable(datum), True, f"the bytes do not read with the other schema: {_one_line(exc)}",
                         error=True)
        diffs = [d for d in changed(writer, wroot[0], meant, seen)
                 if finding.path == "" or d[0] == finding.path or d[0].startswith(finding.path + ".")]
        wide = _too_wide(reader, rroot[0], finding.path, _at(seen, finding.path))
        if diffs:
            path, w, r = diffs[0]
            return Trial(jsonable(datum), True, f"{path} means {_show(w)} to the writer and "
                         f"{_show(r)} to a reader of the same bytes with the other schema"
                         + (f" ({wide})" if wide else ""), (path,))
        if wide:
            return Trial(jsonable(datum), True, f"fastavro reads it without complaint, but at {finding.path} "
                         f"{wide}", (finding.path,))
    return None


def _at(value: Any, path: str) -> Any:
    """The value at a dotted path of a decoded datum (the first element through arrays), or None."""
    for seg in path.split(".") if path else ():
        while isinstance(value, list) and value:
            value = value[0]
        if not isinstance(value, dict) or seg not in value:
            return None
        value = value[seg]
    return value


def _one_line(exc: Exception, limit: int = 240) -> str:
    text = " ".join(str(exc).split()) or type(exc).__name__
    return text if len(text) <= limit else text[: limit - 3] + "..."


def with_value(writer: Side, root: str, path: str, value: float, rng) -> Any:
    """A writer datum holding ``value`` at ``path`` (a number field), or None."""
    wroot = writer.root(root)
    if wroot is None or node_at(writer, wroot[0], path) is None:
        return None
    path = _numeric_leaf(writer, wroot[0], path)

    def press(node):
        branches = node if isinstance(node, list) else [node]
        for b in branches:
            kind = kind_of(writer.resolve(b))
            if kind in ("int", "long"):
                return ("value", int(value))
            if kind in ("float", "double"):
                return ("value", float(value))
        return NOTHING

    return generate(writer, wroot[0], rng, path.split(".") if path else [], press, tame=True)


# --- isolating one change --------------------------------------------------------------
# A file with several changes fails every datum on the first of them. To show the change
# a finding is about, the datum is also read with a hybrid reader: the writer schema with
# only that node taken from the reader schema.

def _expanded(side: Side, root: str) -> Any:
    fa = _fastavro()
    raw = side.raw
    if isinstance(raw, list):
        for branch in fa.schema.expand_schema(raw):
            if isinstance(branch, dict) and branch.get("name") == root:
                return branch
        return None
    return fa.schema.expand_schema(raw)


def _record_with(node: Any, seg: str, depth: int = 0):
    """The record reachable through unions, arrays and maps whose fields include ``seg``."""
    if depth > 8:
        return None
    if isinstance(node, list):
        for b in node:
            found = _record_with(b, seg, depth + 1)
            if found is not None:
                return found
        return None
    if not isinstance(node, dict):
        return None
    kind = node.get("type")
    if kind in ("record", "error"):
        if any(f["name"] == seg or seg in (f.get("aliases") or ()) for f in node["fields"]):
            return node
        return None
    if kind == "array":
        return _record_with(node["items"], seg, depth + 1)
    if kind == "map":
        return _record_with(node["values"], seg, depth + 1)
    return None


def _find(fields: list, name: str):
    for i, f in enumerate(fields):
        if f["name"] == name or name in (f.get("aliases") or ()):
            return i
    return None


def _dedupe(node: Any, seen: dict) -> Any:
    """Named types defined again become references, or renamed copies aliased to the name."""
    if isinstance(node, list):
        return [_dedupe(b, seen) for b in node]
    if not isinstance(node, dict) or node.get("type") not in NAMED or "name" not in node:
        if isinstance(node, dict):
            out = dict(node)
            for key in ("items", "values"):
                if key in out:
                    out[key] = _dedupe(out[key], seen)
            if isinstance(out.get("type"), (dict, list)):
                out["type"] = _dedupe(out["type"], seen)
            return out
        return node
    name = node["name"]
    if name in seen:
        if seen[name] == node:
            return name
        n = sum(1 for k in seen if k.startswith(name + "_v")) + 2
        renamed = {**node, "name": f"{name}_v{n}", "aliases": [*(node.get("aliases") or ()), name]}
        seen[renamed["name"]] = renamed
        node = renamed
    else:
        seen[name] = node
    out = dict(node)
    if "fields" in out:
        out["fields"] = [{**f, "type": _dedupe(f["type"], seen)} for f in out["fields"]]
    return out


def _unpaired(wrec: dict, rrec: dict | None) -> bool:
    """Whether both records hold fields the other cannot match by name or alias."""
    if rrec is None:
        return True
    w_only = [f for f in wrec["fields"] if _find(rrec["fields"], f["name"]) is None]
    r_only = [f for f in rrec["fields"] if _find(wrec["fields"], f["name"]) is None]
    return bool(w_only and r_only)


def isolate(finding, writer: Side, reader: Side) -> Side | None:
    """The writer schema with only the finding's node taken from the reader schema, or None."""
    import copy

    fa = _fastavro()
    try:
        w, r = _expanded(writer, finding.schema), _expanded(reader, finding.schema)
    except Exception:  # noqa: BLE001 - e.g. a recursive type
        return None
    if w is None or r is None:
        return None
    if not finding.path:
        hybrid = r
    else:
        hybrid = copy.deepcopy(w)
        wnode, rnode = hybrid, r
        segs = finding.path.split(".")
        for i, seg in enumerate(segs):
            wrec, rrec = _record_with(wnode, seg), _record_with(rnode, seg)
            if wrec is None and rrec is None:
                return None
            wi = _find(wrec["fields"], seg) if wrec is not None else None
            ri = _find(rrec["fields"], seg) if rrec is not None else None
            if i == len(segs) - 1:
                if wrec is None:
                    return None
                if (wi is None) != (ri is None) and _unpaired(wrec, rrec):
                    return None  # perhaps a rename: which field is its counterpart is unknown
                if wi is not None and ri is not None:
                    wrec["fields"][wi] = copy.deepcopy(rrec["fields"][ri])
                elif wi is not None:
                    del wrec["fields"][wi]
                elif ri is not None:
                    wrec["fields"].append(copy.deepcopy(rrec["fields"][ri]))
                break
            if wi is None or ri is None:
                return None
            wnode, rnode = wrec["fields"][wi]["type"], rrec["fields"][ri]["type"]
    try:
        hybrid = _dedupe(hybrid, {})
        names: dict = {}
        parsed = fa.parse_schema(hybrid, named_schemas=names)
        plain = fa.parse_schema(_strip_logical(hybrid), named_schemas={})
    except Exception:  # noqa: BLE001 - a hybrid fastavro will not take: no isolation
        return None
    return Side(reader.display, hybrid, parsed, plain, names)


def _numeric_leaf(side: Side, root: Any, path: str) -> str:
    """``path`` itself, or for a record (a unit on a type applies to its numbers) its first number field."""
    node = node_at(side, root, path)
    for b in node if isinstance(node, list) else [node]:
        b = side.resolve(b)
        if kind_of(b) in ("int", "long", "float", "double"):
            return path
    for b in node if isinstance(node, list) else [node]:
        b = side.resolve(b)
        if kind_of(b) in ("record", "error"):
            for f in b["fields"]:
                sub = f"{path}.{f['name']}" if path else f["name"]
                leaf = node_at(side, root, sub)
                if any(kind_of(side.resolve(x)) in ("int", "long", "float", "double")
                       for x in (leaf if isinstance(leaf, list) else [leaf])):
                    return sub
    return path
