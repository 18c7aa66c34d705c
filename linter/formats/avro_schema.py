"""Avro schemas as a graph of nodes: names resolved, defaults checked, positions kept.

fastavro's parser is the gate (a schema it rejects is rejected), but it accepts some
schemas the Avro specification 1.12.0 forbids (duplicate field names, unions holding
two schemas of one type, a fixed without a size raises a bare KeyError) and it drops
the positions evolint reports. So this module walks the parsed JSON itself, in the
spec's words, and raises ``InputError`` at the offending object.

Named types are shared: every reference to ``utility.metering.Site`` is the same
``Node``, so recursive types are cycles, not infinite trees.
"""
from __future__ import annotations

import math
from itertools import repeat
from dataclasses import dataclass, field
from typing import Any

from ..errors import InputError
from ..sourcemap import preorder as _containers

PRIMITIVES = ("null", "boolean", "int", "long", "float", "double", "bytes", "string")
NAMED = ("record", "error", "enum", "fixed")
# Avro names and symbols, [A-Za-z_][A-Za-z0-9_]* (specification 1.12.0, "Names"), are
# exactly the ASCII Python identifiers: the checks below use str.isascii() and
# str.isidentifier(), five times quicker than that pattern (benchmarks/scale.py).

# Logical types of the Avro specification 1.12.0, "Logical Types": the physical types
# each may annotate. Anything else is unknown and, as the spec says, falls back to the
# underlying type.
LOGICAL = {
    "decimal": ("bytes", "fixed"),
    "big-decimal": ("bytes",),
    "uuid": ("string", "fixed"),
    "date": ("int",),
    "time-millis": ("int",),
    "time-micros": ("long",),
    "timestamp-millis": ("long",),
    "timestamp-micros": ("long",),
    "timestamp-nanos": ("long",),
    "local-timestamp-millis": ("long",),
    "local-timestamp-micros": ("long",),
    "local-timestamp-nanos": ("long",),
    "duration": ("fixed",),
}
ORDERS = ("ascending", "descending", "ignore")
_NO_ANNOTATIONS: dict = {}  # shared and never written to
# The keys of a field whose Field may wait until its record is opened (Node.fields).
_NOTED = frozenset(("name", "type", "doc", "unit", "meaning"))
_MISSING = object()
INT_RANGE = {"int": (-2**31, 2**31 - 1), "long": (-2**63, 2**63 - 1)}


# Slots: a 100,000-field schema makes a Field per field, and instances without a
# __dict__ are smaller, quicker to build and half the objects for the collector.
@dataclass(eq=False, slots=True)
class Field:
    name: str
    type: "Node"
    position: int
    has_default: bool = False
    default: Any = None
    aliases: tuple[str, ...] = ()
    order: str = "ascending"
    doc: str | None = None
    annotations: dict = field(default_factory=dict)
    raw: Any = None


