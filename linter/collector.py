"""Pausing the cyclic garbage collector around work that builds large object graphs."""
from __future__ import annotations

import gc


class collector_paused:
    """Pause the cyclic garbage collector while building or walking a node graph.

    The walks allocate hundreds of thousands of long-lived objects, so the collector's
    generational passes found almost nothing to free and took about half the time on a
    100,000-field schema (benchmarks/scale.py). Nested pauses are free; the collector is
    restored as it was, even on error. An adapter may ask for one pause around a whole
    comparison (``pause_collector``, linter/api.py), so that what survives is looked at once.
    A class rather than a generator: it is entered four times per comparison.
    """

    __slots__ = ("was_enabled",)

    def __enter__(self):
        self.was_enabled = gc.isenabled()
        gc.disable()

    def __exit__(self, *exc):
        if self.was_enabled:
            gc.enable()
