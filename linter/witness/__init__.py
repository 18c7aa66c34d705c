"""Witnesses: a concrete datum that shows a finding, confirmed by running the real codec.

For a finding that breaks a direction, the driver asks the format's witness module for
data the writer side produces (targeted candidates built from the finding first, then
random data from the writer schema) and runs each through the reader side; the first
run that fails where the finding lies is the witness. Semantic findings get an example
value and how a reader on the other side interprets it (``linter.witness.semantic``).

Directions: backward means the OLD schema writes and the NEW one reads; forward the
reverse. This package is format-blind; each format module offers

    open_pair(old, new, old_display, new_display, options) -> pair  (has .sides(direction))
    targeted(finding, writer, reader, rng)  -> iterable of writer data
    random_datum(writer, root, rng)         -> one writer datum
    run(writer, reader, root, datum, encoding=None) -> Trial
    roots(writer, reader)                   -> root type names both sides hold
    reinterpret(finding, writer, reader, rng) -> Trial | None   (optional; semantic findings)
"""
from __future__ import annotations

import dataclasses
import importlib
import itertools
import random
import zlib
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Iterable

from ..model import Comparison, Finding

MODULES = {"avro": "avro", "protobuf": "protobuf", "jsonschema": "jsonschema"}
DIRECTIONS = ("backward", "forward")
# Random writer data tried after the targeted candidates, per finding and direction.
FALLBACK_SAMPLES = 150


@dataclass
class Pair:
    """The two sides of a comparison as a format's witness module opened them."""

    old: Any
    new: Any

    def sides(self, direction: str) -> tuple[Any, Any]:
        """(writer, reader): backward reads OLD data with NEW, forward the reverse."""
        return (self.old, self.new) if direction == "backward" else (self.new, self.old)


@dataclass(frozen=True)
class Trial:
    """One datum written with the writer side and read with the reader side."""

    datum: Any                 # the writer's datum, JSON-ready
    failed: bool
    outcome: str               # one line: the reader's error, or what came back changed
    paths: tuple[str, ...] = ()  # field paths whose value changed; empty for an error
    error: bool = False        # the reader rejected the datum outright
    # Set where the codec fails although the specification says the data resolve (a known
    # departure of the codec, shared/FACTS.md): not evidence against the static verdict.
    departure: str | None = None


@dataclass(frozen=True)
class Witness:
    direction: str             # backward | forward | semantic
    datum: Any
    writer: str
    reader: str
    outcome: str
    confirmed: bool
    encoding: str | None = None

    def to_json(self) -> dict:
        out = {"direction": self.direction, "datum": self.datum, "writer": self.writer,
               "reader": self.reader, "outcome": self.outcome, "confirmed": self.confirmed}
        if self.encoding:
            out["encoding"] = self.encoding
        return out


def module_for(fmt: str):
    """The witness module of a format, or None where none exists yet."""
    if fmt not in MODULES:
        return None
    try:
        return importlib.import_module(f".{MODULES[fmt]}", __name__)
    except ModuleNotFoundError as exc:
        if exc.name and exc.name.startswith(__name__):
            return None
        raise


def seed_for(finding: Finding, direction: str, salt: int = 0) -> int:
    # Stable across runs and machines: the same finding gets the same witness.
    return zlib.crc32(f"{finding.rule}|{finding.schema}|{finding.path}|{direction}|{salt}".encode())


def overlaps(a: str, b: str) -> bool:
    """Whether two dotted paths are the same node or one lies inside the other."""
    if not a or not b or a == b:
        return True
    return a.startswith(b + ".") or b.startswith(a + ".")


def relevant(trial: Trial, finding: Finding) -> bool:
    return trial.failed and not trial.departure and (
        trial.error or any(overlaps(p, finding.path) for p in trial.paths))


def _attempts(finding: Finding) -> list[tuple[str, str | None]]:
    """(direction, encoding) pairs to demonstrate: every broken direction of every counted encoding."""
    wanted = finding.compatibility.breaks()
    if finding.undecided and not wanted:
        wanted = list(DIRECTIONS)
    out = []
    for direction in wanted:
        encodings = []
        # The main encoding (listed first in effects) is run as None; a further one by name.
        for i, (name, compat) in enumerate(finding.effects.items()):
            if direction in compat.breaks():
                encodings.append(name if i else None)
        encodings = encodings or [None]
        out.extend((direction, e) for e in encodings)
    return out


