"""Generated dual solvers against cvxpy's solve of the primal.

Each test renders the solver module of a bundled example, runs it on the
example's instance or on a random one, and compares the dual value, the
recovered primal point and the multipliers with cvxpy's primal solution and
constraint dual values (cvxpy as reference library, common practice).
"""

from __future__ import annotations

import cvxpy as cp
import numpy as np
import pytest

from tests.solver.conftest import instance_of

REL = 1e-6


def close(a, b, rel=REL, atol=1e-7) -> bool:
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    return bool(np.allclose(a, b, rtol=rel, atol=atol + rel * np.abs(b).max(initial=0.0)))


def svm_reference(data):
    X, y, C = np.array(data["X"]), np.array(data["y"]), float(data["C"])
    m, n = X.shape
    w, b, s = cp.Variable(n), cp.Variable(), cp.Variable(m)
    margin = cp.multiply(y, X @ w + b) >= 1 - s
    problem = cp.Problem(cp.Minimize(0.5 * cp.sum_squares(w) + C * cp.sum(s)), [margin, s >= 0])
    problem.solve(solver=cp.CLARABEL)
    return problem.value, w.value, margin.dual_value


def random_svm(seed: int, m: int = 40, n: int = 5) -> dict:
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(m, n))
    y = np.sign(X @ rng.normal(size=n) + 0.3 * rng.normal(size=m))
    return {"X": X.tolist(), "y": y.tolist(), "C": 0.7}


@pytest.mark.parametrize("data", [instance_of("parts_soft_margin"), random_svm(1), random_svm(2)])
def test_soft_margin_matches_primal(solver_module, data):
    # Soft-margin dual and w = X' diag(y) alpha: C. Cortes and V. Vapnik, Support-vector
    # networks, 1995 (from memory); numbers from cvxpy as reference library (common practice).
    _, module = solver_module("parts_soft_margin")
    report = module.solve(data, tol=1e-10)  # tighter than the default, for the 1e-6 checks
    value, w, alpha = svm_reference(data)
    assert report["converged"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    assert close(report["primal"]["w"], w, rel=1e-5)
    assert close(report["multipliers"]["alpha"], alpha, rel=1e-4, atol=1e-5)
    assert report["max_violation"] <= 1e-6


def lp_standard_reference(data):
    A, b, c = (np.array(data[k], dtype=float) for k in ("A", "b", "c"))
    x = cp.Variable(A.shape[1])
    eq = A @ x == b
    problem = cp.Problem(cp.Minimize(c @ x), [eq, x >= 0])
    problem.solve(solver=cp.CLARABEL)
    return problem.value, x.value, eq.dual_value


def test_standard_form_lp(solver_module):
    # Standard-form LP dual, maximize -b'nu s.t. A'nu + c >= 0: S. Boyd and L. Vandenberghe,
    # Convex Optimization, 2004, section 5.2.1 (from memory); cvxpy reference (common practice).
    _, module = solver_module("flour_blend_lp")
    data = instance_of("flour_blend_lp")
    report = module.solve(data)
    value, x, _ = lp_standard_reference(data)
    assert report["method"] == "linprog"
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    assert close(report["primal"]["x"], x, rel=1e-5)
    # This LP's dual optimum is not unique, so the multipliers are checked for dual
    # feasibility and optimality instead of against cvxpy's particular choice.
    A, b, c = (np.array(data[k], dtype=float) for k in ("A", "b", "c"))
    ours = np.array(report["multipliers"]["nu"])
    assert np.all(A.T @ ours + c >= -1e-9)
    assert -b @ ours == pytest.approx(value, rel=1e-6)


def test_inequality_form_lp(solver_module):
    # Inequality-form LP dual, maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.1 (from memory).
    _, module = solver_module("joinery_lp")
    data = instance_of("joinery_lp")
    A, b, c = (np.array(data[k], dtype=float) for k in ("A", "b", "c"))
    x = cp.Variable(A.shape[1])
    hours = A @ x <= b
    problem = cp.Problem(cp.Minimize(c @ x), [hours])
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    assert close(report["primal"]["x"], x.value, rel=1e-5)
    assert close(report["multipliers"]["hours"], hours.dual_value, rel=1e-5)


def random_least_norm(seed: int) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(4, 9)).tolist(), "b": rng.normal(size=4).tolist()}


@pytest.mark.parametrize("data", [instance_of("survey_least_norm"), random_least_norm(3)])
def test_least_norm(solver_module, data):
    # g(nu) = -(1/4) nu'AA'nu - b'nu, x = -(1/2) A'nu, p* = b'(AA')^-1 b: S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 5.1.3 (from memory).
    _, module = solver_module("survey_least_norm")
    A, b = np.array(data["A"]), np.array(data["b"])
    x = cp.Variable(A.shape[1])
    eq = A @ x == b
    problem = cp.Problem(cp.Minimize(cp.sum_squares(x)), [eq])
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    exact = float(b @ np.linalg.solve(A @ A.T, b))
    assert report["dual_value"] == pytest.approx(exact, rel=1e-6)
    assert report["primal_value"] == pytest.approx(problem.value, rel=1e-5)
    assert close(report["primal"]["x"], x.value, rel=1e-5)
    assert close(report["multipliers"]["nu1"], eq.dual_value, rel=1e-4, atol=1e-6)


