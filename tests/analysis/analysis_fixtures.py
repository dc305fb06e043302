"""Small constructors of typed problems for the analysis tests (no parser needed)."""

from __future__ import annotations

import sympy

from dualize.model import expr as E
from dualize.model.problem import Constraint, DataDecl, Domain, Problem, Variable

n = sympy.Symbol("n", integer=True, positive=True)
m = sympy.Symbol("m", integer=True, positive=True)


def num(v: int | str) -> E.Number:
    return E.Number(sympy.Rational(v))


def var(name: str, shape: E.Shape = E.SCALAR) -> E.Symbol:
    return E.Symbol(name, "variable", shape)


def data(name: str, shape: E.Shape = E.SCALAR, *facts: str) -> E.Symbol:
    return E.Symbol(name, "data", shape, frozenset(facts))


def neg(e: E.Expr) -> E.Expr:
    return E.Scale(num(-1), e)


def sub(a: E.Expr, b: E.Expr) -> E.Expr:
    return E.Add((a, neg(b)))


def le(label: str, lhs: E.Expr, rhs: E.Expr) -> Constraint:
    fn = lhs if _is_zero(rhs) else sub(lhs, rhs)
    return Constraint(label, "ineq", "<=", lhs, rhs, fn, _mult(label, fn), True)


def ge(label: str, lhs: E.Expr, rhs: E.Expr) -> Constraint:
    fn = neg(lhs) if _is_zero(rhs) else sub(rhs, lhs)
    return Constraint(label, "ineq", ">=", lhs, rhs, fn, _mult(label, fn), True)


def eq(label: str, lhs: E.Expr, rhs: E.Expr) -> Constraint:
    fn = lhs if _is_zero(rhs) else sub(lhs, rhs)
    return Constraint(label, "eq", "==", lhs, rhs, fn, _mult(label, fn), True)


def succeq(label: str, lhs: E.Expr, rhs: E.Expr) -> Constraint:
    fn = sub(rhs, lhs)
    return Constraint(label, "psd", "succeq", lhs, rhs, fn, _mult(label, fn), True)


def _is_zero(e: E.Expr) -> bool:
    return isinstance(e, E.Zero) or (isinstance(e, E.Number) and e.value == 0)


def _mult(label: str, fn: E.Expr) -> E.Symbol:
    return E.Symbol(label, "multiplier", fn.shape)


def problem(objective: E.Expr, variables: list[tuple[E.Symbol, str]],
            constraints: list[Constraint] = (), datas: list[E.Symbol] = (),
            sense: str = "minimize", boxes: dict[str, tuple[E.Expr, E.Expr]] | None = None
            ) -> Problem:
    boxes = boxes or {}
    vs = tuple(Variable(s, Domain(kind, *boxes.get(s.name, (None, None)))) for s, kind in variables)
    ds = tuple(DataDecl(d, "") for d in datas)
    dims = tuple(sorted({d for s in list(datas) + [v for v, _ in variables]
                         for d in (s.shape.rows, s.shape.cols) if isinstance(d, sympy.Symbol)},
                        key=str))
    return Problem(None, sense, objective, vs, ds, tuple(constraints), dims)


def load_problem(text: str) -> Problem:
    """The typed problem of ``text``, which must load without errors."""
    from dualize.model import load

    loaded = load(text)
    errors = [d for d in loaded.diagnostics if d.severity == "error"]
    assert loaded.problem is not None and not errors, errors
    return loaded.problem


def objective_curvature(objective: str, over: str, data_lines: str = "") -> str:
    """Curvature (composition rules plus the Hessian fallback) of an objective as written."""
    from dualize.analysis import curvature
    from dualize.analysis.convexity import variable_signs

    p = load_problem(f"{data_lines}\nminimize {objective}\nover {over}\n")
    return curvature(p.objective, variable_signs(p))


def rules_of(text: str, instance: object = None) -> list[str]:
    """The rule ids the analysis raises on ``text`` (sorted)."""
    from dualize.api import analyze

    return sorted(d.rule for d in analyze(load_problem(text), instance).diagnostics)
