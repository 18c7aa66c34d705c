"""Runtime cross-check: what evolint calls compatible survives the real protobuf runtime.

For every protobuf case folder, messages drawn from one side's descriptors are written
with that side and read with the other, in the binary encoding and through the proto3
JSON mapping (``json_format``, strict about unknown members). Every direction evolint calls
compatible must keep every value; for the directions it calls breaking, a search for a
message that does not survive measures how often the runtime shows the break.
"""
from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

import pytest
from hypothesis import HealthCheck, Phase, find, given, settings
from hypothesis import strategies as st
from hypothesis.errors import NoSuchExample

import linter
from linter import catalogue

from protobuf_runtime import classes, messages, survives_binary, survives_json

CASES = Path(__file__).resolve().parent.parent / "cases" / "protobuf"
# Breaks that live outside the bytes of one message, so no round trip can show them:
# services and type names (RPC paths, Any type URLs), meaning (semantic rules), and proto2
# required, which the Python runtime does not enforce on parse (shared/FACTS.md).
NOT_IN_THE_BYTES = {"P101", "P102", "P110", "P111", "P112", "P113", "P114", "P115", "P116",
                    "P117", "P118", "P120", "P121", "P069", "P085", "P090", "P002", "P005", "P067",
                    "P068",
                    # a reserved number or name matters for data older than OLD, which no draw holds
                    "P006", "P007"} | {r.id for r in catalogue.load() if r.semantic}
# The measured share of breaking directions for which a failing message is found (see
# test_breaking_directions_mostly_show_at_runtime); a drop below it is a regression.
MIN_RATE = 0.85


@lru_cache(maxsize=None)
def pairs_of(folder: Path):
    old, new = classes(folder / "old.proto"), classes(folder / "new.proto")
    same = sorted(old.keys() & new.keys())
    if same:
        return [(old[k], new[k]) for k in same]
    if len(old) == 1 and len(new) == 1:  # a renamed or moved message
        return [(next(iter(old.values())), next(iter(new.values())))]
    return []


@lru_cache(maxsize=None)
def verdicts(folder: Path):
    """evolint's effect per encoding and direction for the case, and the rules it found."""
    report = linter.check(folder / "old.proto", folder / "new.proto", mode="none")
    out = {}
    for encoding in ("binary", "json"):
        backward = forward = True
        for f in report.findings:
            effect = f.effects.get(encoding, f.compatibility)
            backward &= effect.backward
            forward &= effect.forward
        out[encoding] = {"backward": backward, "forward": forward}
    return out, frozenset(f.rule for f in report.findings)


def folders():
    return sorted(p for p in CASES.iterdir() if (p / "expected.json").is_file() and pairs_of(p))


SURVIVES = {"binary": survives_binary, "json": survives_json}


def directions(folder):
    for old_cls, new_cls in pairs_of(folder):
        yield "backward", old_cls, new_cls   # written with OLD, read with NEW
        yield "forward", new_cls, old_cls


@pytest.mark.parametrize("folder", folders(), ids=lambda p: p.name)
# A quarter of the profile's examples per case (about 100 cases); the slow profile runs many more.
@settings(max_examples=max(5, settings().max_examples // 4),
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_compatible_directions_survive_the_runtime(folder, data):
    effects, _ = verdicts(folder)
    for direction, writer, reader in directions(folder):
        for encoding, survives in SURVIVES.items():
            if not effects[encoding][direction]:
                continue
            msg = data.draw(messages(writer), label=f"{encoding} {direction}")
            assert survives(msg, reader), f"{encoding} {direction}: {msg} did not survive"


def _breaking_directions():
    for folder in folders():
        effects, rules = verdicts(folder)
        if rules & NOT_IN_THE_BYTES:
            continue
        for direction, writer, reader in directions(folder):
            for encoding in SURVIVES:
                if not effects[encoding][direction]:
                    yield folder.name, direction, encoding, writer, reader


@pytest.mark.parametrize("encoding", sorted(SURVIVES))
def test_breaking_directions_mostly_show_at_runtime(encoding, record_property):
    found, missed = 0, []
    # No shrinking: one failing message is the measurement, not its smallest form.
    search = settings(max_examples=150, database=None, phases=[Phase.generate],
                      suppress_health_check=list(HealthCheck))
    for name, direction, enc, writer, reader in _breaking_directions():
        if enc != encoding:
            continue
        survives = SURVIVES[enc]
        try:
            find(messages(writer), lambda m: not survives(m, reader), settings=search)
            found += 1
        except NoSuchExample:
            missed.append(f"{name} {direction}")
    total = found + len(missed)
    rate = found / total
    record_property(f"{encoding}_breaking_rate", json.dumps({"found": found, "total": total, "missed": missed}))
    print(f"\n{encoding}: a failing message for {found} of {total} breaking directions ({rate:.0%}); "
          f"none found for: {', '.join(missed) or '-'}")
    assert total >= 20
    assert rate >= MIN_RATE, missed
