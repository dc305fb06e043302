"""Duals from minimizing over a box a Lagrangian strictly convex there: printed with max
and min of the multipliers, but continuously differentiable, so a generated module solves
them with a bound-constrained smooth method and certifies them.

Basis: a dual function is concave whatever its printed form (S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, section 5.1.2); with a unique minimizer x(y) of the Lagrangian
it is differentiable with gradient the constraint functions at x(y) (Danskin's theorem;
D. Bertsekas, Nonlinear Programming, 2nd ed., 1999, Prop. B.25).  Every optimum is
compared with cvxpy solving the primal (cvxpy as reference library, common practice);
the problems and instances are of our own making.
"""

from __future__ import annotations

import json
import subprocess
import sys

import cvxpy as cp
import numpy as np
import pytest
import sympy

from dualize.duality import derive
from dualize.duality.separable import strictly_convex_on
from dualize.errors import DualizeError
from dualize.model import load
from dualize.solvergen.solver import render_solver

BUDGET = """data q in R^n
data a in R^n
data r in R
minimize 1/2 * x'*x + q'*x
over x in [-1, 1]^n
subject to
  bud: a'*x = r
"""

EXP_CAP = """data A in R^(m x n)
data b in R^m
minimize sum(exp(x))
over x in [0, 2]^n
subject to
  cap: A*x <= b
"""

SOFTPLUS_CAP = """data A in R^(m x n)
data b in R^m
minimize sum(softplus(x))
over x in [-1, 2]^n
subject to
  cap: A*x <= b
"""

# y is strictly convex over its box, x is linear over its box: the min(0, A'cap + c) the x
# block leaves is a kink of a dual that is not differentiable (not strictly convex in x).
MIXED = """data c in R^n
data A in R^(m x n)
data b in R^m
minimize 1/2 * y'*y + c'*x
over x in [0, 1]^n, y in [-1, 1]^n
subject to
  cap: A*x + A*y <= b
"""

LP_BOX = """data c in R^n
data A in R^(m x n)
data b in R^m
minimize c'*x
over x in [0, 1]^n
subject to
  cap: A*x <= b
"""


def derivation(text: str):
    return derive(load(text, "made_up.prob").problem)


def run(text: str, data: dict, tmp_path) -> tuple[int, dict, str]:
    """The generated module run as a program on a JSON instance: exit code, report, source."""
    source = render_solver(derivation(text))
    module, instance = tmp_path / "solver.py", tmp_path / "instance.json"
    module.write_text(source, encoding="utf-8")
    instance.write_text(json.dumps(data), encoding="utf-8")
    done = subprocess.run([sys.executable, str(module), str(instance)], capture_output=True,
                          text=True, timeout=300)
    return done.returncode, json.loads(done.stdout), source


def budget_instance(seed: int, n: int = 25) -> dict:
    """a'x = r met by a point inside the box, so the primal is strictly feasible."""
    rng = np.random.default_rng(seed)
    a, q = rng.normal(size=n), 2.0 * rng.normal(size=n)
    return {"q": q.tolist(), "a": a.tolist(), "r": float(a @ rng.uniform(-0.8, 0.8, n))}


def cap_instance(seed: int, m: int = 8, n: int = 20, low: float = 0.0, high: float = 2.0) -> dict:
    """A x <= b with slack at a point inside the box; b tightened so some rows bind."""
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(m, n))
    inside = rng.uniform(low + 0.1 * (high - low), high - 0.1 * (high - low), n)
    return {"A": A.tolist(), "b": (A @ inside + rng.uniform(0.0, 0.3, m)).tolist()}


def budget_reference(data: dict):
    q, a, r = (np.array(data[k], dtype=float) for k in ("q", "a", "r"))
    x = cp.Variable(q.size)
    problem = cp.Problem(cp.Minimize(0.5 * cp.sum_squares(x) + q @ x),
                         [a @ x == r, x >= -1, x <= 1])
    problem.solve(solver=cp.CLARABEL)
    return problem.value, x.value


def cap_reference(data: dict, phi, low: float, high: float):
    A, b = (np.array(data[k], dtype=float) for k in ("A", "b"))
    x = cp.Variable(A.shape[1])
    cap = A @ x <= b
    problem = cp.Problem(cp.Minimize(cp.sum(phi(x))), [cap, x >= low, x <= high])
    problem.solve(solver=cp.CLARABEL)
    return problem.value, x.value, cap.dual_value


def test_the_engine_records_the_fact_only_for_strictly_convex_boxes():
    assert derivation(BUDGET).dual.strictly_convex_boxes == ("x",)
    assert derivation(EXP_CAP).dual.strictly_convex_boxes == ("x",)
    # A linear objective over a box: a min of the multipliers, piecewise linear, no fact.
    assert derivation(LP_BOX).dual.strictly_convex_boxes == ()
    assert derivation(MIXED).dual.strictly_convex_boxes == ()


