"""Where names are written and declared in a problem's syntax tree.

Hover, go to definition, document symbols and completion all ask the same
questions of the tree: which name is under the caret, where was it declared,
which constraint holds the caret.  The tree keeps a span on every node, so the
answers come from one walk over it.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, fields, is_dataclass
from typing import Literal

from dualize.model.problem import Constraint, Problem
from dualize.syntax import ast
from dualize.syntax.span import Span

Kind = Literal["data", "variable", "label", "name", "function", "dimension"]


@dataclass(frozen=True)
class Mention:
    """A name written in the text: declared (``data``, ``variable``, ``label``) or used."""

    name: str
    kind: Kind
    span: Span

    def holds(self, offset: int) -> bool:
        return self.span.start <= offset <= self.span.end


def mentions(doc: ast.Document) -> list[Mention]:
    """Every name written in the document, in the order of the text."""
    found = [Mention(d.name, "data", d.name_span) for d in doc.data]
    found += [Mention(d.name, "variable", d.name_span) for d in doc.variables]
    for node in _nodes(doc):
        found.extend(_mention(node))
    return sorted(found, key=lambda m: (m.span.start, m.span.end, m.kind))


def _mention(node: ast.Node) -> list[Mention]:
    if isinstance(node, ast.Name):
        return [Mention(node.name, "name", node.span)]
    if isinstance(node, ast.Call):
        return [Mention(node.func, "function", node.func_span)]
    if isinstance(node, ast.Label):
        return [Mention(node.name, "label", node.span)]
    if isinstance(node, ast.Size) and not node.is_number:
        return [Mention(node.text, "dimension", node.span)]
    return []


def _nodes(value: object) -> Iterator[ast.Node]:
    """Every syntax node inside ``value``, depth first."""
    if isinstance(value, tuple):
        for item in value:
            yield from _nodes(item)
    elif is_dataclass(value) and not isinstance(value, Span):
        if isinstance(value, ast.Node):
            yield value
        for f in fields(value):
            yield from _nodes(getattr(value, f.name))


def mention_at(doc: ast.Document, offset: int) -> Mention | None:
    """The name under the caret (at its start, inside it, or just after its end)."""
    hits = [m for m in mentions(doc) if m.holds(offset)]
    return min(hits, key=lambda m: m.span.end - m.span.start) if hits else None


def declarations(doc: ast.Document) -> dict[str, Mention]:
    """Where each name is declared: data, variables, labels, and a size's first use."""
    found: dict[str, Mention] = {}
    for m in mentions(doc):
        if m.kind in ("data", "variable", "label", "dimension") and m.name not in found:
            found[m.name] = m
    return found


def constraint_at(problem: Problem, offset: int) -> Constraint | None:
    """The constraint whose text holds the caret (the first of a chain's two when the
    caret is on the expression they share)."""
    for c in problem.constraints:
        if c.span is not None and c.span.start <= offset <= c.span.end:
            return c
    return None


def labelled_constraint(problem: Problem, name: str) -> Constraint | None:
    return next((c for c in problem.constraints if c.label == name), None)
