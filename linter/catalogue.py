"""The rule catalogue: what each kind of change means, read from ``rules/*.toml``.

The catalogue is data, validated when loaded: a malformed entry is a bug in evolint and
fails loudly (the test suite loads it). Rule ids are stable and never reused; a retired
rule keeps its entry with ``status = "removed"``.
"""
from __future__ import annotations

import re
import string
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any, Mapping

from .model import SEVERITIES, Compat

ID = re.compile(r"^[A-Z]\d{3}$")
NAME = re.compile(r"^[a-z][a-z0-9]*(-[a-z0-9]+)*$")
STATUSES = ("stable", "preview", "deprecated", "removed")
REQUIRED = ("id", "name", "kind", "title", "severity", "message", "why", "instead", "reference")
OPTIONAL = ("backward", "forward", "semantic", "undecided", "encodings", "example_old",
            "example_new", "known_problems", "status")


class CatalogueError(Exception):
    """A rule file is malformed: a bug in evolint, not in the user's input."""


@dataclass(frozen=True)
class Rule:
    id: str
    name: str
    kind: str
    format: str
    title: str
    severity: str
    message: str
    why: str
    instead: str
    reference: str
    compatibility: Compat
    semantic: bool = False
    undecided: bool = False
    # Effects on further encodings of the same data (protobuf: "json"), keyed by name.
    encodings: Mapping[str, Compat] = field(default_factory=dict)
    example_old: str | None = None
    example_new: str | None = None
    known_problems: str | None = None
    status: str = "stable"

    def render(self, context: Mapping[str, Any]) -> str:
        # Lists read as "a, b"; str.format_map runs in C, string.Formatter in Python.
        return self.message.format_map(_Context(self, {
            k: ", ".join(map(str, v)) if isinstance(v, (list, tuple, set, frozenset)) else v
            for k, v in context.items()}))

    @property
    def effect_text(self) -> str:
        if self.semantic:
            return "semantic (breaking for every reader of the field)"
        if self.undecided:
            return "undecided (counted as breaking)"
        c = self.compatibility
        return {
            Compat.FULL: "compatible both ways",
            Compat.BACKWARD: "backward only (new readers read old data; old readers fail on new data)",
            Compat.FORWARD: "forward only (old readers read new data; new readers fail on old data)",
            Compat.BREAKING: "breaking both ways",
        }[c]


class _Context(dict):
    def __init__(self, rule: Rule, values: Mapping[str, Any]):
        super().__init__(values)
        self._rule = rule

    def __missing__(self, key):
        raise CatalogueError(f"rule {self._rule.id}: message names {{{key}}}, which the change does not carry")


_FORMATTER = string.Formatter()  # parses templates for the names they quote


def _effect(where: str, table: Mapping) -> Compat:
    for key in ("backward", "forward"):
        if not isinstance(table.get(key), bool):
            raise CatalogueError(f"{where}: '{key}' must be true or false")
    return Compat.of(table["backward"], table["forward"])


def _parse_rule(entry: Mapping, fmt: str, where: str) -> Rule:
    unknown = set(entry) - set(REQUIRED) - set(OPTIONAL)
    if unknown:
        raise CatalogueError(f"{where}: unknown keys {sorted(unknown)}")
    for key in REQUIRED:
        value = entry.get(key)
        if not isinstance(value, str) or not value.strip():
            raise CatalogueError(f"{where}: '{key}' is required and must be non-empty text")
    if not ID.match(entry["id"]):
        raise CatalogueError(f"{where}: id {entry['id']!r} must be a capital letter and three digits")
    if not NAME.match(entry["name"]):
        raise CatalogueError(f"{where}: name {entry['name']!r} must be lower-case words joined by '-'")
    if entry["severity"] not in SEVERITIES:
        raise CatalogueError(f"{where}: severity must be one of {SEVERITIES}")
    status = entry.get("status", "stable")
    if status not in STATUSES:
        raise CatalogueError(f"{where}: status must be one of {STATUSES}")
    semantic = entry.get("semantic", False)
    undecided = entry.get("undecided", False)
    if semantic or undecided:
        if "backward" in entry or "forward" in entry:
            raise CatalogueError(f"{where}: a semantic or undecided rule has no backward/forward effect")
        compat = Compat.BREAKING
    else:
        compat = _effect(where, entry)
    encodings = {name: _effect(f"{where} encodings.{name}", table)
                 for name, table in entry.get("encodings", {}).items()}
    try:  # every placeholder must be a plain name; checked here, filled per change
        names = [f for _, f, _, _ in _FORMATTER.parse(entry["message"]) if f is not None]
    except ValueError as exc:
        raise CatalogueError(f"{where}: message template: {exc}") from None
    if any(not n.isidentifier() for n in names):
        raise CatalogueError(f"{where}: message placeholders must be plain names")
    return Rule(
        id=entry["id"], name=entry["name"], kind=entry["kind"], format=fmt,
        title=entry["title"].strip(), severity=entry["severity"], message=entry["message"].strip(),
        why=entry["why"].strip(), instead=entry["instead"].strip(),
        reference=entry["reference"].strip(), compatibility=compat, semantic=bool(semantic),
        undecided=bool(undecided), encodings=encodings, example_old=entry.get("example_old"),
        example_new=entry.get("example_new"), known_problems=entry.get("known_problems"),
        status=status,
    )


