"""The numerical solves behind the phase-one verdict (scipy imported only here)."""

from __future__ import annotations

from typing import Any

import numpy as np

MAX_ITER = 500


def _with_s(rows: Any, z0: np.ndarray) -> np.ndarray:
    strict = rows.values(rows.strict, z0)
    s0 = float(np.max(strict)) + 1.0 if strict.size and np.all(np.isfinite(strict)) else 1.0
    return np.append(z0, s0)


def _constraints(rows: Any) -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = []
    if rows.strict:
        out.append({"type": "ineq", "fun": lambda w: w[-1] - rows.values(rows.strict, w[:-1])})
    if rows.affine:
        out.append({"type": "ineq", "fun": lambda w: -rows.values(rows.affine, w[:-1])})
    if rows.equal:
        out.append({"type": "eq", "fun": lambda w: rows.values(rows.equal, w[:-1])})
    return out


def phase_one(rows: Any) -> tuple[float, np.ndarray | None, bool]:
    """(s*, z*, converged) of minimize s s.t. strict rows <= s, affine rows <= 0,
    equal rows = 0.

    s is bounded below by -1 so the problem has a solution.  An unconverged run
    (a kink of a norm at the optimum) still yields a point, which the caller may
    use only after checking it; z* is None when the point is not finite.
    """
    from scipy.optimize import minimize

    w0 = _with_s(rows, rows.start)
    bounds = list(rows.bounds) + [(-1.0, None)]
    res = minimize(lambda w: w[-1], w0, jac=lambda w: _unit_last(w.size), method="SLSQP",
                   bounds=bounds, constraints=_constraints(rows),
                   options={"maxiter": MAX_ITER, "ftol": 1e-12})
    if not np.all(np.isfinite(res.x)):
        return float("nan"), None, False
    return float(res.x[-1]), res.x[:-1], bool(res.success)


def _unit_last(k: int) -> np.ndarray:
    g = np.zeros(k)
    g[-1] = 1.0
    return g


def _linear_part(funcs: list[Any], size: int) -> tuple[np.ndarray, np.ndarray]:
    """(J, r0) with row(z) = r0 + J z, read off by evaluating at 0 and the unit vectors."""
    def stacked(z: np.ndarray) -> np.ndarray:
        parts = [f(z) for f in funcs]
        return np.concatenate(parts) if parts else np.zeros(0)

    r0 = stacked(np.zeros(size))
    cols = [stacked(np.eye(size)[i]) - r0 for i in range(size)]
    jac = np.column_stack(cols) if cols else np.zeros((r0.size, 0))
    return jac, r0


def affine_point(rows: Any) -> tuple[str, np.ndarray | None]:
    """("infeasible", None) when linprog (HiGHS) proves the affine constraints and bounds
    have no common point; ("feasible", z) with such a point; ("unknown", None) otherwise."""
    from scipy.optimize import linprog

    size = rows.lay.size
    if size == 0:
        return "unknown", None
    a_ub, r_ub = _linear_part(rows.affine, size)
    a_eq, r_eq = _linear_part(rows.equal, size)
    res = linprog(np.zeros(size), A_ub=a_ub if a_ub.size else None,
                  b_ub=-r_ub if a_ub.size else None, A_eq=a_eq if a_eq.size else None,
                  b_eq=-r_eq if a_eq.size else None, bounds=rows.bounds, method="highs")
    if res.status == 2:
        return "infeasible", None
    return ("feasible", np.asarray(res.x)) if res.status == 0 else ("unknown", None)
