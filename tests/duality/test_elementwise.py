"""The elementwise bridge: IR -> scalar sympy -> conjugate -> IR, checked by evaluation."""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import cache

import numpy as np
import pytest
import sympy
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from dualize.duality.conjugate import Conjugate, S, conjugate
from dualize.duality.elementwise import LiftError, data_symbol, lift, lift_interval, scalar_form
from dualize.model.expr import (
    SCALAR,
    Add,
    Apply,
    Broadcast,
    Divide,
    Expr,
    Extremum,
    Hadamard,
    MatMul,
    Number,
    Ones,
    Power,
    Scale,
    Shape,
    SumAll,
    Symbol,
    Zero,
    vector,
    walk,
)

N = sympy.Symbol("n", positive=True, integer=True)
V = vector(N)
X = Symbol("x", "variable", V)
Y = Symbol("y", "variable", V)
Z = Symbol("z", "multiplier", V)
A = Symbol("A", "data", vector(N))
C = Symbol("c", "data", SCALAR, frozenset({"pos"}))
T = sympy.Symbol("t", real=True)
DATA = {"c": C}
POSITIVE = sympy.Interval.open(0, sympy.oo)


def num(value: int | sympy.Rational) -> Number:
    return Number(sympy.Rational(value))


ONE = Broadcast(num(1), V)

# The IR of each test function, as the resolver writes it, with phi and dom phi.
FUNCTIONS: dict[str, tuple[Expr, sympy.Expr, sympy.Interval]] = {
    "x .* log(x)": (Hadamard(X, Apply("log", X)), T * sympy.log(T), POSITIVE),
    "exp(x)": (Apply("exp", X), sympy.exp(T), sympy.S.Reals),
    "-log(x)": (Scale(num(-1), Apply("log", X)), -sympy.log(T), POSITIVE),
    "x.^2 / 2": (
        Scale(num(sympy.Rational(1, 2)), Power(X, sympy.Integer(2))),
        T**2 / 2,
        sympy.S.Reals,
    ),
    "log(1 + exp(x))": (
        Apply("log", Add((ONE, Apply("exp", X)))),
        sympy.log(1 + sympy.exp(T)),
        sympy.S.Reals,
    ),
    "1 ./ x": (Divide(ONE, X), 1 / T, POSITIVE),
    "x.^2 / c": (Divide(Power(X, sympy.Integer(2)), C), T**2 / data_symbol(C), sympy.S.Reals),
}


@cache
def conjugate_of(name: str) -> Conjugate:
    _, phi, domain = FUNCTIONS[name]
    return conjugate(phi, T, domain)


def evaluate(expr: Expr, env: dict[str, np.ndarray | float]) -> np.ndarray | float:
    """A small numpy evaluator of the elementwise IR nodes, written for these tests."""
    rules: dict[type, Callable[[Expr], np.ndarray | float]] = {
        Symbol: lambda e: env[e.name],
        Number: lambda e: np.float64(e.value),
        Zero: lambda e: np.float64(0.0),
        Ones: lambda e: np.float64(1.0),
        Broadcast: lambda e: evaluate(e.arg, env),
        Add: lambda e: sum(evaluate(term, env) for term in e.terms),
        Scale: lambda e: evaluate(e.factor, env) * evaluate(e.arg, env),
        Hadamard: lambda e: evaluate(e.left, env) * evaluate(e.right, env),
        Divide: lambda e: evaluate(e.left, env) / evaluate(e.right, env),
        Power: lambda e: np.power(evaluate(e.base, env), float(e.exponent)),
        Apply: lambda e: {"exp": np.exp, "log": np.log, "sqrt": np.sqrt, "abs": np.abs}[e.func](
            evaluate(e.arg, env)
        ),
        Extremum: lambda e: (np.maximum if e.kind == "max" else np.minimum)(
            evaluate(e.left, env), evaluate(e.right, env)
        ),
        SumAll: lambda e: float(np.sum(evaluate(e.arg, env))),
    }
    return rules[type(expr)](expr)


def random_inside(domain: sympy.Set, rng: np.random.Generator, size: int = 7) -> np.ndarray:
    """Random points of the interior of an interval of the real line."""
    lo, hi = float(domain.inf), float(domain.sup)
    if math.isfinite(lo) and math.isfinite(hi):
        return rng.uniform(lo + 1e-3 * (hi - lo), hi - 1e-3 * (hi - lo), size)
    if math.isfinite(lo):
        return lo + rng.exponential(2.0, size) + 1e-3
    if math.isfinite(hi):
        return hi - rng.exponential(2.0, size) - 1e-3
    return rng.normal(0.0, 2.0, size)


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_scalar_form(name: str) -> None:
    ir, phi, _ = FUNCTIONS[name]
    assert sympy.simplify(scalar_form(ir, X, T) - phi) == 0


