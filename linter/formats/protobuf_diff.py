"""Compare two sides of a protobuf schema and report what happened, as ``Change`` facts.

Types are paired by full name, then (if absent) by their name inside the package and by
shape, so that a rename or a move is reported as such rather than as a removal and an
addition. Fields are paired by number (the wire identity), then by name. The words live in
``rules/protobuf.toml``; this module only names the kind of each change.
"""
from __future__ import annotations

from dataclasses import dataclass

from .. import semantics
from ..model import Change, Location
from .protobuf_model import Enum, Field, Message, Model, Service
from .protobuf_types import KINDS as TYPE_KINDS, NUMERIC, scalar_change
from .protobuf_usage import Uses, steps


@dataclass
class Side:
    """One side as the differ needs it: the model plus where each type is used from the roots."""

    model: Model
    roots: tuple[str, ...]
    first: Uses   # type -> root -> shortest path prefix
    file: str


KINDS = frozenset({
    "protobuf-field-added", "protobuf-required-field-added", "protobuf-field-removed",
    "protobuf-field-removed-unreserved", "protobuf-required-field-removed",
    "protobuf-field-uses-reserved-number", "protobuf-field-uses-reserved-name",
    "protobuf-field-number-changed", "protobuf-field-name-reused", "protobuf-field-number-reused",
    "protobuf-field-renamed", "protobuf-field-renamed-json-name-kept", "protobuf-json-name-changed",
    "protobuf-field-message-type-changed", "protobuf-field-enum-type-changed",
    "protobuf-map-became-repeated-entry", "protobuf-repeated-entry-became-map",
    "protobuf-field-became-repeated", "protobuf-field-became-packed-repeated",
    "protobuf-field-became-singular", "protobuf-packed-field-became-singular",
    "protobuf-packing-changed", "protobuf-presence-added", "protobuf-presence-removed",
    "protobuf-field-became-required", "protobuf-field-no-longer-required", "protobuf-default-changed",
    "protobuf-field-moved-into-existing-oneof", "protobuf-fields-moved-into-new-oneof",
    "protobuf-field-wrapped-in-new-oneof", "protobuf-field-moved-out-of-oneof",
    "protobuf-field-unwrapped-from-oneof", "protobuf-oneof-renamed",
    "protobuf-enum-value-added", "protobuf-closed-enum-value-added", "protobuf-enum-value-removed",
    "protobuf-closed-enum-value-removed", "protobuf-enum-value-renumbered",
    "protobuf-enum-value-renamed", "protobuf-enum-alias-added", "protobuf-enum-alias-removed",
    "protobuf-enum-became-closed", "protobuf-enum-became-open", "protobuf-enum-default-changed",
    "protobuf-message-added", "protobuf-message-removed", "protobuf-message-renamed",
    "protobuf-nested-message-removed", "protobuf-enum-added", "protobuf-enum-removed",
    "protobuf-enum-renamed", "protobuf-service-added", "protobuf-service-removed",
    "protobuf-service-renamed", "protobuf-method-added", "protobuf-method-removed",
    "protobuf-method-renamed", "protobuf-method-request-changed", "protobuf-method-response-changed",
    "protobuf-method-streaming-changed", "protobuf-package-changed",
    "protobuf-generated-name-option-changed",
}) | TYPE_KINDS


def _local(full: str, package: str) -> str:
    return full[len(package) + 1:] if package and full.startswith(package + ".") else full