def search(module, finding: Finding, writer, reader, direction: str, encoding: str | None,
           samples: int = FALLBACK_SAMPLES) -> tuple[Trial | None, Trial | None]:
    """(first relevant failing trial, first trial run) for one direction."""
    rng = random.Random(seed_for(finding, direction))
    targeted = module.targeted(finding, writer, reader, rng)
    fallback = (module.random_datum(writer, finding.schema, rng) for _ in range(samples))
    # Where the format can build it, a reader with only this finding's change applied tells
    # this change's failures from those of other changes in the same file.
    alone = module.isolate(finding, writer, reader) if hasattr(module, "isolate") else None
    first = None
    focus = {"focus": finding.path} if getattr(module, "FOCUSED", False) else {}
    for datum in itertools.chain(targeted, fallback):
        trial = module.run(writer, reader, finding.schema, datum, encoding, **focus)
        if trial is None:
            continue  # the writer refused the datum: not writer data after all
        first = first or trial
        if alone is not None:
            single = module.run(writer, alone, finding.schema, datum, encoding)
            if trial.failed and single is not None and relevant(single, finding):
                if single.outcome != trial.outcome:
                    trial = dataclasses.replace(trial, outcome=f"{trial.outcome} (with this change alone: "
                                                              f"{single.outcome})")
                return trial, first
            continue
        if relevant(trial, finding):
            return trial, first
    return None, first


def witness_for(finding: Finding, fmt: str, pair) -> Witness | None:
    """The witness of one finding, or None when the finding breaks nothing."""
    from . import semantic

    module = module_for(fmt)
    if finding.semantic:
        return semantic.witness(finding, module, pair)
    attempts = _attempts(finding)
    if not attempts or module is None or pair is None:
        return None
    last = None
    for direction, encoding in attempts:
        writer, reader = pair.sides(direction)
        reason = module.unshowable(finding, writer, reader) if hasattr(module, "unshowable") else None
        if reason:
            last = last or Witness(direction, None, writer.display, reader.display, reason, False, encoding)
            continue
        hit, first = search(module, finding, writer, reader, direction, encoding)
        if hit is None and encoding is None and hasattr(module, "reinterpret"):
            # A lenient codec reads the data; the reader's own schema may still read the
            # same bytes as another value (e.g. a decimal whose scale changed).
            hit = module.reinterpret(finding, writer, reader, random.Random(seed_for(finding, direction, 1)))
            hit = hit if hit is not None and hit.failed else None
        if hit is not None:
            return Witness(direction, hit.datum, writer.display, reader.display, hit.outcome, True, encoding)
        if last is None:
            tried = first.datum if first is not None else None
            last = Witness(direction, tried, writer.display, reader.display,
                           "no datum the writer schema produces was rejected by the reader or came back "
                           f"changed at {finding.path or finding.schema}", False, encoding)
    return last


def open_pair(comparison: Comparison, options=None):
    """Both sides of a comparison, parsed by the format's witness module (None if impossible)."""
    module = module_for(comparison.format)
    if module is None:
        return None
    old, new = Path(comparison.old), Path(comparison.new)
    if not (old.is_file() and new.is_file()):
        return None  # a file added or removed: there is no pair to run
    return module.open_pair(old, new, comparison.old, comparison.new, options)


def _guarded(finding: Finding, comparison: Comparison, pair) -> Witness | None:
    """The witness, or an unconfirmed one naming the error: a witness never ends the run."""
    try:
        return witness_for(finding, comparison.format, pair)
    except Exception as exc:  # noqa: BLE001 - reported in the witness, visible to the suite
        return Witness(finding.compatibility.breaks()[0] if finding.compatibility.breaks() else "backward",
                       None, comparison.old, comparison.new,
                       f"no witness: building it failed ({type(exc).__name__}: {exc}); please report this",
                       False)


def attach(comparisons: Iterable[Comparison], options=None) -> list[Comparison]:
    """The comparisons again, each finding that breaks a direction carrying its witness."""
    out = []
    for comparison in comparisons:
        wanted = [f for f in comparison.findings if f.semantic or _attempts(f)]
        if not wanted:
            out.append(comparison)
            continue
        pair = open_pair(comparison, options)
        findings = []
        for finding in comparison.findings:
            witness = _guarded(finding, comparison, pair) if finding in wanted else None
            if witness is not None:
                finding = dataclasses.replace(finding, extra={**finding.extra, "witness": witness.to_json()})
            findings.append(finding)
        out.append(dataclasses.replace(comparison, findings=tuple(findings)))
    return out
