"""Every analysis lint rule: registered with a why, and triggered by a minimal problem.

Each row states one modelling defect; the test checks the rule id and the line the
finding points at.  The textbook facts behind the rules are cited in the rows
(S. Boyd and L. Vandenberghe, Convex Optimization, 2004, from memory).
"""

from __future__ import annotations

import numpy as np
import pytest
from analysis_fixtures import load_problem

from dualize.api import analyze
from dualize.lint import rule_table

TRIGGERS = [
    # minimizing a concave function is not a convex problem (section 4.2.1)
    ("nonconvex-objective", "minimize sqrt(x)\nover x in R_+\n", None, 1),
    # a curved equality: two-way partitioning (section 5.1.5)
    ("nonconvex-equality",
     "data W in S^n\nminimize x' * W * x\nover x in R^n\ns.t.\n  nu: x .* x == 1\n", None, 5),
    # a convex function bounded below: ||x|| >= 1 is the outside of a ball (section 4.2.1)
    ("nonconvex-inequality", "minimize sum(x)\nover x in R^n\ns.t.\n  out: ||x|| >= 1\n",
     None, 4),
    ("nonaffine-matrix-inequality",
     "data F in S^n\nminimize x\nover x in R\ns.t.\n  q: x^2 * identity(n) succeq F\n",
     None, 5),
    # x'Wx with W only symmetric: no rule decides (and sizes are symbolic)
    ("convexity-undecided", "data W in S^n\nminimize x' * W * x\nover x in R^n\n", None, 2),
    ("integer-variables", "data c in R^n\nminimize c' * x\nover x in {0,1}^n\n", None, 3),
    # exercise 5.21
    ("slater-fails", "minimize exp(-x)\nover x in R, y in R_++\ns.t.\n  c: x^2 / y <= 0\n",
     None, 4),
    ("slater-undecided",
     "data r in R\nminimize sum(x)\nover x in R^n\ns.t.\n  ball: ||x|| <= r\n", None, 5),
    # minimize -x'x subject to affine constraints: g = -inf for every multiplier
    ("dual-unbounded",
     "data A in R^(m,n)\ndata b in R^m\nminimize -(x' * x)\nover x in R^n\n"
     "s.t.\n  lam: A*x <= b\n", None, 3),
    # two inequalities that say an equality (common practice)
    ("split-equality",
     "data a in R^n\ndata b in R\nminimize ||x||\nover x in R^n\ns.t.\n"
     "  lo: a' * x <= b\n  hi: a' * x >= b\n", None, 7),
    ("constant-constraint",
     "data r in R\nminimize ||x||\nover x in R^n\ns.t.\n  c: r >= 1\n", None, 5),
    ("unused-variable", "minimize x^2\nover x in R, y in R\n", None, 2),
    ("unused-data", "data q in R^n\nminimize x^2\nover x in R\n", None, 1),
    # a free variable with a linear cost and no constraint: p* = -inf unless c = 0
    ("unbounded-direction", "data c in R^n\nminimize c' * x\nover x in R^n\n", None, 3),
    ("domain-without-multiplier", "data c in R^n\nminimize c' * x\nover x in R^n_+\n", None, 3),
    ("dependent-equalities",
     "data A in R^(m,n)\ndata b in R^m\nminimize ||x||\nover x in R^n\ns.t.\n"
     "  nu: A*x == b\n",
     {"A": np.array([[1.0, 2.0], [2.0, 4.0]]), "b": np.array([1.0, 2.0])}, 6),
]


@pytest.mark.parametrize("rule, text, instance, line", TRIGGERS, ids=[t[0] for t in TRIGGERS])
def test_rule_is_triggered(rule: str, text: str, instance: object, line: int) -> None:
    found = [d for d in analyze(load_problem(text), instance).diagnostics if d.rule == rule]
    assert found, rule
    assert found[0].span is not None and found[0].span.line == line
    assert found[0].severity == rule_table()[rule].severity


def test_every_analysis_kind_has_a_trigger_and_a_why() -> None:
    table = rule_table()
    analysis = {k for k, kind in table.items() if kind.stage == "analysis"}
    assert analysis == {t[0] for t in TRIGGERS}
    assert all(table[k].why.strip() and table[k].template.strip() for k in analysis)


@pytest.mark.parametrize("text", [
    # a clean convex problem raises nothing
    "data A in R^(m,n)\ndata b in R^m\nminimize ||A*x - b||^2\nover x in R^n\n",
    "data r in R_++\nminimize ||x||_1\nover x in R^n\ns.t.\n  ball: ||x|| <= r\n",
])
def test_clean_problems_raise_nothing(text: str) -> None:
    assert analyze(load_problem(text)).diagnostics == ()


def test_output_is_deterministic() -> None:
    text = TRIGGERS[1][1]
    first = analyze(load_problem(text))
    assert all(analyze(load_problem(text)) == first for _ in range(3))


def test_dual_unbounded_for_a_maximized_convex_quadratic() -> None:
    # maximize x'x under affine constraints: sup of the Lagrangian is +inf everywhere
    found = [d for d in analyze(load_problem(
        "data b in R\nmaximize x' * x\nover x in R^n\ns.t.\n  c: sum(x) <= b\n")).diagnostics
        if d.rule == "dual-unbounded"]
    assert found and "above" in found[0].message and "plus infinity" in found[0].message
