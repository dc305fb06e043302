"""Numeric evidence for a conjugate formula, gathered before the formula is used.

A symbolic Legendre transform can pick a wrong branch, lose a sign in a log or
miss a boundary point, and sympy gives no warning.  So every conjugate is tested
against its definition phi*(s) = sup_t (s t - phi(t)): a 1-D numeric
maximization at sample points inside the domain of s, the Fenchel-Young
inequality phi(t) + phi*(s) >= s t at sample pairs, and divergence of the
supremum just outside the domain.  The functions here return a failure message
(or None) rather than raising, so the caller decides what a failure means.

Evaluation goes through mpmath (at 30 digits), which does not overflow on
exp(1e8) and reports complex values instead of silently returning nan.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import sympy

Scalar = Callable[[float], float | None]
RTOL = 1e-6
SLACK = 1e-9


@dataclass(frozen=True)
class Claim:
    """What a conjugate formula asserts, with every parameter already a number."""

    phi: Scalar
    curvature: Scalar
    value: Scalar
    maximizer: Scalar | None
    t_domain: tuple[float, float, bool, bool]
    s_domain: sympy.Set
    boundary: tuple[tuple[float, float], ...]


def numeric(expr: sympy.Expr, var: sympy.Symbol) -> Scalar:
    """A real-valued function of one float, None where the value is not a finite real."""
    import mpmath

    if expr.free_symbols - {var}:
        return lambda x: None
    compiled = sympy.lambdify(var, expr, modules="mpmath", dummify=True)

    def call(x: float) -> float | None:
        with mpmath.workdps(30):
            try:
                out = compiled(mpmath.mpf(x))
            except (ValueError, ZeroDivisionError, OverflowError, TypeError):
                return None
            return _real(out)

    return call


def _real(out: object) -> float | None:
    import mpmath

    if isinstance(out, mpmath.mpc):
        if abs(out.imag) > 1e-20 * (1 + abs(out.real)):
            return None
        out = out.real
    try:
        value = float(out)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        return None
    return value if math.isfinite(value) else None


def constant(expr: sympy.Expr) -> float:
    """A number (possibly +-inf) from an expression without free symbols."""
    if expr == sympy.oo:
        return math.inf
    if expr == -sympy.oo:
        return -math.inf
    return float(sympy.N(expr, 30))


def interior_points(lo: float, hi: float) -> list[float]:
    """Sample points strictly inside (lo, hi), spread over scales that matter."""
    if math.isfinite(lo) and math.isfinite(hi):
        return [lo + (hi - lo) * f for f in (0.05, 0.25, 0.5, 0.75, 0.95)]
    if math.isfinite(lo):
        return [lo + w for w in (0.05, 0.4, 1.0, 2.5, 6.0)]
    if math.isfinite(hi):
        return [hi - w for w in (0.05, 0.4, 1.0, 2.5, 6.0)]
    return [-3.0, -1.2, -0.3, 0.4, 1.1, 2.7]


def sample_points(lo: float, hi: float) -> list[float]:
    """Interior points plus -1, 0 and 1 where they lie inside (lo, hi).

    A formula such as (sqrt(s^2 + 1) - 1) / s is 0/0 at s = 0 although the
    conjugate is finite there; the landmarks catch such removable singularities.
    """
    landmarks = [p for p in (-1.0, 0.0, 1.0) if lo < p < hi]
    return sorted(set(interior_points(lo, hi) + landmarks))


def set_points(domain: sympy.Set) -> list[float]:
    """Sample points of a domain of s: a single point or the interior of an interval."""
    if isinstance(domain, sympy.FiniteSet):
        return [constant(p) for p in sorted(domain.args, key=str)]
    return sample_points(constant(domain.inf), constant(domain.sup))


def close(a: float, b: float) -> bool:
    return abs(a - b) <= RTOL * max(1.0, abs(a), abs(b))


def first_failure(claim: Claim) -> str | None:
    """The first way the claim disagrees with the definition, or None."""
    checks = (_convexity, _values, _boundary, _fenchel_young, _divergence)
    for check in checks:
        failure = check(claim)
        if failure is not None:
            return failure
    return None


def _t_points(claim: Claim) -> list[float]:
    lo, hi, _, _ = claim.t_domain
    return interior_points(lo, hi)


def _convexity(claim: Claim) -> str | None:
    for t in _t_points(claim):
        second = claim.curvature(t)
        if second is None or second < -SLACK * (1 + abs(second)):
            return f"phi is not convex on its domain (phi''({t:.6g}) = {second})"
    return None


def _gap(claim: Claim, s: float) -> Scalar:
    def g(t: float) -> float | None:
        p = claim.phi(t)
        return None if p is None else s * t - p

    return g


def _values(claim: Claim) -> str | None:
    for s in set_points(claim.s_domain):
        formula = claim.value(s)
        if formula is None:
            return f"the conjugate formula is not real at s = {s:.6g}"
        t0 = claim.maximizer(s) if claim.maximizer is not None else 0.0
        if t0 is None:
            return f"the maximizer formula is not real at s = {s:.6g}"
        found = numeric_sup(_gap(claim, s), t0, claim.t_domain)
        if found is None or not close(found, formula):
            return f"numeric sup at s = {s:.6g} is {found}, the formula gives {formula:.12g}"
        attained = _gap(claim, s)(_inside(t0, claim.t_domain))
        if claim.maximizer is not None and (attained is None or not close(attained, formula)):
            return f"the maximizer does not attain the sup at s = {s:.6g}"
    return None


def _inside(t: float, t_domain: tuple[float, float, bool, bool]) -> float:
    lo, hi, _, _ = t_domain
    eps_lo = 1e-9 * (1 + abs(lo)) if math.isfinite(lo) else 0.0
    eps_hi = 1e-9 * (1 + abs(hi)) if math.isfinite(hi) else 0.0
    return min(max(t, lo + eps_lo), hi - eps_hi)


def numeric_sup(g: Scalar, t0: float, t_domain: tuple[float, float, bool, bool]) -> float | None:
    """sup of the concave g by golden-section search on windows around t0 that grow.

    A maximum found at a window edge that is not an end of the domain means the
    window was too small; it is widened until the maximum is interior.
    """
    lo = _inside(-math.inf, t_domain)
    hi = _inside(math.inf, t_domain)
    t0 = _inside(t0, t_domain)
    width = 1.0 + abs(t0)

    def value(t: float) -> float:
        found = g(t)
        return -math.inf if found is None else found

    for _ in range(40):
        a, b = max(t0 - width, lo), min(t0 + width, hi)
        x, fx = golden_section_max(value, a, b, 1e-11 * (1 + abs(t0)))
        best = max(fx, value(a), value(b))
        edge = 1e-6 * (b - a)
        interior = (x - a > edge or a == lo) and (b - x > edge or b == hi)
        if interior or best <= value(t0) + 1e-12 * (1 + abs(best)):
            return best
        width *= 4.0
    return None


GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


def golden_section_max(f: Callable[[float], float], a: float, b: float,
                       tol: float) -> tuple[float, float]:
    """The maximizer of a unimodal f on [a, b] to within ``tol``, with its value.

    Golden-section search (J. Kiefer, Proc. AMS 4, 1953; Nocedal and Wright,
    Numerical Optimization, 2006, section 3.5 for the bracketing it needs): each
    step keeps the sub-interval that must hold the maximum of a unimodal
    function and reuses one of the two inner points.  Written here rather than
    taken from scipy.optimize, whose import costs more (0.65 s) than every
    conjugate check of a derivation together.
    """
    c, d = b - GOLDEN * (b - a), a + GOLDEN * (b - a)
    fc, fd = f(c), f(d)
    for _ in range(200):
        if b - a <= tol:
            break
        if fc >= fd:
            b, d, fd = d, c, fc
            c = b - GOLDEN * (b - a)
            fc = f(c)
        else:
            a, c, fc = c, d, fd
            d = a + GOLDEN * (b - a)
            fd = f(d)
    return (c, fc) if fc >= fd else (d, fd)


def _boundary(claim: Claim) -> str | None:
    """An included end s0 of the domain where the sup is a limit, not a maximum."""
    for s0, expected in claim.boundary:
        g = _gap(claim, s0)
        values = [g(t) for t in _toward_end(claim, s0)]
        if any(v is None for v in values):
            return f"s - phi(t) is not real along the way to the sup at s = {s0:.6g}"
        if max(values) > expected + RTOL * max(1.0, abs(expected)):  # type: ignore[type-var]
            return f"the sup at the boundary point s = {s0:.6g} exceeds {expected:.12g}"
        if not close(values[-1], expected):  # type: ignore[arg-type]
            return f"the sup at the boundary point s = {s0:.6g} does not tend to {expected:.12g}"
    return None


def _toward_end(claim: Claim, s0: float) -> list[float]:
    """Points running to the end of dom phi where s0 t - phi(t) approaches its sup."""
    lo, hi, _, _ = claim.t_domain
    upper = s0 >= constant(claim.s_domain.sup) if not _is_point(claim) else True
    end, direction = (hi, 1.0) if upper else (lo, -1.0)
    if math.isfinite(end):
        return [end - direction * 10.0**-k for k in range(1, 12)]
    anchor = lo if direction > 0 and math.isfinite(lo) else hi if math.isfinite(hi) else 0.0
    return [anchor + direction * 10.0**k for k in range(1, 9)]


def _is_point(claim: Claim) -> bool:
    return isinstance(claim.s_domain, sympy.FiniteSet)


def _fenchel_young(claim: Claim) -> str | None:
    for t in _t_points(claim):
        p = claim.phi(t)
        for s in set_points(claim.s_domain):
            q = claim.value(s)
            if p is None or q is None:
                return f"phi or its conjugate is not real at t = {t:.6g}, s = {s:.6g}"
            if p + q - s * t < -SLACK * (1 + abs(p) + abs(q) + abs(s * t)):
                return f"Fenchel-Young fails at t = {t:.6g}, s = {s:.6g}"
    return None


def _divergence(claim: Claim) -> str | None:
    """Just outside the domain of s, s t - phi(t) must grow without bound."""
    for s, direction in outside_points(claim.s_domain):
        failure = _diverges(claim, s, direction)
        if failure is not None:
            return failure
    return None


def outside_points(domain: sympy.Set) -> list[tuple[float, float]]:
    """Points just beyond each finite end of the domain, with the side they lie on."""
    if isinstance(domain, sympy.FiniteSet):
        (point,) = (constant(p) for p in domain.args)
        return [(point - 1.0, -1.0), (point + 1.0, 1.0)]
    out: list[tuple[float, float]] = []
    lo, hi = constant(domain.inf), constant(domain.sup)
    if math.isfinite(lo):
        out += [(lo, -1.0)] if domain.left_open else []
        out.append((lo - 0.5 - 0.5 * abs(lo), -1.0))
    if math.isfinite(hi):
        out += [(hi, 1.0)] if domain.right_open else []
        out.append((hi + 0.5 + 0.5 * abs(hi), 1.0))
    return out


def _diverges(claim: Claim, s: float, direction: float) -> str | None:
    lo, hi, _, _ = claim.t_domain
    if not math.isfinite(hi if direction > 0 else lo):
        anchor = lo if direction > 0 and math.isfinite(lo) else hi if math.isfinite(hi) else 0.0
        values = [_gap(claim, s)(anchor + direction * 10.0**k) for k in range(1, 13)]
        if all(v is not None for v in values) and _grows(values):  # type: ignore[arg-type]
            return None
    return f"the sup at s = {s:.6g}, outside the domain, was not seen to diverge"


def _grows(values: Sequence[float]) -> bool:
    """Values at t = 10, 100, ... that run off to +infinity, at least like a logarithm.

    Growth by 5 or more with a rising tail is divergence; so are gains per decade
    that stay positive and do not shrink (a log grows by the same amount each
    decade, while a convergent 1/t gains ten times less each decade).
    """
    gains = [b - a for a, b in zip(values, values[1:], strict=False)][-6:]
    if any(g < 0 for g in gains[-3:]):
        return False
    if values[-1] - values[0] >= 5:
        return True
    return all(g > 0 for g in gains) and all(
        b >= 0.9 * a for a, b in zip(gains, gains[1:], strict=False)
    )
