"""The independent numeric reference: primal and dual solved with cvxpy.

Statuses are reported as the solver found them, never improved upon:
``optimal``, ``inaccurate`` (the solver's own "optimal_inaccurate"),
``infeasible``, ``unbounded``, ``unsupported`` (something here cannot be
solved faithfully), ``local`` (a nonconvex primal: the best of several local
solves, only an upper bound on p* for a minimization) and ``failed``.

Domains: R_++ and S^n_++ are solved over their closures (R_+, S^n_+), which
leaves the infimum of a continuous objective unchanged; boxes become bound
constraints that carry no multiplier.

Multipliers follow the sign conventions of the language: each constraint is
posed to cvxpy in its normalized form ``f <= 0`` / ``h == 0`` / ``F preceq 0``
and the reported dual value is the multiplier of ``L = f0 + sum y_i f_i`` for a
minimization.  For a maximization the language states ``f - sum y_i f_i``,
so the multipliers are those of ``minimize -f``.  Both are checked against
scipy's HiGHS marginals in the tests.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import Any

import numpy as np

from dualize.duality.result import DualProblem
from dualize.model.problem import Problem, Variable
from dualize.numeric.evaluate import shape_of
from dualize.numeric.instance import Instance
from dualize.numeric.solution import Solution
from dualize.numeric.translate import scalar, to_cvxpy

__all__ = ["Solution", "solve_primal", "solve_dual", "to_cvxpy", "MAX_BINARY_ENTRIES"]

MAX_BINARY_ENTRIES = 16
_STATUS = {
    "optimal": "optimal", "optimal_inaccurate": "inaccurate",
    "infeasible": "infeasible", "infeasible_inaccurate": "infeasible",
    "unbounded": "unbounded", "unbounded_inaccurate": "unbounded",
}


def _worst(sense: str) -> float:
    return float("inf") if sense == "minimize" else float("-inf")


def _stored(value: Any) -> np.ndarray | float:
    arr = np.asarray(value, dtype=float)
    if arr.size == 1:
        return float(arr.reshape(-1)[0])
    if arr.ndim == 2 and arr.shape[1] == 1:
        return arr[:, 0].copy()
    return arr.copy()


def make_variable(var: Variable, dims: dict[str, int]) -> tuple[Any, list[Any]]:
    """A cvxpy variable for ``var`` in its domain, and the domain's extra constraints."""
    import cvxpy as cp

    shape = shape_of(var.symbol.sym_shape, dims)
    kind = var.domain.kind
    if kind in ("psd", "pd"):
        return cp.Variable(shape, PSD=True, name=var.name), []
    if kind == "symmetric":
        return cp.Variable(shape, symmetric=True, name=var.name), []
    if kind in ("nonneg", "pos"):
        return cp.Variable(shape, nonneg=True, name=var.name), []
    return cp.Variable(shape, name=var.name), []


def domain_constraints(var: Variable, x: Any, instance: Instance) -> list[Any]:
    if var.domain.kind != "box":
        return []
    from dualize.numeric.evaluate import evaluate

    lo = float(evaluate(var.domain.lo, instance.values, instance.dims))
    hi = float(evaluate(var.domain.hi, instance.values, instance.dims))
    return [x >= lo, x <= hi]


def posed_constraint(kind: str, fn: Any) -> Any:
    """A normalized constraint function posed to cvxpy as ``f <= 0`` / ``= 0`` / ``preceq 0``."""
    if kind == "eq":
        return fn == 0
    if kind == "psd":
        return (fn + fn.T) / 2 << 0
    return fn <= 0


def solve_primal(problem: Problem, instance: Instance) -> Solution:
    """Solve ``problem`` on ``instance`` with cvxpy (see the module docstring)."""
    kinds = {v.domain.kind for v in problem.variables}
    if "integer" in kinds:
        return Solution("unsupported", float("nan"),
                        note="integer (Z) domains are not enumerable; no reference solve")
    if "binary" in kinds:
        return _enumerate_binary(problem, instance)
    return _solve_continuous(problem, instance, fixed={})


