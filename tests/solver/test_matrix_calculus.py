"""Jacobians of matrix-valued expressions in vector multipliers, on hand-built IR.

A matrix is differentiated as its entries stacked row by row, and the product rule on
L F R gives kron(L, R') d vec(F) (J. Magnus and H. Neudecker, Matrix Differential
Calculus, 1999, chapter 2, from memory; there with columns stacked, hence the factors
swapped).  Every printed derivative is checked by central differences (common practice).
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse
import sympy

from dualize.model import expr as ir
from dualize.solvergen.calculus import NotDifferentiable, gradient, jacobian
from dualize.solvergen.ir_rewrite import Kron, normalize
from dualize.solvergen.python_code import Constants, NumpyPrinter

m, n, k = sympy.symbols("m n k", positive=True, integer=True)
u = ir.Symbol("u", "multiplier", ir.vector(m))
v = ir.Symbol("v", "multiplier", ir.vector(n))
C = ir.Symbol("C", "data", ir.Shape(m, n))
Y = ir.Symbol("Y", "data", ir.Shape(k, m))
w = ir.Symbol("w", "data", ir.vector(n))
NAMES = {s: s for s in ("u", "v", "C", "Y", "w", "m", "n", "k")}
M, N, K = 4, 3, 5


def outer(column: ir.Expr, row: ir.Expr) -> ir.Expr:
    return ir.MatMul((column, ir.Transpose(row)))


def shifted() -> ir.Expr:
    """u 1' + 1 v' - C, the transport kind's matrix."""
    return ir.Add((outer(u, ir.Ones(n)), outer(ir.Ones(m), v), ir.Scale(ir.Number(-1), C)))


def evaluate(expr: ir.Expr, env: dict, sparse: bool = False):
    """The printer's own code for ``expr`` run on ``env``, its hoisted constants first; the
    value and all the code printed (constants included)."""
    constants = Constants()
    printer = NumpyPrinter({"names": NAMES, "constants": constants, "sparse": sparse})
    text = printer.code(normalize(expr))
    scope = {"np": np, "scipy": scipy, **env}
    for name, code, _ in constants.entries:
        scope[name] = eval(compile(code, "<constant>", "eval"), scope)
    printed = "\n".join([*(code for _, code, _ in constants.entries), text])
    return eval(compile(text, "<printed>", "eval"), scope), printed


def environment(seed: int) -> dict:
    rng = np.random.default_rng(seed)
    return {"u": rng.normal(size=M), "v": rng.normal(size=N), "C": rng.normal(size=(M, N)),
            "Y": rng.normal(size=(K, M)), "w": rng.normal(size=N), "m": M, "n": N, "k": K}


def numeric_jacobian(function, env: dict, name: str) -> np.ndarray:
    step, base = 1e-6, env[name]
    columns = []
    for e in np.eye(base.size):
        up = function({**env, name: base + step * e})
        down = function({**env, name: base - step * e})
        columns.append((np.reshape(up, -1) - np.reshape(down, -1)) / (2 * step))
    return np.column_stack(columns)


def test_outer_products_with_ones_have_kronecker_jacobians():
    # vec(u 1') = kron(I_m, 1_n) u and vec(1 v') = kron(1_m, I_n) v, rows stacked.
    assert jacobian(shifted(), u) == Kron(ir.Identity(m), ir.Ones(n))
    assert jacobian(shifted(), v) == Kron(ir.Ones(m), ir.Identity(n))
    env = environment(1)
    dense, _ = evaluate(jacobian(shifted(), u), env)
    assert np.array_equal(dense, np.kron(np.eye(M), np.ones((N, 1))))
    sparse, text = evaluate(jacobian(shifted(), v), env, sparse=True)
    assert scipy.sparse.issparse(sparse) and sparse.nnz == M * N and "scipy.sparse.kron" in text
    assert np.array_equal(sparse.toarray(), np.kron(np.ones((M, 1)), np.eye(N)))


def test_gradient_of_a_sum_of_exponentials_is_row_and_column_sums():
    # d/du sum(exp(u 1' + 1 v' - C)) = exp(.) 1 and d/dv = exp(.)' 1: applied to the stacked
    # matrix, the Kronecker product is never formed.
    f = ir.SumAll(ir.Apply("exp", shifted()))
    env = environment(2)
    expected = np.exp(env["u"][:, None] + env["v"][None, :] - env["C"])
    for var, axis in ((u, 1), (v, 0)):
        grad, text = evaluate(gradient(f, var), env)
        assert "kron" not in text
        assert np.allclose(grad, expected.sum(axis=axis), rtol=1e-12)
        numeric = numeric_jacobian(lambda e: np.sum(np.exp(
            e["u"][:, None] + e["v"][None, :] - e["C"])), env, var.name)
        assert np.allclose(grad, numeric.ravel(), rtol=1e-6)


def test_product_rule_with_data_on_both_sides():
    # vec(Y exp(u w') C') with data on both sides of a matrix factor: the rule is general,
    # not tied to ones vectors.
    inner = ir.Apply("exp", outer(u, w))
    expr = ir.MatMul((Y, inner, ir.Transpose(C)))
    env = environment(3)
    jac, _ = evaluate(jacobian(expr, u), env)

    def value(e):
        return e["Y"] @ np.exp(np.outer(e["u"], e["w"])) @ e["C"].T

    assert np.allclose(jac, numeric_jacobian(value, env, "u"), rtol=1e-6, atol=1e-8)


def test_transposed_matrix_inside_a_vector_product():
    # exp(u 1' - C)' 1_m is a vector, so vec(L F' R) = kron(R', L) vec(F) applies.
    inner = ir.Apply("exp", ir.Add((outer(u, ir.Ones(n)), ir.Scale(ir.Number(-1), C))))
    expr = ir.MatMul((ir.Transpose(inner), ir.Ones(m)))
    env = environment(4)
    jac, _ = evaluate(jacobian(expr, u), env)

    def value(e):
        return np.exp(e["u"][:, None] - e["C"]).T @ np.ones(M)

    assert np.allclose(jac, numeric_jacobian(value, env, "u"), rtol=1e-6, atol=1e-8)


def test_a_transposed_matrix_standing_alone_is_refused():
    # vec(F') is a permutation of vec(F) that the rules do not print: refused, not guessed.
    with pytest.raises(NotDifferentiable, match="transpose of a matrix"):
        jacobian(ir.Transpose(ir.Apply("exp", shifted())), u)
