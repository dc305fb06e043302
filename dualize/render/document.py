"""A derivation laid out as parts of a document, before any target syntax.

Every output target (LaTeX, Markdown, terminal text) shows the same parts in
the same words: the problem, the derivation steps, the dual, KKT, recovery and
the verdicts.  This module decides *what* is shown, with each expression already
rendered by a target's ``Formatter``; the targets decide only *how* it is laid
out, so no target can drift from the others in content.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Protocol

from dualize.diagnostics import Diagnostic
from dualize.duality.result import (
    Condition,
    Derivation,
    DualProblem,
    DualVariable,
    Equation,
    Head,
    Recovery,
    Step,
)
from dualize.model import expr as ir
from dualize.model.ops import is_zero
from dualize.model.problem import Constraint, Problem, Variable
from dualize.render import summary as S
from dualize.render.caution import CAUTION
from dualize.render.structure import split_sign

KKT_ORDER = ("stationarity", "primal feasibility", "dual feasibility", "complementary slackness")
_DUAL_SET_RELATION = {"nonneg": ">=", "nonpos": "<=", "psd": "succeq"}


class Analysis(Protocol):
    """What the analysis stage tells the renderers (convexity, strong duality, lint)."""

    @property
    def convex(self) -> bool | None: ...

    @property
    def convexity_reasons(self) -> tuple[str, ...]: ...

    @property
    def strong_duality_status(self) -> str: ...

    @property
    def strong_duality_reason(self) -> str: ...

    @property
    def witness(self) -> Mapping[str, object] | None: ...

    @property
    def diagnostics(self) -> tuple[Diagnostic, ...]: ...


class Formatter(Protocol):
    """A target's spelling of expressions, relations, names, sets and prose."""

    def expr(self, node: ir.Expr) -> str: ...

    def relation(self, relation: str) -> str: ...

    def name(self, name: str) -> str: ...

    def domain(self, variable: Variable) -> str: ...

    def dual_set(self, variable: DualVariable) -> str: ...

    def prose(self, text: str, formulas: tuple[tuple[str, object], ...] = ()) -> str: ...

    def gradient(self, variable: str, of: str) -> str: ...

    def terms(self, node: ir.Expr) -> tuple[str, ...]: ...


@dataclass(frozen=True)
class Line:
    """One displayed relation, already rendered: ``lhs relation rhs``, a tag and a note."""

    lhs: str
    relation: str
    rhs: str
    tag: str = ""
    note: str = ""
    rhs_terms: tuple[str, ...] = ()


@dataclass(frozen=True)
class ProblemView:
    """An optimization problem as papers state it; ``inner`` names what is still minimized."""

    sense: str
    over: tuple[str, ...]
    objective: str
    lines: tuple[Line, ...]
    inner: tuple[str, ...] = ()
    inner_op: str = ""
    unbounded: bool = False


@dataclass(frozen=True)
class StepView:
    rule: str
    text: str
    lines: tuple[Line, ...]


@dataclass(frozen=True)
class KKTView:
    group: str
    lines: tuple[Line, ...]

    @property
    def equations(self) -> tuple[Line, ...]:
        """The conditions that are relations, for a display."""
        return tuple(line for line in self.lines if line.relation)

    @property
    def statements(self) -> tuple[str, ...]:
        """The conditions stated only in words, for sentences after the display."""
        return tuple(_sentence_case(line.note.rstrip(".")) for line in self.lines
                     if not line.relation)


def _sentence_case(text: str) -> str:
    """A statement standing as a sentence opens with a capital letter."""
    return text[:1].upper() + text[1:] if text[:1].isalpha() else text


@dataclass(frozen=True)
class RecoveryView:
    variable: str
    formula: str | None
    note: str
    relations: tuple[Line, ...] = ()


@dataclass(frozen=True)
class VerdictView:
    """The analysis verdicts as sentences; empty strings when no analysis was given."""

    convexity: str
    strong_duality: str
    status: str
    witness: tuple[Line, ...]


@dataclass(frozen=True)
class DiagnosticView:
    location: str
    severity: str
    rule: str
    message: str
    hint: str


