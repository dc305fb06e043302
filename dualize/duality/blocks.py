"""Minimizing the Lagrangian over one block of primal variables.

Each rule is one function with its mathematical statement in the docstring.
A rule returns an ``Outcome``: the block's contribution to the dual objective,
the constraints under which the infimum is finite, how the block is recovered,
and the recorded steps.  When no rule applies the outcome says so (``inner``),
and the engine keeps the infimum instead of guessing.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import sympy

from dualize.duality import build as b
from dualize.duality import pseudo
from dualize.duality.definite import definiteness
from dualize.duality.linear import Affine, Quadratic, hessian
from dualize.duality.normal import tidy
from dualize.duality.result import (
    DualConstraint,
    DualVariable,
    Equation,
    Head,
    Recovery,
    Step,
)
from dualize.model.expr import Block, Divide, Expr, Norm, Symbol, depends_on, symbols_of
from dualize.model.problem import Domain


@dataclass
class Outcome:
    value: Expr
    constraints: list[DualConstraint] = field(default_factory=list)
    recovery: Recovery | None = None
    steps: list[Step] = field(default_factory=list)
    extra: list[DualVariable] = field(default_factory=list)
    unbounded: bool = False
    inner: bool = False
    gradient: Expr | None = None
    smooth: bool = False
    """True when the block's Lagrangian is differentiable where it is finite: its
    stationarity condition is a vanishing gradient, not a subdifferential inclusion."""
    strict_box: bool = False
    """True when the block ranges over a box and its Lagrangian is strictly convex there:
    the minimizer is unique for every multiplier, so the block's value is continuously
    differentiable in them, max and min in its printed form notwithstanding (see
    ``smoothness``)."""


def zero_constraint(e: Expr, relation: str, reason: str) -> DualConstraint:
    """``e relation 0`` (the engine states it readably at the end)."""
    return DualConstraint(tidy(e), relation, b.zeros(e.shape), reason)  # type: ignore[arg-type]


def _has_multiplier(e: Expr) -> bool:
    return any(s.role == "multiplier" for s in symbols_of(e))


def affine_block(x: Symbol, domain: Domain, g: Expr | None, r: Expr | None) -> Outcome | None:
    """inf over x of g'x + r.

    Over R^n it is r if g = 0 and minus infinity otherwise; over R^n_+ (or
    R^n_++) it is r if g >= 0; over a box [l, u] it is r + sum(min(l g, u g));
    over {0,1}^n it is r + sum(min(g, 0)); over Z^n it is r if g = 0.
    """
    r = r if r is not None else b.num(0)
    if g is None:
        text = f"The Lagrangian does not depend on ${x.name}$."
        return Outcome(r, recovery=Recovery(x.name, None, _undetermined(x)),
                       steps=[Step("minimize-affine", text, block=x.name)])
    g = tidy(g)
    kind = domain.kind
    if kind in ("free", "integer"):
        return _affine_condition(x, g, r, "=", "its coefficient vanishes")
    if kind in ("nonneg", "pos"):
        return _affine_condition(x, g, r, ">=", f"its coefficient is nonnegative (${x.name}$ "
                                 "ranges over the nonnegative orthant)")
    if kind == "box":
        return _affine_box(x, g, r, domain)
    if kind == "binary":
        return _affine_binary(x, g, r)
    return None


def _affine_box(x: Symbol, g: Expr, r: Expr, domain: Domain) -> Outcome:
    """Over lo <= x <= hi each entry sits at the bound its coefficient's sign picks."""
    lo, hi = domain.lo, domain.hi
    assert lo is not None and hi is not None
    term = b.minimum(b.scale(lo, g), b.scale(hi, g))
    value = b.add(r, b.sum_all(term) if not g.shape.is_scalar else term)
    text = ("Over the box from $#lo$ to $#hi$ the infimum of the linear term $#term$ is "
            "attained at a corner, entry by entry: the block contributes $#value$.")
    said = _said(lo=lo, hi=hi, term=b.inner(g, x), value=tidy(value))
    return Outcome(value, recovery=Recovery(x.name, None, "each entry sits at its lower bound "
                   "where its coefficient is positive and at its upper bound where it is "
                   "negative"), steps=[Step("minimize-affine-box", text, block=x.name,
                                            formulas=said)])


