"""linter/collector.py: the collector is paused inside, restored as it was after."""
import gc
import weakref

import pytest

from linter.collector import collector_paused


@pytest.fixture
def restore_collector():
    was = gc.isenabled()
    yield
    (gc.enable if was else gc.disable)()


def test_paused_inside_nested_pauses_and_restored_after(restore_collector):
    gc.enable()
    with collector_paused():
        assert not gc.isenabled()
        with collector_paused():
            assert not gc.isenabled()
        assert not gc.isenabled()  # the inner pause leaves the outer one in place
    assert gc.isenabled()


def test_restored_on_error_and_a_disabled_collector_stays_disabled(restore_collector):
    gc.enable()
    with pytest.raises(KeyError):
        with collector_paused():
            raise KeyError("x")
    assert gc.isenabled()
    gc.disable()
    with collector_paused():
        pass
    assert not gc.isenabled()


class _Cell:
    pass


def test_cycles_made_during_a_pause_are_collected_after_it(restore_collector):
    # A recursive Avro record's nodes refer to each other: such garbage must still be
    # found by the collector's own young passes once the pause ends. (Handing what a
    # pause built straight to the oldest generation, gc.freeze then gc.unfreeze, spared
    # those passes 20 ms at 100,000 fields but left cycles for a full collection that
    # never came: 20,000 comparisons of a recursive schema held 160 MB instead of 24.)
    gc.enable()
    gc.collect()
    with collector_paused():
        cell = _Cell()
        cell.itself = cell
        ref = weakref.ref(cell)
        del cell
    kept = [[] for _ in range(5_000)]  # ordinary work after the pause: a young pass is due
    assert ref() is None
    del kept
