"""The generated module as a program: ruff-clean, exit codes, refusals, gradients."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from dualize.duality import derive
from dualize.errors import DualizeError
from dualize.model import load
from dualize.solvergen.python_code import python_names
from dualize.solvergen.solver import render_solver
from tests.solver.conftest import EXAMPLES, derivation_of

SOLVABLE = [
    "antenna_norm_min", "charging_box", "disk_scalar", "drone_thrust_qp", "flour_blend_lp",
    "joinery_lp", "kiln_minimax", "lab_budget_max", "orchard_mean_variance",
    "parts_soft_margin", "pipe_leaks_l1", "pump_share_domain", "robot_analytic_center",
    "route_entropy",
    "sensor_hinge", "spectrum_lasso", "survey_least_norm", "traffic_softmax", "window_scalar",
]


@pytest.mark.parametrize("name", [*SOLVABLE, "vibration_sdp", "shift_partition"])
def test_generated_module_is_ruff_clean(tmp_path, name):
    # The project's lint gate on generated code (common practice); long printed expressions
    # are allowed, so E501 is the one rule not asked for.
    path = tmp_path / f"{name}.py"
    path.write_text(render_solver(derivation_of(name)), encoding="utf-8")
    result = subprocess.run(
        ["ruff", "check", "--isolated", "--no-cache", "--select", "E4,E7,E9,F,W,I,B,UP",
         str(path)],
        capture_output=True, text=True, check=False,
    )
    assert result.returncode == 0, result.stdout


@pytest.mark.parametrize("name", ["parts_soft_margin", "charging_box", "kiln_minimax",
                                  "robot_analytic_center"])
def test_same_input_same_module(name):
    first = render_solver(derivation_of(name))
    assert first == render_solver(derivation_of(name))


@pytest.mark.parametrize("name", ["drone_thrust_qp", "route_entropy", "parts_soft_margin",
                                  "orchard_mean_variance", "survey_least_norm"])
def test_gradient_matches_finite_differences(solver_module, name):
    # Central differences as the check of an analytic gradient (common practice).
    _, module = solver_module(name)
    d = module._read(module.SPEC, json.loads((EXAMPLES / f"{name}.json").read_text()))
    d.update(module._prepare(d))
    lo, hi = module._bounds(d)
    rng = np.random.default_rng(0)
    z = module._start(lo, hi) + 0.1 * rng.random(lo.shape)
    grad = module._gradient(z, d)
    step = 1e-6
    for i in range(len(z)):
        e = np.zeros_like(z)
        e[i] = step
        numeric = (module._objective(z + e, d) - module._objective(z - e, d)) / (2 * step)
        assert grad[i] == pytest.approx(numeric, rel=1e-5, abs=1e-6)


def test_command_line_reports_json(solver_module):
    path, _ = solver_module("joinery_lp")
    result = subprocess.run([sys.executable, str(path), str(EXAMPLES / "joinery_lp.json")],
                            capture_output=True, text=True, check=False)
    assert result.returncode == 0
    report = json.loads(result.stdout)
    assert report["gap"] == pytest.approx(0.0, abs=1e-9)


@pytest.mark.parametrize("bad", [{"A": [[1, 2]], "b": [1], "c": [1]}, {"A": "x"}, [1, 2]])
def test_bad_input_exits_2(solver_module, tmp_path, bad):
    path, _ = solver_module("joinery_lp")
    instance = tmp_path / "bad.json"
    instance.write_text(json.dumps(bad))
    result = subprocess.run([sys.executable, str(path), str(instance)],
                            capture_output=True, text=True, check=False)
    assert result.returncode == 2
    assert result.stderr.startswith("error:")
    assert "Traceback" not in result.stderr


def test_semidefinite_dual_is_solved_and_certified(solver_module):
    # A semidefinite program and its dual have equal optima under Slater's condition
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.9.1, from memory);
    # the optimum is checked against cvxpy on the primal, and X comes from the multiplier
    # of the dual's semidefinite constraint.
    import cvxpy as cp

    path, module = solver_module("vibration_sdp")
    data = json.loads((EXAMPLES / "vibration_sdp.json").read_text())
    result = subprocess.run([sys.executable, str(path), str(EXAMPLES / "vibration_sdp.json")],
                            capture_output=True, text=True, check=False)
    report = json.loads(result.stdout)
    assert result.returncode == 0 and report["status"] == "certified"
    C, A1 = np.array(data["C"], dtype=float), np.array(data["A1"], dtype=float)
    X = cp.Variable((3, 3), symmetric=True)
    problem = cp.Problem(cp.Minimize(cp.trace(C @ X)), [cp.trace(A1 @ X) == data["b1"], X >> 0])
    problem.solve()
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    ours = np.array(report["primal"]["X"])
    assert np.linalg.eigvalsh(ours).min() >= -1e-8
    assert np.trace(A1 @ ours) == pytest.approx(data["b1"], abs=1e-8)


def test_partition_dual_bound_is_n_times_the_smallest_eigenvalue(solver_module):
    # Two-way partitioning, minimize x'W x with x_i^2 = 1: nu = -lambda_min(W) 1 meets the
    # dual's constraint diag(nu) + W >= 0, so the dual optimum is at least n lambda_min(W)
    # (Boyd and Vandenberghe, 2004, section 5.1.5, from memory); for a cycle, whose symmetry
    # makes equal entries of nu optimal, it is equal.  The primal is nonconvex: only the
    # bound is reported.
    _, module = solver_module("shift_partition")
    W = np.array(json.loads((EXAMPLES / "shift_partition.json").read_text())["W"], dtype=float)
    report = module.solve({"W": W.tolist()})
    assert report["status"] == "dual-only" and report["converged"]
    assert report["dual_value"] >= len(W) * np.linalg.eigvalsh(W).min() - 1e-7
    assert report["dual_value"] == pytest.approx(len(W) * np.linalg.eigvalsh(W).min(), rel=1e-6)


KEPT_INFIMUM = """
data P in S^n_++
data c in R^n
minimize 1/2 * x' * P * x + c' * x
over x in R^n_+
"""


def test_no_closed_form_is_refused():
    # A general quadratic on the orthant has no closed-form infimum (a nonnegative
    # least-squares value, common practice): the engine keeps it and no solver is made.
    with pytest.raises(DualizeError, match="no closed form"):
        render_solver(derive(load(KEPT_INFIMUM, "kept.prob").problem))


def test_keywords_become_safe_identifiers():
    # Every user name gets a prefix the module never uses, so none is a keyword, a
    # builtin or a module alias (Python language reference, 2.3 Identifiers).
    assert python_names(["lambda", "np", "x", "alpha", "int"]) == {
        "alpha": "u_alpha", "int": "u_int", "lambda": "u_lambda", "np": "u_np", "x": "u_x",
    }


LARGEST_EIGENVALUE = """
title "Stiffest brace mix: the largest eigenvalue as an LMI"
data A0 in S^n
data A1 in S^n
data A2 in S^n
minimize   t
over       t in R, x1 in R, x2 in R
subject to
  Z: A0 + x1 * A1 + x2 * A2 preceq t * identity(n)
