"""Pausing the cyclic garbage collector around work that builds large object graphs."""
from __future__ import annotations

import gc
from contextlib import contextmanager


@contextmanager
def collector_paused():
    """Pause the cyclic garbage collector while building or walking a node graph.

    The walks allocate hundreds of thousands of long-lived objects, so the collector's
    generational passes found almost nothing to free and took about half the time on a
    100,000-field schema (benchmarks/scale.py). Nested pauses are free; the collector is
    restored as it was, even on error. (One pause around a whole comparison instead of one
    per load and diff measured no better: what is alive on resuming is looked at anyway.)
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()
