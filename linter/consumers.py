"""Consumer impact: which registered consumers read what a change touched, and who must hear.

A consumer is told about a finding on a field it reads when the finding breaks the
compatibility that consumer relies on (its ``needs``, else the run's mode), changes the
field's meaning, or could not be decided. Compatible findings on its fields leave it
informed; a consumer none of the findings touch is unaffected.
"""
from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Iterable, Mapping

from .errors import InputError
from .model import Comparison, Finding
from .paths import glob_matches
from .registry import Consumer, Read, Registry, load  # noqa: F401 - load is part of this module's API

TOLD, INFORMED, UNAFFECTED = "must-be-told", "informed", "unaffected"
VERDICTS = (TOLD, INFORMED, UNAFFECTED)
DIRECTIONS = {"backward": ("backward",), "forward": ("forward",), "full": ("backward", "forward"), "none": ()}


@dataclass(frozen=True)
class Reason:
    """Why one finding must be told to one consumer."""

    finding: int
    breaks: tuple[str, ...] = ()
    semantic: bool = False
    undecided: bool = False

    @property
    def why(self) -> str:
        if self.semantic:
            return "changes the meaning of a field you read"
        if self.undecided:
            return "could not be decided; review it by hand"
        return f"breaks {' and '.join(self.breaks)} compatibility, which you rely on"

    def to_json(self) -> dict:
        out = {"finding": self.finding, "why": self.why}
        if self.breaks:
            out["breaks"] = list(self.breaks)
        if self.semantic:
            out["semantic"] = True
        if self.undecided:
            out["undecided"] = True
        return out


@dataclass(frozen=True)
class Stale:
    consumer: str
    schema: str
    field: str

    def __str__(self) -> str:
        return (f"consumer {self.consumer!r} reads {self.schema} field {self.field!r}, "
                "which the OLD schema does not have (stale registry entry)")


@dataclass(frozen=True)
class Impact:
    """What one consumer gets out of a run."""

    consumer: Consumer
    needs: str
    findings: tuple[int, ...] = ()
    reasons: tuple[Reason, ...] = ()
    fields: tuple[str, ...] = ()          # the changed paths it reads, as "schema:path"
    stale: tuple[Stale, ...] = ()
    unmatched: tuple[str, ...] = ()       # reads that matched nothing compared

    @property
    def verdict(self) -> str:
        if self.reasons:
            return TOLD
        return INFORMED if self.findings else UNAFFECTED

    def to_json(self) -> dict:
        c = self.consumer
        out = {"name": c.name, "contact": c.contact, "notify": self.verdict == TOLD,
               "findings": list(self.findings), "verdict": self.verdict, "needs": self.needs,
               "reasons": [r.to_json() for r in self.reasons], "fields": list(self.fields)}
        if c.team:
            out["team"] = c.team
        if c.channel:
            out["channel"] = c.channel
        if self.stale:
            out["stale"] = [{"schema": s.schema, "field": s.field} for s in self.stale]
        if self.unmatched:
            out["unmatched"] = list(self.unmatched)
        return out


def _file_level(finding: Finding, comparison: Comparison) -> bool:
    """A finding about the file itself (added, removed), not about a type inside it."""
    return not finding.path and finding.schema in (comparison.old, comparison.new)


def _about_the_file(finding: Finding, comparison: Comparison, roots) -> bool:
    """Type-level findings that concern every OLD type of the file: the file was added or
    removed, or a type the OLD side does not have appeared (a renamed root)."""
    return _file_level(finding, comparison) or (not finding.path and finding.schema not in roots)


def _roots(comparison: Comparison) -> Mapping[str, frozenset[str]]:
    """The OLD side's roots and field paths; for a removed file, read from the file itself."""
    if comparison.old_fields or not any(_file_level(f, comparison) for f in comparison.findings):
        return comparison.old_fields
    from .api import load as load_schema

    try:
        return load_schema(comparison.old).fields
    except (InputError, OSError):
        return {}  # a removed file that cannot be read: only globs can name it


@dataclass
class _Scope:
    """The findings one read may see in one comparison, and the OLD paths to check it against."""

    findings: list[tuple[int, Finding]] = field(default_factory=list)
    old_paths: set[str] | None = None  # None: the OLD side cannot tell (e.g. a type added in NEW)


