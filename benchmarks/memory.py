"""Peak memory of the 100,000-field comparisons, beside the size of the input files.

Each comparison runs in a fresh child interpreter that itself runs ``evolint check``
as its only child, so ``getrusage(RUSAGE_CHILDREN)`` there sees that one run alone.
Bound: peak RSS under 1 GB.

    python benchmarks/memory.py [--fields 100000]
"""
from __future__ import annotations

import argparse
import importlib.util
import subprocess
import sys
import tempfile
from pathlib import Path

import gen
from common import Verdicts, evolint_command

PROBE = """
import resource, subprocess, sys
proc = subprocess.run(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
if proc.returncode not in (0, 1):
    sys.exit(proc.stderr.decode(errors="replace"))
print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)  # KiB on Linux
"""


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--fields", type=int, default=100000)
    parser.add_argument("--formats", default="avro,jsonschema")
    args = parser.parse_args()
    verdicts = Verdicts()
    with tempfile.TemporaryDirectory() as tmp:
        print(f"{'format':<11}{'fields':>8}{'input MB':>10}{'peak RSS MB':>13}")
        for fmt in args.formats.split(","):
            if importlib.util.find_spec(f"linter.formats.{fmt}") is None:
                print(f"{fmt:<11}  (adapter not on this branch yet: skipped)")
                continue
            old, new = gen.write_pair(fmt, args.fields, Path(tmp, fmt))
            size = (old.stat().st_size + new.stat().st_size) / 1e6
            cmd = [*evolint_command(), "check", str(old), str(new), "--output", "json"]
            out = subprocess.run([sys.executable, "-c", PROBE, *cmd], capture_output=True, text=True)
            if out.returncode:
                raise SystemExit(f"{fmt}: {out.stderr}")
            peak = int(out.stdout) / 1024
            print(f"{fmt:<11}{args.fields:>8}{size:>10.1f}{peak:>13.1f}  "
                  f"{verdicts.check(f'{fmt} peak RSS', peak, 1024, ' MB')}")
    verdicts.exit()


if __name__ == "__main__":
    main()
