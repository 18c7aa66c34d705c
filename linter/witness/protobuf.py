"""Protobuf witnesses: serialize with the writer's message class, parse with the reader's.

Each side is compiled by protoc (the adapter's compile step) into a descriptor pool of its
own: both sides define the same full names (shared/FACTS.md). A datum is a message built
from the writer's descriptors; the binary run serializes it (``SerializeToString``) and
parses the bytes with the reader's class; the JSON run goes through the proto3 JSON
mapping (``google.protobuf.json_format``). The outcome is the parse error, a field the
reader knows that came back changed or lost, or (proto2) a required field the reader
finds missing, which the Python runtime does not check on parse (shared/FACTS.md), so it
is checked here with ``IsInitialized``.

Binary fields pair by number, JSON fields by their JSON name (or proto name, which the
parser also accepts): that is how each encoding identifies a field (language guide,
Updating A Message Type; proto3 JSON Mapping).
"""
from __future__ import annotations

import struct
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from . import Pair, Trial

# Further encodings a run can use besides the binary one (verify --count-encoding).
ENCODINGS = ("json",)
INT32 = (-2**31, 2**31 - 1)
UINT32 = (0, 2**32 - 1)
INT64 = (-2**63, 2**63 - 1)
UINT64 = (0, 2**64 - 1)
ALPHABET = "abcxyz019 -_.é水"
MAX_DEPTH = 5
TARGETED = 24


def _fd():
    from google.protobuf import descriptor

    return descriptor.FieldDescriptor


def _ranges():
    F = _fd()
    return {F.TYPE_INT32: INT32, F.TYPE_SINT32: INT32, F.TYPE_SFIXED32: INT32,
            F.TYPE_UINT32: UINT32, F.TYPE_FIXED32: UINT32,
            F.TYPE_INT64: INT64, F.TYPE_SINT64: INT64, F.TYPE_SFIXED64: INT64,
            F.TYPE_UINT64: UINT64, F.TYPE_FIXED64: UINT64}


@dataclass
class Side:
    display: str
    pool: Any
    roots: tuple[str, ...]

    def descriptor(self, name: str):
        try:
            return self.pool.FindMessageTypeByName(name)
        except KeyError:
            return None

    def cls(self, name: str):
        from google.protobuf import message_factory

        desc = self.descriptor(name)
        return message_factory.GetMessageClass(desc) if desc is not None else None


def _side(path: Path, display: str, options=None) -> Side:
    from ..formats.protobuf_compile import Source, compile_set, pool_of

    include = tuple(getattr(options, "include", ()) or ())
    source = Source(path, display, path.parent)
    fds = compile_set([source], include)
    pool = pool_of(fds)
    own = [f for f in fds.file if f.name == source.virtual] or list(fds.file)[-1:]
    roots = tuple(sorted(f"{p.package}.{m.name}" if p.package else m.name
                         for p in own for m in p.message_type))
    return Side(display, pool, roots)


def open_pair(old: Path, new: Path, old_display: str, new_display: str, options=None) -> Pair:
    return Pair(_side(old, old_display, options), _side(new, new_display, options))


def roots(writer: Side, reader: Side) -> list[str]:
    return sorted(set(writer.roots) & set(reader.roots))


def unshowable(finding, writer: Side, reader: Side) -> str | None:
    if writer.descriptor(finding.schema) is None and reader.descriptor(finding.schema) is None:
        return ("not shown by any datum: the change is to a service or a file option, which no "
                "message carries (a call to a removed or changed method fails at the RPC layer)")
    if writer.descriptor(finding.schema) is None or reader.descriptor(finding.schema) is None:
        return (f"not shown by any datum: only one side has a message named {finding.schema}; "
                "names are not on the wire, they matter where a type is named (Any type URLs, "
                "RPC paths, registries)")
    return None


# --- generation ------------------------------------------------------------------------

def _f32(x: float) -> float:
    return struct.unpack("<f", struct.pack("<f", x))[0]


