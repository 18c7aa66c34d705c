"""JSON Schema witnesses: an instance valid under the writer side and invalid under the reader's.

For JSON Schema the directions are instance sets (docs/jsonschema.md): backward means every
instance valid under OLD is valid under NEW. A run validates the datum with jsonschema
under the writer schema (a datum it rejects is not writer data and is skipped) and under
the reader schema; the outcome is jsonschema's own error message, at its instance path.

Instances come from a seeded generator of our own that follows the common keywords (type,
enum, const, properties, required, items, bounds, lengths, combinators, local $ref);
whatever it cannot aim for (patterns, not, if/then) is filtered by validating. Targeted
candidates put values harvested from both schemas (bounds and the values beside them,
enum members, lengths, one value of every JSON type) at the finding's path.
"""
from __future__ import annotations

import copy
import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlsplit

from ..formats import parse_json, read_text
from . import Pair, Trial

DRAFTS = {
    "json-schema.org/draft-04/schema": "Draft4Validator",
    "json-schema.org/draft-06/schema": "Draft6Validator",
    "json-schema.org/draft-07/schema": "Draft7Validator",
    "json-schema.org/draft/2019-09/schema": "Draft201909Validator",
    "json-schema.org/draft/2020-12/schema": "Draft202012Validator",
}
LEGACY = {"Draft4Validator", "Draft6Validator", "Draft7Validator"}  # formats asserted (as the adapter)
ALPHABET = "abcxyz019 -_.é"
TYPES = ("null", "boolean", "integer", "number", "string", "array", "object")
MAX_DEPTH = 5
BASES = 4
GENERATED = 30
FORMATS = {"date-time": "2026-03-01T06:30:00Z", "date": "2026-03-01", "time": "06:30:00Z",
           "email": "billing@example.org", "uuid": "0b6f4a8e-3c1d-4e8a-9f2b-6d1c2e3f4a5b",
           "uri": "urn:utility:meter:17", "hostname": "meters.example.org", "ipv4": "192.0.2.7"}
NOTHING = object()


@dataclass
class Side:
    display: str
    data: Any
    root_name: str
    validator: Any

    def valid(self, instance: Any) -> bool:
        try:
            return self.validator.is_valid(instance)
        except Exception:  # noqa: BLE001 - an unresolvable reference: no verdict
            return False

    def error(self, instance: Any):
        from jsonschema.exceptions import best_match

        try:
            return best_match(self.validator.iter_errors(instance))
        except Exception as exc:  # noqa: BLE001
            return exc

    def resolve(self, ref: str) -> Any:
        try:
            return self.validator._resolver.lookup(ref).contents
        except Exception:  # noqa: BLE001 - private API or an unresolvable reference
            return True


def _retriever(folder: Path):
    """File references inside the schema's folder tree; never the network."""
    from referencing import Resource
    from referencing.exceptions import NoSuchResource

    def retrieve(uri: str):
        from jsonschema_specifications import REGISTRY as BUNDLED

        for candidate in (uri, uri.rstrip("#"), uri.rstrip("#") + "#"):
            try:
                return BUNDLED[candidate]
            except KeyError:
                pass
        parts = urlsplit(uri)
        if parts.scheme != "file":
            raise NoSuchResource(ref=uri)
        target = Path(unquote(parts.path))
        if not target.is_file():
            raise NoSuchResource(ref=uri)
        return Resource.from_contents(json.loads(target.read_text(encoding="utf-8")))

    return retrieve


def _side(path: Path, display: str, options=None) -> Side:
    import jsonschema.validators as v
    from referencing import Registry, Resource
    from referencing.jsonschema import DRAFT202012

    data = parse_json(read_text(path, display), display)
    cls_name = "Draft202012Validator"
    if isinstance(data, dict) and isinstance(data.get("$schema"), str):
        parts = urlsplit(data["$schema"].rstrip("#"))
        cls_name = DRAFTS.get(parts.netloc + parts.path, cls_name)
    cls = getattr(v, cls_name)
    uri = path.resolve().as_uri()
    resource = Resource.from_contents(data, default_specification=DRAFT202012) if isinstance(data, dict) \
        else DRAFT202012.create_resource(data)
    registry = Registry(retrieve=_retriever(path.resolve().parent)).with_resource(uri, resource)
    setting = ((getattr(options, "settings", None) or {}).get("format", "default"))
    asserted = setting == "assertion" or (setting == "default" and cls_name in LEGACY)
    # $id decides the base URI when present; the file's URI otherwise.
    schema = data if not isinstance(data, dict) or "$id" in data or "id" in data else {**data, "$id": uri}
    validator = cls(schema, registry=registry, format_checker=cls.FORMAT_CHECKER if asserted else None)
    ident = data.get("$id" if cls_name != "Draft4Validator" else "id") if isinstance(data, dict) else None
    root = ident.rstrip("#") if isinstance(ident, str) and ident.rstrip("#") else display
    return Side(display, data, root, validator)