@dataclass(frozen=True)
class DocumentView:
    title: str
    file: str
    primal: ProblemView
    lagrangian: Line | None
    steps: tuple[StepView, ...]
    dual: ProblemView
    kkt: tuple[KKTView, ...]
    recovery: tuple[RecoveryView, ...]
    verdict: VerdictView | None
    diagnostics: tuple[DiagnosticView, ...]
    notes: tuple[str, ...]
    caution: str


def build_view(derivation: Derivation, analysis: Analysis | None,
               fmt: Formatter) -> DocumentView:
    """Every part of the document, rendered by ``fmt`` and in reading order."""
    problem = derivation.problem
    has_lagrangian_step = any(s.rule == "lagrangian" for s in derivation.steps)
    return DocumentView(
        title=fmt.prose(problem.title or "Lagrange dual"),
        file=problem.path,
        primal=primal_view(problem, fmt),
        lagrangian=None if has_lagrangian_step else lagrangian_line(derivation, fmt),
        steps=tuple(step_view(s, fmt) for s in derivation.steps),
        dual=dual_view(derivation.dual, fmt),
        kkt=kkt_views(derivation.kkt, fmt),
        recovery=tuple(recovery_view(r, fmt) for r in derivation.recovery),
        verdict=None if analysis is None else verdict_view(analysis, fmt, problem),
        diagnostics=() if analysis is None else diagnostic_views(analysis.diagnostics, fmt),
        notes=tuple(fmt.prose(n) for n in derivation.notes),
        caution=fmt.prose(CAUTION),
    )


def primal_view(problem: Problem, fmt: Formatter) -> ProblemView:
    """The problem as written: constraints tagged with their multipliers, then domains."""
    lines = S.grouped([constraint_line(c, fmt) for c in problem.constraints], fmt, _note_line)
    lines += [Line(fmt.name(v.name), fmt.relation("in"), fmt.domain(v), note=fmt.prose("domain"))
              for v in problem.variables if v.domain.kind != "free"]
    over = S.short_names([fmt.name(v.name) for v in problem.variables], fmt)
    return ProblemView(problem.sense, tuple(over), S.short_expr(problem.objective, fmt),
                       tuple(lines))


def _note_line(note: str) -> Line:
    """The line that stands for the rest of a summarized list (``summary.grouped``)."""
    return Line("", "", "", note=note)


def constraint_line(constraint: Constraint, fmt: Formatter) -> Line:
    relation = constraint.relation.relation
    return Line(fmt.expr(constraint.lhs), fmt.relation(relation), fmt.expr(constraint.rhs),
                tag=fmt.name(constraint.multiplier.name))


def lagrangian_line(derivation: Derivation, fmt: Formatter) -> Line:
    names = [v.name for v in derivation.problem.variables]
    names += [m.name for m in derivation.multipliers]
    return equation_line(Equation(Head("L", tuple(names)), "=", derivation.lagrangian), fmt)


def head_text(head: Head, fmt: Formatter) -> str:
    """``g(alpha, beta)`` with each name in the target's spelling; ``grad_x L`` as a gradient."""
    name = _head_name(head.name, fmt)
    if not head.args:
        return name
    return name + "(" + ", ".join(S.short_names([fmt.name(a) for a in head.args], fmt)) + ")"


def _head_name(name: str, fmt: Formatter) -> str:
    if name.startswith("grad_") and " " in name:
        variable, _, of = name.removeprefix("grad_").partition(" ")
        return fmt.gradient(fmt.name(variable), _head_name(of.strip(), fmt))
    return " ".join(fmt.name(word) for word in name.split())


def equation_line(equation: Equation, fmt: Formatter, note: str = "") -> Line:
    lhs, relation, rhs = equation.lhs, equation.relation, equation.rhs
    if not isinstance(lhs, Head):
        lhs, relation, rhs = signs_as_written(lhs, relation, rhs)
    left = head_text(lhs, fmt) if isinstance(lhs, Head) else S.short_expr(lhs, fmt)
    note = "; ".join(filter(None, (note, S.term_count_note(rhs))))
    return Line(left, fmt.relation(relation), S.short_expr(rhs, fmt),
                note=fmt.prose(note) if note else "", rhs_terms=S.short_terms(rhs, fmt))


_FLIPPED = {"=": "=", "<=": ">=", ">=": "<=", "<": ">", ">": "<", "succeq": "preceq",
            "preceq": "succeq"}


