"""Textbook duals, built by hand, solved on their own and checked against the primal.

Duals are written in the sign convention of docs/language.md (L = f0 + sum y_i f_i
with f_i the normalized constraint functions).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from numeric_handbuilt import con as con_
from numeric_handbuilt import (
    inequality_lp,
    least_norm,
    m,
    neg,
    num,
    problem,
    shape,
    standard_lp,
    var,
)
from test_numeric_reference import bounded_lp_instance

from dualize.duality.result import Derivation, DualConstraint, DualProblem, DualVariable
from dualize.model import expr as ir
from dualize.model.problem import Problem
from dualize.numeric.random_data import random_instance
from dualize.numeric.reference import solve_dual, solve_primal
from dualize.numeric.verify import verify, weak_duality_samples


def sym(p: Problem, name: str) -> ir.Symbol:
    for d in p.data:
        if d.name == name:
            return d.symbol
    for c in p.constraints:
        if c.label == name:
            return c.multiplier
    raise KeyError(name)


def T(e: ir.Expr) -> ir.Expr:
    return ir.Transpose(e)


def derivation(p: Problem, dual: DualProblem) -> Derivation:
    return Derivation(p, dual.objective, dual.variables, (), dual, (), ())


def ineq_lp_dual(p: Problem, shift: object = 0) -> DualProblem:
    """Boyd and Vandenberghe, Convex Optimization, 2004, section 5.2.1 (from memory):
    maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0."""
    A, b, c, lam = sym(p, "A"), sym(p, "b"), sym(p, "c"), sym(p, "lam")
    objective = ir.Add((neg(ir.MatMul((T(b), lam))), num(shift)))
    stationarity = DualConstraint(ir.Add((ir.MatMul((T(A), lam)), c)), "=",
                                  ir.Zero(c.shape), "stationarity in x", "x")
    return DualProblem("maximize", (DualVariable(lam, "nonneg", "lam"),), objective,
                       (stationarity,))


def least_norm_dual(p: Problem) -> DualProblem:
    """Boyd and Vandenberghe, 2004, section 5.1.3 (from memory):
    g(nu) = -(1/4) nu'AA'nu - b'nu, maximized over free nu."""
    A, b, nu = sym(p, "A"), sym(p, "b"), sym(p, "nu")
    quad = ir.Scale(num("-1/4"), ir.MatMul((T(nu), A, T(A), nu)))
    objective = ir.Add((quad, neg(ir.MatMul((T(b), nu)))))
    return DualProblem("maximize", (DualVariable(nu, "free", "nu"),), objective, ())


def standard_lp_dual(p: Problem) -> DualProblem:
    """Boyd and Vandenberghe, 2004, section 5.1.3 (from memory), multiplier of x >= 0
    eliminated: maximize -b'nu s.t. A'nu + c >= 0."""
    A, b, c, nu = sym(p, "A"), sym(p, "b"), sym(p, "c"), sym(p, "nu")
    cons = (DualConstraint(ir.Add((ir.MatMul((T(A), nu)), c)), ">=", ir.Zero(c.shape),
                           "eliminated multiplier of x >= 0", "x"),)
    return DualProblem("maximize", (DualVariable(nu, "free", "nu"),),
                       neg(ir.MatMul((T(b), nu))), cons)


@pytest.mark.parametrize("seed", [0, 1, 2, 3, 4])
def test_inequality_lp_dual_agrees_with_primal(seed: int) -> None:
    p = inequality_lp()
    inst = bounded_lp_instance(seed)
    primal, dual = solve_primal(p, inst), solve_dual(ineq_lp_dual(p), inst)
    assert primal.status == dual.status == "optimal"
    assert dual.value == pytest.approx(primal.value, rel=1e-6, abs=1e-9)


@pytest.mark.parametrize("seed", [0, 1, 2, 3, 4])
def test_least_norm_dual_agrees_with_primal(seed: int) -> None:
    p = least_norm()
    inst = random_instance(p, {"m": 3, "n": 5}, seed)
    primal, dual = solve_primal(p, inst), solve_dual(least_norm_dual(p), inst)
    assert dual.value == pytest.approx(primal.value, rel=1e-6)
    # p* = b'(AA')^-1 b for A of full row rank (Boyd and Vandenberghe, Convex
    # Optimization, 2004, section 5.1.3, from memory)
    av, bv = inst.values["A"], inst.values["b"]
    assert primal.value == pytest.approx(bv @ np.linalg.solve(av @ av.T, bv), rel=1e-6)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_standard_lp_dual_agrees_with_primal(seed: int) -> None:
    p = standard_lp()
    inst = random_instance(p, {"m": 3, "n": 6}, seed)
    primal, dual = solve_primal(p, inst), solve_dual(standard_lp_dual(p), inst)
    assert dual.value == pytest.approx(primal.value, rel=1e-6, abs=1e-9)


