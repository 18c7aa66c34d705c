"""Safety: lazy imports, size cap, no network, confinement to the repository, safe YAML,
deep and recursive schemas, and a read-only checkout left untouched.

Checks that need a format adapter are skipped until that adapter lands on this branch.
"""
from __future__ import annotations

import hashlib
import json
import os
import shutil
import stat
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest
from harness import assert_handled, landed, needs, no_network, run_main

from linter.formats import MAX_BYTES

ROOT = Path(__file__).resolve().parent.parent

AVRO_OLD = {"type": "record", "name": "MeterReading", "namespace": "utility.metering",
            "fields": [{"name": "meter_id", "type": "string"},
                       {"name": "volume", "type": "double", "unit": "L"}]}
AVRO_NEW = {**AVRO_OLD, "fields": AVRO_OLD["fields"] + [{"name": "battery", "type": "int", "default": 100}]}
JSONSCHEMA_OLD = {"$schema": "https://json-schema.org/draft/2020-12/schema",
                  "$id": "urn:utility:service-notice", "type": "object",
                  "properties": {"notice_id": {"type": "string"}}}
JSONSCHEMA_NEW = {**JSONSCHEMA_OLD, "properties": {"notice_id": {"type": "string"},
                                                   "duration": {"type": "number", "x-unit": "h"}}}
PROTO_OLD = 'syntax = "proto3";\npackage utility.telemetry;\nmessage PumpStatus {\n  string pump_id = 1;\n}\n'
PROTO_NEW = PROTO_OLD.replace("}", "  double pressure = 2; // @unit: bar\n}")

SAMPLES = {"avro": (".avsc", json.dumps(AVRO_OLD), json.dumps(AVRO_NEW)),
           "jsonschema": (".json", json.dumps(JSONSCHEMA_OLD), json.dumps(JSONSCHEMA_NEW)),
           "protobuf": (".proto", PROTO_OLD, PROTO_NEW)}
ADAPTER = {fmt: f"linter.formats.{fmt}" for fmt in SAMPLES}


def write_pair(folder: Path, fmt: str, old: str | None = None, new: str | None = None):
    ext, old_default, new_default = SAMPLES[fmt]
    for side, text in (("old", old or old_default), ("new", new or new_default)):
        (folder / side).mkdir(parents=True, exist_ok=True)
        (folder / side / f"schema{ext}").write_text(text)
    return str(folder / "old" / f"schema{ext}"), str(folder / "new" / f"schema{ext}")


def run_evolint(args, cwd=None, timeout=120, user=None):
    """The console entry point in a fresh interpreter (exit statuses as a user sees them)."""
    kwargs = {}
    if user is not None:
        kwargs.update(user=user[0], group=user[1], extra_groups=[])
    return subprocess.run([sys.executable, "-m", "linter", *args], capture_output=True, text=True,
                          cwd=cwd, timeout=timeout, **kwargs)


def check_options() -> set[str]:
    from linter.cli import check

    return {opt for param in check.params for opt in getattr(param, "opts", ())}


# --- lazy imports ------------------------------------------------------------------------

HEAVY = ("google.protobuf", "grpc_tools", "pint", "rich", "hypothesis", "jsonschema", "referencing")
PROBE = """
import json, sys
from linter import cli
try:
    cli.main(sys.argv[1:])
except SystemExit as exc:
    status = exc.code
print(json.dumps({"status": status, "loaded": sorted(m for m in %r if m in sys.modules)}))
""" % (HEAVY,)


def loaded_after(args) -> tuple[int, list[str]]:
    proc = subprocess.run([sys.executable, "-c", PROBE, *args], capture_output=True, text=True)
    assert proc.returncode == 0, proc.stderr
    data = json.loads(proc.stdout.strip().splitlines()[-1])
    return data["status"], data["loaded"]


@needs(ADAPTER["avro"])
def test_avro_check_with_json_output_imports_no_heavy_library(tmp_path):
    old, new = write_pair(tmp_path, "avro")
    status, loaded = loaded_after(["check", old, new, "--output", "json"])
    assert status == 0
    assert loaded == []


def test_rules_listing_imports_no_heavy_library():
    status, loaded = loaded_after(["rules", "--output", "json"])
    assert status == 0
    assert loaded == []


def test_the_probe_sees_a_heavy_import():
    # The probe above can fail: a run that does import one of them is seen.
    proc = subprocess.run([sys.executable, "-c", "import jsonschema\n" + PROBE, "--version"],
                          capture_output=True, text=True)
    assert "jsonschema" in json.loads(proc.stdout.strip().splitlines()[-1])["loaded"]


