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
