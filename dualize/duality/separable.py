"""Separable terms: inf over x of sum_i phi(x_i) - s'x = -sum_i phi*(s_i).

phi is read off the IR as a scalar function (``elementwise.scalar_form``), its
conjugate is derived and checked numerically (``conjugate``), and the answer
is lifted back entry by entry (``elementwise.lift``).  The domain of phi* gives
the dual constraints; an open end is stated by its closure, which leaves the
supremum of the dual unchanged.
"""

from __future__ import annotations

import functools

import sympy

from dualize.deadline import Deadline, DeadlineExceeded
from dualize.duality import build as b
from dualize.duality import derivation_cache as cache
from dualize.duality.building_blocks import BuildingBlock, Infimum
from dualize.duality.conjugate import Conjugate, NoClosedForm, conjugate
from dualize.duality.elementwise import LiftError, lift, lift_interval, scalar_form
from dualize.duality.scalar import Scope, to_sympy
from dualize.model.expr import Expr, Number, Symbol, symbols_of
from dualize.model.problem import Domain
from dualize.model.relations import Comparison, Relation

_CLOSED = {">": ">=", "<": "<=", Comparison.EQ: Relation.EQ}


def _interval(domain: Domain) -> sympy.Interval | None:
    if domain.kind == "free":
        return sympy.S.Reals
    if domain.kind == "nonneg":
        return sympy.Interval(0, sympy.oo)
    if domain.kind == "pos":
        return sympy.Interval.open(0, sympy.oo)
    if domain.kind == "box" and isinstance(domain.lo, Number) and isinstance(domain.hi, Number):
        return sympy.Interval(domain.lo.value, domain.hi.value)
    return None


# sympy's solver can take minutes on some equations: a conjugate is not started when less
# than this is left of the run's deadline (a started solve is bounded by the size guards
# of ``conjugate``, not interrupted: no signal timer in library code).
MIN_SECONDS_FOR_CONJUGATE = 0.5


@functools.lru_cache(maxsize=512)
def _conjugate(phi: sympy.Expr, t: sympy.Symbol, region: sympy.Interval):  # type: ignore[no-untyped-def]
    """Conjugates are derived and checked once per function and domain."""
    return conjugate(phi, t, region)


def _natural_domain(phi: sympy.Expr, t: sympy.Symbol) -> sympy.Set:
    """Where phi is continuous; a function in pieces (Huber's) is continuous on R when
    each piece is, which sympy's domain finder cannot tell."""
    from sympy.calculus.util import continuous_domain

    if phi.has(sympy.Piecewise):
        phi = sympy.piecewise_fold(phi)
    try:
        if isinstance(phi, sympy.Piecewise):
            parts = [continuous_domain(e, t, sympy.S.Reals) for e, _ in phi.args]
            return sympy.Intersection(*parts) if parts else sympy.S.Reals
        return continuous_domain(phi, t, sympy.S.Reals)
    except (NotImplementedError, ValueError, TypeError):
        return sympy.S.EmptySet  # no domain sympy can state: no closed form is claimed


def separable_infimum(atom: BuildingBlock, s: Expr, x: Symbol, domain: Domain,
                      deadline: Deadline | None = None) -> Infimum | None:
    """-sum(phi*(s)) with the domain of phi* as constraints on s; past ``deadline`` the
    conjugate is not attempted (``DeadlineExceeded`` names the step)."""
    interval = _interval(domain)
    if interval is None or atom.body is None:
        return None
    t = sympy.Symbol("t", real=True)
    var = atom.arg
    assert isinstance(var, Symbol)
    f = scalar_form(atom.body, var, t)
    if f is None:
        return None
    phi = to_sympy(atom.coef, Scope()) * f
    if deadline is not None and deadline.remaining() < MIN_SECONDS_FOR_CONJUGATE:
        raise DeadlineExceeded(f"deriving the conjugate of phi(t) = {_short(phi)}",
                               deadline.seconds or 0.0)
    found = _conjugate_on(phi, t, interval)
    if found is None:
        return None
    conj, shown = found
    data = {d.name: d for d in symbols_of(atom.body) + symbols_of(atom.coef) if d.role == "data"}
    try:
        entries = lift(conj.value, conj.s, s, data)
        relations = lift_interval(conj.domain, s, data)
        minimizer = lift(conj.maximizer, conj.s, s, data) if conj.maximizer is not None else None
    except LiftError:
        return None
    total = b.sum_all(entries) if not entries.shape.is_scalar else entries
    constraints = tuple((lhs, _CLOSED.get(rel, rel), rhs) for lhs, rel, rhs in relations)
    statement = ("the term $#term$ is separable, with $#phi$ entry by entry; its conjugate, "
                 "derived by the Legendre transform and checked numerically, is $#conj$")
    return Infimum(b.neg(total), constraints, minimizer, statement,
                   _formulas(atom, phi, t, shown, conj.s), entries,
                   domain.kind == "box" and strictly_convex_on(phi, t, interval))


