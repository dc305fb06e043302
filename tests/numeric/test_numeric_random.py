"""Random instances: every declared set honoured, and the primal made strictly feasible.

Feasibility is checked independently with cvxpy (reference library, common
practice): each problem, with its objective replaced by 0 and each inequality
tightened by a margin, must be solvable.
"""

from __future__ import annotations

from dataclasses import replace

import cvxpy as cp
import numpy as np
import pytest
from numeric_handbuilt import (
    con,
    data,
    inequality_lp,
    least_norm,
    m,
    n,
    norm_ball_qp,
    num,
    problem,
    shape,
    small_sdp,
    standard_lp,
    sub,
    var,
)

from dualize.model import expr as ir
from dualize.model.problem import Problem
from dualize.numeric.instance import Instance, set_violation
from dualize.numeric.random_data import random_instance
from dualize.numeric.reference import make_variable
from dualize.numeric.translate import to_cvxpy

MARGIN = 1e-3


def every_set_problem() -> Problem:
    decls = [data("a", n, facts=("nonneg",), set_text="R^n_+"),
             data("p", n, facts=("nonneg", "pos"), set_text="R^n_++"),
             data("S", n, n, ("symmetric",), "S^n"),
             data("P", n, n, ("symmetric", "psd"), "S^n_+"),
             data("Q", n, n, ("symmetric", "psd", "pd"), "S^n_++"),
             data("t", facts=("nonneg", "pos"), set_text="R_++"),
             data("G", m, n)]
    x = var("x", n)
    return problem(ir.SumAll(x.symbol), [x], decls, [])


def box_chain_problem() -> Problem:
    """0 <= alpha <= C with C in R_++ broadcast, y'alpha == 0 cannot be targeted."""
    C = data("C", facts=("nonneg", "pos"), set_text="R_++")
    h = data("h", m)
    G = data("G", m, n)
    alpha = var("alpha", n)
    cons = [con("lo", ir.Zero(shape(n)), "<=", alpha.symbol),
            con("hi", alpha.symbol, "<=", ir.Broadcast(C.symbol, shape(n))),
            con("g", ir.MatMul((G.symbol, alpha.symbol)), ">=", h.symbol)]
    return problem(ir.SumAll(alpha.symbol), [alpha], [C, h, G], cons)


def matrix_upper_problem() -> Problem:
    """X preceq S with S in S^n_+ data: S is the upper side, raised into its set."""
    S = data("S", n, n, ("symmetric", "psd"), "S^n_+")
    B = data("B", n, n)
    X = var("X", n, n, "symmetric")
    lhs = ir.Add((X.symbol, ir.Scale(num(3), ir.MatMul((ir.Transpose(B.symbol), B.symbol)))))
    cons = [con("Z", lhs, "preceq", S.symbol),
            con("W", X.symbol, "succeq", ir.Zero(shape(n, n)))]
    return problem(ir.Trace(X.symbol), [X], [S, B], cons, dims=(n,))


def box_domain_problem() -> Problem:
    """A box domain [0, u] with u data; u may not be reset (it bounds the domain)."""
    u = data("u", facts=("nonneg", "pos"), set_text="R_++")
    b = data("b", m)
    A = data("A", m, n)
    x = var("x", n, kind="box", lo=num(0), hi=u.symbol)
    cons = [con("nu", ir.MatMul((A.symbol, x.symbol)), "==", b.symbol)]
    return problem(ir.SumAll(x.symbol), [x], [u, b, A], cons)


def entropy_problem() -> Problem:
    """Entropy maximization (Boyd and Vandenberghe, 2004, section 5.1.6, from memory):
    sum(x) == 1 has no data, so x0 is moved onto it (rule 5) before b is set."""
    A, b = data("A", m, n), data("b", m)
    x = var("x", n)
    obj = ir.SumAll(ir.Hadamard(x.symbol, ir.Apply("log", x.symbol)))
    cons = [con("lam", ir.MatMul((A.symbol, x.symbol)), "<=", b.symbol),
            con("nu", ir.SumAll(x.symbol), "==", num(1))]
    return problem(obj, [x], [A, b], cons)


FEASIBLE = [inequality_lp, standard_lp, least_norm, norm_ball_qp, small_sdp,
            box_chain_problem, matrix_upper_problem, box_domain_problem, entropy_problem]


def strictly_feasible(p: Problem, inst: Instance) -> bool:
    """Is there a point in the domains with every inequality slack by MARGIN?"""
    variables, extra = {}, []
    for v in p.variables:
        x, _ = make_variable(v, inst.dims)
        variables[v.name] = x
        if v.domain.kind == "box":
            hi = inst.values[v.domain.hi.name] if isinstance(v.domain.hi, ir.Symbol) else 1.0
            extra += [x >= float(v.domain.lo.value), x <= hi]
    cons = list(extra)
    for c in p.constraints:
        f = to_cvxpy(c.function, variables, inst.values, inst.dims)
        if c.kind == "eq":
            cons.append(f == 0)
        elif c.kind == "psd":
            cons.append((f + f.T) / 2 << -MARGIN * np.eye(f.shape[0]))
        else:
            cons.append(f <= -MARGIN)
    prob = cp.Problem(cp.Minimize(0), cons)
    prob.solve(solver=cp.CLARABEL)
    return prob.status == "optimal"


