"""Inclusion analysis of two JSON Schemas: is every instance valid under OLD valid under NEW?

The instance set of a schema is an intersection of per-keyword constraints (per type), so
OLD is included in NEW when every keyword of OLD is included in its counterpart in NEW.
Each comparison function below looks at one keyword (or one keyword group that only
means something together, like properties / patternProperties / additionalProperties)
and yields a change whose kind says which way it moved: a kind marked backward in the
catalogue is a true inclusion of that keyword, so a run with only backward kinds proves
OLD included in NEW. Where a keyword is not monotone (``not``, ``if``, overlapping
``oneOf``) or cannot be decided (two different regular expressions), the change is an
undecided kind, never a guessed verdict.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from ..model import Change, Location
from .jsonschema_normal import ALL, Norm, Node, canonical, normalise

KINDS = frozenset({
    "jsonschema-draft-assumed", "jsonschema-draft-changed", "jsonschema-id-changed",
    "jsonschema-remote-reference-not-followed", "jsonschema-remote-reference-unchanged",
    "jsonschema-type-widened", "jsonschema-type-narrowed",
    "jsonschema-enum-value-added", "jsonschema-enum-value-removed",
    "jsonschema-enum-introduced", "jsonschema-enum-dropped",
    "jsonschema-minimum-relaxed", "jsonschema-minimum-tightened",
    "jsonschema-maximum-relaxed", "jsonschema-maximum-tightened",
    "jsonschema-multiple-of-relaxed", "jsonschema-multiple-of-tightened", "jsonschema-multiple-of-changed",
    "jsonschema-min-length-relaxed", "jsonschema-min-length-tightened",
    "jsonschema-max-length-relaxed", "jsonschema-max-length-tightened",
    "jsonschema-pattern-added", "jsonschema-pattern-removed", "jsonschema-pattern-changed",
    "jsonschema-format-changed", "jsonschema-format-added-asserted", "jsonschema-format-removed-asserted",
    "jsonschema-format-added-annotation", "jsonschema-format-removed-annotation",
    "jsonschema-content-changed", "jsonschema-content-annotation-added", "jsonschema-content-annotation-removed",
    "jsonschema-min-items-relaxed", "jsonschema-min-items-tightened",
    "jsonschema-max-items-relaxed", "jsonschema-max-items-tightened",
    "jsonschema-unique-items-required", "jsonschema-unique-items-dropped",
    "jsonschema-contains-added", "jsonschema-contains-removed",
    "jsonschema-min-contains-relaxed", "jsonschema-min-contains-tightened",
    "jsonschema-max-contains-relaxed", "jsonschema-max-contains-tightened",
    "jsonschema-contains-changed-counted",
    "jsonschema-property-added-closed", "jsonschema-property-added-open",
    "jsonschema-property-removed-closed", "jsonschema-property-removed-open",
    "jsonschema-required-added", "jsonschema-required-removed",
    "jsonschema-min-properties-relaxed", "jsonschema-min-properties-tightened",
    "jsonschema-max-properties-relaxed", "jsonschema-max-properties-tightened",
    "jsonschema-dependent-required-added", "jsonschema-dependent-required-removed",
    "jsonschema-pattern-properties-changed", "jsonschema-property-schemas-undecided",
    "jsonschema-unevaluated-undecided",
    "jsonschema-subschema-forbidden", "jsonschema-subschema-allowed",
    "jsonschema-subschema-constrained", "jsonschema-subschema-unconstrained",
    "jsonschema-allof-branch-added", "jsonschema-allof-branch-removed",
    "jsonschema-anyof-branch-added", "jsonschema-anyof-branch-removed",
    "jsonschema-anyof-introduced", "jsonschema-anyof-dropped",
    "jsonschema-oneof-branch-added", "jsonschema-oneof-branch-removed",
    "jsonschema-oneof-introduced", "jsonschema-oneof-dropped", "jsonschema-oneof-overlapping-changed",
    "jsonschema-not-added", "jsonschema-not-removed", "jsonschema-not-inner-widened",
    "jsonschema-not-inner-narrowed", "jsonschema-not-changed",
    "jsonschema-conditional-added", "jsonschema-conditional-removed", "jsonschema-condition-changed",
    "jsonschema-default-changed", "jsonschema-default-added", "jsonschema-default-removed",
})

VISIT_LIMIT = 200_000  # beyond this many (pair, path) visits, compare each pair once only


@dataclass
class Ctx:
    schema: str
    format_assertion: bool
    changes: list = field(default_factory=list)
    seen: set = field(default_factory=set)
    stack: set = field(default_factory=set)
    visits: int = 0

    def fork(self) -> "Ctx":
        """A separate context for a subcomparison whose changes are judged as a whole."""
        return Ctx(self.schema, self.format_assertion)

    def emit(self, kind: str, path: str, a: Norm | None, b: Norm | None, keyword: str,
             old: Any = None, new: Any = None, **facts):
        facts = {"keyword": keyword.lstrip("/").split("/")[0] or keyword, **facts}
        if a is not None:
            facts["old_pointer"] = (a.node.pointer + keyword) or "/"
        if b is not None:
            facts["new_pointer"] = (b.node.pointer + keyword) or "/"
        facts.setdefault("old_value", show(old))
        facts.setdefault("new_value", show(new))
        self.changes.append(Change(kind, self.schema, path, show(old), show(new),
                                   where(a, keyword), where(b, keyword), facts))


def where(n: Norm | None, keyword: str):
    """The line of the keyword's value where it is an object or array, else of the schema."""
    if n is None:
        return None
    value = n.node.value
    target = None
    for part in keyword.lstrip("/").split("/") if keyword.strip("/") else ():
        part = part.replace("~1", "/").replace("~0", "~")
        if isinstance(value, dict) and part in value:
            value = value[part]
        elif isinstance(value, list) and part.isdigit() and int(part) < len(value):
            value = value[int(part)]
        else:
            break
        if isinstance(value, (dict, list)) and value:
            target = value
    if target is None or n.node.doc.sourcemap is None:
        return n.node.location()
    found = n.node.doc.sourcemap.locate(target)
    return Location(n.node.doc.display, *found) if found else n.node.location()


