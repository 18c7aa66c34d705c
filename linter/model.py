"""The values every stage passes on: compatibility, locations, changes and findings.

All of them are frozen: a stage adds information by building a new value, never by
mutating the one it was handed.
"""
from __future__ import annotations

import enum
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Mapping

MODES = ("backward", "forward", "full", "none")
SEVERITIES = ("error", "warning", "info")


class Compat(enum.Enum):
    """The compatibility lattice: FULL is the top, BREAKING the bottom."""

    FULL = "full"
    BACKWARD = "backward"
    FORWARD = "forward"
    BREAKING = "breaking"

    @classmethod
    def of(cls, backward: bool, forward: bool) -> "Compat":
        if backward and forward:
            return cls.FULL
        if backward:
            return cls.BACKWARD
        if forward:
            return cls.FORWARD
        return cls.BREAKING

    @property
    def backward(self) -> bool:
        return self in (Compat.FULL, Compat.BACKWARD)

    @property
    def forward(self) -> bool:
        return self in (Compat.FULL, Compat.FORWARD)

    def meet(self, other: "Compat") -> "Compat":
        return Compat.of(self.backward and other.backward, self.forward and other.forward)

    def keeps(self, mode: str) -> bool:
        """Whether a change of this compatibility satisfies the required ``mode``."""
        if mode == "none":
            return True
        if mode == "full":
            return self is Compat.FULL
        if mode == "backward":
            return self.backward
        if mode == "forward":
            return self.forward
        raise ValueError(f"unknown mode {mode!r}")

    def breaks(self) -> list[str]:
        """The directions this compatibility does not keep, in a fixed order."""
        return [d for d, ok in (("backward", self.backward), ("forward", self.forward)) if not ok]


def meet_all(values) -> Compat:
    result = Compat.FULL
    for value in values:
        result = result.meet(value)
    return result


@dataclass(frozen=True)
class Location:
    file: str
    line: int | None = None
    column: int | None = None

    def __str__(self) -> str:
        parts = [self.file]
        if self.line is not None:
            parts.append(str(self.line))
            if self.column is not None:
                parts.append(str(self.column))
        return ":".join(parts)

    def to_json(self) -> dict:
        out: dict[str, Any] = {"file": self.file, "line": self.line}
        if self.column is not None:
            out["column"] = self.column
        return out


def _frozen(mapping: Mapping | None) -> Mapping:
    return MappingProxyType(dict(mapping or {}))


@dataclass(frozen=True)
class Change:
    """A fact about what happened between OLD and NEW; no judgement.

    ``kind`` names what happened precisely enough that its compatibility effect is a
    function of the kind alone (the catalogue holds that function). ``schema`` is the
    full name of the root type the change lies in, ``path`` the dotted field path
    inside it ("" for the type itself). ``facts`` carries the values the catalogue's
    message template may quote.
    """

    kind: str
    schema: str
    path: str
    old: Any = None
    new: Any = None
    old_loc: Location | None = None
    new_loc: Location | None = None
    facts: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self):
        object.__setattr__(self, "facts", _frozen(self.facts))

    def __hash__(self):  # facts is a mapping proxy; hash on the identity-bearing parts
        return hash((self.kind, self.schema, self.path, repr(self.old), repr(self.new)))


@dataclass(frozen=True)
class Finding:
    """A change joined to the rule that classifies it."""

    rule: str
    kind: str
    schema: str
    path: str
    compatibility: Compat
    semantic: bool
    severity: str
    message: str
    advice: str
    reference: str
    old_loc: Location | None = None
    new_loc: Location | None = None
    # Per-encoding effects where a format has several (protobuf: binary and json).
    effects: Mapping[str, Compat] = field(default_factory=dict)
    undecided: bool = False
    consumers: tuple[str, ...] = ()
    facts: Mapping[str, Any] = field(default_factory=dict)
    # Extra report members added by later stages (e.g. a witness); JSON-ready values.
    extra: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self):
        object.__setattr__(self, "effects", _frozen(self.effects))
        object.__setattr__(self, "facts", _frozen(self.facts))
        object.__setattr__(self, "extra", _frozen(self.extra))

    def __hash__(self):
        return hash((self.rule, self.schema, self.path, self.message))

    def breaks_mode(self, mode: str) -> bool:
        return not self.compatibility.keeps(mode)


@dataclass(frozen=True)
class Comparison:
    """One pair of files compared, with the findings it produced."""

    old: str
    new: str
    format: str
    findings: tuple[Finding, ...] = ()
    # The mode this pair must keep, where configuration sets one per path (else the run's).
    mode: str | None = None
    # The OLD side's root types and their field paths (Schema.fields), for consumer impact.
    old_fields: Mapping[str, frozenset[str]] = field(default_factory=dict, compare=False)

    @property
    def compatibility(self) -> Compat:
        return meet_all(f.compatibility for f in self.findings)
