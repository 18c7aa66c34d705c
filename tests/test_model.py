import itertools

import pytest

from linter.model import Compat, meet_all

ALL = list(Compat)


def test_of_and_directions():
    assert Compat.of(True, True) is Compat.FULL
    assert Compat.of(True, False) is Compat.BACKWARD
    assert Compat.of(False, True) is Compat.FORWARD
    assert Compat.of(False, False) is Compat.BREAKING


@pytest.mark.parametrize("a,b", list(itertools.product(ALL, ALL)))
def test_meet_is_a_lattice_meet(a, b):
    m = a.meet(b)
    assert m == b.meet(a)
    assert m.backward == (a.backward and b.backward)
    assert m.forward == (a.forward and b.forward)
    assert a.meet(a) is a


def test_meet_examples_from_design():
    assert Compat.FULL.meet(Compat.BACKWARD) is Compat.BACKWARD
    assert Compat.BACKWARD.meet(Compat.FORWARD) is Compat.BREAKING
    assert meet_all([]) is Compat.FULL


@pytest.mark.parametrize("compat,mode,kept", [
    (Compat.FULL, "full", True), (Compat.BACKWARD, "full", False),
    (Compat.BACKWARD, "backward", True), (Compat.FORWARD, "backward", False),
    (Compat.FORWARD, "forward", True), (Compat.BREAKING, "forward", False),
    (Compat.BREAKING, "none", True),
])
def test_keeps(compat, mode, kept):
    assert compat.keeps(mode) is kept
