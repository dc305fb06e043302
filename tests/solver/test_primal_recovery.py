"""The x a generated module reports without a recovery formula is primal optimal.

Checked against cvxpy's solve of the primal (cvxpy as reference library, common
practice): x is feasible and its primal value is cvxpy's optimum, and where the
primal optimum is unique, x is cvxpy's x.  Uniqueness is tested, not assumed:
each entry is minimized and maximized over the optimal face (a small convex
problem each, common practice), and only the entries that do not move are
compared.  Theory: at optimal multipliers a primal optimum minimizes the
Lagrangian, and a primal value equal to the dual value certifies optimality
(S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.5, from memory).
"""

from __future__ import annotations

import cvxpy as cp
import numpy as np
import pytest

from tests.solver.conftest import instance_of
from tests.solver.instances import arrays, center_instance, equality_instance, softmax_instance

REL = 1e-6
FACE = 1e-7
"""Slack on the optimal value that defines the optimal face."""


TIGHT = {"tol_gap_abs": 1e-11, "tol_gap_rel": 1e-11, "tol_feas": 1e-11}
"""Clarabel's defaults leave about 1e-5 in x on the exponential-cone problems here."""


def solved(objective, constraints: list) -> cp.Problem:
    problem = cp.Problem(objective, constraints)
    problem.solve(solver=cp.CLARABEL, **TIGHT)
    assert problem.status == cp.OPTIMAL
    return problem


def fixed_entries(x: cp.Variable, problem: cp.Problem) -> np.ndarray:
    """The entries of x that are the same at every optimum of ``problem``."""
    slack = FACE * max(1.0, abs(problem.value))
    if isinstance(problem.objective, cp.Minimize):
        face = [*problem.constraints, problem.objective.expr <= problem.value + slack]
    else:
        face = [*problem.constraints, problem.objective.expr >= problem.value - slack]
    spread = []
    for i in range(x.shape[0]):
        ends = [solved(sense(x[i]), face).value for sense in (cp.Minimize, cp.Maximize)]
        spread.append(ends[1] - ends[0])
    return np.array(spread) <= 1e-5


def check_optimal(report: dict, x: cp.Variable, problem: cp.Problem, feasible) -> np.ndarray:
    """x is reported, feasible, of cvxpy's optimal value, and cvxpy's x where that is unique;
    returns the reported x.  ``feasible(x)`` gives the largest violation of the primal's
    constraints, computed here from the data."""
    reference = np.array(x.value)  # before the face problems overwrite x.value
    assert report["converged"], report["message"]
    assert report["unrecovered"] == {}
    ours = np.array(report["primal"]["x"], dtype=float)
    assert feasible(ours) <= 1e-7
    assert report["primal_value"] == pytest.approx(problem.value, rel=REL, abs=1e-8)
    assert abs(report["gap"]) <= 1e-7 * (1 + abs(problem.value))
    unique = fixed_entries(x, problem)
    assert np.allclose(ours[unique], reference[unique], rtol=1e-5, atol=1e-6)
    return ours


# --- rule 1: polyhedral primals, recovered as linear programs -----------------


@pytest.mark.parametrize("data", [instance_of("pipe_leaks_l1"), equality_instance(3),
                                  equality_instance(4)])
def test_least_one_norm_x(solver_module, data):
    # Basis pursuit, min ||x||_1 s.t. A x = b, an LP after x <= t, -x <= t (Boyd and
    # Vandenberghe, 2004, sections 4.3 and 6.2, from memory); cvxpy reference.
    _, module = solver_module("pipe_leaks_l1")
    assert "linear program in the unrecovered variables" in module.__doc__
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.norm1(x)), [A @ x == b])
    ours = check_optimal(module.solve(data), x, problem, lambda v: np.abs(A @ v - b).max())
    assert np.abs(ours).sum() == pytest.approx(problem.value, rel=REL)


def minimax_instance(seed: int, m: int = 8, n: int = 3) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "b": rng.normal(size=m).tolist()}


@pytest.mark.parametrize("data", [instance_of("kiln_minimax"), minimax_instance(7),
                                  minimax_instance(8)])
def test_chebyshev_fit_x(solver_module, data):
    # Chebyshev approximation, min ||A x - b||_inf, an LP after -s <= A x - b <= s (Boyd and
    # Vandenberghe, 2004, section 6.1, from memory); cvxpy reference.
    _, module = solver_module("kiln_minimax")
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.norm(A @ x - b, "inf")), [])
    ours = check_optimal(module.solve(data), x, problem, lambda v: 0.0)
    assert np.abs(A @ ours - b).max() == pytest.approx(problem.value, rel=REL)


