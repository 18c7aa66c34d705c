"""Fuzz: random JSON values and mutations of a valid schema, read as Avro.

The contract (DESIGN.md, CLI): a report with exit 0/1, or exit 2 with one line on stderr;
never a traceback, never exit 3.
"""
from fuzz_seeds import AVRO_SEED, AVRO_WORDS, dumps, json_values, mutated
from harness import assert_handled, needs, run_main
from hypothesis import given
from hypothesis import strategies as st

pytestmark = needs("linter.formats.avro")

SEED = dumps(AVRO_SEED)
modes = st.sampled_from(["backward", "forward", "full", "none"])
outputs = st.sampled_from(["json", "text"])


def judge(scratch, old, new, ext, mode, output):
    a, b = scratch.pair(old, new, ext)
    status, out, err = run_main(["check", a, b, "--mode", mode, "--output", output])
    assert_handled(status, out, err, f"{old[:400]!r} -> {new[:400]!r}")
    return status


def test_seed_is_valid(scratch):
    # Guards the fuzzing itself: the seed must get past the parser, or mutations test nothing.
    assert judge(scratch, SEED, SEED, ".avsc", "backward", "json") == 0


@given(json_values(AVRO_WORDS), st.booleans(), modes, outputs)
def test_random_json_as_avro(scratch, doc, seed_first, mode, output):
    text = dumps(doc)
    old, new = (SEED, text) if seed_first else (text, SEED)
    judge(scratch, old, new, ".avsc", mode, output)


@given(mutated(AVRO_SEED, AVRO_WORDS), st.booleans(), modes, outputs)
def test_mutated_avro(scratch, doc, seed_first, mode, output):
    text = dumps(doc)
    old, new = (SEED, text) if seed_first else (text, SEED)
    judge(scratch, old, new, ".avsc", mode, output)


@given(mutated(AVRO_SEED, AVRO_WORDS), mutated(AVRO_SEED, AVRO_WORDS))
def test_two_mutations_in_dot_json(scratch, old, new):
    # .json files are sniffed: Avro content goes to the Avro adapter.
    judge(scratch, dumps(old), dumps(new), ".json", "full", "json")


@given(st.binary(max_size=200) | st.text(max_size=200))
def test_random_bytes_as_avro(scratch, junk):
    judge(scratch, SEED, junk, ".avsc", "backward", "json")
