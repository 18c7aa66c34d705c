"""git.py helpers and `check --base/--staged`, on real temporary repositories."""
import json

import pytest

from gitrepo import Repo, leak_alert, meter_reading
from linter import git, revision
from linter.cli import main
from linter.errors import InputError


@pytest.fixture
def repo(tmp_path):
    r = Repo(tmp_path / "utility")
    r.write("schemas/meter_reading.avsc", meter_reading())
    r.write("schemas/leak_alert.avsc", leak_alert())
    r.write("README.txt", "schemas of the water utility\n")
    r.commit("first schemas")
    return r


def run_cli(args, capsys, cwd, monkeypatch):
    monkeypatch.chdir(cwd)
    with pytest.raises(SystemExit) as exit_:
        main(args)
    out = capsys.readouterr()
    return exit_.value.code, out.out, out.err


def test_changes_reports_modified_added_deleted_and_renamed(repo):
    repo.write("schemas/meter_reading.avsc", meter_reading("m3"))
    repo.write("schemas/billing_period.avsc", {"type": "record", "name": "BillingPeriod", "fields": []})
    repo.git("add", "schemas/billing_period.avsc")
    repo.git("mv", "schemas/leak_alert.avsc", "schemas/leaks.avsc")
    repo.git("rm", "-q", "README.txt")
    got = {(c.status, c.old, c.new) for c in git.changes("HEAD", repo.path)}
    assert got == {("M", "schemas/meter_reading.avsc", "schemas/meter_reading.avsc"),
                   ("A", None, "schemas/billing_period.avsc"),
                   ("R", "schemas/leak_alert.avsc", "schemas/leaks.avsc"),
                   ("D", "README.txt", None)}
    staged = {(c.status, c.old, c.new) for c in git.changes("HEAD", repo.path, staged=True)}
    # the unstaged edit of meter_reading.avsc is not in the index
    assert ("M", "schemas/meter_reading.avsc", "schemas/meter_reading.avsc") not in staged
    assert ("R", "schemas/leak_alert.avsc", "schemas/leaks.avsc") in staged


def test_read_blobs_returns_exact_bytes_through_one_batch(repo):
    tree = git.tree_files("HEAD", repo.path)
    blobs = dict(git.read_blobs(tree.values(), repo.path))
    for path, oid in tree.items():
        assert blobs[oid] == (repo.path / path).read_bytes()
    assert git.show("HEAD", "README.txt", repo.path) == b"schemas of the water utility\n"


def test_log_commits_follows_a_rename_oldest_first(repo):
    first = repo.git("rev-parse", "HEAD").strip()
    repo.git("mv", "schemas/leak_alert.avsc", "schemas/leaks.avsc")
    second = repo.commit("rename")
    assert git.log_commits("schemas/leaks.avsc", repo.path) == [
        (first, "schemas/leak_alert.avsc"), (second, "schemas/leaks.avsc")]


def test_unknown_ref_is_an_input_error(repo):
    with pytest.raises(InputError, match="not a commit"):
        revision.check("no-such-branch", cwd=repo.path)


def test_outside_a_repository_is_an_input_error(tmp_path):
    with pytest.raises(InputError, match="git rev-parse"):
        git.toplevel(tmp_path)


def test_deleted_schema_file_is_breaking(repo, capsys, monkeypatch, validate_report):
    repo.git("rm", "-q", "schemas/leak_alert.avsc")
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json"], capsys, repo.path, monkeypatch)
    data = validate_report(out)
    assert status == 1
    assert [f["rule"] for f in data["findings"]] == ["G001"]
    assert data["comparisons"][0]["old"] == "HEAD:schemas/leak_alert.avsc"
    assert data["compatibility"] == "breaking"


def test_added_schema_file_passes(repo, capsys, monkeypatch, validate_report):
    repo.write("schemas/billing_period.avsc", {"type": "record", "name": "BillingPeriod",
                                               "namespace": "utility.billing", "fields": []})
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json"], capsys, repo.path, monkeypatch)
    data = validate_report(out)
    assert status == 0
    assert [f["rule"] for f in data["findings"]] == ["G002"]  # untracked files count as added