def show(value):
    """A JSON-ready rendering of a compared value."""
    if isinstance(value, Fraction):
        return value.numerator if value.denominator == 1 else float(value)
    if isinstance(value, frozenset):
        return sorted(value) if value != ALL else ["any"]
    if isinstance(value, (set, tuple)):
        return [show(v) for v in value]
    if value is None or isinstance(value, (str, int, float, bool, list, dict)):
        return value
    return str(value)


def join(path: str, name: str) -> str:
    return f"{path}.{name}" if path else name


def _structural(changes) -> list:
    """The changes that move instance sets (not annotations, meanings or infos)."""
    from ..catalogue import load

    cat = load()
    out = []
    for c in changes:
        rule = cat.for_kind(c.kind)
        if rule is not None and not rule.semantic and (rule.undecided or rule.compatibility.value != "full"):
            out.append((c, rule))
    return out


def compare(ctx: Ctx, a_node: Node, b_node: Node, path: str) -> None:
    a, b = normalise(a_node), normalise(b_node)
    pair = (a.node.key, b.node.key)  # after references: a recursive schema meets itself again
    if pair in ctx.stack:
        return  # recursion: assume the pair included while proving it (instances are finite)
    key = (pair, path) if ctx.visits < VISIT_LIMIT else pair
    if key in ctx.seen:
        return
    ctx.seen.add(key)
    ctx.visits += 1
    ctx.stack.add(pair)
    try:
        for compare_keyword in KEYWORDS.values():
            compare_keyword(ctx, a, b, path)
    finally:
        ctx.stack.discard(pair)


