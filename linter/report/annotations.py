"""CI-log annotations in the workflow-command convention: ``::error file=F,line=N::message``.

One line per finding (error, warning, or notice for info), then a plain summary line.
Values are escaped as the convention requires (``%``, CR and LF in the message; also
``:`` and ``,`` in properties), so a message can never end its line early.
"""
from __future__ import annotations

from ._shared import anchor, effect

LEVEL = {"error": "error", "warning": "warning", "info": "notice"}


def escape_data(text: str) -> str:
    return text.replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")


def escape_property(text: str) -> str:
    return escape_data(text).replace(":", "%3A").replace(",", "%2C")


def line_for(finding, report) -> str:
    file, line = anchor(finding, report)
    props = []
    if file:
        props.append(f"file={escape_property(file)}")
        if line is not None:
            props.append(f"line={line}")
    where = finding.path or finding.schema
    props.append(f"title={escape_property(f'{finding.rule} {where} ({effect(finding)})')}")
    message = finding.message
    if finding.severity != "info" and finding.advice:
        message += "\n" + finding.advice
    return f"::{LEVEL[finding.severity]} {','.join(props)}::{escape_data(message)}"


def render(report, stream, **_options) -> None:
    from .text import summary_line

    for finding in report.findings:
        stream.write(line_for(finding, report) + "\n")
    for warning in report.warnings:
        stream.write(f"::warning::{escape_data(warning)}\n")
    stream.write(f"evolint: {'PASS' if report.passed else 'FAIL'} {summary_line(report)}\n")