def _pair(old: dict, new: dict, shape) -> tuple[list, list, list]:
    """Pair types: by full name, then by name inside the package, then by a unique shape.

    Indexed by local name and by shape: a package renamed moves every type of the file.
    """
    pairs = [(old[k], new[k]) for k in sorted(old.keys() & new.keys())]
    left = {k: v for k, v in old.items() if k not in new}
    right = {k: v for k, v in new.items() if k not in old}
    by_local: dict[str, list] = {}
    for k, v in right.items():
        by_local.setdefault(_local(k, v.package), []).append(k)
    for key, item in sorted(left.items()):
        match = by_local.get(_local(key, item.package), [])
        if len(match) == 1:
            pairs.append((item, right.pop(match.pop())))
            left.pop(key)
    if left and right:
        shapes = {id(v): shape(v) for d in (left, right) for v in d.values()}
        by_shape: dict = {}
        for k, v in right.items():
            by_shape.setdefault(shapes[id(v)], []).append(k)
        unpaired: dict = {}  # shape -> how many OLD types of that shape are still unpaired
        for v in left.values():
            unpaired[shapes[id(v)]] = unpaired.get(shapes[id(v)], 0) + 1
        for key, item in sorted(left.items()):
            signature = shapes[id(item)]
            if not signature:
                continue
            match = by_shape.get(signature, [])
            if len(match) == 1 and unpaired[signature] == 1:
                pairs.append((item, right.pop(match.pop())))
                left.pop(key)
                unpaired[signature] = 0
    return pairs, sorted(left.values(), key=lambda t: t.full_name), sorted(right.values(), key=lambda t: t.full_name)


def _message_shape(m: Message):
    return tuple(sorted((f.number, f.type, f.label) for f in m.fields.values()))


def _enum_shape(e: Enum):
    return tuple(sorted((v.name, v.number) for v in e.values))


def _type_label(f: Field, model: Model) -> str:
    if f.is_map:
        entry = model.messages.get(f.type_name)
        if entry and 1 in entry.fields and 2 in entry.fields:
            return f"map<{_type_label(entry.fields[1], model)}, {_type_label(entry.fields[2], model)}>"
    base = f.type_name if f.type_name else f.type
    return f"repeated {base}" if f.label == "repeated" else base