def test_lazy_catalogue_finds_every_kind_as_the_full_one_does():
    from linter.catalogue import LazyCatalogue, load, rules_dir

    full = load().full()
    lazy = LazyCatalogue(sorted(rules_dir().glob("*.toml")))
    for rule in full:
        assert lazy.for_kind(rule.kind) == rule
    assert lazy._full is None  # every kind was found in its own file, none by the fallback
    assert lazy.for_kind("no-such-kind") is None and lazy._full is not None


@needs(ADAPTER["avro"])
def test_avro_run_reads_only_the_rule_files_it_needs(tmp_path):
    old, new = write_pair(tmp_path, "avro")
    probe = ("import json, sys\nfrom linter import catalogue, cli\ntry:\n    cli.main(sys.argv[1:])\n"
             "except SystemExit:\n    pass\ncat = catalogue.load()\n"
             "print(json.dumps({'parts': sorted(cat._parts), 'full': cat._full is not None}))")
    proc = subprocess.run([sys.executable, "-c", probe, "check", old, new, "--output", "json"],
                          capture_output=True, text=True)
    data = json.loads(proc.stdout.strip().splitlines()[-1])
    assert data["full"] is False
    assert set(data["parts"]) <= {"avro", "general", "semantic"}


# --- size cap ----------------------------------------------------------------------------

@pytest.mark.parametrize("fmt", SAMPLES)
def test_oversized_file_is_refused_in_one_line(tmp_path, fmt):
    if not landed(ADAPTER[fmt]) and fmt != "jsonschema":
        pytest.skip(f"{ADAPTER[fmt]} has not landed")
    old, new = write_pair(tmp_path, fmt)
    with open(new, "r+b") as f:  # sparse: costs no disk, and the cap is checked before reading
        f.truncate(MAX_BYTES + 1)
    status, out, err = run_main(["check", old, new, "--output", "json"])
    assert status == 2, err
    assert_handled(status, out, err)
    assert new in err and str(MAX_BYTES) in err


def test_size_cap_follows_the_constant(tmp_path, monkeypatch):
    import linter.formats

    path = tmp_path / "big.json"
    path.write_text(json.dumps(JSONSCHEMA_OLD))
    monkeypatch.setattr(linter.formats, "MAX_BYTES", 10)
    status, out, err = run_main(["check", str(path), str(path)])
    assert status == 2 and "over 10 bytes" in err


# --- no network --------------------------------------------------------------------------

def test_network_guard_catches_a_connection():
    import socket
    import urllib.request

    with no_network() as attempts:
        with pytest.raises(OSError):
            urllib.request.urlopen("http://192.0.2.1/", timeout=1)
        with pytest.raises(OSError):
            socket.create_connection(("192.0.2.1", 80), timeout=1)
    assert len(attempts) >= 2


REMOTE = [
    ("jsonschema", {**JSONSCHEMA_OLD, "properties": {"a": {"$ref": "https://example.invalid/remote.json"}}}),
    ("jsonschema", {**JSONSCHEMA_OLD, "properties": {"a": {"$ref": "http://192.0.2.1/x.json#/a"}}}),
    ("jsonschema", {**JSONSCHEMA_OLD, "$schema": "https://example.invalid/my-meta-schema"}),
    ("jsonschema", {**JSONSCHEMA_OLD, "$id": "https://example.invalid/notice.json",
                    "properties": {"a": {"$ref": "other.json"}}}),
    ("protobuf", 'syntax = "proto3";\nimport "http://example.invalid/x.proto";\nmessage A {}\n'),
]


@pytest.mark.parametrize("fmt, doc", REMOTE, ids=[f"{f}-{i}" for i, (f, _) in enumerate(REMOTE)])
def test_remote_references_are_never_fetched(tmp_path, fmt, doc):
    if not landed(ADAPTER[fmt]):
        pytest.skip(f"{ADAPTER[fmt]} has not landed")
    text = doc if isinstance(doc, str) else json.dumps(doc)
    old, new = write_pair(tmp_path, fmt, new=text)
    with no_network() as attempts:
        status, out, err = run_main(["check", old, new, "--output", "json"])
    assert attempts == []
    assert_handled(status, out, err)


# --- confinement to the repository -------------------------------------------------------

