"""Protobuf witnesses against the Python protobuf runtime (needs the adapter's protoc step).

Breaking pairs follow the language guide (proto3), Updating A Message Type: int32, uint32,
int64, uint64 and bool are compatible only in the range both hold (values are truncated as
in C++); changing a field's number changes which field a value lands in; and the proto3 JSON
mapping names fields by their JSON name.
"""
import pytest

pytest.importorskip("linter.formats.protobuf_compile")

from linter.model import Comparison, Compat, Finding  # noqa: E402
from linter.verify import sample  # noqa: E402
from linter.witness import protobuf as pb  # noqa: E402
from linter.witness import witness_for  # noqa: E402

ROOT = "utility.telemetry.PumpStatus"


def proto(body):
    return f'syntax = "proto3";\npackage utility.telemetry;\nmessage PumpStatus {{\n{body}\n}}\n'


def pair_of(tmp_path, old, new):
    (tmp_path / "old.proto").write_text(proto(old))
    (tmp_path / "new.proto").write_text(proto(new))
    return pb.open_pair(tmp_path / "old.proto", tmp_path / "new.proto", "old.proto", "new.proto")


def finding(path, compat, effects=None):
    return Finding("P999", "test-kind", ROOT, path, compat, False, "error", "m", "a", "r", effects=effects or {})


def test_int64_read_as_int32_is_truncated(tmp_path):
    pair = pair_of(tmp_path, "string pump_id = 1; int64 rpm = 2;", "string pump_id = 1; int32 rpm = 2;")
    w = witness_for(finding("rpm", Compat.FORWARD), "protobuf", pair)
    assert w.confirmed and w.direction == "backward"
    assert not -2**31 <= int(w.datum["rpm"]) < 2**31  # the JSON mapping prints int64 as a string
    assert "rpm was written as" in w.outcome


def test_swapped_numbers_move_values(tmp_path):
    pair = pair_of(tmp_path, "int32 rpm = 1; int32 flow = 2;", "int32 rpm = 2; int32 flow = 1;")
    w = witness_for(finding("rpm", Compat.BREAKING), "protobuf", pair)
    assert w.confirmed and "rpm" in w.outcome


def test_renumbered_enum_value_changes_meaning(tmp_path):
    enum = "enum State {{ STATE_UNKNOWN = 0; RUNNING = {n}; }} State state = 1;"
    pair = pair_of(tmp_path, enum.format(n=1), enum.format(n=2))
    w = witness_for(finding("state", Compat.BREAKING), "protobuf", pair)
    assert w.confirmed and w.datum["state"] == "RUNNING"


def test_rename_breaks_the_json_mapping_only(tmp_path):
    pair = pair_of(tmp_path, "int32 rpm = 1;", "int32 speed = 1;")
    effects = {"binary": Compat.FULL, "json": Compat.BREAKING}
    w = witness_for(finding("rpm", Compat.BREAKING, effects), "protobuf", pair)
    assert w.confirmed and w.encoding == "json" and "JSON mapping" in w.outcome
    writer, reader = pair.sides("backward")
    rng = __import__("random").Random(0)
    for _ in range(50):  # the binary encoding keeps the value under its new name
        assert not pb.run(writer, reader, ROOT, pb.random_datum(writer, ROOT, rng)).failed


def test_compatible_widening_never_fails(tmp_path):
    pair_of(tmp_path, "int32 rpm = 1; repeated string tags = 2;", "int64 rpm = 1; repeated string tags = 2; bool dry = 3;")
    comparison = Comparison(str(tmp_path / "old.proto"), str(tmp_path / "new.proto"), "protobuf", ())
    pair = pb.open_pair(tmp_path / "old.proto", tmp_path / "new.proto", comparison.old, comparison.new)
    result = sample(pb, pair, comparison, ROOT, "backward", 200, seed=3)
    assert result.samples == 200 and result.failures == 0
