"""Conjugates of scalar functions against published results and the definition."""

from __future__ import annotations

import math
import os
import subprocess
import sys
from fractions import Fraction
from functools import cache
from pathlib import Path

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from dualize.duality import conjugate_check as check
from dualize.duality.conjugate import Conjugate, NoClosedForm, S, conjugate, scaled_conjugate

T = sympy.Symbol("t", real=True)
C = sympy.Symbol("c", positive=True)
POSITIVE = sympy.Interval.open(0, sympy.oo)
NONNEG = sympy.Interval(0, sympy.oo)
REALS = sympy.S.Reals
REPO = Path(__file__).resolve().parents[2]


@cache
def derived(name: str) -> tuple[sympy.Expr, sympy.Interval, Conjugate]:
    phi, domain = CASES[name]
    return phi, domain, conjugate(phi, T, domain)


CASES: dict[str, tuple[sympy.Expr, sympy.Interval]] = {
    "negative entropy": (T * sympy.log(T), POSITIVE),
    "negative log": (-sympy.log(T), POSITIVE),
    "exponential": (sympy.exp(T), REALS),
    "half square": (T**2 / 2, REALS),
    "softplus": (sympy.log(1 + sympy.exp(T)), REALS),
    "half square on t >= 0": (T**2 / 2, NONNEG),
    "cube over three on t >= 0": (T**3 / 3, NONNEG),
    "reciprocal": (1 / T, POSITIVE),
    "scaled half square": (T**2 / (2 * C), REALS),
    "negative square root": (-sympy.sqrt(T), NONNEG),
    "quartic": (T**4 / 4, REALS),
    "half square on a box": (T**2 / 2, sympy.Interval(0, C)),
    "barrier of (-1, 1)": (-sympy.log(1 - T**2), sympy.Interval.open(-1, 1)),
}


def same(a: sympy.Expr, b: sympy.Expr) -> bool:
    return sympy.simplify(a - b) == 0


# S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.3.1, Example 3.21
# (negative entropy), from memory: (t log t)*(s) = exp(s - 1) on all of R.
def test_negative_entropy() -> None:
    _, _, conj = derived("negative entropy")
    assert same(conj.value, sympy.exp(S - 1))
    assert conj.domain == REALS
    assert same(conj.maximizer, sympy.exp(S - 1))
    assert conj.checked


# Boyd and Vandenberghe, 2004, section 3.3.1, Example 3.21 (negative logarithm), from
# memory: (-log t)*(s) = -log(-s) - 1 for s < 0, +infinity otherwise.
def test_negative_log() -> None:
    _, _, conj = derived("negative log")
    assert same(conj.value, -sympy.log(-S) - 1)
    assert conj.domain == sympy.Interval.open(-sympy.oo, 0)
    assert conj.boundary == ()


# Boyd and Vandenberghe, 2004, section 3.3.1, Example 3.21 (exponential), from memory:
# (exp t)*(s) = s log s - s for s >= 0, with the value 0 at s = 0.
def test_exponential() -> None:
    _, _, conj = derived("exponential")
    assert same(conj.value, S * sympy.log(S) - S)
    assert conj.domain == NONNEG
    assert conj.boundary == ((0, 0),)


# Boyd and Vandenberghe, 2004, section 3.3.1, Example 3.22 (strictly convex quadratic,
# here Q = 1), from memory: (t^2 / 2)*(s) = s^2 / 2.
def test_half_square() -> None:
    _, _, conj = derived("half square")
    assert same(conj.value, S**2 / 2)
    assert conj.domain == REALS
    assert same(conj.maximizer, S)


# Boyd and Vandenberghe, 2004, section 3.3 (conjugate of log(1 + e^t), an exercise of
# chapter 3), from memory: s log s + (1 - s) log(1 - s) on [0, 1], 0 at both ends.
def test_softplus() -> None:
    _, _, conj = derived("softplus")
    assert same(conj.value, S * sympy.log(S) + (1 - S) * sympy.log(1 - S))
    assert conj.domain == sympy.Interval(0, 1)
    assert conj.boundary == ((0, 0), (1, 0))


# Boyd and Vandenberghe, 2004, section 3.3.1, Example 3.21 (inverse), from memory:
# (1/t on t > 0)*(s) = -2 sqrt(-s) for s <= 0.
def test_reciprocal() -> None:
    _, _, conj = derived("reciprocal")
    assert same(conj.value, -2 * sympy.sqrt(-S))
    assert conj.domain == sympy.Interval(-sympy.oo, 0)
    assert conj.boundary == ((0, 0),)


