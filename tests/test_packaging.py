"""The rule catalogue ships inside the wheel, and a non-editable install finds it there."""
import subprocess
import sys
import zipfile
from pathlib import Path

from linter import catalogue

ROOT = Path(__file__).resolve().parent.parent


def test_wheel_carries_the_rules_and_finds_them(tmp_path):
    build = subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "-q",
         "-w", str(tmp_path / "dist"), str(ROOT)],
        capture_output=True, text=True)
    assert build.returncode == 0, build.stderr
    [wheel] = (tmp_path / "dist").glob("evolint-*.whl")
    names = zipfile.ZipFile(wheel).namelist()
    shipped = {Path(n).name for n in names if n.startswith("linter/rules/")}
    assert shipped == {p.name for p in (ROOT / "rules").glob("*.toml")}
    assert "linter/data/report.schema.json" in names

    target = tmp_path / "site"
    zipfile.ZipFile(wheel).extractall(target)
    # -S: no site-packages, so the editable checkout cannot be what is imported.
    probe = subprocess.run(
        [sys.executable, "-S", "-c",
         "import linter.catalogue as c; print(c.rules_dir()); print(len(c.load()))"],
        capture_output=True, text=True, cwd=tmp_path, env={"PYTHONPATH": str(target)})
    assert probe.returncode == 0, probe.stderr
    where, count = probe.stdout.split()
    assert Path(where) == target / "linter" / "rules"
    assert int(count) == len(catalogue.load())
