"""The benchmark's cases: instances of our own making and the primal by cvxpy.

Run as a script (``python bench/bench_cases.py CASE instance.json``) it solves the
primal of CASE on the instance with cvxpy's default open solvers and prints
{"value", "solver", "status", "_peak_mib"}: the general route the generated module is
compared to.  With ``--reference`` it solves the same primal with Clarabel at tight
tolerances instead (REFERENCE_SETTINGS): an accuracy reference for the optimum, not a
route whose time is compared.  Every instance is drawn from a seeded generator
(``numpy.random.default_rng(seed)``, seed 0 by default), so a size rebuilds the same
instance on every run.
"""

from __future__ import annotations

import json
import resource
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np


@dataclass(frozen=True)
class Case:
    problem: str
    sizes: tuple[tuple[int, ...], ...]
    instance: Any
    primal: Any


def soft_margin_instance(m: int, n: int, seed: int = 0) -> dict:
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(m, n))
    y = np.sign(X @ rng.normal(size=n) + 0.5 * rng.normal(size=m))
    y[y == 0] = 1.0
    return {"X": X.tolist(), "y": y.tolist(), "C": 1.0}


def soft_margin_primal(cp: Any, d: dict) -> Any:
    X, y, C = np.array(d["X"]), np.array(d["y"]), d["C"]
    w, b, s = cp.Variable(X.shape[1]), cp.Variable(), cp.Variable(X.shape[0])
    return cp.Problem(cp.Minimize(0.5 * cp.sum_squares(w) + C * cp.sum(s)),
                      [cp.multiply(y, X @ w + b) >= 1 - s, s >= 0])


def lp_instance(n: int, seed: int = 0) -> dict:
    """Standard form A x = b, x >= 0 with m = n / 2 rows: feasible (b = A x0) and bounded
    (c > 0)."""
    rng = np.random.default_rng(seed)
    A = rng.random((n // 2, n))
    b = A @ rng.random(n)
    return {"A": A.tolist(), "b": b.tolist(), "c": (0.1 + rng.random(n)).tolist()}


def lp_primal(cp: Any, d: dict) -> Any:
    A, b, c = (np.array(d[k]) for k in "Abc")
    x = cp.Variable(A.shape[1])
    return cp.Problem(cp.Minimize(c @ x), [A @ x == b, x >= 0])


def lasso_instance(m: int, n: int, seed: int = 0) -> dict:
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(m, n))
    x0 = np.where(rng.random(n) < 0.1, rng.normal(size=n), 0.0)
    y = A @ x0 + 0.1 * rng.normal(size=m)
    return {"A": A.tolist(), "y": y.tolist(), "lambda": 0.1 * float(np.abs(A.T @ y).max())}


def lasso_primal(cp: Any, d: dict) -> Any:
    A, y = np.array(d["A"]), np.array(d["y"])
    x = cp.Variable(A.shape[1])
    return cp.Problem(cp.Minimize(cp.sum_squares(A @ x - y) + d["lambda"] * cp.norm1(x)))


def logistic_instance(m: int, n: int, seed: int = 0) -> dict:
    """Labels with noise, so that no hyperplane separates them (a finite optimum)."""
    rng = np.random.default_rng(seed)
    X = rng.normal(size=(m, n))
    y = np.sign(X @ rng.normal(size=n) + 2.0 * rng.normal(size=m))
    y[y == 0] = 1.0
    return {"X": X.tolist(), "y": y.tolist()}


def logistic_primal(cp: Any, d: dict) -> Any:
    X, y = np.array(d["X"]), np.array(d["y"])
    w = cp.Variable(X.shape[1])
    return cp.Problem(cp.Minimize(cp.sum(cp.logistic(-cp.multiply(y, X @ w)))))


def qp_instance(m: int, n: int, seed: int = 0) -> dict:
    """1/2 x'P x + q'x with G x <= h, P = B'B + I well conditioned, h > 0 (x = 0 inside)."""
    rng = np.random.default_rng(seed)
    B = rng.normal(size=(n, n)) / np.sqrt(n)
    return {"P": (B.T @ B + np.eye(n)).tolist(), "q": rng.normal(size=n).tolist(),
            "G": rng.normal(size=(m, n)).tolist(), "h": (0.1 + rng.random(m)).tolist()}


def qp_primal(cp: Any, d: dict) -> Any:
    P, q, G, h = (np.array(d[k]) for k in "PqGh")
    x = cp.Variable(len(q))
    return cp.Problem(cp.Minimize(0.5 * cp.quad_form(x, cp.psd_wrap(P)) + q @ x), [G @ x <= h])


CASES = {
    "soft_margin": Case("examples/parts_soft_margin.prob",
                        ((2000, 20), (10000, 20), (50000, 20), (2000, 100), (10000, 100),
                         (50000, 100)), soft_margin_instance, soft_margin_primal),
    "lp": Case("examples/flour_blend_lp.prob", ((1000,), (5000,)), lp_instance, lp_primal),
    "lasso": Case("examples/spectrum_lasso.prob", ((1000, 200), (5000, 500)),
                  lasso_instance, lasso_primal),
    "logistic": Case("bench/problems/defect_logistic.prob", ((1000, 40), (10000, 100)),
                     logistic_instance, logistic_primal),
    "qp": Case("examples/drone_thrust_qp.prob", ((500, 1000),), qp_instance, qp_primal),
}
QUICK = [("soft_margin", (2000, 20)), ("lp", (1000,)), ("lasso", (1000, 200)),
         ("logistic", (1000, 40)), ("qp", (100, 200))]


# Clarabel's own stopping tests, tightened from their defaults (1e-8 gap, 1e-8 feasibility,
# 200 iterations) so that the reference optimum is good to about 1e-9 relative.
REFERENCE_SETTINGS = {"tol_gap_abs": 1e-9, "tol_gap_rel": 1e-9, "tol_feas": 1e-9,
                      "tol_ktratio": 1e-7, "max_iter": 2000}


def main(argv: list[str]) -> int:
    import cvxpy as cp

    reference = "--reference" in argv
    name, path = [a for a in argv if a != "--reference"]
    data = json.loads(Path(path).read_text(encoding="utf-8"))
    problem = CASES[name].primal(cp, data)
    if reference:
        problem.solve(solver=cp.CLARABEL, **REFERENCE_SETTINGS)
    else:
        problem.solve()
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    value = None if problem.value is None else float(problem.value)
    print(json.dumps({"value": value, "solver": problem.solver_stats.solver_name,
                      "status": _in_our_words(problem.status), "_peak_mib": peak}))
    return 0


def _in_our_words(status: str) -> str:
    """The reference library's status said in the project's words (its own are its own)."""
    if status == "optimal":
        return "solved"
    if status.endswith("_inaccurate"):
        return "solved-loosely" if status.startswith("optimal") else "unreliable"
    return {"infeasible": "infeasible", "unbounded": "unbounded"}.get(status, "failed")


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
