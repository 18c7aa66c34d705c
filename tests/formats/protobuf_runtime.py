"""Helpers for the runtime cross-check: random messages from descriptors, and value comparison.

Messages are built with the real protobuf runtime (``message_factory.GetMessageClass``) from
each side's own descriptor pool, written with one side and read with the other, in the
binary encoding and through ``json_format``; values are compared field number by field number.
"""
from __future__ import annotations

from pathlib import Path

from hypothesis import strategies as st

from linter.formats.protobuf_compile import Source, compile_set, pool_of
from linter.formats.protobuf_types import RANGES

STRINGS = st.one_of(st.sampled_from(["", "é", "水位", "a\x00b"]),
                    st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=5))
BYTES = st.one_of(st.sampled_from([b"", b"\xff\xfe", "é".encode()]), st.binary(max_size=5))
# The JSON mapping cannot round-trip the largest float (shared/FACTS.md), so floats stay below it.
FLOATS = st.floats(width=32, allow_nan=False, allow_infinity=False, min_value=-9.999999680285692e37,
                   max_value=9.999999680285692e37)
DOUBLES = st.floats(allow_nan=False, allow_infinity=False)


def classes(path: Path) -> dict:
    """Message classes of one file's own top-level messages, from a pool of its own."""
    from google.protobuf import message_factory

    source = Source(path, str(path), path.parent)
    fds = compile_set([source])
    pool = pool_of(fds)
    own = next(f for f in fds.file if f.name == source.virtual)
    prefix = f"{own.package}." if own.package else ""
    return {prefix + m.name: message_factory.GetMessageClass(pool.FindMessageTypeByName(prefix + m.name))
            for m in own.message_type}


def _integers(kind: str):
    lo, hi = RANGES[kind]
    return st.one_of(st.sampled_from([0, 1, -1 if lo < 0 else 2, lo, hi]), st.integers(lo, hi))


def _scalar(fd):
    from google.protobuf.descriptor import FieldDescriptor as F

    t = fd.type
    if t == F.TYPE_BOOL:
        return st.booleans()
    if t == F.TYPE_ENUM:
        declared = st.sampled_from([v.number for v in fd.enum_type.values])
        if fd.enum_type.is_closed:
            return declared
        return st.one_of(declared, _integers("int32"))  # an open enum field holds any int32
    if t == F.TYPE_FLOAT:
        return FLOATS
    if t == F.TYPE_DOUBLE:
        return DOUBLES
    if t == F.TYPE_STRING:
        return STRINGS
    if t == F.TYPE_BYTES:
        return BYTES
    names = {F.TYPE_INT32: "int32", F.TYPE_SINT32: "sint32", F.TYPE_SFIXED32: "sfixed32",
             F.TYPE_UINT32: "uint32", F.TYPE_FIXED32: "fixed32", F.TYPE_INT64: "int64",
             F.TYPE_SINT64: "sint64", F.TYPE_SFIXED64: "sfixed64", F.TYPE_UINT64: "uint64",
             F.TYPE_FIXED64: "fixed64"}
    return _integers(names[t])


def _synthetic(oneof) -> bool:
    return len(oneof.fields) == 1 and oneof.name == "_" + oneof.fields[0].name


def _is_map(fd) -> bool:
    return fd.message_type is not None and fd.message_type.GetOptions().map_entry


@st.composite
def messages(draw, cls, depth: int = 0):
    """A message of ``cls`` with every field drawn (edge values included), at most one per oneof."""
    from google.protobuf import message_factory

    msg = cls()
    desc = cls.DESCRIPTOR
    if depth > 2:
        return msg
    chosen = {o.name: draw(st.sampled_from([None, *o.fields])) for o in desc.oneofs if not _synthetic(o)}
    for fd in desc.fields:
        oneof = fd.containing_oneof
        if oneof is not None and not _synthetic(oneof):
            if chosen[oneof.name] is not fd:
                continue
        elif not draw(st.booleans()):
            continue  # leave some fields unset
        if _is_map(fd):
            key_fd, value_fd = fd.message_type.fields_by_number[1], fd.message_type.fields_by_number[2]
            keys = draw(st.lists(_scalar(key_fd), max_size=3, unique=True))
            target = getattr(msg, fd.name)
            for key in keys:
                if value_fd.message_type is not None:
                    value_cls = message_factory.GetMessageClass(value_fd.message_type)
                    target[key].CopyFrom(draw(messages(value_cls, depth + 1)))
                else:
                    target[key] = draw(_scalar(value_fd))
            continue
        if fd.message_type is not None:
            sub = message_factory.GetMessageClass(fd.message_type)
            if fd.is_repeated:
                for item in draw(st.lists(messages(sub, depth + 1), max_size=2)):
                    getattr(msg, fd.name).add().CopyFrom(item)
            else:
                getattr(msg, fd.name).CopyFrom(draw(messages(sub, depth + 1)))
            continue
        if fd.is_repeated:
            getattr(msg, fd.name).extend(draw(st.lists(_scalar(fd), max_size=3)))
        else:
            setattr(msg, fd.name, draw(_scalar(fd)))
    return msg


