"""The lint findings of the analysis stage, as diagnostics (never printed here)."""

from __future__ import annotations

from dualize.analysis import rules as R
from dualize.analysis.convexity import Convexity, Part
from dualize.analysis.measured import Measured
from dualize.analysis.report import Verdict
from dualize.analysis.structure import structural_findings
from dualize.diagnostics import Diagnostic, make
from dualize.model.problem import Problem

_SET_TEXT = {"integer": "the integers", "binary": "{0,1}"}


def diagnostics_for(problem: Problem, conv: Convexity, verdict: Verdict,
                    instance: Measured | None = None) -> tuple[Diagnostic, ...]:
    """Every analysis finding for ``problem``, in source order (then by rule id)."""
    found = list(_objective(problem, conv.objective))
    spans = {c.label: c.span for c in problem.constraints}
    for part in conv.constraints:
        found.extend(_constraint(problem, part, spans.get(part.label)))
    found.extend(_integrality(problem, conv))
    found.extend(_slater(problem, verdict))
    found.extend(structural_findings(problem, conv, instance))
    return tuple(sorted(found, key=_order))


def _order(d: Diagnostic) -> tuple:
    where = (d.span.line, d.span.column) if d.span is not None else (0, 0)
    return (where, d.rule, d.message)


def _objective(problem: Problem, obj: Part) -> list[Diagnostic]:
    wanted = "convex" if problem.sense == "minimize" else "concave"
    span = problem.objective_span
    if obj.kind == "bad":
        found = "neither convex nor concave" if obj.curvature == "neither" else obj.curvature
        detail = f"{problem.sense} needs a {wanted} objective"
        return [make(R.NONCONVEX_OBJECTIVE, problem.path, span, wanted=wanted, found=found,
                     detail=detail, hint=_objective_hint(problem))]
    if obj.kind == "unknown":
        return [make(R.CONVEXITY_UNDECIDED, problem.path, span, where="the objective",
                     detail="no rule of the convexity calculus applies and the Hessian "
                     "test is out of reach (symbolic sizes or sign)")]
    return []


def _objective_hint(problem: Problem) -> str:
    return ("the dual is still a valid bound; for a convex model, "
            f"{problem.sense} a {'convex' if problem.sense == 'minimize' else 'concave'} "
            "function")


def _found(curv: str) -> str:
    return "neither convex nor concave" if curv == "neither" else curv


def _constraint(problem: Problem, part: Part, span: object) -> list[Diagnostic]:
    path, label = problem.path, part.label
    if part.kind == "nonaffine-equality":
        return [make(R.NONCONVEX_EQUALITY, path, span, label=label, found=_found(part.curvature))]
    if part.kind == "nonconvex-inequality":
        detail = ("a concave function must be bounded below, not above"
                  if part.curvature == "concave" else "no side of it gives a convex set")
        return [make(R.NONCONVEX_INEQUALITY, path, span, label=label,
                     found=_found(part.curvature), detail=detail)]
    if part.kind == "nonaffine-matrix-inequality":
        return [make(R.NONAFFINE_MATRIX_INEQUALITY, path, span, label=label,
                     found=_found(part.curvature))]
    if part.kind in ("unknown-inequality", "unknown-equality"):
        return [make(R.CONVEXITY_UNDECIDED, path, span, where=f"constraint '{label}'",
                     detail="no rule of the convexity calculus applies and the Hessian "
                     "test is out of reach")]
    if part.kind == "data-only":
        return [make(R.CONSTANT_CONSTRAINT, path, span, label=label,
                     hint="move a condition on the data into the data's declared set")]
    return []


def _integrality(problem: Problem, conv: Convexity) -> list[Diagnostic]:
    out = []
    for name in conv.integral:
        v = problem.variable(name)
        out.append(make(R.INTEGER_VARIABLES, problem.path, v.span, name=name,
                        set_text=_SET_TEXT[v.domain.kind],
                        hint="the dual bounds the relaxation over the convex hull at best"))
    return out


def _slater(problem: Problem, verdict: Verdict) -> list[Diagnostic]:
    spans = {c.label: c.span for c in problem.constraints}
    span = spans.get(verdict.label) if verdict.label else None
    if verdict.finding == "slater-fails":
        return [make(R.SLATER_FAILS, problem.path, span, detail=verdict.detail)]
    if verdict.finding == "slater-undecided":
        return [make(R.SLATER_UNDECIDED, problem.path, span, detail=verdict.detail)]
    return []
