"""Hand-built derivations of textbook duals, for the renderer tests.

The mathematics of each is a published result (cited at each builder); the
objects are built by hand so that the renderers can be tested before and
independently of the derivation engine.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import sympy

from dualize.diagnostics import Diagnostic
from dualize.duality.result import (
    Condition,
    Derivation,
    DualConstraint,
    DualProblem,
    DualVariable,
    Equation,
    Head,
    Recovery,
    Step,
)
from dualize.model import expr as ir
from dualize.model.problem import Constraint, DataDecl, Domain, Problem, Variable
from dualize.syntax.span import Span

m, n = sympy.symbols("m n", positive=True, integer=True)
ONE = sympy.Integer(1)


def vec(size: sympy.Expr) -> ir.Shape:
    return ir.Shape(size, ONE)


def num(value: int | str) -> ir.Number:
    return ir.Number(sympy.Rational(value))


def neg(node: ir.Expr) -> ir.Expr:
    return ir.Scale(num(-1), node)


def T(node: ir.Expr) -> ir.Expr:  # noqa: N802 - reads like the mathematics
    return ir.Transpose(node)


def mm(*factors: ir.Expr) -> ir.Expr:
    return ir.MatMul(tuple(factors))


def add(*terms: ir.Expr) -> ir.Expr:
    return ir.Add(tuple(terms))


@dataclass(frozen=True)
class FakeAnalysis:
    """The analysis results the renderers read, as plain values."""

    convex: bool | None = True
    convexity_reasons: tuple[str, ...] = ()
    strong_duality_status: str = "unknown"
    strong_duality_reason: str = ""
    witness: dict[str, object] | None = None
    diagnostics: tuple[Diagnostic, ...] = field(default=())


# Soft-margin separating hyperplane. C. Cortes and V. Vapnik, Support-vector networks,
# Machine Learning 20, 1995 (from memory): the dual is maximize 1'a - 1/2 a' D a
# s.t. y'a = 0, 0 <= a <= C with D = diag(y) X X' diag(y), and w = X' (y .* a).
X = ir.Symbol("X", "data", ir.Shape(m, n))
y = ir.Symbol("y", "data", vec(m))
C = ir.Symbol("C", "data", ir.SCALAR, frozenset({"pos"}))
w = ir.Symbol("w", "variable", vec(n))
b = ir.Symbol("b", "variable", ir.SCALAR)
s = ir.Symbol("s", "variable", vec(m))
alpha = ir.Symbol("alpha", "multiplier", vec(m))
beta = ir.Symbol("beta", "multiplier", vec(m))
HALF = num("1/2")


def svm_problem() -> Problem:
    objective = add(ir.Scale(HALF, ir.Power(ir.Norm(w, "2"), sympy.Integer(2))),
                    ir.Scale(C, ir.SumAll(s)))
    margin = ir.Hadamard(y, add(mm(X, w), ir.Broadcast(b, vec(m))))
    one_minus_s = add(ir.Broadcast(num(1), vec(m)), neg(s))
    c1 = Constraint("alpha", "ineq", ">=", margin, one_minus_s,
                    add(one_minus_s, neg(margin)), alpha, True, Span(10, 3, 10, 40))
    c2 = Constraint("beta", "ineq", ">=", s, ir.Zero(vec(m)), neg(s), beta, True,
                    Span(11, 3, 11, 14))
    free = Domain("free")
    variables = (Variable(w, free), Variable(b, free), Variable(s, free))
    data = (DataDecl(X, "R^(m,n)"), DataDecl(y, "R^m"), DataDecl(C, "R_++"))
    return Problem("Soft-margin separating hyperplane", "minimize", objective, variables,
                   data, (c1, c2), (m, n), path="examples/svm.prob")


def svm_derivation() -> Derivation:
    problem = svm_problem()
    lagrangian = add(problem.objective,
                     ir.MatMul((T(alpha), problem.constraints[0].function)),
                     ir.MatMul((T(beta), problem.constraints[1].function)))
    dy = ir.Diag(y)
    quad = mm(T(alpha), dy, X, T(X), dy, alpha)
    g = add(ir.Scale(num("-1/2"), quad), ir.SumAll(alpha))
    w_formula = mm(T(X), ir.Hadamard(y, alpha))
    steps = (
        Step("lagrangian", "Form the Lagrangian with multipliers alpha >= 0 and beta >= 0.",
             (Equation(Head("L", ("w", "b", "s", "alpha", "beta")), "=", lagrangian),)),
        Step("minimize-quadratic", "Minimizing over w: stationarity gives w = Xᵀ(y ⊙ α).",
             (Equation(w, "=", w_formula),), block="w"),
        Step("minimize-affine", "The infimum over b and s is finite only if:",
             (Equation(mm(T(y), alpha), "=", num(0)),
              Equation(add(ir.Broadcast(C, vec(m)), neg(alpha), neg(beta)), "=",
                       ir.Zero(vec(m)))), block="b, s"),
        Step("eliminate-slack-multiplier", "Eliminating beta >= 0 gives alpha <= C.",
             (Equation(alpha, "<=", ir.Broadcast(C, vec(m))),)),
        Step("dual-function", "The dual function is",
             (Equation(Head("g", ("alpha",)), "=", g),)),
    )
    dual = DualProblem(
        "maximize", (DualVariable(alpha, "nonneg", "alpha"),), g,
        (DualConstraint(mm(T(y), alpha), "=", num(0), "stationarity in b"),
         DualConstraint(alpha, "<=", ir.Broadcast(C, vec(m)), "eliminated beta >= 0")))
    kkt = (
        Condition("stationarity", Equation(w, "=", w_formula)),
        Condition("stationarity", Equation(mm(T(y), alpha), "=", num(0))),
        Condition("primal feasibility", Equation(problem.constraints[0].function, "<=",
                                                 ir.Zero(vec(m)))),
        Condition("dual feasibility", Equation(alpha, ">=", ir.Zero(vec(m)))),
        Condition("complementary slackness",
                  Equation(ir.Hadamard(alpha, problem.constraints[0].function), "=",
                           ir.Zero(vec(m))), note="elementwise"),
    )
    recovery = (
        Recovery("w", w_formula),
        Recovery("b", None, "b follows from any support vector i with 0 < alpha_i < C."),
    )
    return Derivation(problem, lagrangian, dual.variables + (DualVariable(beta, "nonneg",
                      "beta"),), steps, dual, kkt, recovery,
                      notes=("The bias b is not determined by the Lagrangian.",))


def svm_analysis() -> FakeAnalysis:
    diag = Diagnostic("slater-unknown", "info", "Slater's condition cannot be decided on "
                      "symbolic data; give an instance with --data", "examples/svm.prob",
                      Span(10, 3, 10, 40), hint="run with an instance")
    return FakeAnalysis(
        True, ("the objective is a sum of a squared norm and a linear term",
               "all constraints are affine"),
        "guaranteed", "all constraints are affine and the problem is feasible",
        {"w": [0.0, 0.0], "b": 0, "s": [2.0, 2.0, 2.5]}, (diag,))


# Inequality-form LP. S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
# section 5.2.1 (from memory): minimize c'x s.t. Ax <= b has the dual
# maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0.
A = ir.Symbol("A", "data", ir.Shape(m, n))
c = ir.Symbol("c", "data", vec(n))
bb = ir.Symbol("b", "data", vec(m))
x = ir.Symbol("x", "variable", vec(n))
lam = ir.Symbol("lambda1", "multiplier", vec(m))


def lp_derivation(inner: bool = False, unbounded: bool = False,
                  domain: str = "free") -> Derivation:
    """With ``domain="nonneg"`` (x over R^n_+, not dualized) stationarity becomes
    A'lambda + c >= 0, as in the standard-form LP dual of the same section."""
    ax = mm(A, x)
    con = Constraint("lambda1", "ineq", "<=", ax, bb, add(ax, neg(bb)), lam, False)
    problem = Problem("Inequality-form LP", "minimize", mm(T(c), x),
                      (Variable(x, Domain(domain)),), (DataDecl(A, "R^(m,n)"),),
                      (con,), (m, n), path="lp.prob")
    lagrangian = add(mm(T(c), x), mm(T(lam), add(ax, neg(bb))))
    objective = lagrangian if inner else neg(mm(T(bb), lam))
    dual = DualProblem(
        "maximize", (DualVariable(lam, "nonneg", "lambda1"),), objective,
        () if inner else (DualConstraint(add(mm(T(A), lam), c), "=" if domain == "free" else ">=",
                                         ir.Zero(vec(n)),
                                         "stationarity in x"),),
        inner=problem.variables if inner else (), unbounded=unbounded)
    return Derivation(problem, lagrangian, dual.variables, (), dual, (), ())


def long_lagrangian_derivation() -> Derivation:
    """The soft-margin derivation with a Lagrangian of twelve inner-product terms."""
    from dataclasses import replace

    multipliers = [ir.Symbol(f"lambda{i}", "multiplier", x.shape) for i in range(1, 13)]
    long = add(*(mm(T(lam), x) for lam in multipliers))
    return replace(svm_derivation(), lagrangian=long, steps=())
