"""`dualize solver` through click's runner: a module written whole, or nothing."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from click.testing import CliRunner

from dualize.cli import main

ROOT = Path(__file__).resolve().parents[2]


def test_generated_module_runs_and_closes_the_gap(tmp_path: Path) -> None:
    # Weak and strong duality (common practice): the recovered primal value meets the
    # dual value at the optimum of the soft-margin problem.
    out = tmp_path / "svm_solver.py"
    problem = ROOT / "examples" / "parts_soft_margin.prob"
    result = CliRunner().invoke(main, ["solver", str(problem), "-o", str(out)])
    assert result.exit_code == 0, result.output
    run = subprocess.run([sys.executable, str(out), str(problem.with_suffix(".json"))],
                         capture_output=True, text=True, check=True)
    report = json.loads(run.stdout)
    assert report["converged"] and abs(report["gap"]) <= 1e-6 * max(1, abs(report["dual_value"]))


def test_lifted_linear_program_reports_only_the_multipliers(tmp_path: Path) -> None:
    # Strong duality of a feasible bounded LP (S. Boyd and L. Vandenberghe, Convex
    # Optimization, 2004, section 5.2.4, from memory): the gap of the box LP closes.
    out = tmp_path / "box_solver.py"
    problem = ROOT / "examples" / "charging_box.prob"
    result = CliRunner().invoke(main, ["solver", str(problem), "-o", str(out)])
    assert result.exit_code == 0, result.output
    run = subprocess.run([sys.executable, str(out), str(problem.with_suffix(".json"))],
                         capture_output=True, text=True, check=True)
    report = json.loads(run.stdout)
    assert report["converged"] and abs(report["gap"]) <= 1e-9 * max(1, abs(report["dual_value"]))
    assert list(report["multipliers"]) == ["feeder"]


def test_no_closed_form_writes_nothing(tmp_path: Path) -> None:
    # A general quadratic on the orthant keeps its infimum (no closed form, common practice).
    source = tmp_path / "kept.prob"
    source.write_text("data P in S^n_++\ndata c in R^n\nminimize 1/2 * x' * P * x + c' * x\n"
                      "over x in R^n_+\n", encoding="utf-8")
    out = tmp_path / "solver.py"
    result = CliRunner().invoke(main, ["solver", str(source), "-o", str(out)])
    assert result.exit_code == 2 and "no closed form" in result.output
    assert not out.exists() and sorted(p.name for p in tmp_path.iterdir()) == ["kept.prob"]
