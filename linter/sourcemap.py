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
import operator
import re
from itertools import accumulate

# Strings in the unrolled form (runs of plain characters, then one escape): the same
# language as "(?:[^"\\]|\\.)*", about a quarter faster on large files (benchmarks/scale.py).
_STRING = r'"[^"\\]*(?:\\.[^"\\]*)*"'
_TOKENS = re.compile(_STRING + r'|[{\[]')
# One match per bracket: everything up to the next bracket outside a string (atomic and
# possessive, so nothing backtracks), then the bracket; the text after the last bracket
# matches with no group. Matches are contiguous from offset 0, so none starts inside a
# string. A match per string as well (_TOKENS) cost a third more (benchmarks/scale.py).
_BRACKETS = re.compile(r'(?:[^"{\[]++|(?>' + _STRING + r'))*+(?:([{\[])|\Z)')
_SPACE = re.compile(r"\s*")


class SourceMap:
    def __init__(self, text: str, tree):
        self._text = text
        self._tree = tree
        self._positions: dict[int, int] | None = None
        self._lines: list[int] | None = None

    def _build(self) -> None:
        text = self._text
        offsets = [s for s in map(operator.methodcaller("start", 1), _BRACKETS.finditer(text)) if s >= 0]
        order: list[int] = []  # ids of the containers in preorder
        stack = [self._tree] if isinstance(self._tree, (dict, list)) else []
        push, visit, containers = stack.extend, order.append, (dict, list)
        # Iterative preorder: deep documents must not hit the recursion limit.
        while stack:
            node = stack.pop()
            visit(id(node))
            kids = [c for c in (node.values() if isinstance(node, dict) else node) if isinstance(c, containers)]
            if kids:
                kids.reverse()
                push(kids)
        # Duplicate keys discard containers the text still holds: positions would drift,
        # so give none rather than wrong ones.
        positions = dict(zip(order, offsets)) if len(order) == len(offsets) else {}
        self._positions = positions
        # Offsets of the newlines, from the lengths of the lines between them.
        parts = text.split("\n")
        parts.pop()
        self._lines = list(map(operator.add, accumulate(map(len, parts)), range(len(parts))))

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
