"""The Avro adapter: load ``.avsc`` files and list what changed between two of them.

The differ reports facts (``Change``); the effect of each kind on backward and forward
compatibility lives in ``rules/avro.toml``. Kinds are split by outcome: the same edit
is a different kind when it reads differently (a field added with a default is not a
field added without one), and every kind is judged both ways, OLD as writer and NEW as
reader (backward) and NEW as writer and OLD as reader (forward). The rules follow the
Avro specification 1.12.0, "Schema Resolution".
"""
from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field, replace
from pathlib import Path

from ..collector import collector_paused
from ..errors import InputError
from ..model import Change, Location
from ..semantics import annotation_changes
from ..sourcemap import SourceMap
from . import LazyPaths, Options, Schema, parse_json, read_text
from .avro_resolve import Branches, promotable, resolve
from .avro_schema import PRIMITIVES, Field, Model, Node, parse

name = "avro"
pause_collector = True  # api.compare_one: one collector pause around both loads and the diff

# Promotions that keep every value exactly; the others round large numbers.
LOSSLESS = {("int", "long"), ("int", "double"), ("float", "double")}

KINDS = frozenset({
    "avro-field-added-with-default", "avro-field-added-without-default",
    "avro-field-removed-with-default", "avro-field-removed-without-default",
    "avro-field-renamed-with-alias", "avro-field-renamed-both-ways", "avro-field-renamed-reverting-alias",
    "avro-field-default-added", "avro-field-default-removed", "avro-field-default-changed",
    "avro-field-order-changed", "avro-doc-changed",
    "avro-type-promoted", "avro-type-promoted-lossy", "avro-type-demoted", "avro-type-demoted-lossy",
    "avro-string-to-bytes", "avro-bytes-to-string", "avro-type-changed",
    "avro-namespace-changed", "avro-type-renamed", "avro-type-renamed-with-alias",
    "avro-type-renamed-both-ways", "avro-type-renamed-reverting-alias",
    "avro-enum-symbol-added", "avro-enum-symbol-added-covered-by-default",
    "avro-enum-symbol-removed", "avro-enum-symbol-removed-covered-by-default",
    "avro-enum-default-changed", "avro-enum-symbols-reordered",
    "avro-fixed-size-changed",
    "avro-union-branch-added", "avro-union-new-branch-read-as-other",
    "avro-union-branch-removed", "avro-union-old-branch-read-as-other", "avro-union-branches-reordered",
    "avro-logical-type-changed", "avro-decimal-changed", "avro-alias-removed",
})


@dataclass
class Loaded:
    """What ``load`` hands the differ: the node graph and where its objects are."""

    model: Model
    file: str
    sourcemap: SourceMap
    gated: dict = field(default_factory=dict)  # fastavro's parse of each named type
    _twins: dict | None = field(default=None, init=False, repr=False)

    def locations(self, raws: list) -> list[Location]:
        """The location of each of ``raws`` in this file, looked up together."""
        lines = self.sourcemap.lines_of(raws)
        if self.model.adopted and None in lines:
            # A shared record's objects are OLD's: each is located at its twin here,
            # which the parse listed as a gap.
            twins = self.twins()
            missing = [i for i, line in enumerate(lines) if line is None and id(raws[i]) in twins]
            if missing:
                self.sourcemap.walk_fully()
                for i, line in zip(missing, self.sourcemap.lines_of([twins[id(raws[i])] for i in missing])):
                    lines[i] = line
        return [Location(self.file, line) for line in lines]

    def twins(self) -> dict:
        """This file's object for each of OLD's objects inside a shared record.

        Built on the first miss only: a shared record is passed over unless a type moved
        to a place where OLD had another (then its fields are compared, and located here).
        The two objects of a pair are equal JSON, so they are walked side by side.
        """
        if self._twins is None:
            twins = {}
            stack = list(self.model.adopted)
            while stack:
                a, b = stack.pop()
                twins[id(a)] = b
                # Equal dicts may list their keys in another order: pair by key.
                pairs = ((x, b[k]) for k, x in a.items()) if isinstance(a, dict) else zip(a, b)
                stack.extend((x, y) for x, y in pairs if isinstance(x, (dict, list)))
            self._twins = twins
        return self._twins


