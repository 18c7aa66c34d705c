"""Fuzz: random text and token mutations of a valid configuration file (evolint.toml)."""
import json

from fuzz_seeds import token_edits
from harness import assert_handled, needs, run_main
from hypothesis import given
from hypothesis import strategies as st

pytestmark = [needs("linter.config"), needs("linter.formats.avro")]

VALID = """\
mode = "backward"
encodings = ["json"]
include = ["proto"]
schemas = ["**/*.avsc"]

[[by-path]]
files = "old/**"
mode = "full"

[severity]
A001 = "error"
schema-file-added = "warning"

[[waive]]
rule = "G001"
files = "gone.avsc"
reason = "the stream was switched off"
until = 2027-03-31

[[waive]]
rule = "meaning-changed"
fields = "utility.metering.MeterReading.pressure*"
reason = "reworded, not changed"
"""
TOKENS = ["=", "[", "]", "[[", "]]", "{", "}", ",", '"', "'", "\n", "#", "mode", "waive", "rule",
          "reason", "until", "files", "fields", "by-path", "severity", "consumers", "2027-13-45",
          "1979-05-27T07:32:00Z", "true", "-1", "1e400", "nan", "inf", '"""', "\\u0000", "none",
          "error", "sideways", "Z999", "**", "../../x", "\x00", "\t"]

AVRO = json.dumps({"type": "record", "name": "MeterReading", "namespace": "utility.metering",
                   "fields": [{"name": "volume", "type": "double"}]})


def mutated():
    return token_edits(VALID, st.sampled_from(TOKENS) | st.text(max_size=5))


def judge(scratch, text):
    a, b = scratch.pair(AVRO, AVRO, ".avsc")
    config = scratch.file("evolint.toml", text)
    status, out, err = run_main(["check", a, b, "--config", config, "--output", "json"])
    assert_handled(status, out, err, text[:500])
    if status == 2:
        assert "evolint.toml" in err, err
    return status


def test_valid_configuration_is_read(scratch):
    assert judge(scratch, VALID) in (0, 1)


@given(mutated())
def test_mutated_configuration(scratch, text):
    judge(scratch, text)


@given(st.text(max_size=200))
def test_random_text_as_configuration(scratch, text):
    judge(scratch, text)