def test_strict_convexity_is_shown_not_guessed():
    # exp, softplus and t^2 have positive second derivatives; t and |t| have none
    # anywhere (Boyd and Vandenberghe, 2004, section 3.1.4, from memory).
    t = sympy.Symbol("t", real=True)
    box = sympy.Interval(0, 2)
    assert strictly_convex_on(sympy.exp(t), t, box)
    assert strictly_convex_on(sympy.log(1 + sympy.exp(t)), t, sympy.Interval(-1, 2))
    assert strictly_convex_on(t**2, t, box)
    assert not strictly_convex_on(3 * t, t, box)
    assert not strictly_convex_on(sympy.Abs(t), t, sympy.Interval(-1, 1))


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_box_quadratic_with_a_budget_matches_cvxpy(tmp_path, seed):
    data = budget_instance(seed)
    code, report, source = run(BUDGET, data, tmp_path)
    value, x = budget_reference(data)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["method"] == "lbfgsb_c1" and "Danskin" in source
    assert report["dual_value"] == pytest.approx(value, rel=1e-6, abs=1e-7)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6, abs=1e-7)
    assert np.allclose(report["primal"]["x"], x, atol=1e-4)


@pytest.mark.parametrize(("text", "phi", "low", "high", "seed"), [
    (EXP_CAP, cp.exp, 0.0, 2.0, 4),
    (EXP_CAP, cp.exp, 0.0, 2.0, 5),
    (SOFTPLUS_CAP, cp.logistic, -1.0, 2.0, 6),
], ids=["exp-4", "exp-5", "softplus-6"])
def test_separable_over_a_box_with_inequalities_matches_cvxpy(tmp_path, text, phi, low, high,
                                                              seed):
    data = cap_instance(seed, low=low, high=high)
    code, report, _ = run(text, data, tmp_path)
    value, x, cap = cap_reference(data, phi, low, high)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    # x to 1e-3 only: softplus is flat (curvature near 0.1 at its box's ends), so a value
    # within 1e-8 of the optimum leaves x some 1e-4 away from cvxpy's.
    assert np.allclose(report["primal"]["x"], x, atol=1e-3)
    assert np.allclose(report["multipliers"]["cap"], cap, atol=1e-4)
    assert min(report["multipliers"]["cap"]) >= 0.0


def test_a_larger_instance_is_certified(tmp_path):
    # 40 rows, 200 entries: with the decrease of the objective as its stopping rule
    # L-BFGS-B stopped here with a violation near 1e-5, not certified.
    data = cap_instance(12, m=40, n=200)
    code, report, _ = run(EXP_CAP, data, tmp_path)
    value, _, _ = cap_reference(data, cp.exp, 0.0, 2.0)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-7)


def test_gradient_is_the_constraint_at_the_minimizer(tmp_path):
    # Danskin: the gradient of the dual function g(cap) is A x(cap) - b, x(cap) the
    # minimizer of the Lagrangian over the box; the module minimizes -g.
    import importlib.util

    path = tmp_path / "exp_cap.py"
    path.write_text(render_solver(derivation(EXP_CAP)), encoding="utf-8")
    spec = importlib.util.spec_from_file_location("exp_cap", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    data = cap_instance(7)
    A, b = (np.array(data[k]) for k in ("A", "b"))
    d = module._read(module.SPEC, data)
    d.update(module.SPEC.prepare(d))
    rng = np.random.default_rng(7)
    for _ in range(5):
        cap = rng.exponential(0.5, size=A.shape[0])
        x = module.SPEC.recover(cap, d)["x"]
        assert np.all(x >= -1e-12) and np.all(x <= 2 + 1e-12)
        assert np.allclose(module.SPEC.gradient(cap, d), -(A @ x - b), atol=1e-10)


def test_kinks_from_a_block_not_strictly_convex_are_still_refused():
    # min(0, A'cap + c) from the linear x block is a true kink: no fact, and the
    # epigraph lift cannot take the strictly convex y block's terms either.
    with pytest.raises(DualizeError, match="not shown convex") as caught:
        render_solver(derivation(MIXED))
    assert caught.value.exit_code == 2


def test_linear_program_over_a_box_still_goes_through_the_lift(tmp_path):
    rng = np.random.default_rng(8)
    data = cap_instance(8, m=5, n=12, low=0.0, high=1.0)
    data["c"] = rng.normal(size=12).tolist()
    code, report, source = run(LP_BOX, data, tmp_path)
    A, b, c = (np.array(data[k]) for k in ("A", "b", "c"))
    x = cp.Variable(12)
    value = cp.Problem(cp.Minimize(c @ x), [A @ x <= b, x >= 0, x <= 1]).solve(
        solver=cp.CLARABEL)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["method"] == "linprog" and "Danskin" not in source
    assert report["dual_value"] == pytest.approx(value, rel=1e-6, abs=1e-7)
