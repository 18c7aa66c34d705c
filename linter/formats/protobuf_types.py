"""What a field's type change does to its values: the encoding facts behind the type rules.

Sources: protobuf encoding specification ("Message Structure", "Varints", "Signed
Integers", "Non-varint Numbers"), and the language guide, "Updating a Message Type".
A varint is decoded as 64 bits and cast to the reader's type, so between the plain varint
types (int32, int64, uint32, uint64) a value survives exactly when it lies in the reader's
range; zigzag (sint32, sint64) and the fixed-width types read the same bytes differently.
"""
from __future__ import annotations

RANGES = {
    "int32": (-2**31, 2**31 - 1), "sint32": (-2**31, 2**31 - 1), "sfixed32": (-2**31, 2**31 - 1),
    "uint32": (0, 2**32 - 1), "fixed32": (0, 2**32 - 1),
    "int64": (-2**63, 2**63 - 1), "sint64": (-2**63, 2**63 - 1), "sfixed64": (-2**63, 2**63 - 1),
    "uint64": (0, 2**64 - 1), "fixed64": (0, 2**64 - 1),
    "enum": (-2**31, 2**31 - 1),  # enum numbers are int32 (language guide, "Enumerations")
}
# How the bytes of a value are laid out; a reader of one layout misreads another.
LAYOUT = {
    "int32": "varint", "int64": "varint", "uint32": "varint", "uint64": "varint",
    "bool": "varint", "enum": "varint", "sint32": "zigzag", "sint64": "zigzag",
    "fixed32": "fixed32", "sfixed32": "fixed32", "float": "float",
    "fixed64": "fixed64", "sfixed64": "fixed64", "double": "double",
    "string": "len", "bytes": "len", "message": "len", "group": "group",
}
NUMERIC = frozenset(t for t, layout in LAYOUT.items() if layout not in ("len", "group"))
PLAIN = frozenset({"int32", "int64", "uint32", "uint64"})


def _within(inner: str, outer: str) -> bool:
    (a, b), (c, d) = RANGES[inner], RANGES[outer]
    return c <= a and b <= d


def integer_change(old: str, new: str) -> str:
    """The kind of a change between two integer types (enum counts as int32 here)."""
    wider, narrower = _within(old, new), _within(new, old)
    same_layout = LAYOUT[old] == LAYOUT[new]
    if same_layout:
        return ("protobuf-integer-widened" if wider else
                "protobuf-integer-narrowed" if narrower else "protobuf-integer-sign-changed")
    if wider and narrower:
        return "protobuf-integer-encoding-changed"
    if wider:
        return "protobuf-integer-encoding-changed-widened"
    if narrower:
        return "protobuf-integer-encoding-changed-narrowed"
    return "protobuf-integer-encoding-and-sign-changed"


PAIRS = {
    ("bool", "plain"): "protobuf-bool-became-integer",
    ("plain", "bool"): "protobuf-integer-became-bool",
    ("float", "double"): "protobuf-float-became-double",
    ("double", "float"): "protobuf-double-became-float",
    ("string", "bytes"): "protobuf-string-became-bytes",
    ("bytes", "string"): "protobuf-bytes-became-string",
    ("message", "bytes"): "protobuf-message-became-bytes",
    ("bytes", "message"): "protobuf-bytes-became-message",
}


def scalar_change(old: str, new: str) -> str | None:
    """The kind of a change between two different field types, None if they are the same."""
    if old == new:
        return None
    key = ("plain" if old in PLAIN else old, "plain" if new in PLAIN else new)
    if key in PAIRS:
        return PAIRS[key]
    if old == "enum" and new in ("int32", "int64"):
        return "protobuf-enum-became-integer"
    if new == "enum" and old in ("int32", "int64"):
        return "protobuf-integer-became-enum"
    if old in RANGES and new in RANGES and "enum" not in (old, new):
        return integer_change(old, new)
    if {old, new} <= {"enum", "uint32", "uint64"}:
        return "protobuf-integer-sign-changed"
    return "protobuf-field-type-incompatible"


KINDS = frozenset({
    "protobuf-integer-widened", "protobuf-integer-narrowed", "protobuf-integer-sign-changed",
    "protobuf-integer-encoding-changed", "protobuf-integer-encoding-changed-widened",
    "protobuf-integer-encoding-changed-narrowed", "protobuf-integer-encoding-and-sign-changed",
    "protobuf-enum-became-integer", "protobuf-integer-became-enum",
    "protobuf-field-type-incompatible", *PAIRS.values(),
})
