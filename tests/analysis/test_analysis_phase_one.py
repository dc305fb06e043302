"""Slater's condition on instances (phase one with scipy), and agreement of p* and d*
where the tool says "guaranteed".

Sources (from memory): S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
section 11.4.1 (the phase-one problem), section 5.2.3 (Slater), section 5.2.1 (the
inequality-form LP and its dual), exercise 5.1 (p* = d* = 5).  cvxpy with its bundled
solvers is the independent numeric reference for optimal values.
"""

from __future__ import annotations

import numpy as np
import pytest
from analysis_fixtures import load_problem, rules_of

from dualize.api import analyze

BALL = ("data r in R\ndata c in R^n\nminimize c' * x\nover x in R^n\n"
        "subject to\n  ball: ||x|| <= r\n")


def test_ball_with_positive_radius_is_strictly_feasible_on_an_instance() -> None:
    c = np.array([1.0, -2.0, 0.5])
    a = analyze(load_problem(BALL), {"r": 2.0, "c": c})
    assert a.strong_duality_status == "guaranteed"
    assert np.linalg.norm(a.witness["x"]) < 2.0  # shown strictly feasible


def test_ball_with_zero_radius_has_no_strict_point_on_an_instance() -> None:
    # ||x|| <= 0 is feasible only at 0, never strictly (section 5.2.3)
    a = analyze(load_problem(BALL), {"r": 0.0, "c": np.ones(3)})
    assert a.strong_duality_status == "not-guaranteed"
    assert "slater-fails" in [d.rule for d in a.diagnostics]


def test_infeasible_affine_part_is_reported() -> None:
    text = ("data b in R\nminimize x\nover x in R_+\nsubject to\n  c: x <= b\n")
    a = analyze(load_problem(text), {"b": -1.0})
    assert a.strong_duality_status == "not-guaranteed"
    assert "infeasible" in a.strong_duality_reason


def test_dependent_equality_rows_on_an_instance() -> None:
    text = ("data A in R^(m,n)\ndata b in R^m\ndata c in R^n\n"
            "minimize c' * x\nover x in R^n_+\nsubject to\n  nu: A*x == b\n")
    a_dep = np.array([[1.0, 1.0, 1.0], [2.0, 2.0, 2.0]])
    inst = {"A": a_dep, "b": np.array([1.0, 2.0]), "c": np.ones(3)}
    assert "dependent-equalities" in rules_of(text, inst)
    inst_ok = {"A": np.array([[1.0, 1.0, 1.0], [1.0, -1.0, 0.0]]), "b": np.array([1.0, 0.0]),
               "c": np.ones(3)}
    assert "dependent-equalities" not in rules_of(text, inst_ok)
    assert "dependent-equalities" not in rules_of(text)  # no instance: no rank test


def test_lmi_strictly_feasible_on_an_instance() -> None:
    text = ("data C in S^n\nminimize trace(C*X)\nover X in S^n\nsubject to\n"
            "  one: trace(X) == 1\n  Z: X succeq 0\n")
    a = analyze(load_problem(text), {"C": np.diag([1.0, 2.0])})
    assert a.strong_duality_status == "guaranteed"
    x = np.asarray(a.witness["X"])
    assert np.linalg.eigvalsh((x + x.T) / 2)[0] > 0 and abs(np.trace(x) - 1) < 1e-8


def _solve(problem: object) -> float:
    problem.solve()  # type: ignore[attr-defined]
    return float(problem.value)  # type: ignore[attr-defined]


def test_guaranteed_ball_problem_has_no_gap() -> None:
    cp = pytest.importorskip("cvxpy")
    rng = np.random.default_rng(5)
    c, r = rng.normal(size=4), 1.5
    assert analyze(load_problem(BALL), {"r": r, "c": c}).strong_duality_status == "guaranteed"
    x = cp.Variable(4)
    p_star = _solve(cp.Problem(cp.Minimize(c @ x), [cp.norm(x, 2) <= r]))
    # dual of minimize c'x s.t. ||x|| <= r: g(lam) = -lam r for ||c|| <= lam, else -inf
    # (the dual-norm argument of Boyd and Vandenberghe, 2004, section 5.1.6)
    lam = cp.Variable(nonneg=True)
    d_star = _solve(cp.Problem(cp.Maximize(-lam * r), [cp.norm(c, 2) <= lam]))
    assert p_star == pytest.approx(d_star, rel=1e-6, abs=1e-7)


def test_guaranteed_inequality_lp_has_no_gap() -> None:
    cp = pytest.importorskip("cvxpy")
    rng = np.random.default_rng(11)
    a_mat = rng.normal(size=(7, 3))
    b = a_mat @ rng.normal(size=3) + rng.uniform(0.5, 1.0, size=7)  # feasible
    c = -a_mat.T @ rng.uniform(0.1, 1.0, size=7)  # bounded: c in -cone(A')
    text = ("data A in R^(m,n)\ndata b in R^m\ndata c in R^n\nminimize c' * x\n"
            "over x in R^n\nsubject to\n  lam: A*x <= b\n")
    a = analyze(load_problem(text), {"A": a_mat, "b": b, "c": c})
    assert a.strong_duality_status == "guaranteed"
    x = cp.Variable(3)
    p_star = _solve(cp.Problem(cp.Minimize(c @ x), [a_mat @ x <= b]))
    # section 5.2.1: maximize -b'lam s.t. A'lam + c = 0, lam >= 0
    lam = cp.Variable(7, nonneg=True)
    d_star = _solve(cp.Problem(cp.Maximize(-b @ lam), [a_mat.T @ lam + c == 0]))
    assert p_star == pytest.approx(d_star, rel=1e-6, abs=1e-7)


def test_exercise_5_1_values_agree() -> None:
    from scipy.optimize import minimize_scalar

    text = "minimize x^2 + 1\nover x in R\nsubject to\n  c: (x - 2) * (x - 4) <= 0\n"
    assert analyze(load_problem(text)).strong_duality_status == "guaranteed"
    # g(lam) = inf_x (1 + lam) x^2 - 6 lam x + 1 + 8 lam = 1 + 8 lam - 9 lam^2 / (1 + lam)
    res = minimize_scalar(lambda lam: -(1 + 8 * lam - 9 * lam ** 2 / (1 + lam)),
                          bounds=(0, 100), method="bounded")
    assert -res.fun == pytest.approx(5.0, rel=1e-6)  # p* = 5 at x = 2 (exercise 5.1)
    assert res.x == pytest.approx(2.0, rel=1e-4)  # lambda* = 2


def test_infeasible_curved_constraint_on_an_instance() -> None:
    # x^2 + 1 <= 0 has no point at all: phase one ends at s* = 1 > 0 (section 11.4.1)
    a = analyze(load_problem("minimize x\nover x in R\nsubject to\n  c: x^2 + 1 <= 0\n"), {})
    assert a.strong_duality_status == "not-guaranteed"
    assert "infeasible" in a.strong_duality_reason


def test_negative_radius_is_never_called_guaranteed() -> None:
    a = analyze(load_problem(BALL), {"r": -1.0, "c": np.ones(3)})
    assert a.strong_duality_status in ("unknown", "not-guaranteed")
