"""Same input, byte-identical output, whatever the hash seed.

Python randomizes string hashing per process (PYTHONHASHSEED; common practice:
set and dict-of-set iteration order changes between runs), so two processes with
different seeds must print the same bytes in every format.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]

SCRIPT = """
import sys
from render_builders import lp_derivation, svm_analysis, svm_derivation
from dualize.render.json_out import render_json
from dualize.render.latex import render_latex
from dualize.render.markdown import render_markdown
from dualize.render.text import render_text
for derivation, analysis in ((svm_derivation(), svm_analysis()),
                             (lp_derivation(inner=True, domain="nonneg"), None)):
    for out in (render_latex(derivation, analysis, standalone=True),
                render_markdown(derivation, analysis),
                render_text(derivation, analysis, color=True),
                render_json(derivation, analysis)):
        sys.stdout.buffer.write(out.encode("utf-8"))
"""


def run_with_seed(seed: str) -> bytes:
    env = dict(os.environ, PYTHONHASHSEED=seed,
               PYTHONPATH=os.pathsep.join([str(ROOT), str(HERE)]))
    done = subprocess.run([sys.executable, "-c", SCRIPT], env=env, capture_output=True,
                          timeout=120, check=True)
    return done.stdout


def test_byte_identical_across_hash_seeds() -> None:
    first, second = run_with_seed("1"), run_with_seed("4242")
    assert first and first == second
