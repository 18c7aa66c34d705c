"""The Protobuf adapter: .proto files compiled by protoc (grpcio-tools), compared as descriptors.

``load`` compiles one file, ``load_many`` every file of one side in a single protoc call;
each side gets its own descriptor pool, since OLD and NEW define the same full names.
"""
from __future__ import annotations

from pathlib import Path
from typing import Iterable

from ..errors import InputError
from . import Options, Schema, read_text
from .protobuf_compile import Source, compile_set, pool_of
from .protobuf_diff import KINDS, Side
from .protobuf_diff import diff as _diff
from .protobuf_model import build, usage

name = "protobuf"
__all__ = ["name", "KINDS", "load", "load_many", "diff"]


def load(path: Path, display: str, options: Options) -> Schema:
    return load_many([(Path(path), display)], options)[display]


def load_many(files: Iterable[tuple[Path, str]], options: Options, root: Path | None = None) -> dict[str, Schema]:
    """Compile the files of one side together; ``root`` is their common import root (a directory pair)."""
    sources = []
    for path, display in files:
        read_text(path, display)  # the shared checks: exists, size, UTF-8
        base = Path(root) if root is not None else path.parent
        sources.append(Source(path, display, base))
    if not sources:
        return {}
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


def _schema(model, source: Source) -> Schema:
    from .protobuf_model import Model

    virtual = source.virtual  # resolves two paths on disk: once per file, not once per type
    own = Model(
        files={k: v for k, v in model.files.items() if k == virtual},
        messages={k: _own(m, virtual) for k, m in model.messages.items()},
        enums={k: _own(e, virtual) for k, e in model.enums.items()},
        services={k: s for k, s in model.services.items() if s.file == virtual},
    )
    if virtual not in model.files:
        raise InputError("protoc did not report this file", source.display)
    roots = tuple(sorted(m.full_name for m in own.messages.values()
                         if m.own and m.parent is None and not m.map_entry))
    paths, first = usage(own, list(roots))
    fields = {root: frozenset(paths.get(root, ())) for root in roots}
    return Schema(format=name, file=source.display, roots=roots, fields=fields,
                  model=Side(own, roots, first, source.display))


def _own(item, virtual: str):
    """A copy of a type marked as compared only if it lives in this file."""
    from dataclasses import replace

    own = item.file == virtual
    return item if item.own == own else replace(item, own=own)


def diff(old: Schema, new: Schema):
    return _diff(old.model, new.model)
