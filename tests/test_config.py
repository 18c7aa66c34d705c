"""Configuration: discovery, validation errors (exit 2, one line), modes per path, waivers."""
import datetime as dt
import json

import pytest

from gitrepo import leak_alert, meter_reading
from linter import config
from linter.cli import main
from linter.errors import UsageError


@pytest.fixture
def project(tmp_path, monkeypatch):
    """v1/ holds two schemas; v2/ dropped the leak alert (G001, breaking)."""
    for version in ("v1", "v2"):
        (tmp_path / version).mkdir()
        (tmp_path / version / "meter_reading.avsc").write_text(json.dumps(meter_reading()))
    (tmp_path / "v1" / "leak_alert.avsc").write_text(json.dumps(leak_alert()))
    monkeypatch.chdir(tmp_path)
    return tmp_path


def run(args, capsys):
    with pytest.raises(SystemExit) as exit_:
        main(args)
    out = capsys.readouterr()
    return exit_.value.code, out.out, out.err


def check_json(capsys, *extra):
    status, out, err = run(["check", "v1", "v2", "--output", "json", *extra], capsys)
    assert status in (0, 1), err
    return status, json.loads(out)


def test_found_from_a_subfolder_upward(project, monkeypatch):
    (project / "evolint.toml").write_text('mode = "full"\n')
    (project / "deep" / "er").mkdir(parents=True)
    assert config.find(project / "deep" / "er") == project / "evolint.toml"


def test_pyproject_without_our_table_is_passed_over(project):
    (project / "pyproject.toml").write_text('[project]\nname = "x"\n')
    assert config.find(project) is None
    (project / "pyproject.toml").write_text('[project]\nname = "x"\n[tool.evolint]\nmode = "forward"\n')
    assert config.discover(start=project).mode == "forward"


@pytest.mark.parametrize("text, message", [
    ('mode = "sideways"\n', "mode: 'sideways' is not one of backward, forward, full, none"),
    ('colour = "red"\n', "unknown key 'colour'"),
    ('[severity]\nZ999 = "error"\n', "severity.Z999: unknown rule 'Z999'"),
    ('[[waive]]\nrule = "G001"\nreason = "   "\n', "waive[0].reason: a waiver needs a written reason"),
    ('[[waive]]\nrule = "G001"\n', "waive[0]: missing key 'reason'"),
    ('[[waive]]\nrule = "X123"\nreason = "moved to the archive"\n', "waive[0].rule: unknown rule 'X123'"),
    ('[[waive]]\nrule = "G001"\nreason = "r"\nuntil = "soon"\n', "expected a date YYYY-MM-DD"),
    ('[[waive]]\nrule = "G001"\nreason = "r"\nwhen = 1\n', "unknown key 'waive[0].when'"),
    ('mode = \n', "invalid TOML"),
])
def test_errors_are_one_line_naming_file_and_key_exit_2(project, capsys, text, message):
    (project / "evolint.toml").write_text(text)
    status, _, err = run(["check", "v1", "v2"], capsys)
    assert status == 2
    assert err.startswith("evolint: error: evolint.toml:")
    assert message in err
    assert err.count("\n") == 1


def test_unknown_key_in_pyproject_names_the_table_and_line(project, capsys):
    (project / "pyproject.toml").write_text('[project]\nname = "x"\n\n[tool.evolint]\nmode = "full"\nmodee = "x"\n')
    status, _, err = run(["check", "v1", "v2"], capsys)
    assert status == 2
    assert "pyproject.toml:6: unknown key 'tool.evolint.modee'" in err


def test_explicit_config_file_that_is_missing(project, capsys):
    status, _, err = run(["check", "v1", "v2", "--config", "nope.toml"], capsys)
    assert status == 2 and "nope.toml: no such configuration file" in err


def test_waiver_silences_its_rule_for_matching_files(project, capsys):
    status, data = check_json(capsys)
    assert status == 1 and [f["rule"] for f in data["findings"]] == ["G001"]
    (project / "evolint.toml").write_text(
        '[[waive]]\nrule = "schema-file-removed"\nfiles = "v1/leak_*.avsc"\n'
        'reason = "leak alerts moved to their own repository"\n')
    status, data = check_json(capsys)
    assert status == 0 and data["findings"] == []
    (project / "evolint.toml").write_text(
        '[[waive]]\nrule = "G001"\nfiles = "v1/other.avsc"\nreason = "not this file"\n')
    status, data = check_json(capsys)
    assert status == 1


def test_expired_waiver_stops_silencing_and_becomes_a_finding(project, capsys, validate_report):
    (project / "evolint.toml").write_text(
        '# waivers\n[[waive]]\nrule = "G001"\nreason = "consumers migrate first"\nuntil = 2020-01-31\n')
    status, data = check_json(capsys)
    validate_report(data)
    assert status == 1
    assert sorted(f["rule"] for f in data["findings"]) == ["G001", "G003"]
    expired = next(f for f in data["findings"] if f["rule"] == "G003")
    assert expired["severity"] == "warning"
    assert expired["new"] == {"file": "evolint.toml", "line": 2}
    assert "2020-01-31" in expired["message"]