def test_verify_zero_gap_and_multipliers() -> None:
    p = least_norm()
    report = verify(derivation(p, least_norm_dual(p)), seeds=[0, 1, 2],
                    dims={"m": 2, "n": 5})
    assert report.verdict == "zero-gap", report.messages
    assert report.max_abs_gap < 1e-6
    for check in report.checks:
        assert check.primal_status == check.dual_status == "optimal"
        assert check.multiplier_error is not None and check.multiplier_error < 1e-5


def test_verify_flags_a_dual_above_the_primal_loudly() -> None:
    # Weak duality (common practice): a dual value above p* proves the dual wrong.
    p = inequality_lp()
    report = verify(derivation(p, ineq_lp_dual(p, shift=1)),
                    [bounded_lp_instance(0), bounded_lp_instance(1)])
    assert report.verdict == "failed"
    assert all(not c.weak_duality_ok for c in report.checks)
    assert "weak duality violated" in report.messages[0]


def test_verify_reports_a_gap_for_a_loose_dual() -> None:
    p = inequality_lp()
    report = verify(derivation(p, ineq_lp_dual(p, shift=-1)), [bounded_lp_instance(0)])
    assert report.verdict == "gap"
    assert report.max_abs_gap == pytest.approx(1.0, abs=1e-6)


def test_random_lp_made_dual_feasible_is_bounded() -> None:
    # A wide random LP is unbounded for most costs; verify resets c = -A'lam0 + 0 from
    # the dual constraint A'lam + c = 0, so weak duality bounds it (Boyd and
    # Vandenberghe, 2004, section 5.2.1; from memory) and both values are finite.
    p = inequality_lp()
    plain = random_instance(p, {"m": 2, "n": 5}, seed=0)
    assert solve_primal(p, plain).status == "unbounded"
    report = verify(derivation(p, ineq_lp_dual(p)), seeds=[0], dims={"m": 2, "n": 5})
    assert report.verdict == "zero-gap", report.messages
    assert report.checks[0].primal_status == "optimal"


def test_infeasible_primal_with_unbounded_dual_agrees() -> None:
    # An infeasible primal (x <= -1 and x >= 1) has no finite value to compare; its dual
    # (L = x + a (x + 1) + b (1 - x): 1 + a - b = 0, g = a + b) is unbounded above, the
    # pair weak duality predicts (Boyd and Vandenberghe, 2004, section 5.2.2, from memory).
    from numeric_handbuilt import con

    x = var("x")
    cons = [con("a", x.symbol, "<=", num(-1)), con("b", x.symbol, ">=", num(1))]
    p = problem(x.symbol, [x], [], cons, dims=())
    a, b = p.constraints[0].multiplier, p.constraints[1].multiplier
    dual = DualProblem("maximize", (DualVariable(a, "nonneg", "a"),
                                    DualVariable(b, "nonneg", "b")),
                       ir.Add((a, b)), (DualConstraint(ir.Add((num(1), a, neg(b))), "=",
                                                            num(0), "stationarity"),))
    report = verify(derivation(p, dual), seeds=[0])
    [check] = report.checks
    assert (check.primal_status, check.dual_status) == ("infeasible", "unbounded")
    assert report.verdict == "infinite-agree"
    assert "as weak duality predicts" in report.messages[0]


def test_verify_fails_when_nothing_is_comparable() -> None:
    # A dual that cannot be solved (status failed) beside a solved primal proves nothing:
    # the verdict is failed, never a pair of infinities.
    from dualize.numeric.verify import InstanceCheck, summarize

    check = InstanceCheck("x", None, 1.0, float("nan"), float("nan"), "optimal", "failed",
                          None, True)
    report = summarize((check,))
    assert report.verdict == "failed"
    assert "no instance gave two comparable" in report.messages[0]