def test_rename_is_paired_not_reported_as_remove_and_add(repo, capsys, monkeypatch, validate_report):
    repo.git("mv", "schemas/leak_alert.avsc", "schemas/leaks.avsc")
    status, out, _ = run_cli(["check", "--staged", "--output", "json"], capsys, repo.path, monkeypatch)
    data = validate_report(out)
    assert status == 0
    assert data["findings"] == []
    assert data["comparisons"] == [{"old": "HEAD:schemas/leak_alert.avsc", "new": "schemas/leaks.avsc",
                                    "format": "avro", "compatibility": "full"}]


def test_unit_change_in_working_tree_is_found_with_its_line(repo, capsys, monkeypatch, validate_report):
    repo.write("schemas/meter_reading.avsc", meter_reading("m3"))
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json"], capsys, repo.path, monkeypatch)
    data = validate_report(out)
    assert status == 1
    unit = [f for f in data["findings"] if f["path"] == "volume"]
    assert unit and unit[0]["semantic"] is True
    assert unit[0]["new"]["file"] == "schemas/meter_reading.avsc"


def test_staged_compares_the_index_not_the_working_tree(repo, capsys, monkeypatch):
    repo.write("schemas/meter_reading.avsc", meter_reading("m3"))
    # nothing staged yet: the index equals HEAD
    status, out, _ = run_cli(["check", "--staged", "--output", "json"], capsys, repo.path, monkeypatch)
    assert status == 0 and json.loads(out)["comparisons"] == []
    repo.git("add", "schemas/meter_reading.avsc")
    repo.write("schemas/meter_reading.avsc", meter_reading("L"))  # working tree back to the old unit
    status, out, _ = run_cli(["check", "--staged", "--output", "json"], capsys, repo.path, monkeypatch)
    assert status == 1  # the index holds m3
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json"], capsys, repo.path, monkeypatch)
    assert status == 0  # the working tree holds L again


def test_paths_limit_the_files(repo, capsys, monkeypatch):
    repo.write("schemas/meter_reading.avsc", meter_reading("m3"))
    repo.git("rm", "-q", "schemas/leak_alert.avsc")
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json", "schemas/leak_alert.avsc"],
                             capsys, repo.path, monkeypatch)
    assert [c["new"] for c in json.loads(out)["comparisons"]] == ["/dev/null"]


def test_paths_are_shown_relative_to_the_current_folder(repo, capsys, monkeypatch):
    repo.git("rm", "-q", "schemas/leak_alert.avsc")
    status, out, _ = run_cli(["check", "--base", "HEAD", "--output", "json"], capsys, repo.path / "schemas",
                             monkeypatch)
    assert json.loads(out)["comparisons"][0]["old"] == "HEAD:leak_alert.avsc"


def test_an_older_base_and_nothing_written_into_the_tree(repo, capsys, monkeypatch):
    repo.write("schemas/meter_reading.avsc", meter_reading("m3"))
    repo.commit("cubic metres")
    before = repo.status()
    status, out, _ = run_cli(["check", "--base", "HEAD~1", "--output", "json"], capsys, repo.path, monkeypatch)
    assert status == 1
    assert json.loads(out)["comparisons"][0]["old"] == "HEAD~1:schemas/meter_reading.avsc"
    assert repo.status() == before == ""


def test_json_files_that_are_not_schemas_are_skipped_with_a_warning(repo, capsys, monkeypatch):
    repo.write("package.json", {"name": "dashboard", "version": "1.0.0"})
    repo.write("schemas/notice.json", {"$schema": "https://json-schema.org/draft/2020-12/schema",
                                       "$id": "urn:utility:service-notice", "type": "object"})
    report = revision.check("HEAD", cwd=repo.path)
    assert [c.new for c in report.comparisons] == ["schemas/notice.json"]
    assert "package.json" in report.warnings[0]


def test_first_commit_has_everything_added(tmp_path, capsys, monkeypatch):
    repo = Repo(tmp_path / "fresh")
    repo.write("meter_reading.avsc", meter_reading())
    repo.git("add", "-A")
    status, out, _ = run_cli(["check", "--staged", "--output", "json"], capsys, repo.path, monkeypatch)
    assert status == 0
    assert [f["rule"] for f in json.loads(out)["findings"]] == ["G002"]


