"""Line and column numbers for the objects of a parsed JSON document.

The standard library's C decoder gives no positions, and the pure-Python scanner that
could is several times slower. Instead: the decoder builds containers in document
order, so a preorder walk of the parsed tree meets them in the order their opening
brackets appear in the text. One regular-expression pass over the text lists those
brackets (skipping strings), and the k-th container met is the k-th bracket.
The map is built only when a location is first asked for.
"""
from __future__ import annotations

import bisect
import re

# Strings in the unrolled form (runs of plain characters, then one escape): the same
# language as "(?:[^"\\]|\\.)*", about a quarter faster on large files (benchmarks/scale.py).
_TOKENS = re.compile(r'"[^"\\]*(?:\\.[^"\\]*)*"|[{\[]')
_SPACE = re.compile(r"\s*")


class SourceMap:
    def __init__(self, text: str, tree):
        self._text = text
        self._tree = tree
        self._positions: dict[int, int] | None = None
        self._lines: list[int] | None = None

    def _build(self) -> None:
        text = self._text
        offsets = [m.start() for m in _TOKENS.finditer(text) if m.group() in "{["]
        positions: dict[int, int] = {}
        stack = [self._tree]
        index = 0
        # Iterative preorder: deep documents must not hit the recursion limit.
        while stack:
            node = stack.pop()
            if isinstance(node, dict):
                children = list(node.values())
            elif isinstance(node, list):
                children = node
            else:
                continue
            if index >= len(offsets):
                positions = {}
                break
            positions[id(node)] = offsets[index]
            index += 1
            stack.extend(reversed([c for c in children if isinstance(c, (dict, list))]))
        if index != len(offsets):
            # Duplicate keys discard containers the text still holds: positions would
            # drift, so give none rather than wrong ones.
            positions = {}
        self._positions = positions
        self._lines = [m.start() for m in re.finditer("\n", text)]

    def locate(self, node) -> tuple[int, int] | None:
        """(line, column), 1-based, of the first member inside a dict or list node."""
        if self._positions is None:
            self._build()
        offset = self._positions.get(id(node))
        if offset is None:
            return None
        # Point at the first member ("name": ... of an Avro field), not the bracket.
        inner = _SPACE.match(self._text, offset + 1).end()
        if inner < len(self._text) and self._text[inner] not in "}]":
            offset = inner
        line = bisect.bisect_left(self._lines, offset)
        start = self._lines[line - 1] + 1 if line else 0
        return line + 1, offset - start + 1

    def line_of(self, node) -> int | None:
        where = self.locate(node)
        return where[0] if where else None
