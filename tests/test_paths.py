"""The field-pattern matcher and file globs (linter/paths.py).

The properties are checked against an oracle built another way: a regular expression
per pattern, tried on every prefix of the path (the pattern names a parent) and with
every prefix of the pattern (the path is a parent of something the pattern names).
"""
import re

import pytest
from hypothesis import given, strategies as st

from linter.paths import PatternError, glob_matches, is_glob, parse, split

NAMES = st.sampled_from(["site", "id", "district", "volume", "flow_rate", "a", "b"])
PATHS = st.lists(NAMES, max_size=5).map(".".join)
SEGMENTS = st.one_of(NAMES, st.just("*"), st.just("**"))
PATTERNS = st.lists(SEGMENTS, min_size=1, max_size=5).map(".".join)


def oracle_regex(segments) -> re.Pattern:
    # Each segment of a path is written with a leading dot, so '**' can match none.
    body = "".join(r"(?:\.[^.]+)*" if s == "**" else r"\.[^.]+" if s == "*" else r"\." + re.escape(s)
                   for s in segments)
    return re.compile(body)


def dotted(segments) -> str:
    return "".join("." + s for s in segments)


def oracle_matches(pattern: str, path: str) -> bool:
    return bool(oracle_regex(pattern.split(".")).fullmatch(dotted(split(path))))


def oracle_overlaps(pattern: str, path: str) -> bool:
    segs, parts = pattern.split("."), split(path)
    inside = any(oracle_regex(segs).fullmatch(dotted(parts[:j])) for j in range(len(parts) + 1))
    parent = any(oracle_regex(segs[:k]).fullmatch(dotted(parts)) for k in range(len(segs) + 1))
    return inside or parent


@given(PATTERNS, PATHS)
def test_matches_agrees_with_the_oracle(pattern, path):
    assert parse(pattern).matches(path) == oracle_matches(pattern, path)


@given(PATTERNS, PATHS)
def test_overlaps_agrees_with_the_oracle(pattern, path):
    assert parse(pattern).overlaps(path) == oracle_overlaps(pattern, path)


@given(st.lists(NAMES, min_size=1, max_size=5), st.lists(NAMES, min_size=1, max_size=5))
def test_prefix_symmetry_of_literal_paths(a, b):
    # Two plain paths touch each other exactly when one is a prefix of the other, and the
    # relation is symmetric: a change at `a` touches a reader of `b` iff the reverse holds.
    a_text, b_text = ".".join(a), ".".join(b)
    expected = a[: len(b)] == b or b[: len(a)] == a
    assert parse(a_text).overlaps(b_text) == expected
    assert parse(b_text).overlaps(a_text) == expected


@given(st.lists(NAMES, min_size=1, max_size=4), PATHS)
def test_a_parent_change_touches_every_reader_below_it(reader, rest):
    # A change at any prefix of what a consumer reads touches it, down to the type itself.
    for k in range(len(reader) + 1):
        assert parse(".".join(reader)).overlaps(".".join(reader[:k]))
    # And a change anywhere below a field the consumer reads touches it too.
    below = ".".join(reader + list(split(rest)))
    assert parse(".".join(reader)).covers(below)


@given(st.lists(NAMES, max_size=3), NAMES, st.lists(NAMES, max_size=3))
def test_star_is_exactly_one_segment(head, middle, tail):
    pattern = ".".join(head + ["*"] + tail)
    assert parse(pattern).matches(".".join(head + [middle] + tail))
    assert not parse(pattern).matches(".".join(head + tail))
    assert not parse(pattern).matches(".".join(head + [middle, middle] + tail))


@given(st.lists(NAMES, max_size=3), st.lists(NAMES, max_size=4), st.lists(NAMES, max_size=3))
def test_double_star_is_any_depth_including_none(head, middle, tail):
    pattern = ".".join(head + ["**"] + tail)
    assert parse(pattern).matches(".".join(head + middle + tail))


def test_examples_from_the_registry_format():
    # DESIGN.md, "Consumer registry": site.* reads the fields of site.
    star = parse("site.*")
    assert star.matches("site.id") and not star.matches("site") and not star.matches("site.geo.lat")
    assert star.overlaps("site")            # a change to site itself
    assert star.overlaps("site.geo.lat")    # a change inside a field it reads
    assert not star.overlaps("meter_id")
    deep = parse("site.**")
    assert deep.matches("site") and deep.matches("site.geo.lat")
    assert parse("flow_rate").overlaps("")  # a type-level change touches every reader


@pytest.mark.parametrize("text", ["", " ", "site.", ".site", "site..id", "si*e", "***", "site. id", " site"])
def test_bad_patterns_are_refused(text):
    with pytest.raises(PatternError):
        parse(text)


def test_literal():
    assert parse("site.id").literal and not parse("site.*").literal


@pytest.mark.parametrize("glob,file,expected", [
    ("**/service_notice.json", "schemas_example/v1/service_notice.json", True),
    ("**/service_notice.json", "service_notice.json", True),
    ("*.avsc", "schemas_example/v1/meter_reading.avsc", True),
    ("v1/*.avsc", "/tmp/x/v1/meter_reading.avsc", True),
    ("v1/*.avsc", "/tmp/x/v2/meter_reading.avsc", False),
    ("*.avsc", "a/meter_reading.avsc.bak", False),
    ("meter_?eading.avsc", "meter_reading.avsc", True),
    ("[mb]*.avsc", "billing_period.avsc", True),
    ("[!mb]*.avsc", "billing_period.avsc", False),
    ("/abs/*.json", "/abs/x.json", True),
    ("/abs/*.json", "/other/abs/x.json", False),
    ("billing/**", "repo/billing/a/b.avsc", True),
])
def test_glob_matches(glob, file, expected):
    assert glob_matches(glob, file) is expected


def test_is_glob():
    assert is_glob("**/x.json") and is_glob("schemas/x.avsc")
    assert not is_glob("utility.metering.MeterReading")