LEAST_DEVIATIONS = """
data A in R^(m,n)
data b in R^m
minimize ||A*x - b||_1
over x in R^n
"""

HINGE_INF = """
data A in R^(m,n)
data b in R^m
minimize sum(max(A*x - b, 0)) + 2*||x||_inf
over x in R^n
"""

ABS_LINEAR = """
data A in R^(m,n)
data b in R^m
data c in R^n
minimize sum(|x|) + c'*x
over x in R^n
subject to
  cap: A*x <= b
"""

NEGATED_NORM = """
data A in R^(m,n)
data c in R^n
maximize c'*x - ||A*x||_1
over x in R^n
subject to
  lo: x >= -1
  hi: x <= 1
"""


def fit_instance(seed: int, m: int = 9, n: int = 3) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "b": rng.normal(size=m).tolist()}


@pytest.mark.parametrize("seed", [11, 12, 13])
def test_least_absolute_deviations_x(text_solver, seed):
    # min ||A x - b||_1: an LP after -t <= A x - b <= t (Boyd and Vandenberghe, 2004,
    # section 6.1, from memory); cvxpy reference.
    module = text_solver(LEAST_DEVIATIONS, "least_deviations")
    data = fit_instance(seed)
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.norm1(A @ x - b)), [])
    check_optimal(module.solve(data), x, problem, lambda v: 0.0)


@pytest.mark.parametrize("seed", [14, 15, 16])
def test_hinge_plus_inf_norm_x(text_solver, seed):
    # A sum of max(., 0) and a weighted inf-norm: each piece below its epigraph variable
    # (Boyd and Vandenberghe, 2004, section 4.3, from memory); cvxpy reference.
    module = text_solver(HINGE_INF, "hinge_inf")
    data = fit_instance(seed)
    A, b = arrays(data, "A", "b")
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.sum(cp.pos(A @ x - b)) + 2 * cp.norm(x, "inf")), [])
    check_optimal(module.solve(data), x, problem, lambda v: 0.0)


@pytest.mark.parametrize("seed", [17, 18, 19])
def test_absolute_values_with_inequalities_x(text_solver, seed):
    # sum |x_i| + c'x on a polyhedron containing 0 (common practice); cvxpy reference.
    module = text_solver(ABS_LINEAR, "abs_linear")
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(8, 4))
    data = {"A": A.tolist(), "b": (0.5 + rng.random(8)).tolist(),
            "c": (1.5 * rng.normal(size=4)).tolist()}
    b, c = arrays(data, "b", "c")
    x = cp.Variable(4)
    problem = solved(cp.Minimize(cp.norm1(x) + c @ x), [A @ x <= b])
    check_optimal(module.solve(data), x, problem, lambda v: max(0.0, (A @ v - b).max()))


@pytest.mark.parametrize("seed", [20, 21, 22])
def test_maximized_negated_one_norm_x(text_solver, seed):
    # Maximize c'x - ||A x||_1 on a box: minimized as ||A x||_1 - c'x, then lifted (Boyd and
    # Vandenberghe, 2004, section 4.3, from memory); cvxpy reference.
    module = text_solver(NEGATED_NORM, "negated_norm")
    rng = np.random.default_rng(seed)
    data = {"A": rng.normal(size=(3, 5)).tolist(), "c": rng.normal(size=5).tolist()}
    A, c = arrays(data, "A", "c")
    x = cp.Variable(5)
    problem = solved(cp.Maximize(c @ x - cp.norm1(A @ x)), [x >= -1, x <= 1])
    ours = check_optimal(module.solve(data), x, problem,
                         lambda v: max(0.0, np.abs(v).max() - 1.0))
    assert c @ ours - np.abs(A @ ours).sum() == pytest.approx(problem.value, rel=REL, abs=1e-8)


