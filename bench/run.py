"""Benchmarks: what a derivation costs and how the cost grows.

Run from the repository root:

    python bench/run.py [--repeat 5] [--quick] [--out bench/results.json]

Every timing is the median of repeated runs and is reported beside a baseline
measured in the same run (the machine is shared and noisy: compare ratios).
The figures go to a JSON file; the README's Performance section quotes them.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"


def median_seconds(run: Callable[[], object], repeat: int) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        run()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def process(args: list[str], **extra: str) -> Callable[[], object]:
    env = dict(os.environ, NO_COLOR="1", **extra)
    return lambda: subprocess.run(args, check=True, capture_output=True, env=env, cwd=ROOT)


def dualize_cmd(*args: str) -> list[str]:
    return [sys.executable, "-m", "dualize", *args]


def startup(repeat: int) -> dict[str, float]:
    """`dualize --help` against the floor of any click tool."""
    base = median_seconds(process([sys.executable, "-c", "import click"]), repeat)
    ours = median_seconds(process(dualize_cmd("--help")), repeat)
    return {"import_click_s": base, "dualize_help_s": ours, "ratio": ours / base}


def derivations(repeat: int) -> dict[str, object]:
    """Each example derived in process (after imports), and one whole process, all with
    the cache turned off (every step derived; bench/derive_cost.py measures the cache)."""
    os.environ["DUALIZE_CACHE"] = "off"
    from dualize.duality import derive
    from dualize.model import load_file

    per_example, first = {}, {}
    for path in sorted(EXAMPLES.glob("*.prob")):
        problem = load_file(path).problem
        first[path.stem] = median_seconds(lambda p=problem: derive(p), 1)  # conjugates cold
        per_example[path.stem] = median_seconds(lambda p=problem: derive(p), repeat)
    sympy_import = median_seconds(process([sys.executable, "-c", "import sympy"]), repeat)
    svm = str(EXAMPLES / "parts_soft_margin.prob")
    whole = median_seconds(process(dualize_cmd("derive", svm), DUALIZE_CACHE="off"), repeat)
    del os.environ["DUALIZE_CACHE"]
    typical = statistics.median(per_example.values())
    return {"per_example_s": per_example, "first_run_s": first, "typical_s": typical,
            "worst_first_run_s": max(first.values()),
            "import_sympy_s": sympy_import, "typical_over_sympy_import": typical / sympy_import,
            "derive_process_s": whole, "derive_process_over_sympy_import": whole / sympy_import}


def lint_throughput(repeat: int, count: int) -> dict[str, float]:
    """A folder of generated problem files linted in one call, against one file."""
    sources = sorted(EXAMPLES.glob("*.prob"))
    with tempfile.TemporaryDirectory() as folder:
        for i in range(count):
            text = sources[i % len(sources)].read_text(encoding="utf-8")
            Path(folder, f"p{i:03d}.prob").write_text(text, encoding="utf-8")
        one = median_seconds(process(dualize_cmd("lint", str(Path(folder, "p000.prob")))),
                             repeat)
        many = median_seconds(process(dualize_cmd("lint", folder)), max(1, repeat // 2))
    return {"files": count, "one_file_s": one, "folder_s": many,
            "folder_over_one_file": many / one, "files_per_s": count / many,
            "cores": os.cpu_count() or 1}


def scalar_problem(k: int) -> str:
    """k linear constraints on two scalars, a strictly convex objective."""
    lines = ["minimize x^2 + y^2", "over x in R, y in R", "subject to"]
    lines += [f"  {i + 1} * x + y >= {i}" for i in range(k)]
    return "\n".join(lines) + "\n"


def entries_problem(n: int) -> str:
    """n explicit scalar variables: a least-norm problem written entry by entry."""
    names = [f"x{i}" for i in range(1, n + 1)]
    objective = " + ".join(f"{v}^2" for v in names)
    over = ", ".join(f"{v} in R" for v in names)
    return f"minimize {objective}\nover {over}\nsubject to\n  {' + '.join(names)} == 1\n"


def sized_problem(n: int) -> str:
    """The soft-margin problem with numeric sizes: sizes stay sizes, cost stays flat."""
    text = (EXAMPLES / "parts_soft_margin.prob").read_text(encoding="utf-8")
    return text.replace("R^(m,n)", f"R^({2 * n},{n})").replace("R^m", f"R^{2 * n}").replace(
        "R^n", f"R^{n}")


def growth(repeat: int, sizes: dict[str, list[int]]) -> dict[str, object]:
    from dualize.duality import derive
    from dualize.model import load

    out: dict[str, object] = {}
    for label, make in (("scalar_constraints", scalar_problem), ("explicit_entries",
                        entries_problem), ("numeric_size", sized_problem)):
        times = {}
        for n in sizes[label]:
            problem = load(make(n)).problem
            assert problem is not None, label
            times[n] = median_seconds(lambda p=problem: derive(p), repeat)
        out[label] = {"seconds": times, "exponent": fitted_exponent(times)}
    return out


def fitted_exponent(times: dict[int, float]) -> float:
    """The slope of log(time) against log(size), by least squares."""
    xs = [math.log(n) for n in times]
    ys = [math.log(t) for t in times.values()]
    mx, my = statistics.mean(xs), statistics.mean(ys)
    sxx = sum((x - mx) ** 2 for x in xs)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys, strict=True)) / sxx


def peak_memory() -> dict[str, float]:
    """Peak resident memory of one `dualize derive` process (cache off: every step is
    derived, nothing replayed), and of a bare sympy import."""
    probe = ("import resource, sys, runpy; sys.argv = {argv!r}; "
             "exec(compile('try:\\n runpy.run_module(\"dualize\", run_name=\"__main__\")\\n"
             "except SystemExit:\\n pass', 'probe', 'exec')); "
             "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)")
    out = {}
    worst = 0.0
    for path in sorted(EXAMPLES.glob("*.prob")):
        code = probe.format(argv=["dualize", "derive", str(path)])
        res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             cwd=ROOT, check=True, env=dict(os.environ, DUALIZE_CACHE="off"))
        worst = max(worst, int(res.stdout.strip().splitlines()[-1]) / 1024)
    base = subprocess.run([sys.executable, "-c", "import resource, sympy; print(resource."
                           "getrusage(resource.RUSAGE_SELF).ru_maxrss)"], capture_output=True,
                          text=True, check=True)
    out["derive_peak_mb_worst_example"] = worst
    out["import_sympy_peak_mb"] = int(base.stdout.strip()) / 1024
    return out


def report(results: dict[str, object]) -> str:
    s, d, lint, g, mem = (results[k] for k in ("startup", "derivation", "lint", "growth",
                                               "memory"))
    rows = [
        ("start-up: dualize --help / import click", f"{s['ratio']:.2f}x", "<= 1.5x"),
        ("typical example derived in process / import sympy",
         f"{d['typical_over_sympy_import']:.2f}x", "<= 0.5x"),
        ("dualize derive process / import sympy", f"{d['derive_process_over_sympy_import']:.2f}x",
         "-"),
        ("slowest first derivation (conjugates derived cold)", f"{d['worst_first_run_s']:.2f} s",
         "-"),
        (f"lint {lint['files']} files / one file", f"{lint['folder_over_one_file']:.2f}x", "-"),
        ("lint throughput", f"{lint['files_per_s']:.1f} files/s on {lint['cores']} cores", "-"),
        ("growth exponent, scalar constraints", f"{g['scalar_constraints']['exponent']:.2f}",
         "<= 2"),
        ("growth exponent, explicit entries", f"{g['explicit_entries']['exponent']:.2f}", "-"),
        ("growth exponent, numeric sizes", f"{g['numeric_size']['exponent']:.2f}", "~0"),
        ("peak memory, worst example", f"{mem['derive_peak_mb_worst_example']:.0f} MB",
         "<= 200 MB"),
    ]
    width = max(len(r[0]) for r in rows)
    lines = [f"{'figure'.ljust(width)}  {'measured':>28}  target"]
    lines += [f"{a.ljust(width)}  {b:>28}  {c}" for a, b, c in rows]
    return "\n".join(lines)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="fewer sizes and files")
    parser.add_argument("--out", default=str(ROOT / "bench" / "results.json"))
    args = parser.parse_args()
    sys.path.insert(0, str(ROOT))
    sizes = {"scalar_constraints": [5, 10, 20, 40] if args.quick else [5, 10, 20, 40, 80],
             "explicit_entries": [2, 4, 8, 16] if args.quick else [2, 4, 8, 16, 32, 64],
             "numeric_size": [2, 8, 32] if args.quick else [2, 4, 8, 16, 32, 64]}
    results = {
        "startup": startup(args.repeat),
        "derivation": derivations(args.repeat),
        "lint": lint_throughput(args.repeat, 40 if args.quick else 200),
        "growth": growth(max(1, args.repeat // 2), sizes),
        "memory": peak_memory(),
    }
    Path(args.out).write_text(json.dumps(results, indent=2, sort_keys=True) + "\n",
                              encoding="utf-8")
    print(report(results))
    print(f"\nfigures written to {args.out}")


if __name__ == "__main__":
    main()
