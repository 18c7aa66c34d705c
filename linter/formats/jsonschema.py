"""JSON Schema adapter: load a schema file (draft, metaschema, references) and diff two.

Backward here means every instance valid under OLD is valid under NEW, forward the
reverse (docs/jsonschema.md). Loading uses jsonschema for the metaschema check and
referencing for ``$ref`` resolution; the inclusion analysis lives in
``jsonschema_subset`` and the per-draft normal form in ``jsonschema_normal``.
Nothing is ever fetched over the network: the metaschemas resolve from the copies
jsonschema-specifications ships, other http(s) references stay unfollowed.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any
from urllib.parse import unquote, urlsplit

from ..errors import InputError
from ..model import Change
from ..sourcemap import SourceMap
from . import Options, Schema, parse_json, read_text

name = "jsonschema"

# $schema (without a trailing '#', scheme-insensitive) -> draft name
DRAFT_URIS = {
    "json-schema.org/draft-04/schema": "draft-04",
    "json-schema.org/draft-06/schema": "draft-06",
    "json-schema.org/draft-07/schema": "draft-07",
    "json-schema.org/draft/2019-09/schema": "2019-09",
    "json-schema.org/draft/2020-12/schema": "2020-12",
}
DEFAULT_DRAFT = "2020-12"
LEGACY = ("draft-04", "draft-06", "draft-07")  # $ref siblings ignored, array-form items
MESSAGE_LIMIT = 160


from .jsonschema_subset import KINDS  # noqa: E402 - every kind the differ emits


@dataclass
class Doc:
    """One JSON document taking part in a comparison (the file or a file it references)."""

    display: str
    uri: str
    data: Any
    sourcemap: SourceMap | None
    index: dict = field(default_factory=dict)  # shared by a run's documents: id(node) -> (Doc, pointer)
    merged: dict = field(default_factory=dict)  # $ref objects merged with their targets (normal form)
    derefs: dict = field(default_factory=dict)  # node key -> where its references lead


@dataclass
class Loaded:
    display: str
    draft: str
    declared: bool           # whether $schema named the draft
    root_name: str
    ident: str | None        # the document's own $id, if it has one
    root: Any                # jsonschema_normal.Node of the document
    docs: dict = field(default_factory=dict)     # uri -> Doc
    index: dict = field(default_factory=dict)    # id(node) -> (Doc, JSON Pointer)
    format_assertion: bool = False


def draft_of(data: Any, display: str, sourcemap: SourceMap | None = None) -> tuple[str, bool]:
    if not isinstance(data, dict) or "$schema" not in data:
        return DEFAULT_DRAFT, False
    uri = data["$schema"]
    if isinstance(uri, str):
        parts = urlsplit(uri.rstrip("#"))
        if parts.scheme in ("http", "https") and not parts.query:
            key = parts.netloc + parts.path
            if key in DRAFT_URIS:
                return DRAFT_URIS[key], True
    where = sourcemap.locate(data) if sourcemap else None
    raise InputError(f"unknown $schema {uri!r}; evolint reads draft-04, -06, -07, 2019-09 and 2020-12",
                     display, *(where or (None, None)))


def validator_class(draft: str):
    from jsonschema import validators

    return {
        "draft-04": validators.Draft4Validator, "draft-06": validators.Draft6Validator,
        "draft-07": validators.Draft7Validator, "2019-09": validators.Draft201909Validator,
        "2020-12": validators.Draft202012Validator,
    }[draft]


def specification(draft: str):
    import referencing.jsonschema as rj

    return {"draft-04": rj.DRAFT4, "draft-06": rj.DRAFT6, "draft-07": rj.DRAFT7,
            "2019-09": rj.DRAFT201909, "2020-12": rj.DRAFT202012}[draft]


def _node_at(data: Any, path) -> Any:
    """The innermost container on ``path`` inside ``data`` (for a line number)."""
    node = data
    for part in path:
        try:
            child = node[part]
        except (KeyError, IndexError, TypeError):
            break
        if not isinstance(child, (dict, list)):
            break
        node = child
    return node


def pointer_of(path) -> str:
    return "".join("/" + str(p).replace("~", "~0").replace("/", "~1") for p in path)


def _one_line(text: str) -> str:
    text = " ".join(str(text).split())
    return text if len(text) <= MESSAGE_LIMIT else text[: MESSAGE_LIMIT - 3] + "..."


def check_metaschema(data: Any, draft: str, display: str, sourcemap: SourceMap) -> None:
    from jsonschema.exceptions import best_match

    cls = validator_class(draft)
    error = best_match(cls(cls.META_SCHEMA).iter_errors(data))
    if error is None:
        return
    path = list(error.absolute_path)
    where = sourcemap.locate(_node_at(data, path)) or (None, None)
    raise InputError(f"not a valid {draft} schema at '{pointer_of(path) or '/'}': {_one_line(error.message)}",
                     display, *where)


def repository_root(path: Path, options: Options) -> Path:
    """References may not leave this folder: Options.root, else the nearest git top level,
    else the schema file's own folder."""
    if options.root:
        return Path(options.root).resolve()
    here = path.resolve().parent
    for folder in (here, *here.parents):
        if (folder / ".git").exists():
            return folder
    return here


