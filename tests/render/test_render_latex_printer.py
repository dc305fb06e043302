"""The LaTeX printer, construct by construct, with the expected LaTeX inline.

The expected strings follow the notation of S. Boyd and L. Vandenberghe, Convex
Optimization, 2004 (appendix A, notation; from memory): x^T as a transpose,
\\mathbf{1} for the ones vector, \\succeq for the semidefinite order, norms with
their subscript; and the amsmath conventions for \\tfrac, \\lVert, \\operatorname
(common practice).
"""

from __future__ import annotations

import pytest
import sympy
from render_builders import (
    HALF,
    T,
    X,
    add,
    alpha,
    b,
    mm,
    n,
    neg,
    num,
    s,
    svm_derivation,
    vec,
    w,
    y,
)

from dualize.duality.result import Equation
from dualize.model import expr as ir
from dualize.render.latex import latex_prose, latex_set
from dualize.render.latex_printer import IRLatexPrinter, latex_expr
from dualize.render.text import text_prose

P = ir.Symbol("P", "data", ir.Shape(n, n), frozenset({"symmetric", "pd"}))
q = ir.Symbol("q", "data", vec(n))
x = ir.Symbol("x", "variable", vec(n))
t = ir.Symbol("t", "variable", ir.SCALAR)
Z = ir.Symbol("Z", "multiplier", ir.Shape(n, n), frozenset({"symmetric"}))


@pytest.mark.parametrize(("node", "expected"), [
    # Transposes as ^\top, products by juxtaposition (common practice).
    (T(x), r"x^\top"),
    (mm(T(x), P, x), r"x^\top P x"),
    (T(mm(X, w)), r"(X w)^\top"),
    # \tfrac for rational coefficients, never \left(\frac{1}{2}\right).
    (ir.Scale(HALF, mm(T(x), P, x)), r"\tfrac{1}{2} x^\top P x"),
    (num("-3/4"), r"-\tfrac{3}{4}"),
    # Ones vector, sum as 1^T e.
    (ir.Ones(n), r"\mathbf{1}"),
    (ir.SumAll(s), r"\mathbf{1}^\top s"),
    (ir.Broadcast(b, vec(n)), r"b \mathbf{1}"),
    (mm(T(s), ir.Ones(s.shape.rows)), r"\mathbf{1}^\top s"),
    # Norms with subscripts.
    (ir.Norm(x, "1"), r"\lVert x \rVert_{1}"),
    (ir.Norm(x, "inf"), r"\lVert x \rVert_{\infty}"),
    (ir.Power(ir.Norm(w, "2"), sympy.Integer(2)), r"\lVert w \rVert_{2}^{2}"),
    # Elementwise product, diag, trace, inverse, pseudo-inverse.
    (ir.Hadamard(y, add(mm(X, w), ir.Broadcast(b, vec(X.shape.rows)))),
     r"y \odot (X w + b \mathbf{1})"),
    (mm(T(alpha), ir.Diag(y), X), r"\alpha^\top \operatorname{diag}(y) X"),
    (ir.Trace(mm(P, Z)), r"\operatorname{tr}(P Z)"),
    (ir.Inverse(P), r"P^{-1}"),
    (ir.Inverse(mm(X, T(X))), r"(X X^\top)^{-1}"),
    (ir.PseudoInverse(P), r"P^{\dagger}"),
    # Functions.
    (ir.Apply("exp", neg(t)), r"\exp(-t)"),
    (ir.Apply("log", t), r"\log(t)"),
    (ir.Apply("sqrt", t), r"\sqrt{t}"),
    (ir.Apply("abs", x), r"\lvert x \rvert"),
    (ir.Extremum("max", x, ir.Zero(vec(n))), r"\max(x, 0)"),
    (ir.Divide(x, t), r"\frac{x}{t}"),
    (ir.Divide(x, q), r"x \oslash q"),
    (ir.Power(t, sympy.Rational(1, 2)), r"t^{1/2}"),
    (ir.Block(((P, q), (T(q), t))), r"\begin{bmatrix} P & q \\ q^\top & t \end{bmatrix}"),
])
def test_constructs(node: ir.Expr, expected: str) -> None:
    assert latex_expr(node) == expected