def signs_as_written(lhs: ir.Expr, relation: str,
                     rhs: ir.Expr) -> tuple[ir.Expr, str, ir.Expr]:
    """``-nu >= -1`` as a paper writes it, ``nu <= 1``: both sides negated when the left
    one opens with a minus sign and the right one is zero or negative too."""
    if relation not in _FLIPPED:
        return lhs, relation, rhs
    negative, magnitude = split_sign(lhs)
    if not negative:
        return lhs, relation, rhs
    if is_zero(rhs) or (isinstance(rhs, ir.Broadcast) and is_zero(rhs.arg)):
        return magnitude, _FLIPPED[relation], rhs
    rhs_negative, rhs_magnitude = split_sign(rhs)
    if rhs_negative:
        return magnitude, _FLIPPED[relation], rhs_magnitude
    return lhs, relation, rhs


def step_view(step: Step, fmt: Formatter) -> StepView:
    return StepView(step.rule, fmt.prose(step.text, step.formulas),
                    tuple(S.grouped([equation_line(e, fmt) for e in step.equations], fmt,
                                    _note_line)))


def dual_view(dual: DualProblem, fmt: Formatter) -> ProblemView:
    """The dual with its constraints, then the sign conditions not already stated."""
    lines = [_dual_line(c.lhs, c.relation, c.rhs, c.label, fmt) for c in dual.constraints]
    lines += [_set_line(v, fmt) for v in dual.variables
              if v.set != "free" and not _stated(v, dual)]
    inner_op = "inf" if dual.sense == "maximize" else "sup"
    over = S.short_names([fmt.name(v.name) for v in dual.variables], fmt)
    return ProblemView(dual.sense, tuple(over), S.short_expr(dual.objective, fmt),
                       tuple(S.grouped(lines, fmt, _note_line)),
                       inner=tuple(_ranging(v, fmt) for v in dual.inner), inner_op=inner_op,
                       unbounded=dual.unbounded)


def _dual_line(lhs: ir.Expr, relation: str, rhs: ir.Expr, label: str | None,
               fmt: Formatter) -> Line:
    lhs, relation, rhs = signs_as_written(lhs, relation, rhs)
    return Line(S.short_expr(lhs, fmt), fmt.relation(relation), S.short_expr(rhs, fmt),
                tag=fmt.name(label) if label else "")


def _ranging(variable: Variable, fmt: Formatter) -> str:
    """``x`` for a free variable, ``x in R^n_+`` for one minimized over a domain."""
    if variable.domain.kind == "free":
        return fmt.name(variable.name)
    return f"{fmt.name(variable.name)} {fmt.relation('in')} {fmt.domain(variable)}"


def _set_line(variable: DualVariable, fmt: Formatter) -> Line:
    relation = _DUAL_SET_RELATION.get(variable.set)
    if relation is None:
        return Line(fmt.name(variable.name), fmt.relation("in"), fmt.dual_set(variable))
    return Line(fmt.name(variable.name), fmt.relation(relation), "0")


def _stated(variable: DualVariable, dual: DualProblem) -> bool:
    """True when a dual constraint already says ``variable (>=|<=|succeq) 0``."""
    relation = _DUAL_SET_RELATION.get(variable.set)
    return any(c.lhs == variable.symbol and c.relation == relation and is_zero(c.rhs)
               for c in dual.constraints)


def unbounded_sentence(dual: ProblemView, minus_infinity: str, plus_infinity: str) -> str:
    """What an unbounded dual function means, in the target's spelling of infinity."""
    if not dual.unbounded:
        return ""
    value = minus_infinity if dual.sense == "maximize" else plus_infinity
    bound = "lower" if dual.sense == "maximize" else "upper"
    return (f"The dual function is {value} for every choice of multipliers, so the dual "
            f"gives only the trivial {bound} bound.")


def kkt_views(conditions: tuple[Condition, ...], fmt: Formatter) -> tuple[KKTView, ...]:
    """The conditions grouped in the textbook order, each group in the engine's order."""
    groups = [g for g in KKT_ORDER if any(c.group == g for c in conditions)]
    groups += sorted({c.group for c in conditions} - set(KKT_ORDER))
    return tuple(
        KKTView(fmt.prose(g), tuple(S.grouped(
            [condition_line(c, fmt) for c in conditions if c.group == g], fmt, _note_line)))
        for g in groups)


