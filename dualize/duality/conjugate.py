"""Convex conjugates of closed convex scalar functions, derived, never looked up.

phi*(s) = sup_t (s t - phi(t)) is computed by the Legendre transform: solve
phi'(t) = s for t, keep the real branch that lies in dom phi, substitute into
s t - phi(t) and simplify.  The domain of s is the range of phi' over dom phi,
plus each finite end of that range where the supremum stays finite (s = 0 for
exp), plus everything beyond a range end that comes from a closed finite end
of dom phi (there the supremum sits at that end: (t^2/2 on t >= 0)* is
max(s, 0)^2 / 2, finite for every s).  Affine phi gives the indicator of a
point or of a half-line.

Nothing is returned before it has been checked numerically against the
definition (see conjugate_check); a formula that sympy cannot produce or that
fails the check raises NoClosedForm, so no wrong conjugate reaches a dual.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy
from sympy.core.function import PoleError

from dualize.duality import conjugate_check as check

S = sympy.Symbol("s", real=True)
# What sympy raises when a limit, a solve or a comparison is beyond it; any of them
# means there is no closed form we can trust, never that a wrong one may pass.
SYMPY_TROUBLE = (TypeError, ValueError, NotImplementedError, ZeroDivisionError, PoleError)


class NoClosedForm(Exception):  # noqa: N818 - the name states the outcome, not a fault
    """The conjugate has no closed form that dualize can derive and trust."""

    def __init__(self, reason: str) -> None:
        super().__init__(reason)
        self.reason = reason


@dataclass(frozen=True)
class Conjugate:
    """phi*(s) with its domain and the maximizing t.

    ``value`` holds on the interior of ``domain``; at an included end of the
    domain where the supremum is a limit (s = 0 for exp), ``value`` may need a
    limit to evaluate, and ``boundary`` lists those points with their values.
    ``maximizer`` is None when every t attains the supremum (affine phi on R).
    """

    value: sympy.Expr
    s: sympy.Symbol
    domain: sympy.Set
    maximizer: sympy.Expr | None
    checked: bool
    boundary: tuple[tuple[sympy.Expr, sympy.Expr], ...] = ()


def conjugate(
    phi: sympy.Expr, t: sympy.Symbol, domain: sympy.Interval = sympy.S.Reals
) -> Conjugate:
    """The checked convex conjugate of phi(t) on ``domain``, as a function of S."""
    if not isinstance(domain, sympy.Interval):
        raise NoClosedForm(f"the domain of {t} must be an interval, not {domain}")
    params = _parameters(phi, t, domain)
    try:
        if phi.has(sympy.Piecewise):
            phi = sympy.piecewise_fold(phi)
        if isinstance(phi, sympy.Piecewise):
            from dualize.duality.conjugate_pieces import normalized

            phi = normalized(phi, t, domain)
        dom = _closure(phi, t, domain)
        derived = _derive(phi, t, dom)
        failures = (
            check.first_failure(_claim(phi, t, dom, derived, v)) for v in _parameter_samples(params)
        )
        failure = next((f for f in failures if f is not None), None)
    except SYMPY_TROUBLE as exc:
        raise NoClosedForm(f"sympy could not carry the derivation through: {exc}") from exc
    if failure is not None:
        raise NoClosedForm(failure)
    return Conjugate(derived.value, S, derived.domain, derived.maximizer, True, derived.boundary)


def _derive(phi: sympy.Expr, t: sympy.Symbol, dom: sympy.Interval) -> _Derived:
    if isinstance(phi, sympy.Piecewise):
        return _piecewise(phi, t, dom)
    dphi = sympy.diff(phi, t)
    return _affine(phi, t, dom, dphi) if t not in dphi.free_symbols else _legendre(phi, t, dom)


def _piecewise(phi: sympy.Piecewise, t: sympy.Symbol, dom: sympy.Interval) -> _Derived:
    """A C^1 convex phi in pieces: the Legendre transform of its one strictly convex
    piece on the range of that piece's derivative (``conjugate_pieces``); the affine
    pieces only add the ends of that range."""
    from dualize.duality.conjugate_pieces import strictly_convex_pieces

    [(expr, interval)] = strictly_convex_pieces(phi, t, dom)
    dphi = sympy.diff(expr, t)
    r_lo = _limit(dphi, t, interval.inf, "+")
    r_hi = _limit(dphi, t, interval.sup, "-")
    branch = _select_branch(expr, t, interval, r_lo, r_hi)
    value = _tidy(S * branch - expr.subs(t, branch), r_lo, r_hi, expr, t)
    maximizer = _tidy(branch, r_lo, r_hi, expr, t)
    lo_open = r_lo.is_infinite or (interval.left_open and interval.inf == dom.inf)
    hi_open = r_hi.is_infinite or (interval.right_open and interval.sup == dom.sup)
    return _Derived(value, sympy.Interval(r_lo, r_hi, bool(lo_open), bool(hi_open)), maximizer)


def scaled_conjugate(conj: Conjugate, a: sympy.Expr) -> Conjugate:
    """(a phi)*(s) = a phi*(s / a) for a > 0, with the domain and maximizer scaled.

    The identity is exact, so the numeric check of ``conj`` carries over.
    """
    if a.is_positive is not True:
        raise ValueError(f"the scale {a} is not known to be positive")
    s = conj.s
    maximizer = None if conj.maximizer is None else conj.maximizer.subs(s, s / a)
    boundary = tuple((a * p, a * v) for p, v in conj.boundary)
    value = a * conj.value.subs(s, s / a)
    return Conjugate(value, s, _scale_set(conj.domain, a), maximizer, conj.checked, boundary)


def _scale_set(domain: sympy.Set, a: sympy.Expr) -> sympy.Set:
    if isinstance(domain, sympy.FiniteSet):
        return sympy.FiniteSet(*(a * p for p in domain.args))
    if domain == sympy.S.Reals:
        return domain
    return sympy.Interval(a * domain.inf, a * domain.sup, domain.left_open, domain.right_open)


def _free(t: sympy.Symbol, *exprs: sympy.Basic) -> tuple[sympy.Symbol, ...]:
    """The parameters: symbols other than t, in a fixed order."""
    found: set[sympy.Symbol] = set().union(*(e.free_symbols for e in exprs))
    return tuple(sorted(found - {t}, key=lambda p: p.name))


def _parameters(phi: sympy.Expr, t: sympy.Symbol, domain: sympy.Set) -> tuple[sympy.Symbol, ...]:
    """Symbols other than t; the derivation and the check need them positive."""
    params = _free(t, phi, domain)
    for p in params:
        if p.is_positive is not True:
            raise NoClosedForm(f"the parameter {p} is not known to be positive")
    return params


def _parameter_samples(params: tuple[sympy.Symbol, ...]) -> list[dict[sympy.Symbol, sympy.Expr]]:
    if not params:
        return [{}]
    first = {p: sympy.Rational(7, 10) for p in params}
    spread = {p: sympy.Rational(13, 10) + sympy.Rational(3, 5) * i for i, p in enumerate(params)}
    return [first, spread]


def _limit(expr: sympy.Expr, t: sympy.Symbol, end: sympy.Expr, side: str) -> sympy.Expr:
    try:
        value = sympy.limit(expr, t, end, side)
    except (NotImplementedError, ValueError) as exc:
        raise NoClosedForm(f"cannot take the limit of {expr} as {t} -> {end}") from exc
    if value.has(sympy.nan, sympy.zoo) or isinstance(value, sympy.AccumBounds):
        raise NoClosedForm(f"{expr} has no limit as {t} -> {end}")
    return value


def _closure(phi: sympy.Expr, t: sympy.Symbol, domain: sympy.Interval) -> sympy.Interval:
    """dom of the closure of phi: a finite end belongs to it iff phi has a finite limit there.

    The conjugate of phi equals that of its closure, and -log t on [0, inf) is
    +inf at 0, so the end is open whatever the user wrote.
    """
    lo, hi = domain.inf, domain.sup
    lo_open = lo.is_infinite or _limit(phi, t, lo, "+").is_finite is not True
    hi_open = hi.is_infinite or _limit(phi, t, hi, "-").is_finite is not True
    return sympy.Interval(lo, hi, bool(lo_open), bool(hi_open))


@dataclass(frozen=True)
class _Derived:
    value: sympy.Expr
    domain: sympy.Set
    maximizer: sympy.Expr | None
    boundary: tuple[tuple[sympy.Expr, sympy.Expr], ...] = ()


def _affine(phi: sympy.Expr, t: sympy.Symbol, dom: sympy.Interval, slope: sympy.Expr) -> _Derived:
    """sup_t (s - a) t - b over dom: a point, a half-line or everything."""
    offset = sympy.simplify(phi - slope * t)
    lo, hi = dom.inf, dom.sup
    if lo.is_infinite and hi.is_infinite:
        return _Derived(-offset, sympy.FiniteSet(slope), None)
    if hi.is_infinite:
        return _Derived((S - slope) * lo - offset, sympy.Interval(-sympy.oo, slope), lo)
    if lo.is_infinite:
        return _Derived((S - slope) * hi - offset, sympy.Interval(slope, sympy.oo), hi)
    value = sympy.Max((S - slope) * lo, (S - slope) * hi) - offset
    return _Derived(value, sympy.S.Reals, sympy.Piecewise((lo, S < slope), (hi, True)))


def _legendre(phi: sympy.Expr, t: sympy.Symbol, dom: sympy.Interval) -> _Derived:
    dphi = sympy.diff(phi, t)
    r_lo = _limit(dphi, t, dom.inf, "+")
    r_hi = _limit(dphi, t, dom.sup, "-")
    branch = _select_branch(phi, t, dom, r_lo, r_hi)
    core = _tidy(S * branch - phi.subs(t, branch), r_lo, r_hi, phi, t)
    ext_lo = not dom.left_open and r_lo.is_finite is True
    ext_hi = not dom.right_open and r_hi.is_finite is True
    clip = sympy.Max(S, r_lo) if ext_lo else S
    clip = sympy.Min(clip, r_hi) if ext_hi else clip
    value = core.subs(S, clip)
    value += dom.inf * (S - sympy.Max(S, r_lo)) if ext_lo else 0
    value += dom.sup * (S - sympy.Min(S, r_hi)) if ext_hi else 0
    lower = _end(phi, t, dom.inf, r_lo, ext_lo, "+")
    upper = _end(phi, t, dom.sup, r_hi, ext_hi, "-")
    domain = sympy.Interval(lower[0], upper[0], lower[1], upper[1])
    boundary = tuple(b for b in (lower[2], upper[2]) if b is not None)
    maximizer = _tidy(branch, r_lo, r_hi, phi, t).subs(S, clip)
    return _Derived(value, domain, maximizer, boundary)


def _end(
    phi: sympy.Expr,
    t: sympy.Symbol,
    t_end: sympy.Expr,
    r_end: sympy.Expr,
    extended: bool,
    side: str,
) -> tuple[sympy.Expr, bool, tuple[sympy.Expr, sympy.Expr] | None]:
    """One end of the domain of s: (end, open?, boundary point with its value or None).

    At a finite end r of the range of phi' that is not attained, s t - phi(t)
    is monotone in t, so its sup is the limit as t runs to the end of dom phi;
    the point belongs to the domain iff that limit is finite.
    """
    infinity = -sympy.oo if side == "+" else sympy.oo
    if extended or r_end.is_finite is not True:
        return infinity, True, None
    limit = _limit(sympy.expand(r_end * t - phi), t, t_end, side)
    if limit.is_finite is not True:
        return r_end, True, None
    return r_end, False, (r_end, sympy.simplify(limit))


def _select_branch(
    phi: sympy.Expr, t: sympy.Symbol, dom: sympy.Interval, r_lo: sympy.Expr, r_hi: sympy.Expr
) -> sympy.Expr:
    """The solution of phi'(t) = s that is real, in dom phi and solves it at sample s."""
    dphi = sympy.diff(phi, t)
    candidates = _solutions(dphi, t, _range_sign(r_lo, r_hi))
    candidates += [_real_roots(c) for c in candidates]
    samples = _parameter_samples(_free(t, phi, dom))
    for candidate in dict.fromkeys(candidates):
        if isinstance(candidate, sympy.Expr) and all(
            _branch_fits(candidate, dphi, t, dom, r_lo, r_hi, values) for values in samples
        ):
            return candidate
    raise NoClosedForm(f"no real solution of {dphi} = s lies in the domain of {t}")