def strictly_convex_on(phi: sympy.Expr, t: sympy.Symbol, interval: sympy.Interval) -> bool:
    """Whether phi'' > 0 is shown by sympy's assumptions beyond a finite end of
    ``interval`` (t = lo + p or hi - p with p > 0), or on all of R without one.

    A function continuous on an interval whose second derivative is positive inside it
    is strictly convex there (Boyd and Vandenberghe, 2004, section 3.1.4, from memory);
    showing it on the wider half-line is stronger.  False when sympy cannot tell.
    """
    second = sympy.diff(phi, t, 2)
    p = sympy.Symbol("p", positive=True)
    if interval.left.is_finite:
        second = second.subs(t, interval.left + p)
    elif interval.right.is_finite:
        second = second.subs(t, interval.right - p)
    if second.is_positive:
        return True
    try:
        return bool(sympy.simplify(second).is_positive)
    except (TypeError, ValueError, NotImplementedError):
        return False


def _formulas(atom: BuildingBlock, phi: sympy.Expr, t: sympy.Symbol, conj: sympy.Expr,
              s: sympy.Symbol) -> tuple[tuple[str, object], ...]:
    """The separable term, its entry function and its conjugate, for the step's sentence."""
    from dualize.duality.building_blocks import block_expression

    entry, conjugate_of = sympy.Function("phi"), sympy.Function("phi^*")
    return (("#term", block_expression(atom)),
            ("#phi", sympy.Eq(entry(t), phi, evaluate=False)),
            ("#conj", sympy.Eq(conjugate_of(s), conj, evaluate=False)))


Found = tuple[Conjugate, sympy.Expr] | None
"""phi* with its value as shown in the step (simplified), or None: no closed form."""


def _conjugate_on(phi: sympy.Expr, t: sympy.Symbol, interval: sympy.Interval) -> Found:
    """phi* over the part of ``interval`` where phi is continuous, read from the disk
    cache when an earlier process derived and checked it (see derivation_cache)."""
    return cache.memo(cache.key_of("conjugate", phi, t, interval),  # type: ignore[no-any-return]
                      lambda: _derive_on(phi, t, interval), _to_payload, _from_payload)


def _derive_on(phi: sympy.Expr, t: sympy.Symbol, interval: sympy.Interval) -> Found:
    region = _natural_domain(phi, t).intersect(interval)
    if not isinstance(region, sympy.Interval):
        return None
    try:
        conj = _conjugate(phi, t, region)
    except NoClosedForm:
        return None
    return conj, sympy.simplify(conj.value)


def _to_payload(found: Found) -> dict[str, object]:
    if found is None:
        return {"closed_form": False}
    conj, shown = found
    e = cache.encode
    return {"closed_form": True, "value": e(conj.value), "s": e(conj.s),
            "domain": e(conj.domain), "checked": conj.checked, "shown": e(shown),
            "maximizer": None if conj.maximizer is None else e(conj.maximizer),
            "boundary": [[e(p), e(v)] for p, v in conj.boundary]}


def _from_payload(payload: dict[str, object]) -> Found:
    if payload["closed_form"] is False:
        return None
    d, get = cache.decode, payload.__getitem__
    maximizer = get("maximizer")
    boundary = tuple((d(p), d(v)) for p, v in get("boundary"))  # type: ignore[attr-defined]
    conj = Conjugate(d(get("value")), d(get("s")), d(get("domain")),
                     None if maximizer is None else d(maximizer), get("checked") is True,
                     boundary)
    return conj, d(get("shown"))


def _short(phi: sympy.Expr) -> str:
    text = str(phi)
    return text if len(text) <= 60 else text[:57] + "..."
