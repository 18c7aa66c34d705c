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
    assert ("Also changing on fields you read (these keep the full compatibility you rely on):\n\n"
            "- `utility.metering.MeterReading:volume`") in archive


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


# --- end to end, with the real adapters --------------------------------------------------

def avro_record(fields, name="Meter"):
    return json.dumps({"type": "record", "name": name, "namespace": "utility.test", "fields": fields}, indent=1)


SITE = {"name": "site", "type": {"type": "record", "name": "Site", "fields": [
    {"name": "id", "type": "string"}, {"name": "district", "type": "string"}]}}
SITE_NO_DISTRICT = {"name": "site", "type": {"type": "record", "name": "Site", "fields": [
    {"name": "id", "type": "string"}]}}

REGISTRY = """\
consumers:
  - {name: a, contact: a@example.org, needs: forward, reads: [{schema: utility.test.Meter, fields: [site]}]}
  - {name: b, contact: b@example.org, reads: [{schema: utility.test.Meter, fields: [site.id]}]}
  - {name: c, contact: c@example.org, reads: [{schema: utility.test.Meter, fields: [volum]}]}
  - {name: d, contact: d@example.org, reads: [{schema: utility.test.Extra}]}
  - {name: e, contact: e@example.org, reads: [{schema: "**/meter.avsc", fields: [meter_id]}]}
  - {name: f, contact: f@example.org, reads: [{schema: utility.test.Meter, fields: ["site.*"]}]}
  - {name: g, contact: g@example.org, reads: [{schema: utility.test.Meter, fields: [volume]}]}
"""


@pytest.fixture
def tree(tmp_path):
    pytest.importorskip("linter.formats.avro")
    meter = {"name": "meter_id", "type": "string"}
    volume = {"name": "volume", "type": "long", "unit": "L"}
    for side, site, unit in (("v1", SITE, "L"), ("v2", SITE_NO_DISTRICT, "m3")):
        (tmp_path / side).mkdir()
        (tmp_path / side / "meter.avsc").write_text(avro_record([meter, site, dict(volume, unit=unit)]))
    (tmp_path / "v1" / "extra.avsc").write_text(avro_record([meter], name="Extra"))
    (tmp_path / "consumers.yaml").write_text(REGISTRY)
    return tmp_path


def test_end_to_end_on_avro_files(tree, validate_report):
    import linter

    report = linter.check(tree / "v1", tree / "v2", consumers=tree / "consumers.yaml")
    data = validate_report(report.to_json())
    verdict = {c["name"]: c["verdict"] for c in data["consumers"]}
    assert verdict == {"a": "must-be-told",   # site.district removed without default: breaks forward
                       "b": "unaffected",     # a sibling of what changed
                       "c": "unaffected",     # reads nothing that exists
                       "d": "must-be-told",   # its file was removed
                       "e": "unaffected",     # reads by glob, but only meter_id
                       "f": "informed",       # the removal keeps backward, which f relies on
                       "g": "must-be-told"}   # the unit of volume changed
    assert data["consumers"][2]["stale"] == [{"schema": "utility.test.Meter", "field": "volum"}]
    assert any("'volum'" in w and "stale" in w for w in data["warnings"])
    removed = next(i for i, f in enumerate(data["findings"]) if f["path"] == "site.district")
    assert data["findings"][removed]["consumers"] == ["a", "f"]


def test_announce_command_on_avro_files(tree, capsys, validate_report):
    args = ["announce", str(tree / "v1"), str(tree / "v2"), "--consumers", str(tree / "consumers.yaml")]
    with pytest.raises(SystemExit) as exited:
        main(args)
    assert exited.value.code == 1
    text = capsys.readouterr().out
    assert [h for h in text.splitlines() if h.startswith("## ")] == [
        "## a", "## d", "## g", "## Informed (compatible changes on fields they read)", "## Unaffected",
        "## Registry notes"]
    with pytest.raises(SystemExit) as exited:
        main(args + ["--output", "json"])
    assert exited.value.code == 1
    data = validate_report(capsys.readouterr().out)
    assert data["announcement"]["told"] == ["a", "d", "g"]
    assert data["announcement"]["unaffected"] == ["b", "c", "e"]


def test_announce_exits_0_when_the_mode_is_kept(tree, capsys):
    with pytest.raises(SystemExit) as exited:
        main(["announce", str(tree / "v1" / "extra.avsc"), str(tree / "v1" / "extra.avsc"),
              "--consumers", str(tree / "consumers.yaml")])
    assert exited.value.code == 0
    assert "No changes: 0 findings in 1 file" in capsys.readouterr().out


# ===== Expectations on schemas_example/ (keep them here, in one place) =====================
# Written against the example on main; when the example changes, adjust only this block.
EXAMPLE_VERDICTS = {
    "leak-detection": "must-be-told",
    "billing": "must-be-told",
    "customer-portal": "must-be-told",   # the service notice narrows area.district
    "network-planning": "informed",      # pump telemetry breaks only the JSON mapping
    "data-archive": "must-be-told",
}
# Fields for which a consumer must be told (schema:path), where the example is meant to show it.
EXAMPLE_TOLD_FOR = {
    "billing": {"utility.metering.MeterReading:volume"},
    "customer-portal": {"urn:utility:service-notice:area.district"},
}
# ============================================================================================