def slot(ctx: Ctx, a: Norm, b: Norm, sa, sb, path: str, where: str) -> None:
    """Compare two subschemas at one position (None: keyword absent, which allows anything)."""
    na = normalise(sa[0]) if sa else None
    nb = normalise(sb[0]) if sb else None
    a_true, b_true = na is None or na.is_true, nb is None or nb.is_true
    a_false, b_false = na is not None and na.is_false, nb is not None and nb.is_false
    keyword = (sb or sa)[1] if (sa or sb) else ""
    if sa and sb and a_false == b_false and (a_false or a_true == b_true):
        if not (a_false and b_false):
            compare(ctx, sa[0], sb[0], path)
    elif a_false and b_false or a_true and b_true:
        return
    elif a_false:
        ctx.emit("jsonschema-subschema-allowed", path, a, b, keyword, False, _raw(sb), where=where)
    elif b_false:
        ctx.emit("jsonschema-subschema-forbidden", path, a, b, keyword, _raw(sa), False, where=where)
    elif a_true:
        ctx.emit("jsonschema-subschema-constrained", path, a, b, keyword, True, _raw(sb), where=where)
    elif b_true:
        ctx.emit("jsonschema-subschema-unconstrained", path, a, b, keyword, _raw(sa), True, where=where)
    else:
        compare(ctx, sa[0], sb[0], path)


def _raw(s):
    if not s:
        return True
    value = s[0].value
    return value if isinstance(value, bool) else "{...}"


def covered(t: str, types) -> bool:
    return t in types or (t == "integer" and "number" in types)


def shared(a: Norm, b: Norm, t: str) -> bool:
    if t == "number":
        return bool({"number", "integer"} & a.types) and bool({"number", "integer"} & b.types)
    return covered(t, a.types) and covered(t, b.types)


# ---------------------------------------------------------------- keywords for every type

def json_type(value) -> str:
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "boolean"
    if isinstance(value, int) or (isinstance(value, float) and value.is_integer()):
        return "integer"
    return {float: "number", str: "string", list: "array", dict: "object"}.get(type(value), "?")


# Keywords on values themselves (no subschemas): enum values are checked against them.
SCALAR = ("minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum", "multipleOf",
          "minLength", "maxLength", "pattern", "minItems", "maxItems", "uniqueItems",
          "minProperties", "maxProperties", "required")


def admitted(n: Norm) -> dict | None:
    """The enum values this node admits by its type and scalar keywords (canonical key ->
    value), or None where it has no enum. Checked with jsonschema's own validator."""
    if n.enum is None:
        return None
    values = {canonical(v): v for v in n.enum if covered(json_type(v), n.types)}
    node = n.node.value
    local = {k: node[k] for k in SCALAR if isinstance(node, dict) and k in node}
    if local and values:
        from .jsonschema import validator_class

        check = validator_class(n.node.draft)(local)
        try:
            values = {k: v for k, v in values.items() if check.is_valid(v)}
        except Exception:  # noqa: BLE001 - a pattern the validator cannot compile: keep all
            pass
    return values


def both_enums(a: Norm, b: Norm) -> bool:
    """With an enum on both sides the value sets are finite and compared exactly (cmp_enum)."""
    return a.enum is not None and b.enum is not None


def cmp_type(ctx, a, b, path):
    # type and enum together define the value set; with an enum it is finite, so the
    # comparison looks at the values each side admits rather than at the type names.
    xa, xb = admitted(a), admitted(b)
    if xa is not None:
        types_a = {json_type(v) for v in xa.values()}
    else:
        types_a = a.types
    if xb is not None:
        types_b = {json_type(v) for v in xb.values()}
    else:
        types_b = b.types
    widened = sorted(t for t in types_b if not covered(t, a.types)) if xa is None else []
    narrowed = sorted(t for t in types_a if not covered(t, b.types)) if xb is None else []
    if widened:
        ctx.emit("jsonschema-type-widened", path, a, b, "/type", a.types, b.types, types=widened)
    if narrowed:
        ctx.emit("jsonschema-type-narrowed", path, a, b, "/type", a.types, b.types, types=narrowed)


