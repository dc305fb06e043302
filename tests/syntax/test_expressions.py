"""Operator precedence and associativity, postfix transposes, calls."""

import pytest

from dualize.syntax import ast
from dualize.syntax.parser import parse


def expr(text: str) -> ast.Expr:
    result = parse(f"minimize {text} over x in R")
    assert result.document is not None, result.diagnostics
    return result.document.objective.expr


def shape(e: ast.Expr) -> object:
    """The tree without spans: nested tuples, for comparing structure."""
    if isinstance(e, ast.Name):
        return e.name
    if isinstance(e, ast.Number):
        return e.text
    if isinstance(e, ast.BinOp):
        return (e.op, shape(e.left), shape(e.right))
    if isinstance(e, ast.Neg):
        return ("neg", shape(e.operand))
    if isinstance(e, ast.Power):
        return ("^", shape(e.base), shape(e.exponent))
    if isinstance(e, ast.Transpose):
        return ("'", shape(e.operand))
    if isinstance(e, ast.Call):
        return (e.func, *map(shape, e.args))
    if isinstance(e, ast.Norm):
        return ("norm" + e.p, shape(e.arg))
    assert isinstance(e, ast.Abs)
    return ("abs", shape(e.arg))


# Precedence as in written mathematics and in most programming languages: products bind
# tighter than sums, powers tighter than unary minus (-x^2 is -(x^2)), powers associate to
# the right (a^b^c is a^(b^c)), postfix transpose binds tightest (common practice).
@pytest.mark.parametrize("text, tree", [
    ("a + b * c", ("+", "a", ("*", "b", "c"))),
    ("a - b - c", ("-", ("-", "a", "b"), "c")),
    ("a * b / c", ("/", ("*", "a", "b"), "c")),
    ("a .* b ./ c + d", ("+", ("./", (".*", "a", "b"), "c"), "d")),
    ("-x^2", ("neg", ("^", "x", "2"))),
    ("a^b^c", ("^", "a", ("^", "b", "c"))),
    ("x^-1", ("^", "x", ("neg", "1"))),
    ("-a * b", ("*", ("neg", "a"), "b")),
    ("x' * P * x", ("*", ("*", ("'", "x"), "P"), "x")),
    ("x^T * y", ("*", ("'", "x"), "y")),
    ("A'^2", ("^", ("'", "A"), "2")),
    ("(a + b) * c", ("*", ("+", "a", "b"), "c")),
    ("||x||^2", ("^", ("norm2", "x"), "2")),
    ("||A*x - b||_1", ("norm1", ("-", ("*", "A", "x"), "b"))),
    ("log(sum(exp(x)))", ("log", ("sum", ("exp", "x")))),
    ("max(x, 0)", ("max", "x", "0")),
    ("1/2 * x", ("*", ("/", "1", "2"), "x")),
    ("- - x", ("neg", ("neg", "x"))),
])
def test_precedence(text: str, tree: object) -> None:
    assert shape(expr(text)) == tree


def test_call_with_no_arguments_parses_and_is_left_to_the_resolver() -> None:
    e = expr("ones() * 1")
    assert isinstance(e, ast.BinOp) and isinstance(e.left, ast.Call) and e.left.args == ()


def test_dot_caret_is_the_same_elementwise_power() -> None:
    assert shape(expr("x.^2")) == shape(expr("x^2")) == ("^", "x", "2")
