"""A pull-request comment in Markdown: a verdict line, a table of findings, details folded away.

Table cells are escaped (``|``, newlines, HTML) so that a message cannot break the table;
the details of each rule (why it matters, what to do instead) sit in ``<details>`` blocks
so that a long report stays short on the page.
"""
from __future__ import annotations

import html

from ._shared import anchor, effect

ORDER = {"error": 0, "warning": 1, "info": 2}


def cell(text) -> str:
    text = html.escape(str(text), quote=False)
    return " ".join(text.split()).replace("|", "\\|") or " "


def verdict(report) -> str:
    from .text import summary_line

    mark = "PASS" if report.passed else "FAIL"
    return f"**evolint: {mark}** - {cell(summary_line(report))}"


def render(report, stream, **_options) -> None:
    from .. import catalogue

    out = [verdict(report), ""]
    for warning in report.warnings:
        out += [f"> warning: {cell(warning)}", ""]
    tell = [c for c in report.consumers if c.get("notify")]
    if tell:
        out += ["**Consumers to tell:** " + ", ".join(
            f"{cell(c['name'])} ({cell(c['contact'])})" if c.get("contact") else cell(c["name"]) for c in tell), ""]
    findings = sorted(report.findings, key=lambda f: ORDER[f.severity])
    readers = any(f.consumers for f in findings)
    if findings:
        out += ["| severity | rule | schema | field | effect | message | where |" + (" read by |" if readers else ""),
                "|---|---|---|---|---|---|---|" + ("---|" if readers else "")]
        for f in findings:
            file, line = anchor(f, report)
            where = f"`{cell(file)}:{line}`" if file and line else (f"`{cell(file)}`" if file else " ")
            row = (f"| {f.severity} | {f.rule} | `{cell(f.schema)}` | `{cell(f.path or '(type)')}` | "
                   f"{effect(f)} | {cell(f.message)} | {where} |")
            if readers:
                row += f" {cell(', '.join(f.consumers))} |"
            out.append(row)
        out.append("")
        cat = catalogue.load()
        seen = []
        for f in findings:
            if f.rule not in seen:
                seen.append(f.rule)
        for rule_id in seen:
            rule = cat.get(rule_id)
            out += ["<details>", f"<summary>{rule.id} {html.escape(rule.name)}: {html.escape(rule.title)}</summary>",
                    "", f"**Why this matters.** {' '.join(rule.why.split())}", "",
                    f"**Instead.** {' '.join(rule.instead.split())}", "",
                    f"**Reference.** {' '.join(rule.reference.split())}", "", "</details>", ""]
    else:
        out += ["No findings: the schemas did not change in a way evolint classifies.", ""]
    n = len(report.comparisons)
    out.append(f"<sub>{n} comparison{'s' if n != 1 else ''}, mode `{report.mode}`</sub>")
    stream.write("\n".join(out) + "\n")
