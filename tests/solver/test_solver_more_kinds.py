"""Generated solvers of the norm, barrier, entropy and log-sum-exp duals against cvxpy.

The dual optimum must equal cvxpy's optimum of the primal (cvxpy as reference
library, common practice; strong duality by Slater's condition for these convex
problems with affine constraints, S. Boyd and L. Vandenberghe, Convex
Optimization, 2004, section 5.2.3, from memory), on the bundled instance and on
random ones.  Where the module reports x, it must be primal optimal too.
"""

from __future__ import annotations

import cvxpy as cp
import numpy as np
import pytest

from tests.solver.conftest import instance_of
from tests.solver.instances import arrays, center_instance, equality_instance, softmax_instance

REL = 1e-6


def check(report: dict, value: float, sense: str = "minimize") -> None:
    assert report["converged"], report["message"]
    assert report["dual_value"] == pytest.approx(value, rel=REL, abs=1e-8)
    if report["primal_value"] is not None:
        assert report["primal_value"] == pytest.approx(value, rel=REL, abs=1e-8)
        assert report["max_violation"] <= 1e-6
    weak = report["dual_value"] - value if sense == "minimize" else value - report["dual_value"]
    assert weak <= 1e-7 * (1 + abs(value))


def norm_reference(data: dict, p: int) -> float:
    # Minimum-norm solution of A x = b (S. Boyd and L. Vandenberghe, Convex
    # Optimization, 2004, section 5.1.6, from memory).
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(cp.norm(x, p)), [A @ x == b])
    problem.solve(solver=cp.CLARABEL)
    return float(problem.value)


@pytest.mark.parametrize("data", [instance_of("antenna_norm_min"), equality_instance(1),
                                  equality_instance(2)])
def test_least_two_norm(solver_module, data):
    _, module = solver_module("antenna_norm_min")
    check(module.solve(data), norm_reference(data, 2))


@pytest.mark.parametrize("data", [instance_of("pipe_leaks_l1"), equality_instance(3),
                                  equality_instance(4)])
def test_least_one_norm(solver_module, data):
    _, module = solver_module("pipe_leaks_l1")
    check(module.solve(data), norm_reference(data, 1))


def lasso_instance(seed: int, m: int = 8, n: int = 5) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "y": rng.normal(size=m).tolist(),
            "lambda": 0.4}


@pytest.mark.parametrize("data", [instance_of("spectrum_lasso"), lasso_instance(5),
                                  lasso_instance(6)])
def test_lasso(solver_module, data):
    # l1-regularized least squares: R. Tibshirani, Regression shrinkage and selection
    # via the lasso, 1996 (from memory).
    A, y = arrays(data, "A", "y")
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(cp.sum_squares(A @ x - y) + data["lambda"] * cp.norm1(x)))
    problem.solve(solver=cp.CLARABEL)
    _, module = solver_module("spectrum_lasso")
    check(module.solve(data), float(problem.value))


@pytest.mark.parametrize("data", [instance_of("robot_analytic_center"), center_instance(7),
                                  center_instance(8)])
def test_analytic_center(solver_module, data):
    # Analytic centre of a polyhedron (S. Boyd and L. Vandenberghe, Convex Optimization,
    # 2004, section 8.5.3, from memory).
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(-cp.sum(cp.log(b - A @ x))))
    problem.solve(solver=cp.CLARABEL)
    _, module = solver_module("robot_analytic_center")
    report = module.solve(data)
    check(report, float(problem.value))


@pytest.mark.parametrize("data", [instance_of("traffic_softmax"), softmax_instance(9),
                                  softmax_instance(10)])
def test_log_sum_exp(solver_module, data):
    # Dual of log-sum-exp minimization: an entropy maximization over the simplex (S. Boyd
    # and L. Vandenberghe, Convex Optimization, 2004, example 5.5, from memory).
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(cp.log_sum_exp(A @ x + b)))
    problem.solve(solver=cp.CLARABEL)
    _, module = solver_module("traffic_softmax")
    check(module.solve(data), float(problem.value))


@pytest.mark.parametrize("data", [instance_of("lab_budget_max"), {"n": 7, "B": 3.2}])
def test_log_utility_budget(solver_module, data):
    # Maximize sum(log x) on a budget: x = B/n, value n log(B/n) (S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, exercise 5.x, from memory; the closed
    # form is elementary).  Checked against cvxpy as well.
    n, B = int(data["n"]), float(data["B"])
    x = cp.Variable(n)
    problem = cp.Problem(cp.Maximize(cp.sum(cp.log(x))), [cp.sum(x) == B, x >= 0])
    problem.solve(solver=cp.CLARABEL)
    assert problem.value == pytest.approx(n * np.log(B / n), rel=1e-6)
    _, module = solver_module("lab_budget_max")
    report = module.solve(data)
    check(report, float(problem.value), sense="maximize")
    assert np.allclose(report["primal"]["x"], B / n, rtol=1e-5)


