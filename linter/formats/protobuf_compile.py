"""Compile .proto files with the protoc bundled in grpcio-tools, in-process.

protoc writes a FileDescriptorSet (with imports and source info, for lines and comments)
into a temporary directory, never next to the user's files. Its diagnostics go to the
process's file descriptor 2 (C++ code, not ``sys.stderr``), so that descriptor is
redirected into a temporary file for the duration of the call.
"""
from __future__ import annotations

import os
import re
import tempfile
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Iterable, Sequence

from ..errors import InputError

DATA = Path(__file__).resolve().parent.parent / "data"
# protoc's gcc-style diagnostics: "file:line:column: message" (line and column optional).
DIAGNOSTIC = re.compile(r"^(?P<file>[^:]+?):(?:(?P<line>\d+):(?P<column>\d+):)?\s*(?P<message>.*)$")


@lru_cache(maxsize=1)
def well_known_dir() -> str:
    """The folder of google/protobuf/*.proto that grpcio-tools ships."""
    import grpc_tools

    return str(Path(grpc_tools.__file__).resolve().parent / "_proto")


@dataclass(frozen=True)
class Source:
    """One input file: its path on disk, the name reported to the user, its import root."""

    path: Path
    display: str
    root: Path

    @property
    def virtual(self) -> str:
        """The file's name as protoc sees it: relative to its import root."""
        return _virtual(self.path, self.root)


@lru_cache(maxsize=4096)
def _virtual(path: Path, root: Path) -> str:
    return path.resolve().relative_to(root.resolve()).as_posix()


def compile_set(sources: Sequence[Source], include: Iterable[str] = ()):
    """Compile ``sources`` in one protoc call; return the parsed FileDescriptorSet."""
    from google.protobuf import descriptor_pb2
    from grpc_tools import protoc

    roots: list[str] = []
    for directory in [*(str(s.root) for s in sources), *include, str(DATA), well_known_dir()]:
        resolved = str(Path(directory).resolve())
        if resolved not in roots:
            roots.append(resolved)
    for directory in include:
        if not Path(directory).is_dir():
            raise InputError("import path is not a directory", str(directory))
    with tempfile.TemporaryDirectory(prefix="evolint-protoc-") as tmp:
        out = Path(tmp) / "set.pb"
        args = ["protoc", *(f"-I{r}" for r in roots), "--include_imports", "--include_source_info",
                f"--descriptor_set_out={out}", *(s.virtual for s in sources)]
        status, diagnostics = _run(protoc.main, args, Path(tmp) / "stderr.txt")
        if status != 0 or not out.is_file():
            raise _first_error(diagnostics, sources, roots)
        return descriptor_pb2.FileDescriptorSet.FromString(out.read_bytes())


def _run(main, args: list[str], capture: Path) -> tuple[int, str]:
    import sys

    sys.stderr.flush()
    saved = os.dup(2)
    try:
        with open(capture, "wb") as sink:
            os.dup2(sink.fileno(), 2)
            try:
                status = main(args)
            finally:
                os.dup2(saved, 2)
    finally:
        os.close(saved)
    return status, capture.read_text(encoding="utf-8", errors="replace")


def _first_error(diagnostics: str, sources: Sequence[Source], roots: list[str]) -> InputError:
    """The most telling diagnostic as an InputError naming the user's file and position."""
    by_virtual = {s.virtual: s.display for s in sources}
    lines = [line.strip() for line in diagnostics.splitlines() if line.strip()]
    lines = [line for line in lines if not line.startswith("warning:") and ": warning:" not in line]
    parsed = []
    for line in lines:
        match = DIAGNOSTIC.match(line)
        if match:
            parsed.append(match)
    # Prefer a diagnostic with a position in the user's files; "Import ... had errors" only
    # echoes an earlier one, unless that earlier one (a file not found) has no position.
    positioned = [m for m in parsed if m["line"]]
    primary = [m for m in positioned if "was not found or had errors" not in m["message"]]
    best = (primary or positioned or parsed or [None])[0]
    if best is None:
        display = sources[0].display if sources else None
        return InputError(f"protoc failed: {' '.join(lines) or 'no diagnostic'}", display)
    file = by_virtual.get(best["file"]) or _on_disk(best["file"], roots)
    message = best["message"]
    unplaced = [m for m in parsed if not m["line"] and m is not best]
    if unplaced:
        message = f"{message} ({unplaced[0]['file']}: {unplaced[0]['message']})"
    return InputError(message, file, int(best["line"]) if best["line"] else None,
                      int(best["column"]) if best["column"] else None)


def _on_disk(virtual: str, roots: list[str]) -> str:
    for root in roots:
        candidate = Path(root) / virtual
        if candidate.is_file():
            return str(candidate)
    return virtual


def pool_of(fds):
    """A fresh descriptor pool holding every file of one side (never the default pool)."""
    from google.protobuf import descriptor_pool

    pool = descriptor_pool.DescriptorPool()
    for proto in fds.file:
        try:
            pool.Add(proto)
        except (TypeError, ValueError) as exc:  # protoc accepted it; the runtime may not
            raise InputError(f"the protobuf runtime cannot load this file: {exc}", proto.name) from None
    return pool
