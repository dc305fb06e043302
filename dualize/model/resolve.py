"""The resolver: a parsed document -> the typed problem (IR), or diagnostics.

Each statement is resolved on its own, so one file reports all its independent
defects at once; a file with any error yields no problem.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TypeVar

from dualize.diagnostics import Diagnostic
from dualize.model import constraints as C
from dualize.model import rules as M
from dualize.model.expr import Expr, Symbol
from dualize.model.expressions import ExprResolver
from dualize.model.problem import Constraint, DataDecl, Problem, Variable
from dualize.model.scope import RESERVED, ResolveError, Scope
from dualize.model.sets import SetMeaning, check_data_set, set_meaning
from dualize.syntax import ast

T = TypeVar("T")


class _Run:
    """One resolution: the scope and the diagnostics found so far."""

    def __init__(self, path: str, text: str) -> None:
        self.scope = Scope(path)
        self.text = text
        self.resolve = ExprResolver(self.scope)
        self.diagnostics: list[Diagnostic] = []

    def attempt(self, step: Callable[..., T], *args: object) -> T | None:
        """Run one statement's resolution; record its diagnostic instead of stopping."""
        try:
            return step(*args)
        except ResolveError as err:
            if err.diagnostic is not None:
                self.diagnostics.append(err.diagnostic)
            return None


def resolve(doc: ast.Document, text: str = "", path: str = "<string>",
            ) -> tuple[Problem | None, tuple[Diagnostic, ...]]:
    """The typed problem of a document, with the diagnostics found on the way."""
    run = _Run(path, text)
    data = [d for d in (run.attempt(_declare_data, run, x) for x in doc.data) if d]
    variables = [v for v in (run.attempt(_declare_variable, run, x) for x in doc.variables) if v]
    run.attempt(_check_dimension_names, run, doc)
    objective = run.attempt(_objective, run, doc.objective)
    constraints = _constraints(run, doc.constraints)
    if run.diagnostics or objective is None:
        return None, tuple(run.diagnostics)
    dims = tuple(run.scope.dims.values())
    problem = Problem(doc.title.text if doc.title else None, doc.objective.sense,  # type: ignore[arg-type]
                      objective, tuple(variables), tuple(data), tuple(constraints), dims,
                      text, path, doc.objective.expr.span)
    return problem, ()


def _spelling_hint(text: str, decl: ast.Decl, first: Symbol) -> str | None:
    """Say so when two spellings are one name after Unicode normalization (NFKC)."""
    spans = [s for s in (decl.name_span, first.span) if s is not None and s.end > s.start]
    spellings = sorted({text[s.start:s.end] for s in spans})
    if len(spellings) < 2:
        return None
    shown = " and ".join(f"`{w}`" for w in spellings)
    return (f"{shown} are one name: names are compared after Unicode compatibility "
            "normalization (NFKC), as Python compares identifiers")


def _declare(run: _Run, decl: ast.Decl, role: str) -> tuple[Symbol, SetMeaning]:
    scope = run.scope
    if decl.name in RESERVED:
        scope.failed.add(decl.name)
        raise scope.fail(M.RESERVED_NAME, decl.name_span, name=decl.name)
    if decl.name in scope.names:
        raise scope.fail(M.DECLARED_TWICE, decl.name_span, name=decl.name,
                         hint=_spelling_hint(run.text, decl, scope.names[decl.name]))
    try:
        meaning = set_meaning(decl.set, scope, run.resolve)
        if role == "data":
            check_data_set(decl.set, meaning, decl.name, scope)
    except ResolveError:
        scope.failed.add(decl.name)  # its uses are not reported again
        raise
    symbol = Symbol(decl.name, role, meaning.shape, meaning.facts,  # type: ignore[arg-type]
                    span=decl.name_span)
    scope.names[decl.name] = symbol
    return symbol, meaning


def _declare_data(run: _Run, decl: ast.Decl) -> DataDecl:
    symbol, _ = _declare(run, decl, "data")
    set_text = run.text[decl.set.span.start:decl.set.span.end] if run.text else ""
    return DataDecl(symbol, set_text, decl.span)


def _declare_variable(run: _Run, decl: ast.Decl) -> Variable:
    symbol, meaning = _declare(run, decl, "variable")
    return Variable(symbol, meaning.domain, decl.span)


def _check_dimension_names(run: _Run, doc: ast.Document) -> None:
    for decl in doc.data + doc.variables:
        if decl.name in run.scope.dims:
            what = "data" if decl in doc.data else "a variable"
            run.diagnostics.append(run.scope.fail(
                M.DIMENSION_AS_NAME, decl.name_span, name=decl.name, what=what,
                hint="rename the size or the declared name").diagnostic)


def _objective(run: _Run, objective: ast.Objective) -> Expr:
    expr = run.resolve(objective.expr)
    if not expr.shape.is_scalar:
        raise run.scope.fail(M.NONSCALAR_OBJECTIVE, objective.expr.span, shape=str(expr.shape),
                             hint="sum(...) or a norm makes a scalar of a vector")
    return expr


def _constraints(run: _Run, written: tuple[ast.Constraint, ...]) -> list[Constraint]:
    ps = [p for c in written for p in C.pieces(c)]
    _check_labels(run, ps)
    taken = set(run.scope.names) | set(run.scope.dims) | {p.label.name for p in ps if p.label}
    names = C.multiplier_names(ps, taken)
    built = (run.attempt(C.build, p, name, run.resolve) for p, name in zip(ps, names, strict=True))
    return [c for c in built if c is not None]


def _check_labels(run: _Run, ps: list[C.Piece]) -> None:
    seen: set[str] = set()
    for label in (p.label for p in ps if p.label is not None):
        if label.name in seen:
            run.diagnostics.append(run.scope.fail(M.LABEL_TWICE, label.span,
                                                  name=label.name).diagnostic)
        elif label.name in run.scope.names or label.name in run.scope.dims:
            what = _what(run.scope.names.get(label.name))
            run.diagnostics.append(run.scope.fail(M.LABEL_CLASH, label.span, name=label.name,
                                                  what=what).diagnostic)
        seen.add(label.name)


def _what(symbol: Symbol | None) -> str:
    if symbol is None:
        return "a size"
    return "data" if symbol.role == "data" else "a variable"