def _solutions(dphi: sympy.Expr, t: sympy.Symbol, sign: int | None) -> list[sympy.Expr]:
    """Solutions of phi'(t) = s; with s of one sign also solved for s = +-u, u > 0.

    sympy drops a root such as t = 1/(4 s^2) of -1/(2 sqrt t) = s when it cannot
    tell the sign of s, so the signed solve recovers it.
    """
    _check_size(dphi, t)
    u = sympy.Dummy("u", positive=True)
    try:
        found = [e for e in sympy.solve(sympy.Eq(dphi, S), t) if isinstance(e, sympy.Expr)]
        if sign is not None:
            signed = sympy.solve(sympy.Eq(dphi, sign * u), t)
            found += [e.subs(u, sign * S) for e in signed if isinstance(e, sympy.Expr)]
    except (NotImplementedError, ValueError) as exc:
        raise NoClosedForm(f"cannot solve {dphi} = s for {t}") from exc
    return found


MAX_EXPONENT = 64
"""Largest numerator or denominator of a power of t that sympy is asked to solve with: a
power such as t^1000000 makes it expand dense polynomials of that degree for minutes."""


def _check_size(dphi: sympy.Expr, t: sympy.Symbol) -> None:
    for power in dphi.atoms(sympy.Pow):
        exponent = power.exp
        if power.base.has(t) and exponent.is_Rational and max(
                abs(exponent.p), exponent.q) > MAX_EXPONENT:
            raise NoClosedForm(f"the exponent {exponent} is too large to solve phi'(t) = s "
                               f"symbolically (at most {MAX_EXPONENT})")


