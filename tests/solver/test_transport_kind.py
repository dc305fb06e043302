"""Generated modules for the transport kind: duals whose constraint or objective is a
matrix built from vector multipliers (u 1' + 1 v').

The transport and assignment duals are linear programs with m n rows, solved by HiGHS on
sparse Kronecker rows, and the plan X is the multiplier of the dual's matrix constraint
(the dual of the dual); the entropic dual is smooth and concave, solved by L-BFGS-B with
its analytic gradient (row and column sums of exp(.)), and P comes from the derivation's
minimizer formula.  Every optimum is compared with cvxpy solving the primal (cvxpy as
the reference library, common practice); the instances are random, of our own making.
"""

from __future__ import annotations

import dataclasses
import importlib.util
import json
import subprocess
import sys
import time
from pathlib import Path

import cvxpy as cp
import numpy as np
import pytest
import scipy.sparse

from dualize.duality import derive
from dualize.model import load
from dualize.solvergen.solver import render_solver

PROBLEMS = Path(__file__).resolve().parents[1] / "problems"
BY_MULTIPLIERS = "the multipliers of the dual's own constraints"


def source(name: str) -> str:
    text = (PROBLEMS / f"{name}.prob").read_text(encoding="utf-8")
    return render_solver(derive(load(text, f"{name}.prob").problem))


def run(name: str, data: dict, tmp_path: Path) -> tuple[int, dict, float]:
    """The module run as a program on a JSON instance: exit code, report, seconds."""
    module, instance = tmp_path / f"{name}.py", tmp_path / f"{name}.json"
    module.write_text(source(name), encoding="utf-8")
    instance.write_text(json.dumps(data), encoding="utf-8")
    start = time.perf_counter()
    done = subprocess.run([sys.executable, str(module), str(instance)], capture_output=True,
                          text=True, timeout=300)
    return done.returncode, json.loads(done.stdout), time.perf_counter() - start


