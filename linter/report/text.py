"""The terminal report (rich): findings grouped by schema, then a closing summary.

Colour only on a terminal; rich itself honours NO_COLOR.
"""
from __future__ import annotations

from collections import defaultdict

from ._shared import effect as direction  # one wording of a finding's effect for every reporter

STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}
ORDER = {"error": 0, "warning": 1, "info": 2}
VERDICT = {
    "full": "fully compatible (backward and forward)",
    "backward": "backward compatible only (new readers read old data)",
    "forward": "forward compatible only (old readers read new data)",
    "breaking": "breaking (neither backward nor forward, or a change of meaning)",
}


def console_for(stream, color: bool | None = None):
    from rich.console import Console

    return Console(file=stream, highlight=False, soft_wrap=True, emoji=False,
                   force_terminal=color, no_color=(color is False) or None, width=None)




def _one_line(text: str) -> str:
    # Catalogue paragraphs are wrapped for the TOML file, not for the terminal.
    return " ".join(text.split())


def _where(finding) -> str:
    parts = []
    for label, loc in (("old", finding.old_loc), ("new", finding.new_loc)):
        if loc is not None:
            parts.append(f"{label} {loc}")
    return " · ".join(parts)


def render_findings(console, report) -> None:
    from rich.markup import escape

    groups = defaultdict(list)
    for comparison in report.comparisons:
        for finding in comparison.findings:
            groups[(comparison.old, comparison.new, finding.schema)].append(finding)
    for (old, new, schema), findings in groups.items():
        console.print()
        console.print(f"[bold]{escape(schema)}[/]  [dim]{escape(old)} → {escape(new)}[/]")
        findings.sort(key=lambda f: (ORDER[f.severity], f.path))
        for f in findings:
            style = STYLE[f.severity]
            path = f.path or "(type)"
            console.print(f"  [{style}]{f.severity:<7}[/] [bold]{f.rule}[/] {escape(path)}  "
                          f"[{style}]{direction(f)}[/]")
            console.print(f"          {escape(_one_line(f.message))}")
            if f.severity != "info" and f.advice:
                console.print(f"          [green]→ {escape(_one_line(f.advice))}[/]")
            where = _where(f)
            if where:
                console.print(f"          [dim]{escape(where)}[/]")
            if "witness" in f.extra:
                _witness(console, f.extra["witness"])


def _witness(console, w) -> None:
    import json

    from rich.markup import escape

    mark = "[green]confirmed[/]" if w["confirmed"] else "[yellow]not confirmed[/]"
    via = f" ({w['encoding']})" if w.get("encoding") else ""
    console.print(f"          witness {w['direction']}{escape(via)}, {mark}: "
                  f"{escape(json.dumps(w['datum'], ensure_ascii=False, default=str))}")
    console.print(f"            [dim]written with {escape(w['writer'])}, read with {escape(w['reader'])}:[/] "
                  f"{escape(w['outcome'])}")


def summary_line(report) -> str:
    counts = defaultdict(int)
    for f in report.findings:
        counts[f.severity] += 1
    tally = ", ".join(f"{counts[s]} {s}{'s' if counts[s] != 1 and s != 'info' else ''}"
                      for s in ("error", "warning", "info") if counts[s]) or "no findings"
    verdict = VERDICT[report.compatibility.value]
    keeps = "passes" if report.passed else "fails"
    return f"{verdict}; {keeps} mode '{report.mode}' ({tally})"


def render_consumers(console, report) -> None:
    """Who must be told (with contacts and why), then who is informed or unaffected."""
    from rich.markup import escape

    by = defaultdict(list)
    for c in report.consumers:
        by[c.get("verdict", "must-be-told" if c["notify"] else "unaffected")].append(c)
    told = by["must-be-told"]
    console.print()
    console.print(f"[bold]Consumers to tell ({len(told)})[/]" if told else "[bold]No consumer must be told[/]")
    findings = report.findings
    for c in told:
        console.print(f"  [bold]{escape(c['name'])}[/] <{escape(c['contact'])}>")
        for reason in c.get("reasons", []):
            f = findings[reason["finding"]]
            console.print(f"    {f.rule} {escape(f.schema)}{escape(':' + f.path if f.path else '')}  "
                          f"[dim]{escape(reason['why'])}[/]")
    for verdict in ("informed", "unaffected"):
        if by[verdict]:
            console.print(f"{verdict.capitalize()}: {escape(', '.join(c['name'] for c in by[verdict]))}")


def render(report, stream, color: bool | None = None, **_options) -> None:
    from rich.markup import escape

    console = console_for(stream, color)
    n = len(report.comparisons)
    console.print(f"[bold]evolint[/] · mode {report.mode} · {n} comparison{'s' if n != 1 else ''}")
    for warning in report.warnings:
        console.print(f"[yellow]warning:[/] {escape(warning)}")
    render_findings(console, report)
    console.print()
    style = "bold green" if report.passed else "bold red"
    console.print(f"[{style}]{'PASS' if report.passed else 'FAIL'}[/] {escape(summary_line(report))}")
    if report.consumers:
        render_consumers(console, report)
