"""Nonsmooth and nonquadratic building blocks, recognised in a Lagrangian term,
and the infimum of each against a linear term (its conjugate).

A term is a building block when it is ``c * phi(arg)`` with ``c`` a positive
scalar free of the decision variables and ``phi`` one of the kinds below.  The
rule used with a building block is always

    inf over u of  c phi(u) - s'u  =  -(c phi)*(s),

which is finite exactly on the domain of the conjugate; that domain becomes
constraints of the dual (S. Boyd and L. Vandenberghe, Convex Optimization,
2004, sections 3.3 and 5.1.6).
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from dualize.duality import build as b
from dualize.duality.normal import Term, expand, rebuild, tidy
from dualize.duality.scalar import Scope, to_sympy
from dualize.model.expr import (
    Apply,
    Expr,
    Extremum,
    Hadamard,
    MatMul,
    Norm,
    Number,
    Ones,
    Power,
    Scale,
    SumAll,
    Symbol,
    Transpose,
    depends_on,
)
from dualize.model.functions import ABS, EXP, LOG
from dualize.model.ops import is_zero

DUAL_NORM = {"2": "2", "1": "inf", "inf": "1"}


@dataclass(frozen=True)
class BuildingBlock:
    """``coef * phi(arg)``; ``kind`` names phi, ``body`` is the elementwise
    expression for separable building blocks (phi applied to ``arg`` entry by entry)."""

    coef: Expr
    kind: str  # norm | square | hinge | abs | logsumexp | separable
    arg: Expr
    p: str = "2"
    body: Expr | None = None
    weight: Expr | None = None
    """For abs and hinge: nonnegative data weights w in sum(w .* phi(arg)), else None."""


@dataclass(frozen=True)
class Infimum:
    """inf over u of block(u) - s'u: a value, constraints on s, and the minimizer."""

    value: Expr
    constraints: tuple[tuple[Expr, str, Expr], ...]
    minimizer: Expr | None
    statement: str
    formulas: tuple[tuple[str, object], ...] = ()
    """The formulas the statement marks as ``$key$`` (see ``result.Step``)."""
    entries: Expr | None = None
    """For a separable term: phi*(s) entry by entry (``value`` is minus its sum)."""
    strict_box: bool = False
    """Whether the domain is a box and phi is shown strictly convex on it (the minimizer is
    then unique: see ``smoothness``)."""


def recognise(term: Term, variables: frozenset[str]) -> BuildingBlock | None:
    """The block in one collected term, or None."""
    dependent = [s for s in term.scalars if depends_on(s, variables)]
    if not term.chain and len(dependent) > 1 and all(d.shape.is_scalar for d in dependent):
        return _scalar_product(term, dependent, variables)
    if term.chain or len(dependent) != 1:
        return None
    coef_parts = [s for s in term.scalars if s is not dependent[0]]
    coef = rebuild([Term(term.coef, tuple(coef_parts), ())], dependent[0].shape)
    sign = _sign(coef)
    shaped = _shaped(coef, dependent[0]) if sign is not None else None
    if shaped is not None and (sign == "pos" or shaped.kind in _INDICATOR_KINDS):
        return shaped
    return _separable(coef, dependent[0], variables)


# Building blocks whose conjugate is an indicator: c phi with c >= 0 (c = 0 included).
_INDICATOR_KINDS = ("norm", "abs", "hinge")


def _sign(coef: Expr) -> str | None:
    value = to_sympy(coef, Scope())
    if value.is_positive:
        return "pos"
    if value.is_nonnegative:
        return "nonneg"
    return None


def _shaped(coef: Expr, e: Expr) -> BuildingBlock | None:
    if isinstance(e, Norm):
        return BuildingBlock(coef, "norm", e.arg, e.p)
    if isinstance(e, Power) and e.exponent == 2 and isinstance(e.base, Norm) and e.base.p == "2":
        return BuildingBlock(coef, "square", e.base.arg)
    if isinstance(e, Apply) and e.func == LOG.name:
        inner = summed_argument(e.arg)
        if inner is not None and isinstance(inner, Apply) and inner.func == EXP.name:
            return BuildingBlock(coef, "logsumexp", inner.arg)
    if isinstance(e, Apply) and e.func == ABS.name and e.shape.is_scalar:
        return BuildingBlock(coef, "abs", e.arg)
    if isinstance(e, Extremum) and e.kind == "max" and is_zero(e.right):
        return BuildingBlock(coef, "hinge", e.left)
    weighted = _weighted(e)
    weight, inner = weighted if weighted is not None else (None, summed_argument(e))
    if inner is None:
        return None
    if isinstance(inner, Apply) and inner.func == ABS.name:
        return BuildingBlock(coef, "abs", inner.arg, weight=weight)
    if isinstance(inner, Extremum) and inner.kind == "max" and is_zero(inner.right):
        return BuildingBlock(coef, "hinge", inner.left, weight=weight)
    return None