def _affine_binary(x: Symbol, g: Expr, r: Expr) -> Outcome:
    """Over {0,1}^n each entry is 1 exactly where its coefficient is negative."""
    term = b.minimum(g, b.zeros(g.shape))
    value = b.add(r, b.sum_all(term) if not g.shape.is_scalar else term)
    text = ("Over binary values the infimum of the linear term $#term$ is attained entry by "
            "entry at 0 or 1: the block contributes $#value$.")
    said = _said(term=b.inner(g, x), value=tidy(value))
    return Outcome(value, steps=[Step("minimize-affine-binary", text, block=x.name,
                                      formulas=said)],
                   recovery=Recovery(x.name, None, f"${x.name}$ has entry 1 where its "
                                     "coefficient is negative and 0 elsewhere"))


def _said(**formulas: object) -> tuple[tuple[str, object], ...]:
    """The formulas a step's sentence marks as ``$#key$``, in the order given."""
    return tuple((f"#{key}", value) for key, value in formulas.items())


def _affine_condition(x: Symbol, g: Expr, r: Expr, rel: str, why: str) -> Outcome:
    text = (f"The Lagrangian is affine in ${x.name}$; it is bounded below only where "
            f"{why}, and then the block contributes its constant part, $#value$.")
    c = zero_constraint(g, rel, f"the Lagrangian is affine in {x.name}: {why}")
    shown = (Equation(_grad_head(x), "=", tidy(g)),
             Equation(tidy(g), rel, b.zeros(g.shape)))  # type: ignore[arg-type]
    step = Step("minimize-affine", text, shown, block=x.name, formulas=_said(value=tidy(r)))
    return Outcome(r, [c], Recovery(x.name, None, _undetermined(x)), [step], gradient=g)


def _grad_head(x: Symbol) -> Head:
    return Head(f"grad_{x.name} L")


def _undetermined(x: Symbol) -> str:
    return (f"${x.name}$ enters the Lagrangian linearly, so minimizing it does not determine "
            f"${x.name}$; recover it from the KKT conditions: complementary slackness on the "
            "constraints whose multipliers are strictly positive (those constraints hold with "
            "equality at the optimum)")


def quadratic_block(x: Symbol, domain: Domain, q: Quadratic) -> Outcome | None:
    """inf over x of x'Qx + g'x + r with H = Q + Q'.

    H positive definite: attained at x = -H^-1 g with value r - 1/2 g'H^-1 g.
    H depending on multipliers or not known definite: finite iff H is positive
    semidefinite and g lies in its range, stated by the Schur complement
    [[H, g], [g', 2(r - t)]] succeq 0 with t the value (for g = 0 just
    H succeq 0).  H negative definite for every multiplier: minus infinity.
    """
    H = hessian(q, x)
    if H is None:
        return affine_block(x, domain, q.g, q.r)
    H = tidy(H)
    if domain.kind in ("nonneg", "pos"):
        return _orthant(x, H, q, domain.kind == "pos")
    if domain.kind == "box":
        return _box(x, H, q, domain)
    if domain.kind != "free":
        return None
    r = q.r if q.r is not None else b.num(0)
    g = tidy(q.g) if q.g is not None else None
    kind = definiteness(H)
    factored = _factored(x, H, g, r, kind)
    if factored is not None:
        return factored
    if kind == "pd":
        return _definite(x, H, g, r)
    if kind == "nd" and not _has_multiplier(H):
        return Outcome(b.num(0), unbounded=True, steps=[Step(
            "unbounded", f"The Lagrangian is a concave quadratic in ${x.name}$ whatever the "
            "multipliers: its infimum is minus infinity, so the dual function is minus "
            "infinity everywhere.", block=x.name)])
    return _semidefinite(x, H, g, r, kind)


