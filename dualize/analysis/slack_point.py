"""A Slater point on symbolic data with slack variables made large.

A variable that enters every constraint it appears in only through terms that
are linear in it and negative at the all-ones point (``1 - s - ...``, ``-s``) is
a slack: with the other variables at zero, each such constraint reads
``c + t * (negative)`` at ``s = t * 1``, which is strictly negative for t large
enough whatever the finite constant c.  The remaining constraints are checked at
the origin as ``zero_candidate`` does.
"""

from __future__ import annotations

import sympy

from dualize.analysis.at_zero import Undefined, at_zero
from dualize.analysis.convexity import Convexity
from dualize.analysis.convexity_calculus import curvature
from dualize.analysis.report import Verdict
from dualize.analysis.sign_rules import sign
from dualize.model import expr as E
from dualize.model.problem import Problem, Variable

SLATER = "Slater's condition holds (Boyd and Vandenberghe, 2004, section 5.2.3)"


def _ones_like(sym: E.Symbol) -> E.Expr | None:
    shape = sym.shape
    if shape.is_scalar:
        return E.Number(sympy.Integer(1))
    return E.Ones(shape.rows) if shape.cols == 1 else None


def _terms(node: E.Expr) -> list[E.Expr]:
    if isinstance(node, E.Add):
        return [t for term in node.terms for t in _terms(term)]
    return [node]


def _pushes_down(fn: E.Expr, var: Variable, others: frozenset[str]) -> bool:
    """Every term of ``fn`` (others at zero) in ``var`` is linear and negative at ones."""
    ones = _ones_like(var.symbol)
    if ones is None:
        return False
    try:
        folded = at_zero(fn, others)
        terms = [t for t in _terms(folded) if E.depends_on(t, {var.name})]
        return bool(terms) and all(_negative_linear(t, var, ones) for t in terms)
    except Undefined:
        return False


def _negative_linear(term: E.Expr, var: Variable, ones: E.Expr) -> bool:
    if curvature(term) != "affine" or not isinstance(at_zero(term, frozenset({var.name})),
                                                        E.Zero):
        return False
    return sign(E.substitute(term, {var.symbol: ones})) == "neg"


def slacks_of(problem: Problem) -> tuple[Variable, ...]:
    """The variables that behave as slacks in every constraint they enter."""
    out = []
    for v in problem.variables:
        if v.domain.kind not in ("free", "nonneg", "pos"):
            continue
        cons = [c for c in problem.constraints if E.depends_on(c.function, {v.name})]
        others = frozenset(w.name for w in problem.variables if w.name != v.name)
        if cons and all(c.kind == "ineq" and _pushes_down(c.function, v, others)
                        for c in cons):
            out.append(v)
    return tuple(out)


def slack_candidate(problem: Problem, conv: Convexity) -> Verdict | None:
    """Slacks large, every other variable zero, proved from the declared facts, or None."""
    from dualize.analysis.slater_symbolic import strict_labels_of, zero_allowed, zero_satisfies

    slacks = slacks_of(problem)
    if not slacks:
        return None
    names = {s.name for s in slacks}
    rest = [v for v in problem.variables if v.name not in names]
    if not all(zero_allowed(v.domain) for v in rest):
        return None
    zero = frozenset(v.name for v in rest)
    strict = strict_labels_of(conv)
    try:
        at_zero(problem.objective, zero)
        plain = [c for c in problem.constraints if not E.depends_on(c.function, names)]
        ok = all(zero_satisfies(c, frozenset(v.name for v in problem.variables), strict)
                 for c in plain)
    except Undefined:
        return None
    return _verdict(rest, slacks) if ok else None


def _verdict(rest: list[Variable], slacks: tuple[Variable, ...]) -> Verdict:
    zeros = ", ".join(f"{v.name} = 0" for v in rest)
    big = ", ".join(v.name for v in slacks)
    point = f"{zeros} and every entry of {big} equal to t" if zeros else (
        f"every entry of {big} equal to t")
    return Verdict("guaranteed", f"the point with {point}, for t large enough, satisfies "
                   f"every constraint (strictly each one {big} enters): {SLATER}")
