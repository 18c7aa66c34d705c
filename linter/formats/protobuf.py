"""The Protobuf adapter: .proto files compiled by protoc (grpcio-tools), compared as descriptors.

``load`` compiles one file, ``load_many`` every file of one side in a single protoc call;
each side gets its own descriptor pool, since OLD and NEW define the same full names.
"""
from __future__ import annotations

import re
from pathlib import Path
from typing import Iterable

from ..errors import InputError
from . import LazyPaths, Options, Schema, read_text
from .protobuf_compile import Source, compile_set, pool_of
from .protobuf_diff import KINDS, Side
from .protobuf_diff import diff as _diff
from .protobuf_model import build
from .protobuf_usage import Uses, field_paths

name = "protobuf"
__all__ = ["name", "KINDS", "load", "load_many", "diff"]


def load(path: Path, display: str, options: Options) -> Schema:
    return load_many([(Path(path), display)], options)[display]


def load_many(files: Iterable[tuple[Path, str]], options: Options, root: Path | None = None) -> dict[str, Schema]:
    """Compile the files of one side together; ``root`` is their common import root (a directory pair)."""
    sources, texts = [], []
    for path, display in files:
        texts.append(read_text(path, display))  # the shared checks: exists, size, UTF-8
        base = Path(root) if root is not None else path.parent
        sources.append(Source(path, display, base))
    if not sources:
        return {}
    if root is not None:
        sources = _rooted_as_imported(sources, texts)
    extra = list(options.include)
    if root is not None:  # a file may also import its neighbours by bare name
        extra += sorted({str(s.path.parent) for s in sources} - {str(root)})
    fds = compile_set(sources, extra)
    pool = pool_of(fds)
    displays = {s.virtual: s.display for s in sources}
    model = build(fds, pool, displays)
    out = {}
    for source in sources:
        out[source.display] = _schema(model, source)
    return out


_IMPORT = re.compile(r'^\s*import\s+(?:public\s+|weak\s+)?"([^"]+)"\s*;', re.M)


def _rooted_as_imported(sources: list[Source], texts: list[str]) -> list[Source]:
    """Give each file the import root under which its neighbours import it.

    protoc names a file by its path under an import root, and a file reached under two
    names is defined twice. In a folder pair, a file importing a neighbour by bare name
    (``import "common.proto"``) reaches it under its own folder, while the folder root
    would name it ``proto/common.proto``: take the name the imports use.
    """
    imported = {name for text in texts for name in _IMPORT.findall(text)}
    out = []
    for source in sources:
        rel = source.virtual
        names = [n for n in imported if rel == n or rel.endswith("/" + n)]
        if names:
            name = max(names, key=len)  # the least stripped: the root's own name wins
            source = Source(source.path, source.display, source.root / rel[: len(rel) - len(name)])
        out.append(source)
    return out


def _schema(model, source: Source) -> Schema:
    from .protobuf_model import Model

    virtual = source.virtual
    # One side's types are shared by all its files; each file's view compares its own.
    own = Model(
        files={k: v for k, v in model.files.items() if k == virtual},
        messages=model.messages, enums=model.enums,
        services={k: s for k, s in model.services.items() if s.file == virtual},
        compared=frozenset({virtual}), shared=model.shared,
    )
    if virtual not in model.files:
        raise InputError("protoc did not report this file", source.display)
    roots = tuple(sorted(m.full_name for m in own.own_messages().values()
                         if m.parent is None and not m.map_entry))
    return Schema(format=name, file=source.display, roots=roots, fields=LazyPaths(roots, lambda root: field_paths(own, root)),
                  model=Side(own, roots, Uses(own, roots), source.display))


def diff(old: Schema, new: Schema):
    return _diff(old.model, new.model)
