import pytest

from linter import catalogue
from linter.engine import Policy, Silence, UnknownChangeKind, judge
from linter.model import Change, Compat

CAT = catalogue.load()


def removed(path="a.avsc"):
    return Change("schema-file-removed", path, "", old=path, facts={"file": path})


def test_judge_stamps_rule_words():
    [f] = judge([removed()], CAT, Policy())
    assert f.rule == "G001"
    assert f.compatibility is Compat.BREAKING
    assert f.severity == "error"
    assert f.message == "schema file a.avsc was removed"
    assert f.reference


def test_unknown_kind_is_a_bug():
    with pytest.raises(UnknownChangeKind):
        judge([Change("no-such-kind", "s", "p")], CAT, Policy())


def test_mode_none_lowers_errors_to_info():
    [f] = judge([removed()], CAT, Policy(mode="none"))
    assert f.severity == "info"


def test_severity_override_and_silence():
    [f] = judge([removed()], CAT, Policy(severities={"G001": "warning"}))
    assert f.severity == "warning"
    assert judge([removed("x/a.avsc")], CAT, Policy(silences=(Silence("G001", "x/*", "moving"),))) == []
    assert len(judge([removed("y/a.avsc")], CAT, Policy(silences=(Silence("G001", "x/*", "moving"),)))) == 1
