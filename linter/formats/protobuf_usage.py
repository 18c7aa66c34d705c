"""Where each type of one side is used from its roots: the paths a finding is reported at.

A type is reported at every root that reaches it, under the shortest field path that leads
there (breadth first, fields in number order); a consumer registry is checked against each
root's dotted field paths. Both are worked out only for what is asked: types that nest each
other (a chain of messages, each holding the previous one, each a root) give every root all
the types below it, and listing them all up front is quadratic.

Maps are transparent: a map of messages continues into the value's fields.
"""
from __future__ import annotations

from collections import deque

from .protobuf_model import Model

TYPE_MESSAGE, TYPE_GROUP = 11, 10  # FieldDescriptorProto.Type


def steps(model: Model, type_name: str) -> list:
    """(field name, types reached, type descended into) per field of a message, in number order."""
    cache = model.shared.setdefault("steps", {})
    found = cache.get(type_name)
    if found is None:
        message = model.messages.get(type_name)
        found = cache[type_name] = _steps(model, message) if message is not None else []
    return found


def _steps(model: Model, message) -> list:
    messages = model.messages
    return [(fp.name, *_reach(messages, fp)) for fp in sorted(message.proto.field, key=lambda fp: fp.number)]


def _reach(messages: dict, fp) -> tuple[list[str], str | None]:
    """The types one field leads to: its own, and for a map the entry and the value's type;
    and the type a walk descends into (for a map, the value's)."""
    target = fp.type_name.lstrip(".") if fp.type_name else None
    entry = messages.get(target) if fp.type in (TYPE_MESSAGE, TYPE_GROUP) else None
    if entry is not None and entry.map_entry:
        value = next((v for v in entry.proto.field if v.number == 2), None)
        inner = value.type_name.lstrip(".") if value is not None and value.type_name else None
        return [t for t in (target, inner) if t], inner
    return ([target] if target else []), target


class _Walk:
    """A breadth-first walk from one root, taken only as far as asked."""

    def __init__(self, model: Model, root: str):
        self.model = model
        self.found = {root: ""}   # type -> the first path prefix it was reached at
        self.seen = {root}
        self.queue = deque([(root, "")])

    def prefix(self, target: str) -> str | None:
        found, seen, queue, messages = self.found, self.seen, self.queue, self.model.messages
        while target not in found and queue:
            type_name, prefix = queue.popleft()
            for name, reached, inner in steps(self.model, type_name):
                path = f"{prefix}.{name}" if prefix else name
                for t in reached:
                    found.setdefault(t, path)
                if inner and inner not in seen and inner in messages:
                    seen.add(inner)
                    queue.append((inner, path))
        return found.get(target)


class Uses:
    """type full name -> {root: shortest path prefix}, for the roots that reach the type."""

    def __init__(self, model: Model, roots: tuple[str, ...]):
        self.model, self.roots = model, roots
        self._roots = frozenset(roots)
        self._asked: dict[str, dict[str, str]] = {}

    def get(self, type_name: str, default=None):
        if type_name not in self._asked:
            users = self._users_of(type_name)
            walks = self.model.shared.setdefault("walks", {})
            out = {}
            for root in self.roots:
                if root == type_name:
                    out[root] = ""
                elif root in users:
                    walk = walks.get(root) or walks.setdefault(root, _Walk(self.model, root))
                    out[root] = walk.prefix(type_name)
            self._asked[type_name] = out
        return self._asked[type_name] or default

    def _users_of(self, type_name: str) -> set[str]:
        """The messages whose walk reaches the type: those with a field of it, and those above them."""
        used_by, held_by = self._graph()
        found = set(used_by.get(type_name, ()))
        stack = list(found)
        while stack:
            for holder in held_by.get(stack.pop(), ()):
                if holder not in found:
                    found.add(holder)
                    stack.append(holder)
        return found & self._roots

    def _graph(self):
        """type -> messages with a field reaching it; message -> messages descending into it.

        Read from the descriptors of every message once (field order does not matter here).
        """
        graph = self.model.shared.get("graph")
        if graph is None:
            used_by: dict[str, set[str]] = {}
            held_by: dict[str, set[str]] = {}
            messages = self.model.messages
            for name, message in messages.items():
                for fp in message.proto.field:
                    if not fp.type_name:
                        continue
                    reached, inner = _reach(messages, fp)
                    for t in reached:
                        used_by.setdefault(t, set()).add(name)
                    if inner and inner in messages:
                        held_by.setdefault(inner, set()).add(name)
            graph = self.model.shared["graph"] = (used_by, held_by)
        return graph


def field_paths(model: Model, root: str, limit: int = 2000) -> frozenset[str]:
    """A root's dotted field paths; the list stops at recursion and at ``limit`` paths
    (a tree of shared types can have exponentially many)."""
    found: set[str] = set()
    stack = [(root, "", (root,))]
    while stack and len(found) < limit:
        type_name, prefix, way = stack.pop()
        for name, _, inner in steps(model, type_name):
            path = f"{prefix}.{name}" if prefix else name
            found.add(path)
            if inner and inner in model.messages and inner not in way:
                stack.append((inner, path, way + (inner,)))
    return frozenset(found)
