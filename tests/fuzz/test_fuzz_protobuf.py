"""Fuzz: random text and token-level mutations of a valid file, read as .proto.

protoc runs in-process and writes its diagnostics to file descriptor 2 itself: the
harness captures that descriptor too, so a stray protoc line fails the one-line rule.
"""
from fuzz_seeds import PROTO_SEED, proto_mutated
from harness import assert_handled, needs, run_main
from hypothesis import given
from hypothesis import strategies as st

pytestmark = needs("linter.formats.protobuf")


def judge(scratch, old, new):
    a, b = scratch.pair(old, new, ".proto")
    status, out, err = run_main(["check", a, b, "--output", "json"])
    assert_handled(status, out, err, f"{old[:300]!r} -> {new[:300]!r}")
    return status


def test_seed_is_valid(scratch):
    assert judge(scratch, PROTO_SEED, PROTO_SEED) == 0


@given(st.text(max_size=300))
def test_random_text_as_proto(scratch, text):
    judge(scratch, PROTO_SEED, text)


@given(proto_mutated(), st.booleans())
def test_mutated_proto(scratch, text, seed_first):
    old, new = (PROTO_SEED, text) if seed_first else (text, PROTO_SEED)
    judge(scratch, old, new)