def open_pair(old: Path, new: Path, old_display: str, new_display: str, options=None) -> Pair:
    return Pair(_side(old, old_display, options), _side(new, new_display, options))


def roots(writer: Side, reader: Side) -> list[str]:
    return [writer.root_name]


# --- generation ------------------------------------------------------------------------

def _any(rng, depth: int) -> Any:
    kind = rng.choice(TYPES if depth < MAX_DEPTH else TYPES[:5])
    return _of_type(kind, {}, rng, depth, None)


def _number(schema: dict, rng, integer: bool) -> Any:
    lo, hi = schema.get("minimum"), schema.get("maximum")
    xlo, xhi = schema.get("exclusiveMinimum"), schema.get("exclusiveMaximum")
    if isinstance(xlo, bool):  # draft-04: a flag on minimum
        xlo, lo = (lo, None) if xlo else (None, lo)
    if isinstance(xhi, bool):
        xhi, hi = (hi, None) if xhi else (None, hi)
    low = max([b for b in (lo, (xlo + (1 if integer else 1e-6)) if xlo is not None else None) if b is not None],
              default=None)
    high = min([b for b in (hi, (xhi - (1 if integer else 1e-6)) if xhi is not None else None) if b is not None],
               default=None)
    if low is None and high is None:
        low, high = -1000, 1000
    elif low is None:
        low = high - 1000
    elif high is None:
        high = low + 1000
    if low > high:
        return low
    step = schema.get("multipleOf")
    if isinstance(step, (int, float)) and step > 0:
        import math

        k = rng.randint(math.ceil(low / step), max(math.ceil(low / step), math.floor(high / step)))
        value = k * step
        return int(value) if integer or float(value).is_integer() and isinstance(step, int) else value
    if integer:
        import math

        return rng.randint(math.ceil(low), max(math.ceil(low), math.floor(high)))
    return rng.choice((rng.uniform(low, high), float(round(rng.uniform(low, high)))))


def _from_pattern(pattern: str, rng) -> str | None:
    """A string matching a regular expression, from its parse tree (literals, classes, repeats,
    groups, alternatives); None for constructs beyond that. Validation has the last word."""
    try:
        import re._parser as parser  # Python 3.11+
        from re._constants import (ANY, AT, BRANCH, CATEGORY, IN, LITERAL, MAX_REPEAT, MIN_REPEAT,
                                   NEGATE, NOT_LITERAL, RANGE, SUBPATTERN)
        tree = parser.parse(pattern)
    except Exception:  # noqa: BLE001 - a pattern Python cannot parse, or another Python
        return None
    categories = {"CATEGORY_DIGIT": "0123456789", "CATEGORY_WORD": "abcxyz019_",
                  "CATEGORY_SPACE": " ", "CATEGORY_NOT_DIGIT": "abc-", "CATEGORY_NOT_WORD": "-. ",
                  "CATEGORY_NOT_SPACE": "abc1"}

    def emit(items, depth=0) -> str:
        if depth > 20:
            raise ValueError("too deep")
        out = []
        for op, arg in items:
            if op is LITERAL:
                out.append(chr(arg))
            elif op is NOT_LITERAL:
                out.append("a" if chr(arg) != "a" else "b")
            elif op is ANY:
                out.append(rng.choice("abc1"))
            elif op is AT:
                continue
            elif op is IN:
                if arg and arg[0][0] is NEGATE:
                    out.append("é")  # outside the ASCII classes patterns usually negate
                    continue
                op2, arg2 = rng.choice(arg)
                if op2 is LITERAL:
                    out.append(chr(arg2))
                elif op2 is RANGE:
                    out.append(chr(rng.randint(*arg2)))
                elif op2 is CATEGORY:
                    out.append(rng.choice(categories.get(str(arg2), "a")))
                else:
                    raise ValueError(op2)
            elif op is CATEGORY:
                out.append(rng.choice(categories.get(str(arg), "a")))
            elif op in (MAX_REPEAT, MIN_REPEAT):
                lo, hi, sub = arg
                hi = min(hi, lo + 3)
                out.extend(emit(sub, depth + 1) for _ in range(rng.randint(lo, max(lo, hi))))
            elif op is SUBPATTERN:
                out.append(emit(arg[-1], depth + 1))
            elif op is BRANCH:
                out.append(emit(rng.choice(arg[1]), depth + 1))
            else:
                raise ValueError(op)
        return "".join(out)

    try:
        return emit(tree)
    except (ValueError, TypeError, IndexError):
        return None