def _orthant(x: Symbol, H: Expr, q: Quadratic, open_set: bool) -> Outcome | None:
    """inf over x >= 0 of 1/2 h x'x + g'x + r, with h a known positive scalar.

    Entry by entry, 1/2 h t^2 + g_i t over t >= 0 is least at t = max(0, -g_i/h),
    so the infimum is r - ||min(g, 0)||^2 / (2h), attained at x = max(-g, 0)/h
    (the conjugate of 1/2 ||x||^2 on the orthant is 1/2 ||max(y, 0)||^2).  Over the
    open orthant the infimum is the same, approached as x tends to that point.
    Other Hessians on the orthant have no rule here (None: the infimum is kept).
    """
    h = _identity_multiple(H) if not H.shape.is_scalar else H
    if h is None or _has_multiplier(h) or definiteness(H) != "pd":
        return None
    r = q.r if q.r is not None else b.num(0)
    if q.g is None:
        return Outcome(r, recovery=Recovery(x.name, b.zeros(x.shape)), steps=[Step(
            "minimize-quadratic-orthant", f"The Lagrangian is a positive definite quadratic in "
            f"${x.name}$ with no linear term: on the orthant its gradient vanishes at zero, and "
            "the block contributes $#value$.", block=x.name, formulas=_said(value=tidy(r)))])
    g = tidy(q.g)
    low = b.minimum(g, b.zeros(g.shape))
    form = b.power(low if g.shape.is_scalar else Norm(low, "2"), sympy.Integer(2))
    value = tidy(b.sub(r, b.scale(b.num(sympy.Rational(1, 2)), b.divide(form, h))))
    xstar = tidy(b.scale(b.power(h, sympy.Integer(-1)),
                         b.maximum(b.neg(g), b.zeros(g.shape))))
    text = (f"The Lagrangian is a strictly convex quadratic in ${x.name}$ whose Hessian is "
            f"$#h$ times the identity, over the {'open ' if open_set else ''}nonnegative "
            "orthant: entry by entry the gradient vanishes where that point is nonnegative and "
            "the entry sits at zero elsewhere, and the block contributes $#value$.")
    note = "where an entry is 0 the infimum is approached, not attained" if open_set else ""
    return Outcome(value, recovery=Recovery(x.name, xstar, note),
                   steps=[Step("minimize-quadratic-orthant", text, (Equation(x, "=", xstar),),
                               block=x.name, formulas=_said(h=h, value=value))])


def _box(x: Symbol, H: Expr, q: Quadratic, domain: Domain) -> Outcome | None:
    """inf over lo <= x <= hi of 1/2 h x'x + g'x + r, with h a known positive scalar.

    Entry by entry, 1/2 h t^2 + g_i t over [lo, hi] is least at the projection
    p_i = max(lo, min(hi, -g_i/h)) of its unconstrained minimizer, so the
    infimum is r + sum(1/2 h p.^2 + g .* p), attained at x = p.
    """
    h = _identity_multiple(H) if not H.shape.is_scalar else H
    if h is None or _has_multiplier(h) or definiteness(H) != "pd":
        return None
    assert domain.lo is not None and domain.hi is not None
    r = q.r if q.r is not None else b.num(0)
    g = tidy(q.g) if q.g is not None else b.zeros(x.shape)
    shape = x.shape
    free = b.scale(b.neg(b.power(h, sympy.Integer(-1))), g)
    c = tidy(b.maximum(b.broadcast(domain.lo, shape),
                       b.minimum(b.broadcast(domain.hi, shape), free)))
    half = b.scale(b.num(sympy.Rational(1, 2)), h)
    pieces = b.add(b.scale(half, b.hadamard(c, c)), b.hadamard(g, c))
    value = tidy(b.add(r, pieces if shape.is_scalar else b.sum_all(pieces)))
    text = (f"The Lagrangian is a strictly convex quadratic in ${x.name}$ whose Hessian is "
            "$#h$ times the identity, over the box from $#lo$ to $#hi$: entry by entry it is "
            "least at the projection onto the interval of the point where the gradient "
            "vanishes, and the block contributes $#value$.")
    said = _said(h=h, lo=domain.lo, hi=domain.hi, value=value)
    return Outcome(value, recovery=Recovery(x.name, c), strict_box=True, steps=[Step(
        "minimize-quadratic-box", text, (Equation(x, "=", c),), block=x.name, formulas=said)])


def _definite(x: Symbol, H: Expr, g: Expr | None, r: Expr) -> Outcome:
    Hinv = b.inverse(H)
    if g is None:
        return Outcome(r, recovery=Recovery(x.name, b.zeros(x.shape)), steps=[Step(
            "minimize-quadratic", f"The Lagrangian is a positive definite quadratic in ${x.name}$ "
            "with no linear term: its gradient vanishes at zero, and the block contributes "
            "$#value$.", block=x.name, formulas=_said(value=tidy(r)))])
    xstar = tidy(b.neg(b.mul(Hinv, g)))
    form = (b.mul_scalars(Hinv, b.power(g, sympy.Integer(2))) if g.shape.is_scalar
            else b.mul(b.transpose(g), Hinv, g))
    value = tidy(b.sub(r, b.scale(b.num(sympy.Rational(1, 2)), form)))
    grad = b.add(b.mul(H, x), g)
    text = (f"The Lagrangian is a strictly convex quadratic in ${x.name}$; its gradient "
            "vanishes at the minimizer, and substituting it the block contributes $#value$.")
    eqs = (Equation(_grad_head(x), "=", tidy(grad)), Equation(x, "=", xstar))
    return Outcome(value, recovery=Recovery(x.name, xstar), steps=[Step(
        "minimize-quadratic", text, eqs, block=x.name, formulas=_said(value=value))],
        gradient=grad)  # type: ignore[arg-type]