def cmp_enum(ctx, a, b, path):
    if a.enum is None and b.enum is None:
        return
    kw = "/enum" if "enum" in (b.node.value if isinstance(b.node.value, dict) else {}) else "/const"
    xa, xb = admitted(a), admitted(b)
    if xa is None:
        ctx.emit("jsonschema-enum-introduced", path, a, b, kw, None, list(b.enum), values=list(xb.values()))
        return
    if xb is None:  # values the new types no longer admit: cmp_type reports them
        ctx.emit("jsonschema-enum-dropped", path, a, b, kw, list(a.enum), None, values=list(xa.values()))
        return
    added = [v for k, v in xb.items() if k not in xa]
    removed = [v for k, v in xa.items() if k not in xb]
    if added:
        ctx.emit("jsonschema-enum-value-added", path, a, b, kw, list(a.enum), list(b.enum), values=added)
    if removed:
        ctx.emit("jsonschema-enum-value-removed", path, a, b, kw, list(a.enum), list(b.enum), values=removed)


def _count(ctx, a, b, path, attr, keyword, name, lower):
    """Whole-number bounds: min* (absent = 0) and max* (absent = no bound)."""
    x, y = getattr(a, attr), getattr(b, attr)
    if x == y:
        return
    if lower:
        relaxed = y < x
    else:
        relaxed = y is None or (x is not None and y > x)
    ctx.emit(f"jsonschema-{name}-{'relaxed' if relaxed else 'tightened'}", path, a, b, keyword, x, y)


def _looser(x, y, lower: bool) -> bool:
    """Whether bound y admits more than bound x (None: unbounded)."""
    if y is None:
        return True
    if x is None:
        return False
    if x.value != y.value:
        return y.value < x.value if lower else y.value > x.value
    return x.exclusive and not y.exclusive


def cmp_numbers(ctx, a, b, path):
    if not shared(a, b, "number") or both_enums(a, b):
        return
    for attr, name, lower in (("lower", "minimum", True), ("upper", "maximum", False)):
        x, y = getattr(a, attr), getattr(b, attr)
        if x == y:
            continue
        relaxed = _looser(x, y, lower)
        keyword = "/" + name if name in (b.node.value if y else a.node.value) else "/exclusive" + name.title()
        ctx.emit(f"jsonschema-{name}-{'relaxed' if relaxed else 'tightened'}", path, a, b, keyword,
                 str(x) if x else None, str(y) if y else None)
    x, y = a.multiple_of, b.multiple_of
    if x != y:
        if y is None or (x is not None and (x / y).denominator == 1):
            kind = "relaxed"
        elif x is None or (y / x).denominator == 1:
            kind = "tightened"
        else:
            kind = "changed"
        ctx.emit(f"jsonschema-multiple-of-{kind}", path, a, b, "/multipleOf", x, y)


def cmp_strings(ctx, a, b, path):
    if not shared(a, b, "string") or both_enums(a, b):
        return
    _count(ctx, a, b, path, "min_length", "/minLength", "min-length", True)
    _count(ctx, a, b, path, "max_length", "/maxLength", "max-length", False)
    if a.pattern != b.pattern:
        if a.pattern is None:
            kind = "added"
        elif b.pattern is None:
            kind = "removed"
        else:
            kind = "changed"  # inclusion of two regular languages: not decided here
        ctx.emit(f"jsonschema-pattern-{kind}", path, a, b, "/pattern", a.pattern, b.pattern)


# ---------------------------------------------------------------- arrays