def _edges(field) -> list:
    F = _fd()
    t = field.type
    if t in _ranges():
        lo, hi = _ranges()[t]
        return [v for v in (0, 1, -1, 2, 300, lo, hi, 2**31 - 1, 2**31, -2**31, -2**31 - 1, 2**32 - 1, 2**32,
                            2**53 + 1, 2**63 - 1, -2**63) if lo <= v <= hi]
    if t == F.TYPE_BOOL:
        return [True, False]
    if t == F.TYPE_FLOAT:
        return [0.0, 1.5, -2.25, _f32(3.4e38), _f32(0.1)]
    if t == F.TYPE_DOUBLE:
        return [0.0, 0.1, 1e39, -1e300, 2.0**60]
    if t == F.TYPE_STRING:
        return ["", "m-17", "é水"]
    if t == F.TYPE_BYTES:
        return [b"", b"\xff\xfe", b"m-17"]
    if t == F.TYPE_ENUM:
        numbers = [v.number for v in field.enum_type.values]
        if not getattr(field.enum_type, "is_closed", False):
            numbers.append(max(numbers) + 1)  # an open enum carries numbers it does not name
        return numbers
    return []


def _scalar(field, rng) -> Any:
    F = _fd()
    t = field.type
    if t in _ranges():
        lo, hi = _ranges()[t]
        pick = rng.random()
        if pick < 0.4:
            return rng.randint(max(lo, -100), min(hi, 100))
        if pick < 0.6:
            return rng.choice([v for v in (lo, hi, 0, 1) if lo <= v <= hi])
        return rng.randint(lo, hi)
    if t == F.TYPE_BOOL:
        return rng.random() < 0.5
    if t == F.TYPE_FLOAT:
        return _f32(rng.choice((0.0, 1.5, rng.uniform(-1e6, 1e6))))
    if t == F.TYPE_DOUBLE:
        return rng.choice((0.0, 0.1, rng.uniform(-1e9, 1e9)))
    if t == F.TYPE_STRING:
        return "".join(rng.choice(ALPHABET) for _ in range(rng.randint(0, 8)))
    if t == F.TYPE_BYTES:
        return rng.randbytes(rng.randint(0, 8))
    if t == F.TYPE_ENUM:
        return rng.choice(field.enum_type.values).number
    raise ValueError(f"not a scalar field: {field.full_name}")


def _is_message(field) -> bool:
    F = _fd()
    return field.type in (F.TYPE_MESSAGE, F.TYPE_GROUP)


def _is_map(field) -> bool:
    return _is_message(field) and field.message_type.GetOptions().map_entry


def _repeated(field) -> bool:
    return field.is_repeated


def _required(field) -> bool:
    return field.is_required


def _fill(msg, rng, focus, press, depth: int) -> None:
    """Set a random selection of ``msg``'s fields; along ``focus`` the path is always set."""
    desc = msg.DESCRIPTOR
    chosen_oneof = {}
    for oneof in desc.oneofs:
        members = list(oneof.fields)
        lead = [f for f in members if focus and f.name == focus[0]]
        chosen_oneof[oneof.name] = lead[0] if lead else (rng.choice(members) if rng.random() < 0.7 else None)
    for field in desc.fields:
        on_path = bool(focus) and field.name == focus[0]
        rest = focus[1:] if on_path else None
        if field.containing_oneof is not None and chosen_oneof.get(field.containing_oneof.name) is not field:
            continue
        if not on_path and not _required(field) and rng.random() < 0.3:
            continue
        if not on_path and depth >= MAX_DEPTH and _is_message(field) and not _required(field):
            continue
        _set(msg, field, rng, rest, press, depth)


def _value(field, rng, rest, press, depth: int):
    """A value of one (non-repeated) occurrence of a scalar field, or None for a message."""
    if rest is not None and not rest and press is not None:
        pressed = press(field)
        if pressed is not None:
            return pressed
    return _scalar(field, rng)


def _set(msg, field, rng, rest, press, depth: int) -> None:
    if _is_map(field):
        key_f = field.message_type.fields_by_name["key"]
        val_f = field.message_type.fields_by_name["value"]
        target = getattr(msg, field.name)
        for _ in range(rng.randint(1, 2) if rest is not None else rng.randint(0, 2)):
            key = _scalar(key_f, rng)
            if _is_message(val_f):
                _fill(target[key], rng, rest, press, depth + 1)
            else:
                target[key] = _value(val_f, rng, rest, press, depth)
        return
    if _repeated(field):
        target = getattr(msg, field.name)
        for _ in range(rng.randint(1, 2) if rest is not None else rng.randint(0, 3)):
            if _is_message(field):
                _fill(target.add(), rng, rest, press, depth + 1)
            else:
                target.append(_value(field, rng, rest, press, depth))
        return
    if _is_message(field):
        sub = getattr(msg, field.name)
        sub.SetInParent()
        _fill(sub, rng, rest, press, depth + 1)
        return
    setattr(msg, field.name, _value(field, rng, rest, press, depth))


