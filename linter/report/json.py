"""The JSON report: the contract other tools read (schema: linter/data/report.schema.json)."""
from __future__ import annotations

import json as _json

from .. import __version__

REPORT_VERSION = 1


def _loc(loc):
    return loc.to_json() if loc is not None else None


def finding_json(finding, index_of_consumers=None) -> dict:
    out = {
        "rule": finding.rule,
        "schema": finding.schema,
        "path": finding.path,
        "compatibility": finding.compatibility.value,
        "semantic": finding.semantic,
        "severity": finding.severity,
        "message": finding.message,
        "advice": finding.advice,
        "reference": finding.reference,
        "old": _loc(finding.old_loc),
        "new": _loc(finding.new_loc),
        "consumers": list(finding.consumers),
        "kind": finding.kind,
    }
    if finding.effects:
        out["effects"] = {k: v.value for k, v in finding.effects.items()}
    if finding.undecided:
        out["undecided"] = True
    details = {k: v for k, v in finding.facts.items() if _jsonable(v)}
    if details:
        out["details"] = details
    out.update(finding.extra)
    return out


def _jsonable(value) -> bool:
    try:
        _json.dumps(value)
        return True
    except (TypeError, ValueError):
        return False


def _comparison(c, mode) -> dict:
    out = {"old": c.old, "new": c.new, "format": c.format, "compatibility": c.compatibility.value}
    if c.mode and c.mode != mode:
        out["mode"] = c.mode
    return out


def to_json(report) -> dict:
    findings = report.findings
    out = {
        "report_version": REPORT_VERSION,
        "tool": {"name": "evolint", "version": __version__},
        "mode": report.mode,
        "compatibility": report.compatibility.value,
        "passed": report.passed,
        "comparisons": [_comparison(c, report.mode) for c in report.comparisons],
        "findings": [finding_json(f) for f in findings],
        "consumers": list(report.consumers),
    }
    if report.warnings:
        out["warnings"] = list(report.warnings)
    return out


# The C encoder; json's indent= takes the pure-Python one, which cost more than the rest
# of the report at a few findings (benchmarks/scale.py).
_encode = _json.JSONEncoder(ensure_ascii=False, default=str, separators=(", ", ": ")).encode


def layout(obj: dict) -> str:
    """A report object as text: a member per line, and each item of a list member
    (a comparison, a finding, a consumer) on a line of its own, easy to read and to grep."""
    lines = []
    for key, value in obj.items():
        if value.__class__ is list and value:
            items = ",\n".join("    " + _encode(item) for item in value)
            lines.append(f"  {_encode(key)}: [\n{items}\n  ]")
        else:
            lines.append(f"  {_encode(key)}: {_encode(value)}")
    return "{\n" + ",\n".join(lines) + "\n}"


def render(report, stream, **_options) -> None:
    stream.write(layout(to_json(report)) + "\n")