def _weighted(e: Expr) -> tuple[Expr, Expr] | None:
    """(w, E) when e is w'E or sum(w .* E) with w data known nonnegative."""
    from dualize.model.expr import Hadamard

    pair = None
    summed = summed_argument(e)
    if isinstance(summed, Hadamard):
        pair = (summed.left, summed.right)
        if not _nonneg_data(pair[0]):
            pair = (summed.right, summed.left)
    elif isinstance(e, MatMul) and len(e.factors) == 2 and isinstance(e.factors[0], Transpose):
        pair = (e.factors[0].arg, e.factors[1])  # w'E, or E'w as the normal form writes it
        if not _nonneg_data(pair[0]):
            pair = (e.factors[1], e.factors[0].arg)
    if pair is None or not _nonneg_data(pair[0]) or pair[0].shape != pair[1].shape:
        return None
    return pair


def _nonneg_data(w: Expr) -> bool:
    return isinstance(w, Symbol) and w.role == "data" and bool(w.facts & {"nonneg", "pos"})


def summed_argument(e: Expr) -> Expr | None:
    """E when e is sum(E) (written sum(E) or 1'E)."""
    if isinstance(e, SumAll):
        return e.arg
    if isinstance(e, MatMul) and len(e.factors) == 2:
        first, second = e.factors
        if isinstance(first, Transpose) and isinstance(first.arg, Ones):
            return second
        if isinstance(second, Ones) and isinstance(first, Transpose):
            return first.arg
    if isinstance(e, MatMul) and len(e.factors) == 3:  # 1' E 1: every entry of a matrix
        first, middle, last = e.factors
        if isinstance(first, Transpose) and isinstance(first.arg, Ones) and isinstance(
                last, Ones):
            return middle
    return None


def _scalar_product(term: Term, dependent: list[Expr],
                    variables: frozenset[str]) -> BuildingBlock | None:
    """c * f1(x) * f2(x) * ... for a scalar x (``x * log(x)``): one scalar function."""
    product = dependent[0]
    for d in dependent[1:]:
        product = Hadamard(product, d)
    rest = tuple(s for s in term.scalars if not any(s is d for d in dependent))
    coef = rebuild([Term(term.coef, rest, ())], b.SCALAR)
    return _separable(coef, product, variables)


def _separable(coef: Expr, e: Expr, variables: frozenset[str]) -> BuildingBlock | None:
    """coef * sum(E(v)) with E elementwise in one decision variable v."""
    inner = summed_argument(e)
    if inner is None and isinstance(e, MatMul) and len(e.factors) == 2:
        first, second = e.factors
        if isinstance(first, Transpose) and first.arg.shape.cols == 1:
            inner = Hadamard(first.arg, second)
    if inner is None and e.shape.is_scalar and isinstance(e, Apply | Power | Hadamard):
        inner = e
    if inner is None:
        return None
    var = _sole_variable(inner, variables)
    if var is None:
        return _separable_of_affine(coef, inner, variables)
    from dualize.duality.elementwise import scalar_form

    if scalar_form(inner, var, sympy.Symbol("t", real=True)) is None:
        return _separable_of_affine(coef, inner, variables)
    return BuildingBlock(coef, "separable", var, body=inner)


PLACE = Symbol("⟨u⟩", "auxiliary", b.SCALAR)
"""The argument of an elementwise function while it is split off; no name of the
language can be spelled this way, so it never captures a variable of the problem."""


def _separable_of_affine(coef: Expr, inner: Expr,
                         variables: frozenset[str]) -> BuildingBlock | None:
    """phi applied entrywise to an affine argument: the argument is split off later.

    ``body`` is phi applied to a placeholder symbol of the argument's shape.
    """
    from dualize.duality.elementwise import scalar_form
    from dualize.duality.linear import affine
    from dualize.model.expr import substitute

    for arg in _candidate_arguments(inner):
        vs = [n for n in variables if depends_on(arg, {n})]
        if not vs:
            continue
        if any(affine(arg, _find(arg, n)) is None for n in vs):
            continue
        place = Symbol(PLACE.name, "auxiliary", arg.shape)
        body = substitute(inner, {arg: place})
        if depends_on(body, variables):
            continue
        if scalar_form(body, place, sympy.Symbol("t", real=True)) is None:
            continue
        return BuildingBlock(coef, "separable", arg, body=body)
    return None


