"""The CLI contract of DESIGN.md: exit statuses, one-line errors, outputs."""
import subprocess
import sys

import pytest
from linter import cli as cli_module


def run(args, env=None):
    """Run the real entry point, exit-status mapping included, as a user would."""
    return subprocess.run([sys.executable, "-m", "linter", *args], capture_output=True, text=True,
                          env=env)


@pytest.fixture
def dirs(tmp_path):
    old, new = tmp_path / "old", tmp_path / "new"
    old.mkdir(), new.mkdir()
    return old, new


def test_missing_file_is_exit_2_one_line(tmp_path):
    proc = run(["check", str(tmp_path / "nope.avsc"), str(tmp_path / "nope2.avsc")])
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1
    assert "nope.avsc" in proc.stderr and "Traceback" not in proc.stderr


def test_directory_against_file_is_usage_error(dirs, tmp_path):
    f = tmp_path / "a.avsc"
    f.write_text("{}")
    proc = run(["check", str(dirs[0]), str(f)])
    assert proc.returncode == 2 and "Traceback" not in proc.stderr


def test_unknown_option_is_exit_2():
    proc = run(["check", "--mode", "sideways", "a", "b"])
    assert proc.returncode == 2
    assert proc.stderr.strip().count("\n") == 0


def test_removed_schema_file_breaks(dirs, validate_report):
    old, new = dirs
    (old / "gone.avsc").write_text('"int"')
    (old / "other.avsc").write_text('"int"')
    (new / "added.avsc").write_text('"int"')
    proc = run(["check", str(old), str(new), "--output", "json"])
    assert proc.returncode == 1, proc.stderr
    data = validate_report(proc.stdout)
    rules = sorted(f["rule"] for f in data["findings"])
    assert rules == ["G001", "G001", "G002"]
    assert data["compatibility"] == "breaking" and data["passed"] is False


def test_added_file_only_passes(dirs, validate_report):
    old, new = dirs
    (old / "keep").mkdir()
    (new / "added.avsc").write_text('"int"')
    proc = run(["check", str(old), str(new), "--output", "json"])
    assert proc.returncode == 0, proc.stderr
    data = validate_report(proc.stdout)
    assert data["compatibility"] == "full" and data["passed"] is True


def test_empty_directories_are_bad_input(dirs):
    proc = run(["check", str(dirs[0]), str(dirs[1])])
    assert proc.returncode == 2


def test_internal_error_is_exit_3_without_traceback(monkeypatch, capsys):
    import linter.api

    def boom(*a, **k):
        raise RuntimeError("kaboom")

    monkeypatch.setattr(linter.api, "check", boom)
    with pytest.raises(SystemExit) as exit_info:
        cli_module.main(["check", "a", "b"])
    assert exit_info.value.code == 3
    err = capsys.readouterr().err
    assert "internal error" in err and "kaboom" in err and "Traceback" not in err
    with pytest.raises(SystemExit):
        cli_module.main(["--debug", "check", "a", "b"])
    assert "Traceback" in capsys.readouterr().err


def test_text_output_has_no_colour_off_a_terminal(dirs):
    old, new = dirs
    (old / "gone.avsc").write_text('"int"')
    (new / "x.avsc").write_text('"int"')
    proc = run(["check", str(old), str(new)])
    assert proc.returncode == 1
    assert "\x1b[" not in proc.stdout
    assert "G001" in proc.stdout and "FAIL" in proc.stdout


def test_no_color_is_honoured_on_a_terminal(dirs, monkeypatch):
    import io

    from linter.api import check
    from linter.report.text import render

    old, new = dirs
    (old / "gone.avsc").write_text('"int"')
    (new / "x.avsc").write_text('"int"')
    report = check(old, new)
    coloured, plain = io.StringIO(), io.StringIO()
    render(report, coloured, color=True)
    assert "\x1b[31" in coloured.getvalue() or "\x1b[1;31" in coloured.getvalue()
    monkeypatch.setenv("NO_COLOR", "1")
    render(report, plain, color=True)
    assert "\x1b[31" not in plain.getvalue() and "\x1b[1;31" not in plain.getvalue()


def test_version_and_console_script():
    proc = run(["--version"])
    assert proc.returncode == 0 and "0.1.0" in proc.stdout
