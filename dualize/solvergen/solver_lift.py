"""Epigraph variables for the piecewise-linear parts of a dual, so a solver can take it.

A max, min, absolute value, 1-norm or inf-norm of the multipliers is not smooth,
but each is the least value of a new variable bounded by its pieces:

    max(u, v) = min { t : u <= t, v <= t },        |u| = max(u, -u),
    ||u||_1 = min { 1't : u <= t, -u <= t },       ||u||_inf = min { s : u <= s 1, -u <= s 1 },

and min(u, v) = max { t : t <= u, t <= v }.  In the minimized objective (or on the
small side of a ``<=``) a node whose value is such a least value may be replaced by
its new variable with those bounds added: the optimum and the multipliers stay the
same (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, sections 4.1.3 and
4.3).  The replacement keeps going through sums, transposes and weights of known sign,
since a nondecreasing function of t is least where t is; a negative weight swaps the
roles of max and min.  Before that, every objective term and constraint with such a
node must be convex in the minimized form by the convexity calculus of the analysis
stage (a max under a negative weight is not), else it is refused, never guessed.

The same lift serves the primal when a generated solver recovers x as a linear
program: a ``Subject`` names the variables that move and words the refusals.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import NoReturn

import sympy

from dualize.analysis.public import curvature, sign
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.model.functions import ABS
from dualize.solvergen.calculus import NotDifferentiable, jacobian
from dualize.solvergen.ir_rewrite import is_scalar, is_vector_like, length

Part = tuple[ir.Expr, str, ir.Expr]
"""A constraint ``lhs relation rhs``, relation one of ``<=``, ``>=``, ``=``."""

MINUS = ir.Number(sympy.Integer(-1))


@dataclass(frozen=True)
class Subject:
    """What is lifted, for names and messages: the dual (over its multipliers) or the primal."""

    prefix: str
    """Auxiliary names start with an underscore, which no problem name may (see python_names)."""
    noun: str
    moving: str
    lead: str
    scope: str
    """What the caller handles, said when a term is beyond the lift."""


DUAL = Subject("_lift", "dual", "the multipliers", "cannot generate a solver: ",
               "the generator handles smooth duals and convex piecewise-linear ones")


@dataclass(frozen=True)
class Lift:
    """The dual with every liftable node replaced; ``lifted`` says what was replaced, where."""

    objective: ir.Expr
    parts: tuple[Part, ...]
    auxiliary: tuple[ir.Symbol, ...]
    lifted: tuple[str, ...]


def epigraph_lift(objective: ir.Expr, parts: list[Part], multipliers: set[str],
                  subject: Subject = DUAL) -> Lift:
    """Lift the minimized ``objective`` and the constraint ``parts`` (see the module doc);
    ``multipliers`` names the variables of ``subject`` the new variables are bounded by."""
    lifter = _Lifter(multipliers, subject)
    lifter.where = "the objective"
    terms = objective.terms if isinstance(objective, ir.Add) else (objective,)
    for term in terms:
        lifter.check(term, f"a term of the {subject.noun} objective",
                     f"the objective negated when the {subject.noun} maximizes")
    new_objective = lifter.term(objective, 1)
    lifter.where = "the constraints"
    new_parts = [lifter.constraint(part) for part in parts]
    return Lift(new_objective, (*lifter.parts, *new_parts), tuple(lifter.auxiliary),
                tuple(lifter.lifted))


def known_sign(expr: ir.Expr) -> int | None:
    """+1 if every entry is known nonnegative, -1 if known nonpositive, else None."""
    if isinstance(expr, ir.Number) and isinstance(expr.value, int):
        expr = ir.Number(sympy.Integer(expr.value))
    try:
        found = sign(expr)
    except TypeError:  # a node of code generation the sign rules do not know
        return None
    return 1 if found in ("pos", "nonneg", "zero") else -1 if found in ("neg", "nonpos") else None


def _convex(expr: ir.Expr) -> bool:
    try:
        return curvature(expr) in ("constant", "affine", "convex")
    except TypeError:
        return False


_KINDS = {"max": "max", "min": "min", "abs": "absolute value", "1": "1-norm", "inf": "inf-norm"}


def _a(kind: str) -> str:
    return ("an " if kind[0] in "aeiou" else "a ") + kind


def _kink(node: ir.Expr) -> str | None:
    """The name of a piecewise-linear node, or None for any other node."""
    if isinstance(node, ir.Extremum):
        return _KINDS[node.kind]
    if isinstance(node, ir.Apply) and node.func == ABS.name:
        return _KINDS["abs"]
    if isinstance(node, ir.Norm) and node.p in ("1", "inf"):
        return _KINDS[node.p]
    return None


class _Lifter:
    """Walks an expression with the sign it enters a minimization with, collecting bounds."""

    def __init__(self, multipliers: set[str], subject: Subject) -> None:
        self.multipliers = multipliers
        self.subject = subject
        self.where = ""
        self.auxiliary: list[ir.Symbol] = []
        self.parts: list[Part] = []
        self.lifted: list[str] = []

    def moving(self, expr: ir.Expr) -> bool:
        return ir.depends_on(expr, self.multipliers)

    def kinked(self, expr: ir.Expr) -> bool:
        """Whether ``expr`` has a piecewise-linear node of the multipliers that matters:
        one the calculus cannot differentiate through (||min(u, 0)||^2 it can)."""
        if not any(_kink(n) and self.moving(n) for n in ir.walk(expr)):
            return False
        symbols = {n for n in ir.walk(expr)
                   if isinstance(n, ir.Symbol) and n.name in self.multipliers}
        try:
            for symbol in sorted(symbols, key=lambda s: s.name):
                jacobian(expr, symbol)
        except NotDifferentiable:
            return True
        return False

    def check(self, expr: ir.Expr, what: str, form: str) -> None:
        """Refuse ``expr`` if it has a piecewise-linear node and is not convex as minimized."""
        if self.kinked(expr) and not _convex(expr):
            kinds = sorted({k for n in ir.walk(expr) if (k := _kink(n)) and self.moving(n)})
            raise DualizeError(
                f"{self.subject.lead}{what} with {' and '.join(map(_a, kinds))} of "
                f"{self.subject.moving} is not shown convex by the convexity calculus ({form}), "
                "so no epigraph lift applies", 2
            )

    def constraint(self, part: Part) -> Part:
        """``lhs <= rhs`` holds iff the lifted lhs (least value) <= the lifted rhs (largest)."""
        lhs, rel, rhs = part
        if not (self.kinked(lhs) or self.kinked(rhs)):
            return part
        if rel == "=":
            raise DualizeError(
                f"{self.subject.lead}a {self.subject.noun} equality constraint has a max, min, "
                f"absolute value or polyhedral norm of {self.subject.moving}; it is not convex, "
                "so no epigraph variable can replace it", 2
            )
        if rel == ">=":
            lhs, rhs = rhs, lhs
        self.check(ir.Add((lhs, ir.Scale(MINUS, rhs))), f"a {self.subject.noun} constraint",
                   "as lhs - rhs <= 0")
        return (self.term(lhs, 1), "<=", self.term(rhs, -1))

    def term(self, expr: ir.Expr, sign: int) -> ir.Expr:
        """An expression equal to ``expr`` at the least (sign +1) or largest (sign -1)
        value over the new variables, with the bounds that say so added."""
        if not self.kinked(expr):
            return expr
        if not (is_scalar(expr) or is_vector_like(expr)):
            self.refuse("a matrix-valued expression")
        rule = getattr(self, f"_{type(expr).__name__}", None)
        if rule is None:
            self.refuse(f"an operation the lift does not pass through ({type(expr).__name__})")
        return rule(expr, sign)

    def refuse(self, why: str) -> NoReturn:
        raise DualizeError(
            f"{self.subject.lead}a piecewise-linear term in {self.where} of the "
            f"{self.subject.noun} sits under {why}, so no epigraph variable can replace it "
            f"({self.subject.scope})", 2
        )

    def fresh(self, shape: ir.Shape, kind: str) -> ir.Symbol:
        symbol = ir.Symbol(f"{self.subject.prefix}{len(self.auxiliary)}", "auxiliary",
                           ir.Shape(length(shape), sympy.Integer(1)))
        self.auxiliary.append(symbol)
        note = f"the {kind} in {self.where}"
        if note not in self.lifted:
            self.lifted.append(note)
        return symbol

    def bounded(self, pieces: tuple[ir.Expr, ...], shape: ir.Shape, sign: int, kind: str,
                ) -> ir.Symbol:
        """A new t with piece <= t (sign +1) or t <= piece (sign -1) for every piece."""
        t = self.fresh(shape, kind)
        wide: ir.Expr = t
        if is_scalar(t) and not is_scalar(pieces[0]):
            wide = ir.Broadcast(t, pieces[0].shape)
        elif pieces[0].shape.rows == 1 and not is_scalar(t):
            wide = ir.Transpose(t)
        for piece in pieces:
            lifted = self.term(piece, sign)
            self.parts.append((lifted, "<=", wide) if sign > 0 else (wide, "<=", lifted))
        return t

    def weight(self, factor: ir.Expr) -> int:
        if self.moving(factor):
            self.refuse(f"a factor that depends on {self.subject.moving}")
        sign = known_sign(factor)
        if sign is None:
            self.refuse("a weight of unknown sign")
        return sign

    # --- one rule per node type the lift passes through or replaces ------------
    def _Add(self, expr: ir.Add, sign: int) -> ir.Expr:  # noqa: N802
        return ir.Add(tuple(self.term(t, sign) for t in expr.terms))

    def _Transpose(self, expr: ir.Transpose, sign: int) -> ir.Expr:  # noqa: N802
        return ir.Transpose(self.term(expr.arg, sign))

    def _SumAll(self, expr: ir.SumAll, sign: int) -> ir.Expr:  # noqa: N802
        return ir.SumAll(self.term(expr.arg, sign))

    def _Broadcast(self, expr: ir.Broadcast, sign: int) -> ir.Expr:  # noqa: N802
        return replace(expr, arg=self.term(expr.arg, sign))

    def _Scale(self, expr: ir.Scale, sign: int) -> ir.Expr:  # noqa: N802
        return ir.Scale(expr.factor, self.term(expr.arg, sign * self.weight(expr.factor)))

    def _Hadamard(self, expr: ir.Hadamard, sign: int) -> ir.Expr:  # noqa: N802
        if self.moving(expr.left):
            return ir.Hadamard(self.term(expr.left, sign * self.weight(expr.right)), expr.right)
        return ir.Hadamard(expr.left, self.term(expr.right, sign * self.weight(expr.left)))

    def _MatMul(self, expr: ir.MatMul, sign: int) -> ir.Expr:  # noqa: N802
        """A chain with one factor in the multipliers, the others of known sign."""
        moving = [i for i, f in enumerate(expr.factors) if self.moving(f)]
        if len(moving) != 1:
            self.refuse(f"a product of two expressions in {self.subject.moving}")
        i = moving[0]
        for factor in expr.factors[:i] + expr.factors[i + 1:]:
            sign *= self.weight(factor)
        factors = list(expr.factors)
        factors[i] = self.term(factors[i], sign)
        return ir.MatMul(tuple(factors))

    def _Extremum(self, expr: ir.Extremum, sign: int) -> ir.Expr:  # noqa: N802
        if expr.kind != ("max" if sign > 0 else "min"):
            self.refuse(
                f"a sign at which its {expr.kind} has no epigraph form (a max is lifted where "
                "it is minimized or bounded above, a min where it is maximized or bounded below)"
            )
        t = self.bounded((expr.left, expr.right), expr.shape, sign, expr.kind)
        return _shaped(t, expr.shape)

    def _Apply(self, expr: ir.Apply, sign: int) -> ir.Expr:  # noqa: N802
        if expr.func != ABS.name:
            self.refuse(f"the function {expr.func}")
        if sign < 0:
            self.refuse("a negative weight, where an absolute value has no epigraph form")
        pieces = (expr.arg, ir.Scale(MINUS, expr.arg))
        return _shaped(self.bounded(pieces, expr.shape, 1, _KINDS["abs"]), expr.shape)

    def _Norm(self, expr: ir.Norm, sign: int) -> ir.Expr:  # noqa: N802
        if expr.p not in ("1", "inf"):
            self.refuse(f"the {expr.p}-norm")
        if sign < 0:
            self.refuse(f"a negative weight, where a {expr.p}-norm has no epigraph form")
        arg = expr.arg
        if not (is_scalar(arg) or is_vector_like(arg)):
            self.refuse(f"the {expr.p}-norm of a matrix")
        pieces = (arg, ir.Scale(MINUS, arg))
        if expr.p == "inf":
            return self.bounded(pieces, ir.SCALAR, 1, _KINDS["inf"])
        return ir.SumAll(self.bounded(pieces, arg.shape, 1, _KINDS["1"]))


def _shaped(t: ir.Symbol, shape: ir.Shape) -> ir.Expr:
    """The new column ``t`` in the orientation of the node it replaces."""
    return ir.Transpose(t) if shape.rows == 1 and shape.cols != 1 else t
