"""Recovery of primal variables that minimizing the Lagrangian leaves undetermined.

A variable that enters the Lagrangian linearly once its building blocks are
split off (u = B x + d) is not fixed by minimizing over it, but two facts of
the optimum still pin it down:

* stationarity of each split variable gives u* as a function of the
  multipliers (u = z/2 for ||u||^2), so at the optimum B x + d = u*
  (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.5.5,
  from memory): a linear system the variable satisfies;
* the variable is the multiplier of the dual constraint its own coefficient
  produced (the dual of the dual is the primal): for a norm term c ||x||_p the
  ball ||s||_q <= c, where x is zero unless the ball is active and then
  s'x = c ||x||_p (entry by entry for p = 1: x_i = 0 where |s_i| < c).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from dualize.duality.result import Equation, Recovery
from dualize.model.expr import Expr, depends_on

_ALIGNED = {
    "1": "entry by entry, an entry of ${v}$ is zero where the matching entry of that "
         "coefficient is below the weight in magnitude, and has that entry's sign where it "
         "reaches the weight (the support of ${v}$ is where the ball constraint is active)",
    "2": "${v}$ is zero where the ball constraint is slack, and a nonnegative multiple of "
         "that coefficient where it is active",
    "inf": "where the ball constraint is active, the entries of ${v}$ at which that "
           "coefficient is nonzero have the largest magnitude, with the coefficient's sign",
}


def subgradient_note(name: str, atom: Any) -> str:
    """What the optimum says of a variable minimized against a nonsmooth building block."""
    if atom.kind == "norm":
        return (f"${name}$ is the multiplier of the dual's norm-ball constraint on the "
                f"negated coefficient of ${name}$ in the Lagrangian: "
                f"{_ALIGNED[atom.p].format(v=name)}; at the optimum that coefficient's inner "
                f"product with ${name}$ equals the weighted norm of ${name}$")
    return (f"${name}$ is a subgradient point of the building block: $0$ lies in the "
            f"subdifferential of the Lagrangian in ${name}$; recover it from the KKT conditions")


def with_split_relations(r: Recovery, aux_args: dict[str, Expr],
                         outcomes: dict[str, Any], aux_norms: dict[str, str]) -> Recovery:
    """``r`` with the stationarity relations B x + d = u* of the splits in its variable,
    when no formula determines it."""
    if r.formula is not None:
        return r
    relations, balls = [], []
    for name in sorted(aux_args):
        arg, out = aux_args[name], outcomes.get(name)
        if not depends_on(arg, {r.variable}):
            continue
        rec = getattr(out, "recovery", None)
        if rec is not None and rec.formula is not None:
            relations.append(Equation(arg, "=", rec.formula))
        elif aux_norms.get(name):
            balls.append(aux_norms[name])
    if not relations and not balls:
        return r
    lead = r.note if "multiplier of the dual" in r.note else (
        f"{r.variable} enters the Lagrangian linearly once its building blocks are split off, "
        "so minimizing does not fix it; use complementary slackness on the active "
        "constraints")
    note = lead
    if relations:
        note += (f"; at the optimum {r.variable} also satisfies the stationarity of the split "
                 "variables (each split argument equals its minimizer at the optimal "
                 "multipliers)")
    for z in balls:
        note += (f"; the argument of the norm term split off with multiplier {z} is 0 where "
                 f"{z} lies strictly inside its dual-norm ball, and points along {z} (a "
                 "nonnegative multiple of it, for the 2-norm) where the ball is active")
    return replace(r, note=note, relations=tuple(relations))
