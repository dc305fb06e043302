"""Benchmark: generated dual solvers against cvxpy on the primal, whole processes.

For each case an instance is written to a JSON file; then two fresh processes read it,
one running the module that ``dualize solver`` generates for the problem, one solving
the primal with cvxpy and its default open solvers (the general route).  Both run with
one BLAS thread (OPENBLAS_NUM_THREADS = OMP_NUM_THREADS = MKL_NUM_THREADS = 1).  The
figures: wall time of each process (imports, reading and solving), their ratio, both
optima and their relative difference, the module's status and certified gap, and the
peak resident memory of each process (``/usr/bin/time -v`` when present, else the
process's own ``getrusage``).

Run: python bench/bench_solver.py [--quick] [--only NAME] [--timeout SECONDS]
Writes bench/results_solver.json (not tracked); bench/solver_results.json keeps the run the
README quotes.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from bench.bench_cases import CASES, QUICK  # noqa: E402

ONE_THREAD = {"OPENBLAS_NUM_THREADS": "1", "OMP_NUM_THREADS": "1", "MKL_NUM_THREADS": "1"}


def generated_module(problem: Path, folder: Path) -> Path:
    """Write the module that ``dualize solver`` makes for ``problem``."""
    from dualize.duality import derive
    from dualize.model import load
    from dualize.solvergen.solver import render_solver

    text = problem.read_text(encoding="utf-8")
    path = folder / f"{problem.stem}_solver.py"
    path.write_text(render_solver(derive(load(text, problem.name).problem)), encoding="utf-8")
    return path


def measured(command: list[str], timeout: float) -> dict:
    """Run ``command`` in a fresh process: wall seconds, peak memory in MiB, its output."""
    env = dict(os.environ, **ONE_THREAD, PYTHONPATH=str(ROOT))
    timer = shutil.which("time") and Path("/usr/bin/time").exists()
    full = ["/usr/bin/time", "-v", *command] if timer else command
    start = time.perf_counter()
    # A session of its own, so that a timeout ends the solver too, not only /usr/bin/time.
    with subprocess.Popen(full, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                          env=env, start_new_session=True) as child:
        try:
            stdout, stderr = child.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            os.killpg(child.pid, signal.SIGKILL)
            child.communicate()
            return {"error": f"killed after {timeout:.0f} s"}
    done = subprocess.CompletedProcess(full, child.returncode, stdout, stderr)
    seconds = time.perf_counter() - start
    peak = None
    for line in done.stderr.splitlines():
        if "Maximum resident set size" in line:
            peak = int(line.split(":")[1]) / 1024
    try:
        output = json.loads(done.stdout)
    except json.JSONDecodeError:
        tail = [line for line in done.stderr.splitlines() if line.strip()][-3:]
        return {"error": f"exit {done.returncode}: {' | '.join(tail)[:300]}"}
    peak = peak if peak is not None else output.pop("_peak_mib", None)
    return {"seconds": seconds, "peak_mib": peak, "output": output}


def one_case(name: str, size: tuple[int, ...], folder: Path, timeout: float) -> dict:
    case = CASES[name]
    data = case.instance(*size)
    instance = folder / f"{name}_{'x'.join(map(str, size))}.json"
    instance.write_text(json.dumps(data), encoding="utf-8")
    module = generated_module(ROOT / case.problem, folder)
    ours = measured([sys.executable, str(module), str(instance)], timeout)
    general = measured([sys.executable, str(ROOT / "bench" / "bench_cases.py"), name,
                        str(instance)], timeout)
    return summary(name, size, ours, general)


def summary(name: str, size: tuple[int, ...], ours: dict, general: dict) -> dict:
    row = {"case": name, "size": "x".join(map(str, size))}
    for side, result in (("generated", ours), ("general", general)):
        if "error" in result:
            row[f"{side}_error"] = result["error"]
            continue
        row[f"{side}_seconds"] = round(result["seconds"], 3)
        row[f"{side}_peak_mib"] = None if result["peak_mib"] is None \
            else round(result["peak_mib"], 1)
    if "error" not in ours:
        report = ours["output"]
        row.update(status=report["status"], dual_value=report["dual_value"],
                   primal_value=report["primal_value"], certified_gap=report["gap"])
    if "error" not in general:
        row.update(general_value=general["output"]["value"],
                   general_solver=general["output"]["solver"])
    if "error" not in ours and "error" not in general:
        row["time_ratio"] = round(ours["seconds"] / general["seconds"], 3)
        if row["general_peak_mib"] and row["generated_peak_mib"]:
            row["memory_ratio"] = round(row["generated_peak_mib"] / row["general_peak_mib"], 3)
        value = report["primal_value"] if isinstance(report["primal_value"], float) \
            else report["dual_value"]
        if isinstance(value, float):
            reference = row["general_value"]
            row["relative_difference"] = abs(value - reference) / max(1.0, abs(reference))
    return row


def table(rows: list[dict]) -> str:
    head = "| case | size | generated s | general s | ratio | peak MiB (gen / gen. route) " \
           "| status | certified gap | optimum (gen / general) |"
    lines = [head, "|" + "---|" * 9]
    for r in rows:
        peaks = f"{r.get('generated_peak_mib')} / {r.get('general_peak_mib')}"
        optimum = f"{_short(r.get('primal_value', r.get('dual_value')))} / " \
                  f"{_short(r.get('general_value'))}"
        lines.append(
            f"| {r['case']} | {r['size']} | {r.get('generated_seconds', r.get('generated_error'))}"
            f" | {r.get('general_seconds', r.get('general_error'))} | {r.get('time_ratio')} | "
            f"{peaks} | {r.get('status')} | {_short(r.get('certified_gap'))} | {optimum} |")
    return "\n".join(lines)


def _short(value: object) -> str:
    return f"{value:.9g}" if isinstance(value, float) else str(value)


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true", help="the small size of each case")
    parser.add_argument("--only", help="run only this case (soft_margin, lp, lasso, ...)")
    parser.add_argument("--size", help="run only this size of the case(s), e.g. 10000x100")
    parser.add_argument("--timeout", type=float, default=600.0)
    parser.add_argument("--out", help="where to write the figures (default: bench/results_"
                        "solver.json, or results_solver_quick.json with --quick)")
    args = parser.parse_args()
    plan = QUICK if args.quick else [(n, s) for n, c in CASES.items() for s in c.sizes]
    rows = []
    with tempfile.TemporaryDirectory() as scratch:
        for name, size in plan:
            if (args.only and name != args.only) or \
                    (args.size and "x".join(map(str, size)) != args.size):
                continue
            rows.append(one_case(name, size, Path(scratch), args.timeout))
            print(json.dumps(rows[-1]), flush=True)
    print(table(rows))
    out = Path(args.out) if args.out else \
        ROOT / "bench" / ("results_solver_quick.json" if args.quick else "results_solver.json")
    out.write_text(json.dumps(rows, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    np.seterr(all="ignore")
    main()
