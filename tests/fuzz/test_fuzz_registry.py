"""Fuzz: random YAML, and mutations of a valid registry, as a consumer registry.

The comparison itself is a pair of folders with one added Avro file: what is exercised is
the registry's loading, validation and matching.
"""
import yaml
from fuzz_seeds import token_edits
from harness import assert_handled, needs, run_main
from hypothesis import given
from hypothesis import strategies as st

pytestmark = [needs("linter.registry"), needs("linter.formats.avro")]

VALID = """\
consumers:
  - name: leak-detection
    contact: leaks@example.org
    needs: full
    reads:
      - schema: utility.metering.MeterReading
        fields: [flow_rate, pressure, "site.*", "readings.**"]
  - name: billing
    contact: billing@example.org
    reads:
      - schema: "*.avsc"
"""
WORDS = ["consumers", "name", "contact", "reads", "schema", "fields", "needs", "team", "channel",
         "backward", "forward", "full", "none", "*", "**", "site.*", "a..b", ".", "*.avsc", "[",
         "utility.metering.MeterReading", "leak-detection", "", " "]
YAML_TOKENS = [": ", "- ", "\n", "  ", "[", "]", "{", "}", ",", "&a ", "*a", "<<: *a", "!!python/object:os.system",
               "!!str ", "!custom ", "'", '"', "#", "---", "...", "? ", "|", ">", "%YAML 1.1", "\t", "\x00"]

data = st.recursive(st.none() | st.booleans() | st.integers() | st.sampled_from(WORDS) | st.text(max_size=8),
                    lambda kids: st.lists(kids, max_size=4) | st.dictionaries(st.sampled_from(WORDS), kids, max_size=5),
                    max_leaves=25)


def mutated_text():
    return token_edits(VALID, st.sampled_from(YAML_TOKENS + WORDS))


def judge(scratch, text):
    (scratch.root / "old").mkdir(exist_ok=True)
    (scratch.root / "new").mkdir(exist_ok=True)
    (scratch.root / "new" / "added.avsc").write_text('"int"')
    registry = scratch.file("consumers.yaml", text)
    status, out, err = run_main(["check", str(scratch.root / "old"), str(scratch.root / "new"),
                                 "--consumers", registry, "--output", "json"])
    assert_handled(status, out, err, text[:500])
    if status == 2:
        assert "consumers.yaml" in err
    return status


def test_valid_registry_is_read(scratch):
    assert judge(scratch, VALID) == 0


@given(data)
def test_random_yaml_data(scratch, doc):
    judge(scratch, yaml.safe_dump(doc) if doc is not None else "")


@given(st.fixed_dictionaries({"consumers": st.lists(data, max_size=3)}))
def test_random_consumer_entries(scratch, doc):
    judge(scratch, yaml.safe_dump(doc))


@given(mutated_text())
def test_mutated_registry_text(scratch, text):
    judge(scratch, text)


@given(st.text(max_size=200))
def test_random_text(scratch, text):
    judge(scratch, text)
