"""Spans from lark's tokens and trees, and from offsets into the text.

One place for the arithmetic of positions, shared by the tree builder and by the
error explanations.
"""

from __future__ import annotations

from lark import Token, Tree

from dualize.syntax.span import Span

START = Span(1, 1, 1, 1, 0, 0)


def token_span(token: Token) -> Span:
    """The token's span; tokens made up by the parser (end of file) may lack positions."""
    if token.line is None:
        return START
    end_column = token.end_column or token.column + max(len(str(token)), 1)
    return Span(token.line, token.column, token.end_line or token.line, end_column,
                token.start_pos or 0, token.end_pos or 0)


def tree_span(tree: Tree) -> Span:
    m = tree.meta
    if m.empty:
        return START
    return Span(m.line, m.column, m.end_line, m.end_column, m.start_pos, m.end_pos)


def span_of(text: str, start: int, end: int) -> Span:
    """The span of ``text[start:end]`` (on one line)."""
    line = text.count("\n", 0, start) + 1
    column = start - (text.rfind("\n", 0, start) + 1) + 1
    return Span(line, column, line, column + (end - start), start, end)
