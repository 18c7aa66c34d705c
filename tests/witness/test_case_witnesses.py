"""Every case folder, checked against the real codecs.

- A breaking case (expected verdict not "full"): each finding that breaks a direction has
  a witness confirmed by running the codec. An unconfirmed one means the rule or the
  witness builder is wrong.
- Every case: ``verify`` finds no failure in a direction the static verdict calls
  compatible (a failure there is a bug in the rules).

Excluded, because no codec run can show them: findings of the general rules (a file added
or removed has no pair to run), undecided findings (the analysis itself could not tell),
semantic findings without a unit or a logical type to reinterpret (a changed meaning or
default is a fact about documentation: the witness still shows the value reading back
unchanged), and formats whose witness module does not exist yet.
"""
import json
from pathlib import Path

import pytest

import linter
from linter.witness import module_for

CASES = Path(__file__).resolve().parent.parent / "cases"
SAMPLES = 200


def case_dirs():
    return sorted(p for p in CASES.glob("*/*") if (p / "expected.json").is_file())


def side(folder: Path, stem: str) -> Path:
    found = sorted(p for p in folder.iterdir() if p.name == stem or p.stem == stem)
    assert len(found) == 1, found
    return found[0]


def expected(folder):
    return json.loads((folder / "expected.json").read_text())


def runnable(folder) -> bool:
    return module_for(folder.parent.name) is not None and side(folder, "old").is_file()


# Known gaps, each a failing test kept visible until the witness builder handles it.
GAPS: dict[str, str] = {}
# Disagreements verify found, kept visible (strict: the test fails once they are resolved).
DISAGREE: dict[str, str] = {}


def _marked(folder, known):
    key = f"{folder.parent.name}/{folder.name}"
    if key in known:
        return pytest.param(folder, marks=pytest.mark.xfail(strict=True, reason=known[key]))
    return folder


BREAKING = [_marked(p, GAPS) for p in case_dirs() if expected(p)["compatibility"] != "full" and runnable(p)]
ALL = [_marked(p, DISAGREE) for p in case_dirs() if runnable(p)]


def must_confirm(f) -> bool:
    if f["rule"].startswith("G") or f.get("undecided"):
        return False
    outcome = f.get("witness", {}).get("outcome", "")
    if "does not check format" in outcome:
        return False  # a format the installed jsonschema cannot check (an optional package)
    if outcome.startswith("not shown by any datum") and any(
            word in f.get("kind", "") for word in ("service", "method", "package", "message-renamed",
                                                   "message-removed")):
        return False  # services, methods and type names: no message carries them on the wire
    if f["semantic"]:
        details = f.get("details", {})
        return bool(details.get("old_unit") and details.get("new_unit"))
    return f["compatibility"] != "full"


@pytest.mark.parametrize("folder", BREAKING, ids=lambda p: f"{p.parent.name}/{p.name}" if isinstance(p, Path) else None)
def test_breaking_case_has_confirmed_witnesses(folder, validate_report):
    exp = expected(folder)
    report = linter.check(side(folder, "old"), side(folder, "new"), mode=exp.get("mode", "none"),
                          witness=True, **exp.get("options", {}))
    data = validate_report(report.to_json())
    for f in data["findings"]:
        if must_confirm(f):
            w = f.get("witness")
            assert w is not None and w["confirmed"], f"{f['rule']} {f['path']}: {json.dumps(w)}"
            direction = w["direction"]
            assert f["semantic"] or direction in ("backward", "forward")


@pytest.mark.parametrize("folder", ALL, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_verify_finds_no_failure_where_the_verdict_is_compatible(folder):
    from linter.verify import verify

    exp = expected(folder)
    extra = {k: v for k, v in exp.get("options", {}).items() if k != "encodings"}
    if extra:
        pytest.skip(f"case runs with options verify does not take: {sorted(extra)}")
    result = verify(side(folder, "old"), side(folder, "new"), samples=SAMPLES, seed=0,
                    encodings=exp.get("options", {}).get("encodings", ()))
    bugs = [r.to_json() for r in result.bugs]
    assert not bugs, json.dumps(bugs, indent=1, ensure_ascii=False, default=str)