def _semidefinite(x: Symbol, H: Expr, g: Expr | None, r: Expr, kind: str) -> Outcome:
    psd_known = kind in ("psd", "pd")
    constraints: list[DualConstraint] = []
    if g is None:
        if not psd_known:
            constraints.append(zero_constraint(b.neg(H), "preceq" if not H.shape.is_scalar
                                               else "<=", "the quadratic must be bounded below"))
        text = (f"The Lagrangian is a quadratic form in ${x.name}$ with Hessian $#H$ "
                f"{_kind_text(kind)}; its infimum is 0 when the Hessian is positive "
                "semidefinite and minus infinity otherwise.")
        return Outcome(r, constraints, Recovery(x.name, None, f"${x.name}$ lies in the null space "
                       "of the Hessian at the optimal multipliers"), [Step(
                           "minimize-quadratic-semidefinite", text, block=x.name,
                           formulas=_said(H=H))])
    h = _identity_multiple(H)
    if h is not None and not H.shape.is_scalar:
        return _scaled_identity(x, h, g, r, psd_known)
    if H.shape.is_scalar:
        value = tidy(b.sub(r, b.scale(b.num(sympy.Rational(1, 2)),
                                      Divide(b.power(g, sympy.Integer(2)), H))))
        if not psd_known:
            constraints.append(zero_constraint(b.neg(H), "<=", "the quadratic must be convex"))
        text = (f"The Lagrangian is a quadratic in ${x.name}$ with curvature $#H$, which "
                "depends on the multipliers; where it is positive the gradient vanishes at the "
                "point below and the block contributes $#value$ (where it is zero the infimum "
                "is finite only if the linear coefficient $#g$ vanishes; the dual keeps the "
                "closure).")
        xstar = tidy(b.neg(b.mul_scalars(g, b.power(H, sympy.Integer(-1)))))
        return Outcome(value, constraints, Recovery(x.name, xstar), [Step(
            "minimize-quadratic-scalar", text, (Equation(x, "=", xstar),), block=x.name,
            formulas=_said(H=H, value=value, g=g))], smooth=True)
    if psd_known and pseudo.data_only(H):
        value, c, var, step, rec = pseudo.range_witness(x, H, g, r)
        return Outcome(value, [c], rec, [step], [var], gradient=b.add(b.mul(H, x), g))
    scaled = pseudo.scaled_data(H)
    if scaled is not None:
        return _scaled_data(x, scaled[0], scaled[1], g, r)
    return _schur(x, H, g, r)


def _scaled_data(x: Symbol, h: Expr, M: Expr, g: Expr, r: Expr) -> Outcome:
    """H = h M with h >= 0 a multiplier expression and M semidefinite data
    (``pseudo.scaled_witness``): no matrix inequality."""
    sign = [] if _known_nonneg(h) else [zero_constraint(b.neg(h), "<=",
                                                         "the quadratic must be convex")]
    if "pd" in getattr(M, "facts", ()):
        value, step, rec = pseudo.scaled_definite(x, h, M, g, r)
        return Outcome(value, sign, rec, [step])
    value, cons, var, step, rec = pseudo.scaled_witness(x, h, M, g, r)
    return Outcome(value, [cons, *sign], rec, [step], [var])


def _known_nonneg(h: Expr) -> bool:
    from dualize.duality.scalar import Scope, to_sympy

    return bool(to_sympy(h, Scope()).is_nonnegative)


def _factored(x: Symbol, H: Expr, g: Expr | None, r: Expr, kind: str) -> Outcome | None:
    """The convex quadratic whose linear coefficient is H w: value r - 1/2 w'H w
    at x = -w (``pseudo.factored_value``), for H known positive (semi)definite."""
    if g is None or kind not in ("pd", "psd") or H.shape.is_scalar:
        return None
    w = pseudo.factor_through(H, g)
    if w is None:
        return None
    value, step, rec = pseudo.factored_value(x, H, w, g, r, kind)
    return Outcome(value, recovery=rec, steps=[step], gradient=b.add(b.mul(H, x), g))


def _identity_multiple(H: Expr) -> Expr | None:
    """h when H = h I for a scalar h."""
    from dualize.duality.normal import Term, expand, rebuild
    from dualize.model.expr import Identity

    terms = expand(H)
    if not terms or any(t.chain != (Identity(H.shape.rows),) for t in terms):
        return None
    return rebuild([Term(t.coef, t.scalars, ()) for t in terms], b.SCALAR)


