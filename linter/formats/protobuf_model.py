"""The protobuf adapter's own model: messages, fields, enums and services of one side.

Built from protoc's FileDescriptorSet (names, declaration order, comments, positions) and
from a descriptor pool holding that set (resolved features: presence, packing, open or
closed enums, JSON names, defaults), so that proto2, proto3 and editions look alike here.

A message's fields, a position, an annotation are read from the descriptors only when the
differ asks for them: most types of a large file are written the same on both sides, and
``Message.same_as`` tells so from the descriptors' bytes without reading them field by field.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from functools import cached_property
from typing import Any

from ..model import Location
from .protobuf_source import Source

# Field numbers in descriptor.proto, used to find an element's entry in SourceCodeInfo.
F_MESSAGE, F_ENUM, F_SERVICE = 4, 5, 6
M_FIELD, M_NESTED, M_ENUM, M_ONEOF = 2, 3, 4, 8
E_VALUE, S_METHOD = 2, 2
F_PACKAGE = 2
TYPE_ENUM = 14  # FieldDescriptorProto.Type

# Extension numbers of linter/data/evolint/annotations.proto (FieldOptions and MessageOptions).
OPTION_KEYS = {58101: "unit", 58102: "meaning"}
COMMENT_KEY = re.compile(r"^\s*@(unit|meaning)\s*:\s*(.+?)\s*$")
# File options whose change renames generated code (descriptor.proto FileOptions).
NAMING_OPTIONS = ("java_package", "java_outer_classname", "java_multiple_files", "go_package",
                  "csharp_namespace", "objc_class_prefix", "php_namespace", "php_class_prefix",
                  "php_metadata_namespace", "ruby_package", "swift_prefix")


class _Placed:
    """An element whose position is looked up only when a change to it is reported."""

    source: Source
    path: tuple

    @property
    def loc(self) -> Location:
        return self.source.loc(self.path)


@dataclass(eq=False)
class Field(_Placed):
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
    ann: dict
    source: Source = field(repr=False)
    path: tuple = field(repr=False)


class Message(_Placed):
    """A message type. Names are read up front; fields, oneofs, reserved ranges, position and
    annotations on first use (``_read``)."""

    def __init__(self, full_name: str, name: str, parent: str | None, own: bool, proto, path: tuple,
                 source: Source, pool, top: Message | None):
        self.full_name, self.name, self.parent, self.own = full_name, name, parent, own
        self.file, self.package = source.fdp.name, source.fdp.package
        self.proto, self.path, self.source, self.pool = proto, path, source, pool
        self.top = top or self  # the top-level message holding this one (itself if top-level)
        self.map_entry = proto.options.map_entry

    def reserves(self, number: int | None = None, name: str | None = None) -> bool:
        if number is not None:
            return any(lo <= number <= hi for lo, hi in self.reserved_numbers)
        return name in self.reserved_names

    @cached_property
    def loc(self) -> Location:
        return self.source.loc(self.path)

    @cached_property
    def ann(self) -> dict:
        return _annotations(self.source.notes().get(self.path), self.proto)

    @cached_property
    def reserved_numbers(self) -> tuple[tuple[int, int], ...]:   # inclusive ranges
        return tuple((r.start, r.end - 1) for r in self.proto.reserved_range)  # end is exclusive

    @cached_property
    def reserved_names(self) -> frozenset[str]:
        return frozenset(self.proto.reserved_name)

    @property
    def fields(self) -> dict[int, Field]:
        return self._read[0]

    @property
    def oneofs(self) -> dict[str, tuple[int, ...]]:
        return self._read[1]

    @cached_property
    def by_name(self) -> dict[str, Field]:
        return {f.name: f for f in self.fields.values()}

    @cached_property
    def _read(self):
        proto, source, path = self.proto, self.source, self.path
        desc = self.pool.FindMessageTypeByName(self.full_name)
        notes = source.notes()
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
            field_path = path + (M_FIELD, j)
            fields[fp.number] = Field(
                name=fp.name, number=fp.number,
                type=_type_name(fd.type), type_name=type_name, label=label,
                presence=fd.has_presence, packed=bool(fd.is_repeated and fd.is_packed),
                oneof=real_oneof, json_name=fd.json_name,
                default=fd.default_value if label != "repeated" and fd.message_type is None else None,
                has_default=fd.has_default_value, is_map=is_map,
                ann=_annotations(notes.get(field_path), fp), source=source, path=field_path,
            )
        return fields, {k: tuple(v) for k, v in oneofs.items()}

    def same_as(self, other: Message) -> bool:
        """Whether both sides wrote this type alike, as far as its own descriptors tell.

        Equal bytes of the top-level message holding it (so nested types and inherited
        features too), the same file syntax, edition and features, and the same annotation
        comments. The caller checks what lies outside: the types its fields name.
        """
        return (self.full_name == other.full_name and self.path[2:] == other.path[2:]
                and self.top._digest == other.top._digest)

    @cached_property
    def _digest(self) -> tuple:
        return (self.source.context, self.proto.SerializeToString(), self.source.notes_under(self.path))

    @cached_property
    def enum_defaults(self) -> bool:
        """Whether a field names an enum value as its default (its number comes from the enum)."""
        if self.source.fdp.syntax == "proto3":  # no explicit defaults in proto3
            return False
        return any(fp.type == TYPE_ENUM and fp.HasField("default_value") for fp in self.proto.field)


@dataclass(eq=False)
class EnumValue(_Placed):
    name: str
    number: int
    source: Source = field(repr=False)
    path: tuple = field(repr=False)


@dataclass(eq=False)
class Enum(_Placed):
    full_name: str
    name: str
    file: str
    package: str
    values: tuple[EnumValue, ...]
    closed: bool
    reserved_numbers: tuple[tuple[int, int], ...]
    reserved_names: frozenset[str]
    own: bool
    source: Source = field(repr=False)
    path: tuple = field(repr=False)

    def names_of(self, number: int) -> list[str]:
        return [v.name for v in self.values if v.number == number]

    def number_of(self, name: str) -> int | None:
        return next((v.number for v in self.values if v.name == name), None)


@dataclass(eq=False)
class Method(_Placed):
    name: str
    input: str
    output: str
    client_streaming: bool
    server_streaming: bool
    source: Source = field(repr=False)
    path: tuple = field(repr=False)


@dataclass(eq=False)
class Service(_Placed):
    full_name: str
    name: str
    file: str
    package: str
    methods: dict[str, Method]
    source: Source = field(repr=False)
    path: tuple = field(repr=False)


@dataclass
class FileInfo:
    name: str
    display: str
    package: str
    syntax: str
    options: dict[str, Any]
    source: Source = field(repr=False)

    @property
    def loc(self) -> Location:
        return Location(self.display, 1, 1)

    @property
    def package_loc(self) -> Location:
        return self.source.loc((F_PACKAGE,)) if self.package else Location(self.display, 1, 1)


@dataclass
class Model:
    files: dict[str, FileInfo] = field(default_factory=dict)   # own files only, by virtual name
    messages: dict[str, Message] = field(default_factory=dict)  # every message, imports too
    enums: dict[str, Enum] = field(default_factory=dict)
    services: dict[str, Service] = field(default_factory=dict)  # own files only
    # The files whose types are compared; None: every file that is not an import.
    compared: frozenset[str] | None = None
    # Caches shared by the per-file views of one side (indexes, field steps, walks).
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


def _annotations(texts: tuple[str, str] | None, proto) -> dict:
    """Unit and meaning from the element's comments and evolint's custom options."""
    out = {}
    if texts is not None:
        lead, trail = texts
        out.update(_annotations_in(lead))
        for key, value in _annotations_in(trail).items():
            out.setdefault(key, value)
    if proto.HasField("options"):
        from google.protobuf.unknown_fields import UnknownFieldSet

        for item in UnknownFieldSet(proto.options):
            key = OPTION_KEYS.get(item.field_number)
            if key and isinstance(item.data, bytes):
                out[key] = item.data.decode("utf-8", errors="replace").strip()  # an option beats a comment
    return out


class _Builder:
    def __init__(self, pool, fdp, display: str, own: bool, model: Model):
        self.pool, self.fdp, self.own, self.model = pool, fdp, own, model
        self.source = Source(fdp, display)

    def build(self):
        fdp = self.fdp
        package = fdp.package
        prefix = f"{package}." if package else ""
        for i, proto in enumerate(fdp.message_type):
            self.message(proto, prefix + proto.name, None, (F_MESSAGE, i), None)
        for i, proto in enumerate(fdp.enum_type):
            self.enum(proto, prefix + proto.name, (F_ENUM, i))
        if not self.own:
            return
        source = self.source
        for i, proto in enumerate(fdp.service):
            path = (F_SERVICE, i)
            methods = {}
            for j, m in enumerate(proto.method):
                methods[m.name] = Method(m.name, m.input_type.lstrip("."), m.output_type.lstrip("."),
                                         m.client_streaming, m.server_streaming, source, path + (S_METHOD, j))
            full = prefix + proto.name
            self.model.services[full] = Service(full, proto.name, fdp.name, package, methods, source, path)
        options = {name: getattr(fdp.options, name) for name in NAMING_OPTIONS
                   if fdp.options.HasField(name)}
        self.model.files[fdp.name] = FileInfo(fdp.name, source.display, package, self._syntax(), options, source)

    def _syntax(self) -> str:
        fdp = self.fdp
        if fdp.syntax == "editions":
            from google.protobuf import descriptor_pb2

            return f"edition {descriptor_pb2.Edition.Name(fdp.edition)}"
        return fdp.syntax or "proto2"

    def message(self, proto, full: str, parent: str | None, path: tuple, top: Message | None):
        message = Message(full, proto.name, parent, self.own, proto, path, self.source, self.pool, top)
        self.model.messages[full] = message
        for j, nested in enumerate(proto.nested_type):
            self.message(nested, f"{full}.{nested.name}", full, path + (M_NESTED, j), message.top)
        for j, nested in enumerate(proto.enum_type):
            self.enum(nested, f"{full}.{nested.name}", path + (M_ENUM, j))

    def enum(self, proto, full: str, path: tuple):
        desc = self.pool.FindEnumTypeByName(full)
        source = self.source
        values = tuple(EnumValue(v.name, v.number, source, path + (E_VALUE, j)) for j, v in enumerate(proto.value))
        reserved = tuple((r.start, r.end) for r in proto.reserved_range)  # end is inclusive here
        self.model.enums[full] = Enum(full, proto.name, self.fdp.name, self.fdp.package, values,
                                      bool(desc.is_closed), reserved, frozenset(proto.reserved_name), self.own,
                                      source, path)


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
