"""Honest reports of generated modules: status words, infinite or null values, exit codes.

Facts used (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, sections 5.2.2 and
5.8, from memory): weak duality d <= p holds for every problem, so an unbounded dual
proves the primal infeasible (p = +inf), an infeasible dual has value -inf, and a dual
value above a feasible primal value means one of the numbers is wrong.
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from dualize.solvergen import runtime_report
from tests.solver.conftest import EXAMPLES
from tests.solver.test_runtime import instance, least_norm_spec

INFEASIBLE_LP = {"A": [[1, 2], [-1, 0], [0, -1]], "b": [-1, 0, 0], "c": [-3, -4]}
UNBOUNDED_LP = {"A": [[-1, 0], [0, -1]], "b": [0, 0], "c": [-3, -4]}
# sum(x) <= -1 and sum(x) >= 1: no x meets both.
INFEASIBLE_QP = {"P": [[4, 1, 0], [1, 3, 0.5], [0, 0.5, 2]], "q": [-1, 2, -3],
                 "G": [[1, 1, 1], [-1, -1, -1]], "h": [-1, -1]}
# Two equal rows with different right-hand sides: A x = b has no solution.
CLASHING_ROWS = {"A": [[1, 1, 0], [1, 1, 0]], "b": [1, 2]}
# Rows equal up to 1e-12: the least-norm x is of size 1e12, beyond a certificate.
ILL_CONDITIONED = {"A": [[1, 1, 0], [1, 1 + 1e-12, 0]], "b": [1, 2]}


def run_module(path, tmp_path, data, raw: bytes | None = None):
    instance_path = tmp_path / "instance.json"
    instance_path.write_bytes(raw if raw is not None else json.dumps(data).encode())
    result = subprocess.run([sys.executable, str(path), str(instance_path)],
                            capture_output=True, text=True, check=False, timeout=120)
    return result


@pytest.mark.parametrize(("name", "data", "status", "dual", "primal"), [
    ("joinery_lp", INFEASIBLE_LP, "infeasible", "inf", "inf"),
    ("joinery_lp", UNBOUNDED_LP, "dual-infeasible", "-inf", None),
    ("drone_thrust_qp", INFEASIBLE_QP, "infeasible", "inf", "inf"),
    ("survey_least_norm", CLASHING_ROWS, "infeasible", "inf", "inf"),
])
def test_no_finite_optimum_is_named_and_exits_nonzero(solver_module, tmp_path, name, data,
                                                      status, dual, primal):
    path, _ = solver_module(name)
    result = run_module(path, tmp_path, data)
    report = json.loads(result.stdout)
    assert result.returncode == 1, result.stderr
    assert (report["status"], report["dual_value"], report["primal_value"]) == \
        (status, dual, primal)
    assert report["gap"] is None


def test_ill_conditioned_instance_is_not_certified(solver_module, tmp_path):
    path, module = solver_module("survey_least_norm")
    report = module.solve(ILL_CONDITIONED)
    assert report["status"] != "certified"
    assert run_module(path, tmp_path, ILL_CONDITIONED).returncode == 1


def test_weak_duality_violation_is_a_failure():
    # A dual objective shifted by one: its "value" exceeds the primal optimum, which no
    # true dual can do, so the report must not call it a solution.
    spec = least_norm_spec("lbfgsb")
    wrong = spec.__class__(**{**spec.__dict__,
                              "objective": lambda z, d: spec.objective(z, d) - 1.0})
    report = runtime_report.run(wrong, instance())
    assert report["status"] == "unreliable" and "weak duality" in report["message"]
    assert report["gap"] < -0.99


def test_nan_in_the_dual_is_unreliable():
    spec = least_norm_spec("lbfgsb")
    broken = spec.__class__(**{**spec.__dict__, "objective": lambda z, d: float("nan")})
    report = runtime_report.run(broken, instance())
    assert report["status"] == "unreliable"


def test_certified_instance_exits_zero_with_tolerances_stated(solver_module, tmp_path):
    path, module = solver_module("survey_least_norm")
    data = {"A": [[1, -1, 0], [0, 1, -1]], "b": [0.5, -0.25]}
    result = run_module(path, tmp_path, data)
    report = json.loads(result.stdout)
    assert result.returncode == 0 and report["status"] == "certified"
    assert report["tolerances"] == {"gap": module.GAP_TOL, "violation": module.VIOLATION_TOL}
    assert abs(report["gap"]) <= module.GAP_TOL * (1 + 2 * abs(report["dual_value"]))


@pytest.mark.parametrize(("raw", "words"), [
    (b'{"A": [[1, 2]], "A": [[1, 2]], "b": [1], "c": [1, 1]}', "given twice"),
    (b'{"A": [[1, true]], "b": [1], "c": [1, 1]}', "true/false"),
    (b'{"A": [[1, 1e999]], "b": [1], "c": [1, 1]}', "floating-point range"),
    (b'{"A": ' + b"[" * 100 + b"]" * 100 + b', "b": [1], "c": [1, 1]}', "nested"),
    (b'{"A": [[1, 2]], "b": [1], "c": "\xc3\x28"}', "UTF-8"),
    (b'{"A": [[1, 2]], "b": [1], "c": [NaN, 1]}', "not a number"),
])
def test_hostile_instance_is_one_line_and_exit_2(solver_module, tmp_path, raw, words):
    # Exit status 2 for bad input (common practice for command-line tools).
    path, _ = solver_module("joinery_lp")
    result = run_module(path, tmp_path, None, raw)
    assert result.returncode == 2 and result.stdout == ""
    assert words in result.stderr and result.stderr.count("\n") == 1
    assert "Traceback" not in result.stderr


def test_report_json_is_strict(solver_module, tmp_path):
    # RFC 8259 has no NaN or Infinity: the printed report must parse under a strict reader.
    path, _ = solver_module("joinery_lp")
    result = run_module(path, tmp_path, INFEASIBLE_LP)
    json.loads(result.stdout, parse_constant=lambda text: pytest.fail(text))
    assert np.isinf(float(json.loads(result.stdout)["dual_value"]))


def test_script_pins_blas_to_one_thread_unless_told(solver_module, tmp_path):
    # The module's products are matrix-vector or thin; it sets OPENBLAS_NUM_THREADS (and the
    # OpenMP and MKL ones) to 1 before numpy loads, but never overrides a value the user set.
    import os

    path, _ = solver_module("joinery_lp")
    probe = ("import os, runpy, sys\n"
             f"sys.argv = ['m', {str(EXAMPLES / 'joinery_lp.json')!r}]\n"
             "try:\n"
             f"    runpy.run_path({str(path)!r}, run_name='__main__')\n"
             "except SystemExit:\n"
             "    pass\n"
             "print(os.environ['OPENBLAS_NUM_THREADS'], os.environ['OMP_NUM_THREADS'], "
             "file=sys.stderr)\n")
    base = {k: v for k, v in os.environ.items()
            if k not in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")}
    for env, expected in ((base, "1 1"), ({**base, "OPENBLAS_NUM_THREADS": "2"}, "2 1")):
        result = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                                env=env, check=False, timeout=120)
        assert result.stderr.strip().splitlines()[-1] == expected