def test_example_consumers(validate_report):
    pytest.importorskip("linter.formats.avro")
    import linter

    report = linter.check(EXAMPLE / "v1", EXAMPLE / "v2", consumers=EXAMPLE / "consumers.yaml")
    data = validate_report(report.to_json())
    assert {c["name"]: c["verdict"] for c in data["consumers"]} == EXAMPLE_VERDICTS
    for name, fields in EXAMPLE_TOLD_FOR.items():
        entry = next(c for c in data["consumers"] if c["name"] == name)
        told = {f"{data['findings'][r['finding']]['schema']}:{data['findings'][r['finding']]['path']}"
                for r in entry["reasons"]}
        assert told == fields
    assert not any("stale" in w for w in data.get("warnings", [])), "the example registry names real fields"


def run_tree(tmp_path, name, old, new, registry):
    for side, text in (("v1", old), ("v2", new)):
        (tmp_path / side).mkdir()
        (tmp_path / side / name).write_text(text)
    (tmp_path / "consumers.yaml").write_text(registry)
    import linter

    return linter.check(tmp_path / "v1", tmp_path / "v2", consumers=tmp_path / "consumers.yaml")


PUMP = """syntax = "proto3";
package utility.telemetry;
message PumpStatus {
  string pump_id = 1;
  // @unit: %s
  double outlet_pressure = 2;
  Motor motor = 3;
}
message Motor { int32 rpm = 1; %s }
"""


def test_end_to_end_on_protobuf_files(tmp_path, validate_report):
    pytest.importorskip("linter.formats.protobuf")
    report = run_tree(tmp_path, "pump_status.proto", PUMP % ("kPa", "float temperature = 2;"), PUMP % ("bar", ""), """\
consumers:
  - {name: planning, contact: p@example.org, reads: [{schema: utility.telemetry.PumpStatus, fields: [motor.rpm]}]}
  - {name: ops, contact: o@example.org, reads: [{schema: utility.telemetry.PumpStatus, fields: [outlet_pressure, motor.temp]}]}
  - {name: motors, contact: m@example.org, needs: full, reads: [{schema: "**/pump_status.proto", fields: ["motor.*"]}]}
""")
    data = validate_report(report.to_json())
    # the unit of outlet_pressure changed (semantic); motor.temperature was removed (a sibling of motor.rpm)
    assert {c["name"]: c["verdict"] for c in data["consumers"]} == {
        "planning": "unaffected", "ops": "must-be-told", "motors": "informed"}
    assert data["consumers"][1]["stale"] == [{"schema": "utility.telemetry.PumpStatus", "field": "motor.temp"}]


NOTICE = """{"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": "urn:utility:service-notice",
 "type": "object", "required": ["district", "starts"%s],
 "properties": {"district": {"type": "string"}, "starts": {"type": "string"}, "reason": {"type": "string"},
   "duration": {"type": "integer", "x-unit": "%s"}, "contact": {"type": "object", "properties": {"phone": {"type": "string"}}}}}
"""


def test_end_to_end_on_json_schema_files(tmp_path, validate_report):
    pytest.importorskip("linter.formats.jsonschema")
    report = run_tree(tmp_path, "service_notice.json", NOTICE % ("", "min"), NOTICE % (', "reason"', "h"), """\
consumers:
  - {name: portal, contact: p@example.org, reads: [{schema: "**/service_notice.json"}]}
  - {name: sms, contact: s@example.org, reads: [{schema: "urn:utility:service-notice", fields: [district, contact.phone]}]}
  - {name: planner, contact: pl@example.org, needs: forward, reads: [{schema: "urn:utility:service-notice", fields: [reason]}]}
  - {name: rota, contact: r@example.org, reads: [{schema: "urn:utility:service-notice", fields: [duration]}]}
""")
    data = validate_report(report.to_json())
    # reason became required (breaks backward only); the unit of duration changed (semantic)
    assert {c["name"]: c["verdict"] for c in data["consumers"]} == {
        "portal": "must-be-told", "sms": "unaffected", "planner": "informed", "rota": "must-be-told"}


def test_announce_takes_the_registry_and_modes_from_the_configuration(tree, capsys):
    # A by-path mode "full" for meter.avsc: consumers without needs of their own rely on it
    # there (docs/configuration.md, docs/consumers.md).
    (tree / "evolint.toml").write_text('consumers = "consumers.yaml"\n\n'
                                       '[[by-path]]\nfiles = "**/meter.avsc"\nmode = "full"\n')
    with pytest.raises(SystemExit):
        main(["announce", str(tree / "v1"), str(tree / "v2"), "--config", str(tree / "evolint.toml"),
              "--output", "json"])
    data = json.loads(capsys.readouterr().out)
    # f reads site.*: the removal of site.district breaks forward, which "full" needs
    assert data["announcement"]["told"] == ["a", "d", "f", "g"]
    assert data["announcement"]["informed"] == []
