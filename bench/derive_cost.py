"""What one `dualize derive` process costs, cold and warm, against `import sympy`.

Run from the repository root:

    python bench/derive_cost.py [--repeat 5] [--out bench/derive_cost.json]

"Cold" runs start with an empty cache folder (a fresh folder per run) and the seed
the package ships; "bare" runs start empty with the seed turned off
(``DUALIZE_CACHE_SEED=off``: every step derived); "warm" runs reuse a folder
filled by one earlier run of the same file (the finished output is replayed).
Each figure is the median
of ``--repeat`` whole processes with one BLAS thread, measured interleaved with
the baseline ``python -c "import sympy"`` so that a busy machine affects both
alike: compare the ratios, not the seconds.  Bytecode is written and used, as
in an installed copy (a first untimed run compiles the modules).
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"


def _env(cache: str | None, seed: bool = True) -> dict[str, str]:
    env = dict(os.environ, NO_COLOR="1", OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1",
               PYTHONPATH=str(ROOT))
    env.pop("DUALIZE_CACHE", None)
    env.pop("DUALIZE_CACHE_SEED", None)
    if not seed:
        env["DUALIZE_CACHE_SEED"] = "off"
    env.pop("PYTHONDONTWRITEBYTECODE", None)  # as installed: modules load from bytecode
    if cache is not None:
        env["DUALIZE_CACHE_DIR"] = cache
    return env


def _seconds(args: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run(args, check=True, capture_output=True, env=env, cwd=ROOT, timeout=600)
    return time.perf_counter() - start


def measure(path: Path, repeat: int) -> dict[str, float]:
    """Median seconds of import sympy, a cold derive and a warm derive of ``path``."""
    derive = [sys.executable, "-m", "dualize", "derive", str(path)]
    base, cold, bare, warm = [], [], [], []
    with tempfile.TemporaryDirectory() as shared:
        _seconds(derive, _env(shared))  # fills the warm folder
        for _ in range(repeat):
            base.append(_seconds([sys.executable, "-c", "import sympy"], _env(None)))
            with tempfile.TemporaryDirectory() as fresh:
                cold.append(_seconds(derive, _env(fresh)))
            with tempfile.TemporaryDirectory() as fresh:
                bare.append(_seconds(derive, _env(fresh, seed=False)))
            warm.append(_seconds(derive, _env(shared)))
    b, c, n, w = (statistics.median(v) for v in (base, cold, bare, warm))
    return {"import_sympy_s": b, "cold_s": c, "bare_s": n, "warm_s": w, "cold_ratio": c / b,
            "bare_ratio": n / b, "warm_ratio": w / b}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--only", nargs="*", help="example stems to measure (default: all)")
    parser.add_argument("--out", default=str(ROOT / "bench" / "derive_cost.json"))
    args = parser.parse_args()
    paths = sorted(EXAMPLES.glob("*.prob"))
    if args.only:
        paths = [p for p in paths if p.stem in set(args.only)]
    results = {p.stem: measure(p, args.repeat) for p in paths}
    print(f"{'example':28} {'sympy s':>8} {'cold s':>7} {'bare s':>7} {'warm s':>7} "
          f"{'cold x':>7} {'bare x':>7} {'warm x':>7}")
    for name, r in results.items():
        print(f"{name:28} {r['import_sympy_s']:8.2f} {r['cold_s']:7.2f} {r['bare_s']:7.2f} "
              f"{r['warm_s']:7.2f} {r['cold_ratio']:7.2f} {r['bare_ratio']:7.2f} "
              f"{r['warm_ratio']:7.2f}")
    worst_cold = max(r["cold_ratio"] for r in results.values())
    worst_warm = max(r["warm_ratio"] for r in results.values())
    worst_bare = max(r["bare_ratio"] for r in results.values())
    print(f"worst cold ratio {worst_cold:.2f} (target 2.0), "
          f"worst warm ratio {worst_warm:.2f} (target 1.2); "
          f"without the seed, worst cold ratio {worst_bare:.2f}")
    Path(args.out).write_text(json.dumps(results, indent=2, sort_keys=True) + "\n",
                              encoding="utf-8")


if __name__ == "__main__":
    main()
