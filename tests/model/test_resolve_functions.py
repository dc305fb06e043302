"""Functions -> IR nodes: sum, exp, log, sqrt, max, min, diag, trace, inv, ones, identity."""

import sympy

from dualize.model import load
from dualize.model.expr import (
    SCALAR,
    Apply,
    Diag,
    Expr,
    Extremum,
    Identity,
    Inverse,
    MatMul,
    Ones,
    Shape,
    SumAll,
    Trace,
    Transpose,
)

n = sympy.Symbol("n", integer=True, positive=True)


def resolved(text: str) -> tuple[Expr, dict]:
    loaded = load("data Q in S^n_++\ndata v in R^n\n" + text)
    assert loaded.problem is not None, loaded.diagnostics
    table = {d.name: d.symbol for d in loaded.problem.data}
    table.update({x.name: x.symbol for x in loaded.problem.variables})
    return loaded.problem.objective, table


def test_sum_exp_log_sqrt() -> None:
    e, s = resolved("minimize sum(exp(x)) + sum(log(x)) + sum(sqrt(x)) over x in R^n")
    assert [t.shape for t in e.terms] == [SCALAR] * 3
    assert e.terms[0] == SumAll(Apply("exp", s["x"]))
    assert e.terms[1] == SumAll(Apply("log", s["x"]))
    assert e.terms[2] == SumAll(Apply("sqrt", s["x"]))


def test_log_sum_exp_is_built_as_written() -> None:
    e, s = resolved("minimize log(sum(exp(x))) over x in R^n")
    assert e == Apply("log", SumAll(Apply("exp", s["x"])))


def test_max_min_elementwise() -> None:
    e, s = resolved("minimize sum(max(x, v)) + sum(min(x, 1)) over x in R^n")
    assert e.terms[0].arg == Extremum("max", s["x"], s["v"])
    assert e.terms[1].arg.kind == "min" and e.terms[1].arg.right.shape == s["x"].shape


def test_diag_trace_inv() -> None:
    e, s = resolved("minimize trace(diag(x) * inv(Q)) over x in R^n")
    assert e == Trace(MatMul((Diag(s["x"]), Inverse(s["Q"]))))
    assert Diag(s["x"]).shape == Shape(n, n)


def test_ones_and_identity_with_dimension_symbols_and_numbers() -> None:
    e, s = resolved("minimize ones(n)' * x + trace(identity(n) * Q) + sum(ones(3)) over x in R^n")
    assert e.terms[0] == MatMul((Transpose(Ones(n)), s["x"]))
    assert e.terms[1] == Trace(MatMul((Identity(n), s["Q"])))
    assert e.terms[2] == SumAll(Ones(sympy.Integer(3)))


def test_misspelt_function_gets_a_suggestion() -> None:
    from dualize.model import load

    diagnostics = load("minimize sum(sqr(x)) + tr(X) over x in R^n, X in S^n").diagnostics
    assert [d.rule for d in diagnostics] == ["unknown-function"]
    assert diagnostics[0].hint == "did you mean `sqrt`?"


def test_function_the_language_writes_as_mathematics_gets_its_spelling() -> None:
    from dualize.model import load

    diagnostics = load("minimize sum(abs(x)) over x in R^n").diagnostics
    assert [d.rule for d in diagnostics] == ["unknown-function"]
    assert "|e|" in diagnostics[0].hint
    diagnostics = load("minimize norm(x) over x in R^n").diagnostics
    assert "||e||" in diagnostics[0].hint


def test_names_from_other_notations_get_the_rewrite() -> None:
    # A reader who knows a quadratic-form or a largest-eigenvalue function by name gets
    # the spelling of this language (x' * P * x; an eigenvalue bound as the semidefinite
    # constraint A preceq t I, S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
    # section 4.6.3, from memory).
    from dualize.model import load

    cases = {
        "data P in S^n_+\nminimize quad_form(x, P) over x in R^n\n": "x' * P * x",
        "data A in S^n\nminimize lambda_max(A) + sum(x) over x in R^n\n": "preceq t * identity(n)",
        "minimize log_sum_exp(x) over x in R^n\n": "log(sum(exp(e)))",
    }
    for text, rewrite in cases.items():
        loaded = load(text, "case.prob")
        [d] = loaded.diagnostics
        assert d.rule == "other-notation" and rewrite in (d.hint or ""), d


def test_indexing_is_located_with_a_rewrite() -> None:
    # Entries are singled out by products with data in this language (common practice
    # in papers: e_i' x for the i-th entry).
    from dualize.model import load

    loaded = load("data c in R^n\nminimize c' * x over x in R^n\ns.t.\n  x[2] <= 1\n",
                  "case.prob")
    [d] = loaded.diagnostics
    assert d.rule == "entry-indexing" and "`x[2]`" in d.message
    assert (d.span.line, d.span.column, d.span.end_column) == (4, 4, 7)
    assert "e' * x" in (d.hint or "")
