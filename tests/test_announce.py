"""The announcement (linter/announce.py, `evolint announce`) and the example's consumer impact."""
import io
import json
from pathlib import Path

import pytest

from linter import announce, consumers
from linter.api import Report
from linter.cli import main
from linter.model import Comparison, Compat, Finding

ROOT = Path(__file__).resolve().parent.parent
EXAMPLE = ROOT / "schemas_example"
METER = "utility.metering.MeterReading"
FIELDS = {METER: frozenset({"meter_id", "site", "site.id", "site.district", "volume", "flow_rate", "pressure"})}


def finding(path, compat, *, semantic=False, message="changed", advice="do this"):
    return Finding(rule="A001", kind="synthetic", schema=METER, path=path, compatibility=compat,
                   semantic=semantic, severity="error", message=message, advice=advice,
                   reference="Avro specification, Schema Resolution")


@pytest.fixture
def report():
    registry = consumers.load(EXAMPLE / "consumers.yaml")
    found = (finding("flow_rate", Compat.BREAKING, semantic=True, message="unit of flow_rate changed from L/min to m3/h."),
             finding("site.district", Compat.FORWARD, message="field site.district was removed"),
             finding("volume", Compat.FULL, message="doc of volume changed", advice=""))
    comparison = Comparison("v1/meter_reading.avsc", "v2/meter_reading.avsc", "avro", found, old_fields=FIELDS)
    return consumers.apply(Report(mode="backward", comparisons=[comparison]), registry)


def sections(text):
    return {block.split("\n", 1)[0]: block for block in text.split("\n## ")[1:]}


def test_markdown_has_a_summary_and_a_section_per_consumer_told(report):
    text = announce.markdown(report)
    lines = text.splitlines()
    assert lines[0] == f"# Schema change: {METER}"
    assert lines[2] == ("Breaking (fails mode backward): 3 findings in 1 file; "
                        "2 consumers must be told, 2 informed, 1 unaffected.")
    parts = sections(text)
    assert set(parts) == {"leak-detection", "data-archive", "Informed (compatible changes on fields they read)",
                          "Unaffected"}
    leak = parts["leak-detection"]
    assert "Contact: leaks@example.org · team: Network operations · channel: \\#leak-detection" in leak
    # The semantic change, in plain words, with the advice; the backward-breaking removal too.
    assert "**`utility.metering.MeterReading:flow_rate`**: unit of flow_rate changed from L/min to m3/h. " \
           "The data still decodes, but the value means something else" in leak
    assert "  - What to do: do this" in leak
    assert "cannot read every event written with the old one" in leak
    assert "Fields affected: `utility.metering.MeterReading:flow_rate`, `utility.metering.MeterReading:site.district`" in leak
    # network-planning needs forward: a removal that keeps forward leaves it informed.
    informed = parts["Informed (compatible changes on fields they read)"]
    assert "- billing (billing@example.org): `utility.metering.MeterReading:volume`" in informed
    assert "- network-planning (planning@example.org): `utility.metering.MeterReading:site.district`" in informed
    assert "- customer-portal (portal@example.org)" in parts["Unaffected"]
    # data-archive needs full: every finding concerns it; the compatible one is listed apart.
    archive = parts["data-archive"]
    assert "You rely on full compatibility." in archive
    assert "Also changing on fields you read, compatible for you:\n\n- `utility.metering.MeterReading:volume`" in archive


def test_markdown_escapes_text_from_schemas():
    assert announce.esc("a_b *c* <d> [e](f) # g _h_") == r"a_b \*c\* \<d\> \[e\](f) \# g \_h\_"
    assert announce.code("x`y") == "``x`y``"


def test_json_output_is_the_report_with_the_announcement(report, validate_report):
    out = io.StringIO()
    announce.render(report, out, "json")
    data = validate_report(out.getvalue())
    assert data["announcement"] == {
        "summary": announce.summary(report), "schemas": [METER],
        "told": ["leak-detection", "data-archive"], "informed": ["billing", "network-planning"],
        "unaffected": ["customer-portal"]}
    assert data["findings"][0]["consumers"] == ["leak-detection", "data-archive"]


def test_no_findings_says_so():
    registry = consumers.load(EXAMPLE / "consumers.yaml")
    comparison = Comparison("a.avsc", "b.avsc", "avro", (), old_fields=FIELDS)
    report = consumers.apply(Report(mode="backward", comparisons=[comparison]), registry)
    text = announce.markdown(report)
    assert "No changes: 0 findings in 1 file; 0 consumers must be told, 0 informed, 5 unaffected." in text
    assert "## Informed (compatible changes on fields they read)\n\nNone." in text


def test_announce_needs_a_registry(capsys):
    with pytest.raises(SystemExit) as exited:
        main(["announce", "a.avsc", "b.avsc"])
    assert exited.value.code == 2
    assert "--consumers" in capsys.readouterr().err


def test_announce_reports_bad_input_with_status_2(tmp_path, capsys):
    with pytest.raises(SystemExit) as exited:
        main(["announce", str(tmp_path / "nope.avsc"), str(tmp_path / "nope.avsc"),
              "--consumers", str(EXAMPLE / "consumers.yaml")])
    assert exited.value.code == 2
    assert "no such file" in capsys.readouterr().err
