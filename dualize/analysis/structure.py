"""Modelling slips an expert makes: unused names, split equalities, unbounded directions.

These findings read the problem's structure, not its curvature verdicts,
except where a verdict is the point (a concave quadratic under affine
constraints makes every dual bound minus infinity).
"""

from __future__ import annotations

from dualize.analysis import rules as R
from dualize.analysis.convexity import Convexity
from dualize.analysis.convexity_calculus import curvature
from dualize.analysis.forms import gram_middle, pull_scalars
from dualize.analysis.measured import Measured
from dualize.diagnostics import Diagnostic, make
from dualize.model import expr as E
from dualize.model.problem import Constraint, Problem

_DOMAIN_TEXT = {"nonneg": "R_+", "pos": "R_++", "box": "a box", "psd": "S_+", "pd": "S_++"}


def structural_findings(problem: Problem, conv: Convexity,
                        instance: Measured | None) -> list[Diagnostic]:
    out = _unused(problem) + _split_equalities(problem) + _domains(problem)
    out += _unbounded_directions(problem) + _dual_unbounded(problem, conv)
    if instance is not None:
        from dualize.analysis.rank import dependent_rows

        out += dependent_rows(problem, instance)
    return out


def _used_names(problem: Problem) -> set[str]:
    exprs = [problem.objective]
    exprs += [e for c in problem.constraints for e in (c.lhs, c.rhs, c.function)]
    exprs += [b for v in problem.variables for b in (v.domain.lo, v.domain.hi) if b is not None]
    return {s.name for e in exprs for s in E.symbols_of(e)}


def _unused(problem: Problem) -> list[Diagnostic]:
    used = _used_names(problem)
    out = [make(R.UNUSED_VARIABLE, problem.path, v.span, name=v.name)
           for v in problem.variables if v.name not in used]
    dims = {str(d) for d in problem.dims}
    out += [make(R.UNUSED_DATA, problem.path, d.span, name=d.name)
            for d in problem.data if d.name not in used and d.name not in dims]
    return out


def _sides(c: Constraint) -> tuple[E.Expr, E.Expr] | None:
    """(smaller, larger) of an inequality as written."""
    if c.kind != "ineq":
        return None
    return (c.lhs, c.rhs) if c.relation == "<=" else (c.rhs, c.lhs)


def _split_equalities(problem: Problem) -> list[Diagnostic]:
    """Pairs a <= b and b <= a, found by hashing the sides (linear in the constraints)."""
    out = []
    earlier: dict[tuple[E.Expr, E.Expr], list[Constraint]] = {}
    for b in problem.constraints:
        sb = _sides(b)
        if sb is None:
            continue
        for a in earlier.get((sb[1], sb[0]), []):
            out.append(make(R.SPLIT_EQUALITY, problem.path, b.span, first=a.label,
                            second=b.label, hint="write one constraint with =="))
        earlier.setdefault(sb, []).append(b)
    return out


def _domains(problem: Problem) -> list[Diagnostic]:
    return [make(R.DOMAIN_WITHOUT_MULTIPLIER, problem.path, v.span, name=v.name,
                 set_text=_DOMAIN_TEXT[v.domain.kind])
            for v in problem.variables if v.domain.kind in _DOMAIN_TEXT]


def _as_data(problem: Problem, keep: str) -> dict[E.Expr, E.Expr]:
    """Every variable but ``keep`` frozen into data, to read curvature in one variable."""
    return {v.symbol: E.Symbol(v.name, "data", v.symbol.shape, v.symbol.facts)
            for v in problem.variables if v.name != keep}


def _unbounded_directions(problem: Problem) -> list[Diagnostic]:
    in_constraints = {s.name for c in problem.constraints for s in E.symbols_of(c.function)}
    out = []
    for v in problem.variables:
        if v.domain.kind != "free" or v.name in in_constraints:
            continue
        if not E.depends_on(problem.objective, {v.name}):
            continue
        frozen = E.substitute(problem.objective, _as_data(problem, v.name))
        if curvature(frozen) == "affine":
            out.append(make(R.UNBOUNDED_DIRECTION, problem.path, v.span, name=v.name))
    return out


def _dual_unbounded(problem: Problem, conv: Convexity) -> list[Diagnostic]:
    """A strictly concave quadratic direction over a free domain, affine constraints only.

    Then L(x, multipliers) is a concave quadratic plus affine terms in x, which tends to
    minus infinity along the concave direction for every multiplier.
    """
    affine = {"affine-inequality", "affine-equality", "data-only"}
    if any(p.kind not in affine for p in conv.constraints):
        return []
    wanted = "concave" if problem.sense == "minimize" else "convex"
    if conv.objective.curvature != wanted:
        return []
    name = _quadratic_direction(problem.objective, problem)
    if name is None:
        return []
    low = problem.sense == "minimize"
    return [make(R.DUAL_UNBOUNDED, problem.path, problem.objective_span, name=name,
                 direction="below" if low else "above",
                 value="minus infinity" if low else "plus infinity")]


def _quadratic_direction(obj: E.Expr, problem: Problem) -> str | None:
    """The free variable of a term c * e'Me (or c * ||e||^2) in the objective whose sign
    makes the Lagrangian unbounded (c < 0 when minimizing, c > 0 when maximizing)."""
    from dualize.analysis.sign_rules import sign

    terms = obj.terms if isinstance(obj, E.Add) else (obj,)
    terms = tuple(pull_scalars(t) if isinstance(t, E.MatMul) else t for t in terms)
    free = {v.name for v in problem.variables if v.domain.kind == "free"}
    wanted = "neg" if problem.sense == "minimize" else "pos"
    for t in terms:
        factor, square = (t.factor, t.arg) if isinstance(t, E.Scale) else (None, t)
        if not _is_square(square) or (sign(factor) if factor else "pos") != wanted:
            continue
        names = [s.name for s in E.symbols_of(square, "variable")]
        if names and all(n in free for n in names) and _direction_of(square):
            return names[0]
    return None


def _is_square(node: E.Expr) -> bool:
    if isinstance(node, E.MatMul):
        return gram_middle(node.factors) is not None
    if isinstance(node, E.Power) and node.exponent == 2:
        return isinstance(node.base, E.Norm) and node.base.p == "2" or node.shape.is_scalar
    return False


def _direction_of(node: E.Expr) -> bool:
    """The square is of the variables themselves (x'x, ||x||^2, x^2, x'Px with P pd):
    strictly positive along some direction, so its negation is unbounded below."""
    if isinstance(node, E.Power):
        inner = node.base.arg if isinstance(node.base, E.Norm) else node.base
        return isinstance(inner, E.Symbol)
    found = gram_middle(node.factors)  # type: ignore[attr-defined]
    if found is None or not isinstance(found[0], E.Symbol):
        return False
    mid = found[1]
    return mid is None or isinstance(mid, E.Identity) or (
        isinstance(mid, E.Symbol) and "pd" in mid.facts)
