"""The JSON Schema adapter: loading, bad input, references, and schemas nobody here wrote."""
from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

import linter
from linter.cli import main
from linter.errors import InputError
from linter.formats import Options, jsonschema as adapter

D2020 = "https://json-schema.org/draft/2020-12/schema"


def write(folder: Path, name: str, data) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(data if isinstance(data, str) else json.dumps(data, indent=2))
    return path


def rules(report) -> list[str]:
    return sorted({f.rule for f in report.findings})


def run_cli(capsys, *args) -> tuple[int, str]:
    with pytest.raises(SystemExit) as exit_info:
        main(list(args))
    return exit_info.value.code, capsys.readouterr().err


# ------------------------------------------------------------------ metaschemas

def metaschemas():
    """The metaschemas jsonschema-specifications ships (draft-04 to 2020-12, vocabularies too)."""
    import jsonschema_specifications

    root = Path(jsonschema_specifications.__file__).parent / "schemas"
    return sorted(p for p in root.rglob("*") if p.is_file() and "draft3" not in p.parts)


@pytest.mark.parametrize("path", metaschemas(), ids=lambda p: f"{p.parent.name}/{p.name}")
def test_metaschema_compares_with_itself_as_full(path):
    # Source: the metaschemas published with each draft (json-schema.org), as shipped by
    # jsonschema-specifications; identical schemas admit the same instances.
    report = linter.check(path, path, mode="full", format="jsonschema")
    assert report.compatibility.value == "full"
    assert report.findings == []


def _draft7():
    import jsonschema_specifications

    path = Path(jsonschema_specifications.__file__).parent / "schemas" / "draft7" / "metaschema.json"
    return json.loads(path.read_text())


def _mutated(fn):
    schema = copy.deepcopy(_draft7())
    fn(schema)
    return schema


# (name, mutation of the draft-07 metaschema, expected verdict, a rule expected among the findings)
MUTATIONS = [
    ("required-type", lambda s: s.__setitem__("required", ["type"]), "forward", "J074"),
    ("title-dropped", lambda s: s["properties"].pop("title"), "backward", "J073"),
    ("non-negative-from-one", lambda s: s["definitions"]["nonNegativeInteger"].__setitem__("minimum", 1),
     "forward", "J021"),
    ("new-simple-type", lambda s: s["definitions"]["simpleTypes"]["enum"].append("decimal"), "backward", "J012"),
    ("closed", lambda s: s.__setitem__("additionalProperties", False), "forward", "J090"),
    ("boolean-schemas-refused", lambda s: s.__setitem__("type", "object"), "forward", "J011"),
    ("max-length-string", lambda s: s["properties"]["$comment"].__setitem__("maxLength", 200),
     "forward", "J033"),
]


@pytest.mark.parametrize("name,mutate,verdict,rule", MUTATIONS, ids=[m[0] for m in MUTATIONS])
def test_mutated_metaschema_gets_the_expected_verdict(tmp_path, name, mutate, verdict, rule):
    old = write(tmp_path, "old.json", _draft7())
    new = write(tmp_path, "new.json", _mutated(mutate))
    report = linter.check(old, new, mode="none")
    assert report.compatibility.value == verdict, [f.message for f in report.findings]
    assert rule in rules(report)
    # and the mirror image moves the other way
    mirror = linter.check(new, old, mode="none")
    assert mirror.compatibility.value == {"forward": "backward", "backward": "forward"}[verdict]


# ------------------------------------------------------------------ loading

def test_roots_and_fields_follow_references(tmp_path):
    path = write(tmp_path, "notice.json", {
        "$schema": D2020, "$id": "urn:utility:service-notice", "type": "object",
        "properties": {"area": {"$ref": "#/$defs/area"}, "streets": {"type": "array", "items": {"$ref": "#/$defs/street"}}},
        "$defs": {"area": {"type": "object", "properties": {"district": {"type": "string"}}},
                  "street": {"type": "object", "properties": {"name": {"type": "string"}}}},
    })
    schema = adapter.load(path, "notice.json", Options())
    assert schema.roots == ("urn:utility:service-notice",)
    assert schema.fields["urn:utility:service-notice"] == {"area", "area.district", "streets", "streets.name"}


def test_root_is_the_display_path_without_id(tmp_path):
    path = write(tmp_path, "notice.json", {"$schema": D2020, "properties": {"a": {}}})
    assert adapter.load(path, "v1/notice.json", Options()).roots == ("v1/notice.json",)


