"""Cross-checks of the Avro adapter against the real codec (fastavro) and the spec resolver.

Three independent views of one schema change must agree:
- the differ's findings, through the catalogue's effects (what evolint reports);
- ``resolve(writer, reader)``, a direct reading of the Avro specification 1.12.0,
  "Schema Resolution" (linter/formats/avro_resolve.py);
- fastavro 1.13 writing data with one schema and reading it with the other.
Where fastavro is more lenient than the specification (docs/avro.md), evolint follows
the specification and these tests allow for the codec's leniency by name.
"""
import io
import json
import math

import pytest
from hypothesis import assume, event, given, note, settings
from hypothesis import strategies as st

from linter import catalogue
from linter.errors import InputError
from linter.formats import avro
from linter.formats.avro_resolve import resolve
from linter.model import Compat, meet_all

from avro_strategies import datum, evolution

CAT = catalogue.load()
# More examples than the suite's default: the evolutions are cheap (a few ms each).
MORE = settings(max_examples=max(150, settings().max_examples))


def load(tmp_path, name, data):
    path = tmp_path / name
    path.write_text(json.dumps(data))
    return avro.load(path, name)


def structural_verdict(changes) -> Compat:
    """The meet of the findings that are about reading, not meaning."""
    rules = [CAT.for_kind(c.kind) for c in changes]
    return meet_all(r.compatibility for r in rules if not r.semantic)


def spec_verdict(old, new) -> Compat:
    return Compat.of(not resolve(old, new), not resolve(new, old))


def roundtrip(writer_json, reader_json, value):
    from fastavro import parse_schema, schemaless_reader, schemaless_writer

    writer, reader = parse_schema(writer_json), parse_schema(reader_json)
    buf = io.BytesIO()
    schemaless_writer(buf, writer, value)
    buf.seek(0)
    return schemaless_reader(buf, writer, reader)


def kept(written, read, reader) -> bool:
    """Whether a value survived reading: exact, as the spec's promotion turns it, or,
    for an enum symbol the reader lacks, as the reader's default (A041/A043)."""
    if reader.kind == "union":
        return any(kept(written, read, b) for b in reader.branches)
    if reader.kind == "record":
        if not (isinstance(written, dict) and isinstance(read, dict)):
            return False
        # Fields the reader filled from defaults, or renamed ones, are not compared here.
        return all(kept(written[f.name], read[f.name], f.type) for f in reader.fields if f.name in written)
    if reader.kind == "enum":
        return read == written or (written not in reader.symbols and read == reader.enum_default)
    if reader.kind == "array":
        return (isinstance(read, list) and len(written) == len(read)
                and all(kept(a, b, reader.items) for a, b in zip(written, read)))
    if reader.kind == "map":
        return read.keys() == written.keys() and all(kept(written[k], read[k], reader.items) for k in read)
    if isinstance(written, bytes) and isinstance(read, str):
        return written == read.encode()
    if isinstance(written, str) and isinstance(read, bytes):
        return written.encode() == read
    if isinstance(written, bool) or isinstance(read, bool):
        return written == read
    if isinstance(written, (int, float)) and isinstance(read, (int, float)):
        # int/long read as float or double round to the target's precision.
        return read == written or math.isclose(read, written, rel_tol=2**-23)
    return written == read


@pytest.fixture(scope="module")
def tmp(tmp_path_factory):
    return tmp_path_factory.mktemp("avro-codec")


@MORE
@given(evolution(logical=True))
def test_findings_agree_with_the_spec_resolver(tmp, pair):
    old_json, new_json = pair
    old, new = load(tmp, "old.avsc", old_json), load(tmp, "new.avsc", new_json)
    changes = avro.diff(old, new)
    note(json.dumps(pair))
    note(repr([(c.kind, c.path) for c in changes]))
    got = structural_verdict(changes)
    want = spec_verdict(old.model.model.root, new.model.model.root)
    event(f"verdict {want.value}")
    assert got == want, (resolve(old.model.model.root, new.model.model.root),
                         resolve(new.model.model.root, old.model.model.root))


@MORE
@given(evolution(), st.data())
def test_fastavro_reads_what_the_resolver_allows_and_fails_on_the_rest(tmp, pair, data):
    """Both directions of each evolution: OLD writes and NEW reads, then the reverse."""
    old_json, new_json = pair
    nodes = {"old": load(tmp, "old.avsc", old_json).model.model.root,
             "new": load(tmp, "new.avsc", new_json).model.model.root}
    schemas = {"old": old_json, "new": new_json}
    for writer, reader in (("old", "new"), ("new", "old")):
        mismatches = resolve(nodes[writer], nodes[reader])
        if mismatches:
            _breaks(schemas[writer], schemas[reader], nodes[writer], nodes[reader], mismatches, data)
        else:
            _holds(schemas[writer], schemas[reader], nodes[writer], nodes[reader], data)