# --- rule 2: smooth Lagrangians, minimized numerically and certified by the gap ----
def check_unique_optimum(report: dict, x: cp.Variable, problem: cp.Problem) -> np.ndarray:
    """x is reported from the Lagrangian, certified, and equals cvxpy's unique optimum.

    The callers show the optimum unique from the data (strict convexity); the face test
    above suits polyhedral problems, not smooth ones, whose near-optimal sets are wide.
    """
    assert report["converged"], report["message"]
    assert report["unrecovered"] == {}
    # Either certified route: the dual's multipliers (KKT) or a minimizer of the Lagrangian.
    route = report["recovered_by"]["x"]
    assert "minimization of the Lagrangian" in route or "multipliers of the dual" in route
    assert report["primal_value"] == pytest.approx(problem.value, rel=REL, abs=1e-8)
    assert abs(report["gap"]) <= 1e-6 * (1 + abs(problem.value))
    ours = np.array(report["primal"]["x"], dtype=float)
    assert np.allclose(ours, x.value, rtol=1e-5, atol=1e-6)
    return ours


def analytic_center(data: dict) -> tuple[cp.Variable, cp.Problem]:
    # The analytic centre of a bounded polyhedron with an interior is unique: the barrier
    # is strictly convex there (Boyd and Vandenberghe, 2004, section 8.5.3, from memory).
    # The instances bound the polyhedron by rows +-I, so A has full column rank.
    A, b = arrays(data, "A", "b")
    assert np.linalg.matrix_rank(A) == A.shape[1]
    x = cp.Variable(A.shape[1])
    return x, solved(cp.Minimize(-cp.sum(cp.log(b - A @ x))), [])


@pytest.mark.parametrize("data", [instance_of("robot_analytic_center"), center_instance(7),
                                  center_instance(8)])
def test_analytic_center_x(solver_module, data):
    # The bundled instance has b_i = 0 on two walls, so x = 0 is outside the barrier's
    # domain and the start comes from the linear program for an interior point.
    _, module = solver_module("robot_analytic_center")
    assert "numeric minimization of the Lagrangian" in module.__doc__
    assert "duality gap" in module.__doc__
    x, problem = analytic_center(data)
    ours = check_unique_optimum(module.solve(data), x, problem)
    A, b = arrays(data, "A", "b")
    assert np.all(b - A @ ours > 0)


MAXIMIZED_CENTER = """
data A in R^(m,n)
data b in R^m
maximize sum(log(b - A*x))
over x in R^n
"""


@pytest.mark.parametrize("data", [instance_of("robot_analytic_center"), center_instance(23)])
def test_maximized_log_barrier_x(text_solver, data):
    # The same centre written as a maximization: its Lagrangian is negated to be minimized.
    module = text_solver(MAXIMIZED_CENTER, "maximized_center")
    x, problem = analytic_center(data)
    report = module.solve(data)
    assert report["primal_value"] == pytest.approx(-problem.value, rel=REL)
    assert np.allclose(report["primal"]["x"], x.value, rtol=1e-5, atol=1e-6)


def unique_log_sum_exp(A: np.ndarray) -> None:
    # log-sum-exp is strictly convex except along the ones vector (Boyd and Vandenberghe,
    # 2004, section 3.1.5, from memory): with A of full column rank and rows summing to 0,
    # A d = t 1 forces t = 0 and d = 0, so lse(A x + b) has one minimizer.
    assert np.linalg.matrix_rank(A) == A.shape[1]
    assert np.allclose(A.sum(axis=0), 0)


@pytest.mark.parametrize("data", [instance_of("traffic_softmax"), softmax_instance(9),
                                  softmax_instance(10)])
def test_log_sum_exp_x(solver_module, data):
    _, module = solver_module("traffic_softmax")
    A, b = arrays(data, "A", "b")
    unique_log_sum_exp(A)
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.log_sum_exp(A @ x + b)), [])
    check_unique_optimum(module.solve(data), x, problem)


PRICED_SOFTMAX = """
data A in R^(m,n)
data b in R^m
minimize log(sum(exp(A*x + b)))
over x in R^n
subject to
  total: sum(x) == 1
"""


@pytest.mark.parametrize("seed", [24, 25, 26])
def test_log_sum_exp_with_priced_equality_x(text_solver, seed):
    # The constraint is priced in L by its multiplier: L(x, nu) = lse(A x + b) + nu (1'x - 1)
    # has one minimizer by the argument above, the primal optimum at the optimal nu (Boyd and
    # Vandenberghe, 2004, section 5.5.5, from memory); cvxpy reference.
    module = text_solver(PRICED_SOFTMAX, "priced_softmax")
    data = softmax_instance(seed, m=7, n=3)
    A, b = arrays(data, "A", "b")
    unique_log_sum_exp(A)
    x = cp.Variable(3)
    problem = solved(cp.Minimize(cp.log_sum_exp(A @ x + b)), [cp.sum(x) == 1])
    ours = check_unique_optimum(module.solve(data), x, problem)
    assert ours.sum() == pytest.approx(1.0, abs=1e-6)


