"""The numpy evaluator against direct numpy, node type by node type.

numpy is the reference library here (common practice: the IR node means
what the same numpy operation computes).
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy
from numeric_handbuilt import m, n, num, shape

from dualize.model import expr as ir
from dualize.numeric.evaluate import evaluate, size_of

rng = np.random.default_rng(7)
DIMS = {"m": 3, "n": 4}
A_val = rng.normal(size=(3, 4))
S_val = rng.normal(size=(4, 4))
x_val = rng.uniform(0.5, 2.0, size=4)
y_val = rng.uniform(0.5, 2.0, size=4)
c_val = 1.7
VALUES = {"A": A_val, "S": S_val, "x": x_val, "y": y_val, "c": c_val}

A = ir.Symbol("A", "data", shape(m, n))
S = ir.Symbol("S", "data", shape(n, n))
x = ir.Symbol("x", "variable", shape(n))
y = ir.Symbol("y", "variable", shape(n))
c = ir.Symbol("c", "data", shape())
X2 = x_val.reshape(-1, 1)
Y2 = y_val.reshape(-1, 1)

CASES = [
    (x, X2),
    (c, c_val),
    (num("3/4"), 0.75),
    (ir.Number(n + 1), 5.0),
    (ir.Ones(n), np.ones((4, 1))),
    (ir.Identity(m), np.eye(3)),
    (ir.Zero(shape(m, n)), np.zeros((3, 4))),
    (ir.Add((x, y, x)), 2 * X2 + Y2),
    (ir.Broadcast(c, shape(n)), np.full((4, 1), c_val)),
    (ir.MatMul((A, S, x)), A_val @ S_val @ X2),
    (ir.MatMul((ir.Transpose(x), y)), float(x_val @ y_val)),
    (ir.Scale(c, x), c_val * X2),
    (ir.Transpose(A), A_val.T),
    (ir.Hadamard(x, y), X2 * Y2),
    (ir.Divide(x, y), X2 / Y2),
    (ir.Divide(x, c), X2 / c_val),
    (ir.Power(x, sympy.Rational(3, 2)), X2 ** 1.5),
    (ir.Power(x, sympy.Rational(1, 3)), np.cbrt(X2)),
    (ir.Power(x, sympy.Integer(-1)), 1 / X2),
    (ir.Apply("exp", x), np.exp(X2)),
    (ir.Apply("log", x), np.log(X2)),
    (ir.Apply("sqrt", x), np.sqrt(X2)),
    (ir.Apply("abs", ir.Scale(num(-1), x)), X2),
    (ir.Extremum("max", x, y), np.maximum(X2, Y2)),
    (ir.Extremum("min", x, y), np.minimum(X2, Y2)),
    (ir.Norm(x, "1"), float(np.sum(np.abs(x_val)))),
    (ir.Norm(x, "2"), float(np.linalg.norm(x_val))),
    (ir.Norm(x, "inf"), float(np.max(np.abs(x_val)))),
    (ir.Norm(A, "2"), float(np.linalg.norm(A_val, "fro"))),
    (ir.SumAll(A), float(A_val.sum())),
    (ir.Diag(x), np.diag(x_val)),
    (ir.Trace(S), float(np.trace(S_val))),
    (ir.Inverse(S), np.linalg.inv(S_val)),
    (ir.PseudoInverse(A), np.linalg.pinv(A_val)),
    (ir.Block(((S, x), (ir.Transpose(x), c))),
     np.block([[S_val, X2], [X2.T, np.array([[c_val]])]])),
]


@pytest.mark.parametrize(("expr", "expected"), CASES,
                         ids=[f"{type(e).__name__}{i}" for i, (e, _) in enumerate(CASES)])
def test_node_matches_numpy(expr: ir.Expr, expected: object) -> None:
    got = evaluate(expr, VALUES, DIMS)
    if isinstance(expected, float):
        assert isinstance(got, float)
        assert got == pytest.approx(expected, rel=1e-12)
    else:
        assert isinstance(got, np.ndarray)
        np.testing.assert_allclose(got, expected, rtol=1e-12)


def test_every_node_class_has_a_case() -> None:
    node_classes = {cls for cls in vars(ir).values()
                    if isinstance(cls, type) and issubclass(cls, ir.Expr) and cls is not ir.Expr}
    covered = {type(e) for e, _ in CASES}
    assert node_classes <= covered, sorted(c.__name__ for c in node_classes - covered)


def test_unknown_node_raises() -> None:
    class Strange(ir.Expr):
        span = None

    with pytest.raises(TypeError, match="Strange"):
        evaluate(Strange(), VALUES, DIMS)


def test_missing_value_and_dimension_raise() -> None:
    with pytest.raises(KeyError, match="z"):
        evaluate(ir.Symbol("z", "data", shape()), VALUES, DIMS)
    with pytest.raises(KeyError, match="k"):
        size_of(sympy.Symbol("k", integer=True, positive=True), DIMS)


def test_least_squares_objective_composite() -> None:
    # ||A x - b||^2 evaluated against numpy (common practice).
    b = ir.Symbol("b", "data", shape(m))
    b_val = rng.normal(size=3)
    residual = ir.Add((ir.MatMul((A, x)), ir.Scale(num(-1), b)))
    expr = ir.Power(ir.Norm(residual, "2"), sympy.Integer(2))
    got = evaluate(expr, {**VALUES, "b": b_val}, DIMS)
    assert got == pytest.approx(float(np.sum((A_val @ x_val - b_val) ** 2)), rel=1e-12)


def test_fractional_power_is_undefined_below_zero() -> None:
    # x^p for non-integer p is defined on x >= 0 (S. Boyd and L. Vandenberghe, Convex
    # Optimization, 2004, section 3.1.5; from memory).
    got = evaluate(ir.Power(ir.Scale(num(-1), x), sympy.Rational(1, 3)), VALUES, DIMS)
    assert np.all(np.isnan(got))
    assert evaluate(ir.Power(c, sympy.Integer(-2)), VALUES, DIMS) == pytest.approx(c_val ** -2)
