"""The consumer registry (linter/registry.py) and consumer impact (linter/consumers.py).

Impact is tested on synthetic findings, so it does not depend on any format adapter;
the end-to-end checks on schemas_example/ are in tests/test_announce.py.
"""
import json
from dataclasses import replace
from pathlib import Path

import pytest

from linter import consumers
from linter.api import Report
from linter.cli import main
from linter.errors import InputError
from linter.model import Comparison, Compat, Finding

METER = "utility.metering.MeterReading"
OLD_FIELDS = {METER: frozenset({"meter_id", "site", "site.id", "site.district", "read_at",
                                "volume", "flow_rate", "pressure", "battery"})}


def write(tmp_path, text, name="consumers.yaml") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def finding(path, compat=Compat.FULL, *, schema=METER, semantic=False, undecided=False, rule="A001"):
    return Finding(rule=rule, kind="synthetic", schema=schema, path=path, compatibility=compat,
                   semantic=semantic, severity="error", message=f"{path} changed", advice="",
                   reference="synthetic", undecided=undecided)


def comparison(*findings, old="v1/meter_reading.avsc", new="v2/meter_reading.avsc", fields=OLD_FIELDS):
    return Comparison(old, new, "avro", tuple(findings), old_fields=fields)


REGISTRY = """\
consumers:
  - name: leak-detection
    contact: leaks@example.org
    reads:
      - schema: utility.metering.MeterReading
        fields: [flow_rate, pressure, "site.*"]
  - name: billing
    contact: billing@example.org
    team: Billing
    channel: "#billing"
    reads:
      - schema: utility.metering.MeterReading
        fields: [meter_id, volume]
  - name: network-planning
    contact: planning@example.org
    needs: forward
    reads:
      - schema: utility.metering.MeterReading
        fields: ["site.**", pressure]
  - name: data-archive
    contact: archive@example.org
    needs: full
    reads:
      - schema: "**/*.avsc"
"""


@pytest.fixture
def registry(tmp_path):
    return consumers.load(write(tmp_path, REGISTRY))


def verdicts(impacts):
    return {i.consumer.name: i.verdict for i in impacts}


# --- loading -------------------------------------------------------------------------

def test_loads_entries_with_their_lines(registry):
    names = [c.name for c in registry.consumers]
    assert names == ["leak-detection", "billing", "network-planning", "data-archive"]
    leak = registry.consumers[0]
    assert leak.line == 2 and leak.reads[0].line == 5
    assert [p.text for p in leak.reads[0].fields] == ["flow_rate", "pressure", "site.*"]
    assert registry.consumers[1].team == "Billing" and registry.consumers[2].needs == "forward"
    assert registry.consumers[3].reads[0].fields is None and registry.consumers[3].reads[0].by_file


