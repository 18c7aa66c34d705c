"""linter/collector.py: the collector is paused inside, restored as it was after."""
import gc

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


def _generation_of(obj) -> int | None:
    for generation in range(3):
        if any(o is obj for o in gc.get_objects(generation=generation)):
            return generation
    return None


def test_what_the_pause_built_is_handed_to_the_oldest_generation(restore_collector):
    # Left young, everything the pause built would be traversed by the next two young
    # collections (the gc module's documented generations); moved at once, it is not.
    gc.enable()
    with collector_paused():
        built = [[i] for i in range(1000)]
    assert _generation_of(built) == 2
    assert gc.get_count()[0] < 100  # no young collection is due for what was built
    assert gc.get_freeze_count() == 0


def test_objects_the_caller_froze_stay_frozen(restore_collector):
    gc.enable()
    gc.collect()
    mine = [[]]
    gc.freeze()
    try:
        frozen = gc.get_freeze_count()
        with collector_paused():
            built = [[i] for i in range(100)]
        assert gc.get_freeze_count() == frozen  # unfreeze() would have released them
        assert _generation_of(mine) is None  # still in the permanent generation
        assert _generation_of(built) == 0  # left to the collector as it comes
    finally:
        gc.unfreeze()
