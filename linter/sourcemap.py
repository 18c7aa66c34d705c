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
from itertools import accumulate, compress, repeat

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


def preorder(tree) -> list:
    """The containers (dicts and lists) of a parsed JSON tree, in document (pre)order.

    Iterative, so deep documents do not hit the recursion limit; a stack of iterators
    and exact class tests ran in less than half the time of a stack of child lists.
    """
    order: list = []
    visit = order.append
    stack = [iter((tree,))]
    push, pop = stack.append, stack.pop
    while stack:
        for child in stack[-1]:
            cls = child.__class__
            if cls is dict:
                visit(child)
                push(iter(child.values()))
                break
            if cls is list:
                visit(child)
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
        # The containers in preorder: the caller's own walk may list them
        # (``known_preorder``; entries may be None for containers never located), else
        # the tree is walked on the first lookup.
        self._order: list | None = None
        self._given = False
        # Checked on the first lookup: either the text's brackets are the containers'
        # (``_before`` holds the bracket counts before each stretch, ``_stretches`` the
        # offsets in each stretch searched so far, ``_index`` each container's preorder
        # index once a single lookup needs it), or strings hold brackets and
        # ``_positions`` maps each container to its offset from the pattern that passes
        # over strings.
        self._checked = False
        self._before: list[int] | None = None
        self._stretches: dict[int, list[int]] = {}
        self._index: dict[int, int] | None = None
        self._positions: dict[int, int] | None = None
        # (offset, line, offset of that line's start), sorted by offset: each line number
        # is counted from the nearest mark before it. Splitting a large file into lines
        # up front cost more than the rest of the map (benchmarks/scale.py).
        self._marks: list[tuple[int, int, int]] = [(0, 0, 0)]

    def known_preorder(self, order: list) -> None:
        """Use ``order`` (what ``preorder(tree)`` would list) instead of walking the tree."""
        self._order, self._given, self._checked, self._index, self._positions = order, True, False, None, None

    def walk_fully(self) -> None:
        """Forget a given preorder with gaps: the next lookup walks the tree itself."""
        if self._given:
            self._order, self._given, self._checked, self._index, self._positions = None, False, False, None, None

    def _check(self) -> None:
        if self._before is None:
            self._before = _brackets_before_stretches(self._text)
        total = self._before[-1]
        if self._order is None or len(self._order) != total:
            # No list given, or one the text's brackets do not confirm (brackets inside
            # strings, or a miscount): the tree's own walk decides.
            self._order = preorder(self._tree)
        order = self._order
        if len(order) != total:
            # More brackets than containers: some are inside strings, so the k-th bracket
            # is found by the pattern that passes over strings.
            offsets = [s for s in map(operator.methodcaller("start", 1), _BRACKETS.finditer(self._text)) if s >= 0]
            # Duplicate keys discard containers the text still holds: positions would drift,
            # so give none rather than wrong ones. (The count check above cannot tell those
            # apart from as many brackets inside strings; the two together are not met in
            # schema files, and would shift line numbers, never verdicts.)
            self._positions = dict(zip(map(id, order), offsets)) if len(order) == len(offsets) else {}
        # Else as many brackets as containers: none is inside a string. (A gap, None, in a
        # given list is never looked up: only containers are.)
        self._checked = True

    def _bracket(self, k: int) -> int:
        """The offset of the k-th bracket of the text."""
        before = self._before
        stretch = bisect.bisect_right(before, k) - 1  # the last to start before bracket k
        found = self._stretches.get(stretch)
        if found is None:
            start = stretch * _STRETCH
            found = self._stretches[stretch] = _brackets_in(self._text, start, start + _STRETCH)
        return found[k - before[stretch]]

    def offset_of(self, node) -> int | None:
        """The offset of the bracket that opens a dict or list of the tree, if known."""
        if not self._checked:
            self._check()
        if self._positions is not None:
            return self._positions.get(id(node))
        if self._index is None:
            self._index = dict(zip(map(id, self._order), range(len(self._order))))
        k = self._index.get(id(node))
        return None if k is None else self._bracket(k)

    def offsets_of(self, nodes: list) -> list[int | None]:
        """``offset_of`` for many nodes at once. The preorder is searched once for all of
        them, in C, instead of indexing every container of the file for a few lookups
        (benchmarks/instructions.py)."""
        if not self._checked:
            self._check()
        if self._positions is not None or self._index is not None:
            return [self.offset_of(n) for n in nodes]
        wanted = {id(n) for n in nodes if n.__class__ is dict or n.__class__ is list}
        order = self._order
        index = {id(order[k]): k for k in compress(range(len(order)), map(wanted.__contains__, map(id, order)))}
        return [None if k is None else self._bracket(k) for k in map(index.get, map(id, nodes))]

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

    def _point(self, offset: int) -> tuple[int, int]:
        """(line, column) of the first member inside the container opened at ``offset``
        ("name": ... of an Avro field), or of the bracket when it is empty."""
        inner = _SPACE.match(self._text, offset + 1).end()
        if inner < len(self._text) and self._text[inner] not in "}]":
            offset = inner
        return self._line_and_column(offset)

    def locate(self, node) -> tuple[int, int] | None:
        """(line, column), 1-based, of the first member inside a dict or list node."""
        offset = self.offset_of(node)
        return None if offset is None else self._point(offset)

    def line_of(self, node) -> int | None:
        where = self.locate(node)
        return where[0] if where else None

    def lines_of(self, nodes: list) -> list[int | None]:
        """``line_of`` for many nodes at once, counted in the order of the text."""
        offsets = self.offsets_of(nodes)
        lines = {offset: self._point(offset)[0] for offset in sorted({o for o in offsets if o is not None})}
        return [None if o is None else lines[o] for o in offsets]
