"""Analysis against parsing, and growth with size.

For generated schemas of 1,000, 10,000 and 100,000 fields (Avro, JSON Schema) and a
5,000-field Protobuf file, compares the total in-process time of a comparison
(``linter.api.check`` plus the JSON report) with the parse-only floor: reading and
parsing both files with the same libraries the adapters use, nothing else. Floor and
total are timed alternately, so a change in the machine's load hits both; each figure
is the fastest of its runs (benchmarks/common.py ``timed_pair``).

Bounds: total within 2x the floor; 10x the fields in at most 12x the total time. The
growth of the floor alone and of the time added above it are printed beside the verdict:
where the libraries themselves grow faster than 12x (json and fastavro at 100,000 Avro
fields), the total follows them.

In one process, the runs of a small comparison reuse the memory the run before freed,
while each run of a 100,000-field comparison takes its heap from the system again (Avro:
about 250 page faults a run at 10,000 fields, 45,000 at 100,000, docs/performance.md), so
growth is measured against a warm small run. ``--fresh`` times every run in a new
interpreter instead, as ``evolint check`` runs: warmed up on a 10-field pair (imports,
the rule catalogue), then one floor or one comparison, timed inside the process.

    python benchmarks/scale.py [--formats avro,jsonschema,protobuf] [--sizes 1000,10000,100000]
    python benchmarks/scale.py --formats avro --fresh   # a new process per run
    python benchmarks/scale.py --profile avro:100000     # cProfile of one comparison
    python benchmarks/scale.py --formats protobuf --repeat 15   # more runs (the fastest counts)
"""
from __future__ import annotations

import argparse
import importlib.util
import io
import json
import subprocess
import sys
import tempfile
from pathlib import Path

import gen
from common import HERE, Verdicts, timed_pair

SIZES = {"avro": (1000, 10000, 100000), "jsonschema": (1000, 10000, 100000), "protobuf": (500, 5000)}


def floor_avro(old: Path, new: Path) -> None:
    import fastavro

    for path in (old, new):
        fastavro.parse_schema(json.loads(path.read_bytes().decode("utf-8-sig")))


def floor_jsonschema(old: Path, new: Path) -> None:
    from jsonschema.validators import validator_for
    from referencing import Registry, Resource

    for path in (old, new):
        data = json.loads(path.read_bytes().decode("utf-8-sig"))
        cls = validator_for(data)
        cls.check_schema(data)
        Registry().with_resource(data.get("$id", path.as_uri()), Resource.from_contents(data))


def floor_protobuf(old: Path, new: Path) -> None:
    import grpc_tools
    from google.protobuf import descriptor_pb2, descriptor_pool
    from grpc_tools import protoc

    well_known = str(Path(grpc_tools.__file__).parent / "_proto")
    with tempfile.TemporaryDirectory() as tmp:
        for i, path in enumerate((old, new)):
            out = Path(tmp, f"{i}.pb")
            status = protoc.main(["protoc", f"-I{path.parent}", f"-I{well_known}", "--include_source_info",
                                  f"--descriptor_set_out={out}", "--include_imports", path.name])
            if status:
                raise SystemExit(f"protoc failed on {path}")
            pool = descriptor_pool.DescriptorPool()
            for file in descriptor_pb2.FileDescriptorSet.FromString(out.read_bytes()).file:
                pool.Add(file)


FLOORS = {"avro": floor_avro, "jsonschema": floor_jsonschema, "protobuf": floor_protobuf}


def total(old: Path, new: Path) -> None:
    from linter import api
    from linter.report import render

    render("json", api.check(old, new), io.StringIO())


# One timed run in a new interpreter (``--fresh``): argv is fmt, step, old, new, and a
# small pair to warm up on; prints the seconds.
CHILD = """
import gc, sys, time
from pathlib import Path
sys.path.insert(0, {here!r})
import scale
fmt, step, old, new, tiny_old, tiny_new = sys.argv[1:7]
scale.FLOORS[fmt](Path(tiny_old), Path(tiny_new))
scale.total(Path(tiny_old), Path(tiny_new))
gc.collect()
run = scale.total if step == "total" else scale.FLOORS[fmt]
start = time.perf_counter()
run(Path(old), Path(new))
print(time.perf_counter() - start)
"""


