"""Benchmark: generated dual solvers against cvxpy on the primal, whole processes.

For each case an instance is written to a JSON file; then two fresh processes read it,
one running the module that ``dualize solver`` generates for the problem, one solving
the primal with cvxpy and its default open solvers (the general route).  Both run with
one BLAS thread (OPENBLAS_NUM_THREADS = OMP_NUM_THREADS = MKL_NUM_THREADS = 1).  The
figures: wall time of each process (imports, reading and solving), their ratio, both
optima and their relative difference, the module's status and certified gap, and the
peak resident memory of each process (``/usr/bin/time -v`` when present, else the
process's own ``getrusage``).

With ``--reference`` each row also gets an accuracy reference: a third fresh process
solves the primal with Clarabel at tight tolerances (``bench_cases.py --reference``) and
the row records reference_value, reference_solver, reference_status, reference_seconds
and relative_difference_reference = |ours - ref| / max(1, |ref|).  Its time is no part
of the ratio; a reference that fails or is stopped is recorded as reference_error.
``--reference-only --into FILE`` adds those fields to the rows of an existing results
file without rerunning the timed processes: the instances come from seeded generators,
so each row's instance is rebuilt exactly.

Run: python bench/bench_solver.py [--quick] [--only NAME] [--size MxN] [--timeout SECONDS]
         [--reference | --reference-only --into FILE]
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
from typing import Any

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
            return {"error": f"killed after {timeout:g} s"}
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


def written_instance(name: str, size: tuple[int, ...], folder: Path) -> Path:
    """The seeded instance of ``name`` at ``size``, written to a JSON file in ``folder``."""
    instance = folder / f"{name}_{'x'.join(map(str, size))}.json"
    instance.write_text(json.dumps(CASES[name].instance(*size)), encoding="utf-8")
    return instance


def primal_command(name: str, instance: Path, reference: bool = False) -> list[str]:
    """The command solving the primal by cvxpy: the general route, or the reference."""
    command = [sys.executable, str(ROOT / "bench" / "bench_cases.py"), name, str(instance)]
    return [*command, "--reference"] if reference else command


def one_case(name: str, size: tuple[int, ...], folder: Path, timeout: float,
             reference: bool = False) -> dict:
    instance = written_instance(name, size, folder)
    module = generated_module(ROOT / CASES[name].problem, folder)
    ours = measured([sys.executable, str(module), str(instance)], timeout)
    general = measured(primal_command(name, instance), timeout)
    row = summary(name, size, ours, general)
    if reference:
        row.update(reference_fields(row, measured(primal_command(name, instance, True),
                                                  timeout)))
    return row


def our_value(row: dict) -> float | None:
    """The generated module's optimum in a row: its primal value, else its dual value."""
    for key in ("primal_value", "dual_value"):
        if isinstance(row.get(key), float):
            return row[key]
    return None


def reference_fields(row: dict, result: dict) -> dict:
    """The accuracy reference's fields for ``row`` from the reference process's result."""
    if "error" in result:
        return {"reference_error": result["error"]}
    output = result["output"]
    fields = {"reference_value": output["value"], "reference_solver": output["solver"],
              "reference_status": output["status"],
              "reference_seconds": round(result["seconds"], 3)}
    ours, ref = our_value(row), output["value"]
    if ours is not None and isinstance(ref, float):
        fields["relative_difference_reference"] = abs(ours - ref) / max(1.0, abs(ref))
    return fields


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
        value = our_value(row)
        if value is not None:
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


def reference_table(rows: list[dict]) -> str:
    """The generated optimum against the accuracy reference, for rows that have one."""
    lines = ["| case | size | generated optimum | reference optimum (status, s) "
             "| relative difference |", "|" + "---|" * 5]
    for r in rows:
        if "reference_value" in r:
            ref = f"{_short(r['reference_value'])} ({r['reference_status']}, " \
                  f"{r['reference_seconds']})"
        elif "reference_error" in r:
            ref = r["reference_error"]
        else:
            continue
        lines.append(f"| {r['case']} | {r['size']} | {_short(our_value(r))} | {ref} | "
                     f"{_short(r.get('relative_difference_reference'))} |")
    return "\n".join(lines)