def _solve_continuous(problem: Problem, instance: Instance,
                      fixed: dict[str, np.ndarray]) -> Solution:
    try:
        built = build_primal(problem, instance, fixed)
    except (ValueError, TypeError, ArithmeticError) as err:
        return _nonconvex(problem, instance, fixed, f"not certifiably convex: {err}")
    if not built.prob.is_dcp():
        return _nonconvex(problem, instance, fixed, "not certified convex by the reference's rules")
    status = run_solver(built.prob)
    return built.solution(status, problem.sense)


@dataclass(frozen=True)
class _Built:
    """A cvxpy problem with its variables and its multiplier-bearing constraints."""

    prob: Any
    variables: dict[str, Any]
    constraints: dict[str, Any]
    fixed: dict[str, np.ndarray]

    def solution(self, status: str, sense: str) -> Solution:
        if status not in ("optimal", "inaccurate"):
            value = {"infeasible": _worst(sense), "unbounded": -_worst(sense)}.get(
                status, float("nan"))
            return Solution(status, value)
        x = {name: _stored(v.value) for name, v in sorted(self.variables.items())}
        x.update({name: _stored(v) for name, v in sorted(self.fixed.items())})
        mult = {label: _stored(c.dual_value) for label, c in self.constraints.items()}
        return Solution(status, float(self.prob.value), dict(sorted(x.items())), mult)


def build_primal(problem: Problem, instance: Instance,
                  fixed: dict[str, np.ndarray]) -> _Built:
    import cvxpy as cp

    variables: dict[str, Any] = {}
    extra: list[Any] = []
    for var in problem.variables:
        if var.name in fixed:
            continue
        x, more = make_variable(var, instance.dims)
        variables[var.name] = x
        extra += more + domain_constraints(var, x, instance)
    env = {**variables, **{k: cp.Constant(v) for k, v in fixed.items()}}
    objective = scalar(to_cvxpy(problem.objective, env, instance.values, instance.dims))
    goal = cp.Minimize(objective) if problem.sense == "minimize" else cp.Maximize(objective)
    cons = {c.label: posed_constraint(c.kind, to_cvxpy(c.function, env, instance.values,
                                                       instance.dims))
            for c in problem.constraints}
    prob = cp.Problem(goal, list(cons.values()) + extra)
    return _Built(prob, variables, cons, fixed)


def run_solver(prob: Any) -> str:
    """Clarabel first, SCS if Clarabel fails; the status in our vocabulary.

    cvxpy's own warnings (an inaccurate solution) are silenced: the status says it.
    """
    import warnings

    import cvxpy as cp

    for solver in (cp.CLARABEL, cp.SCS):
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                prob.solve(solver=solver)
        except (cp.error.SolverError, ValueError, ArithmeticError):
            continue
        status = _STATUS.get(prob.status, "failed")
        if status != "failed":
            return status
    return "failed"


def _binary_entries(problem: Problem, instance: Instance) -> list[tuple[str, tuple[int, int]]]:
    return [(v.name, shape_of(v.symbol.sym_shape, instance.dims))
            for v in problem.variables if v.domain.kind == "binary"]


def _enumerate_binary(problem: Problem, instance: Instance) -> Solution:
    """Exact: every 0/1 assignment of the binary variables, the rest solved for each."""
    slots = _binary_entries(problem, instance)
    count = sum(r * c for _, (r, c) in slots)
    if count > MAX_BINARY_ENTRIES:
        return Solution("unsupported", float("nan"),
                        note=f"{count} binary entries exceed the enumeration limit "
                             f"{MAX_BINARY_ENTRIES}")
    best: Solution | None = None
    sign = 1.0 if problem.sense == "minimize" else -1.0
    for bits in itertools.product((0.0, 1.0), repeat=count):
        fixed = _unflatten(slots, np.array(bits))
        sol = _solve_continuous(problem, instance, fixed)
        if sol.status in ("optimal", "inaccurate", "unbounded") and (
                best is None or sign * sol.value < sign * best.value):
            best = sol
    if best is None:
        return Solution("infeasible", _worst(problem.sense))
    return Solution(best.status, best.value, best.x, {},
                    note="exact enumeration of the binary entries; multipliers are not "
                         "defined for an integer problem")


def _unflatten(slots: list[tuple[str, tuple[int, int]]], flat: np.ndarray
               ) -> dict[str, np.ndarray]:
    out, at = {}, 0
    for name, (rows, cols) in slots:
        out[name] = flat[at:at + rows * cols].reshape((rows, cols), order="F")
        at += rows * cols
    return out


