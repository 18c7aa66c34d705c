"""Benchmark: 1,000 schema files in a temporary git repository, checked against HEAD.

Prints the time per file for a serial run and a run on every core, the speed-up, and the
smallest file count at which the pool pays (the crossover that linter/pool.py THRESHOLD
is set from). Run from the repository root:

    python benchmarks/repo_check.py [--files 1000] [--repeat 3]

The schemas are the invented water utility's meter readings (Avro); one in ten changes
its volume unit, one in ten gains an optional field, and every file's documentation
changes, so git reports all of them and each is read and diffed.
"""
from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


def adapter_note() -> str:
    import linter.formats.avro  # noqa: F401  (imported before timing, as a long run would have it)

    return "Avro adapter"


def schema(n: int, changed: bool) -> dict:
    fields = [
        {"name": "meter_id", "type": "string"},
        {"name": "site", "type": {"type": "record", "name": f"Site{n}", "fields": [
            {"name": "id", "type": "string"}, {"name": "district", "type": "string"}]}},
        {"name": "read_at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
        {"name": "volume", "type": "double", "unit": "m3" if changed and n % 10 == 0 else "L"},
        {"name": "flow_rate", "type": "double", "unit": "L/min"},
        {"name": "pressure", "type": "float", "unit": "kPa"},
    ]
    if changed and n % 10 == 5:
        fields.append({"name": "battery", "type": ["null", "float"], "default": None, "unit": "V"})
    doc = "A meter reading" + (", as sent by the meter." if changed else ".")
    return {"type": "record", "name": f"MeterReading{n}", "namespace": "utility.metering", "doc": doc,
            "fields": fields}


def rel(n: int) -> str:
    return f"schemas/district_{n % 20:02}/meter_reading_{n:04}.avsc"


def build(root: Path, files: int) -> None:
    def git(*args):
        subprocess.run(["git", *args], cwd=root, check=True, capture_output=True)

    git("init", "-q")
    git("config", "user.email", "bench@utility.example")
    git("config", "user.name", "bench")
    for n in range(files):
        path = root / rel(n)
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(json.dumps(schema(n, False), indent=2))
    git("add", "-A")
    git("commit", "-q", "-m", "schemas")
    for n in range(files):
        (root / rel(n)).write_text(json.dumps(schema(n, True), indent=2))


def _cpu():
    own, children = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime, children.ru_utime + children.ru_stime


def timed(root: Path, jobs: int, paths=(), repeat: int = 3):
    """Median wall time, the report, and the median CPU seconds (own, children)."""
    from linter import revision

    times, own, kids, report = [], [], [], None
    for _ in range(repeat):
        cpu0, start = _cpu(), time.perf_counter()
        report = revision.check("HEAD", paths, cwd=root, jobs=jobs)
        times.append(time.perf_counter() - start)
        cpu1 = _cpu()
        own.append(cpu1[0] - cpu0[0])
        kids.append(cpu1[1] - cpu0[1])  # git processes, and the pool's workers once reaped
    return statistics.median(times), report, statistics.median(own), statistics.median(kids)


def idle_estimate(serial, parallel, cores: int) -> tuple[float, float]:
    """Wall times expected on idle cores, from CPU seconds (a busy machine hides any speed-up).

    Serial: own CPU + git's. Pool: the parent's own CPU + git's + the workers' CPU shared out
    over the cores (workers' CPU = the pool run's children minus the serial run's, i.e. git).
    """
    _, _, s_own, s_git = serial
    _, _, p_own, p_kids = parallel
    workers = max(0.0, p_kids - s_git)
    return s_own + s_git, p_own + s_git + workers / cores


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--files", type=int, default=1000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    note = adapter_note()
    from linter import pool
    from linter.report.json import to_json

    cores = pool.jobs_wanted(10**6)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    # A speed-up needs idle cores: on a machine already busy the pool only adds overhead.
    print(f"adapter: {note}; cores: {cores}; load average (1 min) before the run: {load:.1f}")
    with tempfile.TemporaryDirectory(prefix="evolint-bench-") as tmp:
        root = Path(tmp)
        build(root, args.files)
        timed(root, 1, [rel(0)], repeat=1)  # warm-up: imports and the catalogue, paid once per process
        s_run = timed(root, 1, repeat=args.repeat)
        p_run = timed(root, cores, repeat=args.repeat)
        serial, serial_report = s_run[:2]
        parallel, parallel_report = p_run[:2]
        assert to_json(serial_report) == to_json(parallel_report), "parallel run differs from serial run"
        n = len(serial_report.comparisons)
        print(f"{n} files compared, {len(serial_report.findings)} findings")
        print(f"serial:   {serial:.3f} s  ({serial / n * 1000:.2f} ms per file)")
        print(f"{cores} cores: {parallel:.3f} s  ({parallel / n * 1000:.2f} ms per file)")
        print(f"speed-up: {serial / parallel:.2f}x (wall clock)")
        e_serial, e_pool = idle_estimate(s_run, p_run, cores)
        print(f"on idle cores, from CPU time: serial {e_serial:.3f} s, pool {e_pool:.3f} s, "
              f"speed-up {e_serial / e_pool:.2f}x")
        print("crossover (median of repeats; the first N files named as PATHS; wall, then idle estimate):")
        for count in (16, 32, 64, 128, 256, 512):
            if count > args.files:
                break
            paths = [rel(n) for n in range(count)]
            sr, pr = timed(root, 1, paths, args.repeat), timed(root, cores, paths, args.repeat)
            es, ep = idle_estimate(sr, pr, cores)
            print(f"  {len(sr[1].comparisons):>4} files: serial {sr[0] * 1000:7.1f} ms, pool {pr[0] * 1000:7.1f} ms"
                  f" | idle: serial {es * 1000:7.1f} ms, pool {ep * 1000:7.1f} ms -> {'pool' if ep < es else 'serial'}")


if __name__ == "__main__":
    main()