def cmp_arrays(ctx, a, b, path):
    if not shared(a, b, "array"):
        return
    _count(ctx, a, b, path, "min_items", "/minItems", "min-items", True)
    _count(ctx, a, b, path, "max_items", "/maxItems", "max-items", False)
    if a.unique_items != b.unique_items:
        kind = "required" if b.unique_items else "dropped"
        ctx.emit(f"jsonschema-unique-items-{kind}", path, a, b, "/uniqueItems", a.unique_items, b.unique_items)
    for i in range(max(len(a.prefix), len(b.prefix))):
        sa = a.prefix[i] if i < len(a.prefix) else a.items
        sb = b.prefix[i] if i < len(b.prefix) else b.items
        slot(ctx, a, b, sa, sb, path, f"item {i}")
    slot(ctx, a, b, a.items, b.items, path, "items")
    if a.contains is None and b.contains is None:
        pass
    elif a.contains is None:
        ctx.emit("jsonschema-contains-added", path, a, b, "/contains", None, _raw(b.contains))
    elif b.contains is None:
        ctx.emit("jsonschema-contains-removed", path, a, b, "/contains", _raw(a.contains), None)
    else:
        if a.max_contains is None and b.max_contains is None:
            slot(ctx, a, b, a.contains, b.contains, path, "contains")
        else:  # at most N matches: a wider contains counts more elements, not monotone
            sub = ctx.fork()
            slot(sub, a, b, a.contains, b.contains, path, "contains")
            if _structural(sub.changes):
                ctx.emit("jsonschema-contains-changed-counted", path, a, b, "/contains")
            ctx.changes += [c for c in sub.changes if c not in {s for s, _ in _structural(sub.changes)}]
        _count(ctx, a, b, path, "min_contains", "/minContains", "min-contains", True)
        _count(ctx, a, b, path, "max_contains", "/maxContains", "max-contains", False)
    if (a.unevaluated_items or b.unevaluated_items) and canonical(a.node.value) != canonical(b.node.value):
        ctx.emit("jsonschema-unevaluated-undecided", path, a, b, "/unevaluatedItems", where="unevaluatedItems")


# ---------------------------------------------------------------- objects

def _matches(pattern: str, name: str) -> bool:
    return re.search(pattern, name) is not None


def effective(n: Norm, name: str) -> list:
    """The subschemas a property of this name must match (empty: anything)."""
    found = [n.properties[name]] if name in n.properties else []
    found += [s for pat, s in n.pattern_properties.items() if _matches(pat, name)]
    if not found and n.additional_properties:
        found = [n.additional_properties]
    return found


def _openness(n: Norm | None) -> str:
    if n is None or n.is_true:
        return "open"
    return "closed" if n.is_false else "schema"


def cmp_properties(ctx, a, b, path):
    if not shared(a, b, "object"):
        return
    try:
        _properties(ctx, a, b, path)
    except re.error as exc:
        ctx.emit("jsonschema-property-schemas-undecided", path, a, b, "/patternProperties",
                 reason=f"a pattern Python cannot read ({exc})")


def _properties(ctx, a, b, path):
    for name in sorted(set(a.properties) | set(b.properties)):
        ea, eb = effective(a, name), effective(b, name)
        child = join(path, name)
        kw = "/properties/" + name
        if len(ea) > 1 or len(eb) > 1:
            if len(ea) == len(eb):
                for sa, sb in zip(ea, eb):
                    slot(ctx, a, b, sa, sb, child, "property")
            else:
                ctx.emit("jsonschema-property-schemas-undecided", child, a, b, kw,
                         reason="a different number of patternProperties apply to it")
            continue
        sa, sb = (ea[0] if ea else None), (eb[0] if eb else None)
        if name in a.properties and name in b.properties:
            slot(ctx, a, b, sa, sb, child, "property")
            continue
        added = name in b.properties
        other = normalise((sa if added else sb)[0]) if (sa if added else sb) else None
        mine = normalise((sb if added else sa)[0])
        model = _openness(other)
        if model == "schema":
            slot(ctx, a, b, sa, sb, child, "property")
        elif added and not (model == "open" and mine.is_true or model == "closed" and mine.is_false):
            ctx.emit(f"jsonschema-property-added-{model}", child, a, b, kw, None, _raw(sb), property=name)
        elif not added and not (model == "open" and mine.is_true or model == "closed" and mine.is_false):
            ctx.emit(f"jsonschema-property-removed-{model}", child, a, b, kw, _raw(sa), None, property=name)
    pa, pb = set(a.pattern_properties), set(b.pattern_properties)
    for pat in sorted(pa & pb):
        slot(ctx, a, b, a.pattern_properties[pat], b.pattern_properties[pat], path, f"patternProperties {pat}")
    only = pa ^ pb
    if only and len(pa | pb) == 1:
        (pat,) = only
        if pat in pb:  # names matching it were additional before
            slot(ctx, a, b, a.additional_properties, b.pattern_properties[pat], path, f"patternProperties {pat}")
        else:
            slot(ctx, a, b, a.pattern_properties[pat], b.additional_properties, path, f"patternProperties {pat}")
    elif only:
        ctx.emit("jsonschema-pattern-properties-changed", path, a, b, "/patternProperties",
                 sorted(pa), sorted(pb), patterns=sorted(only))
    slot(ctx, a, b, a.additional_properties, b.additional_properties, path, "additionalProperties")