def timed_pair_fresh(fmt: str, old: Path, new: Path, tiny: tuple[Path, Path], repeat: int) -> tuple[float, float]:
    """As ``timed_pair``, each run in its own interpreter (fastest of ``repeat`` each)."""
    code = CHILD.format(here=str(HERE))
    best = {"floor": float("inf"), "total": float("inf")}
    for _ in range(repeat):
        for step in best:
            proc = subprocess.run([sys.executable, "-c", code, fmt, step, str(old), str(new), *map(str, tiny)],
                                  capture_output=True, text=True)
            if proc.returncode != 0:
                raise SystemExit(f"{fmt} {step} run failed:\n{proc.stderr[-2000:]}")
            best[step] = min(best[step], float(proc.stdout))
    return best["floor"], best["total"]


def landed(fmt: str) -> bool:
    return importlib.util.find_spec(f"linter.formats.{fmt}") is not None


def repeats(n: int) -> int:
    return 21 if n <= 1000 else 9 if n <= 10000 else 3


def profile(spec: str, folder: Path) -> None:
    import cProfile
    import pstats

    fmt, n = spec.split(":")
    old, new = gen.write_pair(fmt, int(n), folder)
    total(old, new)  # warm imports
    prof = cProfile.Profile()
    prof.runcall(total, old, new)
    pstats.Stats(prof).sort_stats("cumulative").print_stats(30)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--formats", default="avro,jsonschema,protobuf")
    parser.add_argument("--sizes", help="comma-separated field counts (default per format)")
    parser.add_argument("--profile", metavar="FORMAT:FIELDS")
    parser.add_argument("--repeat", type=int, help="runs of each, the fastest kept (default: 21, 9 or 3 by size)")
    parser.add_argument("--fresh", action="store_true", help="each run in a new interpreter")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        if args.profile:
            return profile(args.profile, Path(tmp))
        verdicts = Verdicts()
        print(f"{'format':<11}{'fields':>8}{'floor s':>10}{'total s':>10}  total/floor")
        for fmt in args.formats.split(","):
            if not landed(fmt):
                print(f"{fmt:<11}  (adapter not on this branch yet: skipped)")
                continue
            sizes = [int(s) for s in args.sizes.split(",")] if args.sizes else SIZES[fmt]
            previous = None
            tiny = gen.write_pair(fmt, 10, Path(tmp, f"{fmt}-warm")) if args.fresh else None
            for n in sizes:
                old, new = gen.write_pair(fmt, n, Path(tmp, fmt))
                runs = args.repeat or repeats(n)
                if args.fresh:
                    floor_s, total_s = timed_pair_fresh(fmt, old, new, tiny, runs)
                else:
                    total(old, new)  # warm: imports and the catalogue load once per process
                    floor_s, total_s = timed_pair(lambda: FLOORS[fmt](old, new), lambda: total(old, new), runs)
                line = (f"{fmt:<11}{n:>8}{floor_s:>10.3f}{total_s:>10.3f}  "
                        f"{verdicts.check(f'{fmt} {n} vs floor', total_s / floor_s, 2)}")
                if previous and n == previous[0] * 10:
                    line += f"; growth x10 fields: {verdicts.check(f'{fmt} {n} growth', total_s / previous[1], 12)}"
                    # Beside it, for reading the verdict: the libraries' own growth, and
                    # that of what evolint adds above them (total minus floor).
                    added = (total_s - floor_s) / (previous[1] - previous[2]) if previous[1] > previous[2] else float("nan")
                    line += f" (floor's own {floor_s / previous[2]:.2f}x, added time's {added:.2f}x)"
                print(line, flush=True)
                previous = (n, total_s, floor_s)
        verdicts.exit()


if __name__ == "__main__":
    sys.exit(main())
