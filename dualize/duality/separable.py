"""Separable terms: inf over x of sum_i phi(x_i) - s'x = -sum_i phi*(s_i).

phi is read off the IR as a scalar function (``elementwise.scalar_form``), its
conjugate is derived and checked numerically (``conjugate``), and the answer
is lifted back entry by entry (``elementwise.lift``).  The domain of phi* gives
the dual constraints; an open end is stated by its closure, which leaves the
supremum of the dual unchanged.
"""

from __future__ import annotations

import contextlib
import functools
import signal
import threading
from collections.abc import Iterator

import sympy

from dualize.duality import build as b
from dualize.duality import derivation_cache as cache
from dualize.duality.atoms import Atom, Infimum
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


# sympy's solver can take minutes on some transcendental equations; past this budget
# the infimum is kept (reported as such) rather than the command hanging.
CONJUGATE_SECONDS = 20.0


class _OutOfTime(Exception):  # noqa: N818 - private control flow
    pass


class _TimedOut(NoClosedForm):
    """No conjugate within the time budget: an outcome of this machine, never cached."""


@contextlib.contextmanager
def _time_limit(seconds: float) -> Iterator[None]:
    """A wall-clock limit by SIGALRM, where signals can be used (the main thread)."""
    if threading.current_thread() is not threading.main_thread() or not hasattr(
            signal, "setitimer"):
        yield
        return

    def expire(signum: int, frame: object) -> None:
        raise _OutOfTime

    previous = signal.signal(signal.SIGALRM, expire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


@functools.lru_cache(maxsize=512)
def _conjugate(phi: sympy.Expr, t: sympy.Symbol, region: sympy.Interval):  # type: ignore[no-untyped-def]
    """Conjugates are derived and checked once per function and domain."""
    try:
        with _time_limit(CONJUGATE_SECONDS):
            return conjugate(phi, t, region)
    except _OutOfTime:
        raise _TimedOut(f"no conjugate found within {CONJUGATE_SECONDS:.0f} s") from None


def separable_infimum(atom: Atom, s: Expr, x: Symbol, domain: Domain) -> Infimum | None:
    """-sum(phi*(s)) with the domain of phi* as constraints on s."""
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
    statement = (f"the term is separable, sum_i phi({var.name}_i) with phi(t) = {phi}; its "
                 f"conjugate is phi*(s) = {shown} (derived by the "
                 "Legendre transform and checked numerically)")
    return Infimum(b.neg(total), constraints, minimizer, statement)


Found = tuple[Conjugate, sympy.Expr] | None
"""phi* with its value as shown in the step (simplified), or None: no closed form."""


def _conjugate_on(phi: sympy.Expr, t: sympy.Symbol, interval: sympy.Interval) -> Found:
    """phi* over the part of ``interval`` where phi is continuous, read from the disk
    cache when an earlier process derived and checked it (see conjugate_cache)."""
    try:
        return cache.memo(cache.key_of("conjugate", phi, t, interval),  # type: ignore[no-any-return]
                          lambda: _derive_on(phi, t, interval), _to_payload, _from_payload)
    except _TimedOut:
        return None


def _derive_on(phi: sympy.Expr, t: sympy.Symbol, interval: sympy.Interval) -> Found:
    from sympy.calculus.util import continuous_domain

    region = continuous_domain(phi, t, sympy.S.Reals).intersect(interval)
    if not isinstance(region, sympy.Interval):
        return None
    try:
        conj = _conjugate(phi, t, region)
    except _TimedOut:
        raise
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