def test_inner_dual_evaluated_at_reference_multipliers() -> None:
    # Keep the Lagrangian x'x + nu'(Ax - b) minimized over x: not closed form.
    p = least_norm()
    A, b, nu = sym(p, "A"), sym(p, "b"), sym(p, "nu")
    x = p.variables[0]
    lagrangian = ir.Add((ir.MatMul((T(x.symbol), x.symbol)),
                         ir.MatMul((T(nu), ir.Add((ir.MatMul((A, x.symbol)), neg(b)))))))
    dual = DualProblem("maximize", (DualVariable(nu, "free", "nu"),), lagrangian, (),
                       inner=(x,))
    assert solve_dual(dual, random_instance(p, seed=0)).status == "unsupported"
    report = verify(derivation(p, dual), seeds=[0, 1], dims={"m": 2, "n": 4})
    assert report.verdict == "zero-gap", report.messages
    assert {c.dual_status for c in report.checks} == {"at-reference-multipliers"}


def test_unbounded_dual_is_infeasible_minus_infinity() -> None:
    p = least_norm()
    dual = replace(least_norm_dual(p), unbounded=True)
    sol = solve_dual(dual, random_instance(p, seed=0))
    assert sol.status == "infeasible" and sol.value == float("-inf")


def test_maximization_dual_is_an_upper_bound() -> None:
    # maximize -c'x s.t. Ax <= b; docs/language.md: h = sup_x (f - lam'(Ax - b)), giving
    # minimize b'lam s.t. A'lam + c = 0, lam >= 0 (from the 5.2.1 derivation).
    base = inequality_lp()
    p = replace(base, sense="maximize", objective=neg(base.objective))
    A, b, c, lam = sym(p, "A"), sym(p, "b"), sym(p, "c"), sym(p, "lam")
    cons = (DualConstraint(ir.Add((ir.MatMul((T(A), lam)), c)), "=", ir.Zero(c.shape),
                           "stationarity", "x"),)
    good = DualProblem("minimize", (DualVariable(lam, "nonneg", "lam"),),
                       ir.MatMul((T(b), lam)), cons)
    inst = bounded_lp_instance(2)
    assert verify(derivation(p, good), [inst]).verdict == "zero-gap"
    bad = replace(good, objective=ir.Add((good.objective, num(-1))))
    assert verify(derivation(p, bad), [inst]).verdict == "failed"


def test_weak_duality_samples_pass_for_right_and_fail_for_wrong_duals() -> None:
    p = least_norm()
    inst = random_instance(p, {"m": 2, "n": 4}, seed=1)
    right = weak_duality_samples(derivation(p, least_norm_dual(p)), inst, n=6, seed=0)
    assert right.ok and len(right.dual_values) == 6 and len(right.primal_values) == 7
    # A dual objective that is too large away from the optimum: -1/100 instead of -1/4.
    wrong_dual = least_norm_dual(p)
    quad = wrong_dual.objective.terms[0]
    wrong = replace(wrong_dual, objective=ir.Add((replace(quad, factor=num("-1/100")),
                                                  wrong_dual.objective.terms[1])))
    samples = weak_duality_samples(derivation(p, wrong), inst, n=6, seed=0)
    assert not samples.ok and samples.worst_violation > 0


def test_weak_duality_samples_on_a_constrained_dual() -> None:
    p = inequality_lp()
    inst = bounded_lp_instance(3)
    samples = weak_duality_samples(derivation(p, ineq_lp_dual(p)), inst, n=5, seed=2)
    assert samples.ok and samples.dual_values and samples.primal_values
    assert max(samples.dual_values) <= min(samples.primal_values) + 1e-6


def test_dimensionless_problem_runs() -> None:
    x = var("x")
    p = problem(ir.Power(x.symbol, num(2).value), [x], [], [], dims=())
    dual = DualProblem("maximize", (), num(0), ())
    report = verify(derivation(p, dual), seeds=[0])
    assert report.verdict == "zero-gap"
    assert report.checks[0].primal_value == pytest.approx(0.0, abs=1e-8)


def test_uncertifiable_dual_is_maximized_locally() -> None:
    # J. Nocedal and S. Wright, Numerical Optimization, 2006, chapter 12 (from memory):
    # minimize x1 + x2 s.t. 2 - x1^2 - x2^2 >= 0 has multiplier 1/2 and p* = -2.  Its dual
    # g(lam) = -2 lam - 1/(2 lam), written as -(1/2) lam^-1 (4 lam^2 + 1), is a quotient
    # cvxpy cannot certify; the local maximization must still find -2 at lam = 1/2.
    import sympy

    from dualize.model.expr import SCALAR, Symbol

    lam = Symbol("lam", "multiplier", SCALAR, frozenset({"nonneg"}))
    inner = ir.Add((ir.Scale(num(4), ir.Power(lam, sympy.Integer(2))), num(1)))
    objective = ir.Scale(num("-1/2"), ir.Scale(ir.Power(lam, sympy.Integer(-1)), inner))
    dual = DualProblem("maximize", (DualVariable(lam, "nonneg", "lam"),), objective, ())
    sol = solve_dual(dual, random_instance(least_norm(), seed=0))
    assert sol.status == "local"
    assert sol.value == pytest.approx(-2.0, abs=1e-6)
    assert sol.x["lam"] == pytest.approx(0.5, abs=1e-4)


