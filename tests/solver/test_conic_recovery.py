"""Primal variables read off the conic method's multiplier of their stationarity row.

A variable x entering the Lagrangian linearly leaves the dual the equality "its
coefficient vanishes", and x is that equality's multiplier in the dual (the dual of
the dual is the primal: S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
sections 5.2.5, 5.7 and 5.9).  The generated module reads x off Clarabel's multiplier
of that row and certifies it by the duality gap and the constraint violation.  Every
optimum and x is compared with cvxpy solving the primal (cvxpy as reference library,
common practice), the largest eigenvalue with numpy's; the instances are of our own
making, drawn at random.
"""

from __future__ import annotations

import importlib.util
import json
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import clarabel
import cvxpy as cp
import numpy as np
import pytest
import scipy.sparse

from dualize.duality import build as b
from dualize.duality import derive
from dualize.model import load
from dualize.solvergen.solver import render_solver
from dualize.solvergen.solver_conic import ball_plan, conic_plan
from dualize.solvergen.solver_recover import missing_of
from dualize.solvergen.solver_stationary import stationary_rows

PROBLEMS = Path(__file__).resolve().parents[1] / "problems"
TIGHT = {"tol_gap_abs": 1e-11, "tol_gap_rel": 1e-11, "tol_feas": 1e-11}
STATIONARITY = "stationarity row"

# The same problem as a maximization: the rule is shown only for a minimized primal.
SUM_OF_NORMS_MAX = """data A in R^(m,n)
data B in R^(m,n)
data c in R^m
data d in R^m
maximize -||A*x - c|| - ||B*x - d||
over x in R^n
"""


def derivation_of(text: str, name: str = "made_up.prob"):
    return derive(load(text, name).problem)


def fixture(name: str):
    return derivation_of((PROBLEMS / f"{name}.prob").read_text(encoding="utf-8"), f"{name}.prob")


def run(derivation, data: dict, tmp_path) -> tuple[int, dict]:
    """The generated module run as a program on a JSON instance: exit code and report."""
    module, instance = tmp_path / "solver.py", tmp_path / "instance.json"
    module.write_text(render_solver(derivation), encoding="utf-8")
    instance.write_text(json.dumps(data), encoding="utf-8")
    done = subprocess.run([sys.executable, str(module), str(instance)], capture_output=True,
                          text=True, timeout=300)
    return done.returncode, json.loads(done.stdout)


def norms_instance(seed: int, m: int, n: int) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "B": rng.normal(size=(m, n)).tolist(),
            "c": rng.normal(size=m).tolist(), "d": rng.normal(size=m).tolist()}


def norms_reference(data: dict):
    A, B, c, d = (np.array(data[k], dtype=float) for k in ("A", "B", "c", "d"))
    x = cp.Variable(A.shape[1])
    problem = cp.Problem(cp.Minimize(cp.norm(A @ x - c) + cp.norm(B @ x - d)))
    problem.solve(solver=cp.CLARABEL)
    return problem.value, x.value


def test_clarabel_sign_convention():
    # Clarabel's standard form min q'z s.t. A z + s = b, s in K has the stationarity
    # q + A'y = 0 (Clarabel's documented form, P. Goulart and Y. Chen, 2024): for
    # min z s.t. z = 2 that is y = -1, the sign the recovery's factor rests on.
    settings = clarabel.DefaultSettings()
    settings.verbose = False
    solution = clarabel.DefaultSolver(
        scipy.sparse.csc_matrix((1, 1)), np.array([1.0]),
        scipy.sparse.csc_matrix(np.array([[1.0]])), np.array([2.0]),
        [clarabel.ZeroConeT(1)], settings).solve()
    assert solution.x[0] == pytest.approx(2.0)
    assert solution.z[0] == pytest.approx(-1.0)


def test_the_rule_finds_the_row_and_its_sign():
    derivation = fixture("sum_of_norms")
    plan = ball_plan(derivation.dual)
    assert plan is not None and plan.method == "conic" and len(plan.balls) == 2
    # The dual's row A'z + B'z1 = 0 is grad_x L itself (sign +1), so x = -y.
    assert stationary_rows(derivation, plan, missing_of(derivation)) == {"x": (0, -1.0)}


def test_a_row_not_proved_equal_to_the_gradient_gives_no_rule():
    derivation = fixture("sum_of_norms")
    plan = ball_plan(derivation.dual)
    row = plan.constraints[0]
    doubled = replace(row, function=b.scale(b.num(2), row.function))
    # Twice the gradient: x would be half the multiplier, a scaling the rule does not take.
    assert stationary_rows(derivation, replace(plan, constraints=(doubled,)),
                           missing_of(derivation)) == {}