def _range_sign(lo: sympy.Expr, hi: sympy.Expr) -> int | None:
    """+1 or -1 when the range of phi' lies on one side of 0, else None."""
    if (lo >= 0) is sympy.true:
        return 1
    if (hi <= 0) is sympy.true:
        return -1
    return None


def _real_roots(expr: sympy.Expr) -> sympy.Expr:
    """Odd roots made real: b^(p/q) with q odd becomes sign(b)^p |b|^(p/q).

    sympy's b^(1/3) is the principal, complex root for b < 0; the inverse of
    t^3 = s on all of R needs the real one.
    """

    def odd(e: sympy.Basic) -> bool:
        exponent = e.exp if isinstance(e, sympy.Pow) else None
        return isinstance(exponent, sympy.Rational) and exponent.q % 2 == 1 and exponent.q > 1

    return expr.replace(odd, lambda e: sympy.sign(e.base) ** e.exp.p * sympy.Abs(e.base) ** e.exp)


def _branch_fits(
    candidate: sympy.Expr,
    dphi: sympy.Expr,
    t: sympy.Symbol,
    dom: sympy.Interval,
    r_lo: sympy.Expr,
    r_hi: sympy.Expr,
    values: dict[sympy.Symbol, sympy.Expr],
) -> bool:
    root = check.numeric(candidate.subs(values), S)
    slope = check.numeric(dphi.subs(values), t)
    t_lo, t_hi = check.constant(dom.inf.subs(values)), check.constant(dom.sup.subs(values))
    s_lo, s_hi = check.constant(r_lo.subs(values)), check.constant(r_hi.subs(values))
    for s in check.interior_points(s_lo, s_hi):
        x = root(s)
        if x is None or not t_lo <= x <= t_hi:
            return False
        d = slope(x)
        if d is None or not check.close(d, s):
            return False
    return True


