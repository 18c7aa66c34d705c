"""Analysis against parsing by instruction count: the noise-free view of ``scale.py``.

Wall-clock ratios on a shared virtual machine move by a third between runs. valgrind's
callgrind counts the instructions a process executes, which repeat exactly for the same
program, inputs and environment, whatever else the machine does. Three processes run
under it with one hash seed: one only warms up (imports, one floor, one comparison, then
empties the collector and sets the survivors aside), one warms up and then runs the floor
once more, one warms up and then compares once more. The differences are the floor's and
the comparison's instructions; their ratio is printed
beside the bound of ``scale.py`` (2x). Instructions are not time (a cache miss costs more
than an add), so this complements the wall clock, it does not replace it.

Where one size is ten times the one before, the growth of the comparison's instructions
is printed against the growth bound of ``scale.py`` (12x), beside the floor's: the count
of work done, without what the machine's caches make of it (at 100,000 Avro fields the
wall clock of ``json.loads`` alone grows faster than the fields, docs/performance.md).

    python benchmarks/instructions.py [--formats avro,jsonschema,protobuf] [--sizes 1000,10000]
    python benchmarks/instructions.py --sizes 10000,100000    # growth (a few minutes)
"""
from __future__ import annotations

import argparse
import os
import re
import subprocess
import sys
import tempfile
from pathlib import Path

import gen
from common import HERE, Verdicts

CHILD = """
import gc
import sys
sys.path.insert(0, {here!r})
from pathlib import Path
import scale
old, new, fmt, step = Path({old!r}), Path({new!r}), {fmt!r}, {step!r}
scale.FLOORS[fmt](old, new)
scale.total(old, new)
# Emptied, as timed_pair does, and what survives set aside (gc.freeze): the collector's
# passes in the step then depend on the step's own objects alone, not on what the
# warm-up of this version of the code left alive (the floor's count moved by a fifth).
gc.collect()
gc.freeze()
if step == "floor":
    scale.FLOORS[fmt](old, new)
elif step == "total":
    scale.total(old, new)
"""


def instructions(old: Path, new: Path, fmt: str, step: str, tmp: str) -> int:
    out = Path(tmp, f"callgrind.{step}")
    code = CHILD.format(here=str(HERE), old=str(old), new=str(new), fmt=fmt, step=step)
    env = dict(os.environ, PYTHONHASHSEED="0")
    proc = subprocess.run(["valgrind", "--tool=callgrind", f"--callgrind-out-file={out}",
                           sys.executable, "-c", code], capture_output=True, text=True, env=env)
    if proc.returncode != 0:
        raise SystemExit(f"valgrind run failed ({step}):\n{proc.stderr[-2000:]}")
    match = re.search(r"^summary:\s*(\d+)", out.read_text(), re.MULTILINE)
    return int(match.group(1))


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--formats", default="avro")
    parser.add_argument("--sizes", default="1000,10000")
    args = parser.parse_args()
    verdicts = Verdicts()
    print(f"{'format':<11}{'fields':>8}{'floor Mi':>11}{'total Mi':>11}  total/floor (instructions)")
    with tempfile.TemporaryDirectory() as tmp:
        for fmt in args.formats.split(","):
            previous = None
            for n in (int(s) for s in args.sizes.split(",")):
                old, new = gen.write_pair(fmt, n, Path(tmp, fmt))
                base = instructions(old, new, fmt, "warm", tmp)
                floor = instructions(old, new, fmt, "floor", tmp) - base
                total = instructions(old, new, fmt, "total", tmp) - base
                line = (f"{fmt:<11}{n:>8}{floor / 1e6:>11.1f}{total / 1e6:>11.1f}  "
                        f"{verdicts.check(f'{fmt} {n} vs floor', total / floor, 2)}")
                if previous and n == previous[0] * 10:
                    line += (f"; growth x10 fields: {verdicts.check(f'{fmt} {n} growth', total / previous[1], 12)}"
                             f" (floor's own {floor / previous[2]:.2f}x)")
                print(line, flush=True)
                previous = (n, total, floor)
    verdicts.exit()


if __name__ == "__main__":
    sys.exit(main())
