"""The KKT conditions of a problem, in the conventions of the derivation.

Stationarity comes from each block's rule (the gradient of the Lagrangian in
that block, or the subgradient condition of a building block); primal
feasibility restates the constraints; dual feasibility the multipliers' sets;
complementary slackness is y .* f(x) = 0 for inequalities and trace(Z F) = 0
for matrix inequalities (S. Boyd and L. Vandenberghe, Convex Optimization,
2004, section 5.5.3).
"""

from __future__ import annotations

from dualize.duality import build as b
from dualize.duality.blocks import Outcome
from dualize.duality.normal import tidy
from dualize.duality.result import Condition, Equation
from dualize.model.expr import Trace
from dualize.model.problem import Problem


def conditions(problem: Problem, outcomes: dict[str, Outcome]) -> tuple[Condition, ...]:
    out: list[Condition] = []
    for name, o in outcomes.items():
        if o.gradient is not None:
            out.append(Condition("stationarity", Equation(tidy(o.gradient), "=",
                                                          b.zeros(o.gradient.shape)),
                                 f"gradient of the Lagrangian in ${name}$"))
        elif o.smooth and not o.inner and not o.unbounded:
            out.append(Condition("stationarity", None,
                                 f"the gradient of the Lagrangian in ${name}$ vanishes"))
        elif not o.inner and not o.unbounded and name != "(coupled)":
            out.append(Condition("stationarity", None,
                                 f"$0$ is in the subdifferential of the Lagrangian in ${name}$"))
    for c in problem.constraints:
        out.append(Condition("primal feasibility", Equation(c.lhs, c.relation.relation,
                                                            c.rhs), c.label))
    for c in problem.constraints:
        y = c.multiplier
        if c.kind == "ineq":
            out.append(Condition("dual feasibility", Equation(y, ">=", b.zeros(y.shape)), c.label))
        elif c.kind == "psd":
            out.append(Condition("dual feasibility", Equation(y, "succeq", b.zeros(y.shape)),
                                 c.label))
    for c in problem.constraints:
        y = c.multiplier
        if c.kind == "ineq":
            product = b.hadamard(y, c.function) if not y.shape.is_scalar else b.mul_scalars(
                y, c.function)
            out.append(Condition("complementary slackness",
                                 Equation(product, "=", b.zeros(y.shape)), c.label))
        elif c.kind == "psd":
            out.append(Condition("complementary slackness",
                                 Equation(Trace(b.mul(y, c.function)), "=", b.num(0)), c.label))
    return tuple(out)