def load(path: Path, display: str, options: Options | None = None) -> Schema:
    with collector_paused():
        return _load(path, display)


def load_beside(path: Path, display: str, options: Options | None, old: Schema) -> Schema:
    """NEW read beside OLD: records written the same in both share OLD's nodes."""
    with collector_paused():
        return _load(path, display, old.model if isinstance(old.model, Loaded) else None)


def _load(path: Path, display: str, previous: Loaded | None = None) -> Schema:
    text = read_text(Path(path), display)
    data = parse_json(text, display)
    sourcemap = SourceMap(text, data)
    try:
        model = parse(data, display, sourcemap.locate, previous.model if previous else None)
        sourcemap.known_preorder(model.preorder)
        gated = _fastavro_gate(data, model, display, previous)
        roots = root_names(model.root, display)
    except RecursionError:
        raise InputError("schema nested too deeply to read", display) from None
    def paths_of(root: str) -> list[str]:
        node = model.names.get(root)
        return field_paths(node) if node is not None else []

    return Schema("avro", display, roots, LazyPaths(roots, paths_of), Loaded(model, display, sourcemap, gated))


def _fastavro_gate(data, model: Model, display: str, previous: Loaded | None) -> dict:
    """What our own walk accepts, fastavro must parse too; it names its own reason.

    Returns the named types fastavro parsed, by full name. fastavro rejects invalid
    logical types (a decimal whose scale exceeds its precision), where the specification
    says to ignore them: those are taken out of a copy. A record NEW shares with OLD
    (written the same, naming nothing outside itself, so read the same in either file)
    was parsed by fastavro in OLD already: NEW names it instead, and fastavro is handed
    OLD's parse of it (``named_schemas``, its documented way to pass types parsed
    before). That cuts the gate's work on a large schema with a few edits to a third
    (benchmarks/instructions.py); our own walk has already refused any name defined twice or
    used before its definition, the only verdicts a name in place of a definition could
    change. The names are put in place in the parsed file itself for the call and the
    records put back after it (a copy of the containers on the way cost a tenth of the
    comparison, benchmarks/scale.py); fastavro 1.13 builds its own objects and leaves its
    input as it was (checked on every Avro file in tests/ and schemas_example/).
    """
    from fastavro import parse_schema

    known: dict = {}
    shared = model.shared  # filled only when NEW was read beside OLD
    if shared:
        known.update((n, previous.gated[n]) for n in model.shared_names)
    checked, swapped = data, ()
    if model.ignored_logical or len(model.sites) != len(shared):
        # Logical types to take out, or a shared record no container holds (the root).
        checked = _gate_copy(data, shared, {id(obj) for obj in model.ignored_logical})
    elif shared:
        swapped = model.sites
        for container, key, _, name in swapped:
            container[key] = name
    try:
        parse_schema(checked, known, _write_hint=False)
    except RecursionError:
        raise
    except Exception as exc:  # noqa: BLE001 - fastavro raises many types; all mean bad input
        reason = " ".join(str(exc).split()) or type(exc).__name__
        raise InputError(f"not a valid Avro schema: {reason}", display) from None
    finally:
        for container, key, record, _ in swapped:
            container[key] = record
    return known


def _gate_copy(value, shared: dict, ignored: set):
    """``value`` with each shared record replaced by its full name and each ignored
    logical type left out; only the containers on the way are copied."""
    cls = value.__class__
    if cls is dict:
        name = shared.get(id(value))
        if name is not None:
            return name
        # Scalars are taken as they are, without a call each.
        out = {k: v if v.__class__ is not dict and v.__class__ is not list else _gate_copy(v, shared, ignored)
               for k, v in value.items()}
        if id(value) in ignored:
            out.pop("logicalType", None)
        return out
    if cls is list:
        return [v if v.__class__ is not dict and v.__class__ is not list else _gate_copy(v, shared, ignored)
                for v in value]
    return value


