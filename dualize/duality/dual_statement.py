"""The dual as it is stated: its sense, its closing sentence, the recovery rewritten.

Kept apart from the engine (``engine``), which computes the dual: these read
a finished ``DualProblem`` and the recovery formulas and only restate them.
"""

from __future__ import annotations

from dualize.duality import build as b
from dualize.duality.normal import tidy
from dualize.duality.result import DualProblem, Equation, Recovery
from dualize.duality.simplify import simplify_scalar
from dualize.model.expr import Expr


def substituted(recovery: list[Recovery], fixed: dict[Expr, Expr]) -> list[Recovery]:
    """Recovery formulas and relations with the dual's substitutions carried out (a
    multiplier eliminated by the simplifier is written in terms of those kept)."""
    from dataclasses import replace

    from dualize.model.expr import substitute

    out = []
    for r in recovery:
        if r.formula is None:
            out.append(r)
            continue
        formula = r.formula
        for _ in range(len(fixed)):
            formula = substitute(formula, fixed)
        out.append(replace(r, formula=simplify_scalar(tidy(formula))))
    return [_relations_substituted(r, fixed) for r in out]


def _relations_substituted(r: Recovery, fixed: dict[Expr, Expr]) -> Recovery:
    from dataclasses import replace

    from dualize.model.expr import substitute

    if not r.relations:
        return r
    rels = []
    for eq in r.relations:
        rhs = eq.rhs
        for _ in range(len(fixed)):
            rhs = substitute(rhs, fixed)
        rels.append(Equation(eq.lhs, eq.relation, simplify_scalar(tidy(rhs))))
    return replace(r, relations=tuple(rels))


def as_minimization(dual: DualProblem) -> DualProblem:
    """The dual of a maximization, stated as the minimization it is."""
    from dataclasses import replace

    return replace(dual, sense="minimize", objective=tidy(b.neg(dual.objective)))


def dual_sentence(dual: DualProblem, sense: str = "minimize") -> str:
    """The last step's sentence: what the dual problem collects, or why it gives no bound."""
    if dual.unbounded:
        return ("The dual function is minus infinity for every choice of multipliers: the dual "
                "gives no bound (the primal problem is unbounded below or its Lagrangian is).")
    if dual.inner:
        names = ", ".join(v.name for v in dual.inner)
        return (f"The dual problem, with the infimum over {names} kept because no rule "
                "eliminates it in closed form.")
    text = "The dual problem collects the dual function and every condition for it to be finite."
    return text + " " + finiteness_sentence(dual, sense) if dual.constraints else text


def finiteness_sentence(dual: DualProblem, sense: str) -> str:
    """Where the dual function is finite, and what its infinite cases say of the primal.

    Outside the implicit constraints the infimum of the Lagrangian is minus infinity
    (plus infinity for the supremum of a maximization); by weak duality an unbounded
    dual proves the primal infeasible, and a dual with no feasible multiplier gives
    no bound: it says nothing of the primal unless strong duality holds, when d* =
    p* = -inf makes the primal unbounded (S. Boyd and L. Vandenberghe, Convex
    Optimization, 2004, sections 5.1.2 and 5.2.2, from memory; a problem with a
    duality gap may have an infeasible dual and a finite primal optimum).
    """
    if sense == "minimize":
        return ("Outside these conditions the dual function is minus infinity. The dual is "
                "unbounded above only if the primal is infeasible; if no multiplier "
                "satisfies the conditions, the dual gives no bound, and where strong "
                "duality holds the primal is then unbounded below.")
    return ("Outside these conditions the dual function is plus infinity. The dual is "
            "unbounded below only if the primal is infeasible; if no multiplier satisfies "
            "the conditions, the dual gives no bound, and where strong duality holds the "
            "primal is then unbounded above.")


def derivation_notes(cut: list[str], split: bool, sense: str) -> tuple[str, ...]:
    """The derivation's notes: steps cut by the time limit, auxiliary variables
    introduced (``split``), and what a maximization's dual bounds."""
    notes = [f"Time limit: {step}." for step in cut]
    if split:
        notes.append("Auxiliary variables were introduced, each equal to the affine argument of a "
                     "building block; the dual is that of this equivalent reformulation, with the "
                     "same optimal value and the same strong-duality conditions.")
    if sense == "maximize":
        notes.append("For a maximization the dual is a minimization whose value bounds the "
                     "primal optimum from above.")
    return tuple(notes)
