"""Readable Unicode mathematics of IR expressions, for the terminal.

A subclass of sympy's StrPrinter (for integers, dimension symbols and the
settings machinery); IR nodes dispatch to ``_print_ir_<Class>`` and an IR node
without a rule raises.  The layout rules (precedence, signs, term order) are the
ones the LaTeX printer uses, so both targets say the same thing.
"""

from __future__ import annotations

import re
from typing import Any

import sympy
from sympy.printing.str import StrPrinter

from dualize.model import expr as ir
from dualize.model.functions import Function
from dualize.render import structure as st
from dualize.render.ir_layout import IRLayout
from dualize.render.names import text_name

RELATIONS: dict[str, str] = {
    "=": "=", "==": "=", "<=": "≤", ">=": "≥", "succeq": "⪰", "preceq": "⪯", "in": "∈",
    "<": "<", ">": ">",
}
_SUPERSCRIPTS = dict(zip("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻", strict=True))
_VULGAR: dict[tuple[int, int], str] = {
    (1, 2): "½", (1, 3): "⅓", (2, 3): "⅔", (1, 4): "¼", (3, 4): "¾", (1, 5): "⅕",
    (2, 5): "⅖", (3, 5): "⅗", (4, 5): "⅘", (1, 6): "⅙", (5, 6): "⅚", (1, 8): "⅛",
    (3, 8): "⅜", (5, 8): "⅝", (7, 8): "⅞",
}
_NORM_SUBSCRIPTS: dict[str, str] = {"1": "₁", "2": "₂", "inf": "∞"}
_DIGITS = frozenset("0123456789")
_ELEMENTWISE: dict[str, str] = {"product": "⊙", "quotient": "⊘"}


class IRTextPrinter(IRLayout, StrPrinter):
    """Unicode text for IR nodes: ``ᵀ``, ``‖x‖₁``, ``⊙``, ``𝟏``, Greek names with subscripts."""

    printmethod = "_dualize_text"
    _default_settings: dict[str, Any] = {
        **StrPrinter._default_settings,
        "order_terms": True,
        "transpose": "ᵀ",
        "ones": "𝟏",
        "identity": "I",
    }
    target = "text"
    ones_gap = " "
    inverse_mark = "⁻¹"
    pseudo_inverse_mark = "⁺"

    def name(self, name: str) -> str:
        return text_name(name)

    def paren(self, text: str) -> str:
        return f"({text})"

    def juxtapose(self, pieces: list[str]) -> str:
        return _juxtapose(pieces)

    def binds_as(self, node: ir.Expr, text: str) -> int:
        return _precedence(node, text)

    def size(self, value: sympy.Expr) -> str:
        return self._print(value).replace("**", "^").replace("*", " ")

    def rational(self, p: int, q: int) -> str:
        return _VULGAR.get((p, q), f"{p}/{q}")

    def factor(self, factor: ir.Expr) -> str:
        """A scalar factor in front of what it scales; fractions and products get parentheses."""
        shown = super().factor(factor)
        if isinstance(factor, ir.Number) and "/" in shown and shown[0] != "(":
            return f"({shown})"
        return shown

    def fraction(self, top: ir.Expr, bottom: ir.Expr) -> str:
        scalar_product = isinstance(top, ir.Scale) and top.shape.is_scalar
        shown = self.wrap(top, st.NEG) if scalar_product else self.operand(top)
        return shown + " / " + self.wrap(bottom, st.MUL)

    def elementwise(self, op: str, left: str, right: str) -> str:
        return f"{left} {_ELEMENTWISE[op]} {right}"

    def power(self, base: str, exponent: sympy.Rational) -> str:
        if exponent.q == 1:
            return base + "".join(_SUPERSCRIPTS[c] for c in str(exponent.p))
        return f"{base}^({exponent.p}/{exponent.q})"

    def function(self, func: str, inner: str) -> str:
        return f"{func}({inner})"

    def apply(self, function: Function, inner: str) -> str:
        return function.print_with(inner, function.text, self.paren)

    def norm(self, inner: str, p: str) -> str:
        return f"‖{inner}‖{_NORM_SUBSCRIPTS[p]}"

    def block(self, rows: list[list[str]]) -> str:
        return "[" + ", ".join("[" + ", ".join(row) + "]" for row in rows) + "]"


def _precedence(node: ir.Expr, text: str) -> int:
    """As in ``structure``, except that a one-glyph fraction (``½``) binds like an atom."""
    if isinstance(node, ir.Number) and len(text) == 1:
        return st.ATOM
    return st.precedence(node)


def _juxtapose(pieces: list[str]) -> str:
    """Products by juxtaposition, with ``·`` only where two numbers would touch."""
    out = pieces[0]
    for piece in pieces[1:]:
        out += " · " if piece[:1] in _DIGITS else " "
        out += piece
    return out


def text_expr(expr: ir.Expr, **settings: Any) -> str:
    """The one-line Unicode form of an IR expression."""
    return IRTextPrinter(settings).doprint(expr)


def text_relation(relation: str) -> str:
    """The Unicode sign of a relation as the IR spells it."""
    return RELATIONS[relation]


def unicode_scalar(value: sympy.Basic) -> str:
    """An exact scalar function in one line of Unicode: ``s·log(s) - 1``, ``t²``."""
    if isinstance(value, sympy.Equality):
        return f"{unicode_scalar(value.lhs)} = {unicode_scalar(value.rhs)}"
    if isinstance(value, sympy.core.function.AppliedUndef):
        base, star, _ = value.func.__name__.partition("^*")
        args = ", ".join(unicode_scalar(a) for a in value.args)
        return f"{text_name(base)}{'*' if star else ''}({args})"
    shown = StrPrinter().doprint(value)
    shown = re.sub(r"\*\*(\d+)", lambda m: "".join(_SUPERSCRIPTS[c] for c in m.group(1)), shown)
    return shown.replace("**", "^").replace("*", "·")