# Common practice: the bridge must agree with the IR entry by entry; checked by
# evaluating the IR (own numpy walk) and phi (sympy lambdify) on random vectors.
@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_scalar_form_evaluates_like_the_ir(name: str) -> None:
    ir, _, domain = FUNCTIONS[name]
    rng = np.random.default_rng(7)
    x = random_inside(domain, rng)
    phi = sympy.lambdify(T, scalar_form(ir, X, T).subs(data_symbol(C), 1.7), "numpy")
    np.testing.assert_allclose(evaluate(ir, {"x": x, "c": 1.7}), phi(x), rtol=1e-12)


def test_scalar_data_keeps_its_facts() -> None:
    phi = scalar_form(Scale(C, X), X, T)
    (c,) = phi.free_symbols - {T}
    assert c.name == "c" and c.is_positive


@pytest.mark.parametrize(
    "expr",
    [
        SumAll(X),
        Hadamard(X, Y),
        Hadamard(A, X),
        Apply("exp", Y),
        Broadcast(SumAll(X), V),
        Scale(SumAll(X), X),
        MatMul((Symbol("Q", "data", Shape(N, N)), X)),
    ],
)
def test_not_elementwise(expr: Expr) -> None:
    assert scalar_form(expr, X, T) is None


@pytest.mark.parametrize(
    "expr",
    [
        Divide(X, Zero(V)),
        Power(Zero(V), sympy.Integer(-1)),
        Divide(ONE, Add((X, Scale(num(-1), X)))),
    ],
)
def test_division_by_zero_is_no_function(expr: Expr) -> None:
    assert scalar_form(expr, X, T) is None


# Boyd and Vandenberghe, Convex Optimization, 2004, section 3.3.1 (conjugate of a
# separable sum is the sum of the conjugates), from memory; each lifted conjugate is
# evaluated on random vectors inside its domain and compared with phi*(z_i).
@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_lift_of_conjugate_evaluates_entrywise(name: str) -> None:
    conj = conjugate_of(name)
    lifted = lift(conj.value, S, Z, DATA)
    assert lifted.shape == V
    rng = np.random.default_rng(11)
    z = random_inside(conj.domain.subs(data_symbol(C), 1.7), rng)
    scalar = sympy.lambdify(S, conj.value.subs(data_symbol(C), 1.7), "numpy")
    np.testing.assert_allclose(evaluate(lifted, {"z": z, "c": 1.7}), scalar(z), rtol=1e-12)
    total = evaluate(SumAll(lifted), {"z": z, "c": 1.7})
    assert total == pytest.approx(float(np.sum(scalar(z))), rel=1e-12)


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_round_trip_ir_sympy_ir(name: str) -> None:
    ir, _, domain = FUNCTIONS[name]
    back = lift(scalar_form(ir, X, T), T, X, DATA)
    x = random_inside(domain, np.random.default_rng(3))
    env = {"x": x, "c": 0.6}
    np.testing.assert_allclose(evaluate(back, env), evaluate(ir, env), rtol=1e-12)


def test_lift_is_tidy() -> None:
    # -log(-s) - 1: numeric coefficients as Scale, the constant broadcast and last.
    value = -sympy.log(-S) - 1
    expected = Add((Scale(num(-1), Apply("log", Scale(num(-1), Z))), Broadcast(num(-1), V)))
    assert lift(value, S, Z, DATA) == expected
    assert lift(S**2 / 2, S, Z, DATA) == Scale(
        num(sympy.Rational(1, 2)), Power(Z, sympy.Integer(2))
    )
    assert lift(sympy.Max(S, 0), S, Z, DATA) == Extremum("max", Z, Zero(V))
    assert lift(sympy.sqrt(S), S, Z, DATA) == Apply("sqrt", Z)


def test_lift_scalar_data() -> None:
    c = data_symbol(C)
    assert lift(c * S, S, Z, DATA) == Scale(C, Z)
    assert lift(S / c, S, Z, DATA) == Divide(Z, C)


def test_lift_refuses_what_it_cannot_write() -> None:
    with pytest.raises(LiftError):
        lift(sympy.Symbol("k") * S, S, Z, DATA)
    with pytest.raises(LiftError):
        lift(S ** sympy.Symbol("p", positive=True), S, Z, DATA)
    with pytest.raises(LiftError):
        lift(sympy.sin(S), S, Z, DATA)


def test_lift_interval_relations() -> None:
    assert lift_interval(sympy.S.Reals, Z) == []
    assert lift_interval(sympy.Interval(0, 1), Z) == [(Z, ">=", Zero(V)), (Z, "<=", ONE)]
    assert lift_interval(sympy.Interval.open(-sympy.oo, 0), Z) == [(Z, "<", Zero(V))]
    assert lift_interval(sympy.FiniteSet(3), Z) == [(Z, "==", Broadcast(num(3), V))]
    c = data_symbol(C)
    assert lift_interval(sympy.Interval(0, c), Z, DATA) == [
        (Z, ">=", Zero(V)),
        (Z, "<=", Broadcast(C, V)),
    ]


