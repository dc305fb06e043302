"""The cvxpy reference: values, honest statuses, and multipliers in our sign convention."""

from __future__ import annotations

import itertools
from dataclasses import replace

import numpy as np
import pytest
import sympy
from numeric_handbuilt import (
    con,
    data,
    inequality_lp,
    m,
    n,
    neg,
    num,
    problem,
    shape,
    small_sdp,
    standard_lp,
    sub,
    var,
)
from scipy.optimize import linprog, minimize
from scipy.special import logsumexp

from dualize.model import expr as ir
from dualize.model.problem import Problem
from dualize.numeric.instance import Instance
from dualize.numeric.random_data import random_instance
from dualize.numeric.reference import MAX_BINARY_ENTRIES, solve_primal, to_cvxpy


def bounded_lp_instance(seed: int, rows: int = 7, cols: int = 3) -> Instance:
    """c = -A' lam0 with lam0 > 0 makes the LP dual feasible, so the LP is bounded
    (weak duality; S. Boyd and L. Vandenberghe, Convex Optimization, 2004, 5.2.1)."""
    inst = random_instance(inequality_lp(), {"m": rows, "n": cols}, seed)
    rng = np.random.default_rng(seed + 100)
    lam0 = rng.uniform(0.5, 1.5, size=rows)
    return replace(inst, values={**inst.values, "c": -inst.values["A"].T @ lam0})


@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_inequality_lp_multipliers_match_highs_marginals(seed: int) -> None:
    # scipy.optimize.linprog documentation, HiGHS marginals: the marginals are the
    # sensitivities d p*/d b, the negated multipliers of docs/language.md
    # (common practice).
    inst = bounded_lp_instance(seed)
    v = inst.values
    ref = linprog(v["c"], A_ub=v["A"], b_ub=v["b"], bounds=(None, None), method="highs")
    sol = solve_primal(inequality_lp(), inst)
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(ref.fun, rel=1e-6, abs=1e-8)
    np.testing.assert_allclose(sol.multipliers["lam"], -ref.ineqlin.marginals, atol=1e-6)
    assert np.all(sol.multipliers["lam"] >= -1e-8)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_standard_lp_equality_and_sign_multipliers_match_highs(seed: int) -> None:
    # scipy.optimize.linprog, HiGHS marginals (eqlin and lower bounds), as above.
    p = standard_lp()
    inst = random_instance(p, {"m": 3, "n": 6}, seed)
    v = inst.values
    ref = linprog(v["c"], A_eq=v["A"], b_eq=v["b"], bounds=(0, None), method="highs")
    sol = solve_primal(p, inst)
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(ref.fun, rel=1e-6, abs=1e-8)
    np.testing.assert_allclose(sol.multipliers["nu"], -ref.eqlin.marginals, atol=1e-6)
    # x >= 0 is the constraint 0 - x <= 0: the multiplier is the reduced cost.
    np.testing.assert_allclose(sol.multipliers["lam"], ref.lower.marginals, atol=1e-6)


def test_maximization_multipliers_are_those_of_minimize_minus_f() -> None:
    # docs/language.md: maximize f is dualized as minimize -f; HiGHS marginals of that LP.
    inst = bounded_lp_instance(4)
    base = inequality_lp()
    p = replace(base, sense="maximize", objective=neg(base.objective))
    v = inst.values
    ref = linprog(v["c"], A_ub=v["A"], b_ub=v["b"], bounds=(None, None), method="highs")
    sol = solve_primal(p, inst)
    assert sol.value == pytest.approx(-ref.fun, rel=1e-6)
    np.testing.assert_allclose(sol.multipliers["lam"], -ref.ineqlin.marginals, atol=1e-6)


def scalar_problem(objective: ir.Expr, constraints: list, names: tuple[str, ...] = ("x",)
                   ) -> tuple[Problem, dict[str, ir.Symbol]]:
    variables = [var(name) for name in names]
    syms = {v.name: v.symbol for v in variables}
    return problem(objective, variables, [], constraints, dims=()), syms


def test_nocedal_wright_circle_example() -> None:
    # J. Nocedal and S. Wright, Numerical Optimization, 2nd ed., 2006, chapter 12
    # (from memory): minimize x1 + x2 s.t. 2 - x1^2 - x2^2 >= 0: x* = (-1, -1), lambda = 1/2.
    x1, x2 = var("x1").symbol, var("x2").symbol
    two = sympy.Integer(2)
    lhs = ir.Add((num(2), neg(ir.Power(x1, two)), neg(ir.Power(x2, two))))
    p, _ = scalar_problem(ir.Add((x1, x2)), [con("lam", lhs, ">=", num(0))], ("x1", "x2"))
    sol = solve_primal(p, Instance({}, {}))
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(-2.0, abs=1e-6)
    assert sol.x["x1"] == pytest.approx(-1.0, abs=1e-5)
    assert sol.multipliers["lam"] == pytest.approx(0.5, abs=1e-5)


