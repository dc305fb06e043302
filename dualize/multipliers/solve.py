"""A problem posed once with a shift on every constraint, then solved at many shifts.

Constraint ``i`` in its normalized form ``g_i(x) <= 0`` (``= 0``, ``preceq 0``)
becomes ``g_i(x) <= u_i`` (``= u_i``; ``preceq u_i I`` for a matrix
inequality), the perturbed problem of Boyd and Vandenberghe, Convex
Optimization, 2004, section 5.6.  A positive ``u_i`` relaxes an inequality
whatever side it was written on: ``a'x <= b`` becomes ``a'x <= b + u`` and
``x >= l`` becomes ``x >= l - u``.  The shifts are cvxpy parameters, so the
problem is canonicalized once and each re-solve only changes numbers.

The solve asks Clarabel for tight tolerances (1e-10, else 1e-9) so that finite differences
of optimal values and multipliers compared across solves stay meaningful, and
falls back to the reference's own solve sequence when that fails.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from dualize.model.problem import Problem
from dualize.numeric.instance import Instance

TIGHT = (1e-10, 1e-9)  # Clarabel's gap and feasibility tolerances, tried in turn


@dataclass(frozen=True)
class Point:
    """One solve: our status word, the optimal value, the point and the multipliers."""

    status: str
    value: float
    x: dict[str, np.ndarray]
    multipliers: dict[str, np.ndarray]
    tolerance: float = 1e-4  # the solver's relative gap tolerance that was met

    @property
    def solved(self) -> bool:
        return self.status in ("optimal", "inaccurate")


class Posed:
    """``problem`` on ``instance`` as one cvxpy problem with a shift per constraint."""

    def __init__(self, problem: Problem, instance: Instance) -> None:
        self.problem = problem
        self.instance = instance
        self.prob, self.variables, self.constraints, self.shifts = _pose(problem, instance)

    def convex(self) -> bool:
        """cvxpy can certify the posed problem (DCP): its solve is global."""
        return bool(self.prob.is_dcp())

    def solve(self, shifts: dict[str, np.ndarray] | None = None) -> Point:
        """The solve with ``shifts`` (label -> array of the constraint's shape; 0 elsewhere)."""
        given = shifts or {}
        for label, param in self.shifts.items():
            value = given.get(label)
            param.value = np.zeros(param.shape) if value is None else np.reshape(
                np.asarray(value, dtype=float), param.shape)
        status, tolerance = _run(self.prob)
        return self._point(status, tolerance)

    def _point(self, status: str, tolerance: float) -> Point:
        if status not in ("optimal", "inaccurate"):
            return Point(status, float("nan"), {}, {})
        x = {name: np.asarray(v.value, dtype=float) for name, v in sorted(self.variables.items())}
        mult = {label: _dual(c) for label, c in self.constraints.items()}
        return Point(status, float(self.prob.value), x, mult, tolerance)


def _dual(constraint: Any) -> np.ndarray:
    """The constraint's multiplier; nan (never a made-up zero) when the solver gave none."""
    value = constraint.dual_value
    if value is None:
        return np.full(constraint.shape, np.nan)
    return np.asarray(value, dtype=float)


def _pose(problem: Problem, instance: Instance) -> tuple[Any, dict, dict, dict]:
    import cvxpy as cp

    from dualize.numeric.reference import domain_constraints, make_variable, posed_constraint
    from dualize.numeric.translate import scalar, to_cvxpy

    variables: dict[str, Any] = {}
    extra: list[Any] = []
    for var in problem.variables:
        x, more = make_variable(var, instance.dims)
        variables[var.name] = x
        extra += more + domain_constraints(var, x, instance)
    objective = scalar(to_cvxpy(problem.objective, variables, instance.values, instance.dims))
    goal = cp.Minimize(objective) if problem.sense == "minimize" else cp.Maximize(objective)
    constraints, shifts = {}, {}
    for c in problem.constraints:
        fn = to_cvxpy(c.function, variables, instance.values, instance.dims)
        fn = cp.Constant(fn) if isinstance(fn, np.ndarray | float | int) else fn
        shift = cp.Parameter((1, 1) if c.kind == "psd" else fn.shape, name=f"u_{c.label}")
        moved = fn - shift[0, 0] * np.eye(fn.shape[0]) if c.kind == "psd" else fn - shift
        constraints[c.label], shifts[c.label] = posed_constraint(c.kind, moved), shift
    prob = cp.Problem(goal, list(constraints.values()) + extra)
    return prob, variables, constraints, shifts


def _run(prob: Any) -> tuple[str, float]:
    """Clarabel with tight tolerances; else the reference's sequence. Our status word and
    the relative gap tolerance met (Clarabel's default 1e-8, SCS's loose 1e-4)."""
    import warnings

    import cvxpy as cp

    from dualize.numeric.reference import run_solver

    for tol in TIGHT:
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                prob.solve(solver=cp.CLARABEL, tol_gap_abs=tol, tol_gap_rel=tol, tol_feas=tol,
                           max_iter=400)
        except (cp.error.SolverError, ValueError, ArithmeticError):
            continue
        if prob.status == "optimal":
            return "optimal", tol
    status = run_solver(prob)
    stats = getattr(prob, "solver_stats", None)
    name = str(getattr(stats, "solver_name", "")).upper()
    return status, 1e-8 if name == "CLARABEL" and status == "optimal" else 1e-4
