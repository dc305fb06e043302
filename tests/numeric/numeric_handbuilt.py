"""Hand-built typed problems for the numeric tests (independent of the parser)."""

from __future__ import annotations

import sympy

from dualize.model import expr as ir
from dualize.model.problem import Constraint, DataDecl, Domain, Problem, Variable

m = sympy.Symbol("m", integer=True, positive=True)
n = sympy.Symbol("n", integer=True, positive=True)
ONE = sympy.Integer(1)


def shape(rows: object = 1, cols: object = 1) -> ir.Shape:
    def conv(x: object) -> sympy.Expr:
        return sympy.Integer(x) if isinstance(x, int) else x  # type: ignore[return-value]
    return ir.Shape(conv(rows), conv(cols))


def data(name: str, rows: object = 1, cols: object = 1, facts: tuple[str, ...] = (),
         set_text: str = "R") -> DataDecl:
    return DataDecl(ir.Symbol(name, "data", shape(rows, cols), frozenset(facts)), set_text)


def var(name: str, rows: object = 1, cols: object = 1, kind: str = "free",
        lo: ir.Expr | None = None, hi: ir.Expr | None = None) -> Variable:
    facts = {"nonneg": ("nonneg",), "pos": ("nonneg", "pos"),
             "binary": ("binary", "integer", "nonneg"), "integer": ("integer",),
             "symmetric": ("symmetric",), "psd": ("symmetric", "psd")}.get(kind, ())
    sym = ir.Symbol(name, "variable", shape(rows, cols), frozenset(facts))
    return Variable(sym, Domain(kind, lo, hi))  # type: ignore[arg-type]


def neg(e: ir.Expr) -> ir.Expr:
    return ir.Scale(ir.Number(sympy.Integer(-1)), e)


def sub(a: ir.Expr, b: ir.Expr) -> ir.Expr:
    if isinstance(b, ir.Zero):
        return a
    if isinstance(a, ir.Zero):
        return neg(b)
    return ir.Add((a, neg(b)))


def con(label: str, lhs: ir.Expr, relation: str, rhs: ir.Expr) -> Constraint:
    """A constraint normalized by the sign conventions of the language."""
    kind = {"<=": "ineq", ">=": "ineq", "==": "eq", "succeq": "psd", "preceq": "psd"}[relation]
    function = sub(rhs, lhs) if relation in (">=", "succeq") else sub(lhs, rhs)
    facts = {"ineq": ("nonneg",), "psd": ("symmetric", "psd"), "eq": ()}[kind]
    mult = ir.Symbol(label, "multiplier", function.shape, frozenset(facts))
    return Constraint(label, kind, relation, lhs, rhs, function, mult, True)  # type: ignore


def problem(objective: ir.Expr, variables: list[Variable], datas: list[DataDecl],
            constraints: list[Constraint], sense: str = "minimize",
            dims: tuple[sympy.Symbol, ...] = (m, n)) -> Problem:
    return Problem(None, sense, objective, tuple(variables), tuple(datas),  # type: ignore
                   tuple(constraints), dims)


def num(value: object) -> ir.Number:
    return ir.Number(sympy.Rational(value))  # type: ignore[arg-type]


def inequality_lp() -> Problem:
    """minimize c'x s.t. A x <= b (Boyd and Vandenberghe, 2004, section 5.2.1)."""
    A, b, c = data("A", m, n), data("b", m), data("c", n)
    x = var("x", n)
    obj = ir.MatMul((ir.Transpose(c.symbol), x.symbol))
    cons = [con("lam", ir.MatMul((A.symbol, x.symbol)), "<=", b.symbol)]
    return problem(obj, [x], [A, b, c], cons)


def standard_lp() -> Problem:
    """minimize c'x s.t. A x == b, x >= 0 (Boyd and Vandenberghe, 2004, section 5.1.3)."""
    A, b, c = data("A", m, n), data("b", m), data("c", n, facts=("nonneg",), set_text="R^n_+")
    x = var("x", n)
    obj = ir.MatMul((ir.Transpose(c.symbol), x.symbol))
    cons = [con("nu", ir.MatMul((A.symbol, x.symbol)), "==", b.symbol),
            con("lam", x.symbol, ">=", ir.Zero(shape(n)))]
    return problem(obj, [x], [A, b, c], cons)


def least_norm() -> Problem:
    """minimize x'x s.t. A x == b (Boyd and Vandenberghe, 2004, section 5.1.3)."""
    A, b = data("A", m, n), data("b", m)
    x = var("x", n)
    obj = ir.MatMul((ir.Transpose(x.symbol), x.symbol))
    cons = [con("nu", ir.MatMul((A.symbol, x.symbol)), "==", b.symbol)]
    return problem(obj, [x], [A, b], cons)


def norm_ball_qp() -> Problem:
    """minimize 1/2 x'Px + q'x s.t. ||x|| <= r, with P in S^n_++ and r in R_++."""
    P = data("P", n, n, ("symmetric", "psd", "pd"), "S^n_++")
    q, r = data("q", n), data("r", facts=("nonneg", "pos"), set_text="R_++")
    x = var("x", n)
    quad = ir.Scale(num("1/2"), ir.MatMul((ir.Transpose(x.symbol), P.symbol, x.symbol)))
    obj = ir.Add((quad, ir.MatMul((ir.Transpose(q.symbol), x.symbol))))
    cons = [con("z", ir.Norm(x.symbol, "2"), "<=", r.symbol)]
    return problem(obj, [x], [P, q, r], cons, dims=(n,))


def small_sdp() -> Problem:
    """minimize trace(C X) s.t. trace(A1 X) == b1, X succeq 0 over X in S^n."""
    C = data("C", n, n, ("symmetric",), "S^n")
    A1 = data("A1", n, n, ("symmetric",), "S^n")
    b1 = data("b1")
    X = var("X", n, n, "symmetric")
    obj = ir.Trace(ir.MatMul((C.symbol, X.symbol)))
    cons = [con("nu", ir.Trace(ir.MatMul((A1.symbol, X.symbol))), "==", b1.symbol),
            con("Z", X.symbol, "succeq", ir.Zero(shape(n, n)))]
    return problem(obj, [X], [C, A1, b1], cons, dims=(n,))