def cmp_object_counts(ctx, a, b, path):
    if not shared(a, b, "object"):
        return
    for name in sorted(b.required - a.required):
        ctx.emit("jsonschema-required-added", join(path, name), a, b, "/required", None, name, property=name)
    for name in sorted(a.required - b.required):
        ctx.emit("jsonschema-required-removed", join(path, name), a, b, "/required", name, None, property=name)
    _count(ctx, a, b, path, "min_properties", "/minProperties", "min-properties", True)
    _count(ctx, a, b, path, "max_properties", "/maxProperties", "max-properties", False)
    slot(ctx, a, b, a.property_names, b.property_names, path, "propertyNames")
    for trigger in sorted(set(a.dependent_required) | set(b.dependent_required)):
        x = a.dependent_required.get(trigger, frozenset())
        y = b.dependent_required.get(trigger, frozenset())
        if y - x:
            ctx.emit("jsonschema-dependent-required-added", join(path, trigger), a, b, "/dependentRequired",
                     sorted(x), sorted(y), trigger=trigger, names=sorted(y - x))
        if x - y:
            ctx.emit("jsonschema-dependent-required-removed", join(path, trigger), a, b, "/dependentRequired",
                     sorted(x), sorted(y), trigger=trigger, names=sorted(x - y))
    for trigger in sorted(set(a.dependent_schemas) | set(b.dependent_schemas)):
        slot(ctx, a, b, a.dependent_schemas.get(trigger), b.dependent_schemas.get(trigger), path,
             f"dependentSchemas {trigger}")
    if (a.unevaluated_properties or b.unevaluated_properties) and canonical(a.node.value) != canonical(b.node.value):
        ctx.emit("jsonschema-unevaluated-undecided", path, a, b, "/unevaluatedProperties",
                 where="unevaluatedProperties")


# ---------------------------------------------------------------- combinators

def pair_up(xs: list, ys: list):
    """Pair branches: equal ones first, then by position. Returns (pairs, only_x, only_y).

    Any pairing is sound (each pair is compared, each unpaired branch reported); a good
    one only makes the report shorter."""
    left, right = list(xs), list(ys)
    pairs = []
    for x in list(left):
        cx = canonical(x.value)
        for y in right:
            if canonical(y.value) == cx:
                pairs.append((x, y))
                left.remove(x)
                right.remove(y)
                break
    while left and right:
        pairs.append((left.pop(0), right.pop(0)))
    return pairs, left, right


def cmp_all_of(ctx, a, b, path):
    pairs, removed, added = pair_up(a.all_of, b.all_of)
    for x, y in pairs:
        compare(ctx, x, y, path)
    for y in added:
        if not normalise(y).is_true:
            ctx.emit("jsonschema-allof-branch-added", path, a, b, y.pointer[len(b.node.pointer):] or "/allOf")
    for x in removed:
        if not normalise(x).is_true:
            ctx.emit("jsonschema-allof-branch-removed", path, a, b, x.pointer[len(a.node.pointer):] or "/allOf")


def cmp_any_of(ctx, a, b, path):
    _union(ctx, a, b, path, a.any_of, b.any_of, "anyof", "/anyOf")


