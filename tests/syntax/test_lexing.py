"""Lexical rules: names, numbers, comments, Unicode spellings, keywords."""

from fractions import Fraction

import pytest

from dualize.syntax import ast
from dualize.syntax.parser import parse


def objective_of(text: str) -> ast.Expr:
    result = parse(text)
    assert result.document is not None, result.diagnostics
    return result.document.objective.expr


@pytest.mark.parametrize("literal, value", [
    ("3", Fraction(3)), ("0.25", Fraction(1, 4)), ("1e-3", Fraction(1, 1000)),
    ("2.5E2", Fraction(250)), (".5", Fraction(1, 2)),
])
def test_numbers_are_exact_fractions(literal: str, value: Fraction) -> None:
    # Exact decimal-to-rational conversion as in Python's fractions module (common practice).
    expr = objective_of(f"minimize {literal} * x over x in R")
    assert isinstance(expr, ast.BinOp) and expr.left == ast.Number(expr.left.span, literal, value)


@pytest.mark.parametrize("name", ["alpha", "x_1", "w2", "λ", "α", "θ_max", "x_"])
def test_names_letters_digits_underscores_and_greek(name: str) -> None:
    expr = objective_of(f"minimize {name} over {name} in R")
    assert isinstance(expr, ast.Name) and expr.name == name


@pytest.mark.parametrize("name", ["inner", "overall", "titles", "database", "minimizer", "ins"])
def test_keywords_do_not_split_longer_names(name: str) -> None:
    assert objective_of(f"minimize {name} over {name} in R") == ast.Name(
        objective_of(f"minimize {name} over {name} in R").span, name)


def test_comments_run_to_end_of_line() -> None:
    result = parse("# a scenario\nminimize x # the cost\nover x in R # variable\n# end\n")
    assert result.document is not None and not result.diagnostics


@pytest.mark.parametrize("unicode, ascii", [
    ("minimize ‖x‖ over x ∈ ℝ^n", "minimize ||x|| over x in R^n"),
    ("minimize xᵀ*y over x ∈ ℝ^n, y ∈ ℝ^n", "minimize x'*y over x in R^n, y in R^n"),
    ("data A ∈ ℝ^(m × n)\nminimize sum(A*x) over x ∈ ℝ^n",
     "data A in R^(m,n)\nminimize sum(A*x) over x in R^n"),
    ("minimize x over x ∈ ℝ\ns.t.\n x ≤ 1\n x ≥ 0",
     "minimize x over x in R\ns.t.\n x <= 1\n x >= 0"),
    ("minimize trace(X) over X ∈ S^n\ns.t. X ⪰ 0",
     "minimize trace(X) over X in S^n\ns.t. X succeq 0"),
    ("minimize trace(X) over X ∈ S^n\ns.t. X ⪯ 0",
     "minimize trace(X) over X in S^n\ns.t. X preceq 0"),
])
def test_unicode_spellings_mean_the_ascii_ones(unicode: str, ascii: str) -> None:
    from dualize.model import load

    a, b = load(unicode), load(ascii)
    assert a.problem is not None and b.problem is not None
    assert a.problem.objective == b.problem.objective
    functions = [[c.function for c in x.problem.constraints] for x in (a, b)]
    assert functions[0] == functions[1]


def test_double_bar_is_a_norm_and_single_bar_an_absolute_value() -> None:
    assert isinstance(objective_of("minimize ||x|| over x in R^n"), ast.Norm)
    assert isinstance(objective_of("minimize sum(|x|) over x in R^n").args[0], ast.Abs)


def test_nested_absolute_values_need_a_space() -> None:
    expr = objective_of("minimize | |x| - 1 | over x in R")
    assert isinstance(expr, ast.Abs) and isinstance(expr.arg, ast.BinOp)
    assert isinstance(expr.arg.left, ast.Abs)


@pytest.mark.parametrize("sub, p", [("", "2"), ("_1", "1"), ("_2", "2"), ("_inf", "inf"),
                                    ("₁", "1"), ("₂", "2"), ("_∞", "inf")])
def test_norm_subscripts(sub: str, p: str) -> None:
    expr = objective_of(f"minimize ||x||{sub} over x in R^n")
    assert isinstance(expr, ast.Norm) and expr.p == p


def test_spans_are_one_based_lines_and_columns() -> None:
    expr = objective_of("\n\nminimize   x + y over x in R, y in R")
    assert (expr.span.line, expr.span.column, expr.span.end_column) == (3, 12, 17)
    assert (expr.right.span.line, expr.right.span.column) == (3, 16)
