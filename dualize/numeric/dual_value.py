"""The dual objective at a point of multipliers, an inner optimization included.

Shared by the verification (a dual evaluated at the reference multipliers) and
the weak-duality samples (a dual evaluated at random dual-feasible points).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from dualize.duality.result import DualProblem
from dualize.numeric.instance import Instance

SOLVED = ("optimal", "inaccurate")  # the reference's statuses that carry an optimum


def dual_function_value(dual: DualProblem, instance: Instance, point: dict[str, Any]) -> float:
    """The dual objective at ``point`` (multipliers by name), inner optimization included.

    The point is taken as given: dual constraints are not checked here.
    """
    from dualize.numeric.evaluate import evaluate

    values = {**instance.values, **point}
    if not dual.inner:
        with np.errstate(all="ignore"):
            return float(evaluate(dual.objective, values, instance.dims))
    return _inner_value(dual, Instance(values, instance.dims, instance.source))


def _inner_value(dual: DualProblem, instance: Instance) -> float:
    import cvxpy as cp

    from dualize.numeric.reference import domain_constraints, make_variable, run_solver
    from dualize.numeric.translate import scalar, to_cvxpy

    variables, extra = {}, []
    for var in dual.inner:
        x, more = make_variable(var, instance.dims)
        variables[var.name] = x
        extra += more + domain_constraints(var, x, instance)
    objective = scalar(to_cvxpy(dual.objective, variables, instance.values, instance.dims))
    goal = cp.Minimize(objective) if dual.sense == "maximize" else cp.Maximize(objective)
    prob = cp.Problem(goal, extra)
    if not prob.is_dcp():
        return float("nan")
    status = run_solver(prob)
    if status == "unbounded":
        return -math.inf if dual.sense == "maximize" else math.inf
    return float(prob.value) if status in SOLVED else float("nan")