def _scope(read: Read, comparison: Comparison, roots, numbered) -> _Scope | None:
    # A type's name first: a JSON Schema's $id may be a URL, which also reads as a glob.
    in_old = read.schema in roots
    picked = [(i, f) for i, f in numbered
              if f.schema == read.schema or (in_old and _about_the_file(f, comparison, roots))]
    if in_old or picked:
        return _Scope(picked, set(roots[read.schema]) if in_old else None)
    if read.by_file and (glob_matches(read.schema, comparison.old) or glob_matches(read.schema, comparison.new)):
        return _Scope(list(numbered), set().union(*roots.values()) if roots else None)
    return None


def _reason(index: int, finding: Finding, needs: str) -> Reason | None:
    if finding.semantic:
        return Reason(index, semantic=True)
    if finding.undecided:
        return Reason(index, undecided=True)
    broken = tuple(d for d in DIRECTIONS[needs] if d in finding.compatibility.breaks())
    return Reason(index, breaks=broken) if broken else None


def assess(consumer: Consumer, comparisons: Iterable[tuple[Comparison, Mapping, list]], mode: str) -> Impact:
    needs = consumer.needs or mode
    hits: dict[int, Finding] = {}
    needs_at: dict[int, str] = {}  # without its own needs, a consumer relies on each pair's mode
    stale, unmatched = [], []
    for read in consumer.reads:
        matched, old_paths = False, None
        for comparison, roots, numbered in comparisons:
            scope = _scope(read, comparison, roots, numbered)
            if scope is None:
                continue
            matched = True
            for i, f in scope.findings:
                if read.fields is None or any(p.overlaps(f.path) for p in read.fields):
                    hits[i] = f
                    needs_at[i] = consumer.needs or comparison.mode or mode
            if scope.old_paths is not None:
                old_paths = (old_paths or set()) | scope.old_paths
        if not matched:
            unmatched.append(read.schema)
        elif read.fields is not None and old_paths is not None:
            # Stale: nothing the read matched in OLD (every file, for a glob) has the field.
            stale += [Stale(consumer.name, read.schema, pattern.text) for pattern in read.fields
                      if not any(pattern.covers(p) for p in old_paths)]
    order = sorted(hits)
    reasons = tuple(r for r in (_reason(i, hits[i], needs_at[i]) for i in order) if r is not None)
    fields = tuple(dict.fromkeys(f"{hits[i].schema}:{hits[i].path}" if hits[i].path else hits[i].schema
                                 for i in order))
    return Impact(consumer, needs, tuple(order), reasons, fields, tuple(dict.fromkeys(stale)), tuple(unmatched))


def impacts(comparisons: list[Comparison], registry: Registry, mode: str) -> list[Impact]:
    """One Impact per registered consumer, in registry order; finding indices follow the report."""
    prepared, index = [], 0
    for comparison in comparisons:
        numbered = list(enumerate(comparison.findings, start=index))
        index += len(numbered)
        prepared.append((comparison, _roots(comparison), numbered))
    return [assess(c, prepared, mode) for c in registry.consumers]


def apply(report, registry: Registry, *, warn_unmatched: bool = False):
    """Fill the report's consumer list, each finding's consumers, and stale-entry warnings."""
    found = impacts(report.comparisons, registry, report.mode)
    readers: dict[int, list[str]] = {}
    for impact in found:
        for i in impact.findings:
            readers.setdefault(i, []).append(impact.consumer.name)
    comparisons, index = [], 0
    for comparison in report.comparisons:
        findings = []
        for f in comparison.findings:
            findings.append(replace(f, consumers=tuple(readers.get(index, ()))))
            index += 1
        comparisons.append(replace(comparison, findings=tuple(findings)))
    report.comparisons = comparisons
    report.consumers = [impact.to_json() for impact in found]
    for impact in found:
        report.warnings.extend(str(s) for s in impact.stale)
        if warn_unmatched:
            report.warnings.extend(f"consumer {impact.consumer.name!r} reads {u}, which matches no compared "
                                   "schema type or file" for u in impact.unmatched)
    return report