def _string(schema: dict, rng) -> str:
    pattern = schema.get("pattern")
    if isinstance(pattern, str) and rng.random() < 0.9:
        made = _from_pattern(pattern, rng)
        if made is not None:
            return made
    fmt = schema.get("format")
    if fmt in FORMATS and rng.random() < 0.9:
        return FORMATS[fmt]
    examples = schema.get("examples")
    if isinstance(examples, list) and examples and rng.random() < 0.7:
        pick = rng.choice(examples)
        if isinstance(pick, str):
            return pick
    lo = schema.get("minLength", 0)
    hi = schema.get("maxLength", lo + 8)
    n = rng.randint(lo, max(lo, min(hi, lo + 8)))
    return "".join(rng.choice(ALPHABET) for _ in range(n))


def _of_type(kind: str, schema: dict, rng, depth: int, side) -> Any:
    if kind == "null":
        return None
    if kind == "boolean":
        return rng.random() < 0.5
    if kind == "integer":
        return _number(schema, rng, True)
    if kind == "number":
        return _number(schema, rng, rng.random() < 0.3)
    if kind == "string":
        return _string(schema, rng)
    if kind == "array":
        return _array(schema, rng, depth, side)
    return _object(schema, rng, depth, side)


def _array(schema: dict, rng, depth: int, side) -> list:
    prefix = schema.get("prefixItems")
    items = schema.get("items", True)
    if isinstance(items, list):  # draft-07 array form
        prefix, items = items, schema.get("additionalItems", True)
    lo = schema.get("minItems", 0)
    hi = schema.get("maxItems", lo + 3)
    n = rng.randint(lo, max(lo, min(hi, lo + (3 if depth < MAX_DEPTH else 0))))
    out = []
    for i in range(n):
        sub = prefix[i] if isinstance(prefix, list) and i < len(prefix) else items
        value = generate(side, sub, rng, depth + 1)
        if value is NOTHING:
            break
        out.append(value)
    if schema.get("uniqueItems"):
        unique = []
        for v in out:
            if v not in unique:
                unique.append(v)
        out = unique
    return out


def _object(schema: dict, rng, depth: int, side) -> dict:
    props = schema.get("properties") or {}
    required = set(schema.get("required") or ()) if isinstance(schema.get("required"), list) else set()
    out = {}
    for name, sub in props.items():
        if name in required or (depth < MAX_DEPTH and rng.random() < 0.6):
            value = generate(side, sub, rng, depth + 1)
            if value is not NOTHING:
                out[name] = value
    for name in required - set(out):
        out[name] = _any(rng, depth + 1)
    patterns = schema.get("patternProperties")
    if isinstance(patterns, dict) and depth < MAX_DEPTH:
        for pattern, sub in patterns.items():
            if rng.random() < 0.5:
                value = generate(side, sub, rng, depth + 1)
                if value is not NOTHING:
                    out[_pattern_key(pattern, rng)] = value
    for key in ("dependentRequired", "dependencies"):
        for name, needs in (schema.get(key) or {}).items() if isinstance(schema.get(key), dict) else ():
            if name in out and isinstance(needs, list):
                for need in needs:
                    out.setdefault(need, _any(rng, depth + 1))
    extra = schema.get("additionalProperties", True)
    if extra is not False and depth < MAX_DEPTH and rng.random() < 0.15:
        value = generate(side, extra, rng, depth + 1)
        if value is not NOTHING:
            out[f"x_{rng.randint(0, 99)}"] = value
    return out