@dataclass(eq=False, slots=True, init=False)
class Node:
    kind: str                       # a primitive name, record, enum, fixed, array, map, union
    name: str | None = None         # full name of a named type
    aliases: tuple[str, ...] = ()   # full names
    logical: str | None = None      # a known, valid logical type, else None
    declared_logical: str | None = None  # what the file says, valid or not
    precision: int | None = None
    scale: int | None = None
    size: int | None = None
    symbols: tuple[str, ...] = ()
    enum_default: str | None = None
    items: "Node | None" = None     # array items, map values
    branches: list["Node"] = field(default_factory=list)
    doc: str | None = None
    annotations: dict = field(default_factory=dict)
    raw: Any = None
    # Records: whether the definition refers by name to a type defined outside it (then
    # an identical text may still read differently), and, where it does not, the range of
    # Model.defined its definition holds (itself first), when nothing in it was ignored
    # by the gate; a NEW schema reuses such a record of OLD's written the same.
    outside_refs: bool = True
    span: tuple[int, int] | None = None
    extent: int | None = None  # records: how many JSON containers the definition holds
    _by_name: Any = field(default=None, init=False, repr=False)
    # A record's fields, where the plainest ones (a name, a primitive type by name, and
    # strings for doc, unit and meaning) may still be their JSON objects: ``fields``
    # builds their Field on first use, with the parse's node of each primitive
    # (``_pending``). Most records of a large schema are shared or equal and never
    # opened, so most Fields were built for nothing.
    _fields: list = field(default_factory=list, init=False, repr=False)
    _pending: dict | None = field(default=None, init=False, repr=False)

    # Written out: the generated __init__ took twice as long, and a large schema makes a
    # node per record (benchmarks/scale.py).
    def __init__(self, kind: str, name: str | None = None, aliases: tuple[str, ...] = (), raw: Any = None,
                 annotations: dict | None = None, doc: str | None = None, items: "Node | None" = None,
                 branches: list | None = None, logical: str | None = None, declared_logical: str | None = None,
                 precision: int | None = None, scale: int | None = None, size: int | None = None,
                 symbols: tuple[str, ...] = (), enum_default: str | None = None, outside_refs: bool = True,
                 span: tuple[int, int] | None = None, extent: int | None = None):
        self.kind = kind
        self.name = name
        self.aliases = aliases
        self.raw = raw
        self.annotations = {} if annotations is None else annotations
        self.doc = doc
        self.items = items
        self.branches = [] if branches is None else branches
        self.logical = logical
        self.declared_logical = declared_logical
        self.precision = precision
        self.scale = scale
        self.size = size
        self.symbols = symbols
        self.enum_default = enum_default
        self.outside_refs = outside_refs
        self.span = span
        self.extent = extent
        self._by_name = None
        self._fields = []
        self._pending = None

    @property
    def fields(self) -> list[Field]:
        primitives = self._pending
        if primitives is not None:
            self._fields = [
                f if f.__class__ is Field else
                Field(f["name"], primitives[f["type"]], i, False, None, (), "ascending", f.get("doc"),
                      annotations_of(f), f)
                for i, f in enumerate(self._fields)]
            self._pending = None
        return self._fields

    @fields.setter
    def fields(self, value: list[Field]) -> None:
        self._fields, self._pending = value, None

    @property
    def short(self) -> str | None:
        return self.name.rsplit(".", 1)[-1] if self.name else None

    @property
    def named(self) -> bool:
        return self.kind in ("record", "enum", "fixed")

    def field(self, name: str) -> Field | None:
        # By name through an index: a linear scan per lookup made records of thousands of
        # fields quadratic (benchmarks/scale.py). Rebuilt whenever the field list has grown.
        index, fields = self._by_name, self.fields
        if index is None or index[0] != len(fields):
            index = (len(fields), {})
            for f in fields:
                index[1].setdefault(f.name, f)
            self._by_name = index
        return index[1].get(name)

    def describe(self) -> str:
        """A short text for messages: ``long``, ``array<int>``, ``record utility.leaks.Site``."""
        if self.named:
            return f"{self.kind} {self.name}"
        if self.kind == "array":
            return f"array<{self.items.describe()}>"
        if self.kind == "map":
            return f"map<{self.items.describe()}>"
        if self.kind == "union":
            return "[" + ", ".join(b.describe() for b in self.branches) + "]"
        if self.logical:
            return f"{self.kind} ({self.logical})"
        return self.kind


@dataclass
class Model:
    root: Node
    names: dict[str, Node]
    # Objects whose logicalType the spec says to ignore (unknown or invalid).
    ignored_logical: list = field(default_factory=list)
    # Named types in order of definition.
    defined: list = field(default_factory=list)
    # (OLD's object, this file's object) for each record shared with OLD: the nodes hold
    # OLD's objects, and a location asked for one is looked up at its twin here.
    adopted: list = field(default_factory=list)
    # The full name of each shared record, by the id of this file's object, and all the
    # names the shared records define (themselves first, then what they hold).
    shared: dict = field(default_factory=dict)
    shared_names: list = field(default_factory=list)
    # (container, key, record, full name) where each shared record sits in this file's
    # JSON, for those a container holds (all but a shared root).
    sites: list = field(default_factory=list)
    # The file's JSON containers in document preorder (None where not needed).
    preorder: list = field(default_factory=list)