def disjoint(x: Norm, y: Norm) -> bool:
    """A sufficient test that no instance is valid under both (for oneOf as anyOf)."""
    common = {t for t in x.types if covered(t, y.types)} | {t for t in y.types if covered(t, x.types)}
    if not common:
        return True
    if x.enum is not None and y.enum is not None:
        if not {canonical(v) for v in x.enum} & {canonical(v) for v in y.enum}:
            return True
    if common <= {"object"}:
        for name in x.required & y.required:
            if name in x.properties and name in y.properties:
                px, py = normalise(x.properties[name][0]), normalise(y.properties[name][0])
                if px.enum is not None and py.enum is not None and \
                        not {canonical(v) for v in px.enum} & {canonical(v) for v in py.enum}:
                    return True
    return False


def _pairwise_disjoint(nodes) -> bool:
    norms = [normalise(n) for n in nodes]
    return all(disjoint(norms[i], norms[j]) for i in range(len(norms)) for j in range(i + 1, len(norms)))


def cmp_one_of(ctx, a, b, path):
    xs, ys = a.one_of, b.one_of
    if xs is None or ys is None or (_pairwise_disjoint(xs) and _pairwise_disjoint(ys)):
        _union(ctx, a, b, path, xs, ys, "oneof", "/oneOf")
        return
    # Overlapping branches: exactly one must match, so widening a branch can reject
    # instances that now match two. Any structural change is undecided.
    sub = ctx.fork()
    _union(sub, a, b, path, xs, ys, "oneof", "/oneOf")
    structural = {c for c, _ in _structural(sub.changes)}
    if structural:
        ctx.emit("jsonschema-oneof-overlapping-changed", path, a, b, "/oneOf", len(xs), len(ys))
    ctx.changes += [c for c in sub.changes if c not in structural]


def _union(ctx, a, b, path, xs, ys, name, keyword):
    if xs is None and ys is None:
        return
    if xs is None:
        ctx.emit(f"jsonschema-{name}-introduced", path, a, b, keyword, None, len(ys))
        return
    if ys is None:
        ctx.emit(f"jsonschema-{name}-dropped", path, a, b, keyword, len(xs), None)
        return
    pairs, removed, added = pair_up(xs, ys)
    for x, y in pairs:
        compare(ctx, x, y, path)
    for y in added:
        ctx.emit(f"jsonschema-{name}-branch-added", path, a, b, y.pointer[len(b.node.pointer):], None, "{...}")
    for x in removed:
        ctx.emit(f"jsonschema-{name}-branch-removed", path, a, b, x.pointer[len(a.node.pointer):], "{...}", None)


def cmp_not(ctx, a, b, path):
    if a.not_ is None and b.not_ is None:
        return
    if a.not_ is None:
        ctx.emit("jsonschema-not-added", path, a, b, "/not")
        return
    if b.not_ is None:
        ctx.emit("jsonschema-not-removed", path, a, b, "/not")
        return
    sub = ctx.fork()
    slot(sub, a, b, a.not_, b.not_, path, "not")
    structural = _structural(sub.changes)
    if not structural:
        return
    rules = [r for _, r in structural]
    if all(not r.undecided and r.compatibility.backward for r in rules):
        ctx.emit("jsonschema-not-inner-widened", path, a, b, "/not")
    elif all(not r.undecided and r.compatibility.forward for r in rules):
        ctx.emit("jsonschema-not-inner-narrowed", path, a, b, "/not")
    else:
        ctx.emit("jsonschema-not-changed", path, a, b, "/not")


def cmp_conditional(ctx, a, b, path):
    has_a = a.if_ is not None and (a.then or a.else_)
    has_b = b.if_ is not None and (b.then or b.else_)
    if not has_a and not has_b:
        return
    if not has_a:
        ctx.emit("jsonschema-conditional-added", path, a, b, "/if")
        return
    if not has_b:
        ctx.emit("jsonschema-conditional-removed", path, a, b, "/if")
        return
    sub = ctx.fork()
    slot(sub, a, b, a.if_, b.if_, path, "if")
    if _structural(sub.changes):  # the condition sits on both sides of the implication
        ctx.emit("jsonschema-condition-changed", path, a, b, "/if")
        return
    slot(ctx, a, b, a.then, b.then, path, "then")
    slot(ctx, a, b, a.else_, b.else_, path, "else")


