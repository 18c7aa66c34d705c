"""Join changes to the rules that classify them, under a run's policy.

The differ says what happened; the catalogue says what it means; this module applies the
run's settings (the mode, the encodings that count, severity overrides, silenced rules)
and stamps the rule's words onto each change.
"""
from __future__ import annotations

import fnmatch
from dataclasses import dataclass, field
from typing import Iterable, Mapping

from .catalogue import Catalogue, Rule
from .model import Change, Compat, Finding, meet_all


class UnknownChangeKind(Exception):
    """A differ produced a kind the catalogue has no rule for: a bug in evolint."""


@dataclass(frozen=True)
class Silence:
    """A rule silenced for paths matching a glob, with the reason a reviewer can read."""

    rule: str
    paths: str = "*"
    reason: str = ""

    def matches(self, rule: Rule, schema: str, path: str) -> bool:
        if self.rule.upper() not in (rule.id, rule.name.upper()):
            return False
        full = f"{schema}.{path}" if path else schema
        return any(fnmatch.fnmatchcase(candidate, self.paths) for candidate in (path, full, schema))


@dataclass(frozen=True)
class Policy:
    mode: str = "backward"
    # Encodings whose effect counts toward the verdict; a rule's main effect always counts.
    encodings: tuple[str, ...] = ()
    severities: Mapping[str, str] = field(default_factory=dict)  # rule id or name -> severity
    silences: tuple[Silence, ...] = ()
    # How a finding the analysis could not decide counts toward the verdict:
    # "breaking" (the default: never claim what cannot be shown) or "compatible".
    undecided: str = "breaking"

    def severity(self, rule: Rule, compat: Compat) -> str:
        override = self.severities.get(rule.id) or self.severities.get(rule.name)
        if override:
            return override
        if rule.severity == "error" and compat.keeps(self.mode):
            # A change the required mode allows is reported, not failed.
            return "info"
        return rule.severity

    def silenced(self, rule: Rule, change: Change) -> bool:
        return any(s.matches(rule, change.schema, change.path) for s in self.silences)


def context(change: Change) -> dict:
    values = {"schema": change.schema, "path": change.path or change.schema,
              "old": change.old, "new": change.new}
    values.update(change.facts)
    return values


def judge_one(change: Change, rule: Rule, policy: Policy) -> Finding:
    effects = {}
    compat = rule.compatibility
    if rule.undecided and policy.undecided == "compatible":
        compat = Compat.FULL
    if rule.encodings:
        effects = {"binary" if rule.format == "protobuf" else rule.format: rule.compatibility,
                   **rule.encodings}
        compat = meet_all([compat, *(rule.encodings.get(e, rule.compatibility) for e in policy.encodings)])
    return Finding(
        rule=rule.id, kind=rule.kind, schema=change.schema, path=change.path,
        compatibility=compat, semantic=rule.semantic, severity=policy.severity(rule, compat),
        message=rule.render(context(change)), advice=rule.instead, reference=rule.reference,
        old_loc=change.old_loc, new_loc=change.new_loc, effects=effects,
        undecided=rule.undecided, facts=change.facts,
    )


def judge(changes: Iterable[Change], catalogue: Catalogue, policy: Policy) -> list[Finding]:
    findings = []
    for change in changes:
        rule = catalogue.for_kind(change.kind)
        if rule is None:
            raise UnknownChangeKind(f"no rule classifies change kind {change.kind!r} (at {change.schema}:{change.path})")
        if rule.status == "removed" or policy.silenced(rule, change):
            continue
        findings.append(judge_one(change, rule, policy))
    return findings
