"""The hook manifest, checked by the real pre-commit framework in temporary repositories.

pre-commit builds a virtualenv and pip-installs this repository into it: 10 s on an idle
machine, 50 s on a busy one (measured). try-repo keeps its store in a temporary folder of its
own, so each call builds one environment; the suite runs one try-repo per outcome, both from
one committed snapshot of the source tree (a tree with uncommitted edits would otherwise be
cloned into a shadow repository per call). PRE_COMMIT_HOME points into the test's folder so
that nothing of the user's pre-commit cache is read or written.
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


@pytest.fixture(scope="module")
def hook_repo(tmp_path_factory):
    """This source tree (tracked and untracked, not ignored) as one commit."""
    files = subprocess.run(["git", "ls-files", "-z", "--cached", "--others", "--exclude-standard"], cwd=ROOT,
                           capture_output=True, check=True).stdout.decode().split("\0")
    snapshot = Repo(tmp_path_factory.mktemp("hook-repo") / "evolint")
    for rel in filter(None, files):
        source = ROOT / rel
        if source.is_file():
            target = snapshot.path / rel
            target.parent.mkdir(parents=True, exist_ok=True)
            shutil.copy2(source, target)
    snapshot.commit("snapshot of the source tree")
    return snapshot.path


def try_repo(repo: Repo, home: Path, hook_repo: Path):
    exe = shutil.which("pre-commit", path=os.path.dirname(sys.executable)) or shutil.which("pre-commit")
    env = {**os.environ, "PRE_COMMIT_HOME": str(home), "NO_COLOR": "1", "PRE_COMMIT_COLOR": "never"}
    return subprocess.run([exe, "try-repo", str(hook_repo), HOOK, "--verbose"], cwd=repo.path, env=env,
                          capture_output=True, text=True, timeout=600)


@pytest.fixture
def utility_repo(tmp_path):
    repo = Repo(tmp_path / "utility")
    repo.write("meter_reading.avsc", meter_reading())
    repo.write("leak_alert.avsc", leak_alert())
    repo.commit("first schemas")
    return repo


def test_breaking_staged_change_fails_and_prints_the_finding(utility_repo, pre_commit_home, hook_repo):
    utility_repo.git("rm", "-q", "leak_alert.avsc")
    done = try_repo(utility_repo, pre_commit_home, hook_repo)
    assert done.returncode == 1, done.stdout + done.stderr
    assert "G001" in done.stdout and "leak_alert.avsc" in done.stdout


def test_compatible_staged_change_passes(utility_repo, pre_commit_home, hook_repo):
    utility_repo.write("billing_period.avsc", json.dumps(
        {"type": "record", "name": "BillingPeriod", "namespace": "utility.billing", "fields": []}))
    utility_repo.git("add", "billing_period.avsc")
    done = try_repo(utility_repo, pre_commit_home, hook_repo)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "Passed" in done.stdout
