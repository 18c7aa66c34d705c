"""The JSON layout, SARIF (validated against the OASIS SARIF 2.1.0 schema), Markdown and CI-log annotations."""
import io
import json
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.api import Report
from linter.catalogue import load as load_catalogue
from linter.model import Comparison, Compat, Finding, Location
from linter.report import REPORTERS, render
from linter.report.annotations import escape_data, escape_property

SARIF_SCHEMA = Path(__file__).parent / "data" / "sarif-schema-2.1.0.json"


@pytest.fixture(scope="module")
def sarif_validator():
    from jsonschema import Draft4Validator, FormatChecker

    schema = json.loads(SARIF_SCHEMA.read_text())
    Draft4Validator.check_schema(schema)
    return Draft4Validator(schema, format_checker=FormatChecker())


def finding(rule="G001", severity="error", compat=Compat.BREAKING, message="schema file a.avsc was removed",
            old=Location("HEAD:schemas/a b.avsc", 3), new=None, path=""):
    return Finding(rule=rule, kind="k", schema="utility.metering.MeterReading", path=path,
                   compatibility=compat, semantic=False, severity=severity, message=message,
                   advice="Keep the file | announce first", reference="Common practice",
                   old_loc=old, new_loc=new)


@pytest.fixture
def report():
    findings = (
        finding(),
        finding(rule="G002", severity="info", compat=Compat.FULL, message="a 50% share,\nnew line",
                old=None, new=Location("schemas/new.avsc", None), path="volume"),
        finding(rule="G003", severity="warning", compat=Compat.FULL, message="expired <soon>",
                old=Location("evolint.toml", 4), new=Location("evolint.toml", 4)),
    )
    return Report(mode="backward", comparisons=[Comparison("HEAD:schemas/a b.avsc", "/dev/null", "avro", findings)],
                  settings={"base": "HEAD"}, warnings=["skipped 1 .json file"])


def rendered(name, report):
    out = io.StringIO()
    render(name, report, out)
    return out.getvalue()


def test_reporters_are_registered():
    assert {"sarif", "markdown", "annotations"} <= set(REPORTERS)


