"""Helpers for the fuzz and safety tests: run the real entry point in-process, judge the
outcome, and guard against network use."""
from __future__ import annotations

import contextlib
import importlib.util
import io
import os
import shutil
import sys
import tempfile
from pathlib import Path

import pytest

from linter import cli


def landed(module: str) -> bool:
    """Whether a module another engineer is writing has reached this branch yet."""
    try:
        return importlib.util.find_spec(module) is not None
    except ModuleNotFoundError:
        return False


def needs(module: str):
    return pytest.mark.skipif(not landed(module), reason=f"{module} has not landed on this branch yet")


@contextlib.contextmanager
def _fd2_captured():
    """Capture file descriptor 2 as well: compiled code (protoc) writes there directly."""
    sys.stderr.flush()
    saved = os.dup(2)
    with tempfile.TemporaryFile() as sink:
        os.dup2(sink.fileno(), 2)
        box = []
        try:
            yield box
        finally:
            os.dup2(saved, 2)
            os.close(saved)
            sink.seek(0)
            box.append(sink.read().decode("utf-8", "replace"))


def run_main(args: list[str]) -> tuple[int, str, str]:
    """``linter.cli.main`` in-process, as the console script runs it: (status, stdout, stderr)."""
    out, err = io.StringIO(), io.StringIO()
    with _fd2_captured() as raw, contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            cli.main(args)
            status = 0
        except SystemExit as exc:
            status = exc.code if isinstance(exc.code, int) else 2
    return status, out.getvalue(), raw[0] + err.getvalue()


def assert_handled(status: int, stdout: str, stderr: str, what: str = "") -> None:
    """The fuzz contract: a report (0/1) or one clean line of error (2); never a crash."""
    assert "Traceback" not in stderr, f"{what}\n{stderr}"
    assert status in (0, 1, 2), f"exit {status} on {what!r}\n{stderr}"
    if status == 2:
        lines = stderr.strip().splitlines()
        assert len(lines) == 1, f"{what}: stderr is not one line:\n{stderr}"
        assert lines[0].startswith("evolint: error: "), lines[0]
    else:
        assert stdout.strip(), f"{what}: no report on exit {status}"


class Scratch:
    """A folder reused by every example of one test (hypothesis runs examples in one test call)."""

    def __init__(self):
        self.root = Path(tempfile.mkdtemp(prefix="evolint-fuzz-"))

    def pair(self, old: str | bytes, new: str | bytes, ext: str) -> tuple[str, str]:
        paths = []
        for side, content in (("old", old), ("new", new)):
            path = self.root / f"{side}{ext}"
            if isinstance(content, bytes):
                path.write_bytes(content)
            else:
                path.write_text(content, encoding="utf-8", errors="surrogatepass")
            paths.append(str(path))
        return tuple(paths)

    def file(self, name: str, content: str) -> str:
        path = self.root / name
        path.write_text(content, encoding="utf-8", errors="surrogatepass")
        return str(path)

    def close(self):
        shutil.rmtree(self.root, ignore_errors=True)


class NetworkUsed(OSError):
    pass


@contextlib.contextmanager
def no_network():
    """Fail any connection or name lookup; record each attempt (an adapter might swallow the
    error, so the list is what a test asserts on)."""
    import socket

    attempts = []

    def refuse(*args, **_kwargs):
        attempts.append(args)
        raise NetworkUsed(f"evolint tried to use the network: {args!r}")

    originals = {name: getattr(socket, name) for name in ("create_connection", "getaddrinfo")}
    connect, connect_ex = socket.socket.connect, socket.socket.connect_ex
    try:
        socket.create_connection = lambda *a, **k: refuse("create_connection", *a)
        socket.getaddrinfo = lambda *a, **k: refuse("getaddrinfo", *a)
        socket.socket.connect = lambda self, *a: refuse("connect", *a)
        socket.socket.connect_ex = lambda self, *a: refuse("connect_ex", *a)
        yield attempts
    finally:
        for name, fn in originals.items():
            setattr(socket, name, fn)
        socket.socket.connect, socket.socket.connect_ex = connect, connect_ex