def _merge(a: dict, b: dict) -> dict:
    """Both schemas' keywords at once, roughly (properties and required joined); callers validate."""
    out = dict(a)
    for k, v in b.items():
        if k == "properties" and isinstance(v, dict):
            out["properties"] = {**out.get("properties", {}), **v}
        elif k == "required" and isinstance(v, list):
            out["required"] = sorted(set(out.get("required", [])) | set(v))
        else:
            out.setdefault(k, v)
    return out


def _pattern_key(pattern: str, rng) -> str:
    """A property name a simple pattern (a literal prefix) matches; patterns beyond that are validated."""
    literal = ""
    for ch in pattern.lstrip("^"):
        if ch in ".*+?[](){}|\\$":
            break
        literal += ch
    return literal + "".join(rng.choice("abcxyz") for _ in range(3))


def _infer(schema: dict) -> list[str]:
    if "properties" in schema or "required" in schema or "additionalProperties" in schema:
        return ["object"]
    if "items" in schema or "prefixItems" in schema or "minItems" in schema:
        return ["array"]
    if "minLength" in schema or "maxLength" in schema or "pattern" in schema or "format" in schema:
        return ["string"]
    if any(k in schema for k in ("minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum", "multipleOf")):
        return ["number"]
    return list(TYPES)


def generate(side, schema: Any, rng, depth: int = 0) -> Any:
    """A random instance aimed at ``schema`` (not guaranteed valid: callers validate)."""
    if schema is True or schema == {}:
        return _any(rng, depth)
    if schema is False or not isinstance(schema, dict) or depth > MAX_DEPTH + 3:
        return NOTHING if schema is False else None
    if "$ref" in schema and side is not None:
        target = side.resolve(schema["$ref"])
        rest = {k: v for k, v in schema.items() if k != "$ref"}
        if isinstance(target, dict):
            return generate(side, {**target, **{k: v for k, v in rest.items() if k not in target}}, rng, depth + 1)
        return generate(side, target, rng, depth + 1)
    if "const" in schema:
        return copy.deepcopy(schema["const"])
    if isinstance(schema.get("enum"), list) and schema["enum"]:
        return copy.deepcopy(rng.choice(schema["enum"]))
    if isinstance(schema.get("allOf"), list):
        merged = {k: v for k, v in schema.items() if k != "allOf"}
        for branch in schema["allOf"]:
            if isinstance(branch, dict):
                merged = _merge(merged, branch)
        return generate(side, merged, rng, depth)
    for key in ("oneOf", "anyOf"):
        if isinstance(schema.get(key), list) and schema[key]:
            branch = rng.choice(schema[key])
            rest = {k: v for k, v in schema.items() if k not in ("oneOf", "anyOf")}
            if isinstance(branch, dict):
                return generate(side, {**rest, **branch}, rng, depth)
            return generate(side, branch, rng, depth)
    if isinstance(schema.get("if"), dict) and rng.random() < 0.5:
        # Take the conditional branch half of the time: the condition and its consequence.
        rest = {k: v for k, v in schema.items() if k not in ("if", "then", "else")}
        then = schema.get("then") if isinstance(schema.get("then"), dict) else {}
        return generate(side, _merge(_merge(rest, schema["if"]), then), rng, depth)
    kinds = schema.get("type")
    kinds = [kinds] if isinstance(kinds, str) else (list(kinds) if isinstance(kinds, list) else _infer(schema))
    if depth >= MAX_DEPTH:
        kinds = [k for k in kinds if k not in ("array", "object")] or kinds
    return _of_type(rng.choice(kinds), schema, rng, depth, side)


def random_datum(writer: Side, root: str, rng) -> Any:
    for _ in range(GENERATED):
        value = generate(writer, writer.data, rng)
        if value is not NOTHING and writer.valid(value):
            return value
    return NOTHING


# --- targeted candidates ---------------------------------------------------------------

