"""From lark's parse tree to our syntax tree, one method per grammar rule.

The method names are the grammar's rule names; an unknown rule raises, so a new
grammar rule cannot be skipped silently.  The tree's depth is checked before
(``deepest``), so the recursive transform below never exhausts the stack.
"""

from __future__ import annotations

import re
import unicodedata
from fractions import Fraction

from lark import Token, Transformer, Tree

from dualize.diagnostics import RuleKind
from dualize.syntax import ast
from dualize.syntax import rules as R
from dualize.syntax.positions import token_span, tree_span
from dualize.syntax.span import Span

RELATIONS = {"=": "==", "==": "==", "<=": "<=", ">=": ">=", "≤": "<=", "≥": ">=",
             "⪰": "succeq", "⪯": "preceq", "succeq": "succeq", "preceq": "preceq"}
MAX_DEPTH = 200
SUBSCRIPTS = {"₁": "1", "₂": "2", "_∞": "inf"}
MAX_DECIMAL_EXPONENT = 400
MAX_DIGITS = 1000
EXPONENT = re.compile(r"[eE]([+-]?\d+)$")


def ident(token: object) -> str:
    """A name as the language knows it: NFKC-normalized, the way Python reads identifiers.

    So ``b`` and the fullwidth ``ｂ`` (or the mathematical italic ``𝑏``) are one name
    everywhere, and a second declaration of it is a located duplicate, never two names
    that a generated Python module would silently merge.
    """
    text = str(token)
    normal = unicodedata.normalize("NFKC", text)
    return normal if NAME.fullmatch(normal) else text


NAME = re.compile(r"(?![ᵀ])[^\W\d_](?:(?![ᵀ])[^\W_]|_(?!\+))*")
"""The grammar's NAME: a normalized spelling that is no longer a name (``²`` is ``2``)
keeps its own spelling, so its diagnostics stay what they were."""


class BuildError(Exception):
    """A construct the grammar lets through but the language does not have."""

    def __init__(self, kind: RuleKind, span: Span, **values: object) -> None:
        super().__init__(kind.id)
        self.kind = kind
        self.span = span
        self.values = values


def deepest(tree: Tree, limit: int = MAX_DEPTH) -> Tree | None:
    """The first subtree found deeper than ``limit`` (iteratively), or None."""
    stack: list[tuple[Tree, int]] = [(tree, 1)]
    while stack:
        node, depth = stack.pop()
        if depth > limit:
            return node
        stack.extend((c, depth + 1) for c in node.children if isinstance(c, Tree))
    return None


