"""Benchmark: compile and compare a generated tree of .proto files (default 500 per side).

    python benchmarks/protobuf_tree.py [--files 500] [--repeat 3]

Writes an OLD and a NEW tree into a temporary directory (a water utility's telemetry,
files importing their neighbours, one change in every tenth file), then times

  compile  protoc over each side in one call, descriptor pools and evolint's model
  analyse  the differ and the rule catalogue over every file pair

and prints both with their ratio (analysis time over compile time), plus the time of a
whole `linter.check` on the two directories for reference.
"""
from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from linter import api, catalogue, engine  # noqa: E402
from linter.formats import Options, protobuf  # noqa: E402

CHANGES = [
    ("int32 level = 3;", "int64 level = 3;"),             # widened
    ("string note = 4;", "string remark = 4;"),          # renamed (JSON break)
    ("Mode mode = 5;", "Mode mode = 5;\n  float flow = 9;"),  # added
    ("double reading = 6;", "float reading = 6;"),        # incompatible
]


def proto(index: int, changed: bool) -> str:
    area = f"area{index // 50}"
    imports = "".join(f'import "{area}/station{j}.proto";\n' for j in range(max(index - 2, index // 50 * 50), index))
    uses = "".join(f"  utility.telemetry.{area}.Station{j} neighbour_{j} = {20 + j % 50};\n"
                   for j in range(max(index - 2, index // 50 * 50), index))
    body = f"""syntax = "proto3";
package utility.telemetry.{area};
{imports}
// Pumping station {index}.
message Station{index} {{
  string station_id = 1;
  string pump_id = 2;
  int32 level = 3;
  string note = 4;
  Mode mode = 5;
  double reading = 6; // @unit: kPa
  map<string, Reading> readings = 7;
  oneof alarm {{ string leak = 10; string fault = 11; }}
{uses}  enum Mode {{ MODE_UNKNOWN = 0; AUTO = 1; MANUAL = 2; }}
  message Reading {{ double value = 1; int64 taken_at = 2; }}
}}
"""
    if changed:
        old, new = CHANGES[(index // 10) % len(CHANGES)]
        body = body.replace(old, new, 1)
    return body


def write_tree(root: Path, files: int, side: str) -> list[tuple[Path, str]]:
    out = []
    for i in range(files):
        rel = f"area{i // 50}/station{i}.proto"
        path = root / side / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(proto(i, side == "new" and i % 10 == 0))
        out.append((path, str(path)))
    return out


def run(files: int, repeat: int) -> None:
    cat = catalogue.load()
    policy = engine.Policy(mode="backward")
    compile_times, analyse_times, check_times, findings = [], [], [], 0
    with tempfile.TemporaryDirectory(prefix="evolint-bench-") as tmp:
        root = Path(tmp)
        old_files, new_files = write_tree(root, files, "old"), write_tree(root, files, "new")
        for _ in range(repeat):
            start = time.perf_counter()
            olds = protobuf.load_many(old_files, Options(), root=root / "old")
            news = protobuf.load_many(new_files, Options(), root=root / "new")
            compiled = time.perf_counter()
            found = []
            for (op, od), (np_, nd) in zip(old_files, new_files):
                found += engine.judge(protobuf.diff(olds[od], news[nd]), cat, policy)
            done = time.perf_counter()
            compile_times.append(compiled - start)
            analyse_times.append(done - compiled)
            findings = len(found)
            start = time.perf_counter()
            api.check(root / "old", root / "new")
            check_times.append(time.perf_counter() - start)
    c, a, k = (statistics.median(t) for t in (compile_times, analyse_times, check_times))
    print(f"files per side   {files}")
    print(f"findings         {findings}")
    print(f"compile (median) {c * 1000:9.1f} ms  (both sides: protoc, pools, model)")
    print(f"analyse (median) {a * 1000:9.1f} ms  (diff and rules over {files} pairs)")
    print(f"ratio            {a / c:9.3f}     analysis time / compile time")
    print(f"linter.check     {k * 1000:9.1f} ms  (whole run on the two directories)")


def main(argv=None) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--files", type=int, default=500)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args(argv)
    run(args.files, args.repeat)


if __name__ == "__main__":
    main()
