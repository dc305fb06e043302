"""Weak duality on random feasible points, not just at the optima.

Weak duality says g(y) <= f0(x) for EVERY dual-feasible y and primal-feasible
x of a minimization (common practice; S. Boyd and L. Vandenberghe, Convex
Optimization, 2004, section 5.1.3).  Checking it away from the optima catches
a dual objective that is right at the optimum by accident but wrong elsewhere.
The reference optimum joins the primal samples, which makes the check sharp:
every random dual value must stay below p*.
Random feasible points are made by projecting random points onto each
feasible set (a small convex solve); where a set is not convex, no samples are
drawn and the report says so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from dualize.duality.result import Derivation, DualProblem
from dualize.model.problem import Problem
from dualize.numeric.evaluate import evaluate, shape_of
from dualize.numeric.instance import Instance
from dualize.numeric.tolerance import tolerance


@dataclass(frozen=True)
class WeakDualitySamples:
    """Dual values at random dual-feasible points against primal values at feasible ones."""

    dual_values: tuple[float, ...]
    primal_values: tuple[float, ...]
    ok: bool
    worst_violation: float
    note: str = ""


def weak_duality_samples(derivation: Derivation, instance: Instance, n: int = 8,
                         seed: int = 0) -> WeakDualitySamples:
    """``n`` random feasible points on each side; ok when no dual value beats a primal one.

    The primal side also includes the reference optimum (the last entry of
    ``primal_values`` when the reference solve succeeded), so a dual objective is
    tested against p* at every random dual-feasible point.
    """
    rng = np.random.default_rng(seed)
    primal = [v for v in (_primal_sample(derivation.problem, instance, rng) for _ in range(n))
              if v is not None and math.isfinite(v)]
    primal += _reference_optimum(derivation.problem, instance)
    dual = [v for v in (_dual_sample(derivation.dual, instance, rng) for _ in range(n))
            if v is not None and math.isfinite(v)]
    if not primal or not dual:
        return WeakDualitySamples(tuple(dual), tuple(primal), True, 0.0,
                                  note="no feasible samples on one side: nothing compared")
    sign = 1.0 if derivation.problem.sense == "minimize" else -1.0
    best_dual = max(sign * d for d in dual)
    best_primal = min(sign * p for p in primal)
    violation = best_dual - best_primal
    ok = violation <= tolerance(best_primal, best_dual)
    return WeakDualitySamples(tuple(dual), tuple(primal), ok, max(0.0, violation))


def _reference_optimum(problem: Problem, instance: Instance) -> list[float]:
    """The reference p* (or a local value: still a primal-feasible value) when solved."""
    from dualize.numeric.reference import solve_primal

    sol = solve_primal(problem, instance)
    ok = sol.status in ("optimal", "inaccurate", "local") and math.isfinite(sol.value)
    return [sol.value] if ok else []


def _projected(variables: dict[str, Any], targets: dict[str, np.ndarray], constraints: list[Any]
               ) -> bool:
    import cvxpy as cp

    from dualize.numeric.reference import run_solver

    distance = sum(cp.sum_squares(variables[k] - targets[k]) for k in sorted(variables))
    prob = cp.Problem(cp.Minimize(distance), constraints)
    return prob.is_dcp() and run_solver(prob) in ("optimal", "inaccurate")


def _primal_sample(problem: Problem, instance: Instance, rng: np.random.Generator
                   ) -> float | None:
    from dualize.numeric.reference import build_primal

    if any(v.domain.kind in ("binary", "integer") for v in problem.variables):
        return None
    try:
        built = build_primal(problem, instance, {})
    except (ValueError, TypeError, ArithmeticError):
        return None
    targets = {k: 3.0 * rng.normal(size=v.shape) for k, v in sorted(built.variables.items())}
    if not _projected(built.variables, targets, built.prob.constraints):
        return None
    point = {k: v.value for k, v in built.variables.items()}
    with np.errstate(all="ignore"):
        return float(evaluate(problem.objective, {**instance.values, **point}, instance.dims))


def _dual_sample(dual: DualProblem, instance: Instance, rng: np.random.Generator
                 ) -> float | None:
    from dualize.numeric.dual_value import dual_function_value
    from dualize.numeric.reference import dual_constraints, dual_variable

    if dual.unbounded:
        return None
    variables = {v.name: dual_variable(shape_of(v.symbol.sym_shape, instance.dims), v.set,
                                       v.name) for v in dual.variables}
    try:
        constraints = dual_constraints(dual, variables, instance)
    except (ValueError, TypeError, ArithmeticError):
        return None
    targets = {k: 3.0 * rng.normal(size=v.shape) for k, v in sorted(variables.items())}
    if not _projected(variables, targets, constraints):
        return None
    point = {k: v.value for k, v in variables.items()}
    return dual_function_value(dual, instance, point)
