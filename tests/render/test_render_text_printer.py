"""The terminal printer, construct by construct, with the expected text inline.

The Unicode signs are those of the Unicode Standard's mathematical operators
block (common practice): ᵀ (U+1D40) for the transpose, ‖ for norms, ⊙ for the
elementwise (Hadamard) product, ⪰ for the semidefinite order, 𝟏 for the ones
vector, subscript digits for indices.
"""

from __future__ import annotations

import pytest
import sympy
from render_builders import HALF, T, X, add, alpha, b, mm, n, neg, num, s, vec, w, y

from dualize.model import expr as ir
from dualize.render.text import paint, text_prose, text_set
from dualize.render.text_printer import IRTextPrinter, text_expr, text_relation

P = ir.Symbol("P", "data", ir.Shape(n, n), frozenset({"symmetric"}))
x = ir.Symbol("x", "variable", vec(n))
t = ir.Symbol("t", "variable", ir.SCALAR)


@pytest.mark.parametrize(("node", "expected"), [
    (T(x), "xᵀ"),
    (ir.Scale(HALF, mm(T(x), P, x)), "½ xᵀ P x"),
    (ir.Scale(num("2/7"), x), "(2/7) x"),
    (ir.Norm(x, "1"), "‖x‖₁"),
    (ir.Norm(x, "inf"), "‖x‖∞"),
    (ir.Power(ir.Norm(w, "2"), sympy.Integer(2)), "‖w‖₂²"),
    (ir.SumAll(s), "𝟏ᵀ s"),
    (ir.Hadamard(y, add(mm(X, w), ir.Broadcast(b, vec(X.shape.rows)))), "y ⊙ (X w + b 𝟏)"),
    (mm(T(alpha), ir.Diag(y), X), "αᵀ diag(y) X"),
    (ir.Trace(P), "tr(P)"),
    (ir.Inverse(mm(X, T(X))), "(X Xᵀ)⁻¹"),
    (ir.PseudoInverse(P), "P⁺"),
    (ir.Apply("exp", neg(t)), "exp(-t)"),
    (ir.Apply("abs", x), "|x|"),
    (ir.Apply("sqrt", t), "√(t)"),
    (ir.Extremum("max", x, ir.Zero(vec(n))), "max(x, 0)"),
    (ir.Power(t, sympy.Integer(-2)), "t⁻²"),
    (ir.Power(t, sympy.Rational(1, 3)), "t^(1/3)"),
    (add(ir.Scale(num(1), x), neg(ir.Ones(n))), "x - 𝟏"),
    (ir.Block(((P, x), (T(x), t))), "[[P, x], [xᵀ, t]]"),
])
def test_constructs(node: ir.Expr, expected: str) -> None:
    assert text_expr(node) == expected


@pytest.mark.parametrize(("name", "expected"), [
    ("alpha", "α"), ("beta", "β"), ("lambda1", "λ₁"), ("nu2", "ν₂"), ("mu", "μ"),
    ("x1", "x₁"), ("lambda_12", "λ₁₂"), ("w_opt", "wₒₚₜ"), ("w_bar", "w_bar"),
])
def test_greek_and_subscripts(name: str, expected: str) -> None:
    assert text_expr(ir.Symbol(name, "multiplier", ir.SCALAR)) == expected


def test_relations() -> None:
    assert [text_relation(r) for r in ("<=", ">=", "succeq", "preceq", "=")] == [
        "≤", "≥", "⪰", "⪯", "="]


def test_sets() -> None:
    assert text_set("nonneg", vec(n)) == "ℝ^n_+"
    assert text_set("free", X.shape) == "ℝ^(m×n)"
    assert text_set("psd", P.shape) == "𝕊^n_+"
    assert text_set("free", ir.SCALAR) == "ℝ"


def test_prose_turns_greek_names_and_signs_into_symbols() -> None:
    assert text_prose("beta >= 0 and lambda2 <= C") == "β ≥ 0 and λ₂ ≤ C"


def test_colour_only_when_asked() -> None:
    assert paint("holds", "guaranteed", False) == "holds"
    assert paint("holds", "guaranteed", True) == "\x1b[32;1mholds\x1b[0m"


def test_unknown_settings_are_rejected() -> None:
    with pytest.raises(TypeError):
        IRTextPrinter({"colour": True})


def test_scalar_quotients_print_in_lowest_terms() -> None:
    # Common practice: 3λ / (λ + 1) rather than 6 λ (2 λ + 2)⁻¹.
    lam = ir.Symbol("lambda", "multiplier", ir.SCALAR)
    denominator = ir.Add((ir.Scale(ir.Number(sympy.Integer(2)), lam), ir.Number(sympy.Integer(2))))
    node = ir.Scale(ir.Number(sympy.Integer(6)),
                    ir.Scale(lam, ir.Power(denominator, sympy.Integer(-1))))
    assert text_expr(node) == "3 λ / (λ + 1)"
