"""Running the command line in a child process, as a user does."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def env() -> dict[str, str]:
    """This checkout first on the path; BLAS on one thread (common practice on CI)."""
    out = dict(os.environ)
    out["PYTHONPATH"] = str(ROOT) + os.pathsep + out.get("PYTHONPATH", "")
    out.update(OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1")
    return out


def dualize(*args: str, cwd: str | Path | None = None,
            timeout: float = 300) -> subprocess.CompletedProcess[str]:
    """``python -m dualize ARGS`` with its output captured as text."""
    return subprocess.run([sys.executable, "-m", "dualize", *args], capture_output=True,
                          text=True, env=env(), cwd=cwd, timeout=timeout, check=False)
