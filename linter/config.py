"""Configuration: ``[tool.evolint]`` in pyproject.toml, or an evolint.toml, turned into policies.

The file is found from the current directory upward (evolint.toml before pyproject.toml
in each folder), or named with ``--config``. It is validated against
``linter/data/config.schema.json``; every error is one line naming the file, the key and,
where it can be found, the line. Globs are relative to the folder of the file.
Command-line options win over the file.
"""
from __future__ import annotations

import datetime as _dt
import json
import os
import re
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any, Mapping

from .engine import Policy, Silence
from .errors import UsageError
from .model import Change, Location

FILES = ("evolint.toml", "pyproject.toml")
KINDS = frozenset({"waiver-expired"})


class ConfigError(UsageError):
    """The configuration file is malformed (exit status 2)."""


@dataclass(frozen=True)
class Waiver:
    rule: str
    reason: str
    files: str | None = None
    fields: str | None = None
    until: _dt.date | None = None
    line: int | None = None

    def expired(self, today: _dt.date) -> bool:
        return self.until is not None and today > self.until

    @property
    def scope(self) -> str:
        parts = [p for p in (self.files, self.fields) if p]
        return " / ".join(parts) or "every file"


@dataclass(frozen=True)
class Config:
    file: Path | None = None
    mode: str | None = None
    encodings: tuple[str, ...] = ()
    consumers: Path | None = None
    include: tuple[str, ...] = ()
    schemas: tuple[str, ...] = ()
    by_path: tuple[tuple[str, str], ...] = ()          # (glob, mode), last match wins
    severities: Mapping[str, str] = field(default_factory=dict)
    waivers: tuple[Waiver, ...] = ()
    undecided: str = "breaking"     # how findings the analysis could not decide count
    json_format: str = "default"    # JSON Schema `format`: the draft's default, annotation or assertion
    _cache: dict = field(default_factory=dict, compare=False, repr=False)  # policies by file

    @property
    def base(self) -> Path:
        return self.file.parent if self.file else Path.cwd()

    def relative(self, path: str | Path) -> str | None:
        """``path`` relative to the configuration's folder, or None if it lies outside."""
        rel = os.path.relpath(os.path.abspath(path), self.base)
        return None if rel.startswith("..") else Path(rel).as_posix()

    def mode_for(self, path: str | Path | None, default: str) -> str:
        return self._mode_for_rel(self.relative(path) if path is not None else None, default)

    def _mode_for_rel(self, rel: str | None, default: str) -> str:
        mode = self.mode or default
        if rel is not None:
            for glob, glob_mode in self.by_path:
                if glob_match(glob, rel):
                    mode = glob_mode
        return mode

    def is_schema(self, path: str | Path) -> bool:
        if not self.schemas:
            return True
        rel = self.relative(path)
        return rel is not None and any(glob_match(g, rel) for g in self.schemas)

    def policy(self, path: str | Path | None, *, mode: str | None = None,
               encodings: tuple[str, ...] | None = None, today: _dt.date | None = None) -> Policy:
        """The policy for one file; ``mode``/``encodings`` from the command line win."""
        today = today or _dt.date.today()
        by_file = bool(self.by_path) or any(w.files for w in self.waivers)
        # Only globs over files make the policy depend on the file: otherwise share one.
        rel = self.relative(path) if path is not None and by_file else None
        return self._policy(rel, mode, None if encodings is None else tuple(encodings), today)

    def _policy(self, rel: str | None, mode: str | None, encodings: tuple[str, ...] | None,
                today: _dt.date) -> Policy:
        key = (rel, mode, encodings, today)
        if key not in self._cache:
            self._cache[key] = self._build_policy(rel, mode, encodings, today)
        return self._cache[key]

    def _build_policy(self, rel, mode, encodings, today) -> Policy:
        silences = tuple(
            Silence(w.rule, w.fields or "*", w.reason) for w in self.waivers
            if not w.expired(today) and (w.files is None or (rel is not None and glob_match(w.files, rel)))
        )
        return Policy(mode=mode or self._mode_for_rel(rel, "backward"),
                      encodings=tuple(encodings if encodings is not None else self.encodings),
                      severities=dict(self.severities), silences=silences, undecided=self.undecided)

    @property
    def settings(self) -> dict:
        """Format-specific settings for the adapters (``Options.settings``)."""
        return {"format": self.json_format} if self.json_format != "default" else {}

    def expired_changes(self, today: _dt.date | None = None) -> list[Change]:
        """One change per expired waiver, located at its entry in the file."""
        today = today or _dt.date.today()
        display = display_path(self.file) if self.file else "(configuration)"
        return [
            Change("waiver-expired", display, "", w.until.isoformat(), None,
                   None, Location(display, w.line),
                   {"rule": w.rule, "scope": w.scope, "until": w.until.isoformat(), "reason": w.reason})
            for w in self.waivers if w.expired(today)
        ]