def annotations_of(obj: dict) -> dict:
    """The unit and meaning attributes of a field or a named type (docs/avro.md)."""
    if "unit" not in obj and "meaning" not in obj:  # most fields: no new dict per lookup
        return _NO_ANNOTATIONS
    return {k: obj[k].strip() for k in ("unit", "meaning") if isinstance(obj.get(k), str)}


class _Parser:
    def __init__(self, display: str, locate, previous: Model | None = None):
        self.display = display
        self.locate = locate
        self.previous = previous
        self.defined: list[Node] = []
        self.adopted: list[tuple[dict, dict]] = []
        self.shared: dict[int, str] = {}
        self.shared_names: list[str] = []
        self.sites: list[tuple] = []
        # The JSON containers in document preorder, as the walk meets them: the source
        # map's own preorder walk then need not run (linter/sourcemap.py). The objects,
        # not their ids: an id is a new int per container. Each
        # container is entered once, and the values the walk does not read as types are
        # listed in their key order around the one it does (``around``).
        self.preorder: list = []
        self.names: dict[str, Node] = {}
        self.ignored_logical: list = []
        # A type named by a bare string ("long") has no attributes of its own: one shared
        # node per primitive, not one per field.
        self.primitives = {p: Node(kind=p) for p in PRIMITIVES}
        # Named types by order of definition, and for each record being parsed the lowest
        # such index it refers to by name: a record refers outside itself when that is
        # below its own (everything it defines comes after it).
        self.order: dict[int, int] = {}
        self.lows: list[int] = []
        self.valid_namespaces: set[str] = set()
        # Field names checked once: records of one schema repeat them (id, site, ...).
        self.valid_names: set[str] = set()

    def fail(self, message: str, obj=None):
        where = self.locate(obj) if isinstance(obj, (dict, list)) else None
        raise InputError(message, self.display, *(where or (None, None)))

    def full_name(self, name: str, namespace: str | None, obj) -> str:
        if not isinstance(name, str) or not name:
            self.fail("a named type needs a 'name' that is a non-empty string", obj)
        if "." in name:
            full, parts = name, name.split(".")
        elif namespace:
            # A namespace is checked once, not for every type it holds.
            full = f"{namespace}.{name}"
            parts = (name,) if namespace in self.valid_namespaces else full.split(".")
        else:
            full, parts = name, (name,)
        for part in parts:
            if not (part.isascii() and part.isidentifier()):
                self.fail(f"'{full}' is not a valid Avro name (letters, digits and '_', not starting with a digit)", obj)
        if namespace and "." not in name:
            self.valid_namespaces.add(namespace)
        return full

    def reference(self, name: str, namespace: str | None, where) -> Node:
        if name in PRIMITIVES:
            return self.primitives[name]
        candidates = [name] if "." in name else ([f"{namespace}.{name}"] if namespace else []) + [name]
        for candidate in candidates:
            if candidate in self.names:
                node = self.names[candidate]
                lows = self.lows
                if lows:
                    seq = self.order[id(node)]
                    if seq < lows[-1]:
                        lows[-1] = seq
                return node
        self.fail(f"unknown type name '{name}'" + (f" (looked for '{candidates[0]}')" if candidates[0] != name else ""), where)

    def parse(self, obj, namespace: str | None, where=None, key=None) -> Node:
        """The node of schema ``obj``, which sits at ``where[key]`` (``where`` also
        places errors; ``key`` is None where no container holds it)."""
        if obj.__class__ is dict:  # the usual case first: a record in a field
            kind = obj.get("type")
            if kind.__class__ is str and kind in NAMED:
                return self.named(obj, kind, namespace, where, key)
        elif isinstance(obj, str):
            return self.reference(obj, namespace, where)
        elif isinstance(obj, list):
            return self.union(obj, namespace)
        elif not isinstance(obj, dict):
            self.fail(f"a schema is a type name, an object or a union list, not {obj!r}", where)
        kind = obj.get("type")
        if isinstance(kind, (dict, list)):
            # {"type": {...}} or {"type": [...]}: a wrapper around a schema
            self.preorder.append(obj)
            return self.around(obj, "type", lambda: self.parse(kind, namespace, obj, "type"))
        if not isinstance(kind, str):
            self.fail("a schema object needs a 'type'", obj)
        if kind in NAMED:
            return self.named(obj, kind, namespace, where, key)
        self.preorder.append(obj)
        if kind in PRIMITIVES:
            node = Node(kind=kind, raw=obj)
            self.logical(node, obj)
            self.around(obj, None)
            return node
        if kind == "array":
            if "items" not in obj:
                self.fail("an array needs 'items'", obj)
            return Node(kind="array", items=self.around(obj, "items", lambda: self.parse(obj["items"], namespace, obj, "items")),
                        raw=obj)
        if kind == "map":
            if "values" not in obj:
                self.fail("a map needs 'values'", obj)
            return Node(kind="map", items=self.around(obj, "values", lambda: self.parse(obj["values"], namespace, obj, "values")),
                        raw=obj)
        node = self.reference(kind, namespace, obj)
        self.around(obj, None)
        return node

    def around(self, obj: dict, key, parse=None):
        """Parse ``obj[key]`` with ``parse``, listing the other values' containers in
        preorder before and after it, as their keys come."""
        result = None
        for k, value in obj.items():
            if k == key:
                result = parse()
            elif value.__class__ is dict or value.__class__ is list:
                self.preorder.extend(_containers(value))
        return result

    def union(self, items: list, namespace: str | None) -> Node:
        node = Node(kind="union", raw=items)
        self.preorder.append(items)
        seen: dict[str, int] = {}
        for i, item in enumerate(items):
            branch = self.parse(item, namespace, items, i)
            if branch.kind == "union":
                self.fail("a union may not immediately contain another union", items)
            key = branch.name if branch.named else branch.kind
            if key in seen:
                self.fail(f"union holds '{key}' twice (a union may hold one schema of each type, "
                          "named types once per name)", items)
            seen[key] = len(node.branches)
            node.branches.append(branch)
        if not node.branches:
            self.fail("an empty union has no values", items)
        return node

    def named(self, obj: dict, kind: str, namespace: str | None, where=None, key=None) -> Node:
        preorder = self.preorder
        start = len(preorder)
        preorder.append(obj)
        # A type, a name and fields alone (once the name is read: most nested records)
        # hold no namespace, aliases, doc, annotations or other values to read.
        bare = kind == "record" and len(obj) == 3 and "fields" in obj
        if not bare:
            kind = "record" if kind == "error" else kind
            ns_attr = obj.get("namespace")
            if ns_attr is not None and not isinstance(ns_attr, str):
                self.fail("'namespace' must be a string", obj)
            if isinstance(ns_attr, str):
                namespace = ns_attr or None
        name = obj.get("name")
        # The usual name: an identifier (so no dot) in a namespace already checked.
        if name.__class__ is str and namespace in self.valid_namespaces and name.isascii() and name.isidentifier():
            full, own_ns = f"{namespace}.{name}", namespace
        else:
            full = self.full_name(name, namespace, obj)
            own_ns = full.rsplit(".", 1)[0] if "." in full else None
        if full in self.names or full in PRIMITIVES:
            self.fail(f"type '{full}' is defined twice", obj)
        if kind == "record" and self.previous is not None:
            adopted = self.adopt(full, obj, where, key)
            if adopted is not None:
                # Its containers are never located in this file (the nodes hold OLD's
                # objects): only their number counts, unless a twin is asked for.
                preorder.extend(repeat(None, adopted.extent - 1))
                return adopted
        if bare:
            node = Node(kind, full, (), obj, _NO_ANNOTATIONS)
        else:
            aliases = obj.get("aliases", _MISSING)
            if aliases is _MISSING:
                aliases = ()
            elif isinstance(aliases, list) and all(isinstance(a, str) for a in aliases):
                aliases = tuple(self.full_name(a, own_ns, obj) for a in aliases)
            else:
                self.fail(f"aliases of '{full}' must be a list of names", obj)
            doc = obj.get("doc")
            node = Node(kind, full, aliases, obj, annotations_of(obj), doc if doc.__class__ is str else None)
        self.names[full] = node  # before the body: a record may refer to itself
        seq = self.order[id(node)] = len(self.order)
        self.defined.append(node)
        if kind == "record":
            if "fields" not in obj:
                self.fail(f"record '{node.name}' needs a 'fields' list", obj)
            lows = self.lows
            lows.append(seq)
            ignored = len(self.ignored_logical)
            if bare:
                self.record_fields(node, obj, own_ns)
            else:
                # The fields, and in key order around them any other value's containers
                # (``around``, written out: this runs once per record of both files).
                for k, value in obj.items():
                    if k == "fields":
                        self.record_fields(node, obj, own_ns)
                    elif value.__class__ is dict or value.__class__ is list:
                        preorder.extend(_containers(value))
            low = lows.pop()
            node.extent = len(preorder) - start
            if low < seq:
                node.outside_refs = True
                if lows and low < lows[-1]:
                    lows[-1] = low
            else:
                node.outside_refs = False
                if len(self.ignored_logical) == ignored:
                    node.span = (seq, len(self.defined))
        elif kind == "enum":
            self.enum(node, obj)
            self.around(obj, None)
        else:
            size = obj.get("size")
            if not isinstance(size, int) or isinstance(size, bool) or size < 0:
                self.fail(f"fixed '{full}' needs a 'size' that is a non-negative integer", obj)
            node.size = size
            self.logical(node, obj)
            self.around(obj, None)
        return node

    def adopt(self, full: str, obj: dict, where, key) -> Node | None:
        """OLD's record ``full``, when it is written exactly as ``obj`` and self-contained.

        It then parses to the same graph, so NEW shares OLD's nodes instead of walking its
        fields again (most records of a large schema are unchanged; benchmarks/scale.py).
        Where one of the names it defines is already taken, nothing is shared: the walk
        then reports the clash where it is.
        """
        before = self.previous.names.get(full)
        if before is None or before.span is None or before.raw != obj:
            return None
        held = self.previous.defined[before.span[0]:before.span[1]]
        names = self.names
        for n in held:  # usually the record alone: a loop, not a generator
            if n.name in names:
                return None
        self.adopted.append((before.raw, obj))
        self.shared[id(obj)] = full
        if key is not None:
            self.sites.append((where, key, obj, full))
        for n in held:
            self.shared_names.append(n.name)
            self.names[n.name] = n
            self.order[id(n)] = len(self.order)
            self.defined.append(n)
        return before

    def record_fields(self, node: Node, obj: dict, namespace: str | None):
        fields = obj.get("fields")
        if not isinstance(fields, list):
            self.fail(f"record '{node.name}' needs a 'fields' list", obj)
        # The common field ({"name", "type": "long", "doc"}) takes the short way through
        # each check: this loop runs once per field of both files (benchmarks/scale.py).
        seen = set()
        out = node._fields
        plain = False
        primitives = self.primitives
        preorder = self.preorder
        preorder.append(fields)
        valid = self.valid_names
        for raw in fields:
            if raw.__class__ is not dict:  # what json.loads gives: no subclasses
                self.fail(f"a field of record '{node.name}' must be an object", fields)
            preorder.append(raw)
            try:
                name = raw["name"]
                ftype = raw["type"]
            except KeyError:
                name, ftype = raw.get("name"), raw.get("type", _MISSING)
            if name.__class__ is not str or name not in valid:
                if not isinstance(name, str) or not (name.isascii() and name.isidentifier()):
                    self.fail(f"field name {name!r} of record '{node.name}' is not a valid Avro name", raw)
                valid.add(name)
            seen.add(name)  # two fields of one name: the count below falls short
            if ftype is _MISSING:
                self.fail(f"field '{name}' needs a 'type'", raw)
            size = len(raw)
            if size == 2:
                doc = None
            elif size != 3 or (doc := raw.get("doc")).__class__ is not str:
                # A primitive field with a unit or meaning and strings alone (no
                # container to list) waits for Node.fields too: the annotated fields
                # of a large schema are seldom opened either.
                if ftype.__class__ is str and ftype in primitives and raw.keys() <= _NOTED:
                    for value in raw.values():
                        if value.__class__ is not str:
                            break
                    else:
                        out.append(raw)
                        plain = True
                        continue
                self.attributed_field(raw, name, ftype, len(out), namespace, out)
                continue
            # Nothing but a name, a type and a doc: no aliases, order, default or
            # annotations to check or copy, and no container but the type's. With a
            # primitive type, its Field waits until the record is opened (Node.fields).
            if ftype.__class__ is str and ftype in primitives:
                out.append(raw)
                plain = True
            else:
                out.append(Field(name, self.parse(ftype, namespace, raw, "type"), len(out), False, None, (),
                                 "ascending", doc, _NO_ANNOTATIONS, raw))
        if len(seen) != len(out):  # a name met twice: refused at its second field
            met = set()
            for raw in fields:
                if raw["name"] in met:
                    self.fail(f"record '{node.name}' has two fields named '{raw['name']}'", raw)
                met.add(raw["name"])
        if plain:
            node._pending = primitives

    def attributed_field(self, raw: dict, name: str, ftype, position: int, namespace: str | None, out: list) -> None:
        """A field with more than a name, a type and a doc (aliases, order, a default,
        annotations or other attributes)."""
        aliases = raw.get("aliases", ())
        if aliases:
            if not isinstance(aliases, list) or not all(isinstance(a, str) for a in aliases):
                self.fail(f"aliases of field '{name}' must be a list of names", raw)
            aliases = tuple(aliases)
        elif aliases != [] and aliases != ():
            self.fail(f"aliases of field '{name}' must be a list of names", raw)
        else:
            aliases = ()
        order = raw.get("order", "ascending")
        if order not in ORDERS:
            self.fail(f"field '{name}' order must be ascending, descending or ignore, not {order!r}", raw)
        primitives = self.primitives
        if isinstance(ftype, str) and ftype in primitives:
            ftype = primitives[ftype]
            self.around(raw, None)
        else:
            ftype = self.around(raw, "type", lambda: self.parse(ftype, namespace, raw, "type"))
        has_default = "default" in raw
        doc = raw.get("doc")
        f = Field(name, ftype, position, has_default, raw.get("default"), aliases, order,
                  doc if isinstance(doc, str) else None, annotations_of(raw), raw)
        out.append(f)
        if has_default:
            problem = default_problem(ftype, f.default)
            if problem:
                self.fail(f"field '{name}' default {_show(f.default)} {problem}", raw)

    def enum(self, node: Node, obj: dict):
        symbols = obj.get("symbols")
        if not isinstance(symbols, list) or not all(isinstance(s, str) for s in symbols):
            self.fail(f"enum '{node.name}' needs a 'symbols' list of strings", obj)
        for s in symbols:
            if not (s.isascii() and s.isidentifier()):
                self.fail(f"enum '{node.name}' symbol '{s}' is not a valid Avro name", obj)
        if len(set(symbols)) != len(symbols):
            dup = next(s for s in symbols if symbols.count(s) > 1)
            self.fail(f"enum '{node.name}' lists symbol '{dup}' twice", obj)
        node.symbols = tuple(symbols)
        if "default" in obj:
            if obj["default"] not in symbols:
                self.fail(f"enum '{node.name}' default {_show(obj['default'])} is not one of its symbols", obj)
            node.enum_default = obj["default"]

    def logical(self, node: Node, obj: dict):
        name = obj.get("logicalType")
        if not isinstance(name, str):
            return
        node.declared_logical = name
        self.ignored_logical.append(obj)  # until shown valid below
        if node.kind not in LOGICAL.get(name, ()):
            return  # unknown, or on a type it cannot annotate: the underlying type counts
        if name == "decimal":
            precision, scale = obj.get("precision"), obj.get("scale", 0)
            if not (_int(precision) and _int(scale) and precision > 0 and 0 <= scale <= precision):
                return
            if node.kind == "fixed" and precision > _max_precision(node.size):
                return
            node.precision, node.scale = precision, scale
        if name == "uuid" and node.kind == "fixed" and node.size != 16:
            return
        if name == "duration" and node.size != 12:
            return
        node.logical = name
        self.ignored_logical.pop()


