import pytest

from linter import catalogue
from linter.catalogue import CatalogueError, parse_files
from linter.model import Compat


def test_shipped_catalogue_loads_and_is_complete():
    cat = catalogue.load()
    assert len(cat) > 0
    for rule in cat:
        assert rule.why and rule.instead and rule.reference and rule.title
        assert rule.severity in ("error", "warning", "info")


def test_lookup_by_id_and_name():
    cat = catalogue.load()
    rule = cat.get("G001")
    assert rule is cat.get("g001") is cat.get("schema-file-removed")
    assert rule.compatibility is Compat.BREAKING


GOOD = '''
format = "x"
[[rule]]
id = "X001"
name = "thing-happened"
kind = "thing-happened"
title = "A thing happened"
backward = true
forward = false
severity = "error"
message = "{path} changed from {old} to {new}"
why = "because"
instead = "do not"
reference = "Some spec, section 1"
'''


def write(tmp_path, text, name="x.toml"):
    p = tmp_path / name
    p.write_text(text)
    return p


def test_parse_good(tmp_path):
    cat = parse_files([write(tmp_path, GOOD)])
    rule = cat.for_kind("thing-happened")
    assert rule.compatibility is Compat.BACKWARD
    assert rule.render({"path": "a.b", "old": 1, "new": 2}) == "a.b changed from 1 to 2"


@pytest.mark.parametrize("mutate,fragment", [
    (lambda t: t.replace('id = "X001"', 'id = "bad"'), "id"),
    (lambda t: t.replace('severity = "error"', 'severity = "fatal"'), "severity"),
    (lambda t: t.replace('why = "because"\n', ''), "why"),
    (lambda t: t.replace('forward = false\n', ''), "forward"),
    (lambda t: t + 'colour = "red"\n', "unknown keys"),
    (lambda t: t.replace("{path}", "{path.x}"), "plain names"),
    (lambda t: t.replace('backward = true', 'semantic = true\nbackward = true'), "semantic"),
])
def test_parse_rejects_malformed_entries(tmp_path, mutate, fragment):
    with pytest.raises(CatalogueError, match=fragment):
        parse_files([write(tmp_path, mutate(GOOD))])


def test_duplicate_ids_rejected(tmp_path):
    other = GOOD.replace('name = "thing-happened"', 'name = "other"').replace(
        'kind = "thing-happened"', 'kind = "other"')
    with pytest.raises(CatalogueError, match="already used"):
        parse_files([write(tmp_path, GOOD), write(tmp_path, other, "y.toml")])


def test_missing_placeholder_is_a_bug(tmp_path):
    rule = parse_files([write(tmp_path, GOOD)]).for_kind("thing-happened")
    with pytest.raises(CatalogueError, match="does not carry"):
        rule.render({"path": "a"})
