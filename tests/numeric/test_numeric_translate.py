"""IR -> cvxpy translation agrees with the numpy evaluator at fixed variable values.

cvxpy evaluates an expression at assigned variable values (``.value``); both
sides must give the same number for every node type and every recognised
building block (cvxpy as reference library, common practice).
"""

from __future__ import annotations

import cvxpy as cp
import numpy as np
import pytest
import sympy
from numeric_handbuilt import n, num, shape
from test_numeric_evaluate import CASES, DIMS, VALUES

from dualize.model import expr as ir
from dualize.numeric.evaluate import evaluate
from dualize.numeric.translate import pushed_transpose, to_cvxpy

x = ir.Symbol("x", "variable", shape(n))
y = ir.Symbol("y", "variable", shape(n))
P = ir.Symbol("S", "data", shape(n, n))

BLOCKS = [
    ("quad form", ir.MatMul((ir.Transpose(x), P, x))),
    ("scaled quad form", ir.MatMul((ir.Scale(num("1/2"), ir.Transpose(x)), P, x))),
    ("inner product", ir.MatMul((ir.Transpose(x), x))),
    ("squared norm", ir.Power(ir.Norm(x, "2"), sympy.Integer(2))),
    ("negative entropy", ir.Hadamard(x, ir.Apply("log", x))),
    ("entropy inner product", ir.MatMul((ir.Transpose(ir.Apply("log", x)), x))),
    ("log-sum-exp", ir.Apply("log", ir.SumAll(ir.Apply("exp", x)))),
    ("quotient by a variable", ir.Divide(ir.Ones(n), x)),
    ("quad form of a sum", ir.MatMul((ir.Add((ir.Transpose(x), ir.Transpose(y))), P,
                                      ir.Add((x, y))))),
]


def reference_variables() -> dict[str, cp.Variable]:
    out = {}
    for name in ("x", "y"):
        v = cp.Variable((4, 1), name=name)
        v.value = np.asarray(VALUES[name]).reshape(4, 1)
        out[name] = v
    return out


def compare(expr: ir.Expr) -> None:
    got = to_cvxpy(expr, reference_variables(), VALUES, DIMS).value
    want = evaluate(expr, VALUES, DIMS)
    np.testing.assert_allclose(np.asarray(got, dtype=float).reshape(np.shape(want)), want,
                               rtol=1e-9, atol=1e-12)


@pytest.mark.parametrize(("expr", "_"), CASES,
                         ids=[f"{type(e).__name__}{i}" for i, (e, _) in enumerate(CASES)])
def test_every_node_translates_to_the_same_value(expr: ir.Expr, _: object) -> None:
    if isinstance(expr, ir.Divide) and ir.depends_on(expr.right, {"x", "y"}):
        # x ./ y has no certified convex form: translation refuses (the reference then
        # falls back to local solves) rather than building a wrong expression.
        with pytest.raises(ValueError, match="quotient"):
            to_cvxpy(expr, reference_variables(), VALUES, DIMS)
        return
    compare(expr)


@pytest.mark.parametrize(("label", "expr"), BLOCKS, ids=[b[0] for b in BLOCKS])
def test_recognised_blocks_translate_to_the_same_value(label: str, expr: ir.Expr) -> None:
    compare(expr)


def test_recognised_blocks_are_certified_convex() -> None:
    # With a PSD middle matrix the quadratic form is convex (common practice).
    psd = {**VALUES, "S": VALUES["S"] @ VALUES["S"].T}
    for label, expr in BLOCKS:
        if label == "quotient by a variable":
            continue
        assert to_cvxpy(expr, reference_variables(), psd, DIMS).is_convex(), label


def test_pushed_transpose_identifies_both_spellings() -> None:
    G = ir.Symbol("G", "data", shape(n, n))
    q = ir.Symbol("q", "data", shape(n))
    written = ir.Add((ir.MatMul((ir.Transpose(y), G)), ir.Transpose(q)))
    column = ir.Add((ir.MatMul((ir.Transpose(G), y)), q))
    assert pushed_transpose(written) == pushed_transpose(ir.Transpose(column))
    assert pushed_transpose(ir.Transpose(column)) != pushed_transpose(column)


def test_rank_deficient_gram_form_stays_certified() -> None:
    # a' diag(y) X X' diag(y) a is a squared norm, concave when negated (the soft-margin
    # dual; C. Cortes and V. Vapnik, Support-vector networks, 1995; from memory), even
    # when rounding makes the m x m Gram matrix's smallest eigenvalue slightly negative.
    from numeric_handbuilt import m

    rng = np.random.default_rng(3)
    X = ir.Symbol("X", "data", shape(m, n))
    yv = ir.Symbol("y", "data", shape(m))
    a = ir.Symbol("a", "multiplier", shape(m))
    values = {"X": rng.normal(size=(30, 2)), "y": np.sign(rng.normal(size=30))}
    chain = ir.MatMul((ir.Transpose(a), ir.Diag(yv), X, ir.Transpose(X), ir.Diag(yv), a))
    expr = ir.Scale(num("-1/2"), chain)
    av = cp.Variable((30, 1))
    av.value = rng.normal(size=(30, 1))
    got = to_cvxpy(expr, {"a": av}, values, {"m": 30, "n": 2})
    assert got.is_concave()
    want = evaluate(expr, {**values, "a": av.value}, {"m": 30, "n": 2})
    assert float(np.asarray(got.value).reshape(-1)[0]) == pytest.approx(want, rel=1e-9)
