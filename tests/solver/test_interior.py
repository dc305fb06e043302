"""The interior-point route of the generated solver: quadratic duals with bounds and equalities.

Each dual optimum is compared with cvxpy's solve of the primal (cvxpy as
reference library, common practice); strong duality holds for these convex
quadratic programs with affine constraints (S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, section 5.2.3, from memory).
"""

from __future__ import annotations

from pathlib import Path

import cvxpy as cp
import numpy as np
import pytest

from tests.solver.test_solver_vs_reference import close, random_svm, svm_reference

# A projection onto a simplex-like set with an intercept: the intercept b enters
# linearly, so the dual keeps the equality 1'fit = 0 next to the bound low >= 0,
# and fit is a free multiplier (no bound at all).
INTERCEPT_QP = """
data A in R^(m,n)
data r in R^m
data c in R^n

minimize   1/2 * ||x||^2 + c' * x
over       x in R^n, b in R
subject to
  fit: A*x + b = r
  low: x >= 0
"""


def intercept_instance(seed: int, m: int, n: int) -> dict:
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(m, n))
    r = A @ np.abs(rng.normal(size=n)) + 0.3
    return {"A": A.tolist(), "r": r.tolist(), "c": rng.normal(size=n).tolist()}


def intercept_reference(data: dict) -> float:
    A, r, c = (np.array(data[k], dtype=float) for k in ("A", "r", "c"))
    x, b = cp.Variable(A.shape[1]), cp.Variable()
    problem = cp.Problem(cp.Minimize(0.5 * cp.sum_squares(x) + c @ x), [A @ x + b == r, x >= 0])
    problem.solve(solver=cp.CLARABEL)
    return float(problem.value)


def test_soft_margin_takes_the_interior_route_with_a_low_rank_hessian(solver_module):
    # m = 300 samples, n = 4 features: the Hessian diag(y) X X' diag(y) has rank 4,
    # so the Woodbury branch runs.  Soft-margin dual: C. Cortes and V. Vapnik,
    # Support-vector networks, 1995 (from memory).
    _, module = solver_module("parts_soft_margin")
    data = random_svm(7, m=300, n=4)
    d = module._read(module.SPEC, data)
    d.update(module._prepare(d))
    factor = module._gram_factor(module.SPEC, d, 300)
    assert factor is not None and factor.shape == (300, 4)
    assert np.allclose(factor @ factor.T, module._hessian(None, d), atol=1e-9 * len(factor))
    report = module.solve(data)
    value, w, alpha = svm_reference(data)
    assert report["method"] == "interior" and report["converged"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["gap"] == pytest.approx(0.0, abs=1e-6 * abs(value))
    assert close(report["primal"]["w"], w, rel=1e-5)
    assert close(report["multipliers"]["alpha"], alpha, rel=1e-4, atol=1e-5)


def drone_instance(seed: int, m: int, n: int) -> dict:
    rng = np.random.default_rng(seed)
    root = rng.normal(size=(n, n))
    return {"P": (root @ root.T + n * np.eye(n)).tolist(), "q": rng.normal(size=n).tolist(),
            "G": rng.normal(size=(m, n)).tolist(), "h": np.abs(rng.normal(size=m)).tolist()}


@pytest.mark.parametrize(("n", "rank"), [(5, 5), (150, None)])
def test_gram_factor_finds_the_rank_or_refuses(solver_module, n, rank):
    # The dual Hessian G P^-1 G' of a QP (S. Boyd and L. Vandenberghe, Convex
    # Optimization, 2004, section 5.2.4, from memory) has rank min(m, n); a randomized
    # range finder compresses it only when that rank is small (N. Halko, P.-G.
    # Martinsson and J. Tropp, Finding structure with randomness, SIAM Review, 2011,
    # section 4, from memory).
    _, module = solver_module("drone_thrust_qp")
    data = drone_instance(4, 120, n)
    d = module._read(module.SPEC, data)
    d.update(module._prepare(d))
    factor = module._gram_factor(module.SPEC, d, 120)
    if rank is None:
        assert factor is None
    else:
        G, P = np.array(data["G"]), np.array(data["P"])
        hessian = G @ np.linalg.solve(P, G.T)
        assert factor.shape == (120, rank)
        assert np.allclose(factor @ factor.T, hessian, atol=1e-9 * np.abs(hessian).max())


@pytest.mark.parametrize(("seed", "m", "n"), [(0, 5, 8), (1, 8, 5), (2, 30, 60), (3, 120, 10)])
def test_free_multiplier_with_equality_and_bounds(text_solver, seed, m, n):
    # (3, 120, 10) leaves the dual flat along the null space of [A'; 1'], which the
    # regularized Newton systems must survive.
    module = text_solver(INTERCEPT_QP, "intercept")
    data = intercept_instance(seed, m, n)
    report = module.solve(data)
    value = intercept_reference(data)
    assert report["method"] == "interior" and report["converged"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    assert report["dual_value"] <= report["primal_value"] + 1e-9 * (1 + abs(value))
    assert report["max_violation"] <= 1e-6


def test_structurally_diagonal_hessian_is_printed_as_a_vector(text_solver):
    # The logistic-regression dual's Hessian diag(1/z + 1/(1 - z)) is diagonal (the binary
    # entropy is separable, common practice), so the module prints its diagonal and never
    # an m x m matrix; the diagonal must agree with the dense Hessian it replaces.
    from dualize.model import expr as ir
    from dualize.solvergen.solver import diagonal_of

    assert diagonal_of(ir.Identity(3)) == ir.Ones(3)
    assert diagonal_of(ir.Symbol("A", ir.Shape(3, 3), "data")) is None
    text = (Path(__file__).resolve().parents[2] / "bench" / "problems" /
            "defect_logistic.prob").read_text(encoding="utf-8")
    module = text_solver(text, "logistic")
    rng = np.random.default_rng(3)
    data = {"X": rng.normal(size=(30, 3)).tolist(), "y": np.sign(rng.normal(size=30)).tolist()}
    d = module._read(module.SPEC, data)
    d.update(module._prepare(d))
    z = np.full(30, 0.3)
    diagonal = module._hessian_diagonal(z, d)
    assert diagonal is not None and diagonal.shape == (30,)
    assert np.allclose(np.diag(diagonal), module._hessian(z, d))
    assert module.solve(data)["status"] == "certified"