def _tidy(
    raw: sympy.Expr, r_lo: sympy.Expr, r_hi: sympy.Expr, phi: sympy.Expr, t: sympy.Symbol
) -> sympy.Expr:
    """The shortest of several equivalent forms that agrees with ``raw`` numerically."""
    forms = [raw, sympy.simplify(raw)]
    signed = _signed_simplify(raw, r_lo, r_hi)
    if signed is not None:
        forms.append(signed)
    split = [_split_logs(f, r_lo, r_hi) for f in forms]
    forms += split + [sympy.logcombine(f, force=True) for f in split]
    forms += [r for r in (_rationalized(f) for f in forms) if r is not None]
    forms += [sympy.collect(sympy.expand(f), sorted(f.atoms(sympy.log), key=str)) for f in forms]
    params = _free(t, phi, r_lo, r_hi)
    unique = list(dict.fromkeys(forms))
    good = [f for f in unique if not f.has(sympy.I) and _agrees(f, raw, r_lo, r_hi, params)]
    return min(good, key=_plainness) if good else raw


def _rationalized(form: sympy.Expr) -> sympy.Expr | None:
    """Square roots moved out of numerators: (sqrt(s^2 + 1) - 1)/s = s/(sqrt(s^2 + 1) + 1).

    The first form is 0/0 at s = 0, the second is not; the same is done inside logs.
    """
    if not any(p.exp == sympy.Rational(1, 2) for p in form.atoms(sympy.Pow)):
        return None

    def flip(e: sympy.Expr) -> sympy.Expr:
        return sympy.simplify(1 / sympy.radsimp(1 / e)) if e != 0 else e

    inside = form.replace(lambda e: isinstance(e, sympy.log), lambda e: sympy.log(flip(e.args[0])))
    return flip(inside) if not isinstance(inside, sympy.Add) else inside


