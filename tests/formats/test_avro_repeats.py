"""A record type used at several paths is walked once and its findings repeated under
each path (linter/formats/avro.py, ``_Differ.below``). Repeating must report exactly
what walking it again at every path reports."""
import json
import tempfile
from pathlib import Path

import pytest
from hypothesis import given

from linter.errors import InputError
from linter.formats import avro

from avro_strategies import evolution

NS = "utility.metering"


class _Forgetful(dict):
    def get(self, key, default=None):
        return None


def _walk_every_time(monkeypatch):
    init = avro._Differ.__init__

    def forgetful_init(self, *args):
        init(self, *args)
        self.below = _Forgetful()

    monkeypatch.setattr(avro._Differ, "__init__", forgetful_init)


def facts(changes):
    return [(c.kind, c.schema, c.path, c.old, c.new, c.old_loc, c.new_loc, dict(c.facts)) for c in changes]


def both_ways(tmp, old, new):
    paths = []
    for name, data in (("old.avsc", old), ("new.avsc", new)):
        paths.append(Path(tmp, name))
        paths[-1].write_text(json.dumps(data, indent=2))
    o, n = avro.load(paths[0], "old.avsc"), avro.load(paths[1], "new.avsc")
    once = avro.diff(o, n)
    with pytest.MonkeyPatch.context() as mp:
        _walk_every_time(mp)
        every = avro.diff(o, n)
    return once, every


def site(volume_type, extra=()):
    return {"type": "record", "name": "Site", "doc": "A pumping site.", "fields": [
        {"name": "volume", "type": volume_type, "unit": "L"}, *extra]}


def test_a_type_used_at_three_paths_reports_under_each(tmp_path):
    def meter(site_def):
        return {"type": "record", "name": "MeterReading", "namespace": NS, "fields": [
            {"name": "inlet", "type": site_def},
            {"name": "outlet", "type": "Site"},
            {"name": "spares", "type": {"type": "array", "items": "Site"}}]}

    old = meter(site("int", [{"name": "depth_m", "type": "double"}]))
    new = meter(dict(site("long"), doc="A pumping station."))
    once, every = both_ways(tmp_path, old, new)
    assert facts(once) == facts(every)
    paths = {c.path for c in once}
    assert {"inlet.volume", "outlet.volume", "spares.volume", "inlet.depth_m", "spares.depth_m"} <= paths


def test_recursive_types_report_as_when_walked_again(tmp_path):
    def chain(volume):
        return {"type": "record", "name": "Pipe", "namespace": NS, "fields": [
            {"name": "volume", "type": volume},
            {"name": "ends", "type": {"type": "array", "items": {"type": "record", "name": "Junction", "fields": [
                {"name": "pressure", "type": volume}, {"name": "pipes", "type": {"type": "array", "items": "Pipe"}}]}}},
            {"name": "next", "type": ["null", "Pipe"], "default": None}]}

    once, every = both_ways(tmp_path, chain("int"), chain("long"))
    assert facts(once) == facts(every)
    assert {c.path for c in once} >= {"volume", "ends.pressure"}


def test_a_chain_of_types_in_a_union_is_linear_and_complete(tmp_path):
    def links(n, last_type):
        types = [{"type": "record", "name": "Link0", "fields": [{"name": "volume", "type": last_type}]}]
        types += [{"type": "record", "name": f"Link{i}", "fields": [{"name": "next", "type": f"Link{i - 1}"}]}
                  for i in range(1, n)]
        return types

    once, every = both_ways(tmp_path, links(30, "int"), links(30, "long"))
    assert facts(once) == facts(every)
    # Link k reaches the change through k "next" fields: one finding per root.
    promoted = sorted(c.path for c in once if c.kind == "avro-type-promoted")
    assert promoted == sorted(".".join(["next"] * k + ["volume"]) for k in range(30))


@given(evolution())
def test_repeating_reports_what_walking_again_reports(evo):
    old, new = evo
    # The evolved record is used twice: once where it is defined, once by name.
    def holder(reading):
        return {"type": "record", "name": "Holder", "namespace": "utility.holder", "fields": [
            {"name": "first", "type": reading}, {"name": "second", "type": f"{reading['namespace']}.Reading"}]}

    with tempfile.TemporaryDirectory() as tmp:
        try:
            once, every = both_ways(tmp, holder(old), holder(new))
        except InputError:
            return
    assert facts(once) == facts(every)


def test_a_walk_cut_short_by_recursion_is_not_repeated_elsewhere(tmp_path):
    # Junction is first met inside Pipe, where the recursion guard stops at Pipe; met
    # again from the root, it must be walked in full (spare.pipes.volume is reported).
    def network(volume):
        pipe = {"type": "record", "name": "Pipe", "fields": [
            {"name": "volume", "type": volume},
            {"name": "ends", "type": {"type": "array", "items": {"type": "record", "name": "Junction", "fields": [
                {"name": "pressure", "type": volume}, {"name": "pipes", "type": {"type": "array", "items": "Pipe"}}]}}}]}
        return {"type": "record", "name": "Network", "namespace": NS, "fields": [
            {"name": "pipe", "type": pipe}, {"name": "spare", "type": "Junction"}]}

    once, every = both_ways(tmp_path, network("int"), network("long"))
    assert facts(once) == facts(every)
    assert "spare.pipes.volume" in {c.path for c in once}