def test_quadratic_program(solver_module):
    # QP dual with a Cholesky solve, x = -P^-1 (q + G'lambda): S. Boyd and L. Vandenberghe,
    # Convex Optimization, 2004, section 5.2 (from memory); cvxpy reference (common practice).
    _, module = solver_module("drone_thrust_qp")
    data = instance_of("drone_thrust_qp")
    P, q, G, h = (np.array(data[k], dtype=float) for k in ("P", "q", "G", "h"))
    x = cp.Variable(3)
    limits = G @ x <= h
    problem = cp.Problem(cp.Minimize(0.5 * cp.quad_form(x, P) + q @ x), [limits])
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    assert close(report["primal"]["x"], x.value, rel=1e-5)
    assert close(report["multipliers"]["limits"], limits.dual_value, rel=1e-5, atol=1e-6)


def test_entropy_maximization(solver_module):
    # Entropy dual with the free multiplier maximized out (a log-sum-exp): S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 5.1.6 (from memory).
    _, module = solver_module("route_entropy")
    data = instance_of("route_entropy")
    A, b = np.array(data["A"]), np.array(data["b"])
    x = cp.Variable(A.shape[1])
    capacity = A @ x <= b
    problem = cp.Problem(cp.Minimize(-cp.sum(cp.entr(x))), [capacity, cp.sum(x) == 1])
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    # cvxpy's exponential-cone solve is accurate to about 1e-4 in x here (Clarabel defaults).
    assert close(report["primal"]["x"], x.value, rel=1e-4)
    assert close(report["multipliers"]["capacity"], capacity.dual_value, rel=1e-3, atol=1e-5)


def test_scalar_exercise_5_1(solver_module):
    # minimize x^2 + 1 s.t. (x-2)(x-4) <= 0: p* = 5 at x = 2, lambda* = 2. S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, exercise 5.1 (from memory).
    _, module = solver_module("window_scalar")
    report = module.solve({})
    assert report["dual_value"] == pytest.approx(5.0, rel=1e-7)
    assert report["primal"]["x"] == pytest.approx(2.0, rel=1e-6)
    assert report["multipliers"]["window"] == pytest.approx(2.0, rel=1e-6)


def test_disk_nocedal_wright(solver_module):
    # minimize x1 + x2 s.t. 2 - x1^2 - x2^2 >= 0: x* = (-1, -1), multiplier 1/2. J. Nocedal and
    # S. Wright, Numerical Optimization, 2nd ed., 2006, chapter 12 (from memory).
    _, module = solver_module("disk_scalar")
    report = module.solve({})
    assert report["multipliers"]["disk"] == pytest.approx(0.5, rel=1e-6)
    assert report["primal"]["x1"] == pytest.approx(-1.0, rel=1e-6)
    assert report["primal"]["x2"] == pytest.approx(-1.0, rel=1e-6)
    assert report["dual_value"] == pytest.approx(-2.0, rel=1e-7)


def test_hinge_without_slack(solver_module):
    # The hinge-loss dual is the soft-margin dual without the offset: Cortes and Vapnik, 1995
    # (from memory); cvxpy reference (common practice).
    _, module = solver_module("sensor_hinge")
    data = instance_of("sensor_hinge")
    X, y, C = np.array(data["X"]), np.array(data["y"]), float(data["C"])
    w = cp.Variable(X.shape[1])
    objective = 0.5 * cp.sum_squares(w) + C * cp.sum(cp.pos(1 - cp.multiply(y, X @ w)))
    problem = cp.Problem(cp.Minimize(objective))
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    assert close(report["primal"]["w"], w.value, rel=1e-5)


def test_mean_variance_maximization(solver_module):
    # A maximization: the dual is an upper bound, tight here (convex QP, affine constraints:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.3, from memory).
    _, module = solver_module("orchard_mean_variance")
    data = instance_of("orchard_mean_variance")
    r, S, gamma = np.array(data["r"]), np.array(data["S"]), float(data["gamma"])
    x = cp.Variable(3)
    problem = cp.Problem(
        cp.Maximize(r @ x - gamma * cp.quad_form(x, S)), [cp.sum(x) == 1, x >= 0]
    )
    problem.solve(solver=cp.CLARABEL)
    report = module.solve(data)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(problem.value, rel=1e-6)
    assert close(report["primal"]["x"], x.value, rel=1e-5, atol=1e-6)