def _escape_tree(tmp_path: Path, fmt: str) -> tuple[Path, str, str]:
    """A git repository holding old/new schemas that reference ../../outside, which exists."""
    repo = tmp_path / "repo"
    (repo / "schemas").mkdir(parents=True)
    subprocess.run(["git", "init", "-q", str(repo)], check=True)
    if fmt == "jsonschema":
        (tmp_path / "outside.json").write_text(json.dumps({"type": "string"}))
        new = {**JSONSCHEMA_OLD, "properties": {"a": {"$ref": "../../outside.json"}}}
        old, new = write_pair(repo / "schemas", fmt, new=json.dumps(new))
    else:
        (tmp_path / "outside.proto").write_text('syntax = "proto3";\nmessage Outside {}\n')
        new = 'syntax = "proto3";\nimport "../../outside.proto";\nmessage A { Outside o = 1; }\n'
        old, new = write_pair(repo / "schemas", fmt, new=new)
    return repo, old, new


@pytest.mark.parametrize("fmt", ["jsonschema", "protobuf"])
def test_reference_escaping_the_repository_is_refused(tmp_path, fmt, monkeypatch):
    if not landed(ADAPTER[fmt]):
        pytest.skip(f"{ADAPTER[fmt]} has not landed")
    repo, old, new = _escape_tree(tmp_path, fmt)
    monkeypatch.chdir(repo)
    status, out, err = run_main(["check", old, new, "--output", "json"])
    assert status == 2, out or err
    assert_handled(status, out, err)
    assert "outside" in err


# --- YAML and TOML inputs ----------------------------------------------------------------

UNSAFE_YAML = "consumers: !!python/object/apply:os.system ['touch {marker}']\n"


def test_consumer_registry_is_loaded_safely(tmp_path):
    if "--consumers" not in check_options():
        pytest.skip("--consumers has not landed")
    marker = tmp_path / "executed"
    registry = tmp_path / "consumers.yaml"
    registry.write_text(UNSAFE_YAML.format(marker=marker))
    (tmp_path / "old").mkdir()
    (tmp_path / "new").mkdir()
    (tmp_path / "new" / "added.avsc").write_text('"int"')  # a file added: no adapter needed
    status, out, err = run_main(["check", str(tmp_path / "old"), str(tmp_path / "new"),
                                 "--consumers", str(registry)])
    assert not marker.exists()
    assert status == 2 and str(registry) in err
    assert_handled(status, out, err)


# --- deep nesting and recursive types ----------------------------------------------------

# Deep documents are written as text: json.dumps itself recurses per level.

def avro_nested_records(depth: int) -> str:
    head = "".join(f'{{"name": "level_{i}", "type": {{"type": "record", "name": "Level{i}", "fields": ['
                   for i in range(depth))
    core = '{"name": "volume", "type": "double"}'
    return f'{{"type": "record", "name": "MeterReading", "fields": [{head}{core}{"]}}" * depth}]}}'


def avro_nested_arrays(depth: int) -> str:
    node = '{"type": "array", "items": ' * depth + '"double"' + "}" * depth
    return f'{{"type": "record", "name": "MeterReading", "fields": [{{"name": "v", "type": {node}}}]}}'


def avro_chain(depth: int) -> str:
    """Flat text, deep types: record k holds a field of record k-1, defined just before it."""
    types = [{"type": "record", "name": "Link0", "fields": [{"name": "volume", "type": "double"}]}]
    for i in range(1, depth):
        types.append({"type": "record", "name": f"Link{i}", "fields": [{"name": "next", "type": f"Link{i - 1}"}]})
    return json.dumps(types)


def jsonschema_nested(depth: int) -> str:
    head = "".join(f'{{"type": "object", "properties": {{"level_{i}": ' for i in range(depth))
    node = head + '{"type": "number"}' + "}}" * depth
    return ('{"$schema": "https://json-schema.org/draft/2020-12/schema", "$id": "urn:utility:service-notice",'
            f' "type": "object", "properties": {{"root": {node}}}}}')


def jsonschema_chain(depth: int) -> str:
    defs = {f"d{i}": {"type": "object", "properties": {"next": {"$ref": f"#/$defs/d{i + 1}"}}}
            for i in range(depth)}
    defs[f"d{depth}"] = {"type": "number"}
    return json.dumps({**JSONSCHEMA_OLD, "properties": {"root": {"$ref": "#/$defs/d0"}}, "$defs": defs})


def proto_nested(depth: int) -> str:
    body = "double volume = 1;"
    for i in range(depth):
        body = f"message Level{i} {{ {body} }} Level{i} level_{i} = 1;"
    return f'syntax = "proto3";\nmessage PumpStatus {{ {body} }}\n'