FLAT_LAGRANGIAN = """
data A in R^(m,n)
data b in R^m
data c in R^n
minimize exp(c'*x) + exp(-c'*x)
over x in R^n
subject to
  fit: A*x == b
"""


@pytest.mark.parametrize("shape", [(2, 4), (3, 3)])
def test_many_minimizers_of_the_lagrangian_stay_unrecovered(text_solver, shape):
    # 2 cosh(c'x) is constant on the hyperplanes c'x = t, so L(x, nu) at the optimal nu has a
    # hyperplane of minimizers, most of them off A x = b: a minimizer of L is a primal optimum
    # only when it is unique (Boyd and Vandenberghe, 2004, section 5.5.5, from memory).
    # Whatever L-BFGS-B returns, the module must not report it unless the gap certifies it.
    module = text_solver(FLAT_LAGRANGIAN, "flat_lagrangian")
    rng = np.random.default_rng(sum(shape))
    A, b, c = rng.normal(size=shape), rng.normal(size=shape[0]), rng.normal(size=shape[1])
    report = module.solve({"A": A.tolist(), "b": b.tolist(), "c": c.tolist()})
    x = cp.Variable(shape[1])
    problem = solved(cp.Minimize(cp.exp(c @ x) + cp.exp(-c @ x)), [A @ x == b])
    assert report["dual_value"] == pytest.approx(problem.value, rel=REL)
    # With c outside the row space of A the optimal nu is 0 and x = 0 minimizes L though
    # A 0 = 0 is not b: the Lagrangian route must refuse it; the dual's multipliers may
    # still give a certified x, which is then checked below.
    if report["primal"]["x"] is None:
        assert "too large to certify" in report["unrecovered"]["x"]
        assert report["recovered_by"] == {}
    else:  # a lucky minimizer is reported only if it is optimal
        ours = np.array(report["primal"]["x"])
        assert np.abs(A @ ours - b).max() <= 1e-6
        assert report["primal_value"] == pytest.approx(problem.value, rel=REL)


def test_least_norm_x_comes_from_the_cone_multiplier(solver_module):
    # ||x|| + nu'(A x - b) is not differentiable at 0 and its minimizers at the optimal nu
    # form a ray (Boyd and Vandenberghe, 2004, section 5.5.5, from memory): outside both
    # rules.  The dual's ball ||A'nu|| <= 1 is a second-order cone of the conic method,
    # whose multiplier's vector part is x up to sign (the dual of the dual is the primal);
    # the certified x is the least-norm solution A'(A A')^-1 b (same book, section 6.2).
    _, module = solver_module("antenna_norm_min")
    assert "left unrecovered" in module.__doc__
    data = instance_of("antenna_norm_min")
    report = module.solve(data)
    assert report["status"] == "certified", report["message"]
    assert "multipliers of the dual" in report["recovered_by"]["x"]
    A, b = np.array(data["A"], dtype=float), np.array(data["b"], dtype=float)
    assert np.allclose(report["primal"]["x"], A.T @ np.linalg.solve(A @ A.T, b), atol=1e-6)


def test_lasso_x_comes_from_the_ball_rows(solver_module):
    # The 1-norm beside a quadratic is neither a linear program nor smooth, but the dual's
    # constraint |A'z| <= lambda comes from x's conjugate, and the multipliers of its two
    # sides are the positive and negative parts of x (the dual of the dual is the primal:
    # Boyd and Vandenberghe, 2004, section 5.2.3 and exercise 5.x, from memory); checked
    # against cvxpy's optimum of the primal.
    _, module = solver_module("spectrum_lasso")
    data = instance_of("spectrum_lasso")
    report = module.solve(data)
    assert report["status"] == "certified", report["message"]
    assert "multipliers of the dual" in report["recovered_by"]["x"]
    A, y = np.array(data["A"], dtype=float), np.array(data["y"], dtype=float)
    x = cp.Variable(A.shape[1])
    problem = solved(cp.Minimize(cp.sum_squares(A @ x - y) + data["lambda"] * cp.norm1(x)), [])
    assert report["primal_value"] == pytest.approx(problem.value, rel=REL)
    assert np.allclose(report["primal"]["x"], x.value, atol=1e-4)