def condition_line(condition: Condition, fmt: Formatter) -> Line:
    """A KKT condition; one stated only in words (a subgradient condition) is a bare note."""
    if condition.equation is None:
        return Line("", "", "", note=fmt.prose(condition.note))
    return equation_line(condition.equation, fmt, condition.note)


def recovery_view(recovery: Recovery, fmt: Formatter) -> RecoveryView:
    formula = None if recovery.formula is None else fmt.expr(recovery.formula)
    relations = tuple(Line(fmt.expr(e.lhs), fmt.relation(e.relation), fmt.expr(e.rhs))
                      for e in recovery.relations if isinstance(e.lhs, ir.Expr))
    return RecoveryView(fmt.name(recovery.variable), formula, fmt.prose(recovery.note),
                        relations)


def verdict_view(analysis: Analysis, fmt: Formatter, problem: Problem) -> VerdictView:
    witness = analysis.witness or {}
    lines = tuple(Line(fmt.name(k), "=", format_value(witness[k]))
                  for k in witness_order(witness, problem))
    return VerdictView(fmt.prose(convexity_sentence(analysis)),
                       fmt.prose(strong_duality_sentence(analysis)),
                       analysis.strong_duality_status, lines)


def witness_order(witness: Mapping[str, object], problem: Problem) -> list[str]:
    """The problem's variables in declaration order, then any other names sorted."""
    declared = [v.name for v in problem.variables if v.name in witness]
    return declared + sorted(k for k in witness if k not in declared)


def convexity_sentence(analysis: Analysis) -> str:
    reasons = "; ".join(S.short_reasons(analysis.convexity_reasons))
    lead = {True: "The problem is convex", False: "The problem is not convex",
            None: "Convexity could not be decided"}[analysis.convex]
    return f"{lead}: {reasons}." if reasons else f"{lead}."


def strong_duality_sentence(analysis: Analysis) -> str:
    lead = {"guaranteed": "Strong duality holds",
            "not-guaranteed": "Strong duality is not guaranteed"}.get(
        analysis.strong_duality_status, "Strong duality is undecided")
    reason = analysis.strong_duality_reason.rstrip(".")
    return f"{lead}: {reason}." if reason else f"{lead}."


def format_value(value: object) -> str:
    """A witness value in plain digits: numbers, vectors ``(1, 2)``, matrices ``[[...]]``."""
    if hasattr(value, "tolist"):
        value = value.tolist()  # type: ignore[union-attr]
    if isinstance(value, list | tuple):
        if value and all(isinstance(v, list | tuple) for v in value):
            return "[" + ", ".join(format_value(list(v)) for v in value) + "]"
        return "(" + ", ".join(format_value(v) for v in value) + ")"
    return format_number(value)


def format_number(value: object) -> str:
    if isinstance(value, bool) or not isinstance(value, int | float):
        try:
            value = float(value)  # type: ignore[arg-type]
        except (TypeError, ValueError):
            return str(value)
    if isinstance(value, float) and value.is_integer() and abs(value) < 1e15:
        return str(int(value))
    return str(value) if isinstance(value, int) else f"{value:.6g}"


def diagnostic_views(diagnostics: tuple[Diagnostic, ...],
                     fmt: Formatter) -> tuple[DiagnosticView, ...]:
    """Diagnostics sorted by position, then rule, so the listing is stable."""
    ordered = sorted(diagnostics, key=diagnostic_key)
    return tuple(DiagnosticView(location(d), d.severity, d.rule, fmt.prose(d.message),
                                fmt.prose(d.hint or "")) for d in ordered)


def diagnostic_key(d: Diagnostic) -> tuple[str, int, int, str, str]:
    line, column = (d.span.line, d.span.column) if d.span else (0, 0)
    return (d.path, line, column, d.rule, d.message)


def location(d: Diagnostic) -> str:
    return f"{d.path}:{d.span.line}:{d.span.column}" if d.span else d.path


def shape_text(shape: ir.Shape) -> str:
    """Sizes as users write them: ``1``, ``m``, ``n x n``."""
    if shape.is_scalar:
        return "1"
    if shape.cols == 1:
        return str(shape.rows)
    return f"{shape.rows} x {shape.cols}"