# Boyd and Vandenberghe, 2004, section 3.3.1 (power functions; conjugate exponents with
# 1/p + 1/q = 1), from memory: (t^p / p on t >= 0)*(s) = s^q / q for s >= 0.  For
# s < 0 the supremum over t >= 0 sits at t = 0 and is 0 (common practice: s t - t^p/p
# is decreasing on t >= 0 there), so the conjugate is max(s, 0)^q / q on all of R.
@pytest.mark.parametrize(
    ("name", "q"),
    [("half square on t >= 0", 2), ("cube over three on t >= 0", sympy.Rational(3, 2))],
)
def test_power_on_half_line(name: str, q: sympy.Rational) -> None:
    _, _, conj = derived(name)
    u = sympy.Symbol("u", positive=True)
    assert same(conj.value.subs(S, u), u**q / q)
    assert conj.value.subs(S, -u) == 0
    assert conj.domain == REALS


# Boyd and Vandenberghe, 2004, section 3.3.2 (scaling: (a f)*(y) = a f*(y / a) for
# a > 0) together with Example 3.22, from memory: (t^2 / (2c))*(s) = c s^2 / 2.
def test_scaled_half_square_with_parameter() -> None:
    _, _, conj = derived("scaled half square")
    assert same(conj.value, C * S**2 / 2)
    assert same(conj.maximizer, C * S)


# Boyd and Vandenberghe, 2004, section 3.3.2 (scaling), from memory; the scaled formula
# is compared with an independent numeric supremum of s t - a exp(t).
def test_scaled_conjugate_matches_numeric_sup() -> None:
    a = sympy.Integer(3)
    scaled = scaled_conjugate(derived("exponential")[2], a)
    assert scaled.domain == NONNEG
    assert same(scaled.value, S * sympy.log(S / 3) - S)
    for s in (0.2, 1.0, 3.0, 7.5):
        expected = independent_sup(lambda t: 3 * math.exp(t), s, (-60.0, 60.0))
        assert float(scaled.value.subs(S, s)) == pytest.approx(expected, rel=1e-6)


# R. T. Rockafellar, Convex Analysis, 1970, section 12 (the conjugate of |t|^p / p is
# |s|^q / q with 1/p + 1/q = 1), from memory; here p = 4 and q = 4/3, which needs the
# real cube root of phi'(t) = t^3 = s for negative s.
def test_quartic_uses_the_real_cube_root() -> None:
    _, _, conj = derived("quartic")
    assert same(conj.value, sympy.Rational(3, 4) * sympy.Abs(S) ** sympy.Rational(4, 3))
    assert conj.domain == REALS


# Common practice (derived by hand): sup over t >= 0 of s t + sqrt(t) is attained at
# t = 1/(4 s^2) with value -1/(4 s) when s < 0, and is +infinity when s >= 0.
def test_negative_square_root() -> None:
    _, _, conj = derived("negative square root")
    assert same(conj.value, -1 / (4 * S))
    assert conj.domain == sympy.Interval.open(-sympy.oo, 0)
    assert same(conj.maximizer, 1 / (4 * S**2))


# Common practice (derived by hand): on the box [0, c] the supremum of s t - t^2/2 sits
# at t = min(max(s, 0), c), so the conjugate is finite for every s; the formula is
# compared with an independent numeric supremum at c = 3/2.
def test_half_square_on_a_box() -> None:
    _, _, conj = derived("half square on a box")
    assert conj.domain == REALS
    for s in (-2.0, 0.3, 1.2, 4.0):
        expected = independent_sup(lambda t: t * t / 2, s, (0.0, 1.5))
        assert float(conj.value.subs({C: sympy.Rational(3, 2), S: s})) == pytest.approx(expected)


# Common practice (derived by hand): sup over -1 < t < 1 of s t + log(1 - t^2) is 0 at
# s = 0 (t = 0).  The Legendre formula sympy first finds is 0/0 there; the returned
# one must be defined at s = 0 and agree with the numeric supremum on both sides.
def test_barrier_conjugate_is_defined_at_zero() -> None:
    _, _, conj = derived("barrier of (-1, 1)")
    assert conj.domain == REALS
    assert conj.value.subs(S, 0) == 0
    assert conj.maximizer.subs(S, 0) == 0
    phi = NUMPY_PHI["barrier of (-1, 1)"][0]
    for s in (-5.0, -0.1, 0.1, 2.0):
        expected = independent_sup(phi, s, (-1 + 1e-12, 1 - 1e-12))
        assert float(conj.value.subs(S, s)) == pytest.approx(expected, rel=1e-6)


