"""The penalized and constrained forms matched: the lasso and the ridge.

Lasso: minimize ||Ax - y||^2 + w ||x||_1 and minimize ||Ax - y||^2 s.t. ||x||_1 <= t
have the same solutions when w is the bound's optimal multiplier (Tibshirani,
Regression shrinkage and selection via the lasso, 1996; Hastie, Tibshirani and
Friedman, The Elements of Statistical Learning, 2009, section 3.4, from memory).
Ridge: for minimize ||Ax - b||^2 + w ||x||^2 the solution is
x(w) = (A'A + w I)^-1 A'b (normal equations, common practice), so the matching
bound is t = ||x(w)||^2 and the bound's multiplier at that t is w.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from dualize.api import load_problem, other_form, trade_off
from dualize.numeric.instance import Instance, read_instance

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def _lasso(seed: int) -> Instance:
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(8, 5))
    y = A @ np.array([1.0, 0.0, -0.5, 0.0, 0.3]) + 0.1 * rng.normal(size=8)
    return Instance({"A": A, "y": y, "lambda": 1.0}, {"m": 8, "n": 5})


def _hand_constrained_multiplier(inst: Instance, t: float) -> float:
    """The bound's multiplier from a cvxpy model written by hand (independent of dualize)."""
    import cvxpy as cp

    x = cp.Variable(inst.values["A"].shape[1])
    bound = cp.norm(x, 1) <= t
    cp.Problem(cp.Minimize(cp.sum_squares(inst.values["A"] @ x - inst.values["y"])),
               [bound]).solve(solver=cp.CLARABEL, tol_gap_abs=1e-10, tol_gap_rel=1e-10,
                              tol_feas=1e-10)
    return float(bound.dual_value)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_lasso_weight_is_the_bounds_multiplier(seed: int) -> None:
    pair = other_form(EXAMPLES / "spectrum_lasso.prob")
    assert (pair.given, pair.weight, pair.bound) == ("penalized", "lambda", "t")
    inst = _lasso(seed)
    curve = trade_off(pair, inst, weights=[0.05, 0.3, 1.0, 3.0])
    inner = [p for p in curve.points if p.status != "edge"]
    assert inner, "every weight put the bound at its floor"
    for p in inner:
        assert p.status == "agrees"
        assert abs(p.check_weight - p.weight) <= 1e-6 * max(1.0, p.weight)
        hand = _hand_constrained_multiplier(inst, p.bound)
        assert abs(hand - p.weight) <= 1e-6 * max(1.0, p.weight)
    assert not curve.problems


def test_lasso_bound_to_weight_and_back() -> None:
    pair = other_form(EXAMPLES / "spectrum_lasso.prob")
    inst = _lasso(7)
    curve = trade_off(pair, inst, bounds=[0.4, 0.8, 1.2])
    for p in curve.points:
        assert p.status == "agrees"
        hand = _hand_constrained_multiplier(inst, p.bound)
        assert abs(hand - p.weight) <= 1e-6 * max(1.0, hand)


def _ridge_x(inst: Instance, w: float) -> np.ndarray:
    A, b = inst.values["A"], inst.values["b"]
    return np.linalg.solve(A.T @ A + w * np.eye(A.shape[1]), A.T @ b)


@pytest.mark.parametrize("w", [0.01, 0.5, 4.0])
def test_ridge_matching_bound_in_closed_form(w: float) -> None:
    path = EXAMPLES / "weighbridge_ridge.prob"
    problem = load_problem(path)
    inst = read_instance(str(path.with_suffix(".json")), problem)
    t = float(np.sum(_ridge_x(inst, w) ** 2))
    curve = trade_off(problem, inst, weights=[w])
    point = curve.points[0]
    assert point.bound == pytest.approx(t, rel=1e-6)
    # The multiplier of a squared-norm bound comes from a second-order cone solve, whose
    # multipliers are accurate to a few 1e-6 here (measured): 1e-5 relative is asked.
    assert abs(point.check_weight - w) <= 1e-5 * max(1.0, w)
    back = trade_off(problem, inst, bounds=[t]).points[0]
    assert abs(back.weight - w) <= 1e-5 * max(1.0, w)
    assert back.status == "agrees"


def test_ridge_curve_is_monotone_and_written_as_csv() -> None:
    from dualize.multipliers.path_print import curve_csv

    path = EXAMPLES / "weighbridge_ridge.prob"
    problem = load_problem(path)
    inst = read_instance(str(path.with_suffix(".json")), problem)
    curve = trade_off(problem, inst, weights=list(np.geomspace(0.01, 10, 6)))
    assert not curve.problems and not curve.failed()
    bounds = [p.bound for p in curve.points]
    assert bounds == sorted(bounds, reverse=True)
    lines = curve_csv(curve).splitlines()
    assert lines[0].startswith("weight,bound,objective") and len(lines) == 7


def test_a_non_monotone_curve_is_reported() -> None:
    from dataclasses import replace

    from dualize.multipliers.path import monotonicity

    path = EXAMPLES / "weighbridge_ridge.prob"
    problem = load_problem(path)
    inst = read_instance(str(path.with_suffix(".json")), problem)
    curve = trade_off(problem, inst, weights=[0.1, 1.0])
    a, b = curve.points
    broken = replace(curve, points=(a, replace(b, bound=a.bound * 2)))
    assert any("numerical problem" in line for line in monotonicity(broken))