def cmp_remote(ctx, a, b, path):
    if not a.remote and not b.remote:
        return
    if a.remote == b.remote:
        ctx.emit("jsonschema-remote-reference-unchanged", path, a, b, "/$ref", uri=", ".join(a.remote))
        return
    ctx.emit("jsonschema-remote-reference-not-followed", path, a, b, "/$ref",
             uri=", ".join(sorted(set(a.remote) ^ set(b.remote))))


# ---------------------------------------------------------------- annotations

def cmp_annotations(ctx, a, b, path):
    from ..semantics import annotation_changes

    x, y = a.annotations, b.annotations

    def text(d, k):
        v = d.get(k)
        return v if isinstance(v, str) else None

    ctx.changes += annotation_changes(
        ctx.schema, path, {"unit": text(x, "x-unit"), "meaning": text(x, "x-meaning")},
        {"unit": text(y, "x-unit"), "meaning": text(y, "x-meaning")},
        a.node.location(), b.node.location())
    if "default" in x or "default" in y:
        if "default" not in x:
            ctx.emit("jsonschema-default-added", path, a, b, "/default", None, y["default"])
        elif "default" not in y:
            ctx.emit("jsonschema-default-removed", path, a, b, "/default", x["default"], None)
        elif canonical(x["default"]) != canonical(y["default"]):
            ctx.emit("jsonschema-default-changed", path, a, b, "/default", x["default"], y["default"])
    if x.get("format") != y.get("format"):
        semantics = "an assertion" if ctx.format_assertion else "an annotation"
        if "format" in x and "format" in y:
            kind = "changed"
        else:
            kind = ("added" if "format" in y else "removed") + (
                "-asserted" if ctx.format_assertion else "-annotation")
        ctx.emit(f"jsonschema-format-{kind}", path, a, b, "/format", x.get("format"), y.get("format"),
                 format_semantics=semantics)
    for key in ("contentEncoding", "contentMediaType", "contentSchema"):
        if key not in x and key not in y:
            continue
        if key in x and key in y:
            if canonical(x[key]) != canonical(y[key]):
                ctx.emit("jsonschema-content-changed", path, a, b, "/" + key, x[key], y[key], where=key)
        else:
            kind = "added" if key in y else "removed"
            ctx.emit(f"jsonschema-content-annotation-{kind}", path, a, b, "/" + key, x.get(key), y.get(key),
                     where=key)


# One function per keyword (group); each compares OLD with NEW and records changes.
KEYWORDS = {
    "type": cmp_type,
    "enum": cmp_enum,
    "numbers": cmp_numbers,
    "strings": cmp_strings,
    "arrays": cmp_arrays,
    "properties": cmp_properties,
    "object-counts": cmp_object_counts,
    "allOf": cmp_all_of,
    "anyOf": cmp_any_of,
    "oneOf": cmp_one_of,
    "not": cmp_not,
    "if": cmp_conditional,
    "$ref": cmp_remote,
    "annotations": cmp_annotations,
}


def compare_documents(old, new) -> list[Change]:
    """All changes between two loaded documents (jsonschema.Loaded)."""
    ctx = Ctx(schema=old.root_name, format_assertion=old.format_assertion or new.format_assertion)
    a, b = normalise(old.root), normalise(new.root)
    if not old.declared or not new.declared:
        files = [x.display for x in (old, new) if not x.declared]
        ctx.emit("jsonschema-draft-assumed", "", a, b, "", None, "2020-12", files=files)
    if old.draft != new.draft:
        ctx.emit("jsonschema-draft-changed", "", a, b, "/$schema", old.draft, new.draft)
    if old.ident != new.ident:
        ctx.emit("jsonschema-id-changed", "", a, b, "/$id", old.ident, new.ident)
    compare(ctx, old.root, new.root, "")
    unique, seen = [], set()
    for change in ctx.changes:
        key = (change.kind, change.path, repr(change.old), repr(change.new), change.facts.get("where"))
        if key not in seen:
            seen.add(key)
            unique.append(change)
    return unique