def expired_comparison(config: Config, mode: str, today: _dt.date | None = None):
    """The expired waivers as findings, in a comparison of their own (None when there are none)."""
    from . import catalogue, engine
    from .model import Comparison

    changes = config.expired_changes(today)
    if not changes:
        return None
    findings = engine.judge(changes, catalogue.load(), Policy(mode=mode, severities=dict(config.severities)))
    display = changes[0].schema
    return Comparison(display, display, "config", tuple(findings), mode)


def display_path(path: Path) -> str:
    rel = os.path.relpath(path)
    return path.as_posix() if rel.startswith("..") else Path(rel).as_posix()


_GLOB_PART = re.compile(r"\*\*/|\*\*|\*|\?|[^*?]+")


@lru_cache(maxsize=256)
def _glob_regex(glob: str) -> re.Pattern:
    out = []
    for token in _GLOB_PART.findall(glob):
        if token == "**/":
            out.append(r"(?:[^/]+/)*")
        elif token == "**":
            out.append(r".*")
        elif token == "*":
            out.append(r"[^/]*")
        elif token == "?":
            out.append(r"[^/]")
        else:
            out.append(re.escape(token))
    return re.compile("".join(out) + r"\Z")


def glob_match(glob: str, path: str) -> bool:
    """Path globs: ``*`` and ``?`` stay inside one folder, ``**/`` spans any number of them."""
    return _glob_regex(glob[2:] if glob.startswith("./") else glob).match(path) is not None


def find(start: str | Path = ".") -> Path | None:
    """The nearest evolint.toml, or pyproject.toml holding [tool.evolint], from ``start`` upward."""
    folder = Path(start).resolve()
    for candidate in (folder, *folder.parents):
        for name in FILES:
            path = candidate / name
            if path.is_file() and (name == "evolint.toml" or _has_table(path)):
                return path
    return None


def _has_table(path: Path) -> bool:
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return False  # a pyproject.toml that is not ours to judge
    return isinstance(data.get("tool"), dict) and "evolint" in data["tool"]


def _read(path: Path) -> tuple[dict, str, str]:
    display = display_path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ConfigError("no such configuration file", display) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ConfigError(f"cannot read configuration: {exc}", display) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        match = re.search(r"\(at line (\d+), column (\d+)\)", str(exc))
        message = re.sub(r"\s*\(at line \d+, column \d+\)", "", str(exc))
        raise ConfigError(f"invalid TOML: {message}", display,
                          int(match[1]) if match else None, int(match[2]) if match else None) from None
    if path.name == "pyproject.toml":
        table = data.get("tool", {}).get("evolint")
        if table is None:
            raise ConfigError("no [tool.evolint] table", display)
        return table, "tool.evolint", text
    return data, "", text


def _plain(value: Any) -> Any:
    """TOML values as JSON values: dates become ISO text, so the schema can check them."""
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_plain(v) for v in value]
    if isinstance(value, (_dt.date, _dt.datetime, _dt.time)):
        return value.isoformat()
    return value


@lru_cache(maxsize=1)
def _validator():
    from jsonschema import Draft202012Validator

    schema = json.loads((resources.files("linter") / "data" / "config.schema.json").read_text())
    return Draft202012Validator(schema)


def _key_path(table: str, parts) -> str:
    out = table
    for part in parts:
        out += f"[{part}]" if isinstance(part, int) else (f".{part}" if out else str(part))
    return out


def _line_of(text: str, key: str, nth: int = 0) -> int | None:
    """The line where ``key`` is assigned (the nth time); TOML parsers keep no positions."""
    pattern = re.compile(rf"^\s*(?:{re.escape(key)}|\"{re.escape(key)}\")\s*=|^\s*\[+[^\]]*\b{re.escape(key)}\]+",
                         re.M)
    found = list(pattern.finditer(text))
    if len(found) > nth:
        return text.count("\n", 0, found[nth].start()) + 1
    return None


