"""The hook manifest, checked by the real pre-commit framework in temporary repositories.

pre-commit builds one virtualenv and pip-installs this repository into it (about ten
seconds here); both outcomes share that environment through one PRE_COMMIT_HOME.
"""
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from gitrepo import Repo, leak_alert, meter_reading

ROOT = Path(__file__).resolve().parent.parent
MANIFEST = ROOT / ".pre-commit-hooks.yaml"
HOOK = "evolint-staged-schemas"

pytestmark = pytest.mark.skipif(not (ROOT / ".git").exists(), reason="needs the source tree as a git repository")


def test_manifest_is_valid_for_pre_commit():
    from pre_commit.clientlib import load_manifest

    hooks = {h["id"]: h for h in load_manifest(str(MANIFEST))}
    assert set(hooks) == {"evolint-staged-schemas", "evolint-staged-schemas-full"}
    for hook in hooks.values():
        assert hook["entry"].startswith("evolint check --staged")
        assert hook["always_run"] and not hook["pass_filenames"]  # deletions are seen too


@pytest.fixture(scope="module")
def pre_commit_home(tmp_path_factory):
    return tmp_path_factory.mktemp("pre-commit-home")


def try_repo(repo: Repo, home: Path):
    exe = shutil.which("pre-commit", path=os.path.dirname(sys.executable)) or shutil.which("pre-commit")
    env = {**os.environ, "PRE_COMMIT_HOME": str(home), "NO_COLOR": "1", "PRE_COMMIT_COLOR": "never"}
    return subprocess.run([exe, "try-repo", str(ROOT), HOOK, "--verbose"], cwd=repo.path, env=env,
                          capture_output=True, text=True, timeout=600)


@pytest.fixture
def utility_repo(tmp_path):
    repo = Repo(tmp_path / "utility")
    repo.write("meter_reading.avsc", meter_reading())
    repo.write("leak_alert.avsc", leak_alert())
    repo.commit("first schemas")
    return repo


def test_breaking_staged_change_fails_and_prints_the_finding(utility_repo, pre_commit_home):
    utility_repo.git("rm", "-q", "leak_alert.avsc")
    done = try_repo(utility_repo, pre_commit_home)
    assert done.returncode == 1, done.stdout + done.stderr
    assert "G001" in done.stdout and "leak_alert.avsc" in done.stdout


def test_compatible_staged_change_passes(utility_repo, pre_commit_home):
    utility_repo.write("billing_period.avsc", json.dumps(
        {"type": "record", "name": "BillingPeriod", "namespace": "utility.billing", "fields": []}))
    utility_repo.git("add", "billing_period.avsc")
    done = try_repo(utility_repo, pre_commit_home)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "Passed" in done.stdout