def root_names(root: Node, display: str) -> tuple[str, ...]:
    branches = root.branches if root.kind == "union" else [root]
    names = [b.name for b in branches if b.named]
    if len(names) < len(branches):
        names.append(display)  # unnamed top-level types are known by the file
    return tuple(dict.fromkeys(names))


def field_paths(node: Node, prefix: str = "", active: frozenset = frozenset()) -> list[str]:
    """Every dotted field path below ``node``; unions, arrays and maps are transparent."""
    out: list[str] = []
    # One list and one stack of open records: nested generators and a new frozenset per
    # record cost a fifth of a 100,000-field load (benchmarks/scale.py).
    _collect_paths(node, prefix, set(active), out)
    return out


def _collect_paths(node: Node, prefix: str, active: set, out: list) -> None:
    kind = node.kind
    if kind == "union":
        for b in node.branches:
            _collect_paths(b, prefix, active, out)
    elif kind in ("array", "map"):
        _collect_paths(node.items, prefix, active, out)
    elif kind == "record" and id(node) not in active:
        active.add(id(node))  # a recursive record is not entered again below itself
        for f in node.fields:
            path = f"{prefix}.{f.name}" if prefix else f.name
            out.append(path)
            _collect_paths(f.type, path, active, out)
        active.discard(id(node))


class _At:
    """A location still to look up: a JSON object of a loaded file."""

    __slots__ = ("loaded", "raw")

    def __init__(self, loaded: Loaded, raw):
        self.loaded, self.raw = loaded, raw


class Ctx:
    """Where the differ is: the root type, the path, and OLD's and NEW's objects there.

    Locations are looked up only for the changes reported, and all of a file's together
    once the diff is done (``_located``): looking up every paired field's line built both
    source maps even for identical files, and indexing every container of a file for a
    few lookups cost more than the lookups (benchmarks/scale.py).
    """

    __slots__ = ("schema", "path", "top", "_old", "_new")

    def __init__(self, schema: str, path: str, old_at, new_at, top: bool = False):
        # old_at/new_at: a Location, None, or a (Loaded, raw object) pair located later.
        self.schema, self.path, self.top = schema, path, top
        self._old, self._new = old_at, new_at

    @property
    def old_loc(self) -> "Location | _At | None":
        if isinstance(self._old, tuple):
            self._old = _At(*self._old)
        return self._old

    @property
    def new_loc(self) -> "Location | _At | None":
        if isinstance(self._new, tuple):
            self._new = _At(*self._new)
        return self._new

    def at(self, name: str, old_at, new_at) -> "Ctx":
        return Ctx(self.schema, f"{self.path}.{name}" if self.path else name, old_at, new_at)


def diff(old: Schema, new: Schema) -> list[Change]:
    differ = _Differ(old.model, new.model)
    o, n = old.model.model.root, new.model.model.root
    schema = o.name if o.named else (n.name if n.named else new.file)
    try:
        with collector_paused():
            differ.node(o, n, Ctx(schema, "", (old.model, o.raw), (new.model, n.raw), top=True))
    except RecursionError:
        raise InputError("schemas nested too deeply to compare", new.file) from None
    return _located(differ.changes)


def _located(changes: list[Change]) -> list[Change]:
    """``changes`` with each location still to look up (``_At``) looked up, a file at a time."""
    wanted: dict[int, list[_At]] = {}  # by the id of the Loaded file
    files: dict[int, Loaded] = {}
    for c in changes:
        for at in (c.old_loc, c.new_loc):
            if at.__class__ is _At:
                wanted.setdefault(id(at.loaded), []).append(at)
                files[id(at.loaded)] = at.loaded
    if not wanted:
        return changes
    found: dict[int, Location] = {}
    for key, ats in wanted.items():
        found.update(zip(map(id, ats), files[key].locations([at.raw for at in ats])))
    return [replace(c, old_loc=found.get(id(c.old_loc), c.old_loc), new_loc=found.get(id(c.new_loc), c.new_loc))
            for c in changes]