def _candidate_arguments(e: Expr) -> list[Expr]:
    if isinstance(e, Apply):
        inner = e.arg
        if e.func == LOG.name and isinstance(inner, b.Add):
            return [inner] + [t.arg for t in inner.terms if isinstance(t, Apply)]
        return [inner]
    if isinstance(e, Power):
        return [e.base]
    if isinstance(e, Hadamard):
        return [e.left, e.right]
    return []


def _find(e: Expr, name: str) -> Symbol:
    from dualize.model.expr import walk

    return next(n for n in walk(e) if isinstance(n, Symbol) and n.name == name)


def with_argument(block: BuildingBlock, u: Symbol) -> BuildingBlock:
    """The block applied to the split variable u instead of its affine argument."""
    from dualize.model.expr import substitute

    if block.kind != "separable" or block.body is None:
        return BuildingBlock(block.coef, block.kind, u, block.p, weight=block.weight)
    place = Symbol(PLACE.name, "auxiliary", block.arg.shape)
    body = substitute(block.body, {place: u}) if depends_on(block.body, {PLACE.name}) else \
        substitute(block.body, {block.arg: u})
    return BuildingBlock(block.coef, "separable", u, body=body)


def _sole_variable(e: Expr, variables: frozenset[str]) -> Symbol | None:
    from dualize.model.expr import walk

    found = {n for n in walk(e) if isinstance(n, Symbol) and n.name in variables}
    return next(iter(found)) if len(found) == 1 else None


# -- the infimum of each block against a linear term ----------------------------


def infimum(block: BuildingBlock, s: Expr, u: Expr) -> Infimum | None:
    """inf over u of block(u) - s'u, where ``u`` stands for the block's argument."""
    handler = _INFIMUM.get(block.kind)
    return handler(block, s, u) if handler else None


def _norm(block: BuildingBlock, s: Expr, u: Expr) -> Infimum:
    q = DUAL_NORM[block.p]
    bound = ((_norm_of(s, q) if not s.shape.is_scalar else Apply(ABS.name, s), "<=", block.coef),)
    return _stated(block, s, u, b.num(0), bound, None,
                   "the infimum of $#term$ is 0 where {conditions} (a bound on the dual norm) "
                   "and minus infinity elsewhere")


def orthant_norm(atom: BuildingBlock, s: Expr, u: Expr) -> Infimum | None:
    """inf over u >= 0 of c||u||_p - s'u = 0 when ||max(s, 0)||_q <= c, else minus infinity.

    On the orthant s'u <= max(s, 0)'u <= ||max(s, 0)||_q ||u||_p, so the infimum is 0
    (at u = 0) when the dual norm of the positive part is at most c; otherwise the
    maximizer of max(s, 0)'u over the unit ball, nonnegative since p-norms are absolute,
    makes the expression fall without bound.  For p = 1 the condition is s <= c entry
    by entry.
    """
    if atom.kind != "norm" or s.shape.is_scalar:
        return None
    q = DUAL_NORM[atom.p]
    if atom.p == "1":
        cons = (s, "<=", b.broadcast(atom.coef, s.shape))
    else:
        cons = (Norm(b.maximum(s, b.zeros(s.shape)), q), "<=", atom.coef)  # type: ignore[arg-type]
    return _stated(atom, s, u, b.num(0), (cons,), None,
                   "over the nonnegative orthant the infimum of $#term$ is 0 where "
                   "{conditions} (the dual norm of the positive part) and minus infinity "
                   "elsewhere")


def _square(block: BuildingBlock, s: Expr, u: Expr) -> Infimum:
    c = block.coef
    value = b.scale(b.scale(b.num(-1), b.power(b.scale(b.num(4), c), sympy.Integer(-1))),
                    b.inner(s, s))
    minimizer = b.scale(b.power(b.scale(b.num(2), c), sympy.Integer(-1)), s)
    return _stated(block, s, u, value, (), minimizer,
                   "$#term$ is least at $#at$, where the gradient vanishes")


def _hinge(block: BuildingBlock, s: Expr, u: Expr) -> Infimum:
    zero = b.zeros(s.shape)
    weight = block.coef if block.weight is None else b.scale(block.coef, block.weight)
    c = b.broadcast(weight, s.shape) if block.weight is None else weight
    return _stated(block, s, u, b.num(0), ((s, ">=", zero), (s, "<=", c)), None,
                   "$#term$ is bounded below exactly when {conditions}, with infimum 0")


