"""What ``evolint check`` runs: configuration first, then two paths or a git revision.

Command-line values win over the configuration; the configuration wins over the
defaults. Kept apart from cli.py so that the command stays a thin parser.
"""
from __future__ import annotations

from pathlib import Path
from typing import Iterable

from . import api
from .config import Config, discover, expired_comparison
from .errors import UsageError


def with_expired(report: api.Report, config: Config) -> api.Report:
    expired = expired_comparison(config, report.mode)
    if expired is not None:
        report.comparisons.append(expired)
    return report


def run_check(paths: Iterable[str], *, mode: str | None = None, format: str | None = None,
              include: Iterable[str] = (), base: str | None = None, staged: bool = False,
              config_file: str | None = None, encodings: tuple[str, ...] | None = None,
              consumers: str | None = None, witness: bool = False, cwd: str | Path = ".") -> api.Report:
    paths = tuple(paths)
    config = discover(config_file, cwd)
    consumers = consumers or config.consumers
    if base is not None or staged:
        if witness:
            raise UsageError("--witness needs OLD and NEW paths; it does not combine with --base or --staged")
        from . import consumers as impact
        from . import revision

        registry = impact.load(consumers) if consumers else None  # fails before any git work
        report = revision.check(base or "HEAD", paths, staged=staged, mode=mode, encodings=encodings,
                                format=format, include=include, config=config, cwd=cwd)
        # a git run compares only changed files, so entries for the others are not "unmatched"
        return impact.apply(report, registry) if registry else report
    if len(paths) != 2:
        raise UsageError("check needs OLD and NEW (two files or two folders), "
                         "or --base REF / --staged to compare with git")
    old, new = paths
    report = api.check(
        old, new, mode=mode or config.mode or "backward", format=format,
        policy=lambda pair: config.policy(pair.new or pair.old, mode=mode, encodings=encodings),
        options=api.Options(include=tuple(include) + config.include, settings=config.settings),
        consumers=consumers,
        witness=witness)
    counted = encodings if encodings is not None else config.encodings
    if counted:  # the policy is per file, so name the encodings counted here
        report.settings["encodings"] = list(counted)
    return with_expired(report, config)
