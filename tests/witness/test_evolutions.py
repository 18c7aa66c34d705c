"""Hypothesis-generated Avro evolutions: static verdict, witness and sampling agree.

A random record (primitive, enum and optional fields) is changed by one random edit
(promotion, demotion, field added or removed with or without default, enum symbol added or
removed, type replaced). Then, for each direction:
- the static verdict calls it compatible  -> random writer data never fail (fastavro);
- a finding breaks it                      -> its witness is confirmed by fastavro.
Generated with hypothesis; example counts follow the profile in tests/conftest.py.
"""
import json

import pytest
from hypothesis import given
from hypothesis import strategies as st

pytest.importorskip("linter.formats.avro")

import linter  # noqa: E402
from linter.verify import verify  # noqa: E402

PRIMS = ["int", "long", "float", "double", "string", "bytes", "boolean"]
NAMES = st.sampled_from(["meter_id", "volume", "flow_rate", "pressure", "battery", "district", "valve"])
SYMBOLS = ["OK", "LEAK", "OFF", "DRY", "BURST"]


@st.composite
def field_types(draw):
    kind = draw(st.sampled_from(["prim", "prim", "enum", "optional"]))
    if kind == "prim":
        return draw(st.sampled_from(PRIMS))
    if kind == "enum":
        n = draw(st.integers(1, len(SYMBOLS)))
        return {"type": "enum", "name": "State", "symbols": SYMBOLS[:n]}
    return ["null", draw(st.sampled_from(PRIMS))]


@st.composite
def records(draw):
    names = draw(st.lists(NAMES, min_size=1, max_size=4, unique=True))
    types = [draw(field_types()) for _ in names]
    # One enum type per record: Avro names must be unique.
    seen_enum = False
    fields = []
    for name, t in zip(names, types):
        if isinstance(t, dict):
            if seen_enum:
                t = "string"
            seen_enum = True
        fields.append({"name": name, "type": t})
    return {"type": "record", "name": "MeterReading", "namespace": "utility.metering", "fields": fields}


DEFAULTS = {"int": 0, "long": 0, "float": 0.0, "double": 0.0, "string": "", "bytes": "", "boolean": False}


@st.composite
def evolutions(draw):
    old = draw(records())
    new = json.loads(json.dumps(old))
    fields = new["fields"]
    edit = draw(st.sampled_from(["retype", "add", "add-default", "remove", "symbols"]))
    i = draw(st.integers(0, len(fields) - 1))
    if edit == "retype":
        fields[i]["type"] = draw(st.sampled_from(PRIMS + [["null", "string"]]))
    elif edit in ("add", "add-default"):
        t = draw(st.sampled_from(PRIMS))
        f = {"name": "added_field", "type": t}
        if edit == "add-default":
            f["default"] = DEFAULTS[t]
        fields.append(f)
    elif edit == "remove" and len(fields) > 1:
        del fields[i]
    elif edit == "symbols":
        enums = [f for f in fields if isinstance(f["type"], dict)]
        if enums:
            n = draw(st.integers(1, len(SYMBOLS)))
            enums[0]["type"]["symbols"] = SYMBOLS[:n]
    return old, new


@given(evolutions())
def test_static_verdict_witness_and_sampling_agree(tmp_path_factory, evolution):
    old, new = evolution
    folder = tmp_path_factory.mktemp("evo")
    (folder / "old.avsc").write_text(json.dumps(old))
    (folder / "new.avsc").write_text(json.dumps(new))
    report = linter.check(folder / "old.avsc", folder / "new.avsc", mode="none", witness=True)
    for f in report.findings:
        if f.compatibility.breaks() and not f.semantic and not f.undecided:
            w = f.extra.get("witness")
            assert w and w["confirmed"], (f.rule, f.path, w, old, new)
    sampled = verify(folder / "old.avsc", folder / "new.avsc", samples=60, seed=0)
    assert not sampled.bugs, [r.to_json() for r in sampled.bugs]


# The Avro adapter's own evolution strategy (tests/formats/avro_strategies.py), richer than
# the one above: renames with aliases, fixed, maps, unions, nested records, defaults.
import sys  # noqa: E402
from pathlib import Path  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "formats"))
try:
    from avro_strategies import evolution as adapter_evolutions
except ImportError:  # the adapter's strategies are not there: nothing to reuse
    adapter_evolutions = None


@pytest.mark.skipif(adapter_evolutions is None, reason="tests/formats/avro_strategies.py not present")
@given(adapter_evolutions() if adapter_evolutions is not None else st.nothing())
def test_adapter_evolutions_agree(tmp_path_factory, evolution):
    test_static_verdict_witness_and_sampling_agree.hypothesis.inner_test(tmp_path_factory, evolution)