@pytest.mark.parametrize(("name", "expected"), [
    ("alpha", r"\alpha"), ("lambda1", r"\lambda_{1}"), ("nu2", r"\nu_{2}"),
    ("x1", r"x_{1}"), ("mu", r"\mu"), ("Sigma", r"\Sigma"), ("λ", r"\lambda"),
    ("x_max", r"x_{\mathrm{max}}"), ("cost", r"\mathrm{cost}"),
])
def test_greek_and_subscripts(name: str, expected: str) -> None:
    assert latex_expr(ir.Symbol(name, "multiplier", ir.SCALAR)) == expected


def test_no_unit_coefficient_and_minus_not_plus_minus_one() -> None:
    # "x - y", never "x + -1 y" or "1 \cdot x" (common practice).
    assert latex_expr(add(ir.Scale(num(1), x), neg(q))) == "x - q"
    assert latex_expr(add(q, ir.Scale(num(-2), x))) == r"q - 2 x"
    assert latex_expr(neg(add(x, q))) == "-(x + q)"


def test_term_order_quadratic_linear_constant() -> None:
    # Boyd and Vandenberghe 2004, eq. (4.34) writes (1/2) x'Px + q'x + r (from memory).
    r = ir.Symbol("r", "data", ir.SCALAR)
    written = add(r, mm(T(q), x), ir.Scale(HALF, mm(T(x), P, x)))
    assert latex_expr(written) == r"\tfrac{1}{2} x^\top P x + q^\top x + r"
    assert latex_expr(written, order_terms=False) == r"r + q^\top x + \tfrac{1}{2} x^\top P x"


def test_sum_does_not_open_with_a_minus_when_a_positive_term_exists() -> None:
    # Cortes and Vapnik 1995 write the dual as 1'a - 1/2 a'Da (from memory).
    dual = svm_derivation().dual.objective
    assert latex_expr(dual) == (r"\mathbf{1}^\top \alpha - \tfrac{1}{2} \alpha^\top "
                                r"\operatorname{diag}(y) X X^\top \operatorname{diag}(y) \alpha")


def test_parentheses_only_where_needed() -> None:
    assert latex_expr(mm(X, add(w, w))) == "X (w + w)"
    assert latex_expr(ir.Scale(t, add(x, q))) == "t (x + q)"
    assert latex_expr(ir.Power(T(x), sympy.Integer(2))) == r"(x^\top)^{2}"
    assert latex_expr(ir.Scale(mm(T(q), x), x)) == r"(q^\top x) x"
    assert latex_expr(ir.Scale(num(2), ir.Scale(num(3), x))) == "6 x"


def test_scalar_products_put_numbers_and_symbols_before_compound_factors() -> None:
    # Common practice: "\frac{1}{4\gamma} q^\top P q", not "(q^\top P q) ... \gamma^{-1}"
    # (Boyd and Vandenberghe, Convex Optimization, 2004, sec. 5.1.5: "-(1/4) nu^T A A^T nu").
    gamma = ir.Symbol("gamma", "data", ir.SCALAR)
    node = ir.Scale(num("1/4"), ir.Scale(mm(T(q), P, q), ir.Inverse(gamma)))
    assert latex_expr(node) == r"\frac{1}{4 \gamma} q^\top P q"
    assert latex_expr(ir.Scale(mm(T(q), x), x)) == r"(q^\top x) x"


def test_multi_letter_names_are_set_apart_by_a_thin_space() -> None:
    # Common practice: juxtaposed "B budget" must not read as one word "Bbudget".
    budget = ir.Symbol("budget", "multiplier", ir.SCALAR)
    assert latex_expr(ir.Scale(t, budget)) == r"t \, \mathrm{budget}"
    assert latex_expr(ir.Broadcast(budget, vec(n))) == r"\mathrm{budget} \, \mathbf{1}"