"""


def test_largest_eigenvalue_dual_over_a_matrix_multiplier(text_solver):
    # Minimizing the largest eigenvalue of an affine matrix function is a semidefinite
    # program whose dual is over a matrix Z >= 0 with tr(Z) = 1 (Boyd and Vandenberghe,
    # 2004, example 5.x and section 4.6.3, from memory); checked against cvxpy on the primal.
    import cvxpy as cp

    module = text_solver(LARGEST_EIGENVALUE, "largest_eigenvalue")
    rng = np.random.default_rng(5)
    mats = [rng.normal(size=(4, 4)) for _ in range(3)]
    data = {f"A{i}": (0.5 * (m + m.T)).tolist() for i, m in enumerate(mats)}
    report = module.solve(data)
    assert report["status"] == "certified", report["message"]
    A0, A1, A2 = (np.array(data[k]) for k in ("A0", "A1", "A2"))
    x = cp.Variable(2)
    problem = cp.Problem(cp.Minimize(cp.lambda_max(A0 + x[0] * A1 + x[1] * A2)))
    problem.solve()
    assert report["primal_value"] == pytest.approx(problem.value, rel=1e-6)
    Z = np.array(report["multipliers"]["Z"])
    assert np.trace(Z) == pytest.approx(1.0, abs=1e-7) and np.allclose(Z, Z.T, atol=1e-9)
