"""Line and column numbers for the objects of a parsed JSON document.

The standard library's C decoder gives no positions, and the pure-Python scanner that
could is several times slower. Instead: the decoder builds containers in document
order, so a preorder walk of the parsed tree meets them in the order their opening
brackets appear in the text, and the k-th container met is the k-th bracket. When the
text holds exactly as many brackets as the tree holds containers, no string holds one,
and the k-th bracket is found by a plain search of the stretch of text that holds it;
otherwise one regular-expression pass lists the brackets outside strings. A reader that
already walked the tree in that order may hand its list over (``known_preorder``); the
map is built only when a location is first asked for.
"""
from __future__ import annotations

import bisect
import operator
import re
from itertools import accumulate, repeat

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
# Brackets are counted per stretch of this many characters, so that a lookup searches one
# stretch (a few dozen brackets in a schema file), not the text.
_STRETCH = 2048


def preorder(tree) -> list[int]:
    """Ids of the containers of a parsed JSON tree, in document (pre)order.

    Iterative, so deep documents do not hit the recursion limit; a stack of iterators
    and exact class tests ran in less than half the time of a stack of child lists.
    """
    order: list[int] = []
    visit = order.append
    stack = [iter((tree,))]
    push, pop = stack.append, stack.pop
    while stack:
        for child in stack[-1]:
            cls = child.__class__
            if cls is dict:
                visit(id(child))
                push(iter(child.values()))
                break
            if cls is list:
                visit(id(child))
                push(iter(child))
                break
        else:
            pop()
    return order


def _brackets_in(text: str, start: int, end: int) -> list[int]:
    """Sorted offsets of the brackets in ``text[start:end]`` (str.find runs in C; a loop
    over its hits took half the time of splitting, benchmarks/scale.py)."""
    out: list[int] = []
    add, find = out.append, text.find
    for char in "{[":
        i = find(char, start, end)
        while i >= 0:
            add(i)
            i = find(char, i + 1, end)
    out.sort()
    return out


def _brackets_before_stretches(text: str) -> list[int]:
    """How many brackets the text holds before each stretch, and in all (the last entry).

    Counted in C; listing every bracket's offset instead cost more than all the lookups
    a comparison makes (benchmarks/instructions.py)."""
    starts = range(0, len(text), _STRETCH)
    ends = range(_STRETCH, len(text) + _STRETCH, _STRETCH)
    per_stretch = map(operator.add, map(text.count, repeat("{"), starts, ends),
                      map(text.count, repeat("["), starts, ends))
    return list(accumulate(per_stretch, initial=0))


class SourceMap:
    def __init__(self, text: str, tree):
        self._text = text
        self._tree = tree
        # Built on the first lookup: either each container's preorder index (the text's
        # brackets are the containers'), with the bracket counts before each stretch and
        # the offsets in each stretch searched so far; or, where strings hold brackets,
        # each container's offset from the pattern that passes over strings.
        self._index: dict[int, int] | None = None
        self._before: list[int] | None = None
        self._stretches: dict[int, list[int]] = {}
        self._positions: dict[int, int] | None = None
        # The containers' ids in preorder, when the caller's own walk listed them
        # (``known_preorder``); entries may be None for containers never located.
        self._preorder: list | None = None
        # (offset, line, offset of that line's start), sorted by offset: each line number
        # is counted from the nearest mark before it. Splitting a large file into lines
        # up front cost more than the rest of the map (benchmarks/scale.py).
        self._marks: list[tuple[int, int, int]] = [(0, 0, 0)]

    def known_preorder(self, order: list) -> None:
        """Use ``order`` (what ``preorder(tree)`` would list) instead of walking the tree."""
        self._preorder, self._index, self._positions = order, None, None

    def walk_fully(self) -> None:
        """Forget a given preorder with gaps: the next lookup walks the tree itself."""
        if self._preorder is not None:
            self._preorder, self._index, self._positions = None, None, None

    def _build(self) -> None:
        if self._before is None:
            self._before = _brackets_before_stretches(self._text)
        total = self._before[-1]
        order = self._preorder
        if order is None or len(order) != total:
            # No list given, or one the text's brackets do not confirm (brackets inside
            # strings, or a miscount): the tree's own walk decides.
            order = preorder(self._tree)
        if len(order) == total:
            # As many brackets as containers: none is inside a string. (A gap, None, in a
            # given list is never looked up: ids are not None.)
            self._index = dict(zip(order, range(total)))
            return
        # More brackets than containers: some are inside strings, so the k-th bracket
        # is found by the pattern that passes over strings.
        offsets = [s for s in map(operator.methodcaller("start", 1), _BRACKETS.finditer(self._text)) if s >= 0]
        # Duplicate keys discard containers the text still holds: positions would drift,
        # so give none rather than wrong ones. (The count check above cannot tell those
        # apart from as many brackets inside strings; the two together are not met in
        # schema files, and would shift line numbers, never verdicts.)
        self._positions = dict(zip(order, offsets)) if len(order) == len(offsets) else {}

    def offset_of(self, node) -> int | None:
        """The offset of the bracket that opens a dict or list of the tree, if known."""
        if self._index is None and self._positions is None:
            self._build()
        if self._positions is not None:
            return self._positions.get(id(node))
        k = self._index.get(id(node))
        if k is None:
            return None
        before = self._before
        stretch = bisect.bisect_right(before, k) - 1  # the last to start before bracket k
        found = self._stretches.get(stretch)
        if found is None:
            start = stretch * _STRETCH
            found = self._stretches[stretch] = _brackets_in(self._text, start, start + _STRETCH)
        return found[k - before[stretch]]

    def _line_and_column(self, offset: int) -> tuple[int, int]:
        marks, text = self._marks, self._text
        i = bisect.bisect_right(marks, offset, key=operator.itemgetter(0)) - 1
        at, line, start = marks[i]
        more = text.count("\n", at, offset)
        if more:
            line += more
            start = text.rfind("\n", at, offset) + 1
        marks.insert(i + 1, (offset, line, start))
        return line + 1, offset - start + 1

    def locate(self, node) -> tuple[int, int] | None:
        """(line, column), 1-based, of the first member inside a dict or list node."""
        offset = self.offset_of(node)
        if offset is None:
            return None
        # Point at the first member ("name": ... of an Avro field), not the bracket.
        inner = _SPACE.match(self._text, offset + 1).end()
        if inner < len(self._text) and self._text[inner] not in "}]":
            offset = inner
        return self._line_and_column(offset)

    def line_of(self, node) -> int | None:
        where = self.locate(node)
        return where[0] if where else None
