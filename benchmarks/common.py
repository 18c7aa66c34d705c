"""Small helpers shared by the benchmark scripts: timing, verdict lines, temp folders."""
from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parent


def evolint_command() -> list[str]:
    """The installed console script beside this interpreter, else ``python -m linter``."""
    script = Path(sys.executable).with_name("evolint")
    return [str(script)] if script.exists() else [sys.executable, "-m", "linter"]


def run_wall(cmd: list[str], cwd=None, env=None) -> float:
    start = time.perf_counter()
    proc = subprocess.run(cmd, cwd=cwd, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    elapsed = time.perf_counter() - start
    if proc.returncode not in (0, 1):
        raise SystemExit(f"benchmark command failed ({proc.returncode}): {' '.join(cmd)}\n"
                         f"{proc.stderr.decode(errors='replace')}")
    return elapsed


def timed_pair(fn_a, fn_b, repeat: int) -> tuple[float, float]:
    """Fastest wall times of ``fn_a()`` and ``fn_b()``, run alternately ``repeat`` times
    each, so that a change in the machine's load falls on both sides of a ratio. On a
    shared machine the fastest run is the least disturbed one; the collector is emptied
    before each run, so neither side pays for the other's garbage."""
    import gc

    times_a, times_b = [], []
    for _ in range(repeat):
        for fn, times in ((fn_a, times_a), (fn_b, times_b)):
            gc.collect()
            start = time.perf_counter()
            fn()
            times.append(time.perf_counter() - start)
    return min(times_a), min(times_b)


class Verdicts:
    """Collects bound checks; the script exits 1 if any is out of bounds."""

    def __init__(self):
        self.failed = []

    def check(self, label: str, value: float, bound: float, unit: str = "x") -> str:
        ok = value <= bound
        if not ok:
            self.failed.append(label)
        return f"{value:.2f}{unit} (bound {bound:g}{unit}: {'ok' if ok else 'OUT OF BOUNDS'})"

    def exit(self) -> None:
        if self.failed:
            print(f"\nout of bounds: {', '.join(self.failed)}")
            sys.exit(1)
        print("\nall within bounds")


def env_without_bytecode() -> dict:
    env = dict(os.environ)
    env.setdefault("PYTHONDONTWRITEBYTECODE", "1")
    return env