def _nonconvex(problem: Problem, instance: Instance, fixed: dict[str, np.ndarray],
               why: str) -> Solution:
    from dualize.numeric.local import solve_local

    return solve_local(problem, instance, fixed, why)


def solve_dual(dual: DualProblem, instance: Instance) -> Solution:
    """Solve a derived dual over its variables and their sets.

    A dual whose form cvxpy cannot certify (``-2y - 1/(2y)`` written as a
    quotient) is maximized by local solves instead: a dual function is concave
    whatever the primal, so a local maximum is global when the derivation is
    right; the status is then ``local`` and the value, attained at a
    dual-feasible point, is still a valid bound.
    A dual that is minus infinity everywhere (``unbounded``) is reported as
    infeasible with value -inf (+inf for a minimization).  A dual that still
    contains an inner minimization is not solved: a max-min needs a saddle
    solver, and a wrong number is worse than none, so the status is
    ``unsupported`` (``verify`` evaluates such duals at the reference
    multipliers instead).
    """
    if dual.unbounded:
        return Solution("infeasible", _worst(dual.sense),
                        note="the dual function is -inf for every multiplier")
    if dual.inner:
        names = ", ".join(v.name for v in dual.inner)
        return Solution("unsupported", float("nan"),
                        note=f"the dual keeps an inner optimization over {names}")
    try:
        built = build_dual(dual, instance)
    except (ValueError, TypeError, ArithmeticError) as err:
        return _local_dual(dual, instance, f"dual not certifiably concave: {err}")
    if not built.prob.is_dcp():
        return _local_dual(dual, instance, "dual not certified concave by the reference's rules")
    status = run_solver(built.prob)
    return built.solution(status, dual.sense)


def dual_variable(symbol_shape: tuple[int, int], dual_set: str, name: str) -> Any:
    import cvxpy as cp

    options = {"nonneg": {"nonneg": True}, "nonpos": {"nonpos": True},
               "psd": {"PSD": True}, "symmetric": {"symmetric": True}}.get(dual_set, {})
    return cp.Variable(symbol_shape, name=name, **options)


def build_dual(dual: DualProblem, instance: Instance) -> _Built:
    import cvxpy as cp

    variables = {v.name: dual_variable(shape_of(v.symbol.sym_shape, instance.dims), v.set,
                                       v.name) for v in dual.variables}
    objective = scalar(to_cvxpy(dual.objective, variables, instance.values, instance.dims))
    goal = cp.Maximize(objective) if dual.sense == "maximize" else cp.Minimize(objective)
    cons = _dual_constraint_map(dual, variables, instance)
    return _Built(cp.Problem(goal, list(cons.values())), variables, cons, {})


def _dual_constraint_map(dual: DualProblem, variables: dict[str, Any],
                         instance: Instance) -> dict[str, Any]:
    cons = {}
    for index, con in enumerate(dual.constraints):
        lhs = to_cvxpy(con.lhs, variables, instance.values, instance.dims)
        rhs = to_cvxpy(con.rhs, variables, instance.values, instance.dims)
        cons[con.label or f"c{index + 1}"] = _relation(con.relation, lhs, rhs)
    return cons


def dual_constraints(dual: DualProblem, variables: dict[str, Any],
                     instance: Instance) -> list[Any]:
    """The dual's constraints as cvxpy constraints over ``variables``."""
    return list(_dual_constraint_map(dual, variables, instance).values())


def _relation(relation: str, lhs: Any, rhs: Any) -> Any:
    if relation == "=":
        return lhs == rhs
    if relation == "<=":
        return lhs <= rhs
    if relation == ">=":
        return lhs >= rhs
    if relation in ("succeq", "preceq"):
        diff = lhs - rhs if relation == "succeq" else rhs - lhs
        return (diff + diff.T) / 2 >> 0
    raise ValueError(f"dual relation '{relation}' has no numeric form")


def _local_dual(dual: DualProblem, instance: Instance, why: str) -> Solution:
    from dualize.numeric.local import dual_as_problem, solve_local

    as_problem = dual_as_problem(dual)
    if as_problem is None:
        return Solution("unsupported", float("nan"), note=f"{why}; the local solver takes "
                        "no semidefinite variables or constraints and no 'in' relations")
    return solve_local(as_problem, instance, {}, why)