def _abs(block: BuildingBlock, s: Expr, u: Expr) -> Infimum:
    if block.weight is not None:
        unsigned = s.arg if isinstance(s, Scale) and isinstance(s.factor, Number) and \
            s.factor.value == -1 else s  # |-s| = |s|
        bound = ((Apply(ABS.name, unsigned), "<=", b.scale(block.coef, block.weight)),)
        return _stated(block, s, u, b.num(0), bound, None, "$#term$ is bounded below exactly "
                       "when {conditions} entry by entry, with infimum 0")
    lhs = Apply(ABS.name, s) if s.shape.is_scalar else _norm_of(s, "inf")
    return _stated(block, s, u, b.num(0), ((lhs, "<=", block.coef),), None,
                   "$#term$ is bounded below exactly when {conditions}, with infimum 0")


def _stated(block: BuildingBlock, s: Expr, u: Expr, value: Expr,
            constraints: tuple[tuple[Expr, str, Expr], ...], minimizer: Expr | None,
            sentence: str) -> Infimum:
    """An infimum with its sentence in the problem's own symbols: ``$#term$`` is the term
    minimized, ``{conditions}`` the conditions for a finite infimum, ``$#at$`` the minimizer."""
    from dataclasses import replace

    from dualize.duality.result import Equation

    term = b.sub(block_expression(replace(block, arg=u)), b.inner(s, u))
    formulas: list[tuple[str, object]] = [("#term", term)]
    for index, (lhs, rel, rhs) in enumerate(constraints):
        formulas.append((f"#c{index}", Equation(lhs, rel, rhs)))  # type: ignore[arg-type]
    if minimizer is not None:
        formulas.append(("#at", Equation(u, "=", minimizer)))
    conditions = " and ".join(f"$#c{i}$" for i in range(len(constraints)))
    return Infimum(value, constraints, minimizer, sentence.replace("{conditions}", conditions),
                   tuple(formulas))


def _logsumexp(block: BuildingBlock, s: Expr, u: Expr) -> Infimum | None:
    c = block.coef
    if not s.shape.is_vector:
        return None
    ratio = b.scale(b.power(c, sympy.Integer(-1)), s)
    entropy = b.sum_all(b.hadamard(s, b.apply(LOG.name, ratio)))
    simplex = ((s, ">=", b.zeros(s.shape)), (b.sum_all(s), "=", c))
    return _stated(block, s, u, b.neg(entropy), simplex, None, "the conjugate of log-sum-exp "
                   "is the negative entropy on the simplex {conditions}")


_INFIMUM = {
    "norm": _norm,
    "square": _square,
    "hinge": _hinge,
    "abs": _abs,
    "logsumexp": _logsumexp,
}


def _norm_of(s: Expr, p: str) -> Expr:
    """||s||_p, with a sign in front of s dropped (||-s|| = ||s||)."""
    from dualize.model.expr import Scale

    if isinstance(s, Scale) and isinstance(s.factor, Number) and s.factor.value < 0:
        factor = -s.factor.value
        inner = Norm(s.arg, p)  # type: ignore[arg-type]
        return inner if factor == 1 else b.scale(Number(factor), inner)
    terms = expand(s)
    if terms and all(t.coef < 0 for t in terms):  # ||-A'l - c|| = ||A'l + c||
        return Norm(tidy(b.neg(s)), p)  # type: ignore[arg-type]
    return Norm(s, p)  # type: ignore[arg-type]


def block_expression(block: BuildingBlock) -> Expr:
    """The block as an IR expression again (for an infimum that is kept)."""
    u = block.arg
    if block.kind == "norm":
        body: Expr = Norm(u, block.p)  # type: ignore[arg-type]
    elif block.kind == "square":
        body = b.power(Norm(u, "2"), sympy.Integer(2))
    elif block.kind in ("hinge", "abs"):
        inner: Expr = Extremum("max", u, b.zeros(u.shape)) if block.kind == "hinge" else \
            Apply(ABS.name, u)
        body = b.sum_all(inner) if block.weight is None else b.inner(block.weight, inner)
    elif block.kind == "logsumexp":
        body = Apply(LOG.name, b.sum_all(Apply(EXP.name, u)))
    else:
        assert block.body is not None
        body = b.sum_all(block.body)
    return b.scale(block.coef, body)