def _same_value(a, b) -> bool:
    """JSON values equal as Avro reads them (1 == 1.0, but true != 1)."""
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_same_value(x, y) for x, y in zip(a, b))
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_same_value(a[k], b[k]) for k in a)
    return a == b


class _Differ:
    def __init__(self, old: Loaded, new: Loaded):
        self.old, self.new = old, new
        self.changes: list[Change] = []
        self.active: set[tuple[int, int]] = set()
        # What each pair of records reported below its own level, by (id, id), with the
        # path it was found at: a type used at many paths (a chain of records, each
        # holding the one before) is walked once and its findings repeated under each
        # path, instead of walked again at every use (quadratic in the chain's length).
        self.below: dict[tuple[int, int], tuple[str, list[Change]]] = {}
        self.cuts = 0  # times the recursion guard cut a walk short

    def emit(self, kind: str, ctx: Ctx, old=None, new=None, **facts) -> None:
        self.changes.append(Change(kind, ctx.schema, ctx.path, old, new, ctx.old_loc, ctx.new_loc, facts))

    # -- dispatch -------------------------------------------------------------------
    def node(self, o: Node, n: Node, ctx: Ctx) -> None:
        if o.kind == "union" or n.kind == "union":
            return self.union(o, n, ctx)
        if ctx.top and o.kind == n.kind == "record":
            ctx = Ctx(o.name, "", ctx._old, ctx._new)  # a root record starts its own paths
        elif ctx.top:
            ctx = Ctx(ctx.schema, ctx.path, ctx._old, ctx._new)
        key = (id(o), id(n))
        if key in self.active:  # recursive types: this pair is being compared further up
            self.cuts += 1
            return
        self.active.add(key)
        try:
            if o.kind == n.kind:
                self.HANDLERS.get(o.kind, _Differ.same_primitive)(self, o, n, ctx)
            elif o.kind in PRIMITIVES and n.kind in PRIMITIVES:
                self.primitive_changed(o, n, ctx)
            else:
                self.emit("avro-type-changed", ctx, o.describe(), n.describe())
        finally:
            self.active.discard(key)

    # -- named types ------------------------------------------------------------------
    def names(self, o: Node, n: Node, ctx: Ctx) -> None:
        lost = [a for a in o.aliases if a not in n.aliases and a != n.name]
        if lost:
            self.emit("avro-alias-removed", ctx, list(o.aliases), list(n.aliases), aliases=lost,
                      what=f"{n.kind} {n.name}")
        if o.name == n.name:
            return
        if o.short == n.short:
            self.emit("avro-namespace-changed", ctx, o.name, n.name, type_kind=o.kind)
            return
        backward, forward = n.name and o.name in n.aliases, o.name and n.name in o.aliases
        kind = {(True, True): "avro-type-renamed-both-ways", (True, False): "avro-type-renamed-with-alias",
                (False, True): "avro-type-renamed-reverting-alias", (False, False): "avro-type-renamed"}
        self.emit(kind[bool(backward), bool(forward)], ctx, o.name, n.name, type_kind=o.kind)

    def doc(self, o_doc, n_doc, ctx: Ctx, what: str) -> None:
        if (o_doc or "").strip() != (n_doc or "").strip():
            self.emit("avro-doc-changed", ctx, o_doc, n_doc, what=what)

    def record(self, o: Node, n: Node, ctx: Ctx) -> None:
        # A record written the same on both sides, under the same full name (so nested
        # names resolve alike) and naming no type defined outside itself, reads the same:
        # one comparison of the parsed JSON in C instead of a walk through every field.
        # NEW may share such a record with OLD outright (load_beside).
        if o is n or (not (o.outside_refs or n.outside_refs) and o.name == n.name and o.raw == n.raw):
            return
        self.names(o, n, ctx)
        self.doc(o.doc, n.doc, ctx, f"record {n.name}")
        if o.annotations != n.annotations:  # equal (stripped) annotations report nothing
            self.changes.extend(annotation_changes(ctx.schema, ctx.path, o.annotations, n.annotations,
                                                   ctx.old_loc, ctx.new_loc))
        key = (id(o), id(n))
        known = self.below.get(key)
        if known is not None:
            self.repeat(known, ctx)
            return
        first, cuts = len(self.changes), self.cuts
        self.fields(o, n, ctx)
        if self.cuts == cuts:  # a walk the recursion guard cut short holds for its place only
            self.below[key] = (ctx.path, self.changes[first:])

    def repeat(self, known: tuple[str, list[Change]], ctx: Ctx) -> None:
        path, changes = known
        for c in changes:  # each lies below the record: its path continues the record's
            rest = c.path[len(path) + 1:] if path else c.path
            self.changes.append(replace(c, schema=ctx.schema, path=f"{ctx.path}.{rest}" if ctx.path else rest))

    def fields(self, o: Node, n: Node, ctx: Ctx) -> None:
        pairs, old_left, new_left = _pair_fields(o, n)
        for of, nf in pairs:
            # A field whose type is one node on both sides (a record NEW shares with OLD,
            # or a primitive named by a string) reads the same as its type goes: when its
            # own attributes are equal too there is nothing to report, and its JSON,
            # which holds the whole of an inline record, need not be compared.
            if of.type is nf.type and of.name == nf.name and of.doc == nf.doc and of.order == nf.order \
                    and of.aliases == nf.aliases and not (of.annotations or nf.annotations) \
                    and of.has_default == nf.has_default \
                    and (not of.has_default or _same_value(of.default, nf.default)):
                continue
            # A field written the same on both sides with a primitive type named by a string
            # ("int", not a reference to a named type) has nothing to report: its name, doc,
            # aliases, order and annotations are equal, and defaults valid for a primitive
            # that compare equal as JSON compare equal as Avro reads them. An inherited unit
            # is reported at the record. Most fields of a large schema are such pairs.
            if of.raw == nf.raw and of.type.raw is None and of.type.kind in PRIMITIVES \
                    and nf.type.raw is None and nf.type.kind == of.type.kind:
                continue
            self.field(of, nf, ctx, o, n)
        for of in old_left:
            fctx = ctx.at(of.name, (self.old, of.raw), None)
            kind = "avro-field-removed-with-default" if of.has_default else "avro-field-removed-without-default"
            self.emit(kind, fctx, of.type.describe(), None, field=of.name, record=o.name)
        for nf in new_left:
            fctx = ctx.at(nf.name, None, (self.new, nf.raw))
            kind = "avro-field-added-with-default" if nf.has_default else "avro-field-added-without-default"
            self.emit(kind, fctx, None, nf.type.describe(), field=nf.name, record=n.name)

    def field(self, of: Field, nf: Field, ctx: Ctx, o: Node, n: Node) -> None:
        fctx = ctx.at(of.name, (self.old, of.raw), (self.new, nf.raw))
        if of.name != nf.name:
            backward = of.name in nf.aliases or nf.has_default
            forward = nf.name in of.aliases or of.has_default
            kind = {(True, True): "avro-field-renamed-both-ways", (True, False): "avro-field-renamed-with-alias",
                    (False, True): "avro-field-renamed-reverting-alias"}[backward, forward]
            self.emit(kind, fctx, of.name, nf.name)
        if of.has_default and nf.has_default:
            if not _same_value(of.default, nf.default):
                self.emit("avro-field-default-changed", fctx, _json(of.default), _json(nf.default))
        elif nf.has_default:
            self.emit("avro-field-default-added", fctx, None, _json(nf.default))
        elif of.has_default:
            self.emit("avro-field-default-removed", fctx, _json(of.default), None)
        self.doc(of.doc, nf.doc, fctx, f"field {of.name}")
        lost = [a for a in of.aliases if a not in nf.aliases and a != nf.name]
        if lost:
            self.emit("avro-alias-removed", fctx, list(of.aliases), list(nf.aliases), aliases=lost,
                      what=f"field {nf.name}")
        if of.order != nf.order:
            self.emit("avro-field-order-changed", fctx, of.order, nf.order)
        # A record's unit applies to its fields without one (docs/annotations.md). Nothing
        # is reported where neither side has one of its own (the record's comparison covers
        # an inherited unit), nor where the field's and the record's are equal both sides.
        if (of.annotations or nf.annotations) and (of.annotations != nf.annotations
                                                   or o.annotations != n.annotations):
            self.changes.extend(annotation_changes(fctx.schema, fctx.path, of.annotations, nf.annotations,
                                                   fctx.old_loc, fctx.new_loc,
                                                   old_type=o.annotations, new_type=n.annotations))
        self.node(of.type, nf.type, fctx)

    def enum(self, o: Node, n: Node, ctx: Ctx) -> None:
        self.names(o, n, ctx)
        self.doc(o.doc, n.doc, ctx, f"enum {n.name}")
        added = [s for s in n.symbols if s not in o.symbols]
        removed = [s for s in o.symbols if s not in n.symbols]
        if added:
            kind = "avro-enum-symbol-added-covered-by-default" if o.enum_default else "avro-enum-symbol-added"
            self.emit(kind, ctx, list(o.symbols), list(n.symbols), symbols=added, enum=n.name,
                      default=o.enum_default)
        if removed:
            kind = "avro-enum-symbol-removed-covered-by-default" if n.enum_default else "avro-enum-symbol-removed"
            self.emit(kind, ctx, list(o.symbols), list(n.symbols), symbols=removed, enum=n.name,
                      default=n.enum_default)
        common_old = [s for s in o.symbols if s in n.symbols]
        common_new = [s for s in n.symbols if s in o.symbols]
        if common_old != common_new:
            self.emit("avro-enum-symbols-reordered", ctx, common_old, common_new, enum=n.name)
        if o.enum_default != n.enum_default:
            self.emit("avro-enum-default-changed", ctx, o.enum_default or "none", n.enum_default or "none",
                      enum=n.name)

    def fixed(self, o: Node, n: Node, ctx: Ctx) -> None:
        self.names(o, n, ctx)
        if o.size != n.size:
            self.emit("avro-fixed-size-changed", ctx, o.size, n.size, fixed=n.name)
        self.logical(o, n, ctx)

    def container(self, o: Node, n: Node, ctx: Ctx) -> None:
        self.node(o.items, n.items, ctx)

    # -- primitives and logical types -----------------------------------------------------
    def same_primitive(self, o: Node, n: Node, ctx: Ctx) -> None:
        self.logical(o, n, ctx)

    def primitive_changed(self, o: Node, n: Node, ctx: Ctx) -> None:
        a, b = o.kind, n.kind
        if {a, b} == {"string", "bytes"}:
            kind = "avro-string-to-bytes" if a == "string" else "avro-bytes-to-string"
        elif promotable(a, b):
            kind = "avro-type-promoted" if (a, b) in LOSSLESS else "avro-type-promoted-lossy"
        elif promotable(b, a):
            kind = "avro-type-demoted" if (b, a) in LOSSLESS else "avro-type-demoted-lossy"
        else:
            kind = "avro-type-changed"
        self.emit(kind, ctx, o.describe(), n.describe())
        if kind != "avro-type-changed":
            self.logical(o, n, ctx)

    def logical(self, o: Node, n: Node, ctx: Ctx) -> None:
        if o.logical == n.logical == "decimal":
            if (o.precision, o.scale) != (n.precision, n.scale):
                self.emit("avro-decimal-changed", ctx, f"decimal({o.precision},{o.scale})",
                          f"decimal({n.precision},{n.scale})")
        elif o.logical != n.logical:
            self.emit("avro-logical-type-changed", ctx, o.logical or "none", n.logical or "none",
                      physical=n.kind)

    # -- unions -------------------------------------------------------------------------
    def union(self, o: Node, n: Node, ctx: Ctx) -> None:
        """Unions in all four shapes (a non-union side is a union of one branch).

        The spec resolves each writer branch against the first reader branch it matches,
        so each direction has its own pairing: OLD's branches into NEW (backward) and NEW's
        into OLD (forward). A pair both directions agree on is compared as any two types;
        a branch whose reader differs by direction gets a kind with a one-sided effect.
        """
        old_b = o.branches if o.kind == "union" else [o]
        new_b = n.branches if n.kind == "union" else [n]
        in_old, in_new = Branches(old_b), Branches(new_b)
        into_new = [in_new.first_match(b) for b in old_b]   # backward: OLD writes, NEW reads
        into_old = [in_old.first_match(c) for c in new_b]   # forward: NEW writes, OLD reads
        mutual = [(i, in_new.index(t)) for i, t in enumerate(into_new)
                  if t is not None and into_old[in_new.index(t)] is old_b[i]]
        # A primitive branch retyped by promotion ([null, int] -> [null, long]): OLD reads
        # into it, nothing of OLD reads it back; reported as the type change it is.
        readers_of = Counter(id(t) for t in into_new if t is not None)
        paired = set(mutual)
        for i, t in enumerate(into_new):
            if t is None or t.kind not in PRIMITIVES or old_b[i].kind not in PRIMITIVES:
                continue
            j = in_new.index(t)
            if into_old[j] is None and readers_of[id(t)] == 1 and (i, j) not in paired:
                mutual.append((i, j))
                paired.add((i, j))
        paired_old = {i for i, _ in mutual}
        paired_new = {j for _, j in mutual}
        for i, b in enumerate(old_b):
            if i in paired_old:
                continue
            target = into_new[i]
            readable = target is not None and not resolve(b, target)
            kind = "avro-union-old-branch-read-as-other" if readable else "avro-union-branch-removed"
            self.emit(kind, ctx, o.describe(), n.describe(), branch=b.describe(),
                      read_as=target.describe() if target else "nothing")
        for j, c in enumerate(new_b):
            if j in paired_new:
                continue
            target = into_old[j]
            readable = target is not None and not resolve(c, target)
            kind = "avro-union-new-branch-read-as-other" if readable else "avro-union-branch-added"
            self.emit(kind, ctx, o.describe(), n.describe(), branch=c.describe(),
                      read_as=target.describe() if target else "nothing")
        if o.kind == n.kind == "union":
            order = [j for _, j in sorted(mutual)]
            if order != sorted(order):
                self.emit("avro-union-branches-reordered", ctx, o.describe(), n.describe())
        for i, j in sorted(mutual):
            self.node(old_b[i], new_b[j], ctx)

    HANDLERS = {"record": record, "enum": enum, "fixed": fixed, "array": container, "map": container}


def _pair_fields(o: Node, n: Node):
    """Fields by name, then by NEW's aliases (read backward), then by OLD's (read forward).

    Each NEW field takes the first OLD field, in OLD's order, that is still unpaired. Names
    are looked up in a dict: scanning lists made a 10,000-field record quadratic.
    """
    pairs = []
    left = {f.name: f for f in o.fields}  # unpaired OLD fields, in OLD's order
    new_left = []
    for nf in n.fields:
        of = left.pop(nf.name, None)
        if of is None:
            new_left.append(nf)
        else:
            pairs.append((of, nf))
    rest = []
    for nf in new_left:
        candidates = [left[a] for a in nf.aliases if a in left]
        if candidates:
            of = min(candidates, key=lambda f: f.position)
            del left[of.name]
            pairs.append((of, nf))
        else:
            rest.append(nf)
    new_left = []
    for nf in rest:
        of = next((f for f in left.values() if nf.name in f.aliases), None)
        if of is None:
            new_left.append(nf)
        else:
            del left[of.name]
            pairs.append((of, nf))
    pairs.sort(key=lambda p: p[0].position)
    return pairs, list(left.values()), new_left


def _json(value) -> str:
    import json

    return json.dumps(value, ensure_ascii=False)
