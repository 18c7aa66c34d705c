"""Check the working tree, or the index, against a git revision.

Only files git reports as changed are compared: an unchanged file has no findings. The
OLD side (and, with ``staged``, the NEW side) is written from git's object store into a
temporary folder outside the user's tree, with every .proto file of that revision when
a .proto file changed, so that imports resolve against the same revision.
"""
from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path
from typing import Iterable

from . import git
from .api import Pair, Report, compare
from .config import Config, expired_comparison
from .errors import InputError, UsageError
from .formats import EXTENSIONS, Options, looks_like_avro
from .model import MODES

EMPTY_TREE = "4b825dc642cb6eb9a060e54bf8d69288fbee4904"  # git's well-known empty tree (SHA-1)


def scratch(prefix: str) -> tempfile.TemporaryDirectory:
    """A temporary folder, in memory where the system offers one (/dev/shm) and TMPDIR is unset.

    Writing a thousand small files to a busy disk took 3 ms each here, against 0.05 ms in
    memory (measured with benchmarks/repo_check.py's files).
    """
    fast = "/dev/shm"
    use = None if os.environ.get("TMPDIR") or not (os.path.isdir(fast) and os.access(fast, os.W_OK)) else fast
    return tempfile.TemporaryDirectory(prefix=prefix, dir=use)


def _base_tree(ref: str, cwd: Path) -> str:
    try:
        return git.resolve(ref, cwd)
    except InputError:
        if ref == "HEAD":  # the first commit of a repository: everything is added
            return EMPTY_TREE
        raise


def _is_schema_json(path: Path) -> bool:
    """Whether a .json file is a schema (JSON Schema or Avro) rather than some other JSON."""
    try:
        data = json.loads(path.read_text(encoding="utf-8-sig"))
    except (OSError, ValueError, RecursionError):
        return True  # let the adapter report what is wrong, with its position
    if looks_like_avro(data):
        return True
    if not isinstance(data, dict):
        return False
    dialect = data.get("$schema")
    return (isinstance(dialect, str) and "json-schema.org" in dialect) or (
        "$id" in data and any(k in data for k in ("type", "properties", "$defs", "definitions")))


def _move_include(paths: Iterable[str], top: Path, dest: Path) -> tuple[str, ...]:
    """Import paths inside the repository, moved into a materialised copy of it."""
    out = []
    for inc in paths:
        rel = os.path.relpath(os.path.abspath(inc), top)
        out.append(inc if rel.startswith("..") else str(dest / rel))
    return tuple(out)


def check(ref: str = "HEAD", paths: Iterable[str] = (), *, staged: bool = False, mode: str | None = None,
          encodings: tuple[str, ...] | None = None, format: str | None = None,
          include: Iterable[str] = (), config: Config | None = None, cwd: str | Path = ".",
          jobs: int | None = None) -> Report:
    """Compare the working tree (or the index, ``staged``) with ``ref``; ``paths`` limit the files."""
    if mode is not None and mode not in MODES:
        raise UsageError(f"unknown mode {mode!r} (known: {', '.join(MODES)})")
    config = config or Config()
    cwd = Path(cwd).resolve()
    top = git.toplevel(cwd)
    base = _base_tree(ref, cwd)
    pathspecs = tuple(paths)
    changed = git.changes(base, cwd, staged=staged, pathspecs=pathspecs)
    if not staged:
        changed += [git.FileChange("A", None, p) for p in git.untracked(cwd, pathspecs)]

    def counts(p: str | None) -> bool:
        return p is not None and Path(p).suffix.lower() in EXTENSIONS and config.is_schema(top / p)

    changed = [c for c in changed if counts(c.new) or counts(c.old)]
    include = tuple(include) + config.include
    run_mode = mode or config.mode or "backward"
    with scratch("evolint-git-") as tmp:
        old_root, new_root = Path(tmp) / "old", Path(tmp) / "new"
        any_proto = any(Path(p).suffix.lower() == ".proto" for c in changed for p in (c.old, c.new) if p)
        # Blobs are named as git names them (REF:path, :0:path for the index), so no tree
        # listing is needed unless Protobuf imports call for every .proto file of the side.
        wanted = {c.old: f"{base}:{c.old}" for c in changed if c.old}
        if any_proto:
            wanted.update({p: oid for p, oid in git.tree_files(base, cwd).items() if p.endswith(".proto")})
        git.materialise(wanted, old_root, cwd)
        if staged and changed:
            wanted = {c.new: f":0:{c.new}" for c in changed if c.new}
            if any_proto:
                wanted.update({p: oid for p, oid in git.index_files(cwd).items() if p.endswith(".proto")})
            git.materialise(wanted, new_root, cwd)
            new_home = new_root
        else:
            new_home = top

        inside = cwd.relative_to(top).as_posix() + "/" if cwd != top else ""

        def shown(p: str) -> str:
            if p.startswith(inside):  # the common case, without a relpath per file
                return p[len(inside):]
            return Path(os.path.relpath(top / p, cwd)).as_posix()

        pairs, where, skipped = [], {}, []
        for c in changed:
            old = old_root / c.old if c.old else None
            new = new_home / c.new if c.new else None
            sniff = new or old
            if sniff.suffix.lower() == ".json" and not config.schemas and not _is_schema_json(sniff):
                skipped.append(shown(c.new or c.old))
                continue
            # The absent side of an added or deleted file is named as git names it.
            pair = Pair(old, new, f"{ref}:{shown(c.old)}" if c.old else "/dev/null",
                        shown(c.new) if c.new else "/dev/null")
            pairs.append(pair)
            where[pair] = top / (c.new or c.old)

        options = Options(include=_move_include(include, top, new_root) if staged else include,
                          settings=config.settings)
        old_options = Options(include=_move_include(include, top, old_root), settings=config.settings)
        comparisons = compare(
            pairs, lambda pair: config.policy(where[pair], mode=mode, encodings=encodings),
            format=format, options=options, old_options=old_options, jobs=jobs)
    expired = expired_comparison(config, run_mode)
    if expired is not None:
        comparisons.append(expired)
    report = Report(mode=run_mode, comparisons=comparisons,
                    settings={"base": ref, "staged": staged})
    counted = encodings if encodings is not None else config.encodings
    if counted:
        report.settings["encodings"] = list(counted)
    if skipped:
        report.warnings.append(f"skipped {len(skipped)} .json file(s) that are neither JSON Schema nor Avro: "
                               f"{', '.join(skipped[:5])}{' ...' if len(skipped) > 5 else ''} "
                               "(list your schema files under 'schemas' in the configuration to choose)")
    return report