def proto_chain(depth: int) -> str:
    lines = ['syntax = "proto3";', "message Link0 { double volume = 1; }"]
    lines += [f"message Link{i} {{ Link{i - 1} next = 1; }}" for i in range(1, depth)]
    return "\n".join(lines) + "\n"


DEEP = {"avro-records": ("avro", avro_nested_records), "avro-arrays": ("avro", avro_nested_arrays),
        "avro-chain": ("avro", avro_chain), "jsonschema-objects": ("jsonschema", jsonschema_nested),
        "jsonschema-ref-chain": ("jsonschema", jsonschema_chain),
        "protobuf-nested": ("protobuf", proto_nested), "protobuf-chain": ("protobuf", proto_chain)}


TEXT_NESTING = ("avro-records", "avro-arrays", "jsonschema-objects", "protobuf-nested")
CHAINS = ("avro-chain", "jsonschema-ref-chain", "protobuf-chain")
ORDINARY = {"protobuf-nested": 20}  # protoc itself refuses messages nested past 32 levels


def _run_deep(tmp_path, shape, depth, timeout):
    fmt, make = DEEP[shape]
    if not landed(ADAPTER[fmt]):
        pytest.skip(f"{ADAPTER[fmt]} has not landed")
    old, new = write_pair(tmp_path, fmt, old=make(depth), new=make(depth + 1))
    proc = run_evolint(["check", old, new, "--output", "json"], timeout=timeout)
    assert_handled(proc.returncode, proc.stdout, proc.stderr, shape)
    return proc


@pytest.mark.parametrize("shape", TEXT_NESTING)
def test_ordinary_nesting_is_read(tmp_path, shape):
    proc = _run_deep(tmp_path, shape, ORDINARY.get(shape, 50), timeout=60)
    assert proc.returncode in (0, 1), proc.stderr


@pytest.mark.parametrize("depth", [900, 10_000])  # 900: below the JSON parser's own limit
@pytest.mark.parametrize("shape", TEXT_NESTING)
def test_absurd_nesting_is_read_or_refused_in_one_line(tmp_path, shape, depth):
    _run_deep(tmp_path, shape, depth, timeout=60)


@pytest.mark.parametrize("shape", CHAINS)
def test_a_chain_of_100_types_is_read(tmp_path, shape):
    proc = _run_deep(tmp_path, shape, 100, timeout=60)
    assert proc.returncode in (0, 1), proc.stderr


# Every type of such a chain is a root; the adapters list a root's field paths, and the
# roots that reach a type, only when asked (listing them all up front was quadratic:
# 500 types took 20 s in Avro; 2,000 types 22 s in Protobuf).
@pytest.mark.slow
@pytest.mark.parametrize("shape", CHAINS)
def test_a_chain_of_10000_types_is_read_or_refused_in_one_line(tmp_path, shape):
    _run_deep(tmp_path, shape, 10_000, timeout=120)


def test_recursion_limit_is_refused_in_one_line(monkeypatch):
    import linter.api

    def bottomless(*_args, **_kwargs):
        raise RecursionError("maximum recursion depth exceeded")

    monkeypatch.setattr(linter.api, "check", bottomless)
    status, out, err = run_main(["check", "a.avsc", "b.avsc"])
    assert status == 2
    assert_handled(status, out, err)
    assert "too deeply" in err


