"""Text -> syntax tree, or diagnostics that say what went wrong and where.

``parse`` never raises on user text: lark's errors become diagnostics
(``dualize.syntax.explain`` turns the common mistakes into friendly messages),
files that are too large or too deeply nested are refused with a diagnostic.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

from lark import Lark, UnexpectedInput

from dualize.diagnostics import Diagnostic, make
from dualize.syntax import ast
from dualize.syntax import rules as R
from dualize.syntax.build import MAX_DEPTH, Builder, BuildError, deepest
from dualize.syntax.explain import error_position, explain
from dualize.syntax.grammar_file import grammar_text
from dualize.syntax.newlines import NewlineFilter
from dualize.syntax.outline import outline
from dualize.syntax.parser_tables import cached_parser
from dualize.syntax.positions import START, span_of, tree_span
from dualize.syntax.recovery import later_errors
from dualize.syntax.span import Span

MAX_CHARS = 1_000_000


@dataclass(frozen=True)
class ParseResult:
    """``tree`` is the statement list; ``document`` the statements in their places."""

    tree: ast.Start | None
    document: ast.Document | None
    diagnostics: tuple[Diagnostic, ...]


@lru_cache(maxsize=1)
def lark_parser() -> Lark:
    """The LALR parser, once per process: from the cached tables, or built (a tenth of
    a second or more) and its tables cached for the next run (see parser_tables)."""
    grammar = grammar_text()

    def build() -> Lark:
        return Lark(grammar, parser="lalr", propagate_positions=True,
                    postlex=NewlineFilter(), maybe_placeholders=True)

    return cached_parser(grammar, build, NewlineFilter())


def parse(text: str, path: str = "<string>") -> ParseResult:
    """Parse one problem file's text."""
    if len(text) > MAX_CHARS:
        return _failed(make(R.FILE_TOO_LARGE, path, START, size=len(text), limit=MAX_CHARS))
    nested = too_many_brackets(text, MAX_DEPTH)
    if nested is not None:
        return _failed(make(R.TOO_DEEP, path, nested, limit=MAX_DEPTH))
    try:
        tree = lark_parser().parse(text)
    except UnexpectedInput as err:
        first = explain(err, text, path)
        rest = later_errors(first, error_position(err, text), text, path, lark_parser)
        return ParseResult(None, None, (first, *rest))
    too_deep = deepest(tree)
    if too_deep is not None:
        return _failed(make(R.TOO_DEEP, path, tree_span(too_deep), limit=MAX_DEPTH,
                            hint="name a part of the expression as data, or simplify it"))
    try:
        start = Builder().transform(tree)
    except BuildError as bad:
        return _failed(make(bad.kind, path, bad.span, **bad.values))
    document, diagnostics = outline(start, path)
    return ParseResult(start, document, diagnostics)


def too_many_brackets(text: str, limit: int) -> Span | None:
    """The first bracket that opens level ``limit + 1``, outside comments and titles."""
    depth, skipping = 0, ""
    for i, ch in enumerate(text):
        if ch == "\n":
            skipping = ""
        elif skipping:
            skipping = "" if skipping == '"' and ch == '"' else skipping
        elif ch in "#\"":
            skipping = ch
        elif ch in "([{":
            depth += 1
            if depth > limit:
                return span_of(text, i, i + 1)
        elif ch in ")]}":
            depth = max(depth - 1, 0)
    return None


def _failed(diagnostic: Diagnostic) -> ParseResult:
    return ParseResult(None, None, (diagnostic,))
