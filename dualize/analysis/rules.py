"""The analysis stage's kinds of finding: convexity, strong duality, modelling slips.

Each kind is listed once (in ``KINDS``), with a stable id that names the defect, a default
severity, a message template and the reason a user should care.  Ids share
prefixes by family (``nonconvex-``, ``slater-``, ``unused-``) so that
``--select nonconvex`` picks a whole family.
"""

from __future__ import annotations

from dualize.diagnostics import RuleKind

_KINDS: list[RuleKind] = []  # filled by this module alone, in order


def _kind(id: str, severity: str, template: str, why: str,
          aliases: tuple[str, ...] = ()) -> RuleKind:
    kind = RuleKind(id, severity, template, why, "analysis", aliases)  # type: ignore[arg-type]
    _KINDS.append(kind)
    return kind


NONCONVEX_OBJECTIVE = _kind(
    "nonconvex-objective", "warning",
    "the objective is not {wanted} (it is {found}): {detail}",
    "The dual of a nonconvex problem is still a lower bound (weak duality), but the "
    "bound may be loose and the KKT conditions no longer certify optimality.",
)
NONCONVEX_EQUALITY = _kind(
    "nonconvex-equality", "warning",
    "equality constraint '{label}' is not affine (its function is {found}), so its set is "
    "not convex",
    "Only affine equalities keep the feasible set convex; a curved equality such as "
    "x_i^2 == 1 makes the problem combinatorial and the dual only a bound.",
)
NONCONVEX_INEQUALITY = _kind(
    "nonconvex-inequality", "warning",
    "inequality '{label}' bounds a {found} function from the wrong side ({detail}), so its "
    "set is not convex",
    "A convex function may be bounded above and a concave one below; the other way round "
    "cuts a hole in the feasible set and strong duality can fail.",
)
NONAFFINE_MATRIX_INEQUALITY = _kind(
    "nonaffine-matrix-inequality", "warning",
    "matrix inequality '{label}' is not affine in the variables (it is {found})",
    "Semidefinite constraints are convex when the matrix is affine in the variables (a "
    "linear matrix inequality); otherwise the analysis cannot vouch for convexity.",
)
CONVEXITY_UNDECIDED = _kind(
    "convexity-undecided", "info",
    "the convexity of {where} could not be decided: {detail}",
    "Neither the convexity calculus (sums, scalings, maxima and compositions that keep "
    "convexity) nor the Hessian test could decide; the tool says so rather than guess, "
    "and the strong-duality verdict stays unknown.",
    aliases=("curvature-unknown",),
)
INTEGER_VARIABLES = _kind(
    "integer-variables", "warning",
    "variable '{name}' ranges over {set_text}: the problem is not convex",
    "With integer or binary variables the Lagrange dual gives a bound (often the LP "
    "relaxation's bound) and there is a duality gap in general.",
)
SLATER_FAILS = _kind(
    "slater-fails", "warning",
    "no strictly feasible point exists: {detail}",
    "Without a strictly feasible point Slater's condition fails and a convex problem can "
    "have a duality gap (Boyd and Vandenberghe, exercise 5.21).",
)
SLATER_UNDECIDED = _kind(
    "slater-undecided", "info",
    "Slater's condition cannot be decided on symbolic data ({detail}); give an instance "
    "with --data",
    "Strong duality of a convex problem with curved constraints rests on a strictly "
    "feasible point, which depends on the data's values.",
)
DUAL_UNBOUNDED = _kind(
    "dual-unbounded", "warning",
    "the Lagrangian is unbounded {direction} in '{name}' for every multiplier: the dual "
    "function is {value} everywhere",
    "A concave quadratic objective under affine constraints makes every dual bound "
    "trivial; the dual carries no information.",
)
SPLIT_EQUALITY = _kind(
    "split-equality", "info",
    "constraints '{first}' and '{second}' together say an equality",
    "Two opposite inequalities give two nonnegative multipliers where one free multiplier "
    "would do; write the equality with == for a cleaner dual.",
)
CONSTANT_CONSTRAINT = _kind(
    "constant-constraint", "warning",
    "constraint '{label}' involves no variable: it is a condition on the data only",
    "A constraint on data alone is either always true or makes the problem infeasible; "
    "its multiplier only adds a meaningless term to the dual.",
)
UNUSED_VARIABLE = _kind(
    "unused-variable", "warning",
    "variable '{name}' appears in neither the objective nor any constraint",
    "An unused variable is usually a typo for another name; it makes the inner "
    "minimization and the recovered primal solution ambiguous.",
)
UNUSED_DATA = _kind(
    "unused-data", "info",
    "data '{name}' is declared but never used",
    "An unused parameter is usually a forgotten term or a typo for another name.",
)
UNBOUNDED_DIRECTION = _kind(
    "unbounded-direction", "warning",
    "variable '{name}' appears only linearly in the objective and in no constraint: the "
    "problem is unbounded unless its coefficient is zero",
    "A free variable with a linear cost and no constraint sends the optimum to infinity, "
    "and its dual constraint (coefficient = 0) is then infeasible.",
)
DOMAIN_WITHOUT_MULTIPLIER = _kind(
    "domain-without-multiplier", "info",
    "variable '{name}' ranges over {set_text}: this bound is kept in the inner "
    "minimization and gets no multiplier",
    "A domain narrower than R^n is not dualized; write the bound as a constraint to get a "
    "multiplier for it (a different, partial Lagrangian).",
)
DEPENDENT_EQUALITIES = _kind(
    "dependent-equalities", "info",
    "the rows of equality constraint '{label}' {detail}",
    "Dependent equality rows leave the equality multipliers non-unique and make the dual "
    "degenerate; drop the redundant rows or expect a family of dual optima.",
)

KINDS: tuple[RuleKind, ...] = tuple(_KINDS)