def test_entropy_written_as_an_inner_product_is_certified() -> None:
    # maximize -log(z)'z over the simplex is log m at the uniform z (common practice).
    from dualize.model.expr import Symbol

    z = Symbol("z", "multiplier", shape(m))
    objective = neg(ir.MatMul((T(ir.Apply("log", z)), z)))
    cons = (DualConstraint(ir.MatMul((T(ir.Ones(m)), z)), "=", num(1), "simplex"),)
    dual = DualProblem("maximize", (DualVariable(z, "nonneg", "z"),), objective, cons)
    sol = solve_dual(dual, random_instance(least_norm(), {"m": 4, "n": 2}, seed=0))
    assert sol.status == "optimal"
    assert sol.value == pytest.approx(np.log(4), rel=1e-6)


def sdp_dual(p: Problem) -> DualProblem:
    """L = trace(CX) + nu (trace(A1 X) - b1) - trace(Z X) over X in S^n: Z = C + nu A1
    must be PSD, g = -b1 nu (Boyd and Vandenberghe, 2004, section 5.1 method; from memory)."""
    C, A1, b1, nu = sym(p, "C"), sym(p, "A1"), sym(p, "b1"), sym(p, "nu")
    cons = (DualConstraint(ir.Add((ir.Scale(nu, A1), C)), "succeq", ir.Zero(C.shape),
                           "Z = C + nu A1 is PSD", "X"),)
    return DualProblem("maximize", (DualVariable(nu, "free", "nu"),),
                       neg(ir.Scale(b1, nu)), cons)


def test_sdp_random_instances_made_bounded_and_zero_gap() -> None:
    from numeric_handbuilt import small_sdp

    from dualize.numeric.dual_data import dual_targets, make_dual_feasible
    from dualize.numeric.instance import set_violation

    p = small_sdp()
    d = derivation(p, sdp_dual(p))
    assert [t.name for t in dual_targets(d)] == ["C"]
    inst = make_dual_feasible(d, random_instance(p, {"n": 3}, seed=4), seed=4)
    assert set_violation(inst.values["C"], sym(p, "C").facts) is None
    report = verify(d, seeds=[0, 1, 2], dims={"n": 3})
    assert report.verdict == "zero-gap", report.messages
    assert {c.primal_status for c in report.checks} == {"optimal"}


def test_report_dict_is_json_and_deterministic() -> None:
    import json

    from dualize.numeric.verify import report_dict

    p = least_norm()
    d = derivation(p, least_norm_dual(p))
    one = json.dumps(report_dict(verify(d, seeds=[0, 1], dims={"m": 2, "n": 4})))
    two = json.dumps(report_dict(verify(d, seeds=[0, 1], dims={"m": 2, "n": 4})))
    assert one == two
    data = json.loads(one)
    assert data["verdict"] == "zero-gap"
    assert [c["seed"] for c in data["checks"]] == [0, 1]
    x = var("x")
    cons = [con_("a", x.symbol, "<=", num(-1)), con_("b", x.symbol, ">=", num(1))]
    p2 = problem(x.symbol, [x], [], cons, dims=())
    dual = DualProblem("maximize", (), num(0), ())
    row = report_dict(verify(derivation(p2, dual), seeds=[0]))["checks"][0]
    assert row["primal_value"] == "inf" and row["gap"] == "nan"


def test_inner_dual_with_unpriced_auxiliary_is_unsupported() -> None:
    from dualize.model.expr import Symbol

    p = least_norm()
    nu = sym(p, "nu")
    x = p.variables[0]
    aux = Symbol("u", "auxiliary", shape(m))
    lagrangian = ir.Add((ir.MatMul((T(x.symbol), x.symbol)), ir.MatMul((T(nu), aux))))
    dual = DualProblem("maximize", (DualVariable(nu, "free", "nu"),
                                    DualVariable(aux, "free", "split")), lagrangian, (),
                       inner=(x,))
    report = verify(derivation(p, dual), seeds=[0], dims={"m": 2, "n": 3})
    assert report.checks[0].dual_status == "unsupported"
    assert "u" in report.checks[0].note
    assert report.verdict == "failed"