def test_scaled_conjugate_needs_positive_scale() -> None:
    with pytest.raises(ValueError):
        scaled_conjugate(derived("exponential")[2], sympy.Symbol("a", real=True))


# Boyd and Vandenberghe, 2004, section 3.3.1, Example 3.21 (affine function), from
# memory: (a t + b)* is -b at s = a and +infinity elsewhere.
def test_affine_is_indicator_of_a_point() -> None:
    conj = conjugate(3 * T + 1, T)
    assert conj.domain == sympy.FiniteSet(3)
    assert conj.value == -1
    assert conj.maximizer is None


# Common practice (derived by hand): sup over t >= 0 of (s - 3) t - 1 is -1 at t = 0
# when s <= 3 and +infinity when s > 3.
def test_affine_on_half_line() -> None:
    conj = conjugate(3 * T + 1, T, NONNEG)
    assert conj.domain == sympy.Interval(-sympy.oo, 3)
    assert conj.value == -1


def test_nonconvex_function_is_refused() -> None:
    with pytest.raises(NoClosedForm, match="not convex"):
        conjugate(-(T**2), T)


def test_parameter_of_unknown_sign_is_refused() -> None:
    with pytest.raises(NoClosedForm, match="positive"):
        conjugate(T**2 / sympy.Symbol("k", real=True), T)


def test_checker_rejects_a_wrong_formula() -> None:
    claim = exponential_claim(value=S * sympy.log(S), domain=NONNEG)
    assert check.first_failure(claim) is not None


def test_checker_rejects_a_domain_that_is_too_small() -> None:
    claim = exponential_claim(value=S * sympy.log(S) - S, domain=sympy.Interval(1, sympy.oo))
    failure = check.first_failure(claim)
    assert failure is not None and "diverge" in failure


def test_checker_accepts_the_right_formula() -> None:
    claim = exponential_claim(value=S * sympy.log(S) - S, domain=NONNEG)
    assert check.first_failure(claim) is None


def exponential_claim(value: sympy.Expr, domain: sympy.Set) -> check.Claim:
    return check.Claim(
        phi=check.numeric(sympy.exp(T), T),
        curvature=check.numeric(sympy.exp(T), T),
        value=check.numeric(value, S),
        maximizer=check.numeric(sympy.log(S), S),
        t_domain=(-math.inf, math.inf, True, True),
        s_domain=domain,
        boundary=(),
    )


def independent_sup(phi, s: float, bracket: tuple[float, float]) -> float:  # noqa: ANN001
    """sup of s t - phi(t) by scipy's bounded search on a wide bracket (no formula used)."""
    res = minimize_scalar(
        lambda t: phi(t) - s * t, bounds=bracket, method="bounded", options={"xatol": 1e-12}
    )
    return -float(res.fun)


NUMPY_PHI = {
    "negative entropy": (lambda t: t * math.log(t), (1e-12, 1e3)),
    "negative log": (lambda t: -math.log(t), (1e-9, 1e4)),
    "exponential": (math.exp, (-60.0, 30.0)),
    "half square": (lambda t: t * t / 2, (-1e3, 1e3)),
    "softplus": (lambda t: math.log1p(math.exp(t)) if t < 30 else t + math.exp(-t), (-80.0, 80.0)),
    "half square on t >= 0": (lambda t: t * t / 2, (0.0, 1e3)),
    "cube over three on t >= 0": (lambda t: t**3 / 3, (0.0, 1e2)),
    "reciprocal": (lambda t: 1 / t, (1e-6, 1e6)),
    "negative square root": (lambda t: -math.sqrt(t), (0.0, 1e6)),
    "quartic": (lambda t: t**4 / 4, (-1e2, 1e2)),
    "barrier of (-1, 1)": (lambda t: -math.log1p(-t * t), (-1 + 1e-12, 1 - 1e-12)),
}


# Common practice: the conjugate is by definition the supremum of s t - phi(t); this
# compares each derived formula with scipy's bounded scalar search at random s inside
# the domain, away from the ends where the supremum is only approached.
@settings(max_examples=30, deadline=None)
@given(st.sampled_from(sorted(NUMPY_PHI)), st.floats(0.02, 0.98))
def test_formula_equals_numeric_sup(name: str, fraction: float) -> None:
    _, _, conj = derived(name)
    s = point_in(conj.domain, fraction)
    phi, bracket = NUMPY_PHI[name]
    expected = independent_sup(phi, s, bracket)
    assert float(conj.value.subs(S, s)) == pytest.approx(expected, rel=1e-6, abs=1e-7)


