"""Reporters: each renders a Report to a stream it is handed.

A reporter is a function ``render(report, stream, **options)``; the CLI looks them up
in ``REPORTERS`` and imports only the one a run asks for.
"""
from __future__ import annotations

import importlib

REPORTERS = {"text": "text", "json": "json", "sarif": "sarif", "markdown": "markdown",
             "annotations": "annotations"}


def render(name: str, report, stream, **options) -> None:
    module = importlib.import_module(f".{REPORTERS[name]}", __name__)
    module.render(report, stream, **options)