def _harvest(data: Any, out: list) -> None:
    """Values a boundary of either schema makes interesting."""
    stack = [data]
    while stack:
        node = stack.pop()
        if isinstance(node, list):
            stack.extend(node)
            continue
        if not isinstance(node, dict):
            continue
        for key, value in node.items():
            if key in ("minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum") and _num(value):
                out.extend((value, value - 1, value + 1, value - 0.5, value + 0.5))
            elif key == "multipleOf" and _num(value):
                out.extend((value, value * 2, value / 2, value * 1.5))
            elif key in ("minLength", "maxLength") and isinstance(value, int):
                out.extend("w" * n for n in {max(value - 1, 0), value, value + 1})
            elif key in ("enum", "examples") and isinstance(value, list):
                out.extend(value)
            elif key in ("const", "default"):
                out.append(value)
            elif key == "format" and value in FORMATS:
                out.extend((FORMATS[value], "not-a-" + str(value)))
            elif key in ("minProperties", "maxProperties") and isinstance(value, int):
                out.extend({f"k{i}": i for i in range(n)} for n in {max(value - 1, 0), value, value + 1})
            elif key in ("minItems", "maxItems") and isinstance(value, int):
                out.extend([f"x{i}" for i in range(n)] for n in {max(value - 1, 0), value, value + 1})
            if isinstance(value, (dict, list)):
                stack.append(value)


