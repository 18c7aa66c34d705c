"""Small helpers over the ``git`` binary: a flat set of functions, no state.

Every helper runs git with ``-z`` output where git offers it, so that file names with
spaces or newlines survive, and raises ``InputError`` (exit status 2) with git's own
one-line complaint when git refuses.
"""
from __future__ import annotations

import os
import subprocess
from dataclasses import dataclass
from pathlib import Path
from typing import Iterable, Iterator

from .errors import InputError

# git's --name-status letters: A added, C copied, D deleted, M modified, R renamed,
# T type changed, U unmerged, X unknown, B broken pairing.


@dataclass(frozen=True)
class FileChange:
    """One file's change between two trees; ``old``/``new`` are repository-relative."""

    status: str          # "A", "D", "M", "R" (C and T are reported as M)
    old: str | None
    new: str | None


def run(args: list[str], cwd: str | Path | None = None, stdin: bytes | None = None) -> bytes:
    env = {**os.environ, "GIT_OPTIONAL_LOCKS": "0", "LC_ALL": "C"}
    try:
        done = subprocess.run(["git", *args], cwd=cwd, input=stdin, capture_output=True, env=env)
    except FileNotFoundError:
        raise InputError("git is not installed or not on PATH") from None
    if done.returncode != 0:
        message = done.stderr.decode("utf-8", "replace").strip().splitlines()
        raise InputError(f"git {args[0]}: {message[0] if message else 'failed'}")
    return done.stdout


def toplevel(cwd: str | Path = ".") -> Path:
    """The root of the working tree that holds ``cwd``."""
    out = run(["rev-parse", "--show-toplevel"], cwd=cwd)
    return Path(out.decode().strip())


def prefix(cwd: str | Path = ".") -> str:
    """``cwd`` relative to the top of its working tree ("" at the top, else ending in '/')."""
    return run(["rev-parse", "--show-prefix"], cwd=cwd).decode().strip()


def resolve(ref: str, cwd: str | Path = ".") -> str:
    """The commit id a ref names; a ref that names nothing is an input error."""
    try:
        out = run(["rev-parse", "--verify", "--quiet", "--end-of-options", f"{ref}^{{commit}}"], cwd=cwd)
    except InputError:
        raise InputError(f"not a commit in this repository: {ref!r}") from None
    return out.decode().strip()


def _records(out: bytes) -> list[str]:
    return [item.decode("utf-8", "surrogateescape") for item in out.split(b"\0") if item]


def changes(ref: str, cwd: str | Path, *, staged: bool = False,
            pathspecs: Iterable[str] = ()) -> list[FileChange]:
    """Files changed between ``ref`` and the index (``staged``) or the working tree.

    Renames are paired as git detects them (``-M``); paths are relative to the top of
    the working tree.
    """
    args = ["diff", "--name-status", "-z", "-M", "--no-ext-diff", "--no-textconv"]
    if staged:
        args.append("--cached")
    args += [ref, "--", *pathspecs]
    items = iter(_records(run(args, cwd=cwd)))
    out = []
    for status in items:
        letter = status[0]
        if letter in "RC":
            old, new = next(items), next(items)
            out.append(FileChange("R" if letter == "R" else "A", old if letter == "R" else None, new))
        elif letter == "A":
            out.append(FileChange("A", None, next(items)))
        elif letter == "D":
            out.append(FileChange("D", next(items), None))
        else:
            path = next(items)
            out.append(FileChange("M", path, path))
    return out


def untracked(cwd: str | Path, pathspecs: Iterable[str] = ()) -> list[str]:
    """Files in the working tree git does not track and does not ignore (top-relative)."""
    out = run(["ls-files", "-z", "--others", "--exclude-standard", "--full-name", "--", *pathspecs], cwd=cwd)
    return _records(out)


def tree_files(ref: str, cwd: str | Path) -> dict[str, str]:
    """Every blob in the tree of ``ref``: path -> object id."""
    out = run(["ls-tree", "-r", "-z", "--full-tree", ref], cwd=cwd)
    files = {}
    for record in _records(out):
        meta, _, path = record.partition("\t")
        _mode, kind, oid = meta.split()
        if kind == "blob":
            files[path] = oid
    return files


def index_files(cwd: str | Path) -> dict[str, str]:
    """Every file staged in the index (stage 0): path -> object id."""
    out = run(["ls-files", "-z", "--stage", "--full-name"], cwd=cwd)
    files = {}
    for record in _records(out):
        meta, _, path = record.partition("\t")
        _mode, oid, stage = meta.split()
        if stage == "0":
            files[path] = oid
    return files


def read_blobs(oids: Iterable[str], cwd: str | Path) -> Iterator[tuple[str, bytes]]:
    """The contents of many objects through one ``git cat-file --batch`` process."""
    oids = list(oids)
    if not oids:
        return iter(())
    out = run(["cat-file", "--batch"], cwd=cwd, stdin="".join(f"{o}\n" for o in oids).encode())
    return _parse_batch(out, oids)


def _parse_batch(out: bytes, oids: list[str]) -> Iterator[tuple[str, bytes]]:
    pos = 0
    for oid in oids:
        end = out.index(b"\n", pos)
        header = out[pos:end].decode().split()
        if len(header) < 3 or header[1] == "missing":
            raise InputError(f"git cat-file: object {oid} is missing")
        size = int(header[2])
        start = end + 1
        yield oid, out[start:start + size]
        pos = start + size + 1  # each object is followed by a newline


def show(ref: str, path: str, cwd: str | Path) -> bytes:
    """One file as it is in ``ref`` (``git show REF:path``)."""
    return run(["show", f"{ref}:{path}"], cwd=cwd)


def materialise(files: dict[str, str], dest: Path, cwd: str | Path) -> None:
    """Write the blobs ``path -> oid`` under ``dest`` (a temporary folder, never the user's tree)."""
    by_oid: dict[str, list[str]] = {}
    for path, oid in files.items():
        by_oid.setdefault(oid, []).append(path)
    for oid, data in read_blobs(list(by_oid), cwd):
        for path in by_oid[oid]:
            target = dest / path
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)


def log_commits(path: str, cwd: str | Path) -> list[tuple[str, str]]:
    """The commits that changed ``path``, oldest first, following renames: (commit, path then)."""
    out = run(["log", "--follow", "--name-only", "--format=%x00%H", "-z", "--", path], cwd=cwd)
    commits = []
    for chunk in out.split(b"\0\0"):
        parts = [p for p in chunk.replace(b"\n", b"\0").split(b"\0") if p]
        if len(parts) >= 2:
            commits.append((parts[0].decode(), parts[1].decode("utf-8", "surrogateescape")))
    commits.reverse()
    return commits
