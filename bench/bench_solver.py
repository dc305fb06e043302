"""Benchmark: the generated soft-margin dual solver against cvxpy on the primal.

A random instance with m = 2000 samples and n = 20 features; both solvers run in
the same process, each the median of several runs.  Prints the time ratio and
both duality gaps and writes bench/results_solver.json (not tracked).
Run: python bench/bench_solver.py [--repeats 3]
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))


def instance(m: int, n: int, seed: int = 0) -> dict:
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(m, n))
    y = np.sign(X @ rng.normal(size=n) + 0.5 * rng.normal(size=m))
    return {"X": X.tolist(), "y": y.tolist(), "C": 1.0}


def generated_module():
    from dualize.duality import derive
    from dualize.model import load
    from dualize.solvergen.solver import render_solver

    text = (ROOT / "examples" / "parts_soft_margin.prob").read_text(encoding="utf-8")
    path = Path(tempfile.mkdtemp()) / "soft_margin_solver.py"
    path.write_text(render_solver(derive(load(text).problem)), encoding="utf-8")
    spec = importlib.util.spec_from_file_location("soft_margin_solver", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def cvxpy_primal(data: dict) -> float:
    import cvxpy as cp

    X, y, C = np.array(data["X"]), np.array(data["y"]), data["C"]
    w, b, s = cp.Variable(X.shape[1]), cp.Variable(), cp.Variable(X.shape[0])
    problem = cp.Problem(cp.Minimize(0.5 * cp.sum_squares(w) + C * cp.sum(s)),
                         [cp.multiply(y, X @ w + b) >= 1 - s, s >= 0])
    problem.solve()
    return float(problem.value)


def timed(func, repeats: int) -> tuple[float, object]:
    times, result = [], None
    for _ in range(repeats):
        start = time.perf_counter()
        result = func()
        times.append(time.perf_counter() - start)
    return statistics.median(times), result


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--m", type=int, default=2000)
    parser.add_argument("--n", type=int, default=20)
    args = parser.parse_args()
    data = instance(args.m, args.n)
    module = generated_module()
    ours_time, report = timed(lambda: module.solve(data), args.repeats)
    ref_time, ref_value = timed(lambda: cvxpy_primal(data), args.repeats)
    results = {
        "m": args.m, "n": args.n, "repeats": args.repeats,
        "generated_seconds": ours_time, "cvxpy_seconds": ref_time,
        "ratio_generated_over_cvxpy": ours_time / ref_time,
        "generated_gap": report["gap"], "generated_dual_value": report["dual_value"],
        "cvxpy_value": ref_value,
        "gap_to_cvxpy": report["dual_value"] - ref_value,
    }
    print(json.dumps(results, indent=2))
    (ROOT / "bench" / "results_solver.json").write_text(json.dumps(results, indent=2) + "\n")


if __name__ == "__main__":
    main()