def test_recursive_fields_terminate(tmp_path):
    path = write(tmp_path, "zone.json", {
        "$schema": D2020, "$ref": "#/$defs/zone",
        "$defs": {"zone": {"properties": {"name": {}, "children": {"items": {"$ref": "#/$defs/zone"}}}}}})
    fields = adapter.load(path, "zone.json", Options()).fields["zone.json"]
    # the recursion is listed once: a reader of children.name reads through "children"
    assert fields == {"name", "children"}


def test_relative_file_reference_inside_the_root(tmp_path):
    write(tmp_path, "common/area.json", {"$schema": D2020, "type": "string", "maxLength": 40})
    old = write(tmp_path, "v1/notice.json", {"$schema": D2020, "properties": {"area": {"$ref": "../common/area.json"}}})
    write(tmp_path, "common/area2.json", {"$schema": D2020, "type": "string", "maxLength": 20})
    new = write(tmp_path, "v2/notice.json", {"$schema": D2020, "properties": {"area": {"$ref": "../common/area2.json"}}})
    options = Options(root=str(tmp_path))
    report = linter.check(old, new, mode="none", options=options)
    assert rules(report) == ["J033"]
    finding = report.findings[0]
    assert finding.path == "area" and finding.new_loc.file.endswith("area2.json") and finding.new_loc.line == 2


def test_remote_reference_is_never_fetched(tmp_path, monkeypatch):
    import socket

    def refuse(*args, **kwargs):
        raise AssertionError("evolint opened a network connection")

    monkeypatch.setattr(socket, "create_connection", refuse)
    monkeypatch.setattr(socket.socket, "connect", refuse)
    old = write(tmp_path, "old.json", {"$schema": D2020, "properties": {"a": {"$ref": "https://schemas.example.org/a.json"}}})
    new = write(tmp_path, "new.json", {"$schema": D2020, "properties": {"a": {"$ref": "https://schemas.example.org/a.json"}}})
    report = linter.check(old, new, mode="none")
    assert rules(report) == ["J005"] and report.compatibility.value == "full"
    changed = write(tmp_path, "changed.json", {"$schema": D2020, "properties": {"a": {"$ref": "https://schemas.example.org/b.json"}}})
    report = linter.check(old, changed, mode="none")
    assert rules(report) == ["J004"] and report.findings[0].undecided
    assert report.compatibility.value == "breaking"


def test_draft_assumed_is_said(tmp_path):
    old = write(tmp_path, "old.json", {"type": "string"})
    report = linter.check(old, old, mode="none")
    assert rules(report) == ["J001"] and "2020-12" in report.findings[0].message


def test_format_semantics_are_stated(tmp_path):
    old = write(tmp_path, "old.json", {"$schema": D2020, "type": "string", "format": "date-time"})
    new = write(tmp_path, "new.json", {"$schema": D2020, "type": "string", "format": "date"})
    (finding,) = linter.check(old, new, mode="none").findings
    assert finding.semantic and "annotation" in finding.message
    assertion = linter.check(old, new, mode="none", options=Options(settings={"format": "assertion"})).findings
    assert "assertion" in assertion[0].message


# ------------------------------------------------------------------ bad input: exit 2, one line

BAD = [
    ("invalid-json", '{"type": "string",\n  "maxLength": }', "invalid JSON", 2),
    ("fails-metaschema", '{\n  "$schema": "https://json-schema.org/draft/2020-12/schema",\n  "properties": {\n    "a": {"type": "text"}\n  }\n}',
     "not a valid 2020-12 schema at '/properties/a/type'", 4),
    ("unknown-draft", '{"$schema": "https://example.org/my-draft"}', "unknown $schema", 1),
    ("missing-file", '{"$schema": "https://json-schema.org/draft/2020-12/schema",\n "properties": {"a": {"$ref": "nowhere.json"}}}',
     "no such file", None),
    ("outside-root", '{"$schema": "https://json-schema.org/draft/2020-12/schema",\n "properties": {"a": {"$ref": "../../outside.json"}}}',
     "leaves the repository root", None),
    ("cycle", '{"$schema": "https://json-schema.org/draft/2020-12/schema",\n "$defs": {"a": {"$ref": "#/$defs/b"}, "b": {"$ref": "#/$defs/a"}},\n "$ref": "#/$defs/a"}',
     "reference cycle with no base case", None),
    ("missing-pointer", '{"$schema": "https://json-schema.org/draft/2020-12/schema",\n "properties": {"a": {"$ref": "#/$defs/none"}}}',
     "does not resolve", 2),
    ("not-a-schema", '[1, 2]', "a JSON Schema is an object or a boolean", 1),
]