RECURSIVE = {
    "avro-linked-list": ("avro",
                         {"type": "record", "name": "Node", "fields": [
                             {"name": "volume", "type": "double"},
                             {"name": "next", "type": ["null", "Node"], "default": None}]}),
    "avro-mutual": ("avro",
                    {"type": "record", "name": "Pipe", "fields": [
                        {"name": "ends", "type": {"type": "array", "items": {
                            "type": "record", "name": "Junction", "fields": [
                                {"name": "pipes", "type": {"type": "array", "items": "Pipe"}}]}}}]}),
    "jsonschema-root-ref": ("jsonschema", {**JSONSCHEMA_OLD, "properties": {
        "notice_id": {"type": "string"}, "follow_up": {"$ref": "#"}}}),
    "jsonschema-cycle": ("jsonschema", {**JSONSCHEMA_OLD, "properties": {"a": {"$ref": "#/$defs/a"}},
                                        "$defs": {"a": {"$ref": "#/$defs/b"}, "b": {"$ref": "#/$defs/a"}}}),
    "jsonschema-self": ("jsonschema", {**JSONSCHEMA_OLD, "properties": {"a": {"$ref": "#/$defs/a"}},
                                       "$defs": {"a": {"$ref": "#/$defs/a"}}}),
    "jsonschema-tree": ("jsonschema", {**JSONSCHEMA_OLD, "properties": {"zone": {"$ref": "#/$defs/zone"}},
                                       "$defs": {"zone": {"type": "object", "properties": {
                                           "children": {"type": "array", "items": {"$ref": "#/$defs/zone"}},
                                           "parent": {"$ref": "#/$defs/zone"}}}}}),
    "protobuf-self": ("protobuf", 'syntax = "proto3";\nmessage Node {\n  Node next = 1;\n'
                                  '  repeated Node kids = 2;\n  double volume = 3;\n}\n'),
    "protobuf-mutual": ("protobuf", 'syntax = "proto3";\nmessage Pipe { repeated Junction ends = 1; }\n'
                                    'message Junction { repeated Pipe pipes = 1; }\n'),
}


def _grown(fmt: str, doc):
    """The recursive schema with one more field, so the differ has to walk the cycle."""
    if fmt == "protobuf":
        return doc.replace("{\n", "{\n  int32 added = 99;\n", 1).replace("{ ", "{ int32 added = 99; ", 1)
    grown = json.loads(json.dumps(doc))
    if fmt == "avro":
        grown["fields"].append({"name": "added", "type": "int", "default": 0})
    else:
        grown["properties"]["added"] = {"type": "integer"}
    return json.dumps(grown)


@pytest.mark.parametrize("case", RECURSIVE)
def test_recursive_types_and_ref_cycles_terminate(tmp_path, case):
    fmt, doc = RECURSIVE[case]
    if not landed(ADAPTER[fmt]):
        pytest.skip(f"{ADAPTER[fmt]} has not landed")
    text = doc if isinstance(doc, str) else json.dumps(doc)
    old, new = write_pair(tmp_path, fmt, old=text, new=_grown(fmt, doc))
    proc = run_evolint(["check", old, new, "--output", "json"], timeout=60)
    assert_handled(proc.returncode, proc.stdout, proc.stderr, case)
    if not case.endswith(("-cycle", "-self")):  # a pure $ref cycle may fairly be refused
        assert proc.returncode in (0, 1), proc.stderr


# --- a read-only checkout is never written to ------------------------------------------

def snapshot(tree: Path) -> dict[str, str]:
    out = {}
    for path in sorted(tree.rglob("*")):
        rel = path.relative_to(tree).as_posix()
        if path.is_file():
            out[rel] = hashlib.sha256(path.read_bytes()).hexdigest() + f" {path.stat().st_mtime_ns}"
        else:
            out[rel] = "dir"
    return out


def _unprivileged_user():
    """Root ignores file modes: drop to 'nobody' when it can read the installed code."""
    if os.geteuid() != 0:
        return None
    import pwd

    try:
        entry = pwd.getpwnam("nobody")
    except KeyError:
        return None
    user = (entry.pw_uid, entry.pw_gid)
    try:
        probe = subprocess.run([sys.executable, "-c", "import linter.cli"], user=user[0], group=user[1],
                               extra_groups=[], capture_output=True, cwd="/")
    except OSError:  # the interpreter itself is out of its reach: the snapshot still decides
        return None
    return user if probe.returncode == 0 else None


@pytest.fixture
def readonly_tree():
    top = Path(tempfile.mkdtemp(prefix="evolint-ro-"))
    tree = top / "checkout"
    example = ROOT / "schemas_example"
    if example.is_dir():
        shutil.copytree(example, tree)
    else:
        tree.mkdir()
    for fmt in SAMPLES:
        if landed(ADAPTER[fmt]):
            write_pair(tree / "generated", fmt)  # generated/{old,new}/schema.<ext>
    for path in [top, *tree.rglob("*"), tree]:
        mode = path.stat().st_mode
        path.chmod((mode | stat.S_IRUSR | stat.S_IRGRP | stat.S_IROTH | (stat.S_IXOTH if path.is_dir() else 0))
                   & ~(stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH))
    top.chmod(0o755)
    yield tree
    for path in [tree, *tree.rglob("*")]:
        path.chmod(path.stat().st_mode | stat.S_IWUSR)
    shutil.rmtree(top)