@dataclass(frozen=True)
class Catalogue:
    rules: tuple[Rule, ...]

    def __post_init__(self):
        object.__setattr__(self, "_by_kind", {r.kind: r for r in self.rules})
        object.__setattr__(self, "_by_id", {r.id: r for r in self.rules})
        object.__setattr__(self, "_by_name", {r.name: r for r in self.rules})

    def for_kind(self, kind: str) -> Rule | None:
        return self._by_kind.get(kind)

    def get(self, key: str) -> Rule | None:
        """A rule by id (``A101``, any case) or by name."""
        return self._by_id.get(key.upper()) or self._by_name.get(key)

    def kinds(self) -> set[str]:
        return set(self._by_kind)

    def __iter__(self):
        return iter(self.rules)

    def __len__(self):
        return len(self.rules)


def rules_dir() -> Path:
    """Where the rule files are: inside the installed wheel, or the source tree."""
    # A plain path, not importlib.resources: its readers import zipfile, a measurable share
    # of start-up (benchmarks/startup.py), and the files are read from disk either way.
    packaged = Path(__file__).resolve().parent / "rules"
    if packaged.is_dir():
        return packaged
    return Path(__file__).resolve().parent.parent / "rules"


def parse_files(paths) -> Catalogue:
    rules: list[Rule] = []
    seen: dict[tuple[str, str], str] = {}
    for path in sorted(paths):
        try:
            data = tomllib.loads(Path(path).read_text(encoding="utf-8"))
        except tomllib.TOMLDecodeError as exc:
            raise CatalogueError(f"{path}: {exc}") from None
        fmt = data.get("format")
        if not isinstance(fmt, str):
            raise CatalogueError(f"{path}: top-level 'format' is required")
        entries = data.get("rule", [])
        if not isinstance(entries, list) or not entries:
            raise CatalogueError(f"{path}: no [[rule]] entries")
        for n, entry in enumerate(entries, 1):
            rule = _parse_rule(entry, fmt, f"{Path(path).name} rule #{n}")
            for what, key in (("id", rule.id), ("name", rule.name), ("kind", rule.kind)):
                if (what, key) in seen:
                    raise CatalogueError(f"{path}: {what} {key!r} of {rule.id} is already used by {seen[what, key]}")
                seen[what, key] = rule.id
            rules.append(rule)
    return Catalogue(tuple(rules))


class LazyCatalogue:
    """The catalogue, read one rule file at a time as a run asks for kinds.

    Parsing every rule file costs more than the rest of a small run's start-up (tomllib is
    pure Python; benchmarks/startup.py), and a run on Avro files needs avro.toml and the
    format-blind files only. A kind is looked up in the file named for its prefix
    (``avro-...`` -> avro.toml), then in the files not named for a format; anything else
    (listing, lookup by id, a kind found nowhere) reads and checks the whole catalogue.
    """

    def __init__(self, files: list[Path]):
        self._files = {path.stem: path for path in files}
        self._parts: dict[str, Catalogue] = {}
        self._full: Catalogue | None = None

    def full(self) -> Catalogue:
        if self._full is None:
            self._full = parse_files(self._files.values())
        return self._full

    def _part(self, stem: str) -> Catalogue:
        if stem not in self._parts:
            self._parts[stem] = parse_files([self._files[stem]])
        return self._parts[stem]

    def for_kind(self, kind: str) -> Rule | None:
        if self._full is None:
            from .formats import FORMATS

            prefix = kind.split("-", 1)[0]
            stems = [prefix] if prefix in FORMATS and prefix in self._files else []
            stems += [s for s in self._files if s not in FORMATS]
            for stem in stems:
                rule = self._part(stem).for_kind(kind)
                if rule is not None:
                    return rule
        return self.full().for_kind(kind)

    @property
    def rules(self) -> tuple[Rule, ...]:
        return self.full().rules

    def get(self, key: str) -> Rule | None:
        return self.full().get(key)

    def kinds(self) -> set[str]:
        return self.full().kinds()

    def __iter__(self):
        return iter(self.full())

    def __len__(self):
        return len(self.full())


@lru_cache(maxsize=1)
def load() -> LazyCatalogue:
    directory = rules_dir()
    files = sorted(directory.glob("*.toml"))
    if not files:
        raise CatalogueError(f"no rule files found in {directory}")
    return LazyCatalogue(files)
