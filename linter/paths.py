"""Field patterns of the consumer registry, and file globs, matched against paths.

A field pattern is a dotted path whose segments are names, ``*`` (exactly one segment)
or ``**`` (any number of segments, none included). A consumer that reads a pattern is
touched by a change at a path when the two lie on one branch of the tree: a change at
``site`` touches a reader of ``site.id`` (its parent changed), and a change at
``site.id`` touches a reader of ``site`` (part of what it reads changed).
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

ONE, ANY = "*", "**"


class PatternError(ValueError):
    """A field pattern that cannot be parsed; the message says why, in one line."""


def split(path: str) -> tuple[str, ...]:
    """Segments of a dotted path; "" (the type itself) has none."""
    return tuple(path.split(".")) if path else ()


@dataclass(frozen=True)
class Pattern:
    text: str
    segments: tuple[str, ...]

    def __str__(self) -> str:
        return self.text

    @property
    def literal(self) -> bool:
        return not any(s in (ONE, ANY) for s in self.segments)

    def matches(self, path: str) -> bool:
        """The pattern names exactly this path."""
        return _walk(self.segments, split(path), early_pattern=False, early_path=False)

    def covers(self, path: str) -> bool:
        """The pattern names this path or one of its parents (the path lies inside it)."""
        return _walk(self.segments, split(path), early_pattern=True, early_path=False)

    def overlaps(self, path: str) -> bool:
        """The path and something the pattern names lie on one branch (either is a prefix)."""
        return _walk(self.segments, split(path), early_pattern=True, early_path=True)


def parse(text: str) -> Pattern:
    if not isinstance(text, str) or not text.strip():
        raise PatternError("a field pattern is an empty string")
    if text != text.strip():
        raise PatternError(f"field pattern {text!r} has leading or trailing spaces")
    segments = tuple(text.split("."))
    for seg in segments:
        if not seg:
            raise PatternError(f"field pattern {text!r} has an empty segment (a leading, trailing or double dot)")
        if "*" in seg and seg not in (ONE, ANY):
            raise PatternError(f"field pattern {text!r}: segment {seg!r} mixes a name with '*'; "
                               "use '*' for one whole segment or '**' for any depth")
        if any(ch.isspace() for ch in seg):
            raise PatternError(f"field pattern {text!r}: segment {seg!r} contains white space")
    return Pattern(text, segments)


def _walk(pattern: tuple[str, ...], path: tuple[str, ...], *, early_pattern: bool, early_path: bool) -> bool:
    """Match segment by segment.

    ``early_pattern``: success when the pattern is used up with path left over (the
    pattern names a parent of the path). ``early_path``: success when the path is used up
    with pattern left over; what is left can always be filled in, since every segment
    kind matches some segment, so the path is a parent of something the pattern names.
    """

    @lru_cache(maxsize=None)
    def go(i: int, j: int) -> bool:
        if i == len(pattern):
            return j == len(path) or early_pattern
        if j == len(path):
            return early_path or all(s == ANY for s in pattern[i:])
        seg = pattern[i]
        if seg == ANY:
            return go(i + 1, j) or go(i, j + 1)
        if seg == ONE or seg == path[j]:
            return go(i + 1, j + 1)
        return False

    return go(0, 0)


# File globs: '**' spans directories, '*' and '?' stay inside one, '[...]' a class.
GLOB_CHARS = set("*?[")


def is_glob(text: str) -> bool:
    return "/" in text or bool(GLOB_CHARS & set(text))


@lru_cache(maxsize=256)
def _glob_regex(glob: str) -> re.Pattern:
    out, i = [], 0
    while i < len(glob):
        ch = glob[i]
        if glob.startswith("**/", i):
            out.append(r"(?:[^/]*/)*")
            i += 3
        elif glob.startswith("**", i):
            out.append(r".*")
            i += 2
        elif ch == "*":
            out.append(r"[^/]*")
            i += 1
        elif ch == "?":
            out.append(r"[^/]")
            i += 1
        elif ch == "[" and glob.find("]", i + 2) != -1:
            end = glob.find("]", i + 2)
            body = glob[i + 1:end]
            if body.startswith("!"):
                body = "^" + body[1:]
            out.append("[" + body.replace("\\", "\\\\") + "]")
            i = end + 1
        else:
            out.append(re.escape(ch))
            i += 1
    return re.compile("".join(out))


def glob_matches(glob: str, file: str) -> bool:
    """Whether a file glob matches a file path, or a trailing part of it of whole segments.

    Displayed paths may be absolute or relative to wherever the run started, so a glob
    written relative to a schema tree (``billing/*.avsc``) matches the path's tail.
    """
    file = file.replace("\\", "/")
    regex = _glob_regex(glob)
    if glob.startswith("/"):
        return bool(regex.fullmatch(file))
    parts = file.split("/")
    return any(regex.fullmatch("/".join(parts[k:])) for k in range(len(parts)))
