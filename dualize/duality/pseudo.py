"""Quadratics whose Hessian is known positive semidefinite but not definite.

A singular or unknown-rank Hessian (a kernel or covariance matrix declared in
S^n_+, a Gram form X'X with more columns than rows, a diagonal of a
nonnegative vector) has no inverse, but the infimum of the quadratic is still
known in closed form (S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
appendix A.5.4, minimizing a quadratic with the pseudo-inverse; from memory):

    inf_x 1/2 x'Hx + g'x + r = r - 1/2 g'H^+ g   if g lies in range(H),
                             = -infinity          otherwise.

Papers state the range condition with a witness: g = -H v for some v; then
g'H^+ g = v'H H^+ H v = v'H v, so the value is r - 1/2 v'H v, concave in v for
data H, and x = v minimizes the Lagrangian.  When g is visibly H times
something (g = H w, the kernel machine's g = -K diag(y) alpha) the condition
holds by construction and no witness is needed: the value is r - 1/2 w'H w
and x = -w.  That is also how H H^-1 H = H is simplified away.
"""

from __future__ import annotations

import sympy

from dualize.duality import build as b
from dualize.duality.normal import Term, equal, expand, rebuild, tidy
from dualize.duality.result import DualConstraint, DualVariable, Equation, Head, Recovery, Step
from dualize.duality.scalar import Scope, to_sympy
from dualize.model.expr import Divide, Expr, Symbol, symbols_of

HALF = sympy.Rational(1, 2)


def factor_through(H: Expr, g: Expr) -> Expr | None:
    """w with g = H w proved by the canonical form, when H is one product term and
    every term of g starts with H's product; None otherwise."""
    h_terms = expand(H)
    if len(h_terms) != 1 or not h_terms[0].chain:
        return None
    head = h_terms[0]
    k = len(head.chain)
    rest: list[Term] = []
    for t in expand(g):
        if t.chain[:k] != head.chain or len(t.chain) <= k:
            return None
        rest.append(Term(t.coef / head.coef, t.scalars, t.chain[k:]))
    if not rest:
        return None
    w = rebuild(rest, g.shape)
    M = rebuild([Term(head.coef, (), head.chain)], H.shape)
    if not equal(b.mul(M, w), g):
        return None
    if head.scalars:  # H = h M with a positive scalar h (lam K): g = M w = H (w / h)
        h = rebuild([Term(sympy.Integer(1), head.scalars, ())], b.SCALAR)
        if not data_only(h) or not to_sympy(h, Scope()).is_positive:
            return None
        w = b.scale(b.power(h, sympy.Integer(-1)), w)
    return w


def data_only(e: Expr) -> bool:
    """Whether ``e`` holds data and numbers only (no multiplier, no variable)."""
    return all(s.role == "data" for s in symbols_of(e))


def factored_value(x: Symbol, H: Expr, w: Expr, g: Expr, r: Expr,
                   kind: str) -> tuple[Expr, Step, Recovery]:
    """inf_x 1/2 x'Hx + (H w)'x + r = r - 1/2 w'H w at x = -w, for H psd.

    The gradient H x + H w vanishes at x = -w, and a convex quadratic is least
    where its gradient vanishes; every other minimizer differs by a null-space
    direction of H.
    """
    # w'H w = w'g since H w = g: the shorter product keeps scalars such as 1/lam whole
    value = tidy(b.sub(r, b.scale(b.num(HALF), b.mul(b.transpose(g), w))))
    xstar = tidy(b.neg(w))
    why = ("positive definite" if kind == "pd" else
           "positive semidefinite (possibly singular)")
    text = (f"The Lagrangian is a convex quadratic in ${x.name}$ with Hessian $#H$ {why}, "
            "and its linear coefficient is $#Hw$ for the $w$ shown: the gradient vanishes at "
            f"$#at$, so the block contributes $#value$, with no inverse.")
    said = (("#H", H), ("#Hw", b.mul(H, Symbol("w", "auxiliary", w.shape))),
            ("#at", Equation(x, "=", xstar)), ("#value", value))
    note = _kernel_note(x, H, w)
    if kind != "pd":
        note = (note + "; " if note else "") + (f"every ${x.name}$ that differs from the point "
                                                "above by a null-space direction of the Hessian "
                                                "minimizes the Lagrangian as well")
    step = Step("minimize-quadratic-factored", text,
                (Equation(Head("w"), "=", tidy(w)), Equation(x, "=", xstar)), block=x.name,
                formulas=said)
    return value, step, Recovery(x.name, xstar, note)


