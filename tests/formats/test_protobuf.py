"""The Protobuf adapter: compiling, bad input, the model it fills, directory pairs, real schemas."""
import json
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

import linter
import linter.catalogue  # used as linter.catalogue below; not imported by linter itself
from linter.errors import InputError
from linter.formats import Options, protobuf
from linter.formats.protobuf_compile import well_known_dir
from linter.formats.protobuf_types import RANGES, scalar_change

HEADER = 'syntax = "proto3";\npackage utility.telemetry;\n'


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text)
    return path


def run_cli(*args):
    return subprocess.run([sys.executable, "-m", "linter", *args], capture_output=True, text=True)


# -- bad input --------------------------------------------------------------------------------

BAD = {
    "syntax": (HEADER + "message PumpStatus {\n  int32 rpm = 1\n}\n", 5, 1, "Expected"),
    "unknown type": (HEADER + "message PumpStatus {\n  Motor motor = 1;\n}\n", 4, 3, "not defined"),
    "missing import": (HEADER + 'import "motors/motor.proto";\nmessage PumpStatus {}\n', 3, 1, "motor.proto"),
    "proto3 enum starting at one": (HEADER + "enum State { RUNNING = 1; }\n", 3, 24, "zero"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_protoc_errors_are_one_line_with_position_and_exit_2(tmp_path, case):
    text, line, column, words = BAD[case]
    good = write(tmp_path / "old", "pump_status.proto", HEADER + "message PumpStatus {}\n")
    bad = write(tmp_path / "new", "pump_status.proto", text)
    before = sorted(p.name for p in tmp_path.rglob("*"))
    with pytest.raises(InputError) as info:
        linter.check(good, bad)
    err = info.value
    assert (err.file, err.line) == (str(bad), line), str(err)
    if case != "missing import":
        assert err.column == column, str(err)
    assert words in str(err)
    proc = run_cli("check", str(good), str(bad))
    assert proc.returncode == 2, proc.stderr
    assert proc.stderr.count("\n") == 1 and "Traceback" not in proc.stderr
    assert f"{bad}:{line}:" in proc.stderr
    assert sorted(p.name for p in tmp_path.rglob("*")) == before  # nothing written beside the files


def test_include_that_is_not_a_directory_is_bad_input(tmp_path):
    path = write(tmp_path, "a.proto", HEADER + "message PumpStatus {}\n")
    with pytest.raises(InputError, match="import path"):
        protobuf.load(path, str(path), Options(include=(str(tmp_path / "nowhere"),)))


# -- the model --------------------------------------------------------------------------------

def test_roots_and_field_paths(tmp_path):
    path = write(tmp_path, "p.proto", HEADER + """
import "google/protobuf/timestamp.proto";
message PumpStatus {
  string pump_id = 1;
  google.protobuf.Timestamp read_at = 2;
  map<string, Sensor> sensors = 3;
  repeated Sensor spare = 4;
  PumpStatus previous = 5;
  message Sensor { double value = 1; }
}
message Station { repeated PumpStatus pumps = 1; }
""")
    schema = protobuf.load(path, "p.proto", Options())
    assert schema.roots == ("utility.telemetry.PumpStatus", "utility.telemetry.Station")
    fields = schema.fields["utility.telemetry.PumpStatus"]
    assert {"pump_id", "read_at", "read_at.seconds", "read_at.nanos", "sensors", "sensors.value",
            "spare.value", "previous"} <= fields
    assert "previous.pump_id" not in fields  # recursion stops at a type already on the way
    assert "pumps.sensors.value" in schema.fields["utility.telemetry.Station"]


def test_imported_directory_and_user_include(tmp_path):
    write(tmp_path / "shared", "units/motor.proto", 'syntax = "proto3";\npackage utility.units;\n'
          "message Motor { int32 rpm = 1; }\n")
    old = write(tmp_path / "old", "p.proto", HEADER + 'import "units/motor.proto";\n'
                "message PumpStatus { utility.units.Motor motor = 1; }\n")
    new = write(tmp_path / "new", "p.proto", HEADER + 'import "units/motor.proto";\n'
                "message PumpStatus { utility.units.Motor motor = 1; int32 level = 2; }\n")
    report = linter.check(old, new, include=[str(tmp_path / "shared")])
    assert [f.rule for f in report.findings] == ["P001"]


@pytest.mark.parametrize("edition", ["2023", "2024"])
def test_editions_compile_and_features_count(tmp_path, edition):
    head = f'edition = "{edition}";\npackage utility.telemetry;\n'
    old = write(tmp_path / "old", "p.proto", head + "message PumpStatus { int32 level = 1; }\n")
    new = write(tmp_path / "new", "p.proto", head + "message PumpStatus { int32 level = 1 "
                "[features.field_presence = IMPLICIT]; }\n")
    report = linter.check(old, new)
    assert [f.rule for f in report.findings] == ["P066"]  # editions default to explicit presence


def test_findings_carry_file_line_and_both_effects(tmp_path, validate_report):
    old = write(tmp_path, "old.proto", HEADER + "message PumpStatus {\n  int32 rpm = 2;\n}\n")
    new = write(tmp_path, "new.proto", HEADER + "message PumpStatus {\n\n  int32 speed = 2;\n}\n")
    data = validate_report(linter.check(old, new).to_json())
    (finding,) = data["findings"]
    assert finding["old"] == {"file": str(old), "line": 4, "column": 3}
    assert finding["new"] == {"file": str(new), "line": 5, "column": 3}
    assert finding["effects"] == {"binary": "full", "json": "breaking"}
    assert data["compatibility"] == "full"
    counted = validate_report(linter.check(old, new, encodings=["json"]).to_json())
    assert counted["compatibility"] == "breaking"


def test_cli_switch_counts_the_json_mapping(tmp_path):
    old = write(tmp_path, "old.proto", HEADER + "message PumpStatus { int32 rpm = 2; }\n")
    new = write(tmp_path, "new.proto", HEADER + "message PumpStatus { int32 speed = 2; }\n")
    assert run_cli("check", str(old), str(new)).returncode == 0
    proc = run_cli("check", str(old), str(new), "--count-encoding", "json", "--output", "json")
    assert proc.returncode == 1
    assert json.loads(proc.stdout)["compatibility"] == "breaking"


def test_annotation_in_comment_and_option_on_one_field(tmp_path):
    old = write(tmp_path, "old.proto", HEADER + "message PumpStatus {\n  // @unit: kPa\n"
                "  // @meaning: pressure at the pump inlet\n  float inlet = 1;\n}\n")
    new = write(tmp_path, "new.proto", HEADER + 'import "evolint/annotations.proto";\n'
                'message PumpStatus {\n  float inlet = 1 [(evolint.unit) = "bar", '
                '(evolint.meaning) = "pressure at the pump inlet"];\n}\n')
    report = linter.check(old, new)
    units = [f for f in report.findings if f.facts.get("new_unit")]
    assert [(f.path, f.facts["old_unit"], f.facts["new_unit"]) for f in units] == [("inlet", "kPa", "bar")]
    assert not [f for f in report.findings if "meaning" in f.kind]


# -- directory pairs --------------------------------------------------------------------------

def test_directory_sides_compile_in_one_protoc_call_each(tmp_path, monkeypatch):
    from grpc_tools import protoc

    for side, extra in (("old", ""), ("new", "  int32 level = 2;\n")):
        write(tmp_path / side, "common/site.proto", HEADER + "message Site {\n  string id = 1;\n}\n")
        write(tmp_path / side, "pump_status.proto", HEADER + 'import "common/site.proto";\n'
              f"message PumpStatus {{\n  Site site = 1;\n{extra}}}\n")
        write(tmp_path / side, "valve.proto", HEADER + "message Valve {\n  string id = 1;\n}\n")
    calls = []
    real = protoc.main
    monkeypatch.setattr(protoc, "main", lambda args: calls.append(args) or real(args))
    report = linter.check(tmp_path / "old", tmp_path / "new")
    assert len(calls) == 2
    assert [(f.rule, f.schema, f.path) for f in report.findings] == [
        ("P001", "utility.telemetry.PumpStatus", "level")]
    assert len(report.comparisons) == 3


# -- the type table, over the whole value domain ---------------------------------------------

def _survives(value: int, reader: str) -> bool:
    lo, hi = RANGES[reader]
    return lo <= value <= hi


@pytest.mark.parametrize("old", ["int32", "int64", "uint32", "uint64"])
@pytest.mark.parametrize("new", ["int32", "int64", "uint32", "uint64"])
def test_plain_varint_kinds_match_range_containment(old, new):
    # Encoding specification, Varints: a value written as `old` survives a `new` reader exactly
    # when it lies in the reader's range; check at every range's edges.
    if old == new:
        assert scalar_change(old, new) is None
        return
    edges = sorted({v for r in RANGES.values() for v in r} | {0, -1, 1})
    back = all(_survives(v, new) for v in edges if _survives(v, old))
    fwd = all(_survives(v, old) for v in edges if _survives(v, new))
    rule = linter.catalogue.load().for_kind(scalar_change(old, new))
    assert (rule.compatibility.backward, rule.compatibility.forward) == (back, fwd)


# -- real schemas nobody here wrote -----------------------------------------------------------

WELL_KNOWN = sorted(p.relative_to(well_known_dir()).as_posix()
                    for p in Path(well_known_dir()).rglob("*.proto"))


def test_well_known_types_compare_with_themselves_as_full(tmp_path):
    for side in ("old", "new"):
        shutil.copytree(well_known_dir(), tmp_path / side)
    report = linter.check(tmp_path / "old", tmp_path / "new")
    assert len(report.comparisons) == len(WELL_KNOWN) >= 10
    assert report.findings == [] and report.compatibility.value == "full"


def _mutate(text: str, line: int, pattern: str, replacement: str) -> str:
    lines = text.splitlines(keepends=True)
    changed = re.sub(pattern, replacement, lines[line - 1], count=1)
    assert changed != lines[line - 1], lines[line - 1]
    lines[line - 1] = changed
    return "".join(lines)


MUTATIONS = {
    # name: (edit of one field's line, the rule it must produce, the binary verdict)
    "renumber": (r"= (\d+)", "= 999", "P008", "breaking"),
    "rename": (r"(\b[a-z_][a-z0-9_]*)(\s*=\s*\d+)", r"\1_x\2", "P020", "full"),
    "make repeated": (r"^(\s*)(optional\s+)?", r"\1repeated ", None, None),
}


@pytest.mark.parametrize("name", ["google/protobuf/descriptor.proto", "google/protobuf/type.proto",
                                  "google/protobuf/api.proto", "google/protobuf/timestamp.proto"])
@pytest.mark.parametrize("mutation", sorted(MUTATIONS))
def test_well_known_types_survive_mutations(tmp_path, name, mutation):
    pattern, replacement, rule, verdict = MUTATIONS[mutation]
    source = Path(well_known_dir()) / name
    schema = protobuf.load(source, name, Options())
    model = schema.model.model
    message = next(m for m in model.own_messages().values() if not m.map_entry
                   and any(f.label != "repeated" and f.oneof is None and f.type not in ("message", "group")
                          and not f.is_map and f.label != "required" for f in m.fields.values()))
    field = next(f for f in sorted(message.fields.values(), key=lambda f: f.number)
                 if f.label != "repeated" and f.oneof is None and f.type not in ("message", "group")
                 and not f.has_default)  # protoc refuses a default on a repeated field
    for side in ("old", "new"):
        shutil.copytree(well_known_dir(), tmp_path / side)
    target = tmp_path / "new" / name
    target.write_text(_mutate(target.read_text(), field.loc.line, pattern, replacement))
    report = linter.check(tmp_path / "old" / name, tmp_path / "new" / name)
    rules = {f.rule for f in report.findings}
    if mutation == "make repeated":
        numeric = field.type not in ("string", "bytes")
        rule = "P061" if numeric and "proto3" in model.files[next(iter(model.files))].syntax else "P060"
        verdict = "backward"
    assert rules == {rule}, [f.message for f in report.findings]
    assert report.compatibility.value == verdict


def test_importing_the_adapter_does_not_import_protobuf():
    # Start-up time is measured: protobuf and grpc_tools load only when a .proto is compiled.
    code = "import sys, linter.formats.protobuf; print(sorted(m for m in sys.modules if m.startswith(('google', 'grpc'))))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_message_option_unit_applies_to_fields_without_their_own(tmp_path):
    old = write(tmp_path, "old.proto", HEADER + 'import "evolint/annotations.proto";\n'
                'message PumpPressures {\n  option (evolint.message_unit) = "kPa";\n'
                '  float inlet = 1;\n  float outlet = 2 [(evolint.unit) = "kPa"];\n}\n')
    new = write(tmp_path, "new.proto", HEADER + 'import "evolint/annotations.proto";\n'
                'message PumpPressures {\n  option (evolint.message_unit) = "Pa";\n'
                '  float inlet = 1;\n  float outlet = 2 [(evolint.unit) = "kPa"];\n}\n')
    report = linter.check(old, new)
    assert [(f.rule, f.path, f.facts["old_unit"], f.facts["new_unit"]) for f in report.findings] == [
        ("S003", "", "kPa", "Pa")]


def test_shipped_annotation_options_use_the_in_house_extension_range():
    # Language guide (proto2), Extensions / Custom Options: 50000-99999 is for in-house use.
    from linter.formats.protobuf_model import OPTION_KEYS

    text = (Path(linter.__file__).parent / "data" / "evolint" / "annotations.proto").read_text()
    numbers = {int(n) for n in re.findall(r"=\s*(\d+);", text)}
    assert numbers == set(OPTION_KEYS) and all(50000 <= n <= 99999 for n in numbers)


def test_folder_pair_with_imports_by_bare_name(tmp_path):
    # Two files of one folder, one importing the other by bare name, both changed: protoc must
    # see the imported file under one name only (found when running against git folders).
    import linter

    for side, extra in (("v1", ""), ("v2", " string zone = 2;")):
        folder = tmp_path / side / "proto"
        folder.mkdir(parents=True)
        (folder / "common.proto").write_text(
            f'syntax = "proto3";\npackage utility.common;\nmessage Site {{ string id = 1;{extra} }}\n')
        (folder / "pump_status.proto").write_text(
            'syntax = "proto3";\npackage utility.telemetry;\nimport "common.proto";\n'
            "message PumpStatus { utility.common.Site site = 1; int32 rpm = 2; }\n")
    report = linter.check(tmp_path / "v1", tmp_path / "v2")
    assert [(f.rule, f.schema, f.path) for f in report.findings] == [("P001", "utility.common.Site", "zone")]
