"""Time and output size of `dualize derive` on problems with thousands of constraints.

Run from the repository root:

    python bench/many_constraints.py [--counts 5000,8000] [--out bench/many_constraints.json]

Each problem has COUNT one-line constraints ``c_i: x >= k_i * a`` (a synthetic stress
case of our own).  One whole process per count and format, one BLAS thread; the
figures are wall-clock seconds and bytes written to standard output.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def problem_text(count: int) -> str:
    lines = ['title "Many one-line constraints"', "data a in R^n", "minimize sum(x)",
             "over x in R^n_+", "subject to"]
    lines += [f"  c{i}: x >= {1 + (7 * i) % 9} * a" for i in range(count)]
    return "\n".join(lines) + "\n"


def measure(path: Path, fmt: str) -> dict[str, float | int]:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1",
               OMP_NUM_THREADS="1")
    start = time.monotonic()
    run = subprocess.run([sys.executable, "-m", "dualize", "derive", str(path), "--format",
                          fmt], capture_output=True, env=env, check=False)
    seconds = time.monotonic() - start
    if run.returncode != 0:
        raise SystemExit(run.stderr.decode("utf-8", "replace"))
    return {"seconds": round(seconds, 1), "bytes": len(run.stdout)}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--counts", default="5000,8000")
    parser.add_argument("--formats", default="text,latex,json")
    parser.add_argument("--out", default=None)
    args = parser.parse_args()
    results = {}
    with tempfile.TemporaryDirectory() as folder:
        for count in (int(c) for c in args.counts.split(",")):
            path = Path(folder) / f"many{count}.prob"
            path.write_text(problem_text(count), encoding="utf-8")
            for fmt in args.formats.split(","):
                results[f"{count} {fmt}"] = measure(path, fmt)
                print(f"{count} constraints, {fmt}: {results[f'{count} {fmt}']}", flush=True)
    if args.out:
        Path(args.out).write_text(json.dumps(results, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
