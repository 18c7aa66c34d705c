"""Fuzz: random JSON values and mutations of a valid schema, read as JSON Schema.

Remote and file references are in the vocabulary: the module-wide socket guard
(conftest.py) fails the run on any connection attempt.
"""
from fuzz_seeds import JSONSCHEMA_SEED, JSONSCHEMA_WORDS, dumps, json_values, mutated
from harness import assert_handled, needs, run_main
from hypothesis import given
from hypothesis import strategies as st

pytestmark = needs("linter.formats.jsonschema")

SEED = dumps(JSONSCHEMA_SEED)
modes = st.sampled_from(["backward", "forward", "full", "none"])


def judge(scratch, old, new, mode="backward", output="json"):
    a, b = scratch.pair(old, new, ".json")
    status, out, err = run_main(["check", a, b, "--mode", mode, "--output", output, "--format", "jsonschema"])
    assert_handled(status, out, err, f"{old[:400]!r} -> {new[:400]!r}")
    return status


def test_seed_is_valid(scratch):
    assert judge(scratch, SEED, SEED) == 0


@given(json_values(JSONSCHEMA_WORDS), st.booleans(), modes)
def test_random_json_as_jsonschema(scratch, doc, seed_first, mode):
    text = dumps(doc)
    old, new = (SEED, text) if seed_first else (text, SEED)
    judge(scratch, old, new, mode)


@given(mutated(JSONSCHEMA_SEED, JSONSCHEMA_WORDS), mutated(JSONSCHEMA_SEED, JSONSCHEMA_WORDS), modes,
       st.sampled_from(["json", "text"]))
def test_mutated_jsonschema(scratch, old, new, mode, output):
    judge(scratch, dumps(old), dumps(new), mode, output)