def _max_precision(size: int) -> int:
    # The spec's bound for a decimal in a fixed of ``size`` bytes.
    return math.floor(math.log10(2 ** (8 * size - 1) - 1)) if size else 0


def _int(v) -> bool:
    return isinstance(v, int) and not isinstance(v, bool)


def _show(value) -> str:
    import json

    return json.dumps(value) if not isinstance(value, str) else f"'{value}'"


def default_problem(node: Node, value, _stack=()) -> str | None:
    """Why ``value`` is not a valid default for ``node`` (Avro specification 1.12.0,
    "Complex Types", record field defaults), or None when it is."""
    if node.kind == "union":
        # 1.12.0: a union default may match any branch; the first that matches is used.
        if any(default_problem(b, value, _stack) is None for b in node.branches):
            return None
        return f"matches no branch of {node.describe()}"
    what = f"is not a {node.describe()}"
    k = node.kind
    if k == "null":
        return None if value is None else what
    if k == "boolean":
        return None if isinstance(value, bool) else what
    if k in INT_RANGE:
        lo, hi = INT_RANGE[k]
        return None if _int(value) and lo <= value <= hi else what
    if k in ("float", "double"):
        ok = (isinstance(value, (int, float)) and not isinstance(value, bool)) or value in ("NaN", "Infinity", "-Infinity")
        return None if ok else what
    if k == "string":
        return None if isinstance(value, str) else what
    if k in ("bytes", "fixed"):
        if not isinstance(value, str) or any(ord(c) > 255 for c in value):
            return f"{what} (bytes defaults are strings of code points 0-255)"
        if k == "fixed" and len(value) != node.size:
            return f"is {len(value)} bytes long, fixed {node.name} holds {node.size}"
        return None
    if k == "enum":
        return None if value in node.symbols else f"is not a symbol of enum {node.name}"
    if k == "array":
        if not isinstance(value, list):
            return what
        return next((p for p in (default_problem(node.items, v, _stack) for v in value) if p), None)
    if k == "map":
        if not isinstance(value, dict):
            return what
        return next((p for p in (default_problem(node.items, v, _stack) for v in value.values()) if p), None)
    if k == "record":
        if not isinstance(value, dict):
            return what
        if id(node) in _stack:
            return None
        for f in node.fields:
            if f.name in value:
                problem = default_problem(f.type, value[f.name], (*_stack, id(node)))
                if problem:
                    return f"member '{f.name}' {problem}"
            elif not f.has_default:
                return f"lacks member '{f.name}', which has no default"
        return None
    return what


def default_branch(node: Node, value) -> Node:
    """The schema a default value is read as: the first union branch it matches."""
    if node.kind == "union":
        return next((b for b in node.branches if default_problem(b, value) is None), node.branches[0])
    return node


def parse(data, display: str, locate, previous: Model | None = None) -> Model:
    """The node graph of ``data``; with ``previous`` (OLD's model, when this is NEW),
    records written the same in both are shared rather than built twice."""
    parser = _Parser(display, locate, previous)
    root = parser.parse(data, None, data if isinstance(data, (dict, list)) else None)
    return Model(root=root, names=parser.names, ignored_logical=parser.ignored_logical,
                 defined=parser.defined, adopted=parser.adopted, shared=parser.shared,
                 shared_names=parser.shared_names, sites=parser.sites,
                 preorder=parser.preorder)