def random_datum(writer: Side, root: str, rng, focus=None, press=None):
    cls = writer.cls(root)
    if cls is None:
        return None
    msg = cls()
    _fill(msg, rng, focus, press, 0)
    return msg


def _field_at(side: Side, root: str, path: str):
    desc = side.descriptor(root)
    field = None
    for seg in path.split(".") if path else ():
        if desc is None:
            return None
        field = desc.fields_by_name.get(seg)
        if field is None:
            return None
        desc = field.message_type if _is_message(field) else None
        if desc is not None and desc.GetOptions().map_entry:
            value = desc.fields_by_name["value"]
            desc = value.message_type if _is_message(value) else None
            field = value if not _is_message(value) else field
    return field


def _reader_field(writer: Side, reader: Side, root: str, path: str):
    """The reader's field with the writer field's number, at the same place."""
    wf = _field_at(writer, root, path)
    if wf is None or not path:
        return wf, None
    parent = ".".join(path.split(".")[:-1])
    rdesc = reader.descriptor(root)
    if parent:
        rparent = _field_at(reader, root, parent)
        rdesc = rparent.message_type if rparent is not None and _is_message(rparent) else None
        if rdesc is not None and rdesc.GetOptions().map_entry:
            v = rdesc.fields_by_name["value"]
            rdesc = v.message_type if _is_message(v) else None
    if rdesc is None:
        return wf, None
    return wf, rdesc.fields_by_number.get(wf.number)


