"""Case folders: tests/cases/<format>/<case>/{old.*, new.*, expected.json}.

expected.json holds
  "source":        the published rule the case follows (spec and section) - required
  "compatibility": the verdict evolint must give (full|backward|forward|breaking)
  "rules":         the exact set of rule ids among the findings
  "mode":          optional, the --mode to run with (default "none": verdicts only)
  "options":       optional, keyword arguments for linter.check (e.g. {"encodings": ["json"]})
  "paths":         optional, the exact set of finding paths
A new rule adds a folder, not a test function.
"""
import json
from pathlib import Path

import pytest

import linter

CASES = Path(__file__).parent / "cases"


def case_dirs():
    return sorted(p for p in CASES.glob("*/*") if (p / "expected.json").is_file())


def side(folder: Path, stem: str) -> Path:
    found = sorted(p for p in folder.iterdir() if p.name == stem or p.stem == stem)
    assert len(found) == 1, f"{folder}: expected exactly one '{stem}' file or folder, found {found}"
    return found[0]


@pytest.mark.parametrize("folder", case_dirs(), ids=lambda p: f"{p.parent.name}/{p.name}")
def test_case(folder, validate_report):
    expected = json.loads((folder / "expected.json").read_text())
    assert expected.get("source"), "every case names the published rule it follows"
    report = linter.check(side(folder, "old"), side(folder, "new"),
                          mode=expected.get("mode", "none"), **expected.get("options", {}))
    data = validate_report(report.to_json())
    got_rules = sorted({f["rule"] for f in data["findings"]})
    assert got_rules == sorted(set(expected["rules"])), json.dumps(data["findings"], indent=1)
    assert data["compatibility"] == expected["compatibility"], json.dumps(data["findings"], indent=1)
    if "paths" in expected:
        assert sorted({f["path"] for f in data["findings"]}) == sorted(set(expected["paths"]))


def test_there_are_cases():
    # Guards against a glob that silently matches nothing once adapters have cases.
    assert CASES.is_dir()