def _short(value: object) -> str:
    return f"{value:.9g}" if isinstance(value, float) else str(value)


REFERENCE_KEYS = ("reference_value", "reference_solver", "reference_status",
                  "reference_seconds", "relative_difference_reference", "reference_error")


def write_rows(rows: list[dict], out: Path) -> None:
    """Write the rows whole: a file beside ``out`` first, then moved over it."""
    part = out.with_name(out.name + ".part")
    part.write_text(json.dumps(rows, indent=2) + "\n", encoding="utf-8")
    os.replace(part, out)


def merge_references(into: Path, wanted: Any, timeout: float) -> list[dict]:
    """Add the accuracy reference to the wanted rows of ``into``, rewriting it after each."""
    rows = json.loads(into.read_text(encoding="utf-8"))
    with tempfile.TemporaryDirectory() as scratch:
        for row in rows:
            size = _size(row)
            if not wanted(row["case"], size):
                continue
            instance = written_instance(row["case"], size, Path(scratch))
            result = measured(primal_command(row["case"], instance, True), timeout)
            instance.unlink()
            for key in REFERENCE_KEYS:
                row.pop(key, None)
            row.update(reference_fields(row, result))
            write_rows(rows, into)
            print(json.dumps({k: row[k] for k in ("case", "size", *REFERENCE_KEYS) if k in row}),
                  flush=True)
    return rows


def arguments() -> argparse.Namespace:
    parser = argparse.ArgumentParser()
    parser.add_argument("--quick", action="store_true", help="the small size of each case")
    parser.add_argument("--only", help="run only this case (soft_margin, lp, lasso, ...)")
    parser.add_argument("--size", help="run only this size of the case(s), e.g. 10000x100")
    parser.add_argument("--timeout", type=float, default=600.0,
                        help="seconds each process may take (each reference process too)")
    parser.add_argument("--out", help="where to write the figures (default: bench/results_"
                        "solver.json, or results_solver_quick.json with --quick)")
    parser.add_argument("--reference", action="store_true",
                        help="also solve each primal by Clarabel at tight tolerances")
    parser.add_argument("--reference-only", action="store_true",
                        help="only add the reference to the rows of the --into file")
    parser.add_argument("--into", help="the results file --reference-only completes")
    args = parser.parse_args()
    if args.reference_only and not args.into:
        parser.error("--reference-only needs --into FILE (a results file to complete)")
    if args.into and not args.reference_only:
        parser.error("--into goes with --reference-only")
    if args.into and not results_file(Path(args.into)):
        parser.error(f"--into {args.into}: not a results file of this benchmark (a JSON "
                     "list of rows, each with its case and size)")
    return args


def results_file(path: Path) -> bool:
    """Whether ``path`` holds rows this benchmark wrote, each naming a known case and size."""
    try:
        rows = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError):
        return False
    return isinstance(rows, list) and all(
        isinstance(r, dict) and r.get("case") in CASES and isinstance(r.get("size"), str)
        and all(k.isdigit() for k in r["size"].split("x")) for r in rows)


def main() -> None:
    args = arguments()

    def wanted(name: str, size: tuple[int, ...]) -> bool:
        return (not args.only or name == args.only) and \
            (not args.size or "x".join(map(str, size)) == args.size)

    if args.reference_only:
        rows = merge_references(Path(args.into), wanted, args.timeout)
        print(reference_table([r for r in rows if wanted(r["case"], _size(r))]))
        return
    plan = QUICK if args.quick else [(n, s) for n, c in CASES.items() for s in c.sizes]
    rows = []
    with tempfile.TemporaryDirectory() as scratch:
        for name, size in filter(lambda item: wanted(*item), plan):
            rows.append(one_case(name, size, Path(scratch), args.timeout, args.reference))
            print(json.dumps(rows[-1]), flush=True)
    print(table(rows))
    if args.reference:
        print(reference_table(rows))
    out = Path(args.out) if args.out else \
        ROOT / "bench" / ("results_solver_quick.json" if args.quick else "results_solver.json")
    write_rows(rows, out)


def _size(row: dict) -> tuple[int, ...]:
    return tuple(int(k) for k in row["size"].split("x"))


if __name__ == "__main__":
    np.seterr(all="ignore")
    main()