RELATIONS: dict[str, Callable[[np.ndarray, np.ndarray], np.ndarray]] = {
    ">=": np.greater_equal,
    ">": np.greater,
    "<=": np.less_equal,
    "<": np.less,
    "==": np.equal,
}


# Common practice: the relations must describe exactly the domain of the conjugate;
# checked on points inside, on the ends and outside against sympy's own membership test.
@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_lift_interval_matches_membership(name: str) -> None:
    domain = conjugate_of(name).domain.subs(data_symbol(C), 2)
    relations = lift_interval(domain, Z)
    points = np.array([-3.0, -1.0, -0.25, 0.0, 0.25, 0.5, 1.0, 2.0, 4.0])
    inside = np.ones_like(points, dtype=bool)
    for lhs, relation, rhs in relations:
        inside &= RELATIONS[relation](evaluate(lhs, {"z": points}), evaluate(rhs, {}))
    expected = [bool(domain.contains(sympy.Rational(p))) for p in points]
    assert inside.tolist() == expected


def leaves() -> st.SearchStrategy[Expr]:
    constants = st.sampled_from([num(2), num(sympy.Rational(1, 3)), num(-1), C])
    return st.one_of(
        st.just(X),
        constants.map(lambda k: Broadcast(k, V)),
        st.just(ONE),
        st.just(Zero(V)),
    )


def extend(children: st.SearchStrategy[Expr]) -> st.SearchStrategy[Expr]:
    factors = st.sampled_from([num(3), num(sympy.Rational(-1, 2)), C])
    exponents = st.sampled_from([sympy.Integer(2), sympy.Integer(-1), sympy.Rational(1, 2)])
    return st.one_of(
        st.tuples(children, children).map(lambda p: Add(p)),
        st.tuples(factors, children).map(lambda p: Scale(*p)),
        st.tuples(children, children).map(lambda p: Hadamard(*p)),
        st.tuples(children, children).map(lambda p: Divide(*p)),
        children.map(lambda e: Divide(e, C)),
        st.tuples(children, exponents).map(lambda p: Power(*p)),
        st.tuples(st.sampled_from(["exp", "log", "sqrt", "abs"]), children).map(
            lambda p: Apply(*p)
        ),
        st.tuples(st.sampled_from(["max", "min"]), children, children).map(lambda p: Extremum(*p)),
    )


ELEMENTWISE = st.recursive(leaves(), extend, max_leaves=6)


def _finite_throughout(expr: Expr, env: dict) -> bool:
    from dualize.model.expr import walk

    with np.errstate(all="ignore"):
        return all(bool(np.all(np.isfinite(evaluate(node, env)))) for node in walk(expr))


# Common practice: scalar_form and lift must preserve the value of every entry; random
# elementwise trees are evaluated on a random vector three ways (the IR itself, phi by
# lambdify, and the IR lifted back from phi) wherever the entries are finite reals.
@settings(max_examples=150, deadline=None)
@given(ELEMENTWISE, st.integers(0, 2**31 - 1))
def test_random_trees_round_trip(expr: Expr, seed: int) -> None:
    x = np.random.default_rng(seed).uniform(0.2, 3.0, 6)
    env = {"x": x, "c": 1.3}
    with np.errstate(all="ignore"):
        direct = np.broadcast_to(evaluate(expr, env), x.shape)
    assume(bool(np.all(np.isfinite(direct))))
    assume(_finite_throughout(expr, env))  # exp(log(0)) is finite, its inside is not
    phi = scalar_form(expr, X, T)
    assume(not divides_by_zero(expr, env))
    assert phi is not None
    c = data_symbol(C)
    scalar = sympy.lambdify(T, phi.subs(c, 1.3), "numpy")
    with np.errstate(all="ignore"):
        via_sympy = np.broadcast_to(np.asarray(scalar(x), dtype=complex), x.shape)
        lifted = np.broadcast_to(evaluate(lift(phi, T, X, DATA), env), x.shape)
    np.testing.assert_allclose(via_sympy.real, direct, rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(via_sympy.imag, 0.0, atol=1e-9 * (1 + np.abs(direct).max()))
    np.testing.assert_allclose(lifted, direct, rtol=1e-9, atol=1e-12)


def divides_by_zero(expr: Expr, env: dict[str, np.ndarray | float]) -> bool:
    """A division by, or negative power of, something that vanishes identically."""
    for node in walk(expr):
        if isinstance(node, Divide):
            denominator = node.right
        elif isinstance(node, Power) and node.exponent < 0:
            denominator = node.base
        else:
            continue
        with np.errstate(all="ignore"):
            if np.all(np.abs(evaluate(denominator, env)) <= 1e-12):
                return True
    return False
