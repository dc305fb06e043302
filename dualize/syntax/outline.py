"""Put the statements of a file in their places, and say what is out of place.

The grammar accepts statements in any order so that this pass can name the
mistake ("data lines must come before the objective") instead of reporting an
unexpected token.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from dualize.diagnostics import Diagnostic, make
from dualize.syntax import ast
from dualize.syntax import rules as R
from dualize.syntax.positions import START
from dualize.syntax.span import Span

MISPLACED = frozenset({R.STATEMENT_ORDER.id, R.DUPLICATE_STATEMENT.id})
ORDER = {ast.Title: 0, ast.Data: 1, ast.Objective: 2, ast.Over: 3, ast.SubjectTo: 4,
         ast.Constraint: 5}


@dataclass
class _Collect:
    """The pieces found so far (local to one outline run)."""

    path: str
    title: ast.Title | None = None
    data: list[ast.Decl] = field(default_factory=list)
    objective: ast.Objective | None = None
    variables: list[ast.Decl] = field(default_factory=list)
    subject_to: ast.SubjectTo | None = None
    constraints: list[ast.Constraint] = field(default_factory=list)
    diagnostics: list[Diagnostic] = field(default_factory=list)
    phase: int = -1

    def report(self, kind: object, span: Span, **values: object) -> None:
        self.diagnostics.append(make(kind, self.path, span, **values))  # type: ignore[arg-type]


def outline(start: ast.Start, path: str) -> tuple[ast.Document | None, tuple[Diagnostic, ...]]:
    """The file's document and the diagnostics about statement order and chains."""
    c = _Collect(path)
    for statement in start.statements:
        before = len(c.diagnostics)
        _place(c, statement)
        if not any(d.rule in MISPLACED for d in c.diagnostics[before:]):
            c.phase = max(c.phase, ORDER[type(statement)])  # a misplaced one moves nothing
    _finish(c, start)
    if c.diagnostics or c.objective is None:
        return None, tuple(c.diagnostics)
    doc = ast.Document(c.title, tuple(c.data), c.objective, tuple(c.variables),
                       tuple(c.constraints))
    return doc, ()


def _place(c: _Collect, s: ast.Statement) -> None:
    handler = {ast.Title: _title, ast.Data: _data, ast.Objective: _objective,
               ast.Over: _over, ast.SubjectTo: _subject_to, ast.Constraint: _constraint}
    handler[type(s)](c, s)


def _title(c: _Collect, s: ast.Title) -> None:
    if c.title is not None:
        c.report(R.DUPLICATE_STATEMENT, s.span, what="title")
    elif c.phase >= 0:
        c.report(R.STATEMENT_ORDER, s.span, what="`title`", where="first in the file")
    c.title = c.title or s


def _data(c: _Collect, s: ast.Data) -> None:
    if c.phase > ORDER[ast.Data]:
        c.report(R.STATEMENT_ORDER, s.span, what="a `data` line",
                 where="before `minimize` or `maximize`")
    c.data.extend(s.decls)


def _objective(c: _Collect, s: ast.Objective) -> None:
    if c.objective is not None:
        c.report(R.DUPLICATE_STATEMENT, s.span, what=f"`{s.sense}`")
        return
    c.objective = s
    if s.over is not None:
        c.variables.extend(s.over.decls)


def _over(c: _Collect, s: ast.Over) -> None:
    if c.objective is None or c.phase > ORDER[ast.Objective]:
        c.report(R.STATEMENT_ORDER, s.span, what="`over`",
                 where="right after `minimize` or `maximize` (same or next line)")
    elif c.variables:
        c.report(R.DUPLICATE_STATEMENT, s.span, what="`over` clause")
    else:
        c.variables.extend(s.decls)


def _subject_to(c: _Collect, s: ast.SubjectTo) -> None:
    if c.subject_to is not None:
        c.report(R.DUPLICATE_STATEMENT, s.span, what="`subject to`")
    elif c.objective is None:
        c.report(R.STATEMENT_ORDER, s.span, what="`subject to`",
                 where="after the objective and its `over` clause")
    else:
        c.subject_to = s
    if s.constraint is not None:
        _constraint(c, s.constraint, checked_order=True)


def _constraint(c: _Collect, s: ast.Constraint, checked_order: bool = False) -> None:
    if not checked_order and c.subject_to is None:
        c.report(R.STATEMENT_ORDER, s.span, what="a constraint",
                 where="after `subject to` (or `s.t.`)")
    _check_chain(c, s)
    c.constraints.append(s)


def _check_chain(c: _Collect, s: ast.Constraint) -> None:
    ops = [r.op for r in s.relations]
    if len(ops) > 2 or (len(ops) == 2 and ops[0] != ops[1]):
        found = " and ".join(f"`{r.text}`" for r in s.relations)
        c.report(R.BAD_CHAIN, s.relations[min(len(ops), 3) - 1].span, found=found)
    elif s.labels and len(s.labels) != len(ops):
        span = s.labels[0].span.merge(s.labels[-1].span)
        c.report(R.LABEL_COUNT, span, labels=len(s.labels), count=len(ops))


def _finish(c: _Collect, start: ast.Start) -> None:
    if c.objective is None:
        c.report(R.MISSING_OBJECTIVE, start.statements[0].span if start.statements else START)
    elif not c.variables:
        c.report(R.MISSING_OVER, c.objective.span, sense=c.objective.sense)
