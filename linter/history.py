"""A schema's history: each version against its predecessor, or against every earlier one.

Versions come from a folder of numbered folders (``v1/``, ``v2/``, ... paired by relative
path), from numbered files (``meter_reading.1.avsc``, ``meter_reading.2.avsc``), or from
the commits of one file in git (``--git``, following renames). Numbers sort as numbers,
so ``v10`` comes after ``v9``.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterable

from . import api
from .config import Config
from .errors import UsageError
from .formats import EXTENSIONS

FOLDER = re.compile(r"^v?(\d+)$", re.I)
NUMBERED = re.compile(r"^(?P<stem>.+)\.(?P<n>\d+)(?P<ext>\.[A-Za-z]+)$")
PROGRESS_AFTER = 5  # steps; shorter histories finish before a bar would help


@dataclass(frozen=True)
class Version:
    label: str                 # what the tables call it: "v2", "meter_reading.2.avsc", "1a2b3c4d5e"
    path: Path                 # the file or folder to read
    display: str = ""          # how findings name the file ("" = its path)
    where: Path | None = None  # the path configuration globs are matched against ("" = path)


@dataclass
class Step:
    old: Version
    new: Version
    report: api.Report


@dataclass
class History:
    mode: str
    steps: list[Step] = field(default_factory=list)

    @property
    def passed(self) -> bool:
        return all(step.report.passed for step in self.steps)

    @property
    def exit_code(self) -> int:
        return 0 if self.passed else 1


def numbered_folders(folder: Path) -> list[Version]:
    found = [(int(m[1]), p) for p in folder.iterdir() if p.is_dir() and (m := FOLDER.match(p.name))]
    return [Version(p.name, p, str(p)) for _, p in sorted(found)]


def numbered_files(folder: Path, stem: str | None = None, ext: str | None = None) -> dict[tuple[str, str], list[Version]]:
    groups: dict[tuple[str, str], list[tuple[int, Path]]] = {}
    for p in folder.iterdir():
        m = NUMBERED.match(p.name)
        if p.is_file() and m and m["ext"].lower() in EXTENSIONS:
            key = (m["stem"], m["ext"])
            if (stem, ext) == (None, None) or key == (stem, ext):
                groups.setdefault(key, []).append((int(m["n"]), p))
    return {key: [Version(p.name, p, str(p)) for _, p in sorted(items)] for key, items in sorted(groups.items())}


def local_histories(target: Path) -> list[list[Version]]:
    """The histories a folder or a numbered file holds (one per numbered file name)."""
    if not target.exists():
        raise UsageError(f"no such file or folder: {target}")
    if target.is_dir():
        folders = numbered_folders(target)
        if folders:
            return [folders]
        groups = numbered_files(target)
        if groups:
            return list(groups.values())
        raise UsageError(f"{target}: no numbered versions (folders v1, v2, ... or files name.1.avsc, name.2.avsc)")
    m = NUMBERED.match(target.name)
    if not m:
        raise UsageError(f"{target}: not a numbered version (name.1.avsc); use a folder of versions, or --git")
    return [numbered_files(target.parent, m["stem"], m["ext"])[(m["stem"], m["ext"])]]


def git_history(target: Path, tmp: Path) -> list[Version]:
    """The versions of one file in the commits that changed it, written under ``tmp``."""
    from . import git

    top = git.toplevel(target.parent if target.parent.exists() else ".")
    rel = target.resolve().relative_to(top).as_posix() if target.exists() else target.as_posix()
    commits = git.log_commits(rel, top)
    if not commits:
        raise UsageError(f"{target}: git has no commits of this file")
    names = [f"{commit}:{path}" for commit, path in commits]
    versions = []
    for n, ((commit, path), (_, data)) in enumerate(zip(commits, git.read_blobs(names, top)), 1):
        dest = tmp / f"{n:05}" / path
        dest.parent.mkdir(parents=True, exist_ok=True)
        dest.write_bytes(data)
        versions.append(Version(commit[:10], dest, f"{commit[:10]}:{path}", top / path))
    return versions


def pairs_of(versions: list[Version], every_earlier: bool) -> list[tuple[Version, Version]]:
    if every_earlier:
        return [(versions[j], versions[i]) for i in range(1, len(versions)) for j in range(i)]
    return list(zip(versions, versions[1:]))


def _compare(old: Version, new: Version, mode: str | None, config: Config, format, include) -> api.Report:
    if old.path.is_dir():
        pairs = api.pairs(old.path, new.path)
    else:
        pairs = [api.Pair(old.path, new.path, old.display or str(old.path), new.display or str(new.path))]
    where = new.where

    def policy(pair):
        return config.policy(where or pair.new or pair.old, mode=mode)

    comparisons = api.compare(pairs, policy, format=format,
                              options=api.Options(include=tuple(include) + config.include,
                                                          settings=config.settings))
    return api.Report(mode=mode or config.mode or "backward", comparisons=comparisons)


def _progress(total: int):
    import sys

    if total <= PROGRESS_AFTER or not sys.stderr.isatty():
        return None
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    return Progress(TextColumn("comparing versions"), BarColumn(), MofNCompleteColumn(), TimeRemainingColumn(),
                    console=Console(stderr=True), transient=True)


def run(target: str | Path, *, use_git: bool = False, every_earlier: bool = False, mode: str | None = None,
        format: str | None = None, include: Iterable[str] = (), config: Config | None = None) -> History:
    config = config or Config()
    target = Path(target)
    history = History(mode=mode or config.mode or "backward")
    from .revision import scratch

    with scratch("evolint-history-") as tmp:
        if use_git:
            histories = [git_history(target, Path(tmp))]
        else:
            histories = local_histories(target)
        steps = [pair for versions in histories for pair in pairs_of(versions, every_earlier)]
        if not steps:
            raise UsageError(f"{target}: only one version; a history needs two or more")
        bar = _progress(len(steps))
        task = bar.add_task("versions", total=len(steps)) if bar else None
        if bar:
            bar.start()
        try:
            for old, new in steps:
                history.steps.append(Step(old, new, _compare(old, new, mode, config, format, include)))
                if bar:
                    bar.advance(task)
        finally:
            if bar:
                bar.stop()
    return history


HISTORY_VERSION = 1


def to_json(history: History) -> dict:
    from .report.json import to_json as report_json

    return {
        "history_version": HISTORY_VERSION,
        "mode": history.mode,
        "passed": history.passed,
        "steps": [{"old": s.old.label, "new": s.new.label, "report": report_json(s.report)} for s in history.steps],
    }


def render_json(history: History, stream) -> None:
    import json

    json.dump(to_json(history), stream, indent=2, ensure_ascii=False, default=str)
    stream.write("\n")


def render_text(history: History, stream, color: bool | None = None) -> None:
    """One table per step: the findings of that version against the earlier one."""
    from rich.markup import escape
    from rich.table import Table

    from .report.text import STYLE, VERDICT, console_for, direction

    console = console_for(stream, color)
    failed = 0
    for step in history.steps:
        report = step.report
        verdict = VERDICT[report.compatibility.value]
        mark = "[bold green]PASS[/]" if report.passed else "[bold red]FAIL[/]"
        failed += not report.passed
        title = f"{mark} {escape(step.new.label)} against {escape(step.old.label)}: {escape(verdict)}"
        if not report.findings:
            console.print(title + " [dim](no findings)[/]")
            continue
        table = Table(title=title, title_justify="left", show_lines=False, expand=True)
        table.add_column("severity", no_wrap=True)
        table.add_column("rule", no_wrap=True)
        table.add_column("field", overflow="fold", ratio=2)
        table.add_column("effect", no_wrap=True)
        table.add_column("message", overflow="fold", ratio=5)
        from .report.text import ORDER

        for f in sorted(report.findings, key=lambda f: (f.schema, ORDER[f.severity], f.path)):
            style = STYLE[f.severity]
            # The root type's last name keeps the column narrow; the full name is in the JSON.
            short = f.schema.rsplit(".", 1)[-1] if "/" not in f.schema else f.schema.rsplit("/", 1)[-1]
            table.add_row(f"[{style}]{f.severity}[/]", f.rule, escape(f"{short}.{f.path}" if f.path else short),
                          direction(f), escape(f.message))
        console.print(table)
    total = len(history.steps)
    summary = f"{total} step{'s' if total != 1 else ''}, {failed} failing mode '{history.mode}'"
    console.print(f"[{'bold red' if failed else 'bold green'}]{'FAIL' if failed else 'PASS'}[/] {summary}")
