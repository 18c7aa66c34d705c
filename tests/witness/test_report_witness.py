"""The witness member of the JSON report and its two lines in the text report."""
import io
import json

from click.testing import CliRunner

from linter.api import Report
from linter.model import Comparison, Compat, Finding
from linter.report import render
from linter.witness import Witness

WITNESS = Witness("backward", {"state": "OFF", "raw": "\u00ff"}, "v1/a.avsc", "v2/a.avsc",
                  "the reader fails: OFF not found", True)


def report():
    f = Finding("A999", "k", "utility.metering.MeterReading", "state", Compat.FORWARD, False, "error",
                "m", "a", "r", extra={"witness": WITNESS.to_json()})
    return Report("backward", [Comparison("v1/a.avsc", "v2/a.avsc", "avro", (f,))])


def test_json_report_with_witness_matches_the_contract(validate_report):
    data = validate_report(report().to_json())
    assert data["findings"][0]["witness"]["confirmed"] is True


def test_contract_rejects_a_witness_without_outcome(report_validator):
    data = report().to_json()
    del data["findings"][0]["witness"]["outcome"]
    assert list(report_validator.iter_errors(data))


def test_text_report_prints_datum_as_json_and_outcome_in_one_line():
    out = io.StringIO()
    render("text", report(), out, color=False)
    lines = out.getvalue().splitlines()
    datum = next(line for line in lines if "witness backward" in line)
    assert json.loads(datum.split(": ", 1)[1]) == WITNESS.datum
    outcome = next(line for line in lines if "written with v1/a.avsc" in line)
    assert outcome.strip().endswith("the reader fails: OFF not found")


def test_verify_and_witness_options_exist():
    from linter.cli import cli

    runner = CliRunner()
    assert "--witness" in runner.invoke(cli, ["check", "--help"]).output
    help_text = runner.invoke(cli, ["verify", "--help"]).output
    assert "--samples" in help_text and "--seed" in help_text


def test_a_failing_builder_does_not_end_the_run(monkeypatch, validate_report):
    import linter.witness as w

    def broken(*args, **kwargs):
        raise RuntimeError("boom")

    monkeypatch.setattr(w, "witness_for", broken)
    f = Finding("A999", "k", "utility.metering.MeterReading", "state", Compat.FORWARD, False, "error",
                "m", "a", "r")
    [comparison] = w.attach([Comparison("v1/a.avsc", "v2/a.avsc", "avro", (f,))])
    witness = comparison.findings[0].extra["witness"]
    assert witness["confirmed"] is False and "boom" in witness["outcome"]
    validate_report(Report("backward", [comparison]).to_json())
