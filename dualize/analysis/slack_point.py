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
    """The summands, with a scale carried into a sum (-(a + b) is -a and -b): each must
    push down on its own, which asks no less than the sum as a whole."""
    if isinstance(node, E.Add):
        return [t for term in node.terms for t in _terms(term)]
    if isinstance(node, E.Scale) and isinstance(node.arg, E.Add):
        return [E.Scale(node.factor, t) for t in _terms(node.arg)]
    return [node]


def _negative_linear(term: E.Expr, var: Variable, ones: E.Expr) -> bool:
    if curvature(term) != "affine" or not isinstance(at_zero(term, frozenset({var.name})),
                                                        E.Zero):
        return False
    return sign(E.substitute(term, {var.symbol: ones})) == "neg"


class _Split:
    """A constraint function cut into its terms once, with the variables of each term and
    whether each is defined with all its variables at zero.

    Folding the whole function once per variable costs O(variables x size) per constraint,
    minutes on a problem written entry by entry; a term is folded here only for the
    variables it holds, and the fold of a term at the origin is shared by all the others.
    """

    def __init__(self, fn: E.Expr, variables: frozenset[str]) -> None:
        self.terms = _terms(fn)
        self.names = [frozenset(s.name for s in E.symbols_of(t)) & variables
                      for t in self.terms]
        self.by_name: dict[str, list[int]] = {}
        for i, names in enumerate(self.names):
            for name in names:
                self.by_name.setdefault(name, []).append(i)
        self.undefined = {i for i, (t, n) in enumerate(zip(self.terms, self.names, strict=True))
                          if not self._defined(t, n)}

    @staticmethod
    def _defined(term: E.Expr, names: frozenset[str]) -> bool:
        try:
            at_zero(term, names)
        except Undefined:
            return False
        return True

    def pushes_down(self, var: Variable) -> bool:
        """Every term (the other variables at zero) in ``var`` is linear and negative at
        ones, and the function is defined there."""
        ones = _ones_like(var.symbol)
        mine = self.by_name.get(var.name, [])
        if ones is None or not self.undefined <= set(mine):
            return False
        found: list[E.Expr] = []
        for i in mine:
            try:
                folded = at_zero(self.terms[i], self.names[i] - {var.name})
            except Undefined:
                return False
            found += [t for t in _terms(folded) if E.depends_on(t, {var.name})]
        return bool(found) and all(_negative_linear(t, var, ones) for t in found)


def slacks_of(problem: Problem) -> tuple[Variable, ...]:
    """The variables that behave as slacks in every constraint they enter."""
    variables = frozenset(v.name for v in problem.variables)
    split = [(c, _Split(c.function, variables)) for c in problem.constraints]
    out = []
    for v in problem.variables:
        if v.domain.kind not in ("free", "nonneg", "pos"):
            continue
        cons = [(c, cut) for c, cut in split if v.name in cut.by_name]
        if cons and all(c.kind == "ineq" and cut.pushes_down(v) for c, cut in cons):
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
