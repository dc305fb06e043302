"""A derivation as JSON for other programs: schema version 1.

The layout is documented in docs/json-schema.md and checked by
docs/derivation.schema.json.  Keys come in a fixed, meaningful order (not
sorted): identity first, then the primal, the verdicts, the dual and the rest.
Every expression is given twice, as Unicode text and as LaTeX.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from typing import Any

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
from dualize.model.problem import Constraint, DataDecl, Problem, Variable
from dualize.render.caution import CAUTION
from dualize.render.document import Analysis, diagnostic_key, head_text, shape_text
from dualize.render.latex_printer import latex_expr, latex_relation
from dualize.render.text_printer import text_expr, text_relation

SCHEMA_VERSION = 1
NO_ANALYSIS = "no analysis was run"


def math_pair(node: ir.Expr) -> dict[str, str]:
    """An expression as ``{"text": ..., "latex": ...}``."""
    return {"text": text_expr(node), "latex": latex_expr(node)}


def relation_math(lhs: ir.Expr | Head, relation: str, rhs: ir.Expr) -> dict[str, str]:
    """A displayed relation ``lhs rel rhs`` as text and LaTeX."""
    left_text, left_latex = _side(lhs)
    return {"text": f"{left_text} {text_relation(relation)} {text_expr(rhs)}",
            "latex": f"{left_latex} {latex_relation(relation)} {latex_expr(rhs)}"}


def _side(lhs: ir.Expr | Head) -> tuple[str, str]:
    if not isinstance(lhs, Head):
        return text_expr(lhs), latex_expr(lhs)
    from dualize.render.latex import LatexFormatter
    from dualize.render.text import TextFormatter

    return head_text(lhs, TextFormatter()), head_text(lhs, LatexFormatter())


def variable_json(variable: Variable) -> dict[str, Any]:
    domain = variable.domain
    bounds = None
    if domain.kind == "box":
        bounds = {"lo": _maybe_math(domain.lo), "hi": _maybe_math(domain.hi)}
    return {"name": variable.name, "shape": shape_text(variable.symbol.shape),
            "set": domain.kind, "bounds": bounds}


def _maybe_math(node: ir.Expr | None) -> dict[str, str] | None:
    return None if node is None else math_pair(node)


def data_json(decl: DataDecl) -> dict[str, Any]:
    return {"name": decl.name, "shape": shape_text(decl.symbol.shape), "set": decl.set_text,
            "facts": sorted(decl.symbol.facts)}


def constraint_json(constraint: Constraint) -> dict[str, Any]:
    relation = constraint.relation.relation
    span = constraint.span
    return {
        "label": constraint.label,
        "labelled": constraint.labelled,
        "multiplier": constraint.multiplier.name,
        "kind": constraint.kind,
        "relation": constraint.relation,
        **relation_math(constraint.lhs, relation, constraint.rhs),
        "function": math_pair(constraint.function),
        "line": span.line if span else None,
        "column": span.column if span else None,
    }


def primal_json(problem: Problem) -> dict[str, Any]:
    return {
        "title": problem.title,
        "sense": problem.sense,
        "variables": [variable_json(v) for v in problem.variables],
        "data": [data_json(d) for d in problem.data],
        "dimensions": [str(d) for d in problem.dims],
        "objective": math_pair(problem.objective),
        "constraints": [constraint_json(c) for c in problem.constraints],
    }


def convexity_json(analysis: Analysis | None) -> dict[str, Any]:
    if analysis is None:
        return {"convex": None, "reasons": [NO_ANALYSIS]}
    return {"convex": analysis.convex, "reasons": list(analysis.convexity_reasons)}


def strong_duality_json(analysis: Analysis | None) -> dict[str, Any]:
    if analysis is None:
        return {"status": "unknown", "reason": NO_ANALYSIS, "witness": None}
    witness = analysis.witness
    return {"status": analysis.strong_duality_status,
            "reason": analysis.strong_duality_reason,
            "witness": None if witness is None else plain_point(witness)}


def plain_point(point: Mapping[str, object]) -> dict[str, Any]:
    """A witness point with plain JSON numbers (arrays become nested lists)."""
    return {str(k): _plain(point[k]) for k in sorted(point)}


def _plain(value: object) -> Any:
    if hasattr(value, "tolist"):
        value = value.tolist()  # type: ignore[union-attr]
    if isinstance(value, list | tuple):
        return [_plain(v) for v in value]
    if isinstance(value, bool | int):
        return value
    number = float(value)  # type: ignore[arg-type]
    if not math.isfinite(number):
        raise ValueError(f"a witness coordinate is not finite: {number}")
    return int(number) if number.is_integer() and abs(number) < 2**53 else number


def dual_variable_json(variable: DualVariable) -> dict[str, Any]:
    return {"name": variable.name, "shape": shape_text(variable.symbol.shape),
            "set": variable.set, "origin": variable.origin}


def dual_constraint_json(constraint: DualConstraint) -> dict[str, Any]:
    return {"label": constraint.label, "relation": constraint.relation,
            **relation_math(constraint.lhs, constraint.relation, constraint.rhs),
            "reason": constraint.reason}


def dual_json(dual: DualProblem) -> dict[str, Any]:
    return {
        "sense": dual.sense,
        "variables": [dual_variable_json(v) for v in dual.variables],
        "objective": math_pair(dual.objective),
        "constraints": [dual_constraint_json(c) for c in dual.constraints],
        "closed_form": dual.closed_form,
        "unbounded": dual.unbounded,
        "inner": [variable_json(v) for v in dual.inner],
    }


def equation_json(equation: Equation) -> dict[str, str]:
    return relation_math(equation.lhs, equation.relation, equation.rhs)


def step_json(step: Step) -> dict[str, Any]:
    """A step; its sentence in Unicode (``text``) and in LaTeX (``latex``)."""
    from dualize.render.latex import LatexFormatter
    from dualize.render.text import TextFormatter

    return {"rule": step.rule, "text": TextFormatter().prose(step.text, step.formulas),
            "latex": LatexFormatter().prose(step.text, step.formulas), "block": step.block,
            "equations": [equation_json(e) for e in step.equations]}


def kkt_json(condition: Condition) -> dict[str, Any]:
    """A condition; ``text`` and ``latex`` are null when only the note states it."""
    stated = ({"text": None, "latex": None} if condition.equation is None
              else equation_json(condition.equation))
    return {"group": condition.group, **stated, "note": _sentence(condition.note)}


def recovery_json(recovery: Recovery) -> dict[str, Any]:
    formula = None if recovery.formula is None else math_pair(recovery.formula)
    out = {"variable": recovery.variable, "formula": formula,
           "note": _sentence(recovery.note)}
    if recovery.relations:
        out["relations"] = [{"lhs": math_pair(e.lhs), "relation": e.relation,
                             "rhs": math_pair(e.rhs)} for e in recovery.relations
                            if not isinstance(e.lhs, Head)]
    return out


def _sentence(sentence: str) -> str:
    """An engine sentence with its marked names and signs in Unicode (``$x$`` -> ``x``)."""
    from dualize.render.text import TextFormatter

    return TextFormatter().prose(sentence)


def diagnostic_json(d: Diagnostic) -> dict[str, Any]:
    span = d.span
    return {"rule": d.rule, "severity": d.severity, "message": d.message, "file": d.path,
            "line": span.line if span else None, "column": span.column if span else None,
            "end_line": span.end_line if span else None,
            "end_column": span.end_column if span else None, "hint": d.hint,
            "notes": list(d.notes)}


def derivation_json(derivation: Derivation, analysis: Analysis | None = None) -> dict[str, Any]:
    """The whole document as a plain dictionary, in the documented key order."""
    diagnostics = () if analysis is None else tuple(sorted(analysis.diagnostics,
                                                           key=diagnostic_key))
    return {
        "version": SCHEMA_VERSION,
        "file": derivation.problem.path,
        "primal": primal_json(derivation.problem),
        "convexity": convexity_json(analysis),
        "strong_duality": strong_duality_json(analysis),
        "lagrangian": math_pair(derivation.lagrangian),
        "dual": dual_json(derivation.dual),
        "steps": [step_json(s) for s in derivation.steps],
        "kkt": [kkt_json(c) for c in derivation.kkt],
        "recovery": [recovery_json(r) for r in derivation.recovery],
        "notes": [_sentence(n) for n in derivation.notes],
        "diagnostics": [diagnostic_json(d) for d in diagnostics],
        "caution": CAUTION,
    }


def render_json(derivation: Derivation, analysis: Analysis | None = None) -> str:
    """The derivation as JSON text (indent 2, UTF-8 characters kept), ending in a newline."""
    return json.dumps(derivation_json(derivation, analysis), indent=2,
                      ensure_ascii=False) + "\n"