class Builder(Transformer):
    """lark Tree -> dualize.syntax.ast, spans copied into every node."""

    def __default__(self, data: str, children: list, meta: object) -> object:
        raise NotImplementedError(f"grammar rule without a builder: {data}")

    def _call_userfunc(self, tree: Tree, new_children: list | None = None) -> object:
        children = new_children if new_children is not None else tree.children
        method = getattr(self, f"rule_{tree.data}", None)
        if method is None:
            return self.__default__(tree.data, children, tree.meta)
        return method(tree_span(tree), children)

    # ---- statements --------------------------------------------------------
    def rule_start(self, span: Span, c: list) -> ast.Start:
        return ast.Start(span, tuple(c))

    def rule_title(self, span: Span, c: list) -> ast.Title:
        return ast.Title(span, str(c[1])[1:-1])

    def rule_data(self, span: Span, c: list) -> ast.Data:
        return ast.Data(span, tuple(c[1:]))

    def rule_objective(self, span: Span, c: list) -> ast.Objective:
        sense = "minimize" if str(c[0]).startswith("minimi") else "maximize"
        return ast.Objective(span, sense, c[1], c[2])

    def rule_over(self, span: Span, c: list) -> ast.Over:
        return c[0]

    def rule_over_clause(self, span: Span, c: list) -> ast.Over:
        return ast.Over(span, tuple(c[1:]))

    def rule_subject_to(self, span: Span, c: list) -> ast.SubjectTo:
        return ast.SubjectTo(span, c[1])

    def rule_constraint(self, span: Span, c: list) -> ast.Constraint:
        labels = c[0] or ()
        parts = tuple(c[1::2])
        relations = tuple(ast.Relation(token_span(t), RELATIONS[str(t)], str(t)) for t in c[2::2])
        return ast.Constraint(span, labels, parts, relations)

    def rule_labels(self, span: Span, c: list) -> tuple[ast.Label, ...]:
        return tuple(ast.Label(token_span(t), ident(t)) for t in c)

    def rule_decl(self, span: Span, c: list) -> ast.Decl:
        return ast.Decl(span, ident(c[0]), token_span(c[0]), c[2])

    # ---- sets --------------------------------------------------------------
    def rule_named_set(self, span: Span, c: list) -> ast.NamedSet:
        sign = str(c[2])[1:] if c[2] is not None else ""
        return ast.NamedSet(span, ident(c[0]), c[1] or (), sign)

    def rule_binary_set(self, span: Span, c: list) -> ast.BinarySet:
        low, high = (self._number(token_span(t), t) for t in c[:2])
        return ast.BinarySet(span, low, high, c[2] or ())

    def rule_box_set(self, span: Span, c: list) -> ast.BoxSet:
        return ast.BoxSet(span, c[0], c[1], c[2] or ())

    def rule_power_sizes(self, span: Span, c: list) -> tuple[ast.Size, ...]:
        return tuple(x for x in c if isinstance(x, ast.Size))

    def rule_size_sep(self, span: Span, c: list) -> None:
        if str(c[0]) not in {",", "×", "x"}:
            raise BuildError(R.BAD_SIZE_SEPARATOR, span, found=str(c[0]))

    def rule_size(self, span: Span, c: list) -> ast.Size:
        return ast.Size(span, ident(c[0]))

    # ---- expressions -------------------------------------------------------
    def rule_number(self, span: Span, c: list) -> ast.Number:
        return self._number(span, c[0])

    @staticmethod
    def _number(span: Span, token: Token) -> ast.Number:
        """The exact value; a huge decimal exponent is refused before it is expanded."""
        text = str(token)
        power = EXPONENT.search(text)
        shown = text if len(text) <= 24 else text[:20] + "..."
        if len(text) > MAX_DIGITS:
            raise BuildError(R.NUMBER_OUT_OF_RANGE, span, text=shown,
                             why=f"more than {MAX_DIGITS} characters")
        if power and abs(int(power.group(1))) > MAX_DECIMAL_EXPONENT:
            raise BuildError(R.NUMBER_OUT_OF_RANGE, span, text=shown,
                             why=f"a decimal exponent beyond {MAX_DECIMAL_EXPONENT}")
        return ast.Number(span, text, Fraction(text))

    def rule_name(self, span: Span, c: list) -> ast.Name:
        return ast.Name(span, ident(c[0]))

    def rule_binop(self, span: Span, c: list) -> ast.BinOp:
        op = "-" if str(c[1]) == "−" else str(c[1])
        return ast.BinOp(span, op, c[0], c[2])

    def rule_neg(self, span: Span, c: list) -> ast.Neg:
        return ast.Neg(span, c[1])

    def rule_power(self, span: Span, c: list) -> ast.Power:
        return ast.Power(span, c[0], c[2])

    def rule_transpose(self, span: Span, c: list) -> ast.Transpose:
        return ast.Transpose(span, c[0])

    def rule_call(self, span: Span, c: list) -> ast.Call:
        args = tuple(a for a in c[1:] if a is not None)
        return ast.Call(span, ident(c[0]), token_span(c[0]), args)

    def rule_norm(self, span: Span, c: list) -> ast.Norm:
        p = SUBSCRIPTS.get(str(c[3]), str(c[3])[1:]) if c[3] is not None else "2"
        return ast.Norm(span, c[1], p)

    def rule_abs(self, span: Span, c: list) -> ast.Abs:
        return ast.Abs(span, c[1])
