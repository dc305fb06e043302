"""The plan for a dual with a semidefinite or second-order cone constraint: a conic
interior-point method.

Such a dual (maximize a linear or concave quadratic function of vector multipliers
subject to F(multipliers) >= 0 in the semidefinite order, F affine, or to 2-norm
balls ||a(multipliers)|| <= r(multipliers) with a and r affine, which are second-order
cones, and linear constraints and bounds) is handed to Clarabel (P. Goulart and
Y. Chen, Clarabel: an interior-point solver for conic programs with quadratic
objectives, 2024), a well-kept open conic solver, through its own API; the generated
module imports it only when its dual needs it.
"""

from __future__ import annotations

import sympy

from dualize.duality.result import DualConstraint, DualProblem, DualVariable
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.solvergen.calculus import NotDifferentiable, jacobian
from dualize.solvergen.ir_rewrite import normalize
from dualize.solvergen.solver_plan import (
    Bound,
    General,
    Plan,
    as_bound,
    differentiate,
    expand_ball,
    general_constraint,
    hessian_blocks,
    zero,
)

REASON = "the dual has a semidefinite constraint: a conic interior-point method (Clarabel)"
BALL_REASON = "the dual has a 2-norm ball of affine functions of the multipliers, a " \
    "second-order cone: a conic interior-point method (Clarabel)"


def ball_plan(dual: DualProblem) -> Plan | None:
    """The conic plan for a dual with a 2-norm ball and no semidefinite constraint, or None
    when it has no such ball or the conic route does not take it (the smooth methods then
    take the ball squared)."""
    if not any(_is_ball(c.lhs, c.relation, c.rhs) for c in dual.constraints):
        return None
    try:
        return conic_plan(dual)
    except DualizeError:
        return None


def _is_ball(lhs: ir.Expr, relation: str, rhs: ir.Expr) -> bool:
    return (relation == "<=" and isinstance(lhs, ir.Norm) and lhs.p == "2") or \
        (relation == ">=" and isinstance(rhs, ir.Norm) and rhs.p == "2")


def _ball(constraint: DualConstraint, variables: tuple[ir.Symbol, ...]
          ) -> tuple[ir.Expr, ir.Expr] | None:
    """(radius, argument) of a 2-norm ball whose both sides are affine, else None."""
    lhs, rel, rhs = constraint.lhs, constraint.relation, constraint.rhs
    if not _is_ball(lhs, rel, rhs):
        return None
    norm, radius = (lhs, rhs) if rel == "<=" else (rhs, lhs)
    assert isinstance(norm, ir.Norm)
    names = {v.name for v in variables}
    parts = (normalize(radius), normalize(norm.arg))
    try:
        if any(ir.depends_on(jacobian(e, v), names) for e in parts for v in variables):
            return None
    except NotDifferentiable:
        return None
    return parts


def conic_plan(dual: DualProblem) -> Plan:
    """The conic plan, or a DualizeError saying what is beyond it."""
    if any(v.symbol.shape.cols != 1 and v.symbol.shape.rows != v.symbol.shape.cols
           for v in dual.variables):
        raise DualizeError("cannot generate a solver: the dual has a non-square matrix "
                           "multiplier, beyond the conic route", 2)
    if any(v.symbol.shape.cols != 1 for v in dual.variables):
        return _matrix_plan(dual)
    sign = ir.Number(sympy.Integer(-1 if dual.sense == "maximize" else 1))
    objective = normalize(ir.Scale(sign, dual.objective))
    variables = tuple(v.symbol for v in dual.variables)
    names = {v.name for v in dual.variables}
    gradients = tuple(differentiate(objective, v, "the dual objective") for v in variables)
    hessian = hessian_blocks(gradients, variables)
    if hessian is None or any(ir.depends_on(b, names) for row in hessian for b in row):
        raise DualizeError("cannot generate a solver: a dual with a semidefinite constraint "
                           "needs a linear or quadratic objective for the conic route", 2)
    bounds = [b for v in dual.variables for b in _sign_bounds(v)]
    general, cones, balls = [], [], []
    for constraint in dual.constraints:
        if constraint.relation in ("succeq", "preceq"):
            cones.append(_psd_side(constraint.lhs, constraint.relation, constraint.rhs))
            continue
        ball = _ball(constraint, variables)
        if ball is not None:
            balls.append(ball)
            continue
        for part in expand_ball(constraint):
            bound = as_bound(part, names)
            if bound:
                bounds.extend(bound)
            else:
                general.append(general_constraint(part, variables))
    if not all(g.affine for g in general):
        raise DualizeError("cannot generate a solver: a dual with a semidefinite constraint "
                           "and a nonlinear constraint is beyond the conic route", 2)
    return Plan("conic", REASON if cones else BALL_REASON, objective, gradients,
                tuple(bounds), tuple(general), hessian=hessian, constant_hessian=True,
                cones=tuple(cones), balls=tuple(balls))


def _matrix_plan(dual: DualProblem) -> Plan:
    """A dual over a matrix multiplier (the max-eigenvalue kind): the objective and the
    constraints must be affine, which the module checks numerically while it reads
    their coefficients off at unit vectors (no symbolic derivative of a matrix)."""
    sign = ir.Number(sympy.Integer(-1 if dual.sense == "maximize" else 1))
    objective = normalize(ir.Scale(sign, dual.objective))
    bounds = [b for v in dual.variables if v.symbol.shape.cols == 1 for b in _sign_bounds(v)]
    cones = [v.symbol for v in dual.variables if v.set == "psd"]
    general = []
    minus = ir.Number(sympy.Integer(-1))
    for constraint in dual.constraints:
        lhs, rel, rhs = constraint.lhs, constraint.relation, constraint.rhs
        if rel in ("succeq", "preceq"):
            cones.append(_psd_side(lhs, rel, rhs))
        elif rel in ("<=", ">=", "=", "=="):
            first, second = (rhs, lhs) if rel == ">=" else (lhs, rhs)
            function = normalize(ir.Add((first, ir.Scale(minus, second))))
            general.append(General(function, "=" if rel in ("=", "==") else "<=", (), True))
        else:
            raise DualizeError("cannot generate a solver: a set-membership constraint of "
                               "the dual", 2)
    return Plan("conic", REASON + "; the matrix multiplier's entries stacked in z", objective,
                (), tuple(bounds), tuple(general), cones=tuple(cones))


def _sign_bounds(v: DualVariable) -> list[Bound]:
    if v.set == "nonneg":
        return [Bound(v.name, "lo", zero())]
    if v.set == "nonpos":
        return [Bound(v.name, "hi", zero())]
    return []


def _psd_side(lhs: ir.Expr, relation: str, rhs: ir.Expr) -> ir.Expr:
    """The matrix that must be positive semidefinite: lhs - rhs, or rhs - lhs for preceq."""
    minus = ir.Number(sympy.Integer(-1))
    if relation == "succeq":
        return normalize(ir.Add((lhs, ir.Scale(minus, rhs))))
    return normalize(ir.Add((rhs, ir.Scale(minus, lhs))))
