"""The protobuf witness runner against the adapter's message strategy (tests/formats/protobuf_runtime.py).

For every protobuf case folder and every direction the static verdict keeps (per encoding),
messages drawn by the adapter's hypothesis strategy from the writer's class must run through
``linter.witness.protobuf.run`` without a failure: the runner's notion of a value kept agrees
with the verdict on data it did not generate itself.
"""
import json
import sys
from functools import lru_cache
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

pytest.importorskip("linter.formats.protobuf_compile")
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "formats"))
runtime = pytest.importorskip("protobuf_runtime")

import linter  # noqa: E402
from linter.witness import protobuf as pb  # noqa: E402

CASES = Path(__file__).resolve().parents[1] / "cases" / "protobuf"


def kept():
    out = []
    for folder in sorted(p for p in CASES.glob("*") if (p / "expected.json").is_file()):
        exp = json.loads((folder / "expected.json").read_text())
        if exp.get("options", {}).get("encodings"):
            continue  # the JSON-mapping cases are sampled by test_case_witnesses
        report = linter.check(folder / "old.proto", folder / "new.proto", mode="none")
        for direction in ("backward", "forward"):
            if all(getattr(f.compatibility, direction) for f in report.findings):
                out.append((folder, direction))
    return out


KEPT = kept() if CASES.is_dir() else []


@lru_cache(maxsize=None)
def pair_of(folder: Path):
    return pb.open_pair(folder / "old.proto", folder / "new.proto", "old.proto", "new.proto")


@pytest.mark.parametrize("folder,direction", KEPT, ids=[f"{f.name}-{d}" for f, d in KEPT])
@settings(max_examples=10, deadline=None, suppress_health_check=list(HealthCheck))
@given(data=st.data())
def test_kept_direction_keeps_adapter_messages(folder, direction, data):
    writer, reader = pair_of(folder).sides(direction)
    for root in pb.roots(writer, reader):
        msg = data.draw(runtime.messages(writer.cls(root)))
        trial = pb.run(writer, reader, root, msg)
        assert trial is None or not trial.failed, trial
