"""``evolint verify``: test the static verdict against the real codecs with random data.

For every compared pair of files, every root type both sides hold and both directions,
N data are drawn from the writer schema (a seeded ``random.Random`` per direction, so a
seed reproduces a run) and read with the reader schema. A failure in a direction the
static analysis calls compatible is a bug in evolint and fails the run (exit 1); a
direction it calls breaking where no sample failed is reported as not shown (random data
can miss a narrow case, and semantic changes never fail a codec).
"""
from __future__ import annotations

import random
import sys
from dataclasses import dataclass, field
from typing import Iterable

from . import __version__
from .model import Comparison, meet_all
from .witness import DIRECTIONS, Trial, module_for, open_pair

VERIFY_VERSION = 1


@dataclass
class Result:
    old: str
    new: str
    format: str
    schema: str
    direction: str
    static_ok: bool
    samples: int = 0
    failures: int = 0
    skipped: int = 0
    departures: int = 0        # failures of the codec where the specification says data resolve
    example: Trial | None = None
    departure: str | None = None
    semantic_only: bool = False  # breaking only by changes of meaning, which no codec shows
    encoding: str | None = None  # a further encoding sampled (protobuf: json); None: the main one

    @property
    def verdict(self) -> str:
        if self.failures:
            return "bug" if self.static_ok else "agree"
        return "agree" if self.static_ok else "not-shown"

    def to_json(self) -> dict:
        out = {"old": self.old, "new": self.new, "format": self.format, "schema": self.schema,
               "direction": self.direction, "static": "compatible" if self.static_ok else "breaking",
               "samples": self.samples, "failures": self.failures, "skipped": self.skipped,
               "departures": self.departures, "verdict": self.verdict, "example": None}
        if self.departure:
            out["departure"] = self.departure
        if self.semantic_only:
            out["semantic_only"] = True
        if self.encoding:
            out["encoding"] = self.encoding
        if self.example is not None:
            out["example"] = {"datum": self.example.datum, "outcome": self.example.outcome}
        return out


@dataclass
class VerifyReport:
    samples: int
    seed: int
    results: list[Result] = field(default_factory=list)
    skipped: list[dict] = field(default_factory=list)

    @property
    def bugs(self) -> list[Result]:
        return [r for r in self.results if r.verdict == "bug"]

    @property
    def passed(self) -> bool:
        return not self.bugs

    @property
    def exit_code(self) -> int:
        return 0 if self.passed else 1

    def to_json(self) -> dict:
        return {"verify_version": VERIFY_VERSION, "tool": {"name": "evolint", "version": __version__},
                "samples": self.samples, "seed": self.seed, "passed": self.passed,
                "results": [r.to_json() for r in self.results], "skipped": list(self.skipped)}


def _findings(comparison: Comparison, root: str):
    return [f for f in comparison.findings if f.schema in (root, comparison.new, comparison.old)]


def _effect(finding, encoding):
    """A finding's compatibility for one encoding: its own effect there, where it has several."""
    if not finding.effects:
        return finding.compatibility
    if encoding is None:
        return next(iter(finding.effects.values()))  # the main encoding is listed first
    return finding.effects.get(encoding, next(iter(finding.effects.values())))


def _static_ok(comparison: Comparison, root: str, direction: str, structural: bool = False,
               encoding: str | None = None) -> bool:
    found = [f for f in _findings(comparison, root) if not (structural and (f.semantic or f.undecided))]
    compat = meet_all(_effect(f, encoding) for f in found)
    return compat.backward if direction == "backward" else compat.forward


def plan(comparisons: Iterable[Comparison], options=None, encodings=()) -> tuple[list, list[dict]]:
    """(module, pair, comparison, root, direction, encoding) for every run to sample, and what was skipped."""
    jobs, skipped = [], []
    for comparison in comparisons:
        module = module_for(comparison.format)
        if module is None:
            skipped.append({"old": comparison.old, "new": comparison.new,
                            "reason": f"no witness module for {comparison.format} yet"})
            continue
        pair = open_pair(comparison, options)
        if pair is None:
            skipped.append({"old": comparison.old, "new": comparison.new,
                            "reason": "a file was added or removed; there is no pair to run"})
            continue
        further = [e for e in encodings if e in getattr(module, "ENCODINGS", ())]
        for encoding in [None, *further]:
            for direction in DIRECTIONS:
                writer, reader = pair.sides(direction)
                for root in module.roots(writer, reader):
                    jobs.append((module, pair, comparison, root, direction, encoding))
    return jobs, skipped


