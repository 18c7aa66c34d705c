"""A file's source info (SourceCodeInfo), read where asked.

Two things come from it: the position of an element a change is reported at, and the
comments that may hold an annotation (those with an '@': COMMENT_KEY needs one). A large
file has several entries per field; reading every entry's path costs more than protoc's
whole compile of it, so an element's entry is found by bisection instead. protoc lists
the entries in source order, an element's entry first and the entries inside it right
after, siblings of one kind in index order; an entry found is checked against the path
asked for, and if the search fails, or takes more reads than one pass would, every entry
is read once into a table.
"""
from __future__ import annotations

from functools import cached_property

from ..model import Location


class Source:
    def __init__(self, fdp, display: str):
        self.fdp, self.display = fdp, display
        self._entries = fdp.source_code_info.location
        self._read: dict[int, tuple] = {}   # entry index -> its path, for the entries bisection read
        self._budget = len(self._entries)
        self._table = None                  # path -> entry, once every entry is read
        self._locs: dict[tuple, Location] = {}
        self._notes = None
        self._by_top = None

    def loc(self, path: tuple) -> Location:
        found = self._locs.get(path)
        if found is None:
            entry = self._entry(path)
            if entry is None or not entry.span:
                found = Location(self.display)
            else:
                found = Location(self.display, entry.span[0] + 1, entry.span[1] + 1)
            self._locs[path] = found
        return found

    def _entry(self, path: tuple):
        if self._table is None and len(path) % 2 == 0:
            k = self._search(path)
            if k is not None:
                return self._entries[k]
        if self._table is None:
            self._table = {tuple(e.path): e for e in self._entries}
        return self._table.get(path)

    def _path(self, k: int) -> tuple:
        found = self._read.get(k)
        if found is None:
            found = self._read[k] = tuple(self._entries[k].path)
            self._budget -= 1
        return found

    def _search(self, path: tuple) -> int | None:
        """The index of the entry of an element path ((kind, index) pairs), or None."""
        lo, hi = 0, len(self._entries)   # the entries inside the element found so far
        for level in range(0, len(path), 2):
            k = self._first(lo + 1, hi, level, path[level], path[level + 1])
            if k is None or self._path(k) != path[: level + 2] or self._budget < 0:
                return None
            lo, hi = k, self._end(k, hi, level + 2)
        return lo

    def _first(self, lo: int, hi: int, level: int, kind: int, index: int) -> int | None:
        """The first entry in [lo, hi) of that kind at that level with an index >= ``index``.

        Entries of other kinds carry no order: a probe landing on one moves past it (past
        the whole element it belongs to, if it is inside one) to the next entry of the kind.
        """
        best = None
        while lo < hi and self._budget >= 0:
            mid = m = (lo + hi) // 2
            while m < hi:
                p = self._path(m)
                if len(p) >= level + 2 and p[level] == kind:
                    break
                m = self._end(m, hi, level + 2) if len(p) >= level + 2 else m + 1
            else:
                hi = mid
                continue
            if p[level + 1] >= index:
                best, hi = m, mid
            else:
                lo = m + 1
        return best

    def _end(self, k: int, hi: int, length: int) -> int:
        """The first entry after k, before hi, outside the element of entry k's path[:length]."""
        prefix = self._path(k)[:length]
        lo = k + 1
        while lo < hi:
            mid = (lo + hi) // 2
            if self._path(mid)[:length] == prefix:
                lo = mid + 1
            else:
                hi = mid
        return lo

    def notes(self) -> dict[tuple, tuple[str, str]]:
        """(leading, trailing) comments by element path, for the comments with an '@'."""
        if self._notes is None:
            notes = {}
            if b"@" in self.fdp.source_code_info.SerializeToString():
                for entry in self._entries:
                    lead, trail = entry.leading_comments, entry.trailing_comments
                    if "@" in lead or "@" in trail:
                        notes[tuple(entry.path)] = (lead, trail)
            self._notes = notes
        return self._notes

    def notes_under(self, top: tuple) -> tuple:
        """The comments with an '@' inside one top-level element, by path relative to it."""
        if self._by_top is None:
            groups: dict[tuple, list] = {}
            for path, texts in self.notes().items():
                groups.setdefault(path[:2], []).append((path[2:], texts))
            self._by_top = {k: tuple(sorted(v)) for k, v in groups.items()}
        return self._by_top.get(top, ())

    @cached_property
    def context(self) -> tuple:
        """What outside a message's own descriptor resolves its fields: syntax, edition, file features."""
        fdp = self.fdp
        features = fdp.options.features.SerializeToString() if fdp.options.HasField("features") else b""
        return fdp.syntax, fdp.edition, features, fdp.package