def test_read_only_checkout_is_left_untouched(readonly_tree):
    tree = readonly_tree
    before = snapshot(tree)
    user = _unprivileged_user()
    commands = [["--version"], ["rules"]]
    from linter.catalogue import load

    commands.append(["rules", next(iter(load())).id])
    if (tree / "generated").is_dir():
        for fmt in SAMPLES:
            ext = SAMPLES[fmt][0]
            if (tree / "generated" / "old" / f"schema{ext}").exists():
                commands.append(["check", f"generated/old/schema{ext}", f"generated/new/schema{ext}",
                                 "--output", "json"])
        commands.append(["check", "generated/old", "generated/new"])  # text output
    if (tree / "v1").is_dir():
        commands.append(["check", "v1", "v2", "--output", "json"])
        if (tree / "consumers.yaml").exists() and "--consumers" in check_options():
            commands.append(["check", "v1", "v2", "--consumers", "consumers.yaml"])
            commands.append(["announce", "v1", "v2", "--consumers", "consumers.yaml"])
    for args in commands:
        proc = run_evolint(args, cwd=tree, user=user)
        assert proc.returncode in (0, 1), f"{args}: {proc.stderr}"
        assert "Traceback" not in proc.stderr
    after = snapshot(tree)
    assert after == before
    assert not [p for p in after if "__pycache__" in p or p.endswith((".pyc", ".tmp", ".pb"))]


# --- format detection on any JSON value --------------------------------------------------

@pytest.mark.parametrize("doc", [{"type": []}, {"type": {"a": 1}, "name": "x"}, [{"type": ["record"]}],
                                 {"type": None}, [], "record", 12])
def test_format_detection_takes_any_json_value(doc):
    # Found by the fuzz suite: {"type": []} in a .json file raised TypeError (unhashable list).
    from linter.formats import looks_like_avro

    assert looks_like_avro(doc) is False


# --- assumptions the speed fixes rest on -------------------------------------------------

@needs(ADAPTER["avro"])
def test_fastavro_leaves_its_input_unchanged():
    # The Avro adapter hands fastavro its own parsed document without a defensive copy.
    import copy

    import fastavro

    docs = [json.loads(p.read_text()) for p in sorted(ROOT.glob("tests/cases/avro/*/*.avsc"))]
    docs += [json.loads(p.read_text()) for p in sorted(ROOT.glob("schemas_example/*/*.avsc"))]
    assert len(docs) > 20
    for doc in docs:
        before = copy.deepcopy(doc)
        try:
            fastavro.parse_schema(doc, _write_hint=False)
        except Exception:  # noqa: BLE001 - invalid cases are part of the sample
            pass
        assert doc == before


@needs(ADAPTER["avro"])
def test_field_pairing_by_name_then_aliases_in_old_order():
    from linter.formats.avro import _pair_fields
    from linter.formats.avro_schema import Field, Node

    def rec(*fields):
        node = Node(kind="record")
        node.fields = [Field(name=n, type=Node(kind="int"), position=i, aliases=tuple(a))
                       for i, (n, a) in enumerate(fields)]
        return node

    old = rec(("a", []), ("b", []), ("c", ["z"]), ("d", []))
    new = rec(("x", ["d", "b"]), ("a", []), ("z", []), ("e", []))
    pairs, old_left, new_left = _pair_fields(old, new)
    assert [(o.name, n.name) for o, n in pairs] == [("a", "a"), ("b", "x"), ("c", "z")]
    assert [f.name for f in old_left] == ["d"] and [f.name for f in new_left] == ["e"]
    assert old.field("c").name == "c" and old.field("nope") is None


def test_sourcemap_tokens_match_the_plain_string_pattern():
    # The unrolled string pattern in linter/sourcemap.py must split JSON text exactly as
    # the plain one does; random JSON with quotes, escapes and brackets inside strings.
    import re

    from hypothesis import given
    from hypothesis import strategies as st

    from linter.sourcemap import _TOKENS

    plain = re.compile(r'"(?:[^"\\]|\\.)*"|[{\[]')
    text = st.text(alphabet='ab"\\[]{}\n\u00e9', max_size=10)
    docs = st.recursive(text | st.integers(), lambda kids: st.lists(kids, max_size=4)
                        | st.dictionaries(text, kids, max_size=4), max_leaves=20)

    @given(docs, st.booleans())
    def same(doc, ascii_only):
        dumped = json.dumps(doc, ensure_ascii=ascii_only)
        assert [m.span() for m in _TOKENS.finditer(dumped)] == [m.span() for m in plain.finditer(dumped)]

    same()