def _num(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


GENERIC = [None, True, False, 0, -1, 1, 1.5, 2**53, "", "x", "1500", [], [1], ["x"], {}, {"x": 1}]


def _put(instance: Any, segs: list[str], value: Any) -> Any:
    """``instance`` with ``value`` at the dotted path (into every element of arrays), NOTHING to delete."""
    if not segs:
        return value
    if isinstance(instance, list):
        return [_put(item, segs, value) for item in instance]
    if not isinstance(instance, dict):
        return instance
    out = dict(instance)
    head, rest = segs[0], segs[1:]
    if not rest:
        if value is NOTHING:
            out.pop(head, None)
        else:
            out[head] = value
        return out
    out[head] = _put(out.get(head, {}), rest, value)
    return out


def _names(data: Any) -> set[str]:
    """Every property name either schema mentions (properties, required, dependencies)."""
    names: set[str] = set()
    stack = [data]
    while stack:
        node = stack.pop()
        if isinstance(node, list):
            stack.extend(node)
        elif isinstance(node, dict):
            for key, value in node.items():
                if key == "properties" and isinstance(value, dict):
                    names.update(value)
                elif key == "required" and isinstance(value, list):
                    names.update(v for v in value if isinstance(v, str))
                elif key in ("dependentRequired", "dependencies") and isinstance(value, dict):
                    names.update(value)
                    for v in value.values():
                        if isinstance(v, list):
                            names.update(x for x in v if isinstance(x, str))
                if isinstance(value, (dict, list)):
                    stack.append(value)
    return names


def _complete(schema: Any, instance: Any) -> Any:
    """The instance with the members the writer's top-level dependencies ask for added."""
    if not isinstance(schema, dict) or not isinstance(instance, dict):
        return instance
    out = dict(instance)
    for key in ("dependentRequired", "dependencies"):
        deps = schema.get(key)
        for name, needs in deps.items() if isinstance(deps, dict) else ():
            if name in out and isinstance(needs, list):
                for need in needs:
                    out.setdefault(need, "x")
    return out


def targeted(finding, writer: Side, reader: Side, rng):
    """Writer instances with harvested values (or nothing) at the finding's path, then reader-aimed ones."""
    palette: list = []
    _harvest(writer.data, palette)
    _harvest(reader.data, palette)
    palette.extend(GENERIC)
    segs = finding.path.split(".") if finding.path else []
    bases = [b for b in (random_datum(writer, writer.root_name, rng) for _ in range(BASES)) if b is not NOTHING]
    names = sorted(_names(writer.data) | _names(reader.data))
    # Each base also with every property either side names: where presence matters (required,
    # dependencies), one of the two is on the boundary.
    bases += [{**{n: "x" for n in names}, **b} for b in bases if isinstance(b, dict)]
    for base in bases:
        yield _put(base, segs, NOTHING) if segs else base
        for value in palette:
            yield _complete(writer.data, _put(base, segs, copy.deepcopy(value)))
            if segs:
                yield _complete(writer.data, _put(base, segs, [copy.deepcopy(value)]))  # arrays are transparent
                yield _complete(writer.data, _put(base, segs, [copy.deepcopy(value)] * 2))  # uniqueItems
    # Instances aimed at the reader schema often sit just outside it on the writer's side.
    for _ in range(GENERATED):
        value = generate(reader, reader.data, rng)
        if value is not NOTHING:
            yield value


def _numeric_leaf(side: Side, path: str) -> str:
    """``path``, or for an object (a unit on a type applies to its numbers) its first number property."""
    node = side.data
    for seg in path.split(".") if path else ():
        node = _deref(side, node)
        while isinstance(node, dict) and "items" in node and "properties" not in node:
            node = _deref(side, node["items"])
        node = (node.get("properties") or {}).get(seg) if isinstance(node, dict) else None
    node = _deref(side, node)
    if not isinstance(node, dict) or node.get("type") in ("number", "integer"):
        return path
    for name, sub in (node.get("properties") or {}).items():
        sub = _deref(side, sub)
        if isinstance(sub, dict) and sub.get("type") in ("number", "integer"):
            return f"{path}.{name}" if path else name
    return path


def _deref(side: Side, node: Any) -> Any:
    for _ in range(8):
        if isinstance(node, dict) and "$ref" in node:
            node = side.resolve(node["$ref"])
        else:
            break
    return node


def with_value(writer: Side, root: str, path: str, value: Any, rng) -> Any:
    path = _numeric_leaf(writer, path)
    segs = path.split(".") if path else []
    for _ in range(BASES * 4):
        base = random_datum(writer, root, rng)
        if base is NOTHING:
            continue
        datum = _put(base, segs, value)
        if writer.valid(datum):
            return datum
        datum = _put(base, segs, float(value))
        if writer.valid(datum):
            return datum
    return None


# --- running ---------------------------------------------------------------------------

def _dotted(path) -> str:
    return ".".join(str(p) for p in path if not isinstance(p, int))


# The driver passes the finding's path, so that of several errors the one there is reported.
FOCUSED = True


def _error_paths(err) -> tuple[str, ...]:
    path = _dotted(err.absolute_path)
    inst = err.instance if isinstance(err.instance, dict) else {}
    if err.validator == "required" and isinstance(err.validator_value, list):
        # The missing member lies below the object the error points at.
        missing = [m for m in err.validator_value if m not in inst]
        return tuple(f"{path}.{m}" if path else m for m in missing) or (path,)
    if err.validator == "additionalProperties" and isinstance(err.schema, dict):
        known = set(err.schema.get("properties") or {})
        extra = [k for k in inst if k not in known]
        return tuple(f"{path}.{k}" if path else k for k in extra) or (path,)
    return (path,)


def run(writer: Side, reader: Side, root: str, datum: Any, encoding: str | None = None,
        focus: str | None = None) -> Trial | None:
    """Validate under the writer (None if it rejects the datum), then under the reader."""
    from . import overlaps

    if datum is NOTHING or not writer.valid(datum):
        return None
    if reader.valid(datum):
        return Trial(datum, False, "valid under both schemas")
    err = reader.error(datum)
    if focus is not None and hasattr(err, "absolute_path"):
        try:
            near = [e for e in reader.validator.iter_errors(datum)
                    if any(overlaps(p, focus) for p in _error_paths(e)) and (focus or not _error_paths(e)[0])]
        except Exception:  # noqa: BLE001
            near = []
        err = near[0] if near else err
    if err is None or isinstance(err, Exception) and not hasattr(err, "absolute_path"):
        return Trial(datum, True, f"the reader cannot validate it: {err}", error=True)
    where = "/" + "/".join(str(p) for p in err.absolute_path)
    message = " ".join(str(err.message).split())
    if len(message) > 200:
        message = message[:197] + "..."
    paths = _error_paths(err)
    return Trial(datum, True, f"the reader rejects it: {message} (at {where}, keyword {err.validator})", paths)


def unshowable(finding, writer: Side, reader: Side) -> str | None:
    """Why no instance can show this finding with the installed jsonschema, if none can."""
    if "format" not in finding.kind:
        return None
    checker = getattr(reader.validator, "format_checker", None)
    formats = [v for k, v in finding.facts.items() if k in ("old_value", "new_value") and isinstance(v, str)]
    missing = [f for f in formats if checker is not None and f not in checker.checkers]
    if missing and len(missing) == len(formats):
        return (f"the installed jsonschema does not check format '{missing[0]}' (it needs an optional "
                "package), so no instance can show this change")
    return None