def test_a_maximized_primal_gets_no_rule():
    derivation = derivation_of(SUM_OF_NORMS_MAX)
    plan = ball_plan(derivation.dual)
    assert plan is not None
    assert stationary_rows(derivation, plan, missing_of(derivation)) == {}


@pytest.mark.parametrize(("seed", "m", "n"), [(1, 8, 5), (2, 30, 12), (3, 6, 6)])
def test_sum_of_norms_recovers_x_and_certifies(tmp_path, seed, m, n):
    data = norms_instance(seed, m, n)
    code, report = run(fixture("sum_of_norms"), data, tmp_path)
    value, x = norms_reference(data)
    assert code == 0 and report["status"] == "certified" and report["method"] == "conic"
    assert STATIONARITY in report["recovered_by"]["x"]
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    # Two norms of residuals of random tall systems: the optimum is unique (from memory).
    # Both norms are smooth there, so the objective grows quadratically away from it and
    # gaps near 1e-9 leave x within about sqrt(1e-9), a few 1e-5 (common practice).
    assert np.allclose(report["primal"]["x"], x, atol=1e-4)


@pytest.mark.parametrize("seed", [4, 5])
def test_socp_recovers_x_by_its_row_and_t_by_the_linear_program(tmp_path, seed):
    rng = np.random.default_rng(seed)
    A, rhs = rng.normal(size=(10, 4)), rng.normal(size=10)
    code, report = run(fixture("socp"), {"A": A.tolist(), "b": rhs.tolist()}, tmp_path)
    x, t = cp.Variable(4), cp.Variable()
    problem = cp.Problem(cp.Minimize(t), [cp.norm(A @ x - rhs) <= t])
    problem.solve(solver=cp.CLARABEL, **TIGHT)
    assert code == 0 and report["status"] == "certified"
    assert STATIONARITY in report["recovered_by"]["x"]
    assert "linear program" in report["recovered_by"]["t"]
    assert report["primal"]["t"] == pytest.approx(problem.value, rel=1e-6)
    assert np.allclose(report["primal"]["x"], x.value, atol=1e-4)  # as for sum_of_norms


def test_eig_recovers_t_from_the_trace_row(tmp_path):
    rng = np.random.default_rng(6)
    M = rng.normal(size=(4, 4))
    A = (M + M.T) / 2
    derivation = fixture("eig")
    plan = conic_plan(derivation.dual)
    # The row tr(Z) - 1 = 0 is minus grad_t L = 1 - tr(Z), so t = +y.
    assert stationary_rows(derivation, plan, missing_of(derivation)) == {"t": (0, 1.0)}
    code, report = run(derivation, {"A": A.tolist()}, tmp_path)
    assert code == 0 and report["status"] == "certified"
    assert STATIONARITY in report["recovered_by"]["t"]
    # min t s.t. t I - A psd is the largest eigenvalue (Boyd and Vandenberghe, 2004,
    # section 4.6.3, from memory); numpy's eigvalsh as reference.
    assert report["primal"]["t"] == pytest.approx(np.linalg.eigvalsh(A).max(), rel=1e-6)


def test_an_unfinished_dual_solve_leaves_x_uncertified(tmp_path):
    data = norms_instance(7, 12, 6)
    path = tmp_path / "norms_solver.py"
    path.write_text(render_solver(fixture("sum_of_norms")), encoding="utf-8")
    spec = importlib.util.spec_from_file_location(path.stem, path)
    module = importlib.util.module_from_spec(spec)
    sys.modules[path.stem] = module  # dataclasses look their module up while it loads
    try:
        spec.loader.exec_module(module)
        # Two interior-point iterations: the multipliers are far from optimal, so the x
        # read off them is reported but never certified.
        report = module.run(module.SPEC, data, max_iter=2)
    finally:
        del sys.modules[path.stem]
    assert report["status"] != "certified"
    assert report["converged"] is False


def test_the_maximized_form_is_not_certified_by_the_rule(tmp_path):
    data = norms_instance(8, 9, 4)
    code, report = run(derivation_of(SUM_OF_NORMS_MAX), data, tmp_path)
    value, _ = norms_reference(data)
    assert report["dual_value"] == pytest.approx(-value, rel=1e-6)
    # Not read off its row; whatever else finds x must pass the gap and violation.
    assert all(STATIONARITY not in how for how in report["recovered_by"].values())
    assert (code == 0) == (report["status"] == "certified")
