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


def render(report, stream, **_options) -> None:
    # One write of the joined text: dump() writes each of its hundreds of pieces.
    stream.write(_json.dumps(to_json(report), indent=2, ensure_ascii=False, default=str) + "\n")
