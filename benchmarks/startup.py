"""Start-up: ``evolint check`` on two small Avro files against ``python -c "import click"``.

Both commands run side by side, interleaved, several times; the medians are compared.
Bound: evolint within 3x the bare click import. Both run with their bytecode cached, as
an installed tool's is (pip compiles it on install; an editable install caches it on
first use): where the environment forbids writing bytecode (PYTHONDONTWRITEBYTECODE),
the cache goes to a temporary PYTHONPYCACHEPREFIX, never into the repository. Also prints the slowest imports of one
evolint run (``python -X importtime``) to show where start-up time goes.

    python benchmarks/startup.py [--repeat 15]
"""
from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
from pathlib import Path

from common import Verdicts, evolint_command, run_wall


def cached_bytecode_env(tmp: str) -> dict:
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    env["PYTHONPYCACHEPREFIX"] = str(Path(tmp, "pycache"))
    return env

OLD = {"type": "record", "name": "MeterReading", "namespace": "utility.metering",
       "fields": [{"name": "meter_id", "type": "string"},
                  {"name": "volume", "type": "double", "unit": "L"}]}
NEW = {**OLD, "fields": OLD["fields"] + [{"name": "battery", "type": "int", "default": 100}]}


def slowest_imports(cmd: list[str], env: dict, top: int = 8) -> list[tuple[int, str]]:
    proc = subprocess.run([sys.executable, "-X", "importtime", "-m", "linter", *cmd[1:]],
                          capture_output=True, text=True, env=env)
    rows = []
    for line in proc.stderr.splitlines():
        if not line.startswith("import time:") or "cumulative" in line:
            continue
        _self, cumulative, name = (part.strip() for part in line[len("import time:"):].split("|"))
        if not name.startswith(" ") and "." not in name.strip():
            rows.append((int(cumulative), name.strip()))
    return sorted(rows, reverse=True)[:top]


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=15)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        old, new = Path(tmp, "old.avsc"), Path(tmp, "new.avsc")
        old.write_text(json.dumps(OLD))
        new.write_text(json.dumps(NEW))
        check = [*evolint_command(), "check", str(old), str(new), "--output", "json"]
        click = [sys.executable, "-c", "import click"]
        env = cached_bytecode_env(tmp)
        run_wall(check, env=env), run_wall(click, env=env)  # warm the file and bytecode caches
        ours, base = [], []
        for _ in range(args.repeat):
            ours.append(run_wall(check, env=env))
            base.append(run_wall(click, env=env))
        imports = slowest_imports(["python", "check", str(old), str(new), "--output", "json"], env)
    verdicts = Verdicts()
    m_ours, m_base = statistics.median(ours), statistics.median(base)
    print(f"start-up, median of {args.repeat} interleaved runs")
    print(f"  python -c 'import click'          {m_base * 1000:7.1f} ms")
    print(f"  evolint check (2 small .avsc, json) {m_ours * 1000:7.1f} ms")
    print(f"  ratio {verdicts.check('start-up', m_ours / m_base, 3)}")
    print("slowest top-level imports of one run (cumulative, ms):")
    for micros, name in imports:
        print(f"  {micros / 1000:7.1f}  {name}")
    verdicts.exit()


if __name__ == "__main__":
    main()