def scaled_data(H: Expr) -> tuple[Expr, Expr] | None:
    """(h, M) when H = h M with M one semidefinite data matrix and h a scalar that
    depends on the multipliers (2 lambda S for a risk constraint x'Sx <= r)."""
    terms = expand(H)
    if not terms or any(len(t.chain) != 1 for t in terms):
        return None
    M = terms[0].chain[0]
    if any(t.chain[0] != M for t in terms):
        return None
    if not (isinstance(M, Symbol) and M.role == "data" and {"psd", "pd"} & M.facts):
        return None
    h = rebuild([Term(t.coef, t.scalars, ()) for t in terms], b.SCALAR)
    return (h, M) if not data_only(h) else None


def scaled_witness(x: Symbol, h: Expr, M: Expr, g: Expr, r: Expr) -> tuple[
        Expr, DualConstraint, DualVariable, Step, Recovery]:
    """inf_x 1/2 h x'Mx + g'x + r, h >= 0 a multiplier expression, M semidefinite data.

    For h > 0 it is finite iff g lies in range(M): g = -M v for some v, and then the
    minimizer is x = v/h with value r - v'M v/(2h), the quadratic-over-linear term,
    jointly concave in (v, h) (Boyd and Vandenberghe, 2004, section 3.1.5, from memory).
    At h = 0 the infimum is r if g = 0 (v = 0) and minus infinity otherwise, the limit of
    the formula, so the dual keeps the closure h >= 0.
    """
    v = Symbol(f"v_{x.name}", "multiplier", x.shape)
    vMv = b.mul(b.transpose(v), M, v)
    value = tidy(b.sub(r, Divide(vMv, tidy(b.scale(b.num(2), h)))))
    lhs = tidy(b.add(b.mul(M, v), g))
    c = DualConstraint(lhs, "=", b.zeros(lhs.shape),
                       f"the infimum over {x.name} is finite only where its linear coefficient "
                       f"lies in the range of {getattr(M, 'name', 'the data matrix')}: "
                       "g = -M v for some v")
    var = DualVariable(v, "free", f"range witness of the quadratic in {x.name}")
    xstar = tidy(b.scale(b.power(h, sympy.Integer(-1)), v))
    cond = Equation(tidy(g), "=", tidy(b.neg(b.mul(M, v))))
    text = (f"The Lagrangian is a convex quadratic in ${x.name}$ whose Hessian is the "
            "nonnegative multiplier expression $#h$ times the semidefinite data $#M$: where "
            "$#cond$ its infimum is $#value$, attained at $#at$ (a quadratic-over-linear "
            "term, jointly concave), and minus infinity where the linear coefficient leaves "
            "the range of the data.")
    step = Step("minimize-quadratic-scaled-data", text, (cond, Equation(x, "=", xstar)),
                block=x.name, formulas=(("#h", tidy(h)), ("#M", M), ("#cond", cond),
                                        ("#value", value), ("#at", Equation(x, "=", xstar))))
    rec = Recovery(x.name, xstar, "where h = 0 the quadratic term vanishes and "
                   f"{x.name} follows from complementary slackness instead")
    return value, c, var, step, rec


