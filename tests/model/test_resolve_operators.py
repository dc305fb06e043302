"""Operators -> IR nodes, with the IR's conventions (Scale, flat MatMul, Broadcast, Zero)."""

import sympy

from dualize.model import load
from dualize.model.expr import (
    Add,
    Apply,
    Broadcast,
    Divide,
    Expr,
    Hadamard,
    MatMul,
    Norm,
    Number,
    Power,
    Scale,
    Symbol,
    Transpose,
    Zero,
)

HEAD = "data A in R^(m,n)\ndata B in R^(n,k)\ndata c in R\ndata P in S^n\n"
VARS = " over x in R^n, y in R^n, t in R, u in R^m"
MINUS_ONE = Number(sympy.Integer(-1))


def objective(text: str) -> Expr:
    loaded = load(f"{HEAD}minimize {text}{VARS}")
    assert loaded.problem is not None, loaded.diagnostics
    return loaded.problem.objective


def sym(text: str, name: str) -> Symbol:
    loaded = load(f"{HEAD}minimize {text}{VARS}")
    assert loaded.problem is not None
    table = {d.name: d.symbol for d in loaded.problem.data}
    table.update({v.name: v.symbol for v in loaded.problem.variables})
    return table[name]


def test_scalar_times_anything_is_scale() -> None:
    e = objective("c * t")
    assert e == Scale(sym("t", "c"), sym("t", "t"))
    e = objective("sum(x * c)")
    assert e.arg == Scale(sym("t", "c"), sym("t", "x"))


def test_matrix_products_are_flat_chains() -> None:
    e = objective("x' * P * x")
    assert isinstance(e, MatMul) and len(e.factors) == 3
    assert e.factors[0] == Transpose(sym("t", "x"))
    assert e.shape.is_scalar  # a 1-by-1 product is a scalar


def test_inner_product_is_a_scalar_matmul() -> None:
    e = objective("x' * y")
    assert e == MatMul((Transpose(sym("t", "x")), sym("t", "y")))


def test_difference_is_add_of_minus_one_scale() -> None:
    e = objective("t - c")
    assert e == Add((sym("t", "t"), Scale(MINUS_ONE, sym("t", "c"))))


def test_sums_are_flattened() -> None:
    e = objective("t + c + t - c")
    assert isinstance(e, Add) and len(e.terms) == 4


def test_unary_minus_is_minus_one_scale_and_folds_on_numbers() -> None:
    assert objective("-t") == Scale(MINUS_ONE, sym("t", "t"))
    e = objective("t + -2")
    assert e == Add((sym("t", "t"), Number(sympy.Integer(-2))))


def test_number_literals_fold_exactly() -> None:
    # 1/2 is the exact rational one half, not 0.5 (common practice for exact arithmetic).
    e = objective("1/2 * t")
    assert e == Scale(Number(sympy.Rational(1, 2)), sym("t", "t"))


def test_division_by_a_number_is_a_scale_by_its_reciprocal() -> None:
    assert objective("t / 4") == Scale(Number(sympy.Rational(1, 4)), sym("t", "t"))


def test_division_by_scalar_data_is_divide() -> None:
    assert objective("t / c") == Divide(sym("t", "t"), sym("t", "c"))


def test_elementwise_operations_broadcast_scalars() -> None:
    e = objective("sum(x .* y + c)")
    x, y, c = sym("t", "x"), sym("t", "y"), sym("t", "c")
    assert e.arg == Add((Hadamard(x, y), Broadcast(c, x.shape)))
    assert objective("sum(1 ./ x)").arg == Divide(Broadcast(Number(sympy.Integer(1)), x.shape), x)
    assert objective("sum(c .* x)").arg == Scale(c, x)


def test_zero_broadcasts_to_zero() -> None:
    e = objective("sum(max(x, 0))")
    assert e.arg.right == Zero(sym("t", "x").shape)


def test_transpose_of_a_scalar_is_dropped_and_double_transpose_cancels() -> None:
    assert objective("t'") == sym("t", "t")
    x, y = sym("t", "x"), sym("t", "y")
    assert objective("sum((x')' .* y)").arg == Hadamard(x, y)


def test_powers_norms_and_squared_norm() -> None:
    x = sym("t", "x")
    assert objective("||x||^2") == Power(Norm(x, "2"), sympy.Integer(2))
    assert objective("||x||_inf") == Norm(x, "inf")
    assert objective("sum(x^(1/2))").arg == Power(x, sympy.Rational(1, 2))
    assert objective("sum(x^-1)").arg == Power(x, sympy.Integer(-1))
    assert objective("sum(|x|)").arg == Apply("abs", x)


def test_every_node_carries_a_span() -> None:
    loaded = load(f"{HEAD}minimize 1/2 * x' * P * x + c * sum(exp(x)){VARS}")
    assert loaded.problem is not None
    from dualize.model.expr import walk

    assert all(node.span is not None for node in walk(loaded.problem.objective))


def test_scalar_factors_are_pulled_out_of_matrix_products() -> None:
    # Scalars commute with matrix products: (c A) x = c (A x) (common practice).
    x, p_, c = sym("t", "x"), sym("t", "P"), sym("t", "c")
    e = objective("1/2 * x' * P * x")
    assert e == Scale(Number(sympy.Rational(1, 2)), MatMul((Transpose(x), p_, x)))
    e = objective("x' * (c * P) * x")
    assert e == Scale(c, MatMul((Transpose(x), p_, x)))
