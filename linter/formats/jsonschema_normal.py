"""The normal form of a JSON Schema node, one per draft spelling, for the inclusion analysis.

``normalise(node)`` reads one schema object (references followed) into a ``Norm``:
boolean schemas, type arrays, ``integer`` inside ``number``, ``const`` as a one-value
``enum``, both spellings of exclusive bounds, draft-07 ``dependencies`` and array-form
``items`` all become one shape, so that the comparison functions see a single vocabulary.
Subschemas stay ``Node``s (value, resolver, pointer) and are normalised when compared.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from ..errors import InputError

TYPES = frozenset({"null", "boolean", "object", "array", "string", "number", "integer"})
ALL = frozenset(TYPES - {"integer"})  # number covers integer
LEGACY = ("draft-04", "draft-06", "draft-07")
# Keywords with no effect on which instances are valid (compared, if at all, as annotations).
ANNOTATIONS = frozenset({
    "title", "description", "examples", "$comment", "deprecated", "readOnly", "writeOnly",
    "$defs", "definitions", "$id", "id", "$schema", "$anchor", "$dynamicAnchor", "$recursiveAnchor",
    "$vocabulary", "default", "format", "contentEncoding", "contentMediaType", "contentSchema",
})
REF_KEYS = ("$ref", "$dynamicRef", "$recursiveRef")
MAX_FIELDS = 100_000  # a schema whose recursion unfolds into more paths lists only these


@dataclass(frozen=True, eq=False)
class Node:
    value: Any          # a dict or a bool
    resolver: Any       # referencing.Resolver with this node's base URI
    pointer: str        # JSON Pointer of the node inside its document
    doc: Any            # jsonschema.Doc (sourcemap None for a bundled metaschema)
    draft: str
    origin: Any = None  # the object in the text, where ``value`` was built by merging

    @property
    def key(self):
        return (id(self.value), str(self.resolver._base_uri))

    def child(self, *keys) -> "Node":
        value = self.value
        pointer = self.pointer
        for k in keys:
            value = value[k]
            pointer += "/" + str(k).replace("~", "~0").replace("/", "~1")
        resolver = self.resolver
        if isinstance(value, dict):
            from .jsonschema import specification

            resolver = resolver.in_subresource(specification(self.draft).create_resource(value))
        return Node(value, resolver, pointer, self.doc, self.draft)

    def location(self):
        from ..model import Location

        if self.doc.sourcemap is None:
            return Location(self.doc.display)
        value = self.value if self.origin is None else self.origin
        where = self.doc.sourcemap.locate(value) if isinstance(value, dict) else None
        return Location(self.doc.display, *(where or (None, None)))


@dataclass(frozen=True)
class Bound:
    value: Fraction
    exclusive: bool

    def __str__(self):
        text = str(self.value) if self.value.denominator != 1 else str(self.value.numerator)
        return ("> " if self.exclusive else ">= ") + text


@dataclass
class Norm:
    node: Node
    types: frozenset = ALL
    enum: tuple | None = None
    lower: Bound | None = None
    upper: Bound | None = None
    multiple_of: Fraction | None = None
    min_length: int = 0
    max_length: int | None = None
    pattern: str | None = None
    min_items: int = 0
    max_items: int | None = None
    unique_items: bool = False
    prefix: list = field(default_factory=list)        # [(Node, keyword pointer)]
    items: Any = None                                 # (Node, keyword pointer) or None
    contains: Any = None
    min_contains: int = 1
    max_contains: int | None = None
    properties: dict = field(default_factory=dict)
    pattern_properties: dict = field(default_factory=dict)
    additional_properties: Any = None
    required: frozenset = frozenset()
    property_names: Any = None
    min_properties: int = 0
    max_properties: int | None = None
    dependent_required: dict = field(default_factory=dict)
    dependent_schemas: dict = field(default_factory=dict)
    unevaluated_properties: Any = None
    unevaluated_items: Any = None
    all_of: list = field(default_factory=list)
    any_of: list | None = None
    one_of: list | None = None
    not_: Any = None
    if_: Any = None
    then: Any = None
    else_: Any = None
    remote: tuple = ()        # references not followed (http/https)
    annotations: dict = field(default_factory=dict)

    @property
    def is_false(self) -> bool:
        return not self.types or self.enum == ()

    @property
    def is_true(self) -> bool:
        v = self.node.value
        return v is True or (isinstance(v, dict) and not self.assertion_keys and not self.all_of)

    @property
    def assertion_keys(self) -> set:
        v = self.node.value
        return {k for k in v if k not in ANNOTATIONS and not k.startswith("x-")} if isinstance(v, dict) else set()

    @property
    def applicators(self) -> bool:
        """In-place applicators, which make unevaluated* depend on more than this object."""
        return bool(self.all_of or self.any_of or self.one_of or self.not_ or self.if_
                    or self.dependent_schemas)


def number(value) -> Fraction:
    """Exact value of a JSON number as written (0.1 is one tenth, not the nearest double)."""
    if isinstance(value, bool):
        raise TypeError(value)
    return Fraction(str(value)) if isinstance(value, float) else Fraction(value)


def canonical(value):
    """A hashable key under JSON Schema equality: 1 == 1.0, true != 1, key order ignored."""
    if isinstance(value, bool) or value is None:
        return ("b", value)
    if isinstance(value, (int, float)):
        return ("n", number(value)) if math.isfinite(value) else ("n", value)
    if isinstance(value, str):
        return ("s", value)
    if isinstance(value, list):
        return ("a", tuple(canonical(v) for v in value))
    if isinstance(value, dict):
        return ("o", tuple(sorted((k, canonical(v)) for k, v in value.items())))
    return ("?", repr(value))


class Unresolved(Exception):
    pass


def resolve(node: Node, ref_key: str, ref: str):
    """Follow one reference from ``node``; returns a Node, or raises Unresolved(uri) for remote."""
    from referencing.exceptions import Unresolvable

    try:
        if ref_key == "$recursiveRef":
            import referencing.jsonschema as rj

            resolved = rj.lookup_recursive_ref(node.resolver)
        else:
            resolved = node.resolver.lookup(ref)
    except Unresolvable as exc:
        from .jsonschema import RemoteReference

        cause = exc.__cause__
        while cause is not None and not isinstance(cause, (RemoteReference, InputError)):
            cause = cause.__cause__
        if isinstance(cause, RemoteReference):
            raise Unresolved(str(cause)) from None
        where = node.location()
        if isinstance(cause, InputError):
            raise InputError(f"{ref_key} {ref!r}: {cause.message}", cause.file or (where and where.file),
                             cause.line if cause.file else (where and where.line),
                             cause.column if cause.file else (where and where.column)) from None
        raise InputError(f"{ref_key} {ref!r} does not resolve ({type(exc).__name__})",
                         where and where.file, where and where.line, where and where.column) from None
    contents = resolved.contents
    index = node.doc.index
    if id(contents) in index:
        doc, pointer = index[id(contents)]
    else:  # a bundled metaschema: no file, no line numbers
        from .jsonschema import Doc

        base = str(resolved.resolver._base_uri)
        doc = index.setdefault(("bundled", base), Doc(base, base, contents, None, index))
        pointer = "#" + ref.partition("#")[2]
    resolver = resolved.resolver
    if isinstance(contents, dict):
        from .jsonschema import specification

        resolver = resolver.in_subresource(specification(node.draft).create_resource(contents))
    return Node(contents, resolver, pointer, doc, node.draft)


NOTES = ("default", "format", "contentEncoding", "contentMediaType", "contentSchema", "x-unit", "x-meaning")


_BUSY = object()  # a cache entry being computed: meeting it again is a cycle


def deref(node: Node, notes: dict | None = None) -> tuple[Node, list, tuple]:
    """Follow a chain of references (cached per node). Returns (node, [conjunct Nodes], remote URIs).

    In draft-04/06/07 a ``$ref`` replaces its siblings; from 2019-09 on it applies
    beside them, so assertion siblings make the referenced schema a conjunct. ``notes``
    receives the annotations met on the way (the referring node's win).
    """
    cache = node.doc.derefs
    entry = cache.get(node.key)
    if entry is _BUSY:
        where = node.location()
        raise InputError("reference cycle with no base case (references that only lead to each other)",
                         where and where.file, where and where.line, where and where.column)
    if entry is None:
        cache[node.key] = _BUSY
        try:
            found: dict = {}
            try:
                entry = (*_hop(node, found), found, node.value)  # keep value alive: ids stay unique
            except RecursionError:
                where = node.location()
                raise InputError("reference chain too long to follow", where and where.file,
                                 where and where.line, where and where.column) from None
        finally:
            if cache.get(node.key) is _BUSY:
                del cache[node.key]
        cache[node.key] = entry
    target, conjuncts, remote, found, _ = entry
    if notes is not None:
        for k, v in found.items():
            notes.setdefault(k, v)
    return target, list(conjuncts), remote


def _hop(node: Node, notes: dict) -> tuple[Node, list, tuple]:
    """One reference of ``node``, then the rest of the chain through the cache."""
    value = node.value
    if not isinstance(value, dict):
        return node, [], ()
    ref_key = next((k for k in REF_KEYS if isinstance(value.get(k), str)), None)
    if ref_key is None:
        return node, [], ()
    for k in NOTES:  # the referring node's annotations win over the target's
        if k in value:
            notes.setdefault(k, value[k])
    remote: tuple = ()
    try:
        target = resolve(node, ref_key, value[ref_key])
    except Unresolved as exc:
        remote, target = (str(exc),), None
    siblings = {k for k in value if k not in REF_KEYS and k not in ANNOTATIONS and not k.startswith("x-")}
    if node.draft in LEGACY or not siblings:
        if target is None:
            return Node(True, node.resolver, node.pointer, node.doc, node.draft), [], remote
        end, conjuncts, more = deref(target, notes)
        return end, conjuncts, remote + more
    return node, ([target] if target is not None else []), remote


def _bound(value, exclusive_value, legacy_flag, lower: bool) -> Bound | None:
    bounds = []
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        bounds.append(Bound(number(value), bool(legacy_flag is True)))
    if isinstance(exclusive_value, (int, float)) and not isinstance(exclusive_value, bool):
        bounds.append(Bound(number(exclusive_value), True))
    if not bounds:
        return None
    # the tighter of the two
    key = (lambda b: (b.value, b.exclusive)) if lower else (lambda b: (-b.value, b.exclusive))
    return max(bounds, key=key)


def _integer_bound(bound: Bound | None, lower: bool) -> Bound | None:
    """On integers, an exclusive or fractional bound is an inclusive whole one."""
    if bound is None:
        return None
    v = bound.value
    if lower:
        whole = math.floor(v) + 1 if bound.exclusive else math.ceil(v)
    else:
        whole = math.ceil(v) - 1 if bound.exclusive else math.floor(v)
    return Bound(Fraction(whole), False)


def _types(value) -> frozenset:
    raw = value if isinstance(value, list) else [value]
    types = frozenset(t for t in raw if t in TYPES)
    if "number" in types:
        types = types - {"integer"}
    return types


# Keywords that only mean something together (additionalProperties depends on properties).
GROUPS = (frozenset({"properties", "patternProperties", "additionalProperties"}),
          frozenset({"prefixItems", "items", "additionalItems"}),
          frozenset({"contains", "minContains", "maxContains"}),
          frozenset({"if", "then", "else"}),
          frozenset({"minimum", "exclusiveMinimum", "maximum", "exclusiveMaximum"}))
NEVER_MERGED = frozenset({"unevaluatedProperties", "unevaluatedItems", "$id", "id", *REF_KEYS})


def _merged(node: Node, target: Node) -> Node | None:
    """``{$ref: T, ...siblings}`` as one schema object, when that is exactly the conjunction:
    disjoint keywords, no group split across the two, one base URI. Cached per document so
    that a recursive schema meets the same merged object again (and terminates)."""
    own = {k: v for k, v in node.value.items() if k not in REF_KEYS}
    theirs = target.value
    if not isinstance(theirs, dict) or target.draft != node.draft:
        return None
    if str(target.resolver._base_uri) != str(node.resolver._base_uri):
        return None
    mine, other = set(own) - ANNOTATIONS, set(theirs) - ANNOTATIONS
    if mine & other or (mine | other) & NEVER_MERGED:
        return None
    if any(mine & g and other & g for g in GROUPS):
        return None
    cache = node.doc.merged
    key = (id(node.value), id(theirs))
    if key not in cache:
        cache[key] = ({**theirs, **own}, node.value, theirs)  # keep the parts alive with the result
    return Node(cache[key][0], node.resolver, node.pointer, node.doc, node.draft, origin=node.value)


def _check_pattern(pattern: str, node: Node) -> None:
    """A pattern that does not compile is bad input (the metaschema's "format": "regex" is only
    an annotation there), not a constraint to compare."""
    import re

    try:
        re.compile(pattern)
    except re.error as exc:
        where = node.location()
        raise InputError(f"pattern {pattern!r} is not a regular expression: {exc.msg}",
                         where.file, where.line, where.column) from None


def normalise(node: Node) -> Norm:
    notes: dict = {}
    node, conjuncts, remote = deref(node, notes)
    if len(conjuncts) == 1:
        merged = _merged(node, conjuncts[0])
        if merged is not None:
            node, conjuncts = merged, []
    value = node.value
    if value is True or value is False:
        return Norm(node=node, types=ALL if value else frozenset(), all_of=conjuncts, remote=remote,
                    annotations=notes)
    n = Norm(node=node, all_of=list(conjuncts), remote=remote)
    draft = node.draft
    legacy = draft in LEGACY
    get = value.get

    def sub(*keys):
        return node.child(*keys)

    if "type" in value:
        n.types = _types(value["type"])
    if "enum" in value and isinstance(value["enum"], list):
        n.enum = tuple(value["enum"])
    if "const" in value and draft != "draft-04":
        const = value["const"]
        if n.enum is None:
            n.enum = (const,)
        else:
            n.enum = tuple(v for v in n.enum if canonical(v) == canonical(const))
    draft4 = draft == "draft-04"
    n.lower = _bound(get("minimum"), None if draft4 else get("exclusiveMinimum"),
                     get("exclusiveMinimum") if draft4 else None, True)
    n.upper = _bound(get("maximum"), None if draft4 else get("exclusiveMaximum"),
                     get("exclusiveMaximum") if draft4 else None, False)
    if n.types and n.types <= {"integer"}:
        n.lower, n.upper = _integer_bound(n.lower, True), _integer_bound(n.upper, False)
    if isinstance(get("multipleOf"), (int, float)):
        n.multiple_of = number(get("multipleOf"))
    n.min_length = get("minLength", 0)
    n.max_length = get("maxLength")
    n.pattern = get("pattern")
    if isinstance(n.pattern, str):
        _check_pattern(n.pattern, node)
    n.min_items = get("minItems", 0)
    n.max_items = get("maxItems")
    n.unique_items = get("uniqueItems", False) is True
    items = get("items")
    if isinstance(items, list):  # array form: draft-04..2019-09
        n.prefix = [(sub("items", i), f"/items/{i}") for i in range(len(items))]
        if "additionalItems" in value:
            n.items = (sub("additionalItems"), "/additionalItems")
    else:
        if "prefixItems" in value and draft == "2020-12":
            n.prefix = [(sub("prefixItems", i), f"/prefixItems/{i}") for i in range(len(get("prefixItems")))]
        if "items" in value:
            n.items = (sub("items"), "/items")
    if "contains" in value and draft != "draft-04":
        n.contains = (sub("contains"), "/contains")
        if draft in ("2019-09", "2020-12"):
            n.min_contains = get("minContains", 1)
            n.max_contains = get("maxContains")
    n.properties = {k: (sub("properties", k), "/properties/" + k) for k in get("properties", {})}
    n.pattern_properties = {k: (sub("patternProperties", k), "/patternProperties/" + k)
                            for k in get("patternProperties", {})}
    if "additionalProperties" in value:
        n.additional_properties = (sub("additionalProperties"), "/additionalProperties")
    n.required = frozenset(get("required", ()))
    if "propertyNames" in value and draft != "draft-04":
        n.property_names = (sub("propertyNames"), "/propertyNames")
    n.min_properties = get("minProperties", 0)
    n.max_properties = get("maxProperties")
    if legacy or draft == "2019-09":
        for k, dep in (get("dependencies") or {}).items() if legacy else ():
            if isinstance(dep, list):
                n.dependent_required[k] = frozenset(dep)
            else:
                n.dependent_schemas[k] = (sub("dependencies", k), "/dependencies/" + k)
    if not legacy:
        for k, dep in (get("dependentRequired") or {}).items():
            n.dependent_required[k] = frozenset(dep)
        for k in get("dependentSchemas") or {}:
            n.dependent_schemas[k] = (sub("dependentSchemas", k), "/dependentSchemas/" + k)
        if "unevaluatedProperties" in value:
            n.unevaluated_properties = (sub("unevaluatedProperties"), "/unevaluatedProperties")
        if "unevaluatedItems" in value:
            n.unevaluated_items = (sub("unevaluatedItems"), "/unevaluatedItems")
    n.all_of += [sub("allOf", i) for i in range(len(get("allOf", ())))]
    if "anyOf" in value:
        n.any_of = [sub("anyOf", i) for i in range(len(value["anyOf"]))]
    if "oneOf" in value:
        n.one_of = [sub("oneOf", i) for i in range(len(value["oneOf"]))]
    if "not" in value:
        n.not_ = (sub("not"), "/not")
    if "if" in value and draft != "draft-04" and draft != "draft-06":
        n.if_ = (sub("if"), "/if")
        if "then" in value:
            n.then = (sub("then"), "/then")
        if "else" in value:
            n.else_ = (sub("else"), "/else")
    n.annotations = {**{k: value[k] for k in NOTES if k in value}, **notes}
    # Without in-place applicators, unevaluated* sees exactly what additional* would.
    if n.unevaluated_properties and not n.applicators and n.additional_properties is None:
        n.additional_properties, n.unevaluated_properties = n.unevaluated_properties, None
    if n.unevaluated_items and not n.applicators and n.items is None and n.contains is None:
        n.items, n.unevaluated_items = n.unevaluated_items, None
    return n


# Keywords whose values are subschemas, per shape, for walking a whole document.
ONE = ("additionalProperties", "propertyNames", "contains", "not", "if", "then", "else",
       "unevaluatedProperties", "unevaluatedItems", "additionalItems", "contentSchema", "items")
MANY = ("allOf", "anyOf", "oneOf", "prefixItems", "items")
NAMED = ("properties", "patternProperties", "$defs", "definitions", "dependentSchemas", "dependencies")


def subschemas(node: Node):
    value = node.value
    if not isinstance(value, dict):
        return
    for k in ONE:
        if isinstance(value.get(k), (dict, bool)):
            yield node.child(k)
    for k in MANY:
        if isinstance(value.get(k), list):
            for i, v in enumerate(value[k]):
                if isinstance(v, (dict, bool)):
                    yield node.child(k, i)
    for k in NAMED:
        if isinstance(value.get(k), dict):
            for name, v in value[k].items():
                if isinstance(v, (dict, bool)):
                    yield node.child(k, name)


def check_references(loaded) -> None:
    """Resolve every reference of the document once, so that a broken one is bad input
    (exit 2) wherever it sits, and a cycle with no base case is found before comparing."""
    stack = [loaded.root]
    seen = set()
    while stack:
        node = stack.pop()
        if node.key in seen:
            continue
        seen.add(node.key)
        value = node.value
        if isinstance(value, dict) and any(isinstance(value.get(k), str) for k in REF_KEYS):
            target, conjuncts, _ = deref(node)
            stack.extend([target, *conjuncts])
        stack.extend(subschemas(node))


def field_paths(loaded) -> set[str]:
    """Dotted property paths the document declares (arrays and combinators transparent)."""
    paths: set[str] = set()
    stack = [(loaded.root, "", frozenset())]
    while stack:
        node, prefix, onpath = stack.pop()
        try:
            n = normalise(node)
        except InputError:
            continue
        if n.node.key in onpath or len(paths) > MAX_FIELDS:
            continue
        onpath = onpath | {n.node.key}
        for name, (child, _) in n.properties.items():
            path = f"{prefix}.{name}" if prefix else name
            paths.add(path)
            stack.append((child, path, onpath))
        children = [c for c, _ in n.prefix] + [x[0] for x in (n.items, n.additional_properties, n.then, n.else_)
                                                if x]
        children += n.all_of + (n.any_of or []) + (n.one_of or [])
        children += [c for c, _ in n.dependent_schemas.values()]
        stack.extend((c, prefix, onpath) for c in children)
    return paths
