"""The announcement a producer team pastes into a ticket or a mail: who must hear what.

Built from a report that went through consumer impact: a summary line, one section per
consumer that must be told (what changes for them in plain words, the advice, the fields
affected), then the consumers informed and those unaffected. ``data`` is the same content
as JSON, added to the report under ``announcement``.
"""
from __future__ import annotations

import re

from .consumers import INFORMED, TOLD, UNAFFECTED

VERDICT = {
    "full": "Fully compatible",
    "backward": "Backward compatible only",
    "forward": "Forward compatible only",
    "breaking": "Breaking",
}
# What a broken direction means for the consumer reading the field, in plain words.
PLAIN = {
    "semantic": "The data still decodes, but the value means something else: check every use of "
                "this field before the change ships.",
    "undecided": "evolint could not decide whether your reader copes with this change: review it by hand.",
    "backward": "A reader on the new schema cannot read every event written with the old one "
                "(for example when replaying stored events after upgrading).",
    "forward": "Your current reader cannot read every event written with the new schema: "
               "upgrade your reader before the producer ships the change.",
}
# Markdown's active characters; an underscore inside a word (flow_rate) is left alone,
# since CommonMark does not read it as emphasis there.
_SPECIAL = re.compile(r"([\\`*\[\]<>|#]|(?<![A-Za-z0-9])_|_(?![A-Za-z0-9]))")


def esc(text: str) -> str:
    """Plain text inside Markdown: no accidental emphasis, links, tags or headings."""
    return _SPECIAL.sub(r"\\\1", " ".join(str(text).split()))


def code(text: str) -> str:
    text = str(text)
    fence = "``" if "`" in text else "`"
    pad = " " if text.startswith("`") or text.endswith("`") else ""
    return f"{fence}{pad}{text}{pad}{fence}"


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def _groups(report) -> dict[str, list[dict]]:
    out = {TOLD: [], INFORMED: [], UNAFFECTED: []}
    for c in report.consumers:
        out[c.get("verdict", TOLD if c["notify"] else UNAFFECTED)].append(c)
    return out


def summary(report) -> str:
    groups, findings = _groups(report), report.findings
    files = len(report.comparisons)
    if not findings:
        head = "No changes"
    else:
        head = f"{VERDICT[report.compatibility.value]} ({'passes' if report.passed else 'fails'} mode {report.mode})"
    return (f"{head}: {_plural(len(findings), 'finding')} in {_plural(files, 'file')}; "
            f"{_plural(len(groups[TOLD]), 'consumer')} must be told, {len(groups[INFORMED])} informed, "
            f"{len(groups[UNAFFECTED])} unaffected.")


def _target(finding) -> str:
    return f"{finding.schema}:{finding.path}" if finding.path else finding.schema


def data(report) -> dict:
    groups = _groups(report)
    return {
        "summary": summary(report),
        "schemas": sorted({f.schema for f in report.findings}),
        "told": [c["name"] for c in groups[TOLD]],
        "informed": [c["name"] for c in groups[INFORMED]],
        "unaffected": [c["name"] for c in groups[UNAFFECTED]],
    }


def _plain(reason: dict) -> str:
    if reason.get("semantic"):
        return PLAIN["semantic"]
    if reason.get("undecided"):
        return PLAIN["undecided"]
    return " ".join(PLAIN[d] for d in reason.get("breaks", ()))


def _section(consumer: dict, findings) -> list[str]:
    lines = [f"## {esc(consumer['name'])}", ""]
    who = [f"Contact: {esc(consumer['contact'])}"]
    who += [f"{label}: {esc(consumer[key])}" for key, label in (("team", "team"), ("channel", "channel"))
            if consumer.get(key)]
    lines.append(" · ".join(who))
    if consumer.get("needs") and consumer["needs"] != "none":
        lines += ["", f"You rely on {consumer['needs']} compatibility."]
    lines += ["", "What changes for you:", ""]
    told = set()
    for reason in consumer.get("reasons", []):
        f = findings[reason["finding"]]
        told.add(reason["finding"])
        lines.append(f"- **{code(_target(f))}**: {esc(f.message).rstrip('.')}. {esc(_plain(reason))}")
        if f.advice:
            lines.append(f"  - What to do: {esc(f.advice)}")
        lines.append(f"  - Rule {f.rule}; {esc(f.reference)}")
        witness = f.extra.get("witness")
        if witness and witness.get("confirmed"):  # announce --witness: an example in hand
            import json

            datum = json.dumps(witness["datum"], ensure_ascii=False, default=str)
            lines.append(f"  - Example ({witness['direction']}): {code(datum)}: {esc(witness['outcome'])}")
    rest = [findings[i] for i in consumer["findings"] if i not in told]
    if rest:
        needs = consumer.get("needs", "none")
        keeps = f"these keep the {needs} compatibility you rely on" if needs != "none" else "no action needed"
        lines += ["", f"Also changing on fields you read ({keeps}):", ""]
        lines += [f"- {code(_target(f))}: {esc(f.message)}" for f in rest]
    if consumer.get("fields"):
        lines += ["", "Fields affected: " + ", ".join(code(p) for p in consumer["fields"])]
    return lines + [""]


def markdown(report) -> str:
    groups, findings = _groups(report), report.findings
    schemas = data(report)["schemas"]
    title = ", ".join(schemas) if schemas else ", ".join(c.new for c in report.comparisons)
    lines = [f"# Schema change: {esc(title)}", "", summary(report), ""]
    for consumer in groups[TOLD]:
        lines += _section(consumer, findings)
    for verdict, heading in ((INFORMED, "Informed (compatible changes on fields they read)"),
                             (UNAFFECTED, "Unaffected")):
        lines += [f"## {heading}", ""]
        if not groups[verdict]:
            lines += ["None.", ""]
            continue
        for c in groups[verdict]:
            where = f": {', '.join(code(p) for p in c['fields'])}" if c.get("fields") else ""
            lines.append(f"- {esc(c['name'])} ({esc(c['contact'])}){where}")
        lines.append("")
    if report.warnings:
        lines += ["## Registry notes", ""] + [f"- {esc(w)}" for w in report.warnings] + [""]
    return "\n".join(lines).rstrip() + "\n"


def render(report, stream, output: str = "markdown") -> None:
    if output == "json":
        import json

        out = report.to_json()
        out["announcement"] = data(report)
        json.dump(out, stream, indent=2, ensure_ascii=False, default=str)
        stream.write("\n")
    else:
        stream.write(markdown(report))