def sample(module, pair, comparison: Comparison, root: str, direction: str, samples: int, seed: int,
           advance=None, encoding: str | None = None) -> Result:
    writer, reader = pair.sides(direction)
    result = Result(comparison.old, comparison.new, comparison.format, root, direction,
                    _static_ok(comparison, root, direction, encoding=encoding), encoding=encoding)
    result.semantic_only = not result.static_ok and _static_ok(comparison, root, direction, True, encoding)
    # A string seed is hashed deterministically (random.seed, version 2).
    rng = random.Random(f"{seed}|{comparison.old}|{comparison.new}|{root}|{direction}|{encoding or ''}")
    for _ in range(samples):
        trial = module.run(writer, reader, root, module.random_datum(writer, root, rng), encoding)
        if trial is None:
            result.skipped += 1
        else:
            result.samples += 1
            if trial.failed and trial.departure:
                result.departures += 1
                result.departure = result.departure or trial.departure
            elif trial.failed:
                result.failures += 1
                result.example = result.example or trial
        if advance:
            advance()
    return result


def verify(old, new, *, samples: int = 200, seed: int = 0, format: str | None = None,
           include=(), encodings=(), progress: bool = False) -> VerifyReport:
    """Sample both directions of OLD -> NEW and compare what the codecs do with the static verdict.

    ``encodings`` adds further encodings to sample (Protobuf: ``"json"``, the proto3 JSON
    mapping), each set against the findings' effect on that encoding.
    """
    from .api import check
    from .formats import Options

    options = Options(include=tuple(include))
    report = check(old, new, mode="none", format=format, options=options)
    jobs, skipped = plan(report.comparisons, options, tuple(encodings))
    out = VerifyReport(samples, seed, skipped=skipped)
    if progress and jobs:
        from rich.console import Console
        from rich.progress import Progress

        with Progress(console=Console(file=sys.stderr), transient=True) as bar:
            task = bar.add_task("sampling", total=len(jobs) * samples)
            for *job, encoding in jobs:
                out.results.append(sample(*job, samples, seed, lambda: bar.advance(task), encoding))
    else:
        out.results.extend(sample(*job, samples, seed, None, encoding) for *job, encoding in jobs)
    return out


def render_text(report: VerifyReport, stream) -> None:
    import json

    from .report.text import console_for
    from rich.markup import escape

    console = console_for(stream)
    console.print(f"[bold]evolint verify[/] · {report.samples} samples per direction · seed {report.seed}")
    for r in report.results:
        style = {"agree": "green", "bug": "bold red", "not-shown": "yellow"}[r.verdict]
        static = "compatible" if r.static_ok else ("breaking (meaning only)" if r.semantic_only else "breaking")
        via = f" ({r.encoding})" if r.encoding else ""
        console.print(f"  [{style}]{r.verdict:<9}[/] {r.direction:<8} [bold]{escape(r.schema)}[/]{escape(via)}  "
                      f"[dim]{escape(r.old)} → {escape(r.new)}[/]  static {static}, "
                      f"{r.failures}/{r.samples} failed")
        if r.departures:
            console.print(f"            [dim]{r.departures} more failed where the codec departs from the "
                          f"specification: {escape(r.departure)}[/]")
        if r.example is not None and (r.verdict == "bug" or not r.static_ok):
            console.print(f"            datum: {escape(json.dumps(r.example.datum, ensure_ascii=False, default=str))}")
            console.print(f"            {escape(r.example.outcome)}")
    for s in report.skipped:
        console.print(f"  [dim]skipped   {escape(s['old'])} → {escape(s['new'])}: {escape(s['reason'])}[/]")
    bugs = report.bugs
    if bugs:
        console.print(f"[bold red]FAIL[/] {len(bugs)} direction(s) the static analysis calls compatible "
                      "failed with real data: a bug in evolint; please report it with the datum above.")
    else:
        console.print("[bold green]PASS[/] the codecs agree with the static verdict")


def render(report: VerifyReport, output: str, stream) -> None:
    if output == "json":
        import json

        json.dump(report.to_json(), stream, indent=2, ensure_ascii=False, default=str)
        stream.write("\n")
    else:
        render_text(report, stream)


__all__ = ["verify", "VerifyReport", "Result", "render"]
