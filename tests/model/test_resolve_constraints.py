"""Constraint normalization and multipliers.

The sign conventions are those of the standard form minimize f0 s.t. fi(x) <= 0,
hi(x) = 0 with multipliers lambda >= 0 and nu free (S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, section 5.1.1, from memory); semidefinite constraints
F(x) preceq 0 take a multiplier Z in S_+ (ibid., section 5.9, from memory).
"""

import sympy

from dualize.model import load
from dualize.model.expr import Add, Broadcast, MatMul, Number, Scale, Shape, Symbol, Zero
from dualize.model.problem import Problem

MINUS_ONE = Number(sympy.Integer(-1))
n = sympy.Symbol("n", integer=True, positive=True)
m = sympy.Symbol("m", integer=True, positive=True)


def problem(text: str) -> Problem:
    loaded = load(text)
    assert loaded.problem is not None, loaded.diagnostics
    return loaded.problem


def symbols(p: Problem) -> dict[str, Symbol]:
    table = {d.name: d.symbol for d in p.data}
    table.update({v.name: v.symbol for v in p.variables})
    return table


LP = "data A in R^(m,n)\ndata b in R^m\ndata c in R^n\nminimize c' * x over x in R^n\ns.t.\n"


def test_less_equal_gives_f_minus_g() -> None:
    p = problem(LP + " A*x <= b")
    s = symbols(p)
    c = p.constraints[0]
    assert c.kind == "ineq" and c.relation == "<="
    assert c.function == Add((MatMul((s["A"], s["x"])), Scale(MINUS_ONE, s["b"])))


def test_greater_equal_gives_g_minus_f() -> None:
    p = problem(LP + " A*x >= b")
    s = symbols(p)
    assert p.constraints[0].function == Add((s["b"], Scale(MINUS_ONE, MatMul((s["A"], s["x"])))))


def test_equality_gives_f_minus_g_and_free_multiplier() -> None:
    p = problem(LP + " A*x == b")
    c = p.constraints[0]
    assert c.kind == "eq" and c.multiplier.facts == frozenset()
    assert c.multiplier == Symbol("nu1", "multiplier", Shape(m, sympy.Integer(1)))


def test_zero_side_is_dropped() -> None:
    p = problem(LP + " x >= 0\n x <= 0\n 0 <= x")
    x = symbols(p)["x"]
    assert [c.function for c in p.constraints] == [Scale(MINUS_ONE, x), x, Scale(MINUS_ONE, x)]
    assert p.constraints[0].rhs == Zero(x.shape)


def test_scalar_sides_broadcast_and_are_kept_as_written() -> None:
    p = problem(LP + " x <= 1")
    x = symbols(p)["x"]
    c = p.constraints[0]
    assert c.lhs == x and c.rhs == Broadcast(Number(sympy.Integer(1)), x.shape)


def test_inequality_multiplier_has_constraint_shape_and_is_nonneg() -> None:
    p = problem(LP + " A*x <= b")
    mult = p.constraints[0].multiplier
    expected = Symbol("lambda1", "multiplier", Shape(m, sympy.Integer(1)), frozenset({"nonneg"}))
    assert mult == expected


def test_semidefinite_constraints_normalize_to_preceq_zero() -> None:
    p = problem("data C in S^n\ndata F in S^n\nminimize trace(C*X) over X in S^n\ns.t.\n"
                " X succeq F\n X preceq F")
    s = symbols(p)
    up, down = p.constraints
    assert up.kind == down.kind == "psd"
    assert up.function == Add((s["F"], Scale(MINUS_ONE, s["X"])))
    assert down.function == Add((s["X"], Scale(MINUS_ONE, s["F"])))
    assert up.multiplier.facts == frozenset({"symmetric", "psd"})
    assert up.multiplier.shape == Shape(n, n)


def test_semidefinite_accepts_symmetric_expressions() -> None:
    p = problem("data A in R^(n,n)\ndata B in R^(n,m)\nminimize trace(X) over X in S^n\ns.t.\n"
                " A*X + X*A' preceq 0\n B'*X*B succeq 0\n X succeq identity(n)\n"
                " diag(ones(n)) + X succeq 0")
    assert [c.kind for c in p.constraints] == ["psd"] * 4


def test_labels_name_multipliers_and_chains_take_one_label_each() -> None:
    p = problem("data C in R_++\nminimize sum(a) over a in R^n\ns.t.\n lo, hi: 0 <= a <= C")
    lo, hi = p.constraints
    assert (lo.label, hi.label) == ("lo", "hi") and lo.labelled and hi.labelled
    assert lo.multiplier.name == "lo" and hi.multiplier.name == "hi"
    a, c = symbols(p)["a"], symbols(p)["C"]
    assert lo.function == Scale(MINUS_ONE, a)
    assert hi.function == Add((a, Scale(MINUS_ONE, Broadcast(c, a.shape))))


def test_unlabelled_multipliers_count_inequalities_and_equalities_apart() -> None:
    p = problem(LP + " A*x <= b\n sum(x) == 1\n x >= 0\n X: x <= 5\n c'*x == 2")
    assert [c.label for c in p.constraints] == ["lambda1", "nu1", "lambda2", "X", "nu2"]
    assert [c.labelled for c in p.constraints] == [False, False, False, True, False]


def test_generated_names_skip_names_the_file_uses() -> None:
    p = problem("data lambda1 in R\nminimize x over x in R, nu1 in R\ns.t.\n x >= lambda1\n"
                " x == nu1\n lambda3: x <= 3\n x <= 4")
    assert [c.label for c in p.constraints] == ["lambda2", "nu2", "lambda3", "lambda4"]


def test_unlabelled_chain_gives_two_generated_multipliers() -> None:
    p = problem("minimize sum(a) over a in R^n\ns.t.\n 0 <= a <= 1\n sum(a) == 1")
    assert [c.label for c in p.constraints] == ["lambda1", "lambda2", "nu1"]
    assert [c.relation for c in p.constraints] == ["<=", "<=", "=="]


def test_an_undeclared_name_is_reported_at_its_first_use_only() -> None:
    diagnostics = load("minimize sum(z) over x in R^n\ns.t.\n z >= 0\n x <= z").diagnostics
    assert [(d.rule, d.span.line) for d in diagnostics] == [("undeclared-name", 1)]