def test_sarif_is_valid_against_the_oasis_schema(report, sarif_validator):
    data = json.loads(rendered("sarif", report))
    errors = list(sarif_validator.iter_errors(data))
    assert not errors, [e.message for e in errors]
    run = data["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    assert [r["id"] for r in rules] == ["G001", "G002", "G003"]
    cat = load_catalogue()
    assert rules[0]["help"]["text"].startswith(" ".join(cat.get("G001").why.split()))
    assert rules[0]["shortDescription"]["text"] == cat.get("G001").title
    results = run["results"]
    assert [(r["ruleId"], r["level"]) for r in results] == [("G001", "error"), ("G002", "note"), ("G003", "warning")]
    removed = results[0]["locations"][0]["physicalLocation"]
    # the OLD side of a git run is named REF:path; SARIF gets the path, percent-encoded
    assert removed == {"artifactLocation": {"uri": "schemas/a%20b.avsc"}, "region": {"startLine": 3}}
    assert "region" not in results[1]["locations"][0]["physicalLocation"]
    assert results[2]["relatedLocations"][0]["physicalLocation"]["region"] == {"startLine": 4}
    assert all(r["ruleIndex"] == [x["id"] for x in rules].index(r["ruleId"]) for r in results)


def test_sarif_schema_rejects_what_it_should(sarif_validator, report):
    # the shipped schema really constrains: a wrong level and a missing message are caught
    data = json.loads(rendered("sarif", report))
    data["runs"][0]["results"][0]["level"] = "fatal"
    del data["runs"][0]["results"][1]["message"]
    assert len(list(sarif_validator.iter_errors(data))) == 2


def test_sarif_of_no_findings_is_valid(sarif_validator):
    data = json.loads(rendered("sarif", Report(mode="full", comparisons=[])))
    assert not list(sarif_validator.iter_errors(data))
    assert data["runs"][0]["results"] == [] and data["runs"][0]["tool"]["driver"]["rules"] == []


def test_markdown_has_verdict_table_and_folded_details(report):
    text = rendered("markdown", report)
    lines = text.splitlines()
    assert lines[0].startswith("**evolint: FAIL**")
    header = next(i for i, l in enumerate(lines) if l.startswith("| severity |"))
    rows = [l for l in lines[header + 2:] if l.startswith("| ")]
    assert len(rows) == 3
    assert all(row.count(" | ") == 6 for row in [r.replace("\\|", "") for r in rows])
    assert "a 50% share, new line" in text  # newlines cannot break a row
    assert "expired &lt;soon&gt;" in text
    assert text.count("<details>") == 3 and text.count("</details>") == 3
    assert "`schemas/a b.avsc:3`" in text


def test_markdown_without_findings_passes(report):
    text = rendered("markdown", Report(mode="backward", comparisons=[]))
    assert text.startswith("**evolint: PASS**") and "|---|" not in text


def test_annotations_are_workflow_commands(report):
    lines = rendered("annotations", report).splitlines()
    assert lines[0].startswith("::error file=schemas/a b.avsc,line=3,title=G001 utility.metering.MeterReading")
    assert lines[0].endswith("::schema file a.avsc was removed%0AKeep the file | announce first")
    assert lines[1] == "::notice file=schemas/new.avsc,title=G002 volume (compatible)::a 50%25 share,%0Anew line"
    assert lines[2].startswith("::warning file=evolint.toml,line=4,")
    assert lines[3] == "::warning::skipped 1 .json file"
    assert lines[4].startswith("evolint: FAIL ")
    assert len(lines) == 5


def test_annotation_escaping():
    assert escape_data("100%\r\n") == "100%25%0D%0A"
    assert escape_property("a:b,c") == "a%3Ab%2Cc"


def test_cli_outputs_on_a_git_run(tmp_path, monkeypatch, capsys, sarif_validator):
    from gitrepo import Repo, leak_alert, meter_reading
    from linter.cli import main

    repo = Repo(tmp_path / "utility")
    repo.write("schemas/meter_reading.avsc", meter_reading())
    repo.write("schemas/leak_alert.avsc", leak_alert())
    repo.commit("schemas")
    repo.git("rm", "-q", "schemas/leak_alert.avsc")
    monkeypatch.chdir(repo.path)
    outputs = {}
    for name in ("sarif", "markdown", "annotations"):
        with pytest.raises(SystemExit) as exit_:
            main(["check", "--staged", "--output", name])
        assert exit_.value.code == 1
        outputs[name] = capsys.readouterr().out
    sarif = json.loads(outputs["sarif"])
    assert not list(sarif_validator.iter_errors(sarif))
    location = sarif["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"]
    assert location == {"uri": "schemas/leak_alert.avsc"}
    assert "| error | G001 |" in outputs["markdown"]
    assert outputs["annotations"].startswith("::error file=schemas/leak_alert.avsc,")


def test_markdown_names_the_consumers_to_tell(report):
    from dataclasses import replace

    comparison = report.comparisons[0]
    first = replace(comparison.findings[0], consumers=("leak-detection", "billing"))
    report.comparisons = [replace(comparison, findings=(first, *comparison.findings[1:]))]
    report.consumers = [{"name": "leak-detection", "contact": "leaks@example.org", "notify": True, "findings": [0]},
                        {"name": "billing", "contact": "billing@example.org", "notify": False, "findings": [0]}]
    text = rendered("markdown", report)
    assert "**Consumers to tell:** leak-detection (leaks@example.org)\n" in text
    assert "| read by |" in text and "| leak-detection, billing |" in text


json_values = st.recursive(
    st.none() | st.booleans() | st.integers() | st.floats(allow_nan=False) | st.text(),
    lambda kids: st.lists(kids, max_size=3) | st.dictionaries(st.text(), kids, max_size=3), max_leaves=12)


@given(st.dictionaries(st.text(), json_values | st.lists(json_values, max_size=3), max_size=6))
def test_the_json_layout_reads_back_as_the_object(obj):
    # The layout is written by json's C encoder (linter/report/json.py): what it prints
    # must decode, by the standard library's decoder, to exactly the object given.
    from linter.report.json import layout

    assert json.loads(layout(obj)) == obj


def test_the_json_report_puts_each_finding_on_a_line_of_its_own(report, validate_report):
    text = rendered("json", report)
    data = validate_report(text)
    lines = text.splitlines()
    assert lines[0] == "{" and lines[-1] == "}"
    found = [json.loads(line.strip().rstrip(",")) for line in lines if line.startswith('    {"rule": ')]
    assert found == data["findings"] and len(found) == 3
    assert '"message": "a 50% share,\\nnew line"' in text  # a newline inside a value stays escaped
