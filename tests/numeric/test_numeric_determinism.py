"""Same input, byte-identical verify report, whatever the hash seed (house rule)."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = """
import json, warnings
warnings.simplefilter("ignore")
from dualize.model import load
from dualize.duality import derive
from dualize.numeric.instance import read_instance
from dualize.numeric.verify import report_dict, verify
path = "examples/lab_budget_max.prob"
problem = load(open(path).read(), path).problem
inst = read_instance("examples/lab_budget_max.json", problem)
print(json.dumps(report_dict(verify(derive(problem), [inst], seeds=[0, 1]))))
"""


def run(seed: str) -> str:
    env = {**os.environ, "PYTHONHASHSEED": seed, "PYTHONPATH": str(ROOT)}
    out = subprocess.run([sys.executable, "-c", SCRIPT], cwd=ROOT, env=env,
                         capture_output=True, text=True, timeout=300, check=True)
    return out.stdout


def test_verify_report_is_byte_identical_across_hash_seeds() -> None:
    if not (ROOT / "examples" / "lab_budget_max.prob").exists():
        pytest.skip("bundled example missing")
    first, second = run("1"), run("12345")
    assert first == second
    assert '"verdict": "zero-gap"' in first