def targeted(finding, writer: Side, reader: Side, rng):
    """Writer messages with the finding's field set to the values its change cannot carry."""
    wf, rf = _reader_field(writer, reader, finding.schema, finding.path)
    if writer.cls(finding.schema) is None:
        return
    focus = finding.path.split(".") if finding.path else []
    if wf is None or _is_message(wf):
        for _ in range(TARGETED):
            yield random_datum(writer, finding.schema, rng, focus)
        return
    values = _edges(wf)
    if rf is not None and wf.type == _fd().TYPE_ENUM and rf.type == _fd().TYPE_ENUM:
        known = {v.number for v in rf.enum_type.values}
        values = [v for v in values if v not in known] + values  # the removed numbers first
    aliases = wf.type == _fd().TYPE_ENUM and len({v.name for v in wf.enum_type.values}) > len(
        {v.number for v in wf.enum_type.values})
    for value in values + [None] * (TARGETED // 2):
        press = (lambda f, v=value: v) if value is not None else None
        msg = random_datum(writer, finding.schema, rng, focus, press)
        yield msg
        if aliases and msg is not None:
            yield from _aliased(msg, finding.path, wf)


def _numeric_leaf(writer: Side, root: str, path: str) -> str:
    """``path``, or for a message (a unit on a type applies to its numbers) its first number field."""
    F = _fd()
    numeric = {F.TYPE_FLOAT, F.TYPE_DOUBLE, *_ranges()}
    wf = _field_at(writer, root, path) if path else None
    desc = writer.descriptor(root) if not path else (wf.message_type if wf is not None and _is_message(wf) else None)
    if desc is None:
        return path
    for f in desc.fields:
        if f.type in numeric and not f.is_repeated:
            return f"{path}.{f.name}" if path else f.name
    return path


def with_value(writer: Side, root: str, path: str, value: float, rng):
    F = _fd()
    path = _numeric_leaf(writer, root, path)
    wf = _field_at(writer, root, path)
    if wf is None or _is_message(wf) or wf.type in (F.TYPE_STRING, F.TYPE_BYTES, F.TYPE_BOOL, F.TYPE_ENUM):
        return None
    v = float(value) if wf.type in (F.TYPE_FLOAT, F.TYPE_DOUBLE) else int(value)
    return random_datum(writer, root, rng, path.split(".") if path else [], lambda f: v)


# --- running ---------------------------------------------------------------------------

def _show(msg) -> Any:
    from google.protobuf import json_format

    try:
        return json_format.MessageToDict(msg, preserving_proto_field_name=True)
    except Exception:  # noqa: BLE001 - e.g. a float the JSON mapping cannot write
        return {"binary": msg.SerializeToString().hex()}


def _canon(field, value) -> Any:
    """A field value as its meaning: numbers by value, enums by number, strings and bytes by UTF-8."""
    if _is_message(field):
        return value
    if isinstance(value, str):
        return value.encode("utf-8")
    if isinstance(value, bool):
        return int(value)
    return value


def _values(msg, field, against=None) -> list:
    """A field's occurrences. Singular against singular: the effective value (an unset int32 and
    one set to 0 both read as 0). Singular against repeated: what is on the wire (nothing for an
    unset or, without presence, a default value)."""
    if _is_map(field):
        return sorted(getattr(msg, field.name).items(), key=lambda kv: repr(kv[0]))
    if _repeated(field):
        return list(getattr(msg, field.name))
    value = getattr(msg, field.name)
    if against is not None and _repeated(against):
        if field.has_presence:
            return [value] if msg.HasField(field.name) else []
        return [value] if value != field.default_value else []
    return [value]


def _entries(msg, field) -> list | None:
    """A map, or a repeated message of key and value (its wire form), as sorted (key, value) pairs."""
    if _is_map(field):
        return sorted(((k, _plain(v)) for k, v in getattr(msg, field.name).items()), key=repr)
    if _repeated(field) and _is_message(field) and {"key", "value"} <= set(field.message_type.fields_by_name):
        return sorted(((e.key, _plain(e.value)) for e in getattr(msg, field.name)), key=repr)
    return None


def _pair(wdesc, rdesc, encoding):
    """Writer and reader fields that carry the same value: by number on the wire, by JSON name in
    JSON; a field the reader knows by the writer's name must hold the writer's value too."""
    for wf in wdesc.fields:
        if encoding == "json":
            rf = next((f for f in rdesc.fields if f.json_name == wf.json_name or f.name == wf.json_name), None)
            if rf is not None:
                yield wf, rf
            continue
        rf = rdesc.fields_by_number.get(wf.number)
        if rf is not None:
            yield wf, rf
        named = rdesc.fields_by_name.get(wf.name)
        if named is not None and named is not rf:
            yield wf, named


def _enum_names(enum, number) -> set[str]:
    return {v.name for v in enum.values if v.number == number}


def _same_enum(wf, w, rf, r) -> bool:
    """An enum value is kept unless its number now names something else, or its name moved."""
    if wf.type == rf.type == _fd().TYPE_ENUM:
        wnames, rnames = _enum_names(wf.enum_type, w), _enum_names(rf.enum_type, r)
        if w != r:
            return False
        if rnames and wnames and not (wnames & rnames):
            return False
        moved = {v.name for v in rf.enum_type.values if v.name in wnames and v.number != r}
        return not (wnames and not rnames and moved)
    if rf.type == _fd().TYPE_ENUM:
        # A plain number read into an enum: kept only if the enum defines it.
        return w == r and bool(_enum_names(rf.enum_type, r))
    return w == r


def _same(wf, w, rf, r) -> bool:
    if _is_message(wf) and _is_message(rf):
        return None  # compared field by field
    if _is_message(wf) and not _is_message(rf):
        return w.SerializeToString() == r  # a message read as bytes keeps its encoding
    if not _is_message(wf) and _is_message(rf):
        return False
    if _fd().TYPE_ENUM in (wf.type, rf.type):
        return _same_enum(wf, w, rf, r)
    a, b = _canon(wf, w), _canon(rf, r)
    if isinstance(a, float) or isinstance(b, float):
        return float(a) == float(b) or _f32(float(a)) == float(b)
    return a == b


def changed(wmsg, rmsg, encoding=None, path: str = "", rpath: str = "") -> list[tuple]:
    """(writer path, writer value, reader value, reader path) of every field that came back changed."""
    out = []
    for wf, rf in _pair(wmsg.DESCRIPTOR, rmsg.DESCRIPTOR, encoding):
        sub = f"{path}.{wf.name}" if path else wf.name
        rsub = f"{rpath}.{rf.name}" if rpath else rf.name
        ws, rs = _values(wmsg, wf, rf), _values(rmsg, rf, wf)
        if _is_map(wf) != _is_map(rf):
            we, re_ = _entries(wmsg, wf), _entries(rmsg, rf)
            if we is not None and re_ is not None:
                if we != re_:
                    out.append((sub, _plain(we), _plain(re_), rsub))
                continue
        if _is_map(wf) and _is_map(rf):
            wv, rv = dict(ws), dict(rs)
            vw, vr = wf.message_type.fields_by_name["value"], rf.message_type.fields_by_name["value"]
            if set(map(repr, wv)) != set(map(repr, rv)):
                out.append((sub, _plain(ws), _plain(rs), rsub))
                continue
            for k in wv:
                rk = next(x for x in rv if repr(x) == repr(k))
                if _is_message(vw) and _is_message(vr):
                    out.extend(changed(wv[k], rv[rk], encoding, sub, rsub))
                elif not _same(vw, wv[k], vr, rv[rk]):
                    out.append((sub, _plain(wv[k]), _plain(rv[rk]), rsub))
            continue
        if _is_map(wf) != _is_map(rf) or len(ws) != len(rs):
            out.append((sub, _plain(ws), _plain(rs), rsub))
            continue
        for w, r in zip(ws, rs):
            same = _same(wf, w, rf, r)
            if same is None:
                out.extend(changed(w, r, encoding, sub, rsub))
            elif not same:
                out.append((sub, _plain(w), _plain(r), rsub))
    return out


def _plain(value) -> Any:
    if hasattr(value, "DESCRIPTOR"):
        return _show(value)
    if isinstance(value, list):
        return [_plain(v) for v in value]
    if isinstance(value, tuple):
        return [_plain(v) for v in value]
    if isinstance(value, bytes):
        return value.decode("latin-1")
    return value


def _line(value) -> str:
    import json

    return json.dumps(value, ensure_ascii=False, default=str)


@dataclass
class Spelled:
    """A writer message with the JSON text a writer may print for it (an enum value by an alias)."""

    message: Any
    text: str


def _aliased(msg, path: str, field):
    """The message's JSON with each alias name of the enum value at ``path``, one text per name."""
    import json

    from google.protobuf import json_format

    data = json_format.MessageToDict(msg)
    segs = path.split(".")
    node = data
    desc = msg.DESCRIPTOR
    for seg in segs[:-1]:
        f = desc.fields_by_name.get(seg)
        if f is None or not isinstance(node, dict) or f.json_name not in node:
            return
        node, desc = node[f.json_name], f.message_type
        if isinstance(node, list):
            node = node[0] if node else None
    if not isinstance(node, dict) or field.json_name not in node or isinstance(node[field.json_name], list):
        return
    current = node[field.json_name]
    number = field.enum_type.values_by_name[current].number if current in field.enum_type.values_by_name else None
    for name in sorted(_enum_names(field.enum_type, number) - {current}):
        node[field.json_name] = name
        yield Spelled(msg, json.dumps(data))


def run(writer: Side, reader: Side, root: str, datum, encoding: str | None = None) -> Trial | None:
    from google.protobuf import json_format
    from google.protobuf.message import DecodeError, EncodeError

    rcls = reader.cls(root)
    if datum is None or rcls is None:
        return None
    spelled = None
    if isinstance(datum, Spelled):
        spelled, datum = datum, datum.message
        if encoding != "json":
            return None
    try:
        shown = _show(datum)
        if spelled is not None:
            import json

            text, shown = spelled.text, json.loads(spelled.text)
        elif encoding == "json":
            text = json_format.MessageToJson(datum)
        else:
            data = datum.SerializeToString()
    except (EncodeError, ValueError, TypeError):
        return None  # the writer cannot encode it: not writer data
    try:
        if encoding == "json":
            read = json_format.Parse(text, rcls())
        else:
            read = rcls.FromString(data)
    except (DecodeError, json_format.ParseError, ValueError, TypeError) as exc:
        via = "the JSON mapping" if encoding == "json" else "the binary encoding"
        return Trial(shown, True, f"the reader fails ({via}): {type(exc).__name__}: {' '.join(str(exc).split())}",
                     error=True)
    if not read.IsInitialized():
        missing = ", ".join(read.FindInitializationErrors())
        return Trial(shown, True, f"the reader's message lacks required field(s) {missing} (the language guide: "
                     "parsing fails; the Python runtime does not check)", tuple(missing.split(", ")), error=False)
    diffs = changed(datum, read, encoding)
    if diffs:
        path, w, r, _ = diffs[0]
        return Trial(shown, True, f"{path} was written as {_line(w)} and read as {_line(r)}",
                     tuple(sorted({p for d in diffs for p in (d[0], d[3])})))
    return Trial(shown, False, "read back with every known field kept")