def test_a_fraction_needs_no_parentheses_as_a_factor() -> None:
    inverse_t = ir.Divide(num(1), t)
    assert latex_expr(ir.Scale(inverse_t, x)) == r"\frac{1}{t} x"
    assert latex_expr(ir.Power(inverse_t, sympy.Integer(2))) == r"\left(\frac{1}{t}\right)^{2}"


def test_numbers_that_would_touch_get_a_cdot() -> None:
    assert latex_expr(ir.Scale(num(2), ir.Number(sympy.Integer(3)))) == r"2 \cdot 3"


def test_semidefinite_order_in_sets_and_relations() -> None:
    from dualize.render.latex_printer import latex_relation

    assert latex_relation("succeq") == r"\succeq"
    assert latex_relation("preceq") == r"\preceq"
    assert latex_set("psd", ir.Shape(n, n)) == r"\mathbb{S}^{n}_{+}"
    assert latex_set("nonneg", vec(n)) == r"\mathbb{R}^{n}_{+}"
    assert latex_set("free", X.shape) == r"\mathbb{R}^{m \times n}"


def test_unknown_settings_are_rejected() -> None:
    with pytest.raises(TypeError):
        IRLatexPrinter({"no_such_setting": True})


def test_unhandled_ir_node_raises() -> None:
    class Strange(ir.Expr):
        span = None

    with pytest.raises(TypeError, match="no LaTeX rule"):
        latex_expr(Strange())


def test_prose_is_escaped_and_greek_names_become_math() -> None:
    assert latex_prose("Eliminating beta >= 0 gives 50% & more") == (
        r"Eliminating $\beta \geq 0$ gives 50\% \& more")
    assert latex_prose("x_i with α") == r"x\_i with $\alpha$"
    assert latex_prose("the alphabet") == "the alphabet"


def test_sympy_dimension_sizes_print_through_sympy() -> None:
    assert latex_set("free", vec(n + 1)) == r"\mathbb{R}^{n + 1}"
    assert latex_expr(ir.Scale(t, x)) == "t x"
    assert latex_expr(s) == "s"


def test_scalar_quotients_print_as_fractions_in_lowest_terms() -> None:
    # Common practice: "\frac{3\lambda}{\lambda + 1}", never "6 \lambda (2 \lambda + 2)^{-1}".
    lam = ir.Symbol("lambda", "multiplier", ir.SCALAR)
    denominator = add(ir.Scale(num(2), lam), num(2))
    node = ir.Scale(num(6), ir.Scale(lam, ir.Power(denominator, sympy.Integer(-1))))
    assert latex_expr(node) == r"\frac{3 \lambda}{\lambda + 1}"
    assert latex_expr(ir.Scale(num(-1), node)) == r"-\frac{3 \lambda}{\lambda + 1}"
    half_inverse = ir.Scale(num("-1/2"), ir.Scale(ir.Inverse(lam), x))
    assert latex_expr(half_inverse) == r"-\frac{1}{2 \lambda} x"
    assert latex_expr(ir.Scale(num("1/2"), x)) == r"\tfrac{1}{2} x"


def test_marked_formulas_in_sentences_are_printed_from_the_ir() -> None:
    # Common practice: mathematics in running text is set in math mode, never as ASCII.
    lam = ir.Symbol("lambda", "multiplier", ir.SCALAR)
    term = ir.Add((ir.Norm(x, "2"), ir.Scale(num(-1), mm(T(s), x))))
    said = latex_prose("Minimizing over $x$: the infimum of $#term$ is 0 where $#c$.",
                       (("#term", term), ("#c", Equation(ir.Norm(s, "2"), "<=", lam))))
    assert said == (r"Minimizing over $x$: the infimum of $\lVert x \rVert_{2} - s^\top x$ is 0 "
                    r"where $\lVert s \rVert_{2} \leq \lambda$.")
    t = sympy.Symbol("t", real=True)
    phi = sympy.Eq(sympy.Function("phi")(t), t * sympy.log(t), evaluate=False)
    assert "\\phi" in latex_prose("with $#phi$", (("#phi", phi),))
    assert text_prose("with $#phi$", (("#phi", phi),)) == "with φ(t) = t·log(t)"