def _entry_lines(text: str, key: str) -> list[int]:
    """The lines of each ``[[...key]]`` array-of-tables header, in order."""
    pattern = re.compile(rf"^\s*\[\[\s*(?:tool\.evolint\.)?{re.escape(key)}\s*\]\]", re.M)
    return [text.count("\n", 0, m.start()) + 1 for m in pattern.finditer(text)]


def _schema_error(error, table: str, display: str, text: str) -> ConfigError:
    path = list(error.absolute_path)
    if error.validator == "additionalProperties":
        extra = sorted(set(error.instance) - set(error.schema.get("properties", {})))
        key = extra[0] if extra else "?"
        where = _key_path(table, [*path, key])
        return ConfigError(f"unknown key {where!r}", display, _line_of(text, key))
    where = _key_path(table, path) or "(top level)"
    last = next((p for p in reversed(path) if isinstance(p, str)), None)
    line = _line_of(text, last) if last else None
    if error.validator == "required":
        missing = re.findall(r"'([^']+)' is a required property", error.message)
        return ConfigError(f"{where}: missing key {missing[0] if missing else ''!r}".rstrip(), display, line)
    if error.validator == "enum":
        allowed = ", ".join(map(str, error.validator_value))
        return ConfigError(f"{where}: {error.instance!r} is not one of {allowed}", display, line)
    if error.validator == "pattern" and path and path[-1] == "until":
        return ConfigError(f"{where}: expected a date YYYY-MM-DD, got {error.instance!r}", display, line)
    if error.validator == "pattern" and path and path[-1] == "reason":
        return ConfigError(f"{where}: a waiver needs a written reason", display, line)
    return ConfigError(f"{where}: {error.message}", display, line)


def load(path: str | Path) -> Config:
    """Read and validate one configuration file."""
    path = Path(path).resolve()
    display = display_path(path)
    raw, table, text = _read(path)
    data = _plain(raw)
    errors = sorted(_validator().iter_errors(data), key=lambda e: (len(list(e.absolute_path)), str(list(e.absolute_path))))
    if errors:
        raise _schema_error(errors[0], table, display, text)
    from . import catalogue

    cat = catalogue.load()
    for rule_key in data.get("severity", {}):
        if cat.get(rule_key) is None:
            raise ConfigError(f"{_key_path(table, ['severity', rule_key])}: unknown rule {rule_key!r}",
                              display, _line_of(text, rule_key))
    lines = _entry_lines(text, "waive")
    waivers = []
    for n, entry in enumerate(data.get("waive", [])):
        line = lines[n] if n < len(lines) else None
        if cat.get(entry["rule"]) is None:
            raise ConfigError(f"{_key_path(table, ['waive', n, 'rule'])}: unknown rule {entry['rule']!r}",
                              display, line)
        until = None
        if "until" in entry:
            try:
                until = _dt.date.fromisoformat(entry["until"])
            except ValueError:
                raise ConfigError(f"{_key_path(table, ['waive', n, 'until'])}: not a date: {entry['until']!r}",
                                  display, line) from None
        waivers.append(Waiver(cat.get(entry["rule"]).id, entry["reason"].strip(), entry.get("files"),
                              entry.get("fields"), until, line))
    base = path.parent
    return Config(
        file=path,
        mode=data.get("mode"),
        encodings=tuple(data.get("encodings", ())),
        consumers=(base / data["consumers"]) if "consumers" in data else None,
        include=tuple(str(base / p) for p in data.get("include", ())),
        schemas=tuple(data.get("schemas", ())),
        by_path=tuple((e["files"], e["mode"]) for e in data.get("by-path", ())),
        severities={(cat.get(k).id): v for k, v in data.get("severity", {}).items()},
        waivers=tuple(waivers),
        undecided=data.get("undecided", "breaking"),
        json_format=data.get("json-format", "default"),
    )


def discover(explicit: str | Path | None = None, start: str | Path = ".") -> Config:
    """The configuration a run uses: ``explicit``, else the nearest file, else the defaults."""
    if explicit is not None:
        return load(explicit)
    found = find(start)
    return load(found) if found else Config()