# -- reading back ----------------------------------------------------------------------------

def _items(msg, fd) -> list:
    """A field's values as a list: repeated as is, singular as [] (absent) or [value]."""
    value = getattr(msg, fd.name)
    if _is_map(fd):
        return sorted(((k, value[k]) for k in value), key=lambda kv: repr(kv[0]))
    if fd.is_repeated:
        items = list(value)
        entry = fd.message_type
        if entry is not None and set(entry.fields_by_number) == {1, 2} and \
                {f.name for f in entry.fields} == {"key", "value"}:  # a map's twin, compared as pairs
            return sorted(((e.key, e.value) for e in items), key=lambda kv: repr(kv[0]))
        return items
    if fd.message_type is not None or fd.has_presence:
        return [value] if msg.HasField(fd.name) else []
    return [value] if value != fd.default_value else []


def _norm(value):
    if isinstance(value, bool):
        return int(value)
    if isinstance(value, str):
        return value.encode("utf-8")
    return value


_BY_NAME = [False]  # the comparison mode of the round trip in progress, for nested messages


def _same(a, b) -> bool:
    from google.protobuf.message import Message

    if isinstance(a, tuple) and isinstance(b, tuple):
        return _same(a[0], b[0]) and _same(a[1], b[1])
    if isinstance(a, tuple) or isinstance(b, tuple):
        return False
    if isinstance(a, Message) and isinstance(b, Message):
        return same_message(a, b, _BY_NAME[0])
    if isinstance(a, Message):
        return isinstance(b, bytes) and a.SerializePartialToString(deterministic=True) == b
    if isinstance(b, Message):
        return isinstance(a, bytes) and b.SerializePartialToString(deterministic=True) == a
    a, b = _norm(a), _norm(b)
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return a == b
    return type(a) is type(b) and a == b


def _names(fd, number: int) -> frozenset:
    """The names an enum gives a number, aliases included (empty for an undeclared number)."""
    return frozenset(v.name for v in fd.enum_type.values if v.number == number)


def _same_enum(fd, a: list, other, b: list) -> bool:
    """Enum values pair when they share a name; an unnamed number pairs with the same number
    unless its name now belongs to another number (a renumbered value)."""
    if len(a) != len(b):
        return False
    all_a = frozenset(v.name for v in fd.enum_type.values)
    all_b = frozenset(v.name for v in other.enum_type.values)
    for x, y in zip(a, b):
        nx, ny = _names(fd, x), _names(other, y)
        if nx and ny:
            if not nx & ny:
                return False
        elif x != y or nx & all_b:  # an undeclared number means nothing to its writer
            return False
    return True


def _counterparts(fd, read_desc, by_name: bool) -> list:
    """The reader's fields that stand for the writer's field ``fd``.

    Binary: the field of the same number, and also the field of the same name where the
    name moved to another number (a renumbering loses the value under that name). JSON
    carries names, so there only the name pairs.
    """
    same_name = read_desc.fields_by_name.get(fd.name)
    if by_name:
        same_json = [f for f in read_desc.fields if f.json_name == fd.json_name]
        return same_json or ([same_name] if same_name is not None else [])
    out = [read_desc.fields_by_number[fd.number]] if fd.number in read_desc.fields_by_number else []
    if same_name is not None and same_name.number != fd.number:
        out.append(same_name)
    return out


def same_message(written, read, by_name: bool = False) -> bool:
    """Every value the writer set reads back equal wherever the reader declares its field.

    ``by_name`` pairs fields by name (the JSON mapping) rather than by number.
    """
    for fd in written.DESCRIPTOR.fields:
        for other in _counterparts(fd, read.DESCRIPTOR, by_name):
            if not _same_field(written, fd, read, other):
                return False
    return True


def _same_field(written, fd, read, other) -> bool:
    if fd.enum_type is not None and other.enum_type is not None:
        a = list(getattr(written, fd.name)) if fd.is_repeated else [getattr(written, fd.name)]
        b = list(getattr(read, other.name)) if other.is_repeated else [getattr(read, other.name)]
        if fd.is_repeated == other.is_repeated:
            return _same_enum(fd, a, other, b)
    if not (fd.is_repeated or other.is_repeated):  # values, not presence: absent reads as default
        return _same(getattr(written, fd.name), getattr(read, other.name))
    a, b = _items(written, fd), _items(read, other)
    return len(a) == len(b) and all(_same(x, y) for x, y in zip(a, b))


def survives_binary(msg, reader_cls) -> bool:
    from google.protobuf.message import DecodeError

    data = msg.SerializePartialToString(deterministic=True)
    reader = reader_cls()
    try:
        reader.ParseFromString(data)
    except DecodeError:
        return False
    return same_message(msg, reader)


def survives_json(msg, reader_cls) -> bool:
    from google.protobuf import json_format

    text = json_format.MessageToJson(msg)
    try:
        reader = json_format.Parse(text, reader_cls())
    except (json_format.ParseError, ValueError, TypeError):
        return False
    _BY_NAME[0] = True
    try:
        return same_message(msg, reader, by_name=True)
    finally:
        _BY_NAME[0] = False
