"""The JSON Schema adapter's keyword mutations (tests/formats/test_jsonschema_oracle.py), each
and its mirror: every finding breaking a direction has a confirmed witness, and sampling
finds no failure where the static verdict says compatible."""
import importlib.util
import json
from pathlib import Path

import pytest

import linter
from linter.verify import verify

ORACLE = Path(__file__).resolve().parents[1] / "formats" / "test_jsonschema_oracle.py"


def _mutations():
    if not ORACLE.is_file():
        return []
    spec = importlib.util.spec_from_file_location("_oracle_mutations", ORACLE)
    module = importlib.util.module_from_spec(spec)
    try:
        spec.loader.exec_module(module)
    except Exception:  # noqa: BLE001 - the oracle's own imports are missing: nothing to reuse
        return []
    out = []
    for name, mutate in module.MUTATIONS.items():
        out.append((name, module.BASE, mutate(module.BASE)))
        out.append((f"{name}:mirror", mutate(module.BASE), module.BASE))
    return out


# Verdicts the static analysis gives conservatively, so that no instance can show them; kept
# visible as strict expected failures (reported to the JSON Schema adapter).
CONSERVATIVE = {
    "anyof-added": "J104: anyOf [string, null, integer] replacing type [string, null] accepts every old "
                   "instance, yet backward is judged broken",
    "anyof-added:mirror": "J105: the reverse, forward judged broken",
}
MUTATIONS = [pytest.param(*m, marks=pytest.mark.xfail(strict=True, reason=CONSERVATIVE[m[0]]), id=m[0])
             if m[0] in CONSERVATIVE else pytest.param(*m, id=m[0]) for m in _mutations()]


@pytest.mark.parametrize("name,old,new", MUTATIONS)
def test_mutation_witness_and_sampling_agree(tmp_path, name, old, new):
    (tmp_path / "old.json").write_text(json.dumps(old))
    (tmp_path / "new.json").write_text(json.dumps(new))
    report = linter.check(tmp_path / "old.json", tmp_path / "new.json", mode="none", witness=True)
    for f in report.findings:
        if f.compatibility.breaks() and not f.semantic and not f.undecided:
            w = f.extra.get("witness")
            assert w and w["confirmed"], (f.rule, f.path, w)
    sampled = verify(tmp_path / "old.json", tmp_path / "new.json", samples=60, seed=0)
    assert not sampled.bugs, [r.to_json() for r in sampled.bugs]