class Differ:
    def __init__(self, old: Side, new: Side):
        self.old, self.new = old, new
        self.changes: list[Change] = []
        self.renamed: dict[str, str] = {}   # old type full name -> new type full name

    # -- emitting ---------------------------------------------------------------------------

    def targets(self, type_name: str, prefer_new: bool = False) -> list[tuple[str, str]]:
        sides = (self.new, self.old) if prefer_new else (self.old, self.new)
        for side in sides:
            found = side.first.get(type_name)
            if found:
                return sorted(found.items())
        return [(type_name, "")]

    def emit(self, kind: str, type_name: str, leaf: str | None, old_loc, new_loc, *, old=None, new=None,
             prefer_new: bool = False, **facts):
        assert kind in KINDS, kind
        for schema, prefix in self.targets(type_name, prefer_new):
            path = ".".join(p for p in (prefix, leaf) if p)
            self.changes.append(Change(kind, schema, path, old, new, old_loc, new_loc,
                                       {"type": type_name, **facts}))

    def annotations(self, type_name: str, leaf: str | None, old, new, **types):
        """Unit and meaning changes of a paired message or field (``old``, ``new``); ``types``
        passes a field's message annotations (a unit is inherited)."""
        if old.ann == new.ann and types.get("old_type") == types.get("new_type"):
            return  # equal annotations, inherited or not, change nothing
        for schema, prefix in self.targets(type_name):
            path = ".".join(p for p in (prefix, leaf) if p)
            self.changes.extend(semantics.annotation_changes(schema, path, old.ann, new.ann, old.loc, new.loc,
                                                             **types))

    # -- the walk ---------------------------------------------------------------------------

    def run(self) -> list[Change]:
        o, n = self.old.model, self.new.model
        self.files(o, n)
        skip_entries = lambda d: {k: m for k, m in d.items() if not m.map_entry}  # noqa: E731
        pairs, removed, added = _pair(skip_entries(o.own_messages()), skip_entries(n.own_messages()),
                                      _message_shape)
        enum_pairs, enums_removed, enums_added = _pair(o.own_enums(), n.own_enums(), _enum_shape)
        for a, b in pairs + enum_pairs:
            self.renamed[a.full_name] = b.full_name
        self.moved = {k for k, v in self.renamed.items() if k != v}
        for a, b in pairs:
            if not self.unchanged(a, b):
                self.message(a, b)
        for m in removed:
            kind = "protobuf-message-removed" if m.parent is None else "protobuf-nested-message-removed"
            self.emit(kind, m.full_name, None, m.loc, None, old=m.full_name,
                      message=m.full_name)
        for m in added:
            self.emit("protobuf-message-added", m.full_name, None, None, m.loc, new=m.full_name,
                      prefer_new=True, message=m.full_name)
        for a, b in enum_pairs:
            self.enum(a, b)
        for e in enums_removed:
            self.emit("protobuf-enum-removed", e.full_name, None, e.loc, None, old=e.full_name, enum=e.full_name)
        for e in enums_added:
            self.emit("protobuf-enum-added", e.full_name, None, None, e.loc, new=e.full_name,
                      prefer_new=True, enum=e.full_name)
        self.services(o.services, n.services)
        return self.changes

    def files(self, o: Model, n: Model):
        self.package_moves = set()
        if len(o.files) != 1 or len(n.files) != 1:
            return  # files are paired one to one by the caller
        (a,), (b,) = o.files.values(), n.files.values()
        if a.package != b.package:
            self.package_moves.add((a.package, b.package))
            self.changes.append(Change("protobuf-package-changed", b.display, "", a.package, b.package,
                                       a.package_loc, b.package_loc,
                                       {"old_package": a.package or "(none)", "new_package": b.package or "(none)"}))
        for option in sorted(a.options.keys() | b.options.keys()):
            va, vb = a.options.get(option), b.options.get(option)
            if va != vb:
                self.changes.append(Change("protobuf-generated-name-option-changed", b.display, "", va, vb,
                                           a.loc, b.loc, {"option": option, "old_value": repr(va) if va is not None else "unset",
                                                          "new_value": repr(vb) if vb is not None else "unset"}))

    def moved_with_package(self, a, b) -> bool:
        return (a.package, b.package) in self.package_moves and _local(a.full_name, a.package) == _local(b.full_name, b.package)

    def message(self, a: Message, b: Message):
        name = a.full_name
        if a.full_name != b.full_name and not self.moved_with_package(a, b):
            # Within one file pair a package move is the file's package change (reported once).
            self.emit("protobuf-message-renamed", name, None, a.loc, b.loc, old=a.full_name, new=b.full_name,
                      old_name=a.full_name, new_name=b.full_name)
        self.annotations(name, None, a, b)
        pairs = []
        left = dict(a.fields)
        right = dict(b.fields)
        # A name kept with its type but given another number is that field renumbered (fields
        # that swapped numbers are two renumberings, not two reuses); otherwise pair by number.
        new_by_name = b.by_name
        moved = [(f, new_by_name[f.name]) for f in a.fields.values()
                 if f.name in new_by_name and new_by_name[f.name].number != f.number
                 and scalar_change(f.type, new_by_name[f.name].type) is None
                 and self._same_type(f, new_by_name[f.name])]
        renumbered = {f.number for f, _ in moved}
        taken = {g.number for _, g in moved}
        for number in sorted(a.fields.keys() & b.fields.keys()):
            if number not in renumbered and number not in taken:
                pairs.append((left.pop(number), right.pop(number)))
        for number, f in sorted(left.items()):
            g = new_by_name.get(f.name)  # names are unique within a message
            if g is not None and right.get(g.number) is g:
                right.pop(g.number)
                left.pop(number)
                same = scalar_change(f.type, g.type) is None and self._same_type(f, g)
                kind = "protobuf-field-number-changed" if same else "protobuf-field-name-reused"
                self.emit(kind, name, f.name, f.loc, g.loc, old=f.number, new=g.number, field=f.name,
                          old_number=f.number, new_number=g.number,
                          old_type=_type_label(f, self.old.model), new_type=_type_label(g, self.new.model))
                if same:
                    pairs.append((f, g))
        for f in left.values():
            self.field_removed(a, b, f)
        for g in right.values():
            self.field_added(a, b, g)
        for f, g in pairs:
            self.field(a, b, f, g)
        self.oneofs(a, b, pairs)

    def unchanged(self, a: Message, b: Message) -> bool:
        """A pair written alike, naming types that kept their names: nothing to report.

        Checked on the descriptors' bytes, before any field is read. An enum value as a
        default is left to the field walk: its number comes from the enum.
        """
        if not a.same_as(b) or a.enum_defaults:
            return False
        if self.moved:
            for _, reached, _ in steps(self.old.model, a.full_name):
                if any(t in self.moved for t in reached):
                    return False
        return True

    def _same_type(self, f: Field, g: Field) -> bool:
        if f.type_name is None or g.type_name is None:
            return f.type_name == g.type_name
        if f.is_map and g.is_map:
            return True  # entries are compared key by key in field()
        return self.renamed.get(f.type_name, f.type_name) == g.type_name

    def field_removed(self, a: Message, b: Message, f: Field):
        facts = dict(field=f.name, number=f.number, old_type=_type_label(f, self.old.model))
        if f.label == "required":
            kind = "protobuf-required-field-removed"
        elif b.reserves(number=f.number) and b.reserves(name=f.name):
            kind = "protobuf-field-removed"
        else:
            kind = "protobuf-field-removed-unreserved"
            missing = [w for w, ok in (("number", b.reserves(number=f.number)), ("name", b.reserves(name=f.name)))
                       if not ok]
            facts["unreserved"] = " and ".join(missing)
        self.emit(kind, a.full_name, f.name, f.loc, b.loc, old=f.number, **facts)

    def field_added(self, a: Message, b: Message, g: Field):
        facts = dict(field=g.name, number=g.number, new_type=_type_label(g, self.new.model))
        if a.reserves(number=g.number):
            kind = "protobuf-field-uses-reserved-number"
        elif a.reserves(name=g.name):
            kind = "protobuf-field-uses-reserved-name"
        elif g.label == "required":
            kind = "protobuf-required-field-added"
        else:
            kind = "protobuf-field-added"
        self.emit(kind, a.full_name, g.name, a.loc, g.loc, new=g.number, **facts)

    def field(self, a: Message, b: Message, f: Field, g: Field):
        name, leaf = a.full_name, f.name
        om, nm = self.old.model, self.new.model
        base = dict(field=f.name, number=f.number)
        if f.name != g.name:
            elsewhere_new, elsewhere_old = b.by_name.get(f.name), a.by_name.get(g.name)
            moved_elsewhere = (elsewhere_new is not None and elsewhere_new.number != f.number) or \
                (elsewhere_old is not None and elsewhere_old.number != g.number)
            if moved_elsewhere or scalar_change(f.type, g.type) or not self._same_type(f, g):
                self.emit("protobuf-field-number-reused", name, leaf, f.loc, g.loc, old=f.name, new=g.name,
                          number=f.number, old_name=f.name, new_name=g.name,
                          old_type=_type_label(f, om), new_type=_type_label(g, nm))
                return
            kind = "protobuf-field-renamed" if f.json_name != g.json_name else "protobuf-field-renamed-json-name-kept"
            self.emit(kind, name, leaf, f.loc, g.loc, old=f.name, new=g.name, number=f.number,
                      old_name=f.name, new_name=g.name, old_json=f.json_name, new_json=g.json_name)
        elif f.json_name != g.json_name:
            self.emit("protobuf-json-name-changed", name, leaf, f.loc, g.loc, old=f.json_name, new=g.json_name,
                      old_json=f.json_name, new_json=g.json_name, **base)
        types = dict(old_type=_type_label(f, om), new_type=_type_label(g, nm))
        type_kind = self.type_change(f, g)
        if type_kind:
            self.emit(type_kind, name, leaf, f.loc, g.loc, old=types["old_type"], new=types["new_type"],
                      **types, **base)
        if f.is_map and g.is_map:
            self.map_entries(a, f, g)
        self.cardinality(name, leaf, f, g, base, types)
        self.annotations(name, leaf, f, g, old_type=a.ann, new_type=b.ann)

    def type_change(self, f: Field, g: Field) -> str | None:
        if f.is_map != g.is_map:
            entry_side = (self.old.model, f) if f.is_map else (self.new.model, g)
            other_side = (self.new.model, g) if f.is_map else (self.old.model, f)
            if self._entry_like(*entry_side, *other_side):
                return "protobuf-map-became-repeated-entry" if f.is_map else "protobuf-repeated-entry-became-map"
            return "protobuf-field-type-incompatible"
        kind = scalar_change(f.type, g.type)
        if kind or f.is_map:
            return kind
        if f.type == "enum" and not self._same_type(f, g):
            return "protobuf-field-enum-type-changed"
        if f.type in ("message", "group") and not self._same_type(f, g):
            return "protobuf-field-message-type-changed"
        return None

    def _entry_like(self, map_model: Model, map_field: Field, other_model: Model, other: Field) -> bool:
        entry = map_model.messages.get(map_field.type_name)
        target = other_model.messages.get(other.type_name or "")
        if entry is None or target is None or other.label != "repeated":
            return False
        if sorted(target.fields) != [1, 2]:
            return False
        return all(scalar_change(entry.fields[i].type, target.fields[i].type) is None for i in (1, 2))

    def map_entries(self, a: Message, f: Field, g: Field):
        """A map's key and value are compared like fields, reported at the map's own path."""
        ea, eb = self.old.model.messages.get(f.type_name), self.new.model.messages.get(g.type_name)
        if ea is None or eb is None:
            return
        for number, part in ((1, "key"), (2, "value")):
            x, y = ea.fields.get(number), eb.fields.get(number)
            if x is None or y is None:
                continue
            kind = self.type_change(x, y)
            if kind:
                self.emit(kind, a.full_name, f.name, f.loc, g.loc, field=f"{f.name} ({part})", number=f.number,
                          old=_type_label(x, self.old.model), new=_type_label(y, self.new.model),
                          old_type=_type_label(x, self.old.model), new_type=_type_label(y, self.new.model))

    def cardinality(self, name, leaf, f: Field, g: Field, base, types):
        if f.is_map or g.is_map:
            return
        was, now = f.label == "repeated", g.label == "repeated"
        if not was and now:
            kind = ("protobuf-field-became-packed-repeated" if g.packed and g.type in NUMERIC
                    else "protobuf-field-became-repeated")
            self.emit(kind, name, leaf, f.loc, g.loc, **types, **base)
        elif was and not now:
            kind = ("protobuf-packed-field-became-singular" if f.packed and f.type in NUMERIC
                    else "protobuf-field-became-singular")
            self.emit(kind, name, leaf, f.loc, g.loc, **types, **base)
        elif was and now and f.packed != g.packed:
            self.emit("protobuf-packing-changed", name, leaf, f.loc, g.loc, old=f.packed, new=g.packed,
                      old_packing="packed" if f.packed else "unpacked",
                      new_packing="packed" if g.packed else "unpacked", **base)
        if was or now:
            return
        if f.label != "required" and g.label == "required":
            self.emit("protobuf-field-became-required", name, leaf, f.loc, g.loc, **base)
        elif f.label == "required" and g.label != "required":
            self.emit("protobuf-field-no-longer-required", name, leaf, f.loc, g.loc, **base)
        plain = (f.oneof is None and g.oneof is None and "required" not in (f.label, g.label)
                 and not {f.type, g.type} & {"message", "group"})
        if plain and f.presence != g.presence:
            kind = "protobuf-presence-added" if g.presence else "protobuf-presence-removed"
            self.emit(kind, name, leaf, f.loc, g.loc, **base)
        if (f.has_default or g.has_default) and f.type == g.type and f.type not in ("message", "group") \
                and f.default != g.default:
            self.emit("protobuf-default-changed", name, leaf, f.loc, g.loc, old=f.default, new=g.default,
                      old_default=_show(f.default), new_default=_show(g.default), **base)

    def oneofs(self, a: Message, b: Message, pairs):
        # Which old oneof each new oneof continues: the same name, or the one old oneof its members came from.
        continues: dict[str, str | None] = {}
        for new_name in b.oneofs:
            if new_name in a.oneofs:
                continues[new_name] = new_name
                continue
            sources = {f.oneof for f, g in pairs if g.oneof == new_name and f.oneof}
            source = next(iter(sources)) if len(sources) == 1 else None
            if source is not None and source not in b.oneofs:
                continues[new_name] = source
                self.emit("protobuf-oneof-renamed", a.full_name, None, a.loc, b.loc, old=source, new=new_name,
                          old_oneof=source, new_oneof=new_name)
            else:
                continues[new_name] = None
        into_new: dict[str, list] = {}
        for f, g in pairs:
            target = continues.get(g.oneof) if g.oneof else None
            if f.oneof and (g.oneof is None or target != f.oneof):
                kind = ("protobuf-field-moved-out-of-oneof" if len(a.oneofs.get(f.oneof, ())) > 1
                        else "protobuf-field-unwrapped-from-oneof")
                self.emit(kind, a.full_name, f.name, f.loc, g.loc, field=f.name, number=f.number, oneof=f.oneof)
            if g.oneof and target is not None and target != f.oneof:
                self.emit("protobuf-field-moved-into-existing-oneof", a.full_name, f.name, f.loc, g.loc,
                          field=f.name, number=f.number, oneof=g.oneof)
            elif g.oneof and target is None:
                into_new.setdefault(g.oneof, []).append((f, g))
        for oneof, members in sorted(into_new.items()):
            names = [g.name for _, g in members]
            for f, g in members:
                if len(members) == 1:
                    self.emit("protobuf-field-wrapped-in-new-oneof", a.full_name, f.name, f.loc, g.loc,
                              field=f.name, number=f.number, oneof=oneof)
                else:
                    self.emit("protobuf-fields-moved-into-new-oneof", a.full_name, f.name, f.loc, g.loc,
                              field=f.name, number=f.number, oneof=oneof, fields=names)

    # -- enums -------------------------------------------------------------------------------

    def enum(self, a: Enum, b: Enum):
        name = a.full_name
        if (a.full_name == b.full_name and a.closed == b.closed
                and [(v.name, v.number) for v in a.values] == [(v.name, v.number) for v in b.values]):
            return  # the same values, the same way open or closed: nothing to report
        if a.full_name != b.full_name and not self.moved_with_package(a, b):
            self.emit("protobuf-enum-renamed", name, None, a.loc, b.loc, old=a.full_name, new=b.full_name,
                      old_name=a.full_name, new_name=b.full_name)
        if a.closed != b.closed:
            kind = "protobuf-enum-became-closed" if b.closed else "protobuf-enum-became-open"
            self.emit(kind, name, None, a.loc, b.loc, enum=a.full_name)
        old_names = {v.name: v for v in a.values}
        new_names = {v.name: v for v in b.values}
        renumbered = {k for k in old_names.keys() & new_names.keys() if old_names[k].number != new_names[k].number}
        for k in sorted(renumbered):
            self.emit("protobuf-enum-value-renumbered", name, None, old_names[k].loc, new_names[k].loc,
                      old=old_names[k].number, new=new_names[k].number, enum=a.full_name, value=k,
                      old_number=old_names[k].number, new_number=new_names[k].number)
        old_numbers = {v.number for v in a.values}
        new_numbers = {v.number for v in b.values}
        old_at, new_at = _by_number(a), _by_number(b)
        for number in sorted(old_numbers | new_numbers):
            before = [v.name for v in old_at.get(number, ()) if v.name not in renumbered]
            after = [v.name for v in new_at.get(number, ()) if v.name not in renumbered]
            loc_a = old_at[number][0].loc if number in old_at else a.loc
            loc_b = new_at[number][0].loc if number in new_at else b.loc
            facts = dict(enum=a.full_name, number=number)
            if before and not after and number not in new_numbers:
                kind = "protobuf-closed-enum-value-removed" if b.closed else "protobuf-enum-value-removed"
                self.emit(kind, name, None, loc_a, b.loc, old=before[0], value=before[0], **facts)
            elif after and not before and number not in old_numbers:
                kind = "protobuf-closed-enum-value-added" if a.closed else "protobuf-enum-value-added"
                self.emit(kind, name, None, a.loc, loc_b, new=after[0], value=after[0], **facts)
            elif before and after and not set(before) & set(after):
                self.emit("protobuf-enum-value-renamed", name, None, loc_a, loc_b, old=before[0], new=after[0],
                          old_value=before[0], new_value=after[0], **facts)
            elif before and after:
                for x in sorted(set(before) - set(after)):
                    self.emit("protobuf-enum-alias-removed", name, None, loc_a, loc_b, old=x, value=x, **facts)
                for x in sorted(set(after) - set(before)):
                    self.emit("protobuf-enum-alias-added", name, None, loc_a, loc_b, new=x, value=x, **facts)
        if a.closed and b.closed and a.values and b.values and a.values[0].number != b.values[0].number:
            self.emit("protobuf-enum-default-changed", name, None, a.values[0].loc, b.values[0].loc,
                      old=a.values[0].name, new=b.values[0].name, enum=a.full_name,
                      old_value=a.values[0].name, new_value=b.values[0].name)

    # -- services ----------------------------------------------------------------------------

    def services(self, old: dict[str, Service], new: dict[str, Service]):
        pairs, removed, added = _pair(old, new, lambda s: tuple(sorted(s.methods)))
        for s in removed:
            self.changes.append(Change("protobuf-service-removed", s.full_name, "", s.full_name, None, s.loc, None,
                                       {"service": s.full_name}))
        for s in added:
            self.changes.append(Change("protobuf-service-added", s.full_name, "", None, s.full_name, None, s.loc,
                                       {"service": s.full_name}))
        for a, b in pairs:
            if a.full_name != b.full_name:
                self.changes.append(Change("protobuf-service-renamed", a.full_name, "", a.full_name, b.full_name,
                                           a.loc, b.loc, {"old_name": a.full_name, "new_name": b.full_name}))
            self.methods(a, b)

    def methods(self, a: Service, b: Service):
        signature = lambda m: (self.renamed.get(m.input, m.input), self.renamed.get(m.output, m.output),  # noqa: E731
                               m.client_streaming, m.server_streaming)
        left = {k: m for k, m in a.methods.items() if k not in b.methods}
        right = {k: m for k, m in b.methods.items() if k not in a.methods}
        svc = a.full_name

        def change(kind, path, old_loc, new_loc, old=None, new=None, **facts):
            self.changes.append(Change(kind, svc, path, old, new, old_loc, new_loc, {"service": svc, **facts}))

        for k, m in sorted(left.items()):
            match = [x for x in right.values()
                     if (x.input, x.output, x.client_streaming, x.server_streaming) == signature(m)]
            if len(match) == 1:
                right.pop(match[0].name)
                change("protobuf-method-renamed", k, m.loc, match[0].loc, k, match[0].name,
                       old_name=k, new_name=match[0].name)
            else:
                change("protobuf-method-removed", k, m.loc, b.loc, k, method=k)
        for k, m in sorted(right.items()):
            change("protobuf-method-added", k, a.loc, m.loc, None, k, method=k)
        for k in sorted(a.methods.keys() & b.methods.keys()):
            m, x = a.methods[k], b.methods[k]
            if self.renamed.get(m.input, m.input) != x.input:
                change("protobuf-method-request-changed", k, m.loc, x.loc, m.input, x.input, method=k,
                       old_type=m.input, new_type=x.input)
            if self.renamed.get(m.output, m.output) != x.output:
                change("protobuf-method-response-changed", k, m.loc, x.loc, m.output, x.output, method=k,
                       old_type=m.output, new_type=x.output)
            if (m.client_streaming, m.server_streaming) != (x.client_streaming, x.server_streaming):
                change("protobuf-method-streaming-changed", k, m.loc, x.loc, _streaming(m), _streaming(x),
                       method=k, old_streaming=_streaming(m), new_streaming=_streaming(x))


def _by_number(e: Enum) -> dict[int, list]:
    """An enum's values by number, aliases in declaration order."""
    out: dict[int, list] = {}
    for v in e.values:
        out.setdefault(v.number, []).append(v)
    return out


def _streaming(m) -> str:
    return {(False, False): "unary", (True, False): "client streaming", (False, True): "server streaming",
            (True, True): "bidirectional streaming"}[m.client_streaming, m.server_streaming]


def _show(value) -> str:
    if isinstance(value, bytes):
        return repr(value)
    return repr(value) if isinstance(value, str) else str(value)


def diff(old: Side, new: Side) -> list[Change]:
    return Differ(old, new).run()


__all__ = ["Side", "KINDS", "diff", "Location"]
