"""How a dual problem will be solved: bounds, remaining constraints, the method.

The method follows the dual's structure, the reason a dual is worth solving:
a linear dual goes to an LP solver; a dual whose only constraints are bounds
(nonnegative multipliers, boxes left by eliminated slacks) to L-BFGS-B with
the analytic gradient; a smooth dual with bounds and linear constraints (the
soft-margin, entropy and barrier kinds) to a primal-dual interior-point method
with Mehrotra's predictor-corrector (J. Nocedal and S. Wright, Numerical
Optimization, 2nd ed., 2006, sections 16.6, 14.2 and 19.2) on the symbolic
Hessian, factored as a low-rank Gram matrix when it is a constant one; a dual
whose Hessian has no rule here, with bounds and linear equalities, to an
augmented Lagrangian (same book, section 17.4) whose inner problems on the
bounds go to the spectral projected gradient method (E. Birgin, J. Martinez,
M. Raydan, SIAM J. Optim., 2000); anything else smooth to SLSQP with analytic
Jacobians.  Max, min, absolute values and polyhedral norms of the multipliers
are first replaced by epigraph variables (``solver_lift``), so a
piecewise-linear dual becomes a linear program.  A dual whose max and min come
only from minimizing over a box where the Lagrangian is strictly convex (the
engine's ``strictly_convex_boxes``) is continuously differentiable all the same
(Danskin's theorem; D. Bertsekas, Nonlinear Programming, 2nd ed., 1999, Prop.
B.25): its max and min are differentiated piece by piece instead of lifted, and
it goes to the gradient methods above, never to Newton steps.  A semidefinite
dual needs a conic solver, which the generated module says instead of guessing.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Literal

import sympy

from dualize.duality.result import DualConstraint, DualProblem
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.solvergen.calculus import NotDifferentiable, gradient, jacobian
from dualize.solvergen.ir_rewrite import normalize
from dualize.solvergen.solver_lift import Lift, epigraph_lift, known_sign

Method = Literal["linprog", "lbfgsb", "lbfgsb_c1", "interior", "augmented", "slsqp", "conic"]


@dataclass(frozen=True)
class Bound:
    """``variable >= value`` (side ``lo``) or ``variable <= value`` (side ``hi``)."""

    variable: str
    side: Literal["lo", "hi"]
    value: ir.Expr


@dataclass(frozen=True)
class General:
    """A constraint ``function <= 0`` or ``function = 0`` with its Jacobian blocks."""

    function: ir.Expr
    relation: Literal["<=", "="]
    jacobians: tuple[ir.Expr, ...]
    affine: bool


@dataclass(frozen=True)
class Plan:
    method: Method
    reason: str
    objective: ir.Expr
    gradients: tuple[ir.Expr, ...]
    bounds: tuple[Bound, ...]
    constraints: tuple[General, ...]
    auxiliary: tuple[ir.Symbol, ...] = ()
    """Epigraph variables of the lift; they follow the multipliers and are never reported."""
    hessian: tuple[tuple[ir.Expr, ...], ...] | None = None
    constant_hessian: bool = False
    cones: tuple[ir.Expr, ...] = ()
    """Matrices that must be positive semidefinite (affine in the multipliers)."""
    balls: tuple[tuple[ir.Expr, ir.Expr], ...] = ()
    """(radius, argument) of each 2-norm ball ||argument|| <= radius, both affine in the
    multipliers: a second-order cone of the conic method."""


def _multipliers(dual: DualProblem) -> tuple[ir.Symbol, ...]:
    return tuple(v.symbol for v in dual.variables)


def is_conic(dual: DualProblem) -> bool:
    """A semidefinite constraint or a matrix multiplier: beyond smooth solvers."""
    if any(v.set in ("psd", "symmetric") for v in dual.variables):
        return True
    if any(not (v.symbol.shape.cols == 1) for v in dual.variables):
        return True
    return any(c.relation in ("succeq", "preceq") for c in dual.constraints)


def make_plan(dual: DualProblem) -> Plan:
    """The plan for a closed-form, non-conic dual; raises DualizeError when none fits."""
    sign = ir.Number(sympy.Integer(-1 if dual.sense == "maximize" else 1))
    objective = normalize(ir.Scale(sign, dual.objective))
    parts = [part for constraint in dual.constraints for part in expand_ball(constraint)]
    smooth = bool(dual.strictly_convex_boxes)  # differentiated piece by piece, not lifted
    lift = epigraph_lift(zero() if smooth else objective, parts, {v.name for v in dual.variables})
    variables = _multipliers(dual) + lift.auxiliary
    names = {v.name for v in variables}
    objective = objective if smooth else normalize(lift.objective)
    gradients = tuple(differentiate(objective, v, "the dual objective", smooth)
                      for v in variables)
    bounds = [Bound(v.name, "lo", zero()) for v in dual.variables if v.set == "nonneg"]
    bounds += [Bound(v.name, "hi", zero()) for v in dual.variables if v.set == "nonpos"]
    general: list[General] = []
    for part in lift.parts:
        bound = as_bound(part, names)
        if bound:
            bounds.extend(bound)
        else:
            general.append(general_constraint(part, variables))
    linear = not any(ir.depends_on(g, names) for g in gradients)
    plan = _choose(objective, gradients, tuple(bounds), tuple(general), linear)
    if smooth:  # C^1 but not C^2: no Newton steps on a Hessian with jumps
        plan = _smooth(plan, dual)
    elif plan.method in ("augmented", "slsqp", "lbfgsb") and all(g.affine for g in general):
        plan = _with_hessian(plan, variables, names)
    if plan.method == "lbfgsb" and matrix_valued(objective, names):
        plan = replace(plan, method="lbfgsb_c1", reason=plan.reason + ", stopped by the "
                       "projected gradient rather than by the decrease of the objective: a "
                       "matrix-valued term in the multipliers (the entropic transport kind) "
                       "makes the gradient the primal residual, row and column sums, which "
                       "the certificate measures entry by entry")
    return _lifted(plan, lift) if lift.auxiliary else plan


def matrix_valued(expr: ir.Expr, names: set[str]) -> bool:
    """Whether a matrix-valued part of ``expr`` (neither scalar nor vector) depends on
    ``names``: an outer product of the multipliers, or a function of one."""
    return any(n.shape.rows != 1 and n.shape.cols != 1 and ir.depends_on(n, names)
               for n in ir.walk(expr))


def _smooth(plan: Plan, dual: DualProblem) -> Plan:
    """The plan of a dual smooth by strictly convex boxes: its reason says so, and bounds
    alone go to L-BFGS-B stopping on the projected gradient (``lbfgsb_c1``)."""
    boxes = ", ".join(dual.strictly_convex_boxes)
    reason = (f"the max and min of the multipliers come from minimizing the Lagrangian over "
              f"the box of {boxes}, where it is strictly convex: the minimizer is unique, so "
              "the dual function is continuously differentiable (Danskin's theorem) and its "
              "gradient is taken piece by piece; ")
    if plan.method == "lbfgsb":
        return replace(plan, method="lbfgsb_c1", reason=reason + "the only constraints are "
                       "bounds on the multipliers: L-BFGS-B with that gradient, stopped by "
                       "the projected gradient rather than by the decrease of the objective")
    return replace(plan, reason=reason + plan.reason)


def _with_hessian(plan: Plan, variables: tuple[ir.Symbol, ...], names: set[str]) -> Plan:
    """The plan moved to the interior-point method when the Hessian has a rule."""
    hessian = hessian_blocks(plan.gradients, variables)
    constant = hessian is not None and not any(
        ir.depends_on(block, names) for row in hessian for block in row)
    # Bounds only: L-BFGS-B stays for a nonquadratic dual; a quadratic one gets Newton
    # steps, whose accuracy a certificate at 1e-6 needs.
    if hessian is None or (plan.method == "lbfgsb" and not constant):
        return plan
    kind = "a quadratic" if constant else "a smooth convex"
    reason = f"{kind} objective with bounds and linear constraints: a primal-dual " \
        "interior-point method (Mehrotra predictor-corrector) on the analytic Hessian"
    if constant:
        reason += ", factored as a low-rank Gram matrix when it is one"
    return replace(plan, method="interior", reason=reason, hessian=hessian,
                   constant_hessian=constant)


def hessian_blocks(
    gradients: tuple[ir.Expr, ...], variables: tuple[ir.Symbol, ...]
) -> tuple[tuple[ir.Expr, ...], ...] | None:
    """The Hessian blocks d(gradient_i)/d(variable_j), or None where one has no rule."""
    try:
        return tuple(tuple(jacobian(g, v) for v in variables) for g in gradients)
    except NotDifferentiable:
        return None


def _lifted(plan: Plan, lift: Lift) -> Plan:
    """The plan with the epigraph variables and a reason that says why they are there."""
    what = " and ".join(lift.lifted)
    if plan.method == "linprog":
        reason = f"the dual is a linear program after epigraph variables for {what} " \
            "(piecewise linear, not smooth): HiGHS"
    else:
        reason = f"after epigraph variables for {what} (piecewise linear, not smooth), " \
            + plan.reason
    return replace(plan, reason=reason, auxiliary=lift.auxiliary)


def zero() -> ir.Expr:
    return ir.Number(sympy.Integer(0))


def differentiate(expr: ir.Expr, var: ir.Symbol, what: str, piecewise: bool = False) -> ir.Expr:
    try:
        return gradient(expr, var, piecewise)
    except NotDifferentiable as err:
        raise DualizeError(
            f"cannot generate a solver: {what} is not smooth in {var.name} ({err}); "
            "the generator handles smooth duals and linear programs", 2
        ) from err


def expand_ball(constraint: DualConstraint) -> list[tuple[ir.Expr, str, ir.Expr]]:
    """Rewrite norm balls into smooth or linear pieces: ||u||_inf <= t is -t <= u <= t."""
    lhs, rel, rhs = constraint.lhs, constraint.relation, constraint.rhs
    if rel == "in":
        raise DualizeError("cannot generate a solver: a set-membership constraint of the dual", 2)
    if rel == ">=" and isinstance(rhs, ir.Norm):
        lhs, rel, rhs = rhs, "<=", lhs
    if rel == "<=" and isinstance(lhs, ir.Norm):
        return _norm_ball(lhs, rhs)
    return [(lhs, rel, rhs)]


def _norm_ball(norm: ir.Norm, radius: ir.Expr) -> list[tuple[ir.Expr, str, ir.Expr]]:
    arg = norm.arg
    if norm.p == "inf":
        wide = ir.Broadcast(radius, arg.shape)
        return [(arg, "<=", wide), (ir.Scale(ir.Number(sympy.Integer(-1)), arg), "<=", wide)]
    if norm.p == "2" and _known_nonneg(radius):
        square = ir.MatMul((ir.Transpose(arg), arg))
        return [(square, "<=", ir.Power(radius, sympy.Integer(2)))]
    return [(norm, "<=", radius)]  # the 2-norm as it is; the 1-norm for the lift


def _known_nonneg(expr: ir.Expr) -> bool:
    return known_sign(expr) == 1


def as_bound(part: tuple[ir.Expr, str, ir.Expr], names: set[str]) -> list[Bound] | None:
    lhs, rel, rhs = part
    for var, other, side in ((lhs, rhs, rel), (rhs, lhs, _flip(rel))):
        if isinstance(var, ir.Symbol) and var.name in names and not ir.depends_on(other, names):
            if not (other.shape.is_scalar or other.shape == var.shape):
                continue
            value = other.arg if isinstance(other, ir.Broadcast) else other
            sides = {"<=": ["hi"], ">=": ["lo"], "=": ["lo", "hi"]}[side]
            return [Bound(var.name, s, value) for s in sides]  # type: ignore[arg-type]
    return None


def _flip(rel: str) -> str:
    return {"<=": ">=", ">=": "<=", "=": "="}[rel]


def general_constraint(part: tuple[ir.Expr, str, ir.Expr],
                       variables: tuple[ir.Symbol, ...]) -> General:
    lhs, rel, rhs = part
    minus = ir.Number(sympy.Integer(-1))
    if rel == ">=":
        function = ir.Add((rhs, ir.Scale(minus, lhs)))
    else:
        function = ir.Add((lhs, ir.Scale(minus, rhs)))
    function = normalize(function)
    try:
        jacs = tuple(jacobian(function, v) for v in variables)
    except NotDifferentiable as err:
        raise DualizeError(
            f"cannot generate a solver: a dual constraint is not smooth ({err})", 2
        ) from err
    names = {v.name for v in variables}
    affine = not any(ir.depends_on(j, names) for j in jacs)
    return General(function, "=" if rel == "=" else "<=", jacs, affine)


def _choose(
    objective: ir.Expr,
    gradients: tuple[ir.Expr, ...],
    bounds: tuple[Bound, ...],
    general: tuple[General, ...],
    linear: bool,
) -> Plan:
    affine = all(g.affine for g in general)
    if linear and affine:
        method: Method = "linprog"
        reason = "the dual objective and constraints are linear: a linear program (HiGHS)"
    elif not general:
        method = "lbfgsb"
        reason = "the only constraints are bounds on the multipliers: L-BFGS-B with the " \
            "analytic gradient"
    elif affine and all(g.relation == "=" for g in general):
        method = "augmented"
        reason = "bounds and linear equalities: an augmented Lagrangian (method of " \
            "multipliers) whose inner problems on the bounds are solved by the spectral " \
            "projected gradient method"
    else:
        method = "slsqp"
        reason = "general smooth constraints: SLSQP with analytic Jacobians"
    return Plan(method, reason, objective, gradients, bounds, general)
