"""The numpy printer and the symbolic Jacobians, on hand-built IR."""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from dualize.model import expr as ir
from dualize.solvergen.calculus import NotDifferentiable, gradient
from dualize.solvergen.ir_rewrite import normalize
from dualize.solvergen.python_code import Constants, UnknownNode, numpy_code

m, n = sympy.symbols("m n", positive=True, integer=True)
X = ir.Symbol("X", "data", ir.Shape(m, n))
y = ir.Symbol("y", "data", ir.vector(m))
P = ir.Symbol("P", "data", ir.Shape(n, n), frozenset({"pd", "symmetric"}))
w = ir.Symbol("w", "multiplier", ir.vector(n))
a = ir.Symbol("a", "multiplier", ir.vector(m))
NAMES = {"X": "X", "y": "y", "P": "P", "w": "w", "a": "a", "m": "m", "n": "n"}


def code(expr: ir.Expr) -> tuple[str, Constants]:
    constants = Constants()
    text, _ = numpy_code(normalize(expr), NAMES, constants)
    return text, constants


def test_chain_applied_to_a_vector_runs_right_to_left():
    # X' (X w) costs O(mn); (X' X) w would cost O(mn^2) (common practice).
    text, _ = code(ir.MatMul((ir.Transpose(X), X, w)))
    assert text == "X.T @ (X @ w)"


def test_diagonal_factor_becomes_an_elementwise_scale():
    text, _ = code(ir.MatMul((ir.Transpose(X), ir.Diag(y), a)))
    assert text == "X.T @ (y * a)"


def test_inverse_of_definite_data_is_a_cholesky_solve():
    text, constants = code(ir.MatMul((ir.Inverse(P), w)))
    assert text == "scipy.linalg.cho_solve(_k0, w)"
    assert constants.entries[0][:2] == ("_k0", "scipy.linalg.cho_factor(P)")


def test_unknown_node_raises():
    class Strange(ir.Symbol):
        pass

    with pytest.raises(UnknownNode):
        numpy_code(Strange("q", "data", ir.SCALAR), {"q": "q"}, Constants())


def test_nonsmooth_objective_has_no_gradient():
    with pytest.raises(NotDifferentiable):
        gradient(ir.Norm(a, "1"), a)


def test_quadratic_gradient_matches_finite_differences():
    # f(a) = 1'a - 1/2 a' diag(y) X X' diag(y) a (the soft-margin dual; Cortes and Vapnik, 1995,
    # from memory); gradient checked by central differences (common practice).
    quad = ir.MatMul((ir.Transpose(a), ir.Diag(y), X, ir.Transpose(X), ir.Diag(y), a))
    half = ir.Number(sympy.Rational(-1, 2))
    f = ir.Add((ir.MatMul((ir.Transpose(ir.Ones(m)), a)), ir.Scale(half, quad)))
    text, _ = code(gradient(f, a))
    rng = np.random.default_rng(4)
    Xv, yv, av = rng.normal(size=(6, 3)), np.sign(rng.normal(size=6)), rng.normal(size=6)
    Q = yv[:, None] * Xv

    def value(v):
        return v.sum() - 0.5 * (Q.T @ v) @ (Q.T @ v)

    grad = _run(text, {"X": Xv, "y": yv, "a": av, "m": 6, "n": 3})
    step = 1e-6
    numeric = [(value(av + step * e) - value(av - step * e)) / (2 * step) for e in np.eye(6)]
    assert np.allclose(grad, numeric, rtol=1e-6, atol=1e-6)


def _run(text: str, env: dict) -> np.ndarray:
    """Run the printer's own output in a namespace holding only numpy and the test data."""
    return np.asarray(eval(compile(text, "<printed>", "eval"), {"np": np, **env}))


def test_gradient_of_a_clipped_square_matches_finite_differences():
    # ||min(u, 0)||^2 is continuously differentiable with gradient 2 min(u, 0) (common
    # practice); checked by central differences on u = X' a at random points.
    u = ir.MatMul((ir.Transpose(X), a))
    f = ir.Power(ir.Norm(ir.Extremum("min", u, ir.Zero(ir.vector(n))), "2"), sympy.Integer(2))
    text, _ = code(gradient(f, a))
    rng = np.random.default_rng(5)
    Xv = rng.normal(size=(4, 6))

    def value(v):
        return float(np.sum(np.minimum(Xv.T @ v, 0) ** 2))

    step = 1e-6
    for _ in range(3):
        av = rng.normal(size=4)
        grad = _run(text, {"X": Xv, "a": av, "m": 4, "n": 6})
        numeric = [(value(av + step * e) - value(av - step * e)) / (2 * step) for e in np.eye(4)]
        assert np.allclose(grad, numeric, rtol=1e-5, atol=1e-7)