def scaled_definite(x: Symbol, h: Expr, M: Expr, g: Expr, r: Expr) -> tuple[
        Expr, Step, Recovery]:
    """inf_x 1/2 h x'Mx + g'x + r with M positive definite data and h >= 0 a multiplier
    expression: r - g'M^-1 g/(2h), attained at x = -M^-1 g/h for h > 0 (the closure at
    h = 0 as for the scalar rule)."""
    Minv = b.inverse(M)
    value = tidy(b.sub(r, Divide(b.mul(b.transpose(g), Minv, g), tidy(b.scale(b.num(2), h)))))
    xstar = tidy(b.neg(b.scale(b.power(h, sympy.Integer(-1)), b.mul(Minv, g))))
    text = (f"The Lagrangian is a convex quadratic in ${x.name}$ whose Hessian is the "
            "nonnegative multiplier expression $#h$ times the positive definite data $#M$: "
            "where that expression is positive the minimizer is $#at$ and the infimum "
            "$#value$, a quadratic-over-linear term (the dual keeps the closure where the "
            "expression is zero).")
    step = Step("minimize-quadratic-scaled-data", text, (Equation(x, "=", xstar),),
                block=x.name, formulas=(("#h", tidy(h)), ("#M", M), ("#value", value),
                                        ("#at", Equation(x, "=", xstar))))
    return value, step, Recovery(x.name, xstar)


def _kernel_note(x: Symbol, H: Expr, w: Expr) -> str:
    """The kernel-expansion reading when the Hessian is a scalar times one declared psd
    data matrix (K, or lam K)."""
    terms = expand(H)
    if len(terms) != 1 or len(terms[0].chain) != 1:
        return ""
    H = terms[0].chain[0]
    if not (isinstance(H, Symbol) and H.role == "data" and {"psd", "pd"} & H.facts):
        return ""
    return (f"the data enter only through the matrix {H.name} (a kernel or Gram matrix), so "
            f"the fitted values {H.name} {x.name} are the kernel expansion sum_i "
            f"{x.name}_i k(t_i, t): a prediction at a new point t needs only the kernel values "
            "k(t_i, t)")


def range_witness(x: Symbol, H: Expr, g: Expr, r: Expr) -> tuple[Expr, DualConstraint,
                                                                 DualVariable, Step, Recovery]:
    """inf_x 1/2 x'Hx + g'x + r for data H psd of unknown rank and g not visibly in range(H).

    Finite iff g = -H v for some v, and then equal to r - 1/2 v'H v, attained at
    x = v; the witness v joins the dual as a free variable.
    """
    v = Symbol(f"v_{x.name}", "multiplier", x.shape)
    value = tidy(b.sub(r, b.scale(b.num(HALF), b.mul(b.transpose(v), H, v))))
    lhs = tidy(b.add(b.mul(H, v), g))
    c = DualConstraint(lhs, "=", b.zeros(lhs.shape),
                       f"the infimum over {x.name} is finite only where its linear coefficient "
                       f"lies in the range of the Hessian: g = -H v for some v")
    text = (f"The Lagrangian is a convex quadratic in ${x.name}$ whose Hessian $#H$ is "
            "positive semidefinite, possibly singular: its infimum is finite only when the "
            "linear coefficient $#g$ lies in the range of the Hessian. Writing that condition "
            f"with a witness ${v.name}$ as shown, the gradient vanishes at $#at$ and the block "
            "contributes $#value$.")
    said = (("#H", H), ("#g", tidy(g)), ("#at", Equation(x, "=", v)), ("#value", value))
    var = DualVariable(v, "free", f"range witness of the quadratic in {x.name}")
    step = Step("minimize-quadratic-range", text,
                (Equation(tidy(g), "=", tidy(b.neg(b.mul(H, v)))), Equation(x, "=", v)),
                block=x.name, formulas=said)
    rec = Recovery(x.name, v, f"every ${x.name}$ that differs from ${v.name}$ by a null-space "
                   "direction of the Hessian minimizes the "
                   "Lagrangian; where H is singular, choose d so that the primal constraints and "
                   "complementary slackness hold")
    return value, c, var, step, rec
