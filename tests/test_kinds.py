"""Every change kind a differ can emit has a rule, and every rule is reachable."""
import importlib

import pytest

from linter import catalogue, config, semantics
from linter.formats import FORMATS

CAT = catalogue.load()
GENERAL = {"schema-file-added", "schema-file-removed"} | config.KINDS


def producers():
    out = {"semantic": semantics.KINDS, "general": GENERAL}
    for name in FORMATS:
        try:
            module = importlib.import_module(f"linter.formats.{name}")
        except ModuleNotFoundError:
            continue  # adapter not built yet
        out[name] = module.KINDS
    return out


@pytest.mark.parametrize("fmt,kinds", sorted(producers().items()))
def test_every_emitted_kind_has_a_rule(fmt, kinds):
    missing = sorted(k for k in kinds if CAT.for_kind(k) is None)
    assert not missing, f"{fmt} emits kinds with no rule: {missing}"


def test_every_rule_is_produced_by_someone():
    produced = set().union(*producers().values())
    orphan = sorted(r.id for r in CAT if r.kind not in produced and r.status != "removed")
    loaded = set(producers())
    orphan = [i for i in orphan if CAT.get(i).format in loaded]
    assert not orphan, f"rules no differ can produce: {orphan}"
