"""Primal variables read off the conic method's multipliers of the dual's stationarity rows.

A primal variable x that enters the Lagrangian linearly, L = h(z) + g(z)'x, leaves the
dual the equality g(z) = 0 (its coefficient vanishes) and nothing else; the dual of
that dual is the primal, with x the multiplier of that equality (S. Boyd and
L. Vandenberghe, Convex Optimization, 2004, sections 5.2.5, 5.7 and 5.9): at the
optimum z* maximizes h(z) + x*'g(z) over the dual's other constraints.  The
generated module minimizes F = -h and Clarabel, on ``A z + s = b, s in K``, returns
y with grad F + A'y = 0 plus the cone terms (P. Goulart and Y. Chen, Clarabel, 2024;
its documented standard form, and checked numerically in the tests).  A row printed
as c(z) = s g(z) (s = +1 or -1) has A = s dg/dz, so x* = -s y.

The rule applies only where every link is shown: the primal is minimized and its dual
maximized; the derivation's step for x states grad_x L = g; exactly one equality of
the plan has c = +g or c = -g after the dual's substitutions of multipliers, proved
by expansion (``normal.equal``), not sampled; the method is the conic one.  Elsewhere
the variable is left to the other rules, and the module certifies whatever it finds
by the duality gap and the constraint violation.
"""

from __future__ import annotations

from dualize.duality import build as b
from dualize.duality.normal import equal
from dualize.duality.result import Derivation, Head
from dualize.model import expr as ir
from dualize.solvergen.solver_plan import Plan

TEXT = "the conic method's multiplier of the dual's equality constraint that is its " \
    "stationarity condition (the dual of the dual is the primal), with the sign that the " \
    "row's orientation and Clarabel's convention give"


def stationary_rows(derivation: Derivation, plan: Plan,
                    missing: dict[str, str]) -> dict[str, tuple[int, float]]:
    """For each variable in ``missing`` the rule covers: (index of its equality among the
    plan's general constraints, factor taking the multiplier to the variable)."""
    if plan.method != "conic" or derivation.problem.sense != "minimize" \
            or derivation.dual.sense != "maximize":
        return {}
    found = {}
    for var in derivation.problem.variables:
        if var.name not in missing or var.domain.kind != "free" or var.symbol.shape.cols != 1:
            continue
        coefficient = _coefficient(derivation, var.name)
        if coefficient is None:
            continue
        row = _row(plan, coefficient)
        if row is not None:
            index, sign = row
            found[var.name] = (index, -sign)
    return found


def _coefficient(derivation: Derivation, name: str) -> ir.Expr | None:
    """grad_x L as the derivation states it, with the multipliers it later substituted."""
    coefficient = None
    for step in derivation.steps:
        if step.rule == "minimize-affine" and step.block == name and step.equations:
            head = step.equations[0].lhs
            if isinstance(head, Head) and head.name == f"grad_{name} L":
                coefficient = step.equations[0].rhs
        elif step.rule == "substitute-multiplier" and coefficient is not None:
            for eq in step.equations:
                if isinstance(eq.lhs, ir.Symbol):
                    coefficient = ir.substitute(coefficient, {eq.lhs: eq.rhs})
    return coefficient


def _row(plan: Plan, coefficient: ir.Expr) -> tuple[int, float] | None:
    """The one equality of the plan equal to +coefficient or -coefficient, with that sign."""
    hits = []
    for index, general in enumerate(plan.constraints):
        if general.relation != "=" or general.function.shape != coefficient.shape:
            continue
        if equal(general.function, coefficient):
            hits.append((index, 1.0))
        elif equal(general.function, b.neg(coefficient)):
            hits.append((index, -1.0))
    return hits[0] if len(hits) == 1 else None
