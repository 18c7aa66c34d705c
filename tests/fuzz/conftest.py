import pytest
from harness import Scratch, no_network


@pytest.fixture(scope="module")
def scratch():
    s = Scratch()
    yield s
    s.close()


@pytest.fixture(autouse=True, scope="module")
def offline():
    """No fuzz example may reach the network ($ref and $schema URLs included)."""
    with no_network() as attempts:
        yield attempts
    assert not attempts, f"network use during fuzzing: {attempts[:3]}"
