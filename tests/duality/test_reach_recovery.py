"""Recovery of variables that enter the Lagrangian linearly once split.

The lasso and nonnegative least squares split u = A x - b off the squared
norm; stationarity in u gives u = z/2, so A x - b = z/2 at the optimum, and
the support of x is where the dual's norm-ball (or sign) rows are active.
These relations must pin down a primal point whose value meets the dual
optimum (the gap closes), checked against cvxpy on random instances.
"""

from __future__ import annotations

import numpy as np
import pytest

from dualize.duality import derive
from dualize.model import load
from dualize.numeric.instance import Instance

pytest.importorskip("cvxpy")

LASSO = """data A in R^(m,n)
data y in R^m
data lam in R_++
minimize ||A*x - y||^2 + lam * ||x||_1
over x in R^n
"""
NNLS = """data A in R^(m,n)
data b in R^m
minimize ||A*x - b||^2
over x in R^n
subject to
  pos: x >= 0
"""


def _derived(text: str):  # type: ignore[no-untyped-def]
    loaded = load(text)
    assert loaded.problem is not None
    return derive(loaded.problem)


def _dual(d, values: dict, dims: dict):  # type: ignore[no-untyped-def]
    from dualize.numeric.reference import solve_dual

    sol = solve_dual(d.dual, Instance(values, dims))
    assert sol.status == "optimal", sol
    return sol


def _relation_rhs(d) -> object:  # type: ignore[no-untyped-def]
    [rec] = [r for r in d.recovery if r.variable == "x"]
    assert rec.formula is None and len(rec.relations) == 1
    return rec


def test_lasso_point_from_the_norm_ball_rows() -> None:
    # The lasso dual is maximize -1/4 z'z - y'z s.t. ||A'z||_inf <= lam (S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 5.7, from memory; R. Tibshirani,
    # Regression shrinkage and selection via the lasso, 1996, from memory); x is zero off
    # the active rows of the ball, and A x - y = z/2 fixes it on them.
    from dualize.numeric.evaluate import evaluate

    d = _derived(LASSO)
    rec = _relation_rhs(d)
    assert "norm-ball" in rec.note
    rng = np.random.default_rng(4)
    m, n = 12, 5
    A, y = rng.normal(size=(m, n)), rng.normal(size=m)
    values = {"A": A, "y": y, "lam": 0.5}
    sol = _dual(d, values, {"m": m, "n": n})
    z = np.asarray(sol.x["z"]).reshape(-1)
    rhs = np.asarray(evaluate(rec.relations[0].rhs, {**values, "z": z}, {"m": m, "n": n}))
    active = np.abs(A.T @ z) >= 0.5 - 1e-6
    x = np.zeros(n)
    x[active] = np.linalg.lstsq(A[:, active], y + rhs.reshape(-1), rcond=None)[0]
    primal = float(np.sum((A @ x - y) ** 2) + 0.5 * np.sum(np.abs(x)))
    assert abs(primal - sol.value) <= 1e-5 * max(1.0, abs(primal))
    # the signs agree with the ball rows: x_i has the sign of s_i = -(A'z)_i
    assert np.all(x[active] * -(A.T @ z)[active] >= -1e-8)


def test_nonnegative_least_squares_point_from_split_stationarity() -> None:
    # NNLS: the dual is maximize -1/4 z'z - b'z s.t. A'z >= 0 (Boyd and Vandenberghe,
    # 2004, section 5.7, from memory), and x_i = 0 where (A'z)_i > 0 (complementary
    # slackness); A x - b = z/2 fixes the rest.
    import cvxpy as cp

    from dualize.numeric.evaluate import evaluate

    d = _derived(NNLS)
    rec = _relation_rhs(d)
    for seed in (1, 2, 3):
        rng = np.random.default_rng(seed)
        m, n = 10, 4
        A, b = rng.normal(size=(m, n)), rng.normal(size=m)
        sol = _dual(d, {"A": A, "b": b}, {"m": m, "n": n})
        z = np.asarray(sol.x["z"]).reshape(-1)
        rhs = np.asarray(evaluate(rec.relations[0].rhs, {"A": A, "b": b, "z": z},
                                  {"m": m, "n": n})).reshape(-1)
        free = A.T @ z <= 1e-5
        x = np.zeros(n)
        x[free] = np.linalg.lstsq(A[:, free], b + rhs, rcond=None)[0]
        ref = cp.Variable(n)
        p = cp.Problem(cp.Minimize(cp.sum_squares(A @ ref - b)), [ref >= 0])
        p.solve()
        assert np.all(x >= -1e-6)
        assert abs(float(np.sum((A @ x - b) ** 2)) - p.value) <= 1e-5 * max(1.0, p.value)
        assert abs(sol.value - p.value) <= 1e-5 * max(1.0, p.value)


def test_recovery_wording_is_specific() -> None:
    # Support vectors belong to margin problems; a least-squares recovery never mentions
    # them (common practice).
    for text in (LASSO, NNLS):
        d = _derived(text)
        assert all("support vector" not in r.note for r in d.recovery)


def test_nonnegative_lasso_dual_is_one_sided() -> None:
    # Over x >= 0 the 1-norm is 1'x, so the lasso's norm ball becomes the one-sided
    # -A'z <= lam (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.7,
    # from memory; the dual norm of the positive part for other norms).
    from tests.duality.test_engine_textbook import _check, _claim

    data = "data A in R^(m,n)\ndata b in R^m\ndata lam in R_++"
    d = _derived(data + "\nminimize ||A*x - b||^2 + lam * ||x||_1\nover x in R^n_+")
    claim = _claim(data, "maximize -1/4 * z' * z - b' * z\nover z in R^m\nsubject to\n"
                   "  -A' * z <= lam")
    _check(d, claim)