def _holds(writer_json, reader_json, writer, reader, data):
    for _ in range(3):
        value = data.draw(datum(writer))
        try:
            read = roundtrip(writer_json, reader_json, value)
        except UnicodeDecodeError:
            # fastavro fails on bytes that are not UTF-8 read as string (A024/A025
            # known_problems); the specification allows the promotion.
            event("holds: fastavro leniency, non-UTF-8 bytes as string")
            continue
        assert kept(value, read, reader), (value, read)
    event("holds: every datum read and kept")


def _breaks(writer_json, reader_json, writer, reader, mismatches, data):
    note("; ".join(map(str, mismatches)))
    failed = False
    for _ in range(20):
        value = data.draw(datum(writer))
        try:
            read = roundtrip(writer_json, reader_json, value)
        except Exception:  # noqa: BLE001 - any failure to read is what we look for
            failed = True
            break
        if not kept(value, read, reader):
            failed = True
            break
    event("breaks: failing datum found" if failed else "breaks: no failing datum in 20")
    if not failed:
        # Only where data can miss the mismatch: a union branch, an enum symbol, an
        # element of an empty array or map that random data did not produce.
        assert all(_data_dependent(m, writer) for m in mismatches), mismatches


def _data_dependent(mismatch, writer) -> bool:
    reason = mismatch.reason
    return "branch" in reason or "symbols" in reason or _under_container(writer, mismatch.path)


def _under_container(node, path):
    for part in path.split(".") if path else []:
        if node.kind in ("array", "map", "union"):
            return True
        f = node.field(part) if node.kind == "record" else None
        if f is None:
            return True
        node = f.type
    return node.kind in ("array", "map", "union")


# -- where fastavro and the specification part ways (measured on fastavro 1.13; docs/avro.md)
def _verdict(tmp, old_json, new_json):
    old, new = load(tmp, "old.avsc", old_json), load(tmp, "new.avsc", new_json)
    return {CAT.for_kind(c.kind).id for c in avro.diff(old, new)}, spec_verdict(old.model.model.root,
                                                                                new.model.model.root)


def test_decimal_scale_change_decodes_in_fastavro_but_does_not_match(tmp):
    import decimal

    old = {"type": "bytes", "logicalType": "decimal", "precision": 10, "scale": 2}
    new = dict(old, scale=3)
    # fastavro reads with the writer's scale: no error, the reader's scale is ignored.
    assert roundtrip(old, new, decimal.Decimal("12.34")) == decimal.Decimal("12.34")
    rules, spec = _verdict(tmp, old, new)
    assert rules == {"A071"} and spec is Compat.BREAKING  # Logical Types (decimal): no match


def test_timestamp_unit_change_is_invisible_to_fastavro(tmp):
    import datetime

    old = {"type": "long", "logicalType": "timestamp-millis"}
    new = {"type": "long", "logicalType": "timestamp-micros"}
    t = datetime.datetime(2026, 3, 1, 6, 30, 0, 125000, tzinfo=datetime.timezone.utc)
    assert roundtrip(old, new, t) == t  # converted with the writer's logical type
    rules, spec = _verdict(tmp, old, new)
    assert rules == {"A070"} and spec is Compat.FULL  # resolves, but the meaning changed


def test_long_above_2_53_rounds_when_read_as_double(tmp):
    value = 2**53 + 1
    assert roundtrip("long", "double", value) == float(value) != value
    rules, spec = _verdict(tmp, "long", "double")
    assert rules == {"A021"} and spec is Compat.BACKWARD  # the spec allows the promotion


def test_non_utf8_bytes_read_as_string_fail_in_fastavro(tmp):
    with pytest.raises(UnicodeDecodeError):
        roundtrip("bytes", "string", b"\xff\xfe")
    rules, spec = _verdict(tmp, "bytes", "string")
    assert rules == {"A025"} and spec is Compat.FULL  # the spec allows bytes <-> string


def test_relative_alias_in_another_namespace_matches_in_fastavro_only(tmp):
    old = {"type": "record", "name": "Site", "namespace": "utility.leaks", "fields": []}
    new = {"type": "record", "name": "Location", "namespace": "utility.places", "aliases": ["Site"],
           "fields": []}
    assert roundtrip(old, new, {}) == {}  # fastavro compares the alias's unqualified name
    rules, spec = _verdict(tmp, old, new)
    # Names: a relative alias is resolved in its type's namespace, utility.places.Site.
    assert rules == {"A031"} and spec is Compat.BREAKING


@pytest.mark.parametrize("schema", [
    {"type": "record", "name": "R", "fields": [{"name": "a", "type": "int"}, {"name": "a", "type": "int"}]},
    ["int", "int"],
])
def test_fastavro_parses_what_the_spec_forbids(tmp, schema):
    from fastavro import parse_schema

    parse_schema(schema)  # accepted by fastavro 1.13 ...
    with pytest.raises(InputError):
        load(tmp, "bad.avsc", schema)  # ... refused by evolint (Complex Types: records, unions)