def test_product_constraint_is_reported_as_local_not_optimal() -> None:
    # Boyd and Vandenberghe, 2004, exercise 5.1 (from memory): minimize x^2 + 1
    # s.t. (x - 2)(x - 4) <= 0 has p* = 5 at x = 2.  cvxpy cannot certify the product,
    # so the reference says "local" (a bound), never "optimal".
    x = var("x").symbol
    obj = ir.Add((ir.Power(x, sympy.Integer(2)), num(1)))
    product = ir.Scale(ir.Add((x, num(-2))), ir.Add((x, num(-4))))
    p, _ = scalar_problem(obj, [con("lam", product, "<=", num(0))])
    sol = solve_primal(p, Instance({}, {}))
    assert sol.status == "local"
    assert sol.value == pytest.approx(5.0, abs=1e-5)
    assert sol.multipliers == {}


def test_partitioning_local_bound_against_exhaustive_search() -> None:
    # Two-way partitioning (Boyd and Vandenberghe, 2004, section 5.1.5; from memory):
    # minimize x'Wx s.t. x_i^2 = 1, nonconvex; the exact optimum by trying all signs.
    W = data("W", n, n, ("symmetric",), "S^n")
    x = var("x", n)
    obj = ir.MatMul((ir.Transpose(x.symbol), W.symbol, x.symbol))
    sq = ir.Power(x.symbol, sympy.Integer(2))
    p = problem(obj, [x], [W], [con("nu", sq, "==", ir.Broadcast(num(1), shape(n)))],
                dims=(n,))
    inst = random_instance(p, {"n": 5}, seed=3)
    wv = inst.values["W"]
    exact = min(float(np.array(s) @ wv @ np.array(s))
                for s in itertools.product((-1.0, 1.0), repeat=5))
    sol = solve_primal(p, inst)
    assert sol.status == "local"
    assert sol.value >= exact - 1e-6  # a local value is only an upper bound on p*
    np.testing.assert_allclose(np.abs(sol.x["x"]), 1.0, atol=1e-5)


def test_binary_enumeration_is_exact() -> None:
    # Exhaustive search over {0,1}^n in the test (common practice) against the reference.
    Q = data("Q", n, n, ("symmetric",), "S^n")
    c = data("c", n)
    x = var("x", n, kind="binary")
    obj = ir.Add((ir.MatMul((ir.Transpose(x.symbol), Q.symbol, x.symbol)),
                  ir.MatMul((ir.Transpose(c.symbol), x.symbol))))
    p = problem(obj, [x], [Q, c], [con("lam", ir.SumAll(x.symbol), "<=", num(2))],
                dims=(n,))
    inst = random_instance(p, {"n": 4}, seed=1)
    qv, cv = inst.values["Q"], inst.values["c"]
    exact = min(float(np.array(b) @ qv @ np.array(b) + cv @ np.array(b))
                for b in itertools.product((0.0, 1.0), repeat=4) if sum(b) <= 2)
    sol = solve_primal(p, inst)
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(exact, abs=1e-6)
    big = random_instance(p, {"n": MAX_BINARY_ENTRIES + 1}, seed=1)
    assert solve_primal(p, big).status == "unsupported"


def test_integer_domain_is_unsupported() -> None:
    x = var("x", kind="integer")
    p = problem(x.symbol, [x], [], [con("lam", x.symbol, ">=", num(0))], dims=())
    assert solve_primal(p, Instance({}, {})).status == "unsupported"


def test_infeasible_and_unbounded_are_reported() -> None:
    x = var("x").symbol
    p, _ = scalar_problem(x, [con("a", x, "<=", num(-1)), con("b", x, ">=", num(1))])
    sol = solve_primal(p, Instance({}, {}))
    assert sol.status == "infeasible" and sol.value == float("inf")
    p, _ = scalar_problem(x, [con("a", x, "<=", num(1))])
    sol = solve_primal(p, Instance({}, {}))
    assert sol.status == "unbounded" and sol.value == float("-inf")


def test_entropy_over_the_simplex() -> None:
    # The uniform distribution maximizes entropy: min sum x log x over the simplex is
    # -log n (S. Boyd and L. Vandenberghe, 2004, section 5.1.6 setting; from memory).
    x = var("x", n)
    obj = ir.SumAll(ir.Hadamard(x.symbol, ir.Apply("log", x.symbol)))
    p = problem(obj, [x], [], [con("nu", ir.SumAll(x.symbol), "==", num(1))], dims=(n,))
    sol = solve_primal(p, Instance({}, {"n": 5}))
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(-np.log(5), rel=1e-6)


def test_log_sum_exp_against_scipy() -> None:
    # scipy.optimize.minimize (BFGS) on scipy.special.logsumexp as the reference.
    A, b = data("A", m, n), data("b", m)
    x = var("x", n)
    inner = ir.Add((ir.MatMul((A.symbol, x.symbol)), b.symbol))
    obj = ir.Add((ir.Apply("log", ir.SumAll(ir.Apply("exp", inner))),
                  ir.Scale(num("1/2"), ir.MatMul((ir.Transpose(x.symbol), x.symbol)))))
    p = problem(obj, [x], [A, b], [])
    inst = random_instance(p, {"m": 6, "n": 3}, seed=2)
    av, bv = inst.values["A"], inst.values["b"]
    ref = minimize(lambda z: logsumexp(av @ z + bv) + 0.5 * z @ z, np.zeros(3),
                   method="BFGS", options={"gtol": 1e-10})
    sol = solve_primal(p, inst)
    assert sol.value == pytest.approx(ref.fun, rel=1e-6)


