"""NEW read beside OLD (linter/formats/avro.py ``load_beside``): records written the same
in both files share OLD's nodes. Sharing must never change what is reported."""
import json

import pytest
from hypothesis import given
from hypothesis import strategies as st

from linter.errors import InputError
from linter.formats import avro, avro_schema

from avro_strategies import evolution

NS = "utility.metering"


def write(tmp_path, name, data):
    path = tmp_path / name
    path.write_text(json.dumps(data, indent=2))
    return path


def pair(tmp_path, old, new):
    o = avro.load(write(tmp_path, "old.avsc", old), "old.avsc")
    n_alone = avro.load(write(tmp_path, "new.avsc", new), "new.avsc")
    n_beside = avro.load_beside(tmp_path / "new.avsc", "new.avsc", None, o)
    return o, n_alone, n_beside


def refusals(tmp_path, old, new):
    """The errors reading NEW alone and reading it beside OLD raise (both must raise)."""
    o = avro.load(write(tmp_path, "old.avsc", old), "old.avsc")
    path = write(tmp_path, "new.avsc", new)
    with pytest.raises(InputError) as alone:
        avro.load(path, "new.avsc")
    with pytest.raises(InputError) as beside:
        avro.load_beside(path, "new.avsc", None, o)
    return alone.value, beside.value


def facts(changes):
    return [(c.kind, c.schema, c.path, c.old, c.new, dict(c.facts)) for c in changes]


def channel(name, extra=()):
    return {"type": "record", "name": name, "fields": [
        {"name": "volume", "type": "long", "unit": "L"},
        {"name": "valve", "type": {"type": "enum", "name": f"{name}Valve", "symbols": ["OPEN", "SHUT"]}},
        *extra]}


def meter(*fields):
    return {"type": "record", "name": "MeterReading", "namespace": NS, "fields": list(fields)}


def test_an_unchanged_self_contained_record_is_shared(tmp_path):
    old = meter({"name": "a", "type": channel("ChannelA")}, {"name": "b", "type": channel("ChannelB")})
    new = meter({"name": "a", "type": channel("ChannelA")},
                {"name": "b", "type": channel("ChannelB", [{"name": "flag", "type": "int", "default": 0}])})
    o, alone, beside = pair(tmp_path, old, new)
    names_old, names_new = o.model.model.names, beside.model.model.names
    assert names_new[f"{NS}.ChannelA"] is names_old[f"{NS}.ChannelA"]
    assert names_new[f"{NS}.ChannelAValve"] is names_old[f"{NS}.ChannelAValve"]  # defined inside
    assert names_new[f"{NS}.ChannelB"] is not names_old[f"{NS}.ChannelB"]
    assert facts(avro.diff(o, beside)) == facts(avro.diff(o, alone))
    assert [c.path for c in avro.diff(o, beside)] == ["b.flag"]


def test_a_record_naming_a_type_defined_outside_it_is_read_again(tmp_path):
    # Inner's text is the same, but the type it names changed: a consumer of
    # inner.site.kind must hear of it under that path too.
    site_old = {"type": "enum", "name": "SiteKind", "symbols": ["WELL", "RESERVOIR"]}
    site_new = {"type": "enum", "name": "SiteKind", "symbols": ["WELL"]}
    inner = {"type": "record", "name": "Inner", "fields": [{"name": "kind", "type": "SiteKind"}]}
    old = meter({"name": "site", "type": site_old}, {"name": "inner", "type": inner})
    new = meter({"name": "site", "type": site_new}, {"name": "inner", "type": inner})
    o, alone, beside = pair(tmp_path, old, new)
    assert beside.model.model.names[f"{NS}.Inner"] is not o.model.model.names[f"{NS}.Inner"]
    changes = avro.diff(o, beside)
    assert facts(changes) == facts(avro.diff(o, alone))
    assert {c.path for c in changes} == {"site", "inner.kind"}


def test_a_name_clash_is_reported_where_it_is_as_without_sharing(tmp_path):
    deep = {"type": "record", "name": "Deep", "fields": [{"name": "depth_m", "type": "double"}]}
    holder = {"type": "record", "name": "Holder", "fields": [{"name": "deep", "type": deep}]}
    old = meter({"name": "holder", "type": holder})
    new = meter({"name": "first", "type": deep}, {"name": "holder", "type": holder})
    alone, beside = refusals(tmp_path, old, new)
    assert (beside.message, beside.line, beside.column) == (alone.message, alone.line, alone.column)
    assert "defined twice" in alone.message and alone.line is not None


def test_a_record_holding_an_ignored_logical_type_is_not_shared(tmp_path):
    # The gate takes ignored logical types out of NEW's own objects (avro._fastavro_gate).
    odd = {"type": "record", "name": "Odd", "fields": [
        {"name": "amount", "type": {"type": "bytes", "logicalType": "decimal", "precision": 2, "scale": 5}}]}
    old = meter({"name": "odd", "type": odd}, {"name": "n", "type": "int"})
    new = meter({"name": "odd", "type": odd}, {"name": "n", "type": "long"})
    o, alone, beside = pair(tmp_path, old, new)
    assert beside.model.model.names[f"{NS}.Odd"] is not o.model.model.names[f"{NS}.Odd"]
    assert facts(avro.diff(o, beside)) == facts(avro.diff(o, alone))


def _outcome(load):
    try:
        return load(), None
    except InputError as exc:
        return None, (exc.message, exc.line, exc.column)


# A default fastavro 1.13 refuses and our own walk accepts (an int for a double written
# as an object): only the gate rejects NEW then, and it must, shared records or not.
ONLY_FASTAVRO_REFUSES = {"name": "odd_default", "type": {"type": "double"}, "default": 0}