BAD = {
    "unknown key": ("consumers:\n  - name: a\n    contact: a@example.org\n    reads:\n"
                    "      - schema: x\n        filds: [volume]\n", 6, "unknown key 'filds'"),
    "missing name": ("consumers:\n  - contact: a@example.org\n    reads: [{schema: x}]\n", 2, "missing 'name'"),
    "bad pattern": ("consumers:\n  - name: a\n    contact: a@example.org\n    reads:\n"
                    "      - schema: x\n        fields: [ok, 'site..id']\n", 6, "empty segment"),
    "object tag": ("consumers:\n  - name: !!python/object/apply:os.system ['true']\n", 2,
                   "tag !!python/object/apply:os.system is not allowed"),
    "custom tag": ("consumers: !registry\n  - name: a\n", 1, "tag !registry is not allowed"),
    "malformed": ("consumers:\n  - name: [a\n", 3, "invalid YAML"),
    "bad needs": ("consumers:\n  - name: a\n    contact: a@example.org\n    needs: sideways\n"
                  "    reads: [{schema: x}]\n", 4, "'needs' must be one of backward, forward, full"),
    "fields not a list": ("consumers:\n  - name: a\n    contact: a@example.org\n    reads:\n"
                          "      - schema: x\n        fields: volume\n", 6, "'reads[1].fields' must be a list"),
    "duplicate key": ("consumers:\n  - name: a\n    name: b\n", 3, "duplicate key 'name'"),
    "duplicate consumer": ("consumers:\n  - {name: a, contact: a@example.org, reads: [{schema: x}]}\n"
                           "  - {name: a, contact: b@example.org, reads: [{schema: y}]}\n", 3, "named twice"),
    "empty reads": ("consumers:\n  - {name: a, contact: a@example.org, reads: []}\n", 2, "empty list"),
    "not a mapping": ("- a\n", 1, "must be a mapping"),
    "empty file": ("", 1, "registry is empty"),
    "unknown top-level key": ("x-lists: &f [a]\nconsumer: []\n", 2, "unknown key 'consumer' (known: consumers, or keys"),
    "alias bomb": ("a: &a [x, x, x, x, x, x, x, x, x, x]\n"
                   + "".join(f"{n}: &{n} [{', '.join(['*' + p] * 10)}]\n" for p, n in zip("abcdef", "bcdefg"))
                   + "consumers: *g\n", 1, "expands to more than 100000 values"),
    "self-reference": ("consumers: &a [*a]\n", 1, "refers to itself"),
    "complex key": ("consumers:\n  - ? name: billing\n    contact: b@example.org\n", 2, "key must be plain text"),
    "bad timestamp": ("consumers:\n  - name: 2026-13-45\n", 2, "invalid !!timestamp value '2026-13-45'"),
    "bad int": ("consumers:\n  - name: !!int twelve\n", 2, "invalid !!int value 'twelve'"),
    "deep nesting": ("consumers: " + "[" * 1200 + "]" * 1200 + "\n", None, "nested too deeply"),
    # found by the fuzz suite: a mapping used as a key composes, but is not plain data
    "mapping as a key": ("consumers:\n  - name: a\n    reads:\n      - schema: x\n    ?  fields: [a]\n",
                         5, "a key must be plain text"),
    # found by the fuzz suite: a lone "?" is a mapping with a null key
    "null key": ("?\n", 1, "a key must be plain text, not !!null"),
    "number key": ("consumers:\n  - name: a\n    1: x\n", 3, "a key must be plain text, not !!int"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_registries_are_one_line_errors_with_a_line(tmp_path, case):
    text, line, words = BAD[case]
    with pytest.raises(InputError) as caught:
        consumers.load(write(tmp_path, text))
    assert caught.value.line == line, str(caught.value)
    assert words in str(caught.value)
    assert "\n" not in str(caught.value)


def test_anchors_can_share_field_lists(tmp_path):
    registry = consumers.load(write(tmp_path, "x-meter: &meter [meter_id, volume]\nconsumers:\n"
                                    "  - {name: a, contact: a@example.org, reads: [{schema: s, fields: *meter}]}\n"
                                    "  - {name: b, contact: b@example.org, reads: [{schema: s, fields: *meter}]}\n"))
    assert [[p.text for p in c.reads[0].fields] for c in registry.consumers] == [["meter_id", "volume"]] * 2


def test_merge_keys_share_whole_entries(tmp_path):
    registry = consumers.load(write(tmp_path, "x-base: &base {contact: a@example.org, reads: [{schema: s}]}\n"
                                    "consumers:\n  - <<: *base\n    name: a\n  - <<: *base\n    name: b\n"))
    assert [(c.name, c.contact) for c in registry.consumers] == [("a", "a@example.org"), ("b", "a@example.org")]


def test_an_error_names_the_entry(tmp_path):
    text = REGISTRY.replace("    team: Billing\n", "    teem: Billing\n")
    with pytest.raises(InputError, match=r"consumer 'billing': unknown key 'teem'"):
        consumers.load(write(tmp_path, text))


def test_object_tags_are_refused_before_anything_is_built(tmp_path, monkeypatch):
    # If construction ran, this would call the function; refusing at the node stage means it never does.
    called = []
    monkeypatch.setattr("os.getcwd", lambda: called.append(1) or "/")
    with pytest.raises(InputError):
        consumers.load(write(tmp_path, "consumers: !!python/object/apply:os.getcwd []\n"))
    assert not called


def test_cli_reports_a_bad_registry_with_status_2(tmp_path, capsys):
    bad = write(tmp_path, "consumers:\n  - name: a\n")
    old = write(tmp_path, "{}", "a.avsc")
    with pytest.raises(SystemExit) as exited:
        main(["check", str(old), str(old), "--consumers", str(bad)])
    assert exited.value.code == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "consumers.yaml:2:5: consumer 'a': missing 'contact'" in err


# --- impact ----------------------------------------------------------------------------

def test_a_change_at_a_parent_touches_readers_below_and_above(registry):
    found = consumers.impacts([comparison(finding("site", Compat.BACKWARD))], registry, "backward")
    # site.* and site.** both lie under site; billing reads neither.
    assert verdicts(found) == {"leak-detection": "informed", "billing": "unaffected",
                               "network-planning": "must-be-told", "data-archive": "must-be-told"}
    planning = found[2]
    assert planning.needs == "forward" and planning.reasons[0].breaks == ("forward",)


def test_a_change_below_a_read_field_touches_its_reader(registry):
    found = consumers.impacts([comparison(finding("site.district", Compat.FORWARD))], registry, "backward")
    assert verdicts(found)["leak-detection"] == "must-be-told"   # needs the run's mode: backward
    assert verdicts(found)["network-planning"] == "informed"     # needs forward, which holds
    assert verdicts(found)["billing"] == "unaffected"


def test_type_level_changes_touch_every_reader_of_the_type(registry):
    found = consumers.impacts([comparison(finding("", Compat.BREAKING))], registry, "backward")
    assert set(verdicts(found).values()) == {"must-be-told"}


def test_semantic_and_undecided_findings_are_told_whatever_the_needs(registry):
    found = consumers.impacts([comparison(finding("volume", Compat.BREAKING, semantic=True),
                                          finding("flow_rate", Compat.BREAKING, undecided=True))],
                              registry, "none")
    assert verdicts(found) == {"leak-detection": "must-be-told", "billing": "must-be-told",
                               "network-planning": "unaffected", "data-archive": "must-be-told"}
    assert found[1].reasons[0].semantic and found[0].reasons[0].undecided


def test_without_needs_a_consumer_relies_on_the_mode_of_each_pair(registry):
    # Configuration may set a mode per path; billing has no needs of its own.
    strict = replace(comparison(finding("volume", Compat.BACKWARD)), mode="full")
    found = consumers.impacts([strict], registry, "backward")
    assert verdicts(found)["billing"] == "must-be-told"
    assert found[1].reasons[0].breaks == ("forward",)
    loose = replace(strict, mode="none")
    assert verdicts(consumers.impacts([loose], registry, "backward"))["billing"] == "informed"


def test_full_needs_are_broken_by_either_direction(registry):
    found = consumers.impacts([comparison(finding("battery", Compat.BACKWARD))], registry, "backward")
    assert verdicts(found) == {"leak-detection": "unaffected", "billing": "unaffected",
                               "network-planning": "unaffected", "data-archive": "must-be-told"}
    assert found[3].reasons[0].breaks == ("forward",)


def test_other_types_in_the_file_are_not_read_by_name(registry):
    other = finding("volume", Compat.BREAKING, schema="utility.metering.Other")
    found = consumers.impacts([comparison(other)], registry, "backward")
    assert verdicts(found)["billing"] == "unaffected"
    assert verdicts(found)["data-archive"] == "must-be-told"  # reads the whole file by glob


def test_a_removed_file_touches_readers_of_its_types(registry):
    removed = finding("", Compat.BREAKING, schema="v1/meter_reading.avsc", rule="G001")
    found = consumers.impacts([comparison(removed, new="v2/meter_reading.avsc")], registry, "backward")
    assert set(verdicts(found).values()) == {"must-be-told"}


def test_a_renamed_type_touches_readers_of_the_old_name(registry):
    renamed = finding("", Compat.BREAKING, schema="utility.metering.MeterRecord")
    found = consumers.impacts([comparison(renamed)], registry, "backward")
    assert set(verdicts(found).values()) == {"must-be-told"}
    # A field-level finding in a type OLD does not have is not read by name.
    added = finding("volume", Compat.BREAKING, schema="utility.metering.MeterRecord")
    found = consumers.impacts([comparison(added)], registry, "backward")
    assert verdicts(found)["billing"] == "unaffected"


def test_stale_fields_are_reported(tmp_path):
    registry = consumers.load(write(tmp_path, REGISTRY.replace("[meter_id, volume]", "[meter_id, volum, 'site.geo']")))
    found = consumers.impacts([comparison()], registry, "backward")
    assert [(s.schema, s.field) for s in found[1].stale] == [(METER, "volum"), (METER, "site.geo")]
    assert not found[0].stale and not found[2].stale


def test_a_glob_field_is_stale_only_when_no_matched_file_has_it(tmp_path):
    registry = consumers.load(write(tmp_path, "consumers:\n  - {name: a, contact: a@example.org, "
                                    "reads: [{schema: '**/*.avsc', fields: [meter_id, period, nowhere]}]}\n"))
    billing = {"utility.billing.BillingPeriod": frozenset({"period", "consumption"})}
    found = consumers.impacts([comparison(), comparison(old="v1/b.avsc", new="v2/b.avsc", fields=billing)],
                              registry, "backward")
    assert [s.field for s in found[0].stale] == ["nowhere"]


def test_a_type_named_by_a_url_is_read_by_name(tmp_path):
    url = "https://example.org/schemas/service-notice.json"
    registry = consumers.load(write(tmp_path, f"consumers:\n  - {{name: a, contact: a@example.org, "
                                    f"reads: [{{schema: '{url}', fields: [starts]}}]}}\n"))
    notice = comparison(finding("starts", Compat.BACKWARD, schema=url), finding("ends", Compat.BREAKING, schema=url),
                        old="v1/notice.json", new="v2/notice.json", fields={url: frozenset({"starts", "ends"})})
    found = consumers.impacts([notice], registry, "backward")
    assert found[0].findings == (0,) and found[0].verdict == "informed" and not found[0].stale


def test_reads_that_match_nothing_are_listed(registry):
    found = consumers.impacts([comparison(old="a/leak_alert.json", new="b/leak_alert.json", fields={})],
                              registry, "backward")
    assert found[0].unmatched == (METER,)
    assert found[3].unmatched == ("**/*.avsc",)


def test_apply_fills_findings_consumers_and_the_json(registry, validate_report):
    report = Report(mode="backward", comparisons=[
        comparison(finding("volume", Compat.BACKWARD), finding("site.id", Compat.FORWARD))])
    consumers.apply(report, registry)
    assert [f.consumers for f in report.findings] == [("billing", "data-archive"),
                                                      ("leak-detection", "network-planning", "data-archive")]
    data = validate_report(report.to_json())
    told = {c["name"]: c["findings"] for c in data["consumers"] if c["notify"]}
    assert told == {"leak-detection": [1], "data-archive": [0, 1]}
    billing = next(c for c in data["consumers"] if c["name"] == "billing")
    assert billing["verdict"] == "informed" and billing["team"] == "Billing"
    assert billing["fields"] == [f"{METER}:volume"]


def test_stale_entries_become_report_warnings(tmp_path, validate_report):
    registry = consumers.load(write(tmp_path, REGISTRY.replace("[meter_id, volume]", "[meter_id, volum]")))
    report = consumers.apply(Report(mode="backward", comparisons=[comparison()]), registry)
    data = validate_report(report.to_json())
    assert data["warnings"] == [f"consumer 'billing' reads {METER} field 'volum', "
                                "which the OLD schema does not have (stale registry entry)"]
    assert data["consumers"][1]["stale"] == [{"schema": METER, "field": "volum"}]


def test_text_report_ends_with_who_must_be_told(registry):
    import io

    from linter.report import text

    report = Report(mode="backward", comparisons=[comparison(finding("site.id", Compat.FORWARD))])
    consumers.apply(report, registry)
    out = io.StringIO()
    text.render(report, out, color=False)
    tail = out.getvalue().split("Consumers to tell (2)")[1]
    assert "leak-detection <leaks@example.org>" in tail and "data-archive <archive@example.org>" in tail
    assert "Informed: network-planning" in tail and "Unaffected: billing" in tail


# --- properties of impact ---------------------------------------------------------------

from hypothesis import given, strategies as st  # noqa: E402

PATHS = st.lists(st.sampled_from(["site", "id", "district", "volume", "flow_rate"]), max_size=3).map(".".join)
COMPATS = st.sampled_from(list(Compat))


@given(st.lists(st.tuples(PATHS, COMPATS, st.booleans()), max_size=6),
       st.lists(PATHS.filter(bool), min_size=1, max_size=3))
def test_stricter_needs_are_told_at_least_as_often(found, fields):
    from linter.registry import Consumer, Read, Registry
    from linter.paths import parse

    read = Read(METER, tuple(parse(f) for f in fields))
    everything = Read(METER)
    registry = Registry("synthetic", tuple(
        [Consumer(f"{needs}-{n}", "x@example.org", (r,), needs=needs)
         for needs in ("backward", "forward", "full") for n, r in (("some", read), ("all", everything))]))
    comp = comparison(*(finding(p, c, semantic=s) for p, c, s in found))
    by = {i.consumer.name: i for i in consumers.impacts([comp], registry, "backward")}
    for n in ("some", "all"):
        full = {r.finding for r in by[f"full-{n}"].reasons}
        assert {r.finding for r in by[f"backward-{n}"].reasons} <= full
        assert {r.finding for r in by[f"forward-{n}"].reasons} <= full
    # Reading some of the fields never concerns more findings than reading all of them.
    assert set(by["full-some"].findings) <= set(by["full-all"].findings)
    # A reader of every field is concerned by every finding in its type.
    assert list(by["full-all"].findings) == list(range(len(found)))
    # A finding at a path on the branch of a field read concerns the reader.
    for i, (path, _, _) in enumerate(found):
        segs = path.split(".") if path else []
        on_branch = any(segs[:len(f.split("."))] == f.split(".")[:len(segs)] for f in fields)
        assert (i in by["full-some"].findings) == on_branch


def test_the_shipped_registry_schema_is_a_valid_schema_and_the_example_passes_it():
    import yaml
    from jsonschema import Draft202012Validator

    from linter.registry import SCHEMA

    schema = json.loads(SCHEMA.read_text())
    Draft202012Validator.check_schema(schema)
    example = Path(__file__).resolve().parent.parent / "schemas_example" / "consumers.yaml"
    errors = list(Draft202012Validator(schema).iter_errors(yaml.safe_load(example.read_text())))
    assert not errors, errors[0].message


def test_text_report_says_when_nobody_must_be_told(registry):
    import io

    from linter.report import text

    report = consumers.apply(Report(mode="backward", comparisons=[comparison(finding("volume"))]), registry)
    out = io.StringIO()
    text.render(report, out, color=False)
    assert out.getvalue().rstrip().endswith(
        "No consumer must be told\nInformed: billing, data-archive\nUnaffected: leak-detection, network-planning")