def test_quadratic_form_closed_form() -> None:
    # min 1/2 x'Px + q'x with P positive definite is -1/2 q'P^-1 q (common practice).
    P = data("P", n, n, ("symmetric", "psd", "pd"), "S^n_++")
    q = data("q", n)
    x = var("x", n)
    obj = ir.Add((ir.Scale(num("1/2"), ir.MatMul((ir.Transpose(x.symbol), P.symbol,
                                                   x.symbol))),
                  ir.MatMul((ir.Transpose(q.symbol), x.symbol))))
    p = problem(obj, [x], [P, q], [], dims=(n,))
    inst = random_instance(p, {"n": 4}, seed=0)
    pv, qv = inst.values["P"], inst.values["q"]
    sol = solve_primal(p, inst)
    assert sol.value == pytest.approx(-0.5 * qv @ np.linalg.solve(pv, qv), rel=1e-6)
    np.testing.assert_allclose(sol.x["x"], -np.linalg.solve(pv, qv), atol=1e-5)


def test_sdp_value_and_matrix_multiplier() -> None:
    # min trace(C X) s.t. trace(X) = 1, X succeq 0 is the smallest eigenvalue of C
    # (Rayleigh quotient; common practice).  From L = trace(CX) + nu (trace X - 1)
    # - trace(Z X): Z = C + nu I with nu = -lambda_min(C).
    p = small_sdp()
    inst = random_instance(p, {"n": 4}, seed=5)
    values = {**inst.values, "A1": np.eye(4), "b1": 1.0}
    sol = solve_primal(p, replace(inst, values=values))
    low = float(np.linalg.eigvalsh(values["C"])[0])
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(low, rel=1e-6, abs=1e-7)
    assert sol.multipliers["nu"] == pytest.approx(-low, abs=1e-5)
    np.testing.assert_allclose(sol.multipliers["Z"], values["C"] - low * np.eye(4), atol=1e-5)


def test_box_domain_and_max_hinge() -> None:
    # min sum(max(1 - x, 0)) + sum(x) over x in [0, 2]^n: each entry contributes
    # min over [0,2] of max(1 - t, 0) + t = 1 (attained on [0, 1]); common practice.
    x = var("x", n, kind="box", lo=num(0), hi=num(2))
    hinge = ir.Extremum("max", sub(ir.Broadcast(num(1), shape(n)), x.symbol),
                        ir.Zero(shape(n)))
    p = problem(ir.Add((ir.SumAll(hinge), ir.SumAll(x.symbol))), [x], [], [], dims=(n,))
    sol = solve_primal(p, Instance({}, {"n": 3}))
    assert sol.value == pytest.approx(3.0, abs=1e-6)


def test_to_cvxpy_strict_fallback() -> None:
    class Strange(ir.Expr):
        span = None

        def children(self) -> tuple:
            return (var("x").symbol,)

    import cvxpy as cp

    with pytest.raises(TypeError, match="Strange"):
        to_cvxpy(Strange(), {"x": cp.Variable((1, 1))}, {}, {})


def test_nonconvex_maximization_reports_the_true_objective() -> None:
    # maximize x1 * x2 s.t. x1 + x2 <= 2, x >= 0: optimum 1 at (1, 1) (AM-GM inequality,
    # common practice).  The product is not certifiable, so the status is "local".
    x1, x2 = var("x1").symbol, var("x2").symbol
    cons = [con("a", ir.Add((x1, x2)), "<=", num(2)), con("b", x1, ">=", num(0)),
            con("c", x2, ">=", num(0))]
    p, _ = scalar_problem(ir.Scale(x1, x2), cons, ("x1", "x2"))
    sol = solve_primal(replace(p, sense="maximize"), Instance({}, {}))
    assert sol.status == "local"
    assert sol.value == pytest.approx(1.0, abs=1e-6)


def test_scaled_quadratic_forms_are_recognised() -> None:
    # 1/2 * x' * P * x resolves to MatMul(Scale(1/2, x'), P, x); still a convex QP whose
    # unconstrained minimum is -1/2 q'P^-1 q (common practice).
    P = data("P", n, n, ("symmetric", "psd", "pd"), "S^n_++")
    q = data("q", n)
    x = var("x", n)
    row = ir.Scale(num("1/2"), ir.Transpose(x.symbol))
    obj = ir.Add((ir.MatMul((row, P.symbol, x.symbol)),
                  ir.MatMul((ir.Transpose(q.symbol), x.symbol))))
    p = problem(obj, [x], [P, q], [], dims=(n,))
    inst = random_instance(p, {"n": 3}, seed=4)
    sol = solve_primal(p, inst)
    assert sol.status == "optimal"
    pv, qv = inst.values["P"], inst.values["q"]
    assert sol.value == pytest.approx(-0.5 * qv @ np.linalg.solve(pv, qv), rel=1e-6)
