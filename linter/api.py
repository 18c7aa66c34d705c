"""The public Python API: ``check(old, new, ...) -> Report``.

The command line is a thin layer over this module; other tools import it directly.
"""
from __future__ import annotations

import os
import stat
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Iterable

from . import __version__, catalogue, engine
from .collector import collector_paused
from .errors import InputError, UsageError
from .formats import EXTENSIONS, Options, Schema, adapter, detect, read_text
from .model import MODES, Change, Comparison, Compat, Finding, Location, meet_all


@dataclass
class Report:
    mode: str
    comparisons: list[Comparison]
    consumers: list[dict] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    # Settings a reporter may show (e.g. the encodings counted).
    settings: dict[str, Any] = field(default_factory=dict)

    @property
    def findings(self) -> list[Finding]:
        return [f for c in self.comparisons for f in c.findings]

    @property
    def compatibility(self) -> Compat:
        return meet_all(f.compatibility for f in self.findings)

    @property
    def passed(self) -> bool:
        # A comparison may carry its own mode (configured per path); otherwise the run's.
        kept = all(c.compatibility.keeps(c.mode or self.mode) for c in self.comparisons)
        return kept and not any(f.severity == "error" for f in self.findings)

    @property
    def exit_code(self) -> int:
        return 0 if self.passed else 1

    def to_json(self) -> dict:
        from .report.json import to_json

        return to_json(self)


@dataclass(frozen=True)
class Pair:
    old: Path | None
    new: Path | None
    old_display: str
    new_display: str


def _schema_files(root: Path) -> dict[str, Path]:
    found = {}
    for dirpath, dirnames, filenames in os.walk(root, onerror=_walk_error):
        dirnames[:] = sorted(d for d in dirnames if not d.startswith("."))
        for name in filenames:
            path = Path(dirpath) / name
            if path.suffix.lower() in EXTENSIONS:
                found[path.relative_to(root).as_posix()] = path
    return found


def _walk_error(exc: OSError):
    raise InputError(f"cannot read directory: {exc.strerror or exc}", exc.filename)


def pairs(old: str | Path, new: str | Path) -> list[Pair]:
    """Pair two files, or the schema files of two directories by relative path."""
    old, new = Path(old), Path(new)
    old_dir, new_dir = _is_dir(old), _is_dir(new)
    if old_dir != new_dir:
        raise UsageError(f"cannot compare a directory with a file: {old} and {new}")
    if not old_dir:
        return [Pair(old, new, str(old), str(new))]
    olds, news = _schema_files(old), _schema_files(new)
    if not olds and not news:
        raise InputError("no schema files (.avsc, .proto, .json) in either directory", f"{old} and {new}")
    return [
        Pair(olds.get(rel), news.get(rel),
             str(old / rel), str(new / rel))
        for rel in sorted(set(olds) | set(news))
    ]


def _is_dir(path: Path) -> bool:
    """Whether ``path`` is a directory; refused when it does not exist (one stat call)."""
    try:
        return stat.S_ISDIR(os.stat(path).st_mode)
    except (FileNotFoundError, NotADirectoryError):
        raise InputError("no such file or directory", str(path)) from None
    except OSError as exc:
        raise InputError(f"cannot read: {exc.strerror or exc}", str(path)) from None


def _file_change(kind: str, fmt: str, pair: Pair) -> Change:
    path = pair.old_display if kind == "schema-file-removed" else pair.new_display
    loc = Location(path)
    return Change(kind=kind, schema=path, path="", old=pair.old_display if pair.old else None,
                  new=pair.new_display if pair.new else None,
                  old_loc=loc if pair.old else None, new_loc=loc if pair.new else None,
                  facts={"file": path, "format": fmt})


def _format_of(path: Path, display: str, forced: str | None) -> str:
    return forced or detect(path, display)


def _preload(pairs_: list[Pair], format: str | None, options: Options, old_options: Options | None,
             roots: tuple[Path, Path] | None) -> dict[str, Schema]:
    """Schemas of adapters that load one side's files together (``load_many``), by display name."""
    loaded: dict[str, Schema] = {}
    by_format: dict[str, list[Pair]] = {}
    for pair in pairs_:
        if pair.old is not None and pair.new is not None:
            by_format.setdefault(_format_of(pair.old, pair.old_display, format), []).append(pair)
    for fmt, group in by_format.items():
        module = adapter(fmt)
        if not hasattr(module, "load_many") or len(group) < 2:
            continue
        for side, root, opts in (("old", roots[0] if roots else None, old_options or options),
                                 ("new", roots[1] if roots else None, options)):
            files = [(getattr(p, side), getattr(p, side + "_display")) for p in group]
            loaded.update(module.load_many(files, opts, root=root))
    return loaded


