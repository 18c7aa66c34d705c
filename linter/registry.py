"""The consumer registry file: read it as plain YAML data, check it, build the entries.

The file is read with PyYAML's safe loader only. It is first composed into nodes, whose
marks give every error its line and column, and a file whose nodes carry tags that
construct objects (``!!python/object``, custom ``!tags``) is refused before anything is
built. The data is then validated against ``linter/data/consumers.schema.json``.
"""
from __future__ import annotations

import json
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from .errors import InputError
from .formats import read_text
from .paths import Pattern, PatternError, is_glob, parse

SCHEMA = Path(__file__).parent / "data" / "consumers.schema.json"
MAX_NODES = 100_000  # far above any real registry; stops alias bombs before they are built
TYPE_WORDS = {"array": "a list", "object": "a mapping", "string": "text", "integer": "a number",
              "boolean": "true or false", "null": "empty"}


@dataclass(frozen=True)
class Read:
    """One schema a consumer reads, and the fields it reads there (None: every field)."""

    schema: str
    fields: tuple[Pattern, ...] | None = None
    line: int | None = None

    @property
    def by_file(self) -> bool:
        """Whether ``schema`` is a file glob rather than a root type's full name."""
        return is_glob(self.schema)


@dataclass(frozen=True)
class Consumer:
    name: str
    contact: str
    reads: tuple[Read, ...]
    team: str | None = None
    channel: str | None = None
    needs: str | None = None  # None: the run's mode
    line: int | None = None


@dataclass(frozen=True)
class Registry:
    file: str
    consumers: tuple[Consumer, ...]


@lru_cache(maxsize=1)
def _validator():
    from jsonschema import Draft202012Validator

    return Draft202012Validator(json.loads(SCHEMA.read_text(encoding="utf-8")))


def load(path: str | Path) -> Registry:
    display = str(path)
    text = read_text(Path(path), display)
    root = _compose(text, display)
    if root is None:
        raise InputError("the consumer registry is empty; expected a mapping with a 'consumers' list", display, 1)
    _check_nodes(root, display)
    import yaml

    try:
        data = yaml.safe_load(text)  # the nodes passed the checks above, so this builds plain data
    except yaml.YAMLError as exc:  # what only the builder sees, e.g. `<<` merging a list
        raise _yaml_error(exc, display) from None
    except (ValueError, TypeError, OverflowError) as exc:  # a value check above missed
        raise InputError(f"invalid YAML value: {exc}", display) from None
    _validate(data, root, display)
    return _build(data, root, display)


def _compose(text: str, display: str):
    import yaml

    try:
        return yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.YAMLError as exc:
        raise _yaml_error(exc, display) from None
    except RecursionError:
        raise InputError("YAML nested too deeply to read", display) from None


def _yaml_error(exc, display: str) -> InputError:
    import yaml

    if isinstance(exc, yaml.MarkedYAMLError):
        mark = exc.problem_mark or exc.context_mark
        problem = " ".join(p for p in (exc.context, exc.problem) if p)
        return InputError(f"invalid YAML: {problem}", display,
                          mark.line + 1 if mark else None, mark.column + 1 if mark else None)
    return InputError(f"invalid YAML: {exc}", display)


def _check_nodes(root, display: str) -> None:
    """Refuse tags the safe loader would not build as plain data, and duplicate keys."""
    import yaml

    merge = "tag:yaml.org,2002:merge"  # the `<<` key: the composer resolves it, the builder merges it
    allowed = {tag for tag in yaml.SafeLoader.yaml_constructors if tag} | {merge}
    builder = yaml.SafeLoader("")
    stack, seen = [root], set()
    while stack:
        node = stack.pop()
        if id(node) in seen:  # anchors and aliases share nodes
            continue
        seen.add(id(node))
        if node.tag not in allowed:
            raise InputError(f"YAML tag {_short_tag(node.tag)} is not allowed: the registry is plain data "
                             "(no object construction tags)", display, *_mark(node))
        if isinstance(node, yaml.ScalarNode) and node.tag not in ("tag:yaml.org,2002:str", merge):
            try:  # constructors raise bare ValueErrors, e.g. for an impossible date or `!!int x`
                builder.yaml_constructors[node.tag](builder, node)
            except (ValueError, TypeError, OverflowError, yaml.YAMLError) as exc:
                raise InputError(f"invalid {_short_tag(node.tag)} value {node.value!r}: {exc}",
                                 display, *_mark(node)) from None
        if isinstance(node, yaml.MappingNode):
            keys = {}
            for key, value in node.value:
                if not isinstance(key, yaml.ScalarNode):
                    raise InputError("a key must be plain text, not a list or a mapping", display, *_mark(key))
                if key.tag not in (merge, "tag:yaml.org,2002:str"):
                    # `? ` alone, `1:`, `true:`: keys the schema check cannot match as text
                    raise InputError(f"a key must be plain text, not {_short_tag(key.tag)} {key.value!r}",
                                     display, *_mark(key))
                if key.tag != merge:
                    if key.value in keys:
                        raise InputError(f"duplicate key {key.value!r} (first at line {keys[key.value]})",
                                         display, *_mark(key))
                    keys[key.value] = key.start_mark.line + 1
                stack += [key, value]
        elif isinstance(node, yaml.SequenceNode):
            stack += node.value
    size = _expanded_size(root)
    if size < 0:
        raise InputError("the registry refers to itself through an alias", display, *_mark(root))
    if size > MAX_NODES:
        raise InputError(f"the registry expands to more than {MAX_NODES} values through its aliases; "
                         "refusing to read it", display, *_mark(root))