def orthant_instance(seed: int, m: int = 3, n: int = 6) -> dict:
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(m, n))
    return {"A": A.tolist(), "b": (A @ np.abs(rng.normal(size=n))).tolist(),
            "c": rng.normal(size=n).tolist()}


@pytest.mark.parametrize("data", [instance_of("pump_share_domain"), orthant_instance(11),
                                  orthant_instance(12)])
def test_quadratic_on_the_orthant(solver_module, data):
    # inf over x >= 0 of 1/2 ||x||^2 + g'x = -1/2 ||min(g, 0)||^2, a C^1 dual objective
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.3, from memory);
    # the minimizer x = max(-g, 0) is unique, so x must match cvxpy's.
    A, b, c = arrays(data, "A", "b", "c")
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(c @ x + 0.5 * cp.sum_squares(x)), [A @ x == b, x >= 0])
    problem.solve(solver=cp.CLARABEL)
    _, module = solver_module("pump_share_domain")
    report = module.solve(data)
    check(report, float(problem.value))
    assert np.allclose(report["primal"]["x"], x.value, atol=1e-5)


RIDGE = """
data A in R^(m,n)
data b in R^m
data gamma in R_++
minimize ||A*x - b||^2 + gamma * ||x||^2
over x in R^n
"""


def test_dual_without_variables_is_a_constant(text_solver):
    # An unconstrained ridge regression: the dual has no multipliers, its value is the
    # optimum, and x = (A'A + gamma I)^-1 A'b (A. Hoerl and R. Kennard, Ridge regression,
    # 1970, from memory); cvxpy as reference (common practice).
    rng = np.random.default_rng(13)
    A, b = rng.normal(size=(7, 4)), rng.normal(size=7)
    module = text_solver(RIDGE, "ridge")
    report = module.solve({"A": A.tolist(), "b": b.tolist(), "gamma": 0.3})
    x = cp.Variable(4)
    problem = cp.Problem(cp.Minimize(cp.sum_squares(A @ x - b) + 0.3 * cp.sum_squares(x)))
    problem.solve(solver=cp.CLARABEL)
    check(report, float(problem.value))
    assert report["multipliers"] == {}
    assert np.allclose(report["primal"]["x"], np.linalg.solve(A.T @ A + 0.3 * np.eye(4), A.T @ b))


BARRIER_EQ = """
data A in R^(m,n)
data b in R^m
minimize -sum(log(x))
over x in R^n
subject to
  A*x == b
"""


@pytest.mark.parametrize("seed", [14, 15])
def test_start_found_inside_the_dual_domain(text_solver, seed):
    # The dual 1'log(A'nu) - b'nu + n is finite only where A'nu > 0, which no fixed start
    # meets; the module finds one by a linear program.  Analytic centre of {x: Ax = b}
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 8.5.3, from memory).
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(3, 6))
    b = A @ (0.5 + rng.random(6))
    module = text_solver(BARRIER_EQ, "barrier_eq")
    report = module.solve({"A": A.tolist(), "b": b.tolist()})
    x = cp.Variable(6)
    problem = cp.Problem(cp.Minimize(-cp.sum(cp.log(x))), [A @ x == b])
    problem.solve(solver=cp.CLARABEL)
    check(report, float(problem.value))
    # The KKT condition itself, sharper than a second solver's x on this flat objective:
    # 1/x lies in the range of A' (the gradient -1/x + A'nu = 0).
    found = np.array(report["primal"]["x"])
    residual = (np.eye(6) - np.linalg.pinv(A) @ A) @ (1.0 / found)
    assert np.abs(residual).max() <= 1e-6 * np.abs(1.0 / found).max()
    assert np.allclose(A @ found, b, atol=1e-8)


EXP_INEQ = """
data A in R^(m,n)
data b in R^m
minimize sum(exp(x))
over x in R^n
subject to
  A*x <= b
"""


def test_unattained_primal_is_reported_not_solved(text_solver):
    # With a direction d, A d <= 0, d < 0, the infimum 0 of sum(exp(x)) is approached as
    # x runs to minus infinity and never attained (common practice); the dual's domain
    # -A'lambda >= 0 then has no interior point, and the module must say so rather than
    # report a value.
    A = np.array([[1.0, 0.0], [0.0, 1.0]])
    module = text_solver(EXP_INEQ, "exp_ineq")
    report = module.solve({"A": A.tolist(), "b": [1.0, 2.0]})
    assert not report["converged"]
    assert report["gap"] is None
    assert "finite" in report["message"]