@given(evolution(logical=True), st.booleans())
def test_sharing_reports_what_reading_alone_reports(evo, gate_refuses):
    import tempfile
    from pathlib import Path

    old, new = evo
    # Each side also holds an unchanged record, so that something is always shared.
    old = dict(old, fields=old["fields"] + [{"name": "spare", "type": channel("Spare")}])
    new = dict(new, fields=new["fields"] + [{"name": "spare", "type": channel("Spare")}]
               + ([ONLY_FASTAVRO_REFUSES] if gate_refuses else []))
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        try:
            o = avro.load(write(tmp, "old.avsc", old), "old.avsc")
        except InputError:
            return
        path = write(tmp, "new.avsc", new)
        alone, alone_error = _outcome(lambda: avro.load(path, "new.avsc"))
        beside, beside_error = _outcome(lambda: avro.load_beside(path, "new.avsc", None, o))
        assert beside_error == alone_error
        if gate_refuses:
            assert alone_error is not None
        if alone_error:
            return
        assert beside.model.model.shared  # the spare channel at least
        a, b = avro.diff(o, alone), avro.diff(o, beside)
        assert facts(a) == facts(b)
        assert [c.old_loc for c in a] == [c.old_loc for c in b]
        assert [c.new_loc for c in a] == [c.new_loc for c in b]


def test_the_gate_refuses_new_beside_old_as_alone(tmp_path):
    # The shared channel is handed to fastavro as OLD's parse of it (avro._fastavro_gate);
    # what fastavro refuses elsewhere in NEW is refused as when NEW is read alone.
    old = meter({"name": "a", "type": channel("ChannelA")})
    new = meter({"name": "a", "type": channel("ChannelA")}, ONLY_FASTAVRO_REFUSES)
    alone, beside = refusals(tmp_path, old, new)
    assert beside.message == alone.message
    assert "not a valid Avro schema: Default value <0> must match schema type: double" in alone.message


def test_a_shared_record_is_named_for_the_gate_and_put_back(tmp_path, monkeypatch):
    import fastavro

    old = meter({"name": "a", "type": channel("ChannelA")}, {"name": "n", "type": "int"})
    new = meter({"name": "a", "type": channel("ChannelA")}, {"name": "n", "type": "long"},
                {"name": "again", "type": "ChannelA"})
    o = avro.load(write(tmp_path, "old.avsc", old), "old.avsc")
    seen = []
    real = fastavro.parse_schema
    monkeypatch.setattr(fastavro, "parse_schema",
                        lambda schema, *a, **k: (seen.append(json.loads(json.dumps(schema))), real(schema, *a, **k))[1])
    n = avro.load_beside(write(tmp_path, "new.avsc", new), "new.avsc", None, o)
    model = n.model.model
    assert list(model.shared.values()) == [f"{NS}.ChannelA"]
    assert model.shared_names == [f"{NS}.ChannelA", f"{NS}.ChannelAValve"]
    assert [(key, name) for _, key, _, name in model.sites] == [("type", f"{NS}.ChannelA")]
    # fastavro was handed the name in place of the record, then the record was put back.
    assert seen[-1]["fields"][0]["type"] == f"{NS}.ChannelA"
    assert n.model.model.root.raw == new
    assert set(n.model.gated) >= {f"{NS}.MeterReading", f"{NS}.ChannelA", f"{NS}.ChannelAValve"}


def test_shared_records_are_put_back_when_the_gate_refuses(tmp_path):
    old = meter({"name": "a", "type": channel("ChannelA")})
    new = meter({"name": "a", "type": channel("ChannelA")}, ONLY_FASTAVRO_REFUSES)
    o = avro.load(write(tmp_path, "old.avsc", old), "old.avsc")
    data = json.loads(json.dumps(new))
    model = avro_schema.parse(data, "new.avsc", lambda obj: None, o.model.model)
    assert model.sites
    with pytest.raises(InputError, match="not a valid Avro schema"):
        avro._fastavro_gate(data, model, "new.avsc", o.model)
    assert data == new


def test_a_file_written_as_old_shares_its_root_and_passes_the_gate(tmp_path):
    # The root record itself is shared: no container holds it, so the gate is handed
    # a copy that names it (avro._gate_copy) and the parse is left as read.
    old = meter({"name": "a", "type": channel("ChannelA")})
    o, alone, beside = pair(tmp_path, old, old)
    model = beside.model.model
    assert list(model.shared.values()) == [f"{NS}.MeterReading"] and not model.sites
    assert model.root is o.model.model.root and model.root.raw == old
    assert avro.diff(o, beside) == []


def test_a_shared_record_met_where_old_had_another_is_located_in_new(tmp_path):
    # NEW's "outlet" now names Site, shared with OLD; Site's fields are compared with
    # Valve's and located through their twins in NEW's own text.
    site = {"type": "record", "name": "Site", "fields": [{"name": "depth_m", "type": "double"}]}
    valve = {"type": "record", "name": "Valve", "fields": [{"name": "turns", "type": "int"}]}
    old = meter({"name": "inlet", "type": site}, {"name": "outlet", "type": valve})
    new = meter({"name": "inlet", "type": site}, {"name": "outlet", "type": "Site"})
    o, alone, beside = pair(tmp_path, old, new)
    assert beside.model.model.names[f"{NS}.Site"] is o.model.model.names[f"{NS}.Site"]
    a, b = avro.diff(o, alone), avro.diff(o, beside)
    assert facts(a) == facts(b)
    assert [c.new_loc for c in a] == [c.new_loc for c in b]
    added = [c for c in b if c.path == "outlet.depth_m"]
    assert added and added[0].new_loc.line is not None
