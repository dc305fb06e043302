"""What a derivation produces: recorded steps, the dual problem, KKT, recovery.

Renderers, the numeric checker and the solver generator read only these
classes; the engine that fills them lives beside this module.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from dualize.model.expr import Expr, Symbol
from dualize.model.problem import Problem, Variable
from dualize.model.relations import Relation, relation_of


@dataclass(frozen=True)
class Head:
    """A displayed left-hand side such as ``g(alpha, beta)`` or ``L(w, b, alpha)``."""

    name: str
    args: tuple[str, ...] = ()


@dataclass(frozen=True)
class Equation:
    """One displayed line of a step: ``lhs relation rhs``."""

    lhs: Expr | Head
    relation: Relation
    rhs: Expr

    def __post_init__(self) -> None:
        object.__setattr__(self, "relation", relation_of(self.relation))


@dataclass(frozen=True)
class Step:
    """One recorded step: the rule that fired, a sentence, and its equations.

    ``rule`` is a stable id (``lagrangian``, ``minimize-affine``,
    ``minimize-quadratic``, ``conjugate``, ``split-affine-argument``,
    ``eliminate-slack-multiplier``, ``maximize-free-multiplier``, ...).
    ``text`` is a sentence whose mathematics is marked: ``$x$`` is the name x and
    ``$key$`` the formula stored under that key in ``formulas`` (an IR expression,
    an ``Equation`` or an exact sympy scalar function), so every renderer sets it
    as mathematics; the displayed ``equations`` follow the sentence.
    """

    rule: str
    text: str
    equations: tuple[Equation, ...] = ()
    block: str | None = None
    formulas: tuple[tuple[str, object], ...] = ()


DualSet = Literal["free", "nonneg", "nonpos", "psd", "symmetric"]


@dataclass(frozen=True)
class DualVariable:
    """A dual variable, the constraint (or auxiliary split) it belongs to, and its set."""

    symbol: Symbol
    set: DualSet
    origin: str

    @property
    def name(self) -> str:
        return self.symbol.name


@dataclass(frozen=True)
class DualConstraint:
    """A constraint of the dual as displayed, ``lhs relation rhs``, and why it is there."""

    lhs: Expr
    relation: Relation
    rhs: Expr
    reason: str
    label: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "relation", relation_of(self.relation))


@dataclass(frozen=True)
class DualProblem:
    """The dual problem.

    ``inner`` lists the primal variables still minimized (or maximized) over when
    the engine could not eliminate them: then the objective is
    ``inf over inner of objective`` and ``closed_form`` is False.
    ``unbounded`` is True when the dual function is minus infinity for every
    multiplier (plus infinity for a maximization), said plainly.
    """

    sense: Literal["maximize", "minimize"]
    variables: tuple[DualVariable, ...]
    objective: Expr
    constraints: tuple[DualConstraint, ...]
    inner: tuple[Variable, ...] = ()
    unbounded: bool = False
    strictly_convex_boxes: tuple[str, ...] = ()
    """The primal variables kept in a box whose minimization leaves a max or min of the
    multipliers in ``objective``, when the Lagrangian is strictly convex in every one of
    them (and no other block leaves one): the minimizer over each box is then unique, so
    the dual function is continuously differentiable although its printed form has
    kinks (Danskin's theorem; D. Bertsekas, Nonlinear Programming, 2nd ed., 1999,
    Prop. B.25).  Empty when the engine shows no such fact."""

    @property
    def closed_form(self) -> bool:
        return not self.inner and not self.unbounded


KKTGroup = Literal[
    "stationarity", "primal feasibility", "dual feasibility", "complementary slackness"
]


@dataclass(frozen=True)
class Condition:
    """One KKT condition; ``equation`` is None when only ``note`` can state it
    (a subgradient condition such as 0 in the subdifferential of a norm)."""

    group: KKTGroup
    equation: Equation | None
    note: str = ""


@dataclass(frozen=True)
class Recovery:
    """How a primal variable follows from optimal multipliers.

    ``formula`` is None when the Lagrangian does not determine the variable;
    ``note`` then says how to get it (complementary slackness, a support vector).
    """

    variable: str
    formula: Expr | None
    note: str = ""
    relations: tuple[Equation, ...] = ()
    """Equations the variable satisfies at the optimum when no formula gives it, e.g.
    the stationarity of a split variable: A x - y = z/2 for u = A x - y."""


@dataclass(frozen=True)
class Derivation:
    problem: Problem
    lagrangian: Expr
    multipliers: tuple[DualVariable, ...]
    steps: tuple[Step, ...]
    dual: DualProblem
    kkt: tuple[Condition, ...]
    recovery: tuple[Recovery, ...]
    notes: tuple[str, ...] = field(default=())
