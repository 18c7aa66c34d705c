"""`evolint history`: numbered folders, numbered files and git commits, step by step."""
import json

import pytest

from gitrepo import Repo, leak_alert, meter_reading
from linter import history
from linter.cli import main
from linter.errors import UsageError

UNITS = ["L", "L", "m3", "m3", "L"]  # v3 changes the unit, v5 changes it back


def run(args, capsys):
    with pytest.raises(SystemExit) as exit_:
        main(args)
    out = capsys.readouterr()
    return exit_.value.code, out.out, out.err


@pytest.fixture
def numbered_files(tmp_path):
    for n, unit in enumerate(UNITS, 1):
        (tmp_path / f"meter_reading.{n}.avsc").write_text(json.dumps(meter_reading(unit)))
    (tmp_path / "notes.txt").write_text("not a version")
    return tmp_path


def test_numbered_files_sort_as_numbers(tmp_path):
    for n in (1, 2, 10, 9):
        (tmp_path / f"leak_alert.{n}.avsc").write_text(json.dumps(leak_alert()))
    [versions] = history.local_histories(tmp_path)
    assert [v.label for v in versions] == ["leak_alert.1.avsc", "leak_alert.2.avsc", "leak_alert.9.avsc",
                                           "leak_alert.10.avsc"]


def test_each_version_against_its_predecessor(numbered_files, capsys, validate_report):
    status, out, _ = run(["history", str(numbered_files), "--output", "json"], capsys)
    data = json.loads(out)
    assert status == 1 and data["passed"] is False
    steps = [(s["old"], s["new"], s["report"]["passed"]) for s in data["steps"]]
    assert steps == [("meter_reading.1.avsc", "meter_reading.2.avsc", True),
                     ("meter_reading.2.avsc", "meter_reading.3.avsc", False),
                     ("meter_reading.3.avsc", "meter_reading.4.avsc", True),
                     ("meter_reading.4.avsc", "meter_reading.5.avsc", False)]
    for step in data["steps"]:
        validate_report(step["report"])


def test_every_earlier_compares_all_pairs(numbered_files):
    result = history.run(numbered_files, every_earlier=True)
    assert len(result.steps) == 10  # 5 versions: 4 + 3 + 2 + 1
    # v5 against v1 and v2 keeps the unit (L), against v3 and v4 it does not
    against_v5 = {s.old.label: s.report.passed for s in result.steps if s.new.label == "meter_reading.5.avsc"}
    assert against_v5 == {"meter_reading.1.avsc": True, "meter_reading.2.avsc": True,
                          "meter_reading.3.avsc": False, "meter_reading.4.avsc": False}


def test_a_numbered_file_finds_its_siblings(numbered_files):
    result = history.run(numbered_files / "meter_reading.3.avsc")
    assert len(result.steps) == 4


def test_numbered_folders_pair_by_relative_path(tmp_path, capsys):
    for n in (1, 2, 10):
        folder = tmp_path / f"v{n}"
        folder.mkdir()
        (folder / "meter_reading.avsc").write_text(json.dumps(meter_reading()))
        if n < 10:
            (folder / "leak_alert.avsc").write_text(json.dumps(leak_alert()))
    status, out, _ = run(["history", str(tmp_path), "--output", "text"], capsys)
    assert status == 1
    lines = out.splitlines()
    assert lines[0].startswith("PASS v2 against v1")
    assert any(l.startswith("FAIL v10 against v2") for l in lines)
    assert "G001" in out
    assert lines[-1] == "FAIL 2 steps, 1 failing mode 'backward'"


def test_git_history_follows_the_file(tmp_path, capsys, monkeypatch):
    repo = Repo(tmp_path / "utility")
    repo.write("meter.avsc", meter_reading("L"))
    first = repo.commit("litres")
    repo.write("meter.avsc", meter_reading("m3"))
    repo.commit("cubic metres")
    repo.git("mv", "meter.avsc", "meter_reading.avsc")
    repo.commit("rename")
    repo.write("README.txt", "unrelated\n")
    repo.commit("docs")
    monkeypatch.chdir(repo.path)
    status, out, _ = run(["history", "--git", "meter_reading.avsc", "--output", "json"], capsys)
    data = json.loads(out)
    assert status == 1
    assert [s["old"] for s in data["steps"]][0] == first[:10]
    assert len(data["steps"]) == 2  # three commits touched the file
    finding = data["steps"][0]["report"]["findings"][0]
    assert finding["new"]["file"].endswith(":meter.avsc") and finding["path"] == "volume"
    assert repo.status() == ""


def test_one_version_is_not_a_history(tmp_path):
    (tmp_path / "meter_reading.1.avsc").write_text(json.dumps(meter_reading()))
    with pytest.raises(UsageError, match="only one version"):
        history.run(tmp_path)


def test_a_plain_file_without_git_is_a_usage_error(tmp_path, capsys):
    (tmp_path / "meter_reading.avsc").write_text(json.dumps(meter_reading()))
    status, _, err = run(["history", str(tmp_path / "meter_reading.avsc")], capsys)
    assert status == 2 and "--git" in err


def test_progress_bar_only_on_a_terminal(monkeypatch):
    import sys

    monkeypatch.setattr(sys.stderr, "isatty", lambda: False)
    assert history._progress(100) is None
    monkeypatch.setattr(sys.stderr, "isatty", lambda: True)
    assert history._progress(history.PROGRESS_AFTER) is None
    assert history._progress(100) is not None
