"""The protobuf adapter's own model: messages, fields, enums and services of one side.

Built from protoc's FileDescriptorSet (names, declaration order, comments, positions) and
from a descriptor pool holding that set (resolved features: presence, packing, open or
closed enums, JSON names, defaults), so that proto2, proto3 and editions look alike here.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

from ..model import Location

# Field numbers in descriptor.proto, used to find an element's entry in SourceCodeInfo.
F_MESSAGE, F_ENUM, F_SERVICE = 4, 5, 6
M_FIELD, M_NESTED, M_ENUM, M_ONEOF = 2, 3, 4, 8
E_VALUE, S_METHOD = 2, 2
F_PACKAGE = 2

# Extension numbers of linter/data/evolint/annotations.proto (FieldOptions and MessageOptions).
OPTION_KEYS = {58101: "unit", 58102: "meaning"}
COMMENT_KEY = re.compile(r"^\s*@(unit|meaning)\s*:\s*(.+?)\s*$")
# File options whose change renames generated code (descriptor.proto FileOptions).
NAMING_OPTIONS = ("java_package", "java_outer_classname", "java_multiple_files", "go_package",
                  "csharp_namespace", "objc_class_prefix", "php_namespace", "php_class_prefix",
                  "php_metadata_namespace", "ruby_package", "swift_prefix")


@dataclass
class Field:
    name: str
    number: int
    type: str                 # "int32", "string", "message", "enum", "group", ...
    type_name: str | None     # full name of a message or enum type
    label: str                # "optional", "repeated" or "required"
    presence: bool            # explicit presence (has_ in generated code)
    packed: bool
    oneof: str | None         # the real (not synthetic) oneof holding the field
    json_name: str
    default: Any
    has_default: bool
    is_map: bool
    loc: Location
    ann: dict


@dataclass
class Message:
    full_name: str
    name: str
    file: str
    package: str
    parent: str | None
    loc: Location
    fields: dict[int, Field]
    oneofs: dict[str, tuple[int, ...]]
    reserved_numbers: tuple[tuple[int, int], ...]   # inclusive ranges
    reserved_names: frozenset[str]
    map_entry: bool
    ann: dict
    own: bool                 # defined in a compared file, not an import

    def reserves(self, number: int | None = None, name: str | None = None) -> bool:
        if number is not None:
            return any(lo <= number <= hi for lo, hi in self.reserved_numbers)
        return name in self.reserved_names


@dataclass
class EnumValue:
    name: str
    number: int
    loc: Location


@dataclass
class Enum:
    full_name: str
    name: str
    file: str
    package: str
    loc: Location
    values: tuple[EnumValue, ...]
    closed: bool
    reserved_numbers: tuple[tuple[int, int], ...]
    reserved_names: frozenset[str]
    own: bool

    def names_of(self, number: int) -> list[str]:
        return [v.name for v in self.values if v.number == number]

    def number_of(self, name: str) -> int | None:
        return next((v.number for v in self.values if v.name == name), None)


@dataclass
class Method:
    name: str
    input: str
    output: str
    client_streaming: bool
    server_streaming: bool
    loc: Location


@dataclass
class Service:
    full_name: str
    name: str
    file: str
    package: str
    loc: Location
    methods: dict[str, Method]


@dataclass
class FileInfo:
    name: str
    display: str
    package: str
    syntax: str
    loc: Location
    package_loc: Location
    options: dict[str, Any]


@dataclass
class Model:
    files: dict[str, FileInfo] = field(default_factory=dict)   # own files only, by virtual name
    messages: dict[str, Message] = field(default_factory=dict)  # every message, imports too
    enums: dict[str, Enum] = field(default_factory=dict)
    services: dict[str, Service] = field(default_factory=dict)  # own files only
    # The files whose types are compared; None: every file that is not an import.
    compared: frozenset[str] | None = None
    # Caches shared by the per-file views of one side (indexes, field steps).
    shared: dict = field(default_factory=dict)

    def _mine(self, item) -> bool:
        return item.own if self.compared is None else item.file in self.compared

    def own_messages(self) -> dict[str, Message]:
        if self.compared is not None:
            index = self.shared.setdefault("by_file", {})
            if not index:
                for k, m in self.messages.items():
                    index.setdefault(m.file, {})[k] = m
            return {k: m for f in sorted(self.compared) for k, m in index.get(f, {}).items()}
        return {k: m for k, m in self.messages.items() if self._mine(m)}

    def own_enums(self) -> dict[str, Enum]:
        return {k: e for k, e in self.enums.items() if self._mine(e)}


def _annotations_in(comment: str) -> dict:
    out = {}
    for line in comment.splitlines():
        match = COMMENT_KEY.match(line)
        if match:
            out.setdefault(match[1], match[2])
    return out


def _annotations(info, options) -> dict:
    """Unit and meaning from the element's comments and evolint's custom options."""
    from google.protobuf.unknown_fields import UnknownFieldSet

    out = {}
    if info is not None:
        out.update(_annotations_in(info.leading_comments))
        for key, value in _annotations_in(info.trailing_comments).items():
            out.setdefault(key, value)
    for item in UnknownFieldSet(options):
        key = OPTION_KEYS.get(item.field_number)
        if key and isinstance(item.data, bytes):
            out[key] = item.data.decode("utf-8", errors="replace").strip()  # an option beats a comment
    return out


class _Builder:
    def __init__(self, pool, fdp, display: str, own: bool, model: Model):
        self.pool, self.fdp, self.display, self.own, self.model = pool, fdp, display, own, model
        self.where = {tuple(loc.path): loc for loc in fdp.source_code_info.location}

    def loc(self, path: tuple) -> Location:
        info = self.where.get(path)
        if info is None or not info.span:
            return Location(self.display)
        return Location(self.display, info.span[0] + 1, info.span[1] + 1)

    def build(self):
        fdp = self.fdp
        package = fdp.package
        prefix = f"{package}." if package else ""
        for i, proto in enumerate(fdp.message_type):
            self.message(proto, prefix + proto.name, None, (F_MESSAGE, i))
        for i, proto in enumerate(fdp.enum_type):
            self.enum(proto, prefix + proto.name, (F_ENUM, i))
        if not self.own:
            return
        for i, proto in enumerate(fdp.service):
            path = (F_SERVICE, i)
            methods = {}
            for j, m in enumerate(proto.method):
                methods[m.name] = Method(m.name, m.input_type.lstrip("."), m.output_type.lstrip("."),
                                         m.client_streaming, m.server_streaming,
                                         self.loc(path + (S_METHOD, j)))
            full = prefix + proto.name
            self.model.services[full] = Service(full, proto.name, fdp.name, package, self.loc(path), methods)
        options = {name: getattr(fdp.options, name) for name in NAMING_OPTIONS
                   if fdp.options.HasField(name)}
        package_loc = self.loc((F_PACKAGE,)) if package else Location(self.display, 1, 1)
        self.model.files[fdp.name] = FileInfo(fdp.name, self.display, package, self._syntax(),
                                              Location(self.display, 1, 1), package_loc, options)

    def _syntax(self) -> str:
        fdp = self.fdp
        if fdp.syntax == "editions":
            from google.protobuf import descriptor_pb2

            return f"edition {descriptor_pb2.Edition.Name(fdp.edition)}"
        return fdp.syntax or "proto2"

    def message(self, proto, full: str, parent: str | None, path: tuple):
        desc = self.pool.FindMessageTypeByName(full)
        oneof_names = [o.name for o in proto.oneof_decl]
        fields = {}
        oneofs: dict[str, list[int]] = {}
        for j, fp in enumerate(proto.field):
            fd = desc.fields_by_number[fp.number]
            real_oneof = (oneof_names[fp.oneof_index]
                          if fp.HasField("oneof_index") and not fp.proto3_optional else None)
            if real_oneof:
                oneofs.setdefault(real_oneof, []).append(fp.number)
            type_name = None
            is_map = False
            if fd.message_type is not None:
                type_name = fd.message_type.full_name
                is_map = fd.message_type.GetOptions().map_entry
            elif fd.enum_type is not None:
                type_name = fd.enum_type.full_name
            label = "required" if fd.is_required else "repeated" if fd.is_repeated else "optional"
            info = self.where.get(path + (M_FIELD, j))
            fields[fp.number] = Field(
                name=fp.name, number=fp.number,
                type=_type_name(fd.type), type_name=type_name, label=label,
                presence=fd.has_presence, packed=bool(fd.is_repeated and fd.is_packed),
                oneof=real_oneof, json_name=fd.json_name,
                default=fd.default_value if label != "repeated" and fd.message_type is None else None,
                has_default=fd.has_default_value, is_map=is_map,
                loc=self.loc(path + (M_FIELD, j)), ann=_annotations(info, fp.options),
            )
        reserved = tuple((r.start, r.end - 1) for r in proto.reserved_range)  # end is exclusive
        self.model.messages[full] = Message(
            full_name=full, name=proto.name, file=self.fdp.name, package=self.fdp.package,
            parent=parent, loc=self.loc(path), fields=fields,
            oneofs={k: tuple(v) for k, v in oneofs.items()}, reserved_numbers=reserved,
            reserved_names=frozenset(proto.reserved_name), map_entry=proto.options.map_entry,
            ann=_annotations(self.where.get(path), proto.options), own=self.own,
        )
        for j, nested in enumerate(proto.nested_type):
            self.message(nested, f"{full}.{nested.name}", full, path + (M_NESTED, j))
        for j, nested in enumerate(proto.enum_type):
            self.enum(nested, f"{full}.{nested.name}", path + (M_ENUM, j))

    def enum(self, proto, full: str, path: tuple):
        desc = self.pool.FindEnumTypeByName(full)
        values = tuple(EnumValue(v.name, v.number, self.loc(path + (E_VALUE, j)))
                       for j, v in enumerate(proto.value))
        reserved = tuple((r.start, r.end) for r in proto.reserved_range)  # end is inclusive here
        self.model.enums[full] = Enum(full, proto.name, self.fdp.name, self.fdp.package,
                                      self.loc(path), values, bool(desc.is_closed), reserved,
                                      frozenset(proto.reserved_name), self.own)


_TYPES: dict[int, str] = {}


def _type_name(number: int) -> str:
    if not _TYPES:
        from google.protobuf import descriptor_pb2

        for name, value in descriptor_pb2.FieldDescriptorProto.Type.items():
            _TYPES[value] = name.removeprefix("TYPE_").lower()
    return _TYPES[number]


def build(fds, pool, displays: dict[str, str]) -> Model:
    """The model of one side; ``displays`` maps the compared files' virtual names to their display names."""
    model = Model()
    for fdp in fds.file:
        own = fdp.name in displays
        _Builder(pool, fdp, displays.get(fdp.name, fdp.name), own, model).build()
    return model