class RemoteReference(Exception):
    """An http(s) reference evolint does not fetch."""


class Retriever:
    """Resolves URIs the registry does not hold: bundled metaschemas, files inside the root."""

    def __init__(self, loaded: Loaded, root: Path, display_base: Path, display: str):
        self.loaded = loaded
        self.root = root
        self.display_base = display_base
        self.display = display

    def __call__(self, uri: str):
        from jsonschema_specifications import REGISTRY as BUNDLED

        plain = uri.rstrip("#")
        for candidate in (plain, plain + "#") if plain != uri else (uri, uri + "#"):
            try:
                return BUNDLED[candidate]
            except KeyError:
                pass
        parts = urlsplit(uri)
        if parts.scheme in ("http", "https"):
            raise RemoteReference(uri)
        if parts.scheme != "file":
            raise InputError(f"cannot resolve reference to {uri!r} (not a file inside the repository)",
                             self.display)
        target = Path(unquote(parts.path)).resolve()
        try:
            target.relative_to(self.root)
        except ValueError:
            raise InputError(f"reference to {target} leaves the repository root {self.root}",
                             self.display) from None
        try:
            display = str(Path(self.display_base) / target.relative_to(self.display_base.resolve()))
        except ValueError:
            display = str(target)
        text = read_text(target, display)
        data = parse_json(text, display)
        draft, _ = draft_of(data, display) if isinstance(data, dict) else (self.loaded.draft, False)
        sourcemap = SourceMap(text, data)
        if isinstance(data, (dict, bool)):
            check_metaschema(data, draft, display, sourcemap)
        else:
            raise InputError("a JSON Schema is an object or a boolean", display, 1, 1)
        doc = Doc(display, uri, data, sourcemap, self.loaded.index)
        self.loaded.docs[uri] = doc
        index_document(self.loaded.index, doc)
        return specification(draft).create_resource(data)


def index_document(index: dict, doc: Doc) -> None:
    """Map every object in a document to its JSON Pointer (for locations of resolved refs)."""
    stack = [(doc.data, "")]
    while stack:
        node, pointer = stack.pop()
        if isinstance(node, dict):
            index[id(node)] = (doc, pointer)
            items = node.items()
        elif isinstance(node, list):
            items = enumerate(node)
        else:
            continue
        for key, child in items:
            if isinstance(child, (dict, list)):
                stack.append((child, pointer + "/" + str(key).replace("~", "~0").replace("/", "~1")))


def load(path: Path, display: str, options: Options) -> Schema:
    from referencing import Registry

    from . import jsonschema_normal as normal

    text = read_text(path, display)
    data = parse_json(text, display)
    sourcemap = SourceMap(text, data)
    if not isinstance(data, (dict, bool)):
        raise InputError("a JSON Schema is an object or a boolean", display, 1, 1)
    draft, declared = draft_of(data, display, sourcemap)
    check_metaschema(data, draft, display, sourcemap)
    ident = data.get("$id" if draft != "draft-04" else "id") if isinstance(data, dict) else None
    root_name = ident.rstrip("#") if isinstance(ident, str) and ident.rstrip("#") else display
    uri = path.resolve().as_uri()
    settings = options.settings or {}
    fmt = settings.get("format", "default")
    if fmt not in ("default", "annotation", "assertion"):
        raise InputError(f"setting format={fmt!r}: choose annotation, assertion or default")
    loaded = Loaded(display=display, draft=draft, declared=declared, root_name=root_name,
                    ident=ident if isinstance(ident, str) else None, root=None,
                    format_assertion=(fmt == "assertion") or (fmt == "default" and draft in LEGACY))
    doc = Doc(display, uri, data, sourcemap, loaded.index)
    loaded.docs[uri] = doc
    index_document(loaded.index, doc)
    resource = specification(draft).create_resource(data)
    retriever = Retriever(loaded, repository_root(path, options), Path(display).parent, display)
    registry = Registry(retrieve=retriever).with_resource(uri, resource).crawl()
    resolver = registry.resolver(base_uri=uri).in_subresource(resource)
    loaded.root = normal.Node(data, resolver, "", doc, draft)
    normal.check_references(loaded)
    fields = frozenset(normal.field_paths(loaded))
    return Schema(format=name, file=display, roots=(root_name,), fields={root_name: fields}, model=loaded)


def diff(old: Schema, new: Schema) -> list[Change]:
    from .jsonschema_subset import compare_documents

    return compare_documents(old.model, new.model)