def _expanded_size(root) -> int:
    """How many values the data holds once aliases are expanded (a few aliases can nest
    into billions), counted per distinct node so that the count itself stays cheap."""
    import yaml

    def children(node):
        if isinstance(node, yaml.MappingNode):
            return [n for pair in node.value for n in pair]
        return node.value if isinstance(node, yaml.SequenceNode) else []

    sizes: dict[int, int] = {}
    stack = [(root, False)]
    while stack:  # post-order without recursion: a node's size after all of its children's
        node, done = stack.pop()
        if done:
            sizes[id(node)] = min(MAX_NODES + 1, 1 + sum(sizes[id(c)] for c in children(node)))
            continue
        if id(node) in sizes:
            if sizes[id(node)] < 0:  # reached again while still open: the data refers to itself
                return -1
            continue
        sizes[id(node)] = -1
        stack.append((node, True))
        stack += [(c, False) for c in children(node)]
    return sizes[id(root)]


def _short_tag(tag: str) -> str:
    prefix = "tag:yaml.org,2002:"
    return "!!" + tag[len(prefix):] if tag.startswith(prefix) else tag


def _mark(node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


def node_at(root, path) -> tuple[object, object | None]:
    """The node at a data path (keys and indices), and the key node naming it if any."""
    import yaml

    node, key_node = root, None
    for step in path:
        if isinstance(node, yaml.MappingNode) and isinstance(step, str):
            for k, v in node.value:
                if isinstance(k, yaml.ScalarNode) and k.value == step:
                    node, key_node = v, k
                    break
            else:
                return node, key_node
        elif isinstance(node, yaml.SequenceNode) and isinstance(step, int) and step < len(node.value):
            node, key_node = node.value[step], None
        else:
            return node, key_node
    return node, key_node


def _entry_label(data, path) -> str:
    """'consumer "billing"' for errors inside an entry; the file itself otherwise."""
    if len(path) >= 2 and path[0] == "consumers" and isinstance(path[1], int):
        entry = data["consumers"][path[1]]
        name = entry.get("name") if isinstance(entry, dict) else None
        return f"consumer {name!r}" if isinstance(name, str) and name.strip() else f"consumers entry {path[1] + 1}"
    return "registry"


def _where(path) -> str:
    """The member an error is about, e.g. "reads[2].fields"."""
    out = ""
    for step in list(path)[2:]:
        out += f"[{step + 1}]" if isinstance(step, int) else (f".{step}" if out else step)
    return out


def _validate(data, root, display: str) -> None:
    try:
        errors = list(_validator().iter_errors(data))
    except RecursionError:
        raise InputError("the registry is nested too deeply to check", display) from None
    if not errors:
        return
    # The first error in file order is the one to fix first.
    def position(error):
        # An unknown key is usually a misspelt required one: report it before the missing key.
        node, key = node_at(root, error.absolute_path)
        return _mark(key or node), error.validator != "additionalProperties"

    error = min(errors, key=position)
    path = list(error.absolute_path)
    node, key = node_at(root, path)
    label, member = _entry_label(data, path), _where(path)
    about = f"'{member}'" if member else (f"'{path[-1]}'" if path and isinstance(path[-1], str)
                                          else "the top level" if not path else "the entry")
    if error.validator == "additionalProperties":
        import re

        props, free = error.schema.get("properties", {}), list(error.schema.get("patternProperties", {}))
        known = ", ".join(props) + (", or keys starting with 'x-'" if free else "")
        extra = [k for k in error.instance if k not in props and not any(re.search(p, k) for p in free)]
        node, key = node_at(root, path + [extra[0]])
        text = f"unknown key {extra[0]!r} (known: {known})"
    elif error.validator == "required":
        missing = [k for k in error.validator_value if k not in error.instance]
        text = f"missing {missing[0]!r}" + (f" in '{member}'" if member else "")
    elif error.validator == "type":
        wanted = error.validator_value if isinstance(error.validator_value, str) else error.validator_value[0]
        text = f"{about} must be {TYPE_WORDS.get(wanted, wanted)}"
    elif error.validator == "enum":
        text = f"{about} must be one of {', '.join(map(str, error.validator_value))}, not {error.instance!r}"
    elif error.validator == "minItems":
        text = f"{about} is an empty list; name at least one item or leave the key out"
    elif error.validator in ("minLength", "pattern"):
        text = f"{about} is empty"
    else:  # a check this schema may grow later: jsonschema's own words
        text = f"{about}: {error.message}"
    raise InputError(f"{label}: {text}", display, *_mark(key or node))


def _build(data, root, display: str) -> Registry:
    consumers, names = [], {}
    for i, entry in enumerate(data["consumers"]):
        entry_node, _ = node_at(root, ["consumers", i])
        line = _mark(entry_node)[0]
        name = entry["name"].strip()
        if name in names:
            raise InputError(f"consumer {name!r} is named twice (first at line {names[name]})",
                             display, *_mark(node_at(root, ["consumers", i, "name"])[0]))
        names[name] = line
        reads = []
        for j, read in enumerate(entry["reads"]):
            patterns = None
            if "fields" in read:
                patterns = []
                for k, text in enumerate(read["fields"]):
                    try:
                        patterns.append(parse(text))
                    except PatternError as exc:
                        node, _ = node_at(root, ["consumers", i, "reads", j, "fields", k])
                        raise InputError(f"consumer {name!r}: {exc}", display, *_mark(node)) from None
                patterns = tuple(patterns)
            read_node, _ = node_at(root, ["consumers", i, "reads", j])
            reads.append(Read(read["schema"].strip(), patterns, _mark(read_node)[0]))
        consumers.append(Consumer(name=name, contact=entry["contact"].strip(), reads=tuple(reads),
                                  team=entry.get("team"), channel=entry.get("channel"),
                                  needs=entry.get("needs"), line=line))
    return Registry(display, tuple(consumers))