def test_waiver_until_today_still_holds():
    today = dt.date(2026, 6, 30)
    waiver = config.Waiver("G001", "r", until=today)
    assert not waiver.expired(today) and waiver.expired(today + dt.timedelta(days=1))


def test_mode_per_path_and_the_command_line_wins(project, capsys):
    (project / "evolint.toml").write_text('mode = "full"\n[[by-path]]\nfiles = "v2/**"\nmode = "none"\n')
    status, data = check_json(capsys)
    # G001 is about a removed file: it matches through its OLD path, which v2/** does not cover
    assert status == 1
    (project / "evolint.toml").write_text('[[by-path]]\nfiles = "v1/leak_alert.avsc"\nmode = "none"\n')
    status, data = check_json(capsys)
    assert status == 0 and data["comparisons"][0]["mode"] == "none"
    status, data = check_json(capsys, "--mode", "backward")
    assert status == 1 and "mode" not in data["comparisons"][0]


def test_severity_override(project, capsys):
    (project / "v1" / "leak_alert.avsc").unlink()
    (project / "v2" / "billing.avsc").write_text(json.dumps(
        {"type": "record", "name": "BillingPeriod", "namespace": "utility.billing", "fields": []}))
    status, data = check_json(capsys)
    assert status == 0 and data["findings"][0]["severity"] == "info"
    (project / "evolint.toml").write_text('[severity]\nschema-file-added = "error"\n')
    status, data = check_json(capsys)
    assert status == 1 and data["findings"][0]["severity"] == "error"


@pytest.mark.parametrize("glob, path, hit", [
    ("schemas/**", "schemas/a/b.avsc", True),
    ("schemas/**/*.avsc", "schemas/b.avsc", True),
    ("schemas/*.avsc", "schemas/a/b.avsc", False),
    ("*.avsc", "b.avsc", True),
    ("./legacy/?.proto", "legacy/x.proto", True),
    ("legacy/[a].proto", "legacy/a.proto", False),  # brackets are literal
])
def test_globs(glob, path, hit):
    assert config.glob_match(glob, path) is hit


def test_config_error_is_a_usage_error():
    assert issubclass(config.ConfigError, UsageError)


def test_the_documented_example_is_a_valid_configuration(tmp_path):
    import re
    from pathlib import Path

    page = (Path(__file__).resolve().parent.parent / "docs" / "configuration.md").read_text()
    example = re.search(r"```toml\n(.*?)```", page, re.S)[1]
    (tmp_path / "pyproject.toml").write_text(example)
    loaded = config.load(tmp_path / "pyproject.toml")
    assert loaded.mode == "backward" and len(loaded.waivers) == 2 and len(loaded.by_path) == 2
    assert loaded.mode_for(tmp_path / "schemas" / "archive" / "old" / "x.avsc", "backward") == "none"
    assert loaded.severities == {"S002": "error", "G002": "warning"}


def test_encodings_consumers_and_include_reach_the_run(tmp_path):
    (tmp_path / "evolint.toml").write_text(
        'encodings = ["json"]\nconsumers = "registry/consumers.yaml"\ninclude = ["proto"]\n')
    loaded = config.load(tmp_path / "evolint.toml")
    policy = loaded.policy(tmp_path / "a.proto")
    assert policy.encodings == ("json",)
    assert loaded.policy(tmp_path / "a.proto", encodings=()).encodings == ()  # the command line wins
    assert loaded.consumers == tmp_path / "registry" / "consumers.yaml"
    assert loaded.include == (str(tmp_path / "proto"),)


def test_undecided_and_json_format_settings_reach_the_run(tmp_path, monkeypatch, capsys):
    import shutil
    from pathlib import Path

    cases = Path(__file__).parent / "cases" / "jsonschema"
    monkeypatch.chdir(tmp_path)
    for case, key, value, before, after in (
        # JSON Schema Validation 2020-12 §6.3.3: two patterns are undecided, breaking by default
        ("pattern-changed", "undecided", "compatible", "breaking", "full"),
        # JSON Schema Validation 2020-12 §7.2: format is an annotation unless asserted
        ("format-added-annotation", "json-format", "assertion", "full", "forward"),
    ):
        for side in ("old", "new"):
            shutil.copy(cases / case / f"{side}.json", tmp_path / f"{side}.json")
        (tmp_path / "evolint.toml").write_text("")
        _, out, _ = run(["check", "old.json", "new.json", "--mode", "none", "--output", "json"], capsys)
        assert json.loads(out)["compatibility"] == before
        (tmp_path / "evolint.toml").write_text(f'{key} = "{value}"\n')
        _, out, _ = run(["check", "old.json", "new.json", "--mode", "none", "--output", "json"], capsys)
        assert json.loads(out)["compatibility"] == after, out


def test_undecided_setting_is_validated(tmp_path, capsys):
    (tmp_path / "evolint.toml").write_text('undecided = "maybe"\n')
    status, _, err = run(["check", "a.avsc", "b.avsc", "--config", str(tmp_path / "evolint.toml")], capsys)
    assert status == 2 and "undecided" in err and err.count("\n") == 1