@pytest.mark.parametrize("name,text,needle,line", BAD, ids=[b[0] for b in BAD])
def test_bad_input_is_one_line_exit_2(tmp_path, capsys, name, text, needle, line):
    folder = tmp_path / "repo" / "schemas"
    (tmp_path / "repo" / ".git").mkdir(parents=True)
    write(tmp_path, "outside.json", {"type": "string"})
    bad = write(folder, "bad.json", text)
    good = write(folder, "good.json", {"$schema": D2020})
    status, err = run_cli(capsys, "check", str(good), str(bad))
    assert status == 2, err
    assert err.count("\n") == 1 and "Traceback" not in err
    assert needle in err, err
    if line is not None:
        assert f"bad.json:{line}:" in err, err


def test_bad_input_raises_input_error_from_the_api(tmp_path):
    bad = write(tmp_path, "bad.json", '{"$schema": "https://json-schema.org/draft/2020-12/schema", "minLength": -1}')
    with pytest.raises(InputError, match="minLength"):
        adapter.load(bad, "bad.json", Options())


def test_unknown_format_setting_is_bad_usage(tmp_path):
    path = write(tmp_path, "a.json", {"$schema": D2020})
    with pytest.raises(InputError, match="format"):
        adapter.load(path, "a.json", Options(settings={"format": "sometimes"}))


def test_example_scenario_service_notice():
    # schemas_example: a compatible widening (enum values, a property under a closed
    # model), a narrowing (district maxLength), an x-unit annotated duration left alone.
    root = Path(__file__).resolve().parents[2] / "schemas_example"
    report = linter.check(root / "v1" / "service_notice.json", root / "v2" / "service_notice.json", mode="backward")
    assert {(f.rule, f.path) for f in report.findings} == {
        ("J033", "area.district"), ("J070", "bottled_water_point"), ("J012", "channels"), ("J012", "kind")}
    assert report.compatibility.value == "breaking" and not report.passed
    schema = adapter.load(root / "v1" / "service_notice.json", "service_notice.json", Options())
    assert "expected_duration" in schema.fields["urn:utility:service-notice"]


def test_undecided_counts_as_breaking_unless_the_policy_says_otherwise():
    from linter.engine import Policy

    case = Path(__file__).resolve().parents[1] / "cases" / "jsonschema" / "pattern-changed"
    strict = linter.check(case / "old.json", case / "new.json", mode="backward")
    assert strict.compatibility.value == "breaking" and not strict.passed
    lenient = linter.check(case / "old.json", case / "new.json",
                           policy=Policy(mode="backward", undecided="compatible"))
    (finding,) = lenient.findings
    assert finding.undecided and lenient.compatibility.value == "full" and lenient.passed


def _vocabulary_2020(name):
    import jsonschema_specifications

    root = Path(jsonschema_specifications.__file__).parent / "schemas" / "draft202012" / "vocabularies"
    return json.loads((root / name).read_text())


# Mutations of the 2020-12 validation vocabulary: $dynamicRef, $defs and a copy whose $id
# equals the bundled one (the file read must win over the bundled copy).
VOCABULARY_MUTATIONS = [
    ("non-negative-from-one", lambda s: s["$defs"]["nonNegativeInteger"].__setitem__("minimum", 1), "forward", "J021"),
    ("simple-type-added", lambda s: s["$defs"]["simpleTypes"]["enum"].append("decimal"), "backward", "J012"),
    ("property-declared", lambda s: s["properties"].__setitem__("x-extra", {"type": "string"}), "forward", "J071"),
    ("const-dropped", lambda s: s["properties"].pop("const"), "full", None),
]


@pytest.mark.parametrize("name,mutate,verdict,rule", VOCABULARY_MUTATIONS, ids=[m[0] for m in VOCABULARY_MUTATIONS])
def test_mutated_2020_12_vocabulary(tmp_path, name, mutate, verdict, rule):
    schema = _vocabulary_2020("validation")
    changed = copy.deepcopy(schema)
    mutate(changed)
    report = linter.check(write(tmp_path, "old.json", schema), write(tmp_path, "new.json", changed), mode="none")
    assert report.compatibility.value == verdict, [f.message for f in report.findings]
    assert (rule in rules(report)) if rule else rules(report) == []