def test_bad_ref_exits_2_with_one_line(repo, capsys, monkeypatch):
    status, _, err = run_cli(["check", "--base", "nope"], capsys, repo.path, monkeypatch)
    assert status == 2
    assert err.count("\n") == 1 and "nope" in err


def test_protobuf_imports_resolve_against_the_same_revision(repo, monkeypatch):
    """When a .proto file changed, every .proto file of the OLD revision is written out beside it."""
    import types

    from linter import api
    from linter.formats import Schema

    seen = {}

    def load(path, display, options):
        common = path.parent / "common.proto"
        seen[display] = (common.read_text() if common.exists() else None, options.include)
        return Schema("protobuf", display, (), {}, None)

    fake = types.SimpleNamespace(name="protobuf", KINDS=frozenset(), load=load, diff=lambda old, new: [])
    real = api.adapter
    monkeypatch.setattr(api, "adapter", lambda fmt: fake if fmt == "protobuf" else real(fmt))
    repo.write("proto/common.proto", 'syntax = "proto3";\n// old revision\n')
    repo.write("proto/pump_status.proto", 'syntax = "proto3";\nimport "common.proto";\n')
    repo.commit("protos")
    repo.write("proto/common.proto", 'syntax = "proto3";\n// new revision\n')  # unstaged edit
    repo.write("proto/pump_status.proto", 'syntax = "proto3";\nimport "common.proto";\n// edited\n')
    repo.git("add", "proto/pump_status.proto")
    revision.check("HEAD", staged=True, include=[str(repo.path / "proto")], cwd=repo.path)
    old_common, old_include = seen["HEAD:proto/pump_status.proto"]
    new_common, new_include = seen["proto/pump_status.proto"]
    assert old_common == 'syntax = "proto3";\n// old revision\n'
    assert new_common == 'syntax = "proto3";\n// old revision\n'  # the index still holds the old one
    assert old_include[0] != str(repo.path / "proto") and old_include[0].endswith("old/proto")
    assert new_include[0].endswith("new/proto")


def test_git_run_finds_what_a_folder_run_finds(tmp_path):
    """schemas_example/v1 committed, v2 in the working tree: the same findings as v1 against v2."""
    import shutil
    from pathlib import Path

    from linter import api

    example = Path(__file__).resolve().parent.parent / "schemas_example"
    repo = Repo(tmp_path / "utility")
    shutil.copytree(example / "v1", repo.path / "schemas")
    repo.commit("v1")
    shutil.rmtree(repo.path / "schemas")
    shutil.copytree(example / "v2", repo.path / "schemas")

    def key(report):
        return sorted((f.rule, f.schema, f.path, f.severity, f.message) for f in report.findings)

    in_git = revision.check("HEAD", cwd=repo.path)
    in_folders = api.check(example / "v1", example / "v2")
    assert in_git.findings and key(in_git) == key(in_folders)
    assert in_git.compatibility == in_folders.compatibility


def test_protobuf_files_that_import_each_other_both_changed(repo):
    """Both sides compile with their own revision of the imported file (real protoc)."""
    pytest.importorskip("linter.formats.protobuf")
    repo.write("proto/common.proto", 'syntax = "proto3";\npackage utility.telemetry;\n'
                                     "message Pressure { double value = 1; }\n")
    repo.write("proto/pump_status.proto", 'syntax = "proto3";\npackage utility.telemetry;\nimport "common.proto";\n'
                                          "message PumpStatus {\n  string pump_id = 1;\n  Pressure outlet = 2;\n}\n")
    repo.commit("telemetry")
    repo.write("proto/common.proto", 'syntax = "proto3";\npackage utility.telemetry;\n'
                                     "message Pressure { float value = 1; }\n")
    repo.write("proto/pump_status.proto", 'syntax = "proto3";\npackage utility.telemetry;\nimport "common.proto";\n'
                                          "message PumpStatus {\n  string pump_id = 1;\n  Pressure outlet = 2;\n"
                                          "  int32 speed = 3;\n}\n")
    report = revision.check("HEAD", cwd=repo.path)
    got = {(f.schema, f.path) for f in report.findings}
    assert got == {("utility.telemetry.Pressure", "value"), ("utility.telemetry.PumpStatus", "speed")}
    assert report.compatibility.value == "breaking"