# Fenchel-Young inequality (Boyd and Vandenberghe, 2004, section 3.3.1, from memory):
# phi(t) + phi*(s) >= s t for every t in dom phi and s in dom phi*, with equality
# when t is the maximizer for s.
@settings(max_examples=60, deadline=None)
@given(st.sampled_from(sorted(CASES)), st.floats(0.01, 0.99), st.floats(0.01, 0.99))
def test_fenchel_young(name: str, t_fraction: float, s_fraction: float) -> None:
    phi, domain, conj = derived(name)
    values = {C: sympy.Rational(3, 2)}
    t = point_in(domain.subs(values), t_fraction)
    s = point_in(conj.domain.subs(values), s_fraction)
    lhs = float(phi.subs(values).subs(T, t)) + float(conj.value.subs(values).subs(S, s))
    assert lhs >= s * t - 1e-9 * (1 + abs(lhs) + abs(s * t))
    best = float(conj.maximizer.subs(values).subs(S, s))
    tight = float(phi.subs(values).subs(T, best)) + float(conj.value.subs(values).subs(S, s))
    assert tight == pytest.approx(s * best, rel=1e-9, abs=1e-9)


def point_in(domain: sympy.Set, fraction: float) -> float:
    """A point of the interior of an interval, mapped from (0, 1) through a logit."""
    lo, hi = check.constant(domain.inf), check.constant(domain.sup)
    spread = math.log(fraction / (1 - fraction))
    if math.isfinite(lo) and math.isfinite(hi):
        return lo + (hi - lo) * fraction
    if math.isfinite(lo):
        return lo + math.exp(spread)
    if math.isfinite(hi):
        return hi - math.exp(spread)
    return 2 * spread


DETERMINISM_SCRIPT = """
import sympy
from dualize.duality.conjugate import conjugate
t = sympy.Symbol("t", real=True)
c = conjugate(sympy.log(1 + sympy.exp(t)), t)
print(sympy.srepr(c.value), sympy.srepr(c.domain), sympy.srepr(c.maximizer), c.boundary)
"""


# Common practice (reproducible builds): the same input gives byte-identical output,
# whatever the hash seed of the interpreter.
def test_deterministic_across_hash_seeds() -> None:
    outputs = []
    for seed in ("1", "2"):
        env = {**os.environ, "PYTHONHASHSEED": seed, "PYTHONPATH": str(REPO)}
        run = subprocess.run(
            [sys.executable, "-c", DETERMINISM_SCRIPT],
            env=env,
            capture_output=True,
            text=True,
            check=True,
            cwd=REPO,
        )
        outputs.append(run.stdout)
    assert outputs[0] == outputs[1]
    assert len(outputs[0].splitlines()) == 1


FAMILIES = {
    "shifted quadratic": (
        lambda a, b: a * (T - b) ** 2 / 2 + b,
        lambda a, b: lambda t: a * (t - b) ** 2 / 2 + b,
        REALS,
        (-1e3, 1e3),
    ),
    "scaled exponential": (
        lambda a, b: a * sympy.exp(b * T),
        lambda a, b: lambda t: a * math.exp(b * t),
        REALS,
        (-200.0, 50.0),
    ),
    "scaled log barrier": (
        lambda a, b: -a * sympy.log(b * T),
        lambda a, b: lambda t: -a * math.log(b * t),
        POSITIVE,
        (1e-9, 1e4),
    ),
}


# Common practice: the conjugate is the supremum of s t - phi(t) by definition; random
# positive constants in a few families (a, b drawn as exact fractions) exercise branch
# selection and simplification, compared with scipy's bounded search.
@settings(max_examples=12, deadline=None)
@given(
    st.sampled_from(sorted(FAMILIES)),
    st.fractions(sympy.Rational(1, 4), 4, max_denominator=8),
    # b stays in a short list: sympy.solve of exp(7 t / 8) = s enumerates all seventh
    # roots and takes tens of seconds (measured), a known cost, not a wrong answer.
    st.sampled_from([Fraction(1, 4), Fraction(1, 2), Fraction(1), Fraction(2), Fraction(3)]),
    st.floats(0.05, 0.95),
)
def test_random_family_members(name: str, a, b, fraction: float) -> None:  # noqa: ANN001
    build, numpy_phi, domain, bracket = FAMILIES[name]
    a, b = sympy.Rational(a.numerator, a.denominator), sympy.Rational(b.numerator, b.denominator)
    conj = conjugate(build(a, b), T, domain)
    s = point_in(conj.domain, fraction)
    expected = independent_sup(numpy_phi(float(a), float(b)), s, bracket)
    assert float(conj.value.subs(S, s)) == pytest.approx(expected, rel=1e-6, abs=1e-7)