def compare_one(pair: Pair, policy: engine.Policy, format: str | None, options: Options,
                old_options: Options | None = None, preloaded: dict[str, Schema] | None = None) -> Comparison:
    """Compare one pair of files under ``policy`` (``old_options`` for the OLD side, if it differs)."""
    cat = catalogue.load()
    preloaded = preloaded or {}
    if pair.old is None or pair.new is None:
        present = pair.new if pair.old is None else pair.old
        display = pair.new_display if pair.old is None else pair.old_display
        fmt = _format_of(present, display, format)
        kind = "schema-file-added" if pair.old is None else "schema-file-removed"
        findings = engine.judge([_file_change(kind, fmt, pair)], cat, policy)
        return Comparison(pair.old_display, pair.new_display, fmt, tuple(findings), policy.mode)
    fmt_old = _format_of(pair.old, pair.old_display, format)
    fmt_new = _format_of(pair.new, pair.new_display, format)
    if fmt_old != fmt_new:
        raise InputError(f"format changed from {fmt_old} to {fmt_new}; compare files of one format",
                         pair.new_display)
    module = adapter(fmt_old)
    if not getattr(module, "pause_collector", False):
        return _compare_loaded(module, pair, policy, cat, fmt_old, options, old_options, preloaded)
    # An adapter that builds large graphs of live objects asks for one pause around both
    # loads and the diff: the collector then looks at what survives once, not after each
    # step (Avro, 10,000 fields: 3.6% fewer instructions, benchmarks/instructions.py).
    with collector_paused():
        return _compare_loaded(module, pair, policy, cat, fmt_old, options, old_options, preloaded)


def _compare_loaded(module, pair: Pair, policy: engine.Policy, cat, fmt_old: str, options: Options,
                    old_options: Options | None, preloaded: dict[str, Schema]) -> Comparison:
    try:
        display = pair.old_display
        old_schema = preloaded.get(display) or module.load(pair.old, display, old_options or options)
        display = pair.new_display
        new_schema = preloaded.get(display)
        if new_schema is None:
            # An adapter may read NEW knowing OLD, to share what is written the same.
            beside = getattr(module, "load_beside", None)
            new_schema = (beside(pair.new, display, options, old_schema) if beside
                          else module.load(pair.new, display, options))
        display = f"{pair.old_display} and {pair.new_display}"
        changes = module.diff(old_schema, new_schema)
    except RecursionError:
        # Adapters walk iteratively where they can; what still recurses is refused, named.
        raise InputError("schema nested too deeply to read or compare", display) from None
    findings = engine.judge(changes, cat, policy)
    return Comparison(pair.old_display, pair.new_display, fmt_old, tuple(findings), policy.mode,
                      old_fields=old_schema.fields)  # adapters may list paths lazily: keep it so


def compare(pairs_: Iterable[Pair], policy: engine.Policy | Callable[[Pair], engine.Policy], *,
            format: str | None = None, options: Options | None = None,
            old_options: Options | None = None, jobs: int | None = None,
            roots: tuple[Path, Path] | None = None) -> list[Comparison]:
    """Compare every pair, in order; ``policy`` may be a function of the pair (per-path settings).

    Many pairs are compared on several processes (linter/pool.py); the result is the same.
    Formats that compile one side's files together (Protobuf: one protoc call per side) are
    loaded first, in this process, and their pairs compared here.
    """
    from .pool import run_all

    options = options or Options()
    pairs_ = list(pairs_)
    tasks = [(pair, policy(pair) if callable(policy) else policy) for pair in pairs_]
    preloaded = _preload(pairs_, format, options, old_options, roots)
    if preloaded:
        return [compare_one(pair, pol, format, options, old_options, preloaded) for pair, pol in tasks]
    return run_all(compare_one, tasks, format, options, old_options, jobs=jobs)


def check(old: str | Path, new: str | Path, *, mode: str = "backward", format: str | None = None,
          include: Iterable[str] = (), encodings: Iterable[str] = (),
          policy: engine.Policy | Callable[[Pair], engine.Policy] | None = None,
          options: Options | None = None, consumers: str | Path | None = None,
          witness: bool = False, jobs: int | None = None) -> Report:
    """Compare OLD with NEW (two files or two directories) and classify every change.

    ``encodings`` names further encodings whose effect counts toward the verdict (Protobuf:
    ``"json"``, the proto3 JSON mapping); the binary encoding always counts.
    ``policy`` may be a function of each pair (settings configured per path).
    ``consumers`` names a consumer registry (YAML): the report then says which consumers
    read what changed and which of them must be told. ``witness=True`` attaches to each
    finding that breaks a direction a datum showing it, confirmed by running the real
    codec (``linter.witness``).
    """
    if mode not in MODES:
        raise UsageError(f"unknown mode {mode!r} (known: {', '.join(MODES)})")
    policy = policy or engine.Policy(mode=mode, encodings=tuple(encodings))
    options = options or Options(include=tuple(include))
    registry = None
    if consumers is not None:
        from . import consumers as impact

        registry = impact.load(consumers)  # a bad registry fails before any schema is read
    pairs_ = pairs(old, new)
    folders = os.path.isdir(old)  # then NEW is one too (pairs refuses a folder and a file)
    roots = (Path(old), Path(new)) if folders else None
    comparisons = compare(pairs_, policy, format=format, options=options, jobs=jobs, roots=roots)
    if witness:
        from .witness import attach

        comparisons = attach(comparisons, options)
    counted = policy.encodings if isinstance(policy, engine.Policy) else tuple(encodings)
    settings = {"encodings": list(counted)} if counted else {}
    report = Report(mode=policy.mode if isinstance(policy, engine.Policy) else mode,
                    comparisons=comparisons, settings=settings)
    if registry is not None:
        impact.apply(report, registry, warn_unmatched=folders)
    return report


def load(path: str | Path, *, format: str | None = None, options: Options | None = None) -> Schema:
    """Parse one schema file with its adapter (what ``check`` does for each side)."""
    path = Path(path)
    fmt = _format_of(path, str(path), format)
    return adapter(fmt).load(path, str(path), options or Options())


__all__ = ["Report", "check", "load", "pairs", "compare", "read_text", "__version__"]
