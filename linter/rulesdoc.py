"""Rule documentation generated from the catalogue: `evolint rules` and docs/rules.md.

Every rule is documented under the same headings, in the same order; nothing here is
written by hand, so the docs cannot drift from the rules.
"""
from __future__ import annotations

import json
import sys

from . import catalogue
from .errors import UsageError

FORMAT_TITLES = {"general": "Schema files", "avro": "Avro", "protobuf": "Protobuf",
                 "jsonschema": "JSON Schema", "semantic": "Semantic changes"}


def _rule_json(rule) -> dict:
    return {
        "id": rule.id, "name": rule.name, "kind": rule.kind, "format": rule.format,
        "title": rule.title, "effect": rule.effect_text, "compatibility": rule.compatibility.value,
        "semantic": rule.semantic, "undecided": rule.undecided,
        "encodings": {k: v.value for k, v in rule.encodings.items()},
        "severity": rule.severity, "why": rule.why, "instead": rule.instead,
        "example_old": rule.example_old, "example_new": rule.example_new,
        "known_problems": rule.known_problems, "reference": rule.reference, "status": rule.status,
    }


def listing(output: str = "text") -> str:
    cat = catalogue.load()
    if output == "json":
        return json.dumps([_rule_json(r) for r in cat], indent=2)
    lines = []
    for rule in cat:
        effect = "semantic" if rule.semantic else "undecided" if rule.undecided else rule.compatibility.value
        lines.append(f"{rule.id}  {rule.name:<44} {effect:<9} {rule.severity:<7} {rule.title}")
    return "\n".join(lines)


def _sections(rule) -> list[tuple[str, str]]:
    sections = [("What it does", f"{rule.title}. Effect: {rule.effect_text}."),
                ("Why this matters", rule.why)]
    if rule.encodings:
        sections.append(("Other encodings", ", ".join(f"{k}: {v.value}" for k, v in rule.encodings.items())))
    if rule.example_old or rule.example_new:
        sections.append(("Example", f"old:\n{(rule.example_old or '').rstrip()}\nnew:\n{(rule.example_new or '').rstrip()}"))
    sections.append(("Use instead", rule.instead))
    if rule.known_problems:
        sections.append(("Known problems", rule.known_problems.strip()))
    sections.append(("Reference", rule.reference))
    return sections


def explain(key: str, output: str = "text") -> str:
    rule = catalogue.load().get(key)
    if rule is None:
        raise UsageError(f"no rule {key!r}; `evolint rules` lists them")
    if output == "json":
        return json.dumps(_rule_json(rule), indent=2)
    out = [f"{rule.id} {rule.name} ({rule.format}, default severity {rule.severity})"]
    for heading, body in _sections(rule):
        out.append(f"\n{heading}\n" + "\n".join("  " + line if line else "" for line in body.splitlines()))
    return "\n".join(out)


def markdown() -> str:
    cat = catalogue.load()
    out = ["# Rules", "",
           "Generated from `rules/*.toml` by `python -m linter.rulesdoc`; do not edit by hand.", ""]
    by_format: dict[str, list] = {}
    for rule in cat:
        by_format.setdefault(rule.format, []).append(rule)
    for fmt, rules in by_format.items():
        out += [f"## {FORMAT_TITLES.get(fmt, fmt)}", "", "| id | name | effect | severity |", "|---|---|---|---|"]
        for r in rules:
            effect = "semantic" if r.semantic else "undecided" if r.undecided else r.compatibility.value
            out.append(f"| [{r.id}](#{r.id.lower()}) | {r.name} | {effect} | {r.severity} |")
        out.append("")
        for r in rules:
            out += [f"### {r.id}", "", f"**{r.name}**: {r.title}.", ""]
            for heading, body in _sections(r)[1:]:
                if heading == "Example":
                    body = f"```\n{body}\n```"
                out += [f"**{heading}.** " + (body if heading != "Example" else ""), ""]
                if heading == "Example":
                    out += [body, ""]
    return "\n".join(out).rstrip() + "\n"


if __name__ == "__main__":
    sys.stdout.write(markdown())
