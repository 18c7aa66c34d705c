"""Small pieces the CI-facing reporters share: where a finding is, and what it does."""
from __future__ import annotations


def strip_revision(file: str, report) -> str:
    """A file named ``REF:path`` (the OLD side of a git run) as its path in the tree."""
    base = report.settings.get("base")
    if base and file.startswith(f"{base}:"):
        return file[len(base) + 1:]
    return file


def anchor(finding, report):
    """The location to attach a finding to: the NEW side where it exists, else the OLD side."""
    loc = finding.new_loc or finding.old_loc
    if loc is None:
        return None, None
    return strip_revision(loc.file, report), loc.line


def effect(finding) -> str:
    if finding.semantic:
        return "changes meaning"
    if finding.undecided:
        return "undecided"
    broken = finding.compatibility.breaks()
    return "breaks " + " and ".join(broken) if broken else "compatible"
