"""The relative entropy of two variables: a perspective, minimized jointly.

sum(u .* log(u ./ v)) with u, v >= 0 is the perspective v phi(u/v) of
phi(w) = w log w, jointly convex.  Its infimum against linear terms follows from
the conjugate of phi, which the engine derives (S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, sections 3.2.6 and 3.3, from memory): entry by
entry, with w = u/v,

    inf_{u, v > 0} c u log(u/v) + g u + h v
      = inf_{v > 0} v (inf_w [c w log w + g w] + h)
      = inf_{v > 0} v (h - phi_c*(-g))   with phi_c(w) = c w log w,

which is 0 when h >= phi_c*(-g) and minus infinity otherwise.  So the pair adds
nothing to the dual objective and the condition h >= phi_c*(-g) to its
constraints (h >= c exp(-g/c - 1) for the entropy).
"""

from __future__ import annotations

from dualize.duality import build as b
from dualize.duality.building_blocks import BuildingBlock
from dualize.duality.normal import Term, rebuild, tidy
from dualize.duality.result import DualConstraint, Equation, Recovery, Step
from dualize.model.expr import SCALAR, Apply, Divide, Expr, Hadamard, Symbol, walk
from dualize.model.problem import Domain, Variable

SIGNED = ("nonneg", "pos")


def relative_entropy_pair(term: Term, variables: dict[str, Variable]) -> tuple[
        Expr, Variable, Variable] | None:
    """(c, u, v) when ``term`` is c * sum(u .* log(u ./ v)) (or c * log(u ./ v)' u) with c
    data or a number and u, v two vector variables over nonnegative (or positive) vectors."""
    moving = [s for s in term.scalars if any(isinstance(n, Symbol) and n.role == "variable"
                                             for n in walk(s))]
    if term.chain or len(moving) != 1:
        return None
    for a, f in _factor_pairs(moving[0]):
        if not (isinstance(f, Apply) and f.func == "log" and isinstance(f.arg, Divide)):
            continue
        top, bottom = f.arg.left, f.arg.right
        if top != a or not isinstance(a, Symbol) or not isinstance(bottom, Symbol):
            continue
        u, v = variables.get(a.name), variables.get(bottom.name)
        if u is None or v is None or u.name == v.name:
            return None
        if u.domain.kind not in SIGNED or v.domain.kind not in SIGNED:
            return None
        rest = tuple(s for s in term.scalars if s is not moving[0])
        coef = rebuild([Term(term.coef, rest, ())], SCALAR)
        if any(isinstance(n, Symbol) and n.role != "data" for n in walk(coef)):
            return None
        return coef, u, v
    return None


def _factor_pairs(e: Expr) -> list[tuple[Expr, Expr]]:
    """The two factors of sum(a .* f) or a' f (either order)."""
    from dualize.duality.building_blocks import summed_argument
    from dualize.model.expr import MatMul, Transpose

    inner = summed_argument(e)
    if isinstance(inner, Hadamard):
        return [(inner.left, inner.right), (inner.right, inner.left)]
    if isinstance(e, MatMul) and len(e.factors) == 2 and isinstance(e.factors[0], Transpose):
        first, second = e.factors[0].arg, e.factors[1]
        return [(first, second), (second, first)]
    return []


def entropy_atom(coef: Expr, u: Symbol) -> BuildingBlock:
    """c * sum(u .* log(u)), the phi of the perspective, as a separable building block."""
    return BuildingBlock(coef, "separable", u, body=Hadamard(u, Apply("log", u)))


def pair_outcome(u: Symbol, v: Symbol, g: Expr, h: Expr, entries: Expr,
                 constraints: tuple[tuple[Expr, str, Expr], ...], statement: str,
                 formulas: tuple[tuple[str, object], ...] = ()
                 ) -> tuple[list[DualConstraint], list[Step], list[Recovery]]:
    """The dual's condition h >= phi*(-g) (plus phi*'s own domain), the step and recovery."""
    cond = tidy(b.sub(h, entries))
    out = [DualConstraint(cond, ">=", b.zeros(cond.shape),
                          f"the relative entropy of {u.name} and {v.name} is bounded below "
                          "against the linear terms only where this holds")]
    out += [DualConstraint(lhs, rel, rhs, "for the conjugate of w log w to be finite")  # type: ignore[arg-type]
            for lhs, rel, rhs in constraints]
    rel = b.sum_all(Hadamard(u, Apply("log", Divide(u, v))))
    shown = Equation(tidy(h), ">=", tidy(entries))
    text = (f"The relative entropy $#rel$ is the perspective of the entropy: with the ratio "
            f"of ${u.name}$ to ${v.name}$ as the new variable entry by entry, the infimum "
            f"over ${v.name}$ is 0 where $#cond$ and minus infinity elsewhere, because "
            f"{statement}.")
    step = Step("minimize-perspective", text, (shown,), block=u.name,
                formulas=formulas + (("#rel", rel), ("#cond", shown)))
    note = (f"{u.name} and {v.name} enter through their relative entropy and linearly, so "
            "minimizing does not fix them; at the optimum the ratio "
            f"{u.name}/{v.name} is the minimizer of phi(w) + g w entry by entry, and "
            f"{v.name} is zero wherever the condition on the multipliers is slack")
    rec = [Recovery(u.name, None, note), Recovery(v.name, None, note)]
    return out, [step], rec


def domain_of(v: Variable) -> Domain:
    return v.domain