def _plainness(form: sympy.Expr) -> tuple[bool, int, int, str]:
    """Forms the IR can hold first (no s^s), then fewer operations, then shorter."""
    odd_power = any(not isinstance(p.exp, sympy.Rational) for p in form.atoms(sympy.Pow))
    return (odd_power, int(sympy.count_ops(form)), len(str(form)), str(form))


def _agrees(
    form: sympy.Expr, raw: sympy.Expr, r_lo: sympy.Expr, r_hi: sympy.Expr, params: tuple
) -> bool:
    for values in _parameter_samples(params):
        a, b = check.numeric(form.subs(values), S), check.numeric(raw.subs(values), S)
        lo, hi = check.constant(r_lo.subs(values)), check.constant(r_hi.subs(values))
        for s in check.sample_points(lo, hi):
            x, y = a(s), b(s)
            if x is None or (y is not None and not check.close(x, y)):
                return False
    return True


def _signed_simplify(raw: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr) -> sympy.Expr | None:
    """Simplify with s written as +u or -u, u > 0, when the range has one sign.

    When it has both and the two sides agree, the result is even in s and is
    written in |s| ((t^4 / 4)* = 3 |s|^(4/3) / 4).
    """
    sign = _range_sign(lo, hi)
    u = sympy.Dummy("u", positive=True)
    if sign is not None:
        return sympy.simplify(raw.subs(S, sign * u)).subs(u, sign * S)
    if (lo < 0) is sympy.true and (hi > 0) is sympy.true:
        positive, negative = (sympy.simplify(raw.subs(S, k * u)) for k in (1, -1))
        if positive == negative:
            return positive.subs(u, sympy.Abs(S))
    return None


def _split_logs(expr: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr) -> sympy.Expr:
    """log(p/q) -> log(|p|) - log(|q|) factor by factor, signs taken on the range of s."""
    return expr.replace(lambda e: isinstance(e, sympy.log), lambda e: _split_log(e.args[0], lo, hi))


def _split_log(arg: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr) -> sympy.Expr:
    if arg.free_symbols - {S} or lo.free_symbols or hi.free_symbols:
        return sympy.log(arg)
    numer, denom = sympy.fraction(sympy.factor(arg))
    inside = check.interior_points(check.constant(lo), check.constant(hi))
    constant, terms = sympy.Integer(1), []
    for part, power in ((numer, 1), (denom, -1)):
        for factor in sympy.Mul.make_args(part):
            if S not in factor.free_symbols:
                constant *= factor**power
                continue
            base, exp = factor.as_base_exp()
            sign = _constant_sign(base, lo, hi, inside)
            if sign is None or not exp.is_integer:
                return sympy.log(arg)
            constant *= (sign**exp) ** power
            terms.append(power * exp * sympy.log(sign * base))
    if not constant.is_positive:
        return sympy.log(arg)
    return sympy.log(constant) + sympy.Add(*terms)


def _constant_sign(
    base: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr, inside: list[float]
) -> int | None:
    if not base.is_polynomial(S):
        return None
    roots = sympy.solveset(base, S, sympy.Interval.open(lo, hi))
    if roots != sympy.S.EmptySet:
        return None
    value = check.numeric(base, S)(inside[len(inside) // 2])
    return None if value is None or value == 0 else (1 if value > 0 else -1)


def _claim(
    phi: sympy.Expr,
    t: sympy.Symbol,
    dom: sympy.Interval,
    derived: _Derived,
    values: dict[sympy.Symbol, sympy.Expr],
) -> check.Claim:
    """The derived formulas with the parameters replaced by sample numbers."""
    phi_n = phi.subs(values)
    maximizer = derived.maximizer
    return check.Claim(
        phi=check.numeric(phi_n, t),
        curvature=check.numeric(sympy.diff(phi_n, t, 2), t),
        value=check.numeric(derived.value.subs(values), S),
        maximizer=None if maximizer is None else check.numeric(maximizer.subs(values), S),
        t_domain=(
            check.constant(dom.inf.subs(values)),
            check.constant(dom.sup.subs(values)),
            bool(dom.left_open),
            bool(dom.right_open),
        ),
        s_domain=derived.domain.subs(values),
        boundary=tuple(
            (check.constant(p.subs(values)), check.constant(v.subs(values)))
            for p, v in derived.boundary
        ),
    )
