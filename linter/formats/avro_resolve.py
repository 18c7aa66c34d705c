"""Schema resolution as the Avro specification 1.12.0 defines it ("Schema Resolution").

``resolve(writer, reader)`` lists every place where data written with ``writer`` cannot
be read with ``reader``: an empty list means the reader can read all of it. The differ
uses ``matches`` to pair union branches the way a reader would; the tests use
``resolve`` as an oracle independent of the differ's change kinds.
"""
from __future__ import annotations

from dataclasses import dataclass

from .avro_schema import Node

# "the writer's schema may be promoted to the reader's": writer type -> reader types.
PROMOTIONS = {
    "int": ("long", "float", "double"),
    "long": ("float", "double"),
    "float": ("double",),
    "string": ("bytes",),
    "bytes": ("string",),
}


@dataclass(frozen=True)
class Mismatch:
    path: str
    reason: str

    def __str__(self):
        return f"{self.path or '(root)'}: {self.reason}"


def promotable(writer: str, reader: str) -> bool:
    return reader in PROMOTIONS.get(writer, ())


def names_match(writer: Node, reader: Node) -> bool:
    """Named types match by unqualified name, or when the reader lists the writer's
    full name among its aliases (aliases are resolved against the reader's namespace)."""
    return writer.short == reader.short or writer.name in reader.aliases


def matches(writer: Node, reader: Node) -> bool:
    """The spec's list of what makes two (non-union) schemas match, before recursing."""
    if writer.kind != reader.kind:
        return promotable(writer.kind, reader.kind)
    kind = writer.kind
    if kind in ("record", "enum"):
        return names_match(writer, reader)
    if kind == "fixed":
        return names_match(writer, reader) and writer.size == reader.size and _decimals_match(writer, reader)
    if kind == "bytes":
        return _decimals_match(writer, reader)
    return True


def _decimals_match(writer: Node, reader: Node) -> bool:
    # 1.12.0, Logical Types: two decimal schemas match only with equal scale and precision.
    if writer.logical == reader.logical == "decimal":
        return (writer.precision, writer.scale) == (reader.precision, reader.scale)
    return True


def first_match(writer: Node, readers) -> Node | None:
    return next((r for r in readers if matches(writer, r)), None)


class Branches:
    """A union's branches, with each writer's first match found through an index.

    A named writer can only match a named reader of its short name or one listing its
    full name as an alias; an unnamed one only an unnamed reader (named kinds promote to
    nothing). Scanning every branch for every branch made a union of 10,000 records
    quadratic (tests/test_safety.py, the chain of types).
    """

    def __init__(self, readers: list[Node]):
        self.readers = readers
        self.position = {id(r): i for i, r in enumerate(readers)}
        self.named: dict[tuple[str, str], list[int]] = {}
        self.unnamed: list[int] = []
        for i, r in enumerate(readers):
            if r.named:
                self.named.setdefault(("short", r.short), []).append(i)
                for alias in r.aliases:
                    self.named.setdefault(("alias", alias), []).append(i)
            else:
                self.unnamed.append(i)

    def first_match(self, writer: Node) -> Node | None:
        if writer.named:
            candidates = self.named.get(("short", writer.short), []) + self.named.get(("alias", writer.name), [])
        else:
            candidates = self.unnamed
        best = min((i for i in candidates if matches(writer, self.readers[i])), default=None)
        return None if best is None else self.readers[best]

    def index(self, reader: Node) -> int:
        return self.position[id(reader)]


def resolve(writer: Node, reader: Node) -> list[Mismatch]:
    out: list[Mismatch] = []
    _resolve(writer, reader, "", out, set())
    return out


def _join(path: str, name: str) -> str:
    return f"{path}.{name}" if path else name


def _resolve(w: Node, r: Node, path: str, out: list, active: set) -> None:
    if r.kind == "union":
        for branch in (w.branches if w.kind == "union" else [w]):
            target = first_match(branch, r.branches)
            if target is None:
                out.append(Mismatch(path, f"writer's {branch.describe()} matches no branch of the reader's {r.describe()}"))
            else:
                _resolve(branch, target, path, out, active)
        return
    if w.kind == "union":
        for branch in w.branches:
            if matches(branch, r):
                _resolve(branch, r, path, out, active)
            else:
                out.append(Mismatch(path, f"writer's branch {branch.describe()} does not match the reader's {r.describe()}"))
        return
    if not matches(w, r):
        out.append(Mismatch(path, f"writer's {w.describe()} does not match the reader's {r.describe()}"))
        return
    key = (id(w), id(r))
    if key in active:  # recursive types: this pair is being resolved further up
        return
    active = active | {key}
    if w.kind == "record":
        for field in r.fields:
            source = w.field(field.name) or next((w.field(a) for a in field.aliases if w.field(a)), None)
            if source is None:
                if not field.has_default:
                    out.append(Mismatch(_join(path, field.name), "the reader's field has no default and the writer has no such field"))
                continue
            _resolve(source.type, field.type, _join(path, field.name), out, active)
    elif w.kind == "enum":
        unknown = [s for s in w.symbols if s not in r.symbols]
        if unknown and r.enum_default is None:
            out.append(Mismatch(path, f"writer's symbols {', '.join(unknown)} are unknown to the reader, which has no default"))
    elif w.kind in ("array", "map"):
        _resolve(w.items, r.items, path, out, active)