def _targets(model: Model, f: Field):
    """The types a field leads to: its own, and for a map the entry and the value's type."""
    if not f.is_map:
        return [f.type_name] if f.type_name else [], f.type_name
    entry = model.messages.get(f.type_name)
    value = entry.fields.get(2) if entry else None
    inner = value.type_name if value else None
    return [t for t in (f.type_name, inner) if t], inner


def usage(model: Model, roots: list[str], limit: int = 2000):
    """For each root: its dotted field paths, and the shortest path at which each type is used.

    Maps are transparent (a map of messages continues into the value's fields). Types are
    visited once per root for the shortest paths; the list of all paths stops at recursion
    and at ``limit`` paths per root (a tree of shared types can have exponentially many).
    """
    paths: dict[str, set[str]] = {}
    first: dict[str, dict[str, str]] = {}   # type full name -> root -> prefix
    steps = model.shared.setdefault("steps", {})

    def fields_of(type_name: str) -> list:
        """(field name, types reached, type descended into) per field, in number order; cached."""
        if type_name not in steps:
            message = model.messages.get(type_name)
            steps[type_name] = [(f.name, *_targets(model, f))
                                for f in sorted(message.fields.values(), key=lambda f: f.number)] if message else []
        return steps[type_name]

    for root in roots:
        first.setdefault(root, {})[root] = ""
        seen = {root}
        queue = [(root, "")]
        while queue:
            type_name, prefix = queue.pop(0)
            for name, reached, inner in fields_of(type_name):
                path = f"{prefix}.{name}" if prefix else name
                for target in reached:
                    first.setdefault(target, {}).setdefault(root, path)
                if inner and inner not in seen and inner in model.messages:
                    seen.add(inner)
                    queue.append((inner, path))
        found: set[str] = set()
        stack = [(root, "", (root,))]
        while stack and len(found) < limit:
            type_name, prefix, way = stack.pop()
            for name, _, inner in fields_of(type_name):
                path = f"{prefix}.{name}" if prefix else name
                found.add(path)
                if inner and inner in model.messages and inner not in way:
                    stack.append((inner, path, way + (inner,)))
        paths[root] = found
    return paths, first
