"""`check --witness` and `verify` through the command line (needs the Avro adapter)."""
import json
from pathlib import Path

import pytest

pytest.importorskip("linter.formats.avro")

from linter import cli as cli_module  # noqa: E402

VERIFY_SCHEMA = Path(__file__).resolve().parents[2] / "linter" / "data" / "verify.schema.json"


def record(count_type, symbols):
    return {"type": "record", "name": "MeterReading", "namespace": "utility.metering", "fields": [
        {"name": "meter_id", "type": "string"},
        {"name": "count", "type": count_type},
        {"name": "state", "type": {"type": "enum", "name": "State", "symbols": symbols}}]}


@pytest.fixture
def files(tmp_path):
    def make(old, new):
        (tmp_path / "old.avsc").write_text(json.dumps(old))
        (tmp_path / "new.avsc").write_text(json.dumps(new))
        return str(tmp_path / "old.avsc"), str(tmp_path / "new.avsc")
    return make


def invoke(args):
    try:
        cli_module.main(args)
    except SystemExit as exc:
        return exc.code
    return 0


def run(args, capsys):
    code = invoke(args)
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def verify_validator():
    from jsonschema import Draft202012Validator

    schema = json.loads(VERIFY_SCHEMA.read_text())
    Draft202012Validator.check_schema(schema)
    return Draft202012Validator(schema)


def test_check_witness_json(files, capsys, validate_report):
    old, new = files(record("long", ["OK", "LEAK", "OFF"]), record("int", ["OK", "LEAK"]))
    code, out, _ = run(["check", old, new, "--witness", "--output", "json"], capsys)
    data = validate_report(out)
    assert code == 1
    witnesses = [f["witness"] for f in data["findings"] if "witness" in f]
    assert witnesses and all(w["confirmed"] for w in witnesses)
    assert any(w["datum"]["state"] == "OFF" for w in witnesses)


def test_check_without_witness_has_none(files, capsys, validate_report):
    old, new = files(record("long", ["OK"]), record("int", ["OK"]))
    _, out, _ = run(["check", old, new, "--output", "json"], capsys)
    assert all("witness" not in f for f in validate_report(out)["findings"])


def test_check_witness_text(files, capsys):
    old, new = files(record("long", ["OK"]), record("int", ["OK"]))
    _, out, _ = run(["check", old, new, "--witness"], capsys)
    assert "witness backward, confirmed" in out and "long is not int" in out


def test_verify_compatible_passes(files, capsys, verify_validator):
    old, new = files(record("int", ["OK", "LEAK"]), record("long", ["OK", "LEAK", "OFF"]))
    code, out, err = run(["verify", old, new, "--samples", "50", "--output", "json"], capsys)
    data = json.loads(out)
    assert not list(verify_validator.iter_errors(data))
    assert code == 0 and data["passed"] and err == ""  # no progress bar off a terminal
    backward = [r for r in data["results"] if r["direction"] == "backward"]
    assert backward and all(r["verdict"] == "agree" and r["failures"] == 0 for r in backward)
    forward = [r for r in data["results"] if r["direction"] == "forward"]
    assert forward and all(r["static"] == "breaking" and r["failures"] > 0 for r in forward)


def test_verify_is_deterministic_with_a_seed(files, capsys):
    old, new = files(record("long", ["OK", "LEAK", "OFF"]), record("long", ["OK", "LEAK"]))
    outs = [run(["verify", old, new, "--samples", "30", "--seed", "5", "--output", "json"], capsys)[1]
            for _ in range(2)]
    assert outs[0] == outs[1]
    other = run(["verify", old, new, "--samples", "30", "--seed", "6", "--output", "json"], capsys)[1]
    assert json.loads(other)["results"] != json.loads(outs[0])["results"]


def test_verify_reports_a_wrong_static_verdict_as_a_bug(files, capsys, monkeypatch):
    import dataclasses

    import linter.api

    real = linter.api.check

    def no_findings(*args, **kwargs):  # a static analysis that misses long -> int
        report = real(*args, **kwargs)
        report.comparisons = [dataclasses.replace(c, findings=()) for c in report.comparisons]
        return report

    monkeypatch.setattr(linter.api, "check", no_findings)
    old, new = files(record("long", ["OK"]), record("int", ["OK"]))
    code, out, _ = run(["verify", old, new, "--samples", "10"], capsys)
    assert code == 1
    assert "bug" in out and "datum:" in out and "long is not int" in out


def test_verify_says_when_only_meaning_breaks(files, capsys, verify_validator):
    old = record("long", ["OK"])
    new = record("long", ["OK"])
    old["fields"][1]["unit"], new["fields"][1]["unit"] = "L", "m3"
    a, b = files(old, new)
    code, out, _ = run(["verify", a, b, "--samples", "20", "--output", "json"], capsys)
    data = json.loads(out)
    assert not list(verify_validator.iter_errors(data)) and code == 0
    assert all(r["verdict"] == "not-shown" and r.get("semantic_only") for r in data["results"])


def test_announce_witness_adds_an_example(files, capsys, tmp_path):
    old, new = files(record("long", ["OK", "LEAK", "OFF"]), record("long", ["OK", "LEAK"]))
    registry = tmp_path / "consumers.yaml"
    registry.write_text("consumers:\n  - name: leak-detection\n    contact: leaks@example.org\n"
                        "    reads:\n      - schema: utility.metering.MeterReading\n        fields: [state]\n")
    code, out, _ = run(["announce", old, new, "--consumers", str(registry), "--witness"], capsys)
    assert code == 1
    assert "Example (backward)" in out and "OFF" in out
    _, plain, _ = run(["announce", old, new, "--consumers", str(registry)], capsys)
    assert "Example (" not in plain
