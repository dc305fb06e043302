"""Write dualize/cache_seed.json, the cache entries the package ships: run on purpose only.

    python tests/cache_seed/regenerate_seed.py

The seed holds what every user's first run would otherwise compute: the parser's
tables and the conjugates of parameter-free scalar functions, the ones the
function table's functions (each used alone, see ``table_problems``) and the
bundled problems reach.  Conjugates that involve a problem's own data are left
out: they are derived on the user's machine like any other step.  The entries
are made by this checkout's code in a fresh cache folder with the seed turned
off, so each is exactly what a cold run derives; test_cache_seed.py checks that.
Rerun after changing the grammar or the conjugate engine (the stamps then no
longer match and the seed is silently unused).
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
SEED = ROOT / "dualize" / "cache_seed.json"
SECTIONS = ("parser", "derivation")
ONLY_T = re.compile(r"Symbol\('([^']+)'")


def table_problems() -> list[str]:
    """One problem per function of the table: the function summed, under equalities, in
    whichever sense makes it convex (the engine refuses the other sense)."""
    from dualize.model.functions import TABLE

    texts = []
    for name in sorted(TABLE):
        call = "x .* log(x)" if name == "log" else f"{name}(x)"
        for sense, sign in (("minimize", ""), ("minimize", "-"), ("maximize", "")):
            texts.append(f"data A in R^(m,n)\ndata b in R^m\n{sense} {sign}sum({call})\n"
                         f"over x in R^n\nsubject to\n  A*x == b\n")
    for name in ("log", "sqrt"):
        texts.append(f"data A in R^(m,n)\ndata b in R^m\nmaximize sum({name}(x))\n"
                     "over x in R^n\nsubject to\n  A*x == b\n")
    return texts


def corpus(folder: Path) -> list[Path]:
    paths = sorted((ROOT / "examples").glob("*.prob")) + sorted(
        (ROOT / "tests" / "problems").glob("*.prob"))
    for i, text in enumerate(table_problems()):
        path = folder / f"table_{i:02d}.prob"
        path.write_text(text, encoding="utf-8")
        paths.append(path)
    return paths


def derive_all(paths: list[Path], cache: Path) -> None:
    """Each problem derived in a child process with a fresh cache and no seed."""
    env = dict(os.environ, DUALIZE_CACHE_DIR=str(cache), DUALIZE_CACHE_SEED="off",
               PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1")
    env.pop("DUALIZE_CACHE", None)
    script = ("import sys\nfrom dualize import api\nfor p in sys.argv[1:]:\n"
              "    try:\n        api.derive(p)\n    except Exception:\n        pass\n")
    subprocess.run([sys.executable, "-c", script, *map(str, paths)], env=env, check=True,
                   timeout=1800, cwd=ROOT)


def wanted(section: str, key: str) -> bool:
    if section == "parser":
        return True
    return key.startswith("conjugate|") and set(ONLY_T.findall(key)) <= {"t"}


def collect(cache: Path) -> dict[str, dict[str, object]]:
    seed: dict[str, dict[str, object]] = {}
    for section in SECTIONS:
        entries = {}
        for path in sorted((cache / section).glob("*.json")):
            entry = json.loads(path.read_text(encoding="utf-8"))
            if wanted(section, entry["key"]):
                entries[entry["key"]] = entry
        seed[section] = dict(sorted(entries.items()))
    return seed


def main() -> None:
    with tempfile.TemporaryDirectory() as scratch:
        folder = Path(scratch)
        derive_all(corpus(folder), folder / "cache")
        seed = collect(folder / "cache")
    SEED.write_text(json.dumps(seed, sort_keys=True, separators=(",", ":")) + "\n",
                    encoding="utf-8")
    counts = ", ".join(f"{len(v)} {k}" for k, v in seed.items())
    print(f"wrote {SEED.relative_to(ROOT)}: {counts}")


if __name__ == "__main__":
    main()
