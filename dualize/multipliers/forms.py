"""The penalized and the constrained form of one problem, each written from the other.

Penalized:   minimize f(x) + w r(x)          (w >= 0 a scalar data weight)
Constrained: minimize f(x) s.t. r(x) <= t    (t a scalar bound, the bound labelled)

(for a maximization ``f - w r`` and ``r <= t``; the problem's other constraints
are kept in both).  For convex ``f`` and ``r`` (concave ``f`` for a
maximization) and ``t`` above the smallest value of ``r`` on the other
constraints (Slater's condition for the bound), a solution of the constrained
form solves the penalized form with ``w`` the bound's optimal multiplier, and a
solution of the penalized form solves the constrained form with
``t = r(x*(w))`` (Boyd and Vandenberghe, Convex Optimization, 2004, sections
4.7.4 and 5.5; Hastie, Tibshirani and Friedman, The Elements of Statistical
Learning, 2009, section 3.4, from memory).

The other form is written as text of our language by reusing the source text
of each piece (found by the syntax tree's spans), so the user's spelling is
kept; the result is re-read by the loader before anyone sees it.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from dualize.errors import DualizeError
from dualize.model.problem import Problem
from dualize.syntax import ast


@dataclass(frozen=True)
class Pair:
    """Both forms: their texts and problems, and the names that tie them."""

    given: str  # "penalized" or "constrained": the form the user wrote
    sense: str
    weight: str
    bound: str  # the bound's name (t) or its number as written
    label: str
    term: str  # r as written
    rest: str  # f as written
    penalized_text: str
    constrained_text: str
    penalized: Problem
    constrained: Problem
    conditions: tuple[tuple[str, str], ...] = field(default=())  # (condition, status)

    @property
    def other_text(self) -> str:
        return self.constrained_text if self.given == "penalized" else self.penalized_text

    @property
    def other(self) -> Problem:
        return self.constrained if self.given == "penalized" else self.penalized


class FormError(DualizeError):
    """The problem has no weighted term or bound of the kind asked (exit code 2)."""

    def __init__(self, message: str) -> None:
        super().__init__(message, exit_code=2)


def names_in(node: object) -> set[str]:
    """Every name an AST node mentions."""
    if isinstance(node, ast.Name):
        return {node.name}
    out: set[str] = set()
    for value in vars(node).values() if hasattr(node, "__dict__") else ():
        items = value if isinstance(value, tuple) else (value,)
        for item in items:
            if isinstance(item, ast.Node):
                out |= names_in(item)
    return out


def signed_terms(node: ast.Expr, sign: int = 1) -> list[tuple[int, ast.Expr]]:
    """The top-level sum as (sign, term) pairs, left to right."""
    if isinstance(node, ast.BinOp) and node.op in ("+", "-"):
        right = -sign if node.op == "-" else sign
        return signed_terms(node.left, sign) + signed_terms(node.right, right)
    if isinstance(node, ast.Neg):
        return signed_terms(node.operand, -sign)
    return [(sign, node)]


def cut(source: str, node: ast.Node) -> str:
    return source[node.span.start:node.span.end]


def joined(source: str, terms: list[tuple[int, ast.Expr]]) -> str:
    """Signed terms as one sum; ``0`` when none is left."""
    out = ""
    for sign, node in terms:
        text = cut(source, node)
        if not out:
            out = text if sign > 0 else f"-{_group(node, text)}"
        else:
            out += (" + " if sign > 0 else " - ") + _group(node, text)
    return out or "0"


def _group(node: ast.Expr, text: str) -> str:
    loose = isinstance(node, ast.BinOp) and node.op in ("+", "-") or isinstance(node, ast.Neg)
    return f"({text})" if loose else text


def factor(node: ast.Expr, text: str) -> str:
    """``text`` safe as the right factor of ``w * ...``."""
    tight = isinstance(node, ast.Name | ast.Call | ast.Norm | ast.Abs | ast.Number
                       | ast.Power | ast.Transpose)
    return text if tight else f"({text})"


@dataclass(frozen=True)
class Document:
    """The parsed file and its source text."""

    source: str
    doc: ast.Document

    def data_lines(self, drop: set[str], add: list[str]) -> list[str]:
        lines = [f"data {cut(self.source, d)}" for d in self.doc.data if d.name not in drop]
        return lines + [f"data {line}" for line in add]

    def over(self) -> str:
        return ", ".join(cut(self.source, d) for d in self.doc.variables)

    def constraint_lines(self, skip: ast.Constraint | None = None) -> list[str]:
        return [f"  {cut(self.source, c)}" for c in self.doc.constraints if c is not skip]

    def title(self) -> str:
        return self.doc.title.text if self.doc.title is not None else "problem"


def parsed(problem: Problem) -> Document:
    from dualize.syntax.parser import parse

    result = parse(problem.source, problem.path)
    if result.document is None:  # pragma: no cover - the problem was loaded from it
        raise FormError(f"{problem.path}: the problem text cannot be read again")
    return Document(problem.source, result.document)


def problem_text(comment: str, title: str, data: list[str], sense: str, objective: str,
                 over: str, constraints: list[str]) -> str:
    import textwrap

    notes = textwrap.wrap(" ".join(comment.split()), 86, break_on_hyphens=False)
    lines = [f"# {line}" for line in notes] + [f'title "{_quote(title)}"', ""] + data
    lines += ["", f"{sense} {objective}", f"over {over}"]
    if constraints:
        lines += ["subject to", *constraints]
    return "\n".join(lines) + "\n"


def _quote(text: str) -> str:
    return " ".join(text.replace('"', "'").split())


def reread(text: str, path: str, what: str) -> Problem:
    """Load the written text; a failure is ours, said plainly, never a damaged file."""
    from dualize.model import load

    loaded = load(text, path)
    if loaded.problem is None:
        first = loaded.diagnostics[0].message if loaded.diagnostics else "unknown"
        raise FormError(f"the {what} form could not be written as a valid problem "
                        f"({first}); nothing was written")
    return loaded.problem
