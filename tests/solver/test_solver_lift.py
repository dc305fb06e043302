"""The epigraph lift on small made-up duals: what it accepts equals the original term,
what is not convex in the minimized form is refused with a message."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.optimize
import sympy

from dualize.duality.result import DualConstraint, DualProblem, DualVariable
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.numeric.evaluate import evaluate
from dualize.solvergen.ir_rewrite import length
from dualize.solvergen.solver_lift import epigraph_lift
from dualize.solvergen.solver_plan import make_plan

N = sympy.Symbol("n", integer=True, positive=True)
VEC = ir.vector(N)
Y = ir.Symbol("y", "multiplier", VEC, frozenset({"nonneg"}))
C = ir.Symbol("c", "data", VEC)
W = ir.Symbol("w", "data", VEC, frozenset({"nonneg"}))
ZERO = ir.Zero(VEC)


def num(value: int) -> ir.Number:
    return ir.Number(sympy.Integer(value))


def dot(row: ir.Expr, col: ir.Expr) -> ir.Expr:
    return ir.MatMul((ir.Transpose(row), col))


def ones_dot(col: ir.Expr) -> ir.Expr:
    return dot(ir.Ones(N), col)


def dual(sense: str, objective: ir.Expr, *constraints: DualConstraint) -> DualProblem:
    return DualProblem(sense, (DualVariable(Y, "nonneg", "y"),), objective,  # type: ignore[arg-type]
                       tuple(constraints))


def shifted() -> ir.Expr:
    return ir.Add((Y, C))


REFUSED = [
    # A max of affine functions is convex and a min concave; a maximized max or a
    # minimized min is neither, so no epigraph describes it: S. Boyd and L. Vandenberghe,
    # Convex Optimization, 2004, sections 3.2.3 and 4.1.3 (from memory).
    (dual("maximize", ones_dot(ir.Extremum("max", ZERO, shifted()))), "not shown convex"),
    (dual("minimize", ir.SumAll(ir.Extremum("min", ZERO, shifted()))), "not shown convex"),
    (dual("maximize", ir.SumAll(ir.Apply("abs", shifted()))), "absolute value"),
    (dual("maximize", ir.Norm(shifted(), "1")), "1-norm"),
    # A weight of unknown sign (data without a fact) leaves the curvature undecided.
    (dual("maximize", dot(C, ir.Extremum("min", ZERO, shifted()))), "not shown convex"),
    # min(0, y .* y) is a min of a convex term: no composition rule makes it concave.
    (dual("maximize", ones_dot(ir.Extremum("min", ZERO, ir.Hadamard(Y, Y)))),
     "not shown convex"),
    # A norm on the large side of <=, or in an equality, is a nonconvex set (same source).
    (dual("maximize", ones_dot(C), DualConstraint(ir.Norm(Y, "1"), ">=", num(1), "made up")),
     "dual constraint"),
    (dual("maximize", ones_dot(C), DualConstraint(ir.Norm(Y, "inf"), "=", num(1), "made up")),
     "equality"),
    # Convex by the composition rules (exp nondecreasing and convex, Boyd and Vandenberghe,
    # 2004, section 3.2.4, from memory) but beyond the lift, which refuses rather than guess.
    (dual("minimize", ir.SumAll(ir.Apply("exp", ir.Extremum("max", Y, C)))), "function exp"),
]


@pytest.mark.parametrize(("problem", "words"), REFUSED)
def test_nonconvex_piecewise_term_is_refused(problem: DualProblem, words: str) -> None:
    with pytest.raises(DualizeError, match=words) as caught:
        make_plan(problem)
    assert caught.value.exit_code == 2
    assert caught.value.message.startswith("cannot generate a solver")


def test_concave_piecewise_dual_becomes_a_linear_program() -> None:
    # maximize w'min(0, y + c) - ||y - c||_1 - 2 ||y||_inf s.t. ||y||_1 <= 3 is concave and
    # piecewise linear: an LP after epigraph variables (Boyd and Vandenberghe, 2004, 4.3).
    objective = ir.Add((
        dot(W, ir.Extremum("min", ZERO, shifted())),
        ir.Scale(num(-1), ir.Norm(ir.Add((Y, ir.Scale(num(-1), C))), "1")),
        ir.Scale(num(-2), ir.Norm(Y, "inf")),
    ))
    ball = DualConstraint(ir.Norm(Y, "1"), "<=", num(3), "made up")
    plan = make_plan(dual("maximize", objective, ball))
    assert plan.method == "linprog"
    assert "epigraph variables" in plan.reason
    assert all(s.name.startswith("_") for s in plan.auxiliary)
    assert len({s.name for s in plan.auxiliary}) == len(plan.auxiliary) == 4


def _least_lifted_value(objective: ir.Expr, y: np.ndarray, data: dict, dims: dict) -> float:
    """min over the epigraph variables of the lifted objective at fixed y, by HiGHS.

    The lifted objective and constraints are affine in the new variables, so their
    coefficients are differences of values at the unit vectors."""
    lift = epigraph_lift(objective, [], {"y"})
    sizes = [int(length(s.shape).subs(N, dims["n"])) for s in lift.auxiliary]

    def at(expr: ir.Expr, a: np.ndarray) -> np.ndarray:
        pieces = np.split(a, np.cumsum(sizes)[:-1])
        named = {s.name: p for s, p in zip(lift.auxiliary, pieces, strict=True)}
        values = {**data, "y": y, **named}
        return np.atleast_1d(np.asarray(evaluate(expr, values, dims), dtype=float)).ravel()

    def coefficients(expr: ir.Expr) -> tuple[np.ndarray, np.ndarray]:
        base = at(expr, np.zeros(sum(sizes)))
        unit = np.eye(sum(sizes))
        return base, np.column_stack([at(expr, unit[k]) - base for k in range(sum(sizes))])

    base, cost = coefficients(lift.objective)
    rows, rhs = [], []
    for lhs, rel, other in lift.parts:
        assert rel == "<="
        value, jac = coefficients(ir.Add((lhs, ir.Scale(num(-1), other))))
        rows.append(jac)
        rhs.append(-value)
    res = scipy.optimize.linprog(cost[0], A_ub=np.vstack(rows), b_ub=np.concatenate(rhs),
                                 bounds=[(None, None)] * sum(sizes), method="highs")
    assert res.status == 0
    return float(base[0] + res.fun)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_lift_keeps_the_value_of_each_convex_term(seed: int) -> None:
    # max(u, v) = min {t : u <= t, v <= t}, ||u||_1 = min {1't : -t <= u <= t},
    # ||u||_inf = min {s : -s <= u_i <= s}: S. Boyd and L. Vandenberghe, Convex Optimization,
    # 2004, sections 4.1.3 and 4.3 (from memory).  Checked against numpy at random points.
    rng = np.random.default_rng(seed)
    n = 5
    y, c, w = rng.normal(size=n), rng.normal(size=n), rng.random(n)
    minimized = ir.Add((
        dot(W, ir.Extremum("max", Y, C)),
        ir.Scale(num(-1), ones_dot(ir.Extremum("min", ZERO, shifted()))),
        ir.Scale(num(2), ir.Norm(ir.Add((Y, ir.Scale(num(-1), C))), "1")),
        ir.Scale(num(3), ir.Norm(Y, "inf")),
        ir.SumAll(ir.Apply("abs", shifted())),
    ))
    expected = (w @ np.maximum(y, c) - np.minimum(0, y + c).sum() + 2 * np.abs(y - c).sum()
                + 3 * np.abs(y).max() + np.abs(y + c).sum())
    value = _least_lifted_value(minimized, y, {"c": c, "w": w}, {"n": n})
    assert value == pytest.approx(expected, rel=1e-9, abs=1e-9)