def _scaled_identity(x: Symbol, h: Expr, g: Expr, r: Expr, psd_known: bool) -> Outcome:
    """H = h I with h depending on the multipliers: for h > 0 the minimizer is -g/h
    and the infimum r - g'g/(2h); the dual keeps the closure h >= 0."""
    value = tidy(b.sub(r, b.scale(b.num(sympy.Rational(1, 2)), Divide(b.inner(g, g), h))))
    constraints = [] if psd_known else [zero_constraint(b.neg(h), "<=",
                                                        "the quadratic must be convex")]
    xstar = tidy(b.neg(b.scale(b.power(h, sympy.Integer(-1)), g)))
    text = (f"The Lagrangian is a quadratic in ${x.name}$ whose Hessian is $#h$ times the "
            "identity, depending on the multipliers; where $#h$ is positive the gradient vanishes "
            "at the point below and the block contributes $#value$ (the dual keeps the "
            "closure $#closure$).")
    said = _said(h=h, value=value, closure=Equation(h, ">=", b.num(0)))  # type: ignore[arg-type]
    return Outcome(value, constraints, Recovery(x.name, xstar), [Step(
        "minimize-quadratic-scaled-identity", text, (Equation(x, "=", xstar),), block=x.name,
        formulas=said)], smooth=True)


def _kind_text(kind: str) -> str:
    return {"psd": "known positive semidefinite", "unknown": "not known to be definite"}.get(
        kind, kind)


def _schur(x: Symbol, H: Expr, g: Expr, r: Expr) -> Outcome:
    t = Symbol(f"t_{x.name}", "multiplier", b.SCALAR)
    lmi = Block(((H, g), (b.transpose(g), b.scale(b.num(2), b.sub(r, t)))))
    c = DualConstraint(lmi, "succeq", b.zeros(lmi.shape),
                       f"the infimum over {x.name} is at least t exactly when this Schur "
                       "complement is positive semidefinite")
    text = (f"The Lagrangian is a quadratic in ${x.name}$ whose Hessian $#H$ is not known to "
            "be definite; its infimum is finite only when the Hessian is positive semidefinite "
            "and the linear coefficient $#g$ lies in its range. Its infimum is at least the "
            f"epigraph variable ${t.name}$ exactly when the Schur complement below is positive "
            "semidefinite, a linear matrix inequality.")
    var = DualVariable(t, "free", f"epigraph of the infimum over {x.name}")
    return Outcome(t, [c], Recovery(x.name, None, f"${x.name}$ is the pseudo-inverse solution of "
                   "stationarity plus any null-space "
                   "direction of H at the optimal multipliers"), [Step(
                       "minimize-quadratic-schur", text,
                       (Equation(lmi, "succeq", b.zeros(lmi.shape)),),  # type: ignore[arg-type]
                       block=x.name, formulas=_said(H=H, g=g))], [var])


def matrix_block(X: Symbol, domain: Domain, lin: Affine) -> Outcome | None:
    """inf over X of <G, X> + c.

    Over S^n it is c if the symmetric part of G vanishes; over S^n_+ it is c
    if G is positive semidefinite; over R^(m,n) it is c if G = 0.
    """
    r = lin.const if lin.const is not None else b.num(0)
    if lin.lin is None:
        return Outcome(r, recovery=Recovery(X.name, None, _undetermined(X)))
    G = tidy(lin.lin)
    if domain.kind in ("symmetric", "psd", "pd") and not b.is_symmetric(G):
        G = tidy(b.scale(b.num(sympy.Rational(1, 2)), b.add(G, b.transpose(G))))
    if domain.kind in ("free", "symmetric"):
        return _affine_condition(X, G, r, "=", "its coefficient vanishes")
    if domain.kind in ("nonneg", "pos"):
        return _affine_condition(X, G, r, ">=", "its coefficient is nonnegative entry by entry "
                                 f"({X.name} ranges over the nonnegative matrices)")
    if domain.kind in ("psd", "pd"):
        c = zero_constraint(b.neg(G), "preceq", f"the Lagrangian is linear in {X.name} over the "
                            "semidefinite cone: its coefficient must be positive semidefinite")
        text = (f"The Lagrangian is linear in ${X.name}$, which ranges over the semidefinite cone; "
                "it is bounded below only where its coefficient is positive semidefinite.")
        return Outcome(r, [c], Recovery(X.name, None, _undetermined(X)), [Step(
            "minimize-affine-cone", text, block=X.name)])
    return None


def depends(e: Expr, x: Symbol) -> bool:
    return depends_on(e, {x.name})
