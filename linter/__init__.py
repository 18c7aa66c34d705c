"""evolint: a static compatibility linter for event-schema evolution.

    >>> import linter
    >>> report = linter.check("old.avsc", "new.avsc", mode="backward")
    >>> report.compatibility, report.passed, report.to_json()["findings"]

Submodules are imported on first use, so that ``import linter`` stays cheap.
"""
__version__ = "0.1.0"


def check(old, new, **kwargs):
    """Compare OLD with NEW; see :func:`linter.api.check`."""
    from .api import check as _check

    return _check(old, new, **kwargs)


def load(path, **kwargs):
    """Parse one schema file; see :func:`linter.api.load`."""
    from .api import load as _load

    return _load(path, **kwargs)
