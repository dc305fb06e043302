"""Nonconvex primals: several local solves, reported as what they are.

A local solve only finds a feasible point and its value: for a minimization
the best value found is an upper bound on p* (a lower bound for a
maximization), never p* itself.  The status says so: ``local``.  Matrix
domains beyond S^n, integers and PSD constraints are not handled here and
give ``unsupported``.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import sympy

from dualize.duality.result import DualProblem
from dualize.model import expr as ir
from dualize.model.problem import Constraint, Domain, Problem, Variable
from dualize.numeric.evaluate import evaluate_2d, shape_of
from dualize.numeric.instance import Instance
from dualize.numeric.solution import Solution

STARTS = 12
LARGE = 20  # above this many unknowns, finite-difference SLSQP runs are costly


def starts_for(size: int) -> int:
    """Twelve starts for small problems, three beyond ``LARGE`` unknowns."""
    return STARTS if size <= LARGE else 3
FEAS_TOL = 1e-6


def solve_local(problem: Problem, instance: Instance, fixed: dict[str, np.ndarray],
                why: str) -> Any:
    """The best of several SLSQP runs from random points (seeded: deterministic)."""
    free = [v for v in problem.variables if v.name not in fixed]
    blocker = _unsupported(problem, free)
    if blocker:
        return Solution("unsupported", float("nan"), note=f"{why}; {blocker}")
    layout = _Layout(free, instance.dims)
    sign = 1.0 if problem.sense == "minimize" else -1.0
    best = _best_start(problem, instance, fixed, layout, sign)
    if best is None:
        return Solution("failed", float("nan"), note=f"{why}; no local solve found a "
                                                     "feasible point")
    point = {**layout.split(best), **fixed}
    value = _objective(problem, instance, point)
    x = {k: _stored(v) for k, v in sorted(point.items())}
    return Solution("local", float(value), x, {},
                    note=f"{why}; best of {starts_for(layout.size)} local solves "
                         "(a bound, not p*)")


def _unsupported(problem: Problem, free: list[Variable]) -> str:
    if any(c.kind == "psd" for c in problem.constraints):
        return "matrix inequalities are not handled by the local solver"
    if any(v.domain.kind in ("psd", "pd", "integer") for v in free):
        return "this variable domain is not handled by the local solver"
    return ""


class _Layout:
    """Where each free variable sits in the flat vector of the local solver."""

    def __init__(self, variables: list[Variable], dims: dict[str, int]) -> None:
        self.variables = variables
        self.shapes = [shape_of(v.symbol.sym_shape, dims) for v in variables]
        self.size = sum(r * c for r, c in self.shapes)

    def split(self, flat: np.ndarray) -> dict[str, np.ndarray]:
        out, at = {}, 0
        for var, (rows, cols) in zip(self.variables, self.shapes, strict=True):
            block = flat[at:at + rows * cols].reshape((rows, cols), order="F")
            if var.domain.kind == "symmetric":
                block = (block + block.T) / 2
            out[var.name] = block
            at += rows * cols
        return out

    def bounds(self, instance: Instance) -> list[tuple[float | None, float | None]]:
        out: list[tuple[float | None, float | None]] = []
        for var, (rows, cols) in zip(self.variables, self.shapes, strict=True):
            out += [_bound(var, instance)] * (rows * cols)
        return out


def _bound(var: Variable, instance: Instance) -> tuple[float | None, float | None]:
    kind = var.domain.kind
    if kind in ("nonneg", "pos", "binary"):
        return (0.0, 1.0) if kind == "binary" else (0.0, None)
    if kind == "box":
        lo = float(evaluate_2d(var.domain.lo, instance.values, instance.dims)[0, 0])
        hi = float(evaluate_2d(var.domain.hi, instance.values, instance.dims)[0, 0])
        return lo, hi
    return None, None


def _objective(problem: Problem, instance: Instance, point: dict[str, np.ndarray]) -> float:
    env = {**instance.values, **point}
    return float(evaluate_2d(problem.objective, env, instance.dims)[0, 0])


def _constraints(problem: Problem, instance: Instance, fixed: dict[str, np.ndarray],
                 layout: _Layout) -> list[dict[str, Any]]:
    out = []
    for con in problem.constraints:
        def fn(flat: np.ndarray, con: Any = con) -> np.ndarray:
            env = {**instance.values, **layout.split(flat), **fixed}
            return evaluate_2d(con.function, env, instance.dims).reshape(-1)
        if con.kind == "eq":
            out.append({"type": "eq", "fun": fn})
        else:
            out.append({"type": "ineq", "fun": lambda f, fn=fn: -fn(f)})
    return out


def _best_start(problem: Problem, instance: Instance, fixed: dict[str, np.ndarray],
                layout: _Layout, sign: float) -> np.ndarray | None:
    from scipy.optimize import minimize

    rng = np.random.default_rng(0)
    cons = _constraints(problem, instance, fixed, layout)
    bounds = layout.bounds(instance)

    def goal(flat: np.ndarray) -> float:
        return sign * _objective(problem, instance, {**layout.split(flat), **fixed})

    best, best_value = None, np.inf
    for _ in range(starts_for(layout.size)):
        start = _inside(rng.normal(size=layout.size), bounds)
        with np.errstate(all="ignore"):
            res = minimize(goal, start, method="SLSQP", bounds=bounds, constraints=cons,
                           options={"maxiter": 500, "ftol": 1e-10})
        if _feasible(res.x, cons) and np.isfinite(res.fun) and res.fun < best_value:
            best, best_value = res.x, float(res.fun)
    return best


def _inside(start: np.ndarray, bounds: list[tuple[float | None, float | None]]
            ) -> np.ndarray:
    """A start strictly inside the bounds (a log or 1/y term is undefined on them)."""
    out = start.copy()
    for i, (lo, hi) in enumerate(bounds):
        if lo is not None and hi is not None:
            out[i] = lo + (hi - lo) * (0.25 + 0.5 / (1.0 + np.exp(-start[i])))
        elif lo is not None:
            out[i] = lo + 0.1 + abs(start[i])
        elif hi is not None:
            out[i] = hi - 0.1 - abs(start[i])
    return out


def _feasible(flat: np.ndarray, cons: list[dict[str, Any]]) -> bool:
    for con in cons:
        values = np.asarray(con["fun"](flat))
        if con["type"] == "eq" and np.any(np.abs(values) > FEAS_TOL):
            return False
        if con["type"] == "ineq" and np.any(values < -FEAS_TOL):
            return False
    return True


def _stored(value: np.ndarray) -> np.ndarray | float:
    arr = np.asarray(value, dtype=float)
    if arr.size == 1:
        return float(arr.reshape(-1)[0])
    if arr.ndim == 2 and arr.shape[1] == 1:
        return arr[:, 0].copy()
    return arr.copy()


_DUAL_DOMAINS = {"free": "free", "nonneg": "nonneg", "nonpos": "free", "symmetric": "symmetric"}
_DUAL_KINDS = {"=": "eq", "<=": "ineq", ">=": "ineq"}


def dual_as_problem(dual: DualProblem) -> Problem | None:
    """A derived dual posed as a problem for the local solver; None with PSD variables.

    Dual constraints become normalized constraints (``lhs - rhs <= 0`` and so on);
    a ``nonpos`` variable gets the constraint ``y <= 0``.
    """
    if any(v.set not in _DUAL_DOMAINS for v in dual.variables) or any(
            c.relation not in _DUAL_KINDS for c in dual.constraints):
        return None
    variables = tuple(Variable(v.symbol, Domain(_DUAL_DOMAINS[v.set]))  # type: ignore[arg-type]
                      for v in dual.variables)
    cons = [_dual_constraint(i, c.lhs, c.relation, c.rhs)
            for i, c in enumerate(dual.constraints)]
    cons += [_dual_constraint(len(cons) + i, v.symbol, "<=", ir.Zero(v.symbol.shape))
             for i, v in enumerate(dual.variables) if v.set == "nonpos"]
    return Problem(None, dual.sense, dual.objective, variables, (), tuple(cons), ())


def _dual_constraint(index: int, lhs: ir.Expr, relation: str, rhs: ir.Expr) -> Constraint:
    minus_one = ir.Number(sympy.Integer(-1))
    first, second = (rhs, lhs) if relation == ">=" else (lhs, rhs)
    function = ir.Add((first, ir.Scale(minus_one, second)))
    label = f"c{index + 1}"
    multiplier = ir.Symbol(label, "auxiliary", function.shape)
    written = "==" if relation == "=" else relation  # a constraint is stated as written
    return Constraint(label, _DUAL_KINDS[relation], written, lhs, rhs,  # type: ignore[arg-type]
                      function, multiplier, False)
