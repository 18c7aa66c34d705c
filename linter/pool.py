"""Run many comparisons on every core when it pays, in the order they were given.

A process pool costs a fork per worker and a pickle per task and result; below
``THRESHOLD`` pairs a serial run is faster. benchmarks/repo_check.py (2 cores, real Avro
adapter, about 1 ms of CPU per file) put the crossover between 128 files (serial 123 ms,
pool 150 ms) and 256 files (serial 281 ms, pool 252 ms), estimated for idle cores from
CPU time; see docs/ci.md. Results are returned in input order, so a parallel run prints
exactly what a serial run prints.
"""
from __future__ import annotations

import copyreg
import multiprocessing
import os
import types
from typing import Callable, Sequence

from .errors import InputError, UsageError

THRESHOLD = 200
ENV_JOBS = "EVOLINT_JOBS"


def _proxy(mapping: dict) -> types.MappingProxyType:
    return types.MappingProxyType(mapping)


def _reduce_proxy(proxy):
    return _proxy, (dict(proxy),)


# Findings hold read-only mappings; pickle them as the dicts they wrap.
copyreg.pickle(types.MappingProxyType, _reduce_proxy)


def jobs_wanted(count: int, jobs: int | None = None) -> int:
    """How many processes to use for ``count`` tasks (1 means serial)."""
    if jobs is None:
        env = os.environ.get(ENV_JOBS, "").strip()
        if env:
            try:
                jobs = int(env)
            except ValueError:
                raise UsageError(f"{ENV_JOBS} must be a whole number, not {env!r}") from None
    if jobs is None:
        if count < THRESHOLD:
            return 1
        jobs = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else (os.cpu_count() or 1)
    return max(1, min(jobs, count))


class _Call:
    """A picklable wrapper that brings input errors back as values, keeping file and line."""

    def __init__(self, func: Callable, args: tuple):
        self.func = func
        self.args = args

    def __call__(self, item):
        try:
            return True, self.func(*item, *self.args)
        except InputError as exc:
            return False, (type(exc) is UsageError, exc.message, exc.file, exc.line, exc.column)


def _unwrap(ok, value):
    if ok:
        return value
    usage, message, file, line, column = value
    raise (UsageError if usage else InputError)(message, file, line, column)


def run_all(func: Callable, items: Sequence[tuple], *args, jobs: int | None = None) -> list:
    """``[func(*item, *args) for item in items]``, on several processes above the threshold."""
    n = jobs_wanted(len(items), jobs)
    if n <= 1:
        return [func(*item, *args) for item in items]
    method = "fork" if "fork" in multiprocessing.get_all_start_methods() else None
    context = multiprocessing.get_context(method)
    call = _Call(func, args)
    chunk = max(1, len(items) // (n * 4))
    with context.Pool(n) as pool:
        return [_unwrap(*result) for result in pool.imap(call, items, chunksize=chunk)]
