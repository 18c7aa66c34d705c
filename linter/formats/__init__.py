"""Format adapters: one module per schema language, each meeting the ``Format`` protocol.

Adapters are imported only when a run needs them, so that a run on Avro files never pays
for importing protobuf or jsonschema.
"""
from __future__ import annotations

import importlib
import json
import os
from dataclasses import dataclass, field
from pathlib import Path
from collections.abc import Mapping
from typing import Any, Protocol

from ..errors import InputError
from ..model import Change

# format name -> module under linter.formats
FORMATS = {"avro": "avro", "protobuf": "protobuf", "jsonschema": "jsonschema"}
EXTENSIONS = {".avsc": "avro", ".proto": "protobuf", ".json": "jsonschema"}
AVRO_NAMED = {"record", "error", "enum", "fixed"}

MAX_BYTES = 16 * 1024 * 1024  # a schema file larger than this is refused, not parsed


@dataclass
class Options:
    """What a run tells the adapters beyond the file itself."""

    include: tuple[str, ...] = ()       # protobuf import paths (-I)
    root: str | None = None             # files may not reference anything outside this folder
    settings: Mapping[str, Any] = field(default_factory=dict)  # format-specific configuration


@dataclass
class Schema:
    """A parsed schema file, as an adapter hands it to its own differ.

    ``roots`` are the full names of the file's root types; ``fields`` maps each root to
    the dotted field paths it holds (for consumer registries); ``model`` is the adapter's
    own representation.
    """

    format: str
    file: str
    roots: tuple[str, ...]
    fields: Mapping[str, frozenset[str]]
    model: Any = None


class LazyPaths(Mapping):
    """``Schema.fields``, each root's paths listed by ``paths_of(root)`` when first asked
    for (consumer runs only).

    Types that nest each other (a chain of records or messages, each holding the one
    before) give every root all the paths below it: listing them all up front is
    quadratic. Pickled as the plain dict of all paths, not the model behind them.
    """

    def __init__(self, roots: tuple[str, ...], paths_of):
        self._roots, self._known, self._paths_of, self._paths = roots, frozenset(roots), paths_of, {}

    def __getitem__(self, root: str) -> frozenset[str]:
        if root not in self._known:
            raise KeyError(root)
        if root not in self._paths:
            self._paths[root] = frozenset(self._paths_of(root))
        return self._paths[root]

    def __iter__(self):
        return iter(self._roots)

    def __len__(self):
        return len(self._roots)

    def __reduce__(self):  # crossing to another process: the listed paths, not the model
        return dict, (dict(self.items()),)


class Format(Protocol):
    name: str

    def load(self, path: Path, display: str, options: Options) -> Schema: ...

    def diff(self, old: Schema, new: Schema) -> list[Change]: ...


_ADAPTERS: dict[str, Format] = {}


def adapter(name: str) -> Format:
    module = _ADAPTERS.get(name)
    if module is None:
        if name not in FORMATS:
            raise InputError(f"unknown format {name!r} (known: {', '.join(FORMATS)})")
        module = _ADAPTERS[name] = importlib.import_module(f".{FORMATS[name]}", __name__)
    return module


def read_text(path: Path, display: str) -> str:
    """Read a schema file as UTF-8, refusing oversized and undecodable files in one line."""
    try:
        with open(path, "rb") as file:
            size = os.fstat(file.fileno()).st_size
            if size > MAX_BYTES:
                raise InputError(f"file is {size} bytes; schema files over {MAX_BYTES} bytes are refused", display)
            data = file.read()
    except FileNotFoundError:
        raise InputError("no such file", display) from None
    except IsADirectoryError:
        raise InputError("is a directory, expected a schema file", display) from None
    except PermissionError:
        raise InputError("permission denied", display) from None
    except OSError as exc:
        raise InputError(f"cannot read: {exc.strerror or exc}", display) from None
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        column = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        raise InputError("not UTF-8 text", display, line, column) from None


def parse_json(text: str, display: str) -> Any:
    try:
        return json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"invalid JSON: {exc.msg}", display, exc.lineno, exc.colno) from None
    except RecursionError:
        raise InputError("JSON nested too deeply to read", display) from None


def looks_like_avro(data: Any) -> bool:
    """Whether a parsed .json document is an Avro schema rather than a JSON Schema."""
    if isinstance(data, list):
        return bool(data) and all(looks_like_avro(d) or isinstance(d, str) for d in data)
    if not isinstance(data, dict) or "$schema" in data:
        return False
    kind = data.get("type")  # any JSON value: a list or object here is not hashable
    return isinstance(kind, str) and kind in AVRO_NAMED and ("name" in data or "fields" in data or "symbols" in data)


def detect(path: Path, display: str, text: str | None = None) -> str:
    fmt = EXTENSIONS.get(path.suffix.lower())
    if fmt is None:
        raise InputError(
            f"cannot tell the format from the extension {path.suffix or '(none)'!r}; "
            "use --format avro|protobuf|jsonschema", display)
    if fmt == "jsonschema":
        text = read_text(path, display) if text is None else text
        try:
            data = json.loads(text)
        except (json.JSONDecodeError, RecursionError):
            return fmt  # the adapter reports the parse error with its position
        if looks_like_avro(data):
            return "avro"
    return fmt