def imported(name: str, tmp_path: Path):
    path = tmp_path / f"{name}_module.py"
    path.write_text(source(name), encoding="utf-8")
    spec = importlib.util.spec_from_file_location(path.stem, path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def transport_instance(seed: int, m: int, n: int) -> dict:
    """Costs in [0, 1]; supplies exceed demands by a fifth, so the primal is feasible."""
    rng = np.random.default_rng(seed)
    b = rng.uniform(0.5, 1.5, n)
    a = rng.uniform(0.5, 1.5, m)
    a *= 1.2 * b.sum() / a.sum()
    return {"C": rng.uniform(0.0, 1.0, (m, n)).tolist(), "a": a.tolist(), "b": b.tolist()}


def transport_reference(data: dict) -> float:
    C, a, b = (np.array(data[k], dtype=float) for k in ("C", "a", "b"))
    X = cp.Variable(C.shape)
    problem = cp.Problem(cp.Minimize(cp.sum(cp.multiply(C, X))),
                         [cp.sum(X, axis=1) <= a, cp.sum(X, axis=0) == b, X >= 0])
    problem.solve(solver=cp.CLARABEL)
    return problem.value


def assert_transport_plan(report: dict, data: dict, tol: float = 1e-6) -> None:
    C, a, b = (np.array(data[k], dtype=float) for k in ("C", "a", "b"))
    X = np.array(report["primal"]["X"])
    assert X.shape == C.shape and X.min() >= -tol
    assert np.all(X.sum(axis=1) <= a + tol) and np.allclose(X.sum(axis=0), b, atol=tol)
    assert np.sum(C * X) == pytest.approx(report["dual_value"], rel=1e-6)


@pytest.mark.parametrize(("seed", "m", "n"), [(1, 4, 5), (2, 6, 3), (3, 5, 5)])
def test_transport_matches_cvxpy(tmp_path, seed, m, n):
    data = transport_instance(seed, m, n)
    code, report, _ = run("transport", data, tmp_path)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["method"] == "linprog"
    value = transport_reference(data)
    assert report["dual_value"] == pytest.approx(value, rel=1e-6)
    assert report["primal_value"] == pytest.approx(value, rel=1e-6)
    assert report["recovered_by"]["X"].startswith(BY_MULTIPLIERS)
    assert_transport_plan(report, data)


def test_larger_transport_matches_cvxpy(tmp_path):
    data = transport_instance(4, 60, 80)
    code, report, seconds = run("transport", data, tmp_path)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["dual_value"] == pytest.approx(transport_reference(data), rel=1e-6)
    assert_transport_plan(report, data)
    print(f"transport 60 x 80: {seconds:.2f} s for the whole process")


def test_rows_are_sparse_kronecker_products(tmp_path):
    # The Jacobian of -(1 demand' + supply 1') in (supply, demand) is -[kron(I_m, 1_n),
    # kron(1_m, I_n)] with rows stacked row by row: 2 m n nonzeros, never a dense block.
    module = imported("transport", tmp_path)
    data = transport_instance(5, 7, 9)
    d = module._read(module.SPEC, data)
    d.update(module.SPEC.prepare(d))
    ((relation, value, jac),) = module.SPEC.constraints(np.zeros(16), d)
    assert relation == "<=" and scipy.sparse.issparse(jac) and jac.nnz == 2 * 7 * 9
    expected = -np.hstack([np.kron(np.eye(7), np.ones((9, 1))), np.kron(np.ones((7, 1)),
                                                                         np.eye(9))])
    assert np.array_equal(jac.toarray(), expected)
    assert np.allclose(value, -np.ravel(data["C"]))


def test_highs_marginals_are_minus_the_plan(tmp_path):
    # scipy's linprog documents ineqlin.marginals as the derivative of the optimal value in
    # b_ub (scipy.optimize.linprog reference, "marginals (AKA dual values / shadow prices)"),
    # so for the rows -(1 v' + u 1') <= C of the minimized dual they are <= 0, and X is their
    # negative (the dual of the dual).  Checked here by moving one cost and re-solving.
    module = imported("transport", tmp_path)
    data = transport_instance(6, 4, 5)
    d = module._read(module.SPEC, data)
    d.update(module.SPEC.prepare(d))
    lo, hi = module.SPEC.bounds(d)
    start = module._start(lo, hi)
    z, ok, _ = module._solve_lp(module.SPEC, d, start, lo, hi, 1e-9, 20000)
    marginals = d["_row_multipliers"][0]
    assert ok and marginals.max() <= 1e-12
    plan = np.array(module.solve(data)["primal"]["X"])
    assert np.allclose(-marginals.reshape(4, 5), plan, atol=1e-9)
    i, j = np.unravel_index(np.argmax(plan), plan.shape)
    moved = json.loads(json.dumps(data))
    moved["C"][i][j] += 1e-4
    change = module.solve(moved)["dual_value"] - module.solve(data)["dual_value"]
    assert change == pytest.approx(1e-4 * plan[i, j], rel=1e-4)


def test_without_its_multipliers_the_plan_is_not_certified(tmp_path, monkeypatch):
    # With no multipliers kept and no primal linear program, X cannot be recovered: the dual
    # value stands as a bound, but the status must not be "certified".
    module = imported("transport", tmp_path)
    monkeypatch.setattr(module, "_keep_multipliers", lambda *args, **kwargs: None)
    spec = dataclasses.replace(module.SPEC, restricted=lambda x, d: "not offered here")
    report = module.run(spec, transport_instance(7, 4, 5))
    assert report["status"] == "dual-only" and report["primal"]["X"] is None
    assert "X" in report["unrecovered"]


def test_infeasible_transport_is_reported_so(tmp_path):
    # Demand beyond supply: no plan exists, so the dual is unbounded (weak duality).
    data = transport_instance(8, 3, 4)
    data["b"] = (np.array(data["b"]) * 2.0).tolist()
    code, report, _ = run("transport", data, tmp_path)
    assert code == 1 and report["status"] == "infeasible"


@pytest.mark.parametrize(("seed", "n"), [(11, 5), (12, 8)])
def test_assignment_matches_cvxpy(tmp_path, seed, n):
    rng = np.random.default_rng(seed)
    data = {"C": rng.uniform(0.0, 1.0, (n, n)).tolist()}
    code, report, _ = run("assignment", data, tmp_path)
    assert code == 0 and report["status"] == "certified", report["message"]
    C = np.array(data["C"])
    X = cp.Variable((n, n))
    problem = cp.Problem(cp.Minimize(cp.sum(cp.multiply(C, X))),
                         [cp.sum(X, axis=1) == 1, cp.sum(X, axis=0) == 1, X >= 0])
    problem.solve(solver=cp.CLARABEL)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    plan = np.array(report["primal"]["X"])
    assert plan.min() >= -1e-6
    assert np.allclose(plan.sum(axis=0), 1, atol=1e-6)
    assert np.allclose(plan.sum(axis=1), 1, atol=1e-6)


def entropic_instance(seed: int, m: int, n: int, eps: float) -> dict:
    """Positive marginals of equal total mass and costs in [0, 1]."""
    rng = np.random.default_rng(seed)
    r, c = rng.uniform(0.5, 1.5, m), rng.uniform(0.5, 1.5, n)
    c *= r.sum() / c.sum()
    return {"C": rng.uniform(0.0, 1.0, (m, n)).tolist(), "r": r.tolist(), "c": c.tolist(),
            "eps": eps}


@pytest.mark.parametrize(("seed", "m", "n", "eps"), [(21, 4, 6, 0.5), (22, 7, 5, 0.1),
                                                     (23, 20, 30, 0.05)])
def test_entropic_transport_matches_cvxpy(tmp_path, seed, m, n, eps):
    data = entropic_instance(seed, m, n, eps)
    code, report, _ = run("entropic_transport", data, tmp_path)
    assert code == 0 and report["status"] == "certified", report["message"]
    assert report["method"] == "lbfgsb_c1"
    C, r, c = (np.array(data[k], dtype=float) for k in ("C", "r", "c"))
    P = cp.Variable((m, n))
    problem = cp.Problem(cp.Minimize(cp.sum(cp.multiply(C, P)) - eps * cp.sum(cp.entr(P))),
                         [cp.sum(P, axis=1) == r, cp.sum(P, axis=0) == c])
    problem.solve(solver=cp.CLARABEL)
    assert report["dual_value"] == pytest.approx(problem.value, rel=1e-6)
    plan = np.array(report["primal"]["P"])
    assert plan.min() > 0
    assert np.allclose(plan.sum(axis=1), r, atol=1e-6)
    assert np.allclose(plan.sum(axis=0), c, atol=1e-6)
    # The entropic optimum is unique (strictly convex objective), so the plans agree, to
    # 1e-4: the reference's exponential-cone solve at its default tolerances was measured
    # some 1e-5 off in P, while the module's P meets the marginals to 1e-6.
    assert np.allclose(plan, P.value, atol=1e-4)


@pytest.mark.parametrize("name", ["transport", "assignment", "entropic_transport"])
def test_modules_are_deterministic_and_ruff_clean(tmp_path, name):
    # The lint gate the other generated modules pass (common practice; E501 not asked for).
    text = source(name)
    assert text == source(name)
    path = tmp_path / f"{name}.py"
    path.write_text(text, encoding="utf-8")
    result = subprocess.run(
        ["ruff", "check", "--isolated", "--no-cache", "--select", "E4,E7,E9,F,W,I,B,UP",
         str(path)], capture_output=True, text=True, check=False)
    assert result.returncode == 0, result.stdout