@pytest.mark.parametrize("build", FEASIBLE, ids=[f.__name__ for f in FEASIBLE])
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_random_instances_are_strictly_feasible(build, seed: int) -> None:
    p = build()
    inst = random_instance(p, {"m": 7, "n": 3} if build is least_norm else None, seed)
    assert strictly_feasible(p, inst)


def test_without_the_rule_the_same_problem_is_infeasible() -> None:
    # The check above can fail: a tall least-norm system with unrelated b is infeasible.
    p = least_norm()
    inst = random_instance(p, {"m": 7, "n": 3}, seed=0)
    rng = np.random.default_rng(99)
    values = {**inst.values, "b": rng.normal(size=7)}
    assert not strictly_feasible(p, replace(inst, values=values))


@pytest.mark.parametrize("seed", range(6))
def test_every_declared_set_is_honoured(seed: int) -> None:
    p = every_set_problem()
    inst = random_instance(p, seed=seed)
    for decl in p.data:
        assert set_violation(inst.values[decl.name], decl.symbol.facts) is None, decl.name
    assert 3 <= inst.dims["n"] <= 6 and 3 <= inst.dims["m"] <= 6


def test_targets_keep_their_sets() -> None:
    for seed in range(5):
        for build in (box_chain_problem, matrix_upper_problem, box_domain_problem):
            p = build()
            inst = random_instance(p, seed=seed)
            for decl in p.data:
                assert set_violation(inst.values[decl.name], decl.symbol.facts) is None


def test_given_dims_are_used_and_seed_is_deterministic() -> None:
    p = inequality_lp()
    one = random_instance(p, {"m": 9, "n": 2}, seed=5)
    two = random_instance(p, {"m": 9, "n": 2}, seed=5)
    other = random_instance(p, {"m": 9, "n": 2}, seed=6)
    assert one.dims == {"m": 9, "n": 2}
    assert one.values["A"].shape == (9, 2)
    for name in one.values:
        np.testing.assert_array_equal(one.values[name], two.values[name])
    assert not np.array_equal(one.values["A"], other.values["A"])


def test_scalar_data_are_floats_and_vectors_one_dimensional() -> None:
    inst = random_instance(norm_ball_qp(), {"n": 4}, seed=0)
    assert isinstance(inst.values["r"], float) and inst.values["r"] > 0
    assert inst.values["q"].shape == (4,)
    assert inst.values["P"].shape == (4, 4)


def test_point_repair_is_what_makes_the_entropy_instance_feasible() -> None:
    from dualize.numeric import random_data

    p = entropy_problem()
    targets = random_data.find_targets(p)
    assert [t.name if t else None for t in targets] == ["b", None]
    rng = np.random.default_rng(0)
    sizes = {"m": 4, "n": 5}
    values = {d.name: random_data.draw_value(d.symbol, sizes, rng) for d in p.data}
    point = random_data.draw_point(p, values, sizes, rng)
    fixed = random_data.repair_point(p, targets, values, point, sizes)
    assert float(np.sum(point["x"])) > 1.2  # drawn entries lie in [0.25, 1]
    assert float(np.sum(fixed["x"])) == pytest.approx(1.0, abs=1e-7)
    assert float(np.min(fixed["x"])) >= random_data.MARGIN - 1e-7


def additive_problem() -> Problem:
    """b - A*x >= 0 and A2*x - 2*b2 == 0: data as an additive term of the function."""
    A, b = data("A", m, n), data("b", m)
    A2, b2 = data("A2", m, n), data("b2", m)
    x = var("x", n)
    residual = sub(b.symbol, ir.MatMul((A.symbol, x.symbol)))
    eq = sub(ir.MatMul((A2.symbol, x.symbol)), ir.Scale(num(2), b2.symbol))
    cons = [con("lam", residual, ">=", ir.Zero(shape(m))),
            con("nu", eq, "==", ir.Zero(shape(m)))]
    return problem(ir.SumAll(x.symbol), [x], [A, b, A2, b2], cons)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_additive_data_terms_are_targets(seed: int) -> None:
    from dualize.numeric.random_data import find_targets

    p = additive_problem()
    targets = find_targets(p)
    assert [(t.name, t.side) for t in targets] == [("b", "upper"), ("b2", "equal")]
    inst = random_instance(p, {"m": 6, "n": 2}, seed)
    assert strictly_feasible(p, inst)


def test_entropy_instance_feasible_when_the_margin_must_shrink() -> None:
    # n = 40 entries summing to 1 cannot all exceed the first margin 0.05; the rule
    # retries with smaller margins, and the reference confirms feasibility.
    p = entropy_problem()
    inst = random_instance(p, {"m": 10, "n": 40}, seed=0)
    assert strictly_feasible(p, inst)
