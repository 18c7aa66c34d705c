"""SARIF 2.1.0 (OASIS standard): one run, the rules that fired, one result per finding.

Rules carry their help text from the catalogue (title, why, what to do instead, the
reference). Each result points at the NEW side of the change where it exists, else the
OLD side, and names the other side as a related location. Severity maps onto SARIF
levels: error -> error, warning -> warning, info -> note (SARIF 2.1.0, result.level).
"""
from __future__ import annotations

import hashlib
import json
from urllib.parse import quote

from .. import __version__
from ._shared import effect, strip_revision

SCHEMA_URI = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
LEVEL = {"error": "error", "warning": "warning", "info": "note"}


def uri(path: str) -> str:
    return quote(path.replace("\\", "/"), safe="/:@-._~!$&'()*+,;=")


def _location(loc, report, message: str | None = None, ident: int | None = None) -> dict:
    physical = {"artifactLocation": {"uri": uri(strip_revision(loc.file, report))}}
    if loc.line is not None:
        region = {"startLine": loc.line}
        if loc.column is not None:
            region["startColumn"] = loc.column
        physical["region"] = region
    out = {"physicalLocation": physical}
    if ident is not None:
        out["id"] = ident
    if message:
        out["message"] = {"text": message}
    return out


def rule_descriptor(rule) -> dict:
    why, instead = " ".join(rule.why.split()), " ".join(rule.instead.split())
    return {
        "id": rule.id,
        "name": rule.name,
        "shortDescription": {"text": rule.title},
        "fullDescription": {"text": why},
        "help": {
            "text": f"{why}\n\nInstead: {instead}\n\nReference: {rule.reference}",
            "markdown": f"{why}\n\n**Instead:** {instead}\n\n**Reference:** {rule.reference}",
        },
        "defaultConfiguration": {"level": LEVEL[rule.severity]},
        "properties": {"tags": [rule.format, "schema-compatibility"], "effect": rule.effect_text},
    }


def fingerprint(finding) -> str:
    # Stable across line moves, so code-scanning views keep one alert per change.
    key = "\0".join((finding.rule, finding.schema, finding.path, finding.message))
    return hashlib.sha256(key.encode()).hexdigest()[:32]


def result(finding, index: int, report) -> dict:
    out = {
        "ruleId": finding.rule,
        "ruleIndex": index,
        "level": LEVEL[finding.severity],
        "message": {"text": finding.message + (f" {finding.advice}" if finding.severity != "info" and finding.advice else "")},
        "partialFingerprints": {"evolintChange/v1": fingerprint(finding)},
        "properties": {"schema": finding.schema, "path": finding.path, "effect": effect(finding),
                       "compatibility": finding.compatibility.value, "semantic": finding.semantic},
    }
    primary = finding.new_loc or finding.old_loc
    if primary is not None:
        out["locations"] = [_location(primary, report)]
        if finding.new_loc is not None and finding.old_loc is not None:
            out["relatedLocations"] = [_location(finding.old_loc, report, "the old version", 1)]
    if finding.consumers:
        out["properties"]["consumers"] = list(finding.consumers)
    return out


def to_sarif(report) -> dict:
    from .. import catalogue

    cat = catalogue.load()
    rules, index = [], {}
    for finding in report.findings:
        if finding.rule not in index:
            index[finding.rule] = len(rules)
            rules.append(rule_descriptor(cat.get(finding.rule)))
    return {
        "$schema": SCHEMA_URI,
        "version": "2.1.0",
        "runs": [{
            "tool": {"driver": {"name": "evolint", "version": __version__,
                                "semanticVersion": __version__, "rules": rules}},
            "results": [result(f, index[f.rule], report) for f in report.findings],
            "columnKind": "unicodeCodePoints",
            "invocations": [{
                "executionSuccessful": True,
                "toolExecutionNotifications": [{"level": "warning", "message": {"text": w}} for w in report.warnings],
            }],
            "properties": {"mode": report.mode, "compatibility": report.compatibility.value,
                           "passed": report.passed},
        }],
    }


def render(report, stream, **_options) -> None:
    json.dump(to_sarif(report), stream, indent=2, ensure_ascii=False)
    stream.write("\n")
