"""Readable Unicode mathematics of IR expressions, for the terminal.

A subclass of sympy's StrPrinter (for integers, dimension symbols and the
settings machinery); IR nodes dispatch to ``_print_ir_<Class>`` and an IR node
without a rule raises.  The layout rules (precedence, signs, term order) are the
ones the LaTeX printer uses, so both targets say the same thing.
"""

from __future__ import annotations

from typing import Any

import sympy
from sympy.printing.str import StrPrinter

from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.render import structure as st
from dualize.render.names import text_name

RELATIONS: dict[str, str] = {
    "=": "=", "<=": "≤", ">=": "≥", "succeq": "⪰", "preceq": "⪯", "in": "∈",
}
_SUPERSCRIPTS = dict(zip("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻", strict=True))
_VULGAR: dict[tuple[int, int], str] = {
    (1, 2): "½", (1, 3): "⅓", (2, 3): "⅔", (1, 4): "¼", (3, 4): "¾", (1, 5): "⅕",
    (2, 5): "⅖", (3, 5): "⅗", (4, 5): "⅘", (1, 6): "⅙", (5, 6): "⅚", (1, 8): "⅛",
    (3, 8): "⅜", (5, 8): "⅝", (7, 8): "⅞",
}
_NORM_SUBSCRIPTS: dict[str, str] = {"1": "₁", "2": "₂", "inf": "∞"}
_DIGITS = frozenset("0123456789")


class IRTextPrinter(st.SharedLeaves, StrPrinter):
    """Unicode text for IR nodes: ``ᵀ``, ``‖x‖₁``, ``⊙``, ``𝟏``, Greek names with subscripts."""

    printmethod = "_dualize_text"
    _default_settings: dict[str, Any] = {
        **StrPrinter._default_settings,
        "order_terms": True,
        "transpose": "ᵀ",
        "ones": "𝟏",
        "identity": "I",
    }

    def _print(self, expr: Any, **kwargs: Any) -> str:
        if isinstance(expr, ir.Expr):
            method = getattr(self, "_print_ir_" + type(expr).__name__, None)
            if method is None:
                raise TypeError(f"no text rule for IR node {type(expr).__name__}")
            return method(expr)
        return super()._print(expr, **kwargs)

    def wrap(self, node: ir.Expr, bound: int) -> str:
        """The node, parenthesized when it binds no tighter than ``bound``."""
        text = self._print(node)
        return f"({text})" if _precedence(node, text) <= bound else text

    def _print_ir_Symbol(self, node: ir.Symbol) -> str:
        return text_name(node.name)

    def _print_ir_Number(self, node: ir.Number) -> str:
        value = st.number_value(node.value)
        if st.is_negative_number(value):
            return "-" + self.wrap(ir.Number(-value), st.NEG)
        if not value.is_Rational:
            # a size such as n or n + 1, printed by sympy
            return self._print(value).replace("**", "^").replace("*", " ")
        if value.q == 1:
            return self._print(sympy.Integer(value.p))
        return _VULGAR.get((int(value.p), int(value.q)), f"{value.p}/{value.q}")

    def _print_ir_Scale(self, node: ir.Scale) -> str:
        negative, magnitude = st.split_sign(node)
        if negative:
            return "-" + self.wrap(magnitude, st.NEG)
        if not isinstance(magnitude, ir.Scale):
            return self._print(magnitude)
        factors, arg = st.scalar_factors(magnitude)
        return _juxtapose([self._factor(f) for f in factors] + [self._scaled(arg)])

    def _factor(self, factor: ir.Expr) -> str:
        """A scalar factor in front of what it scales; fractions and products get parentheses."""
        if isinstance(factor, ir.Number):
            shown = self.wrap(factor, st.ADD)
            return f"({shown})" if "/" in shown and shown[0] != "(" else shown
        return self.wrap(factor, st.MUL if not isinstance(factor, ir.Symbol) else 0)

    def _scaled(self, arg: ir.Expr) -> str:
        loose = isinstance(arg, ir.Hadamard | ir.Divide)
        return self.wrap(arg, st.MUL if loose else st.NEG)

    def _print_ir_MatMul(self, node: ir.MatMul) -> str:
        negative, magnitude = st.split_sign(node)
        if negative:
            return "-" + self.wrap(magnitude, st.NEG)
        entries = st.as_sum_of_entries(node)
        if entries is not None:
            return self._print(entries)
        pieces = []
        for index, factor in enumerate(node.factors):
            loose = isinstance(factor, ir.Hadamard | ir.Divide) or (
                index > 0 and isinstance(factor, ir.Scale))
            pieces.append(self.wrap(factor, st.MUL if loose else st.NEG))
        return _juxtapose(pieces)

    def _print_ir_Broadcast(self, node: ir.Broadcast) -> str:
        if node.target.is_scalar:
            return self._print(node.arg)
        negative, magnitude = st.split_sign(node.arg)
        ones = self._ones_of(node.target)
        if st.is_number(magnitude, 0):
            return "0"
        body = ones if st.is_number(magnitude, 1) else f"{self._factor(magnitude)} {ones}"
        return ("-" if negative else "") + body

    def _ones_of(self, shape: ir.Shape) -> str:
        ones, top = self._settings["ones"], self._settings["transpose"]
        if shape.cols == 1:
            return ones
        return ones + top if shape.rows == 1 else ones + " " + ones + top

    def _print_ir_Transpose(self, node: ir.Transpose) -> str:
        return self.wrap(node.arg, st.POSTFIX) + self._settings["transpose"]

    def _print_ir_Hadamard(self, node: ir.Hadamard) -> str:
        negative, magnitude = st.split_sign(node)
        if negative:
            return "-" + self.wrap(magnitude, st.NEG)
        return f"{self._operand(node.left)} ⊙ {self._operand(node.right)}"

    def _operand(self, node: ir.Expr) -> str:
        return self._print(node) if isinstance(node, ir.Hadamard) else self.wrap(node, st.MUL)

    def _print_ir_Divide(self, node: ir.Divide) -> str:
        sign = " / " if node.right.shape.is_scalar else " ⊘ "
        return self._operand(node.left) + sign + self.wrap(node.right, st.MUL)

    def _print_ir_Power(self, node: ir.Power) -> str:
        exponent = sympy.Rational(node.exponent)
        base = self.wrap(node.base, st.POSTFIX)
        if exponent.q == 1:
            return base + "".join(_SUPERSCRIPTS[c] for c in str(exponent.p))
        return f"{base}^({exponent.p}/{exponent.q})"

    def _print_ir_Apply(self, node: ir.Apply) -> str:
        function = lookup(node.func)
        return function.print_with(self._print(node.arg), function.text, lambda s: f"({s})")

    def _print_ir_Extremum(self, node: ir.Extremum) -> str:
        return f"{node.kind}({self._print(node.left)}, {self._print(node.right)})"

    def _print_ir_Norm(self, node: ir.Norm) -> str:
        return f"‖{self._print(node.arg)}‖{_NORM_SUBSCRIPTS[node.p]}"

    def _print_ir_SumAll(self, node: ir.SumAll) -> str:
        shape = node.arg.shape
        if shape.is_scalar:
            return self._print(node.arg)
        loose = isinstance(node.arg, ir.Hadamard | ir.Divide | ir.Scale)
        inner = self.wrap(node.arg, st.MUL if loose else st.NEG)
        ones = self._settings["ones"]
        left = "" if shape.rows == 1 else ones + self._settings["transpose"] + " "
        right = "" if shape.cols == 1 else " " + ones
        return left + inner + right

    def _print_ir_Diag(self, node: ir.Diag) -> str:
        return f"diag({self._print(node.arg)})"

    def _print_ir_Trace(self, node: ir.Trace) -> str:
        return f"tr({self._print(node.arg)})"

    def _print_ir_Inverse(self, node: ir.Inverse) -> str:
        return self.wrap(node.arg, st.POSTFIX) + "⁻¹"

    def _print_ir_PseudoInverse(self, node: ir.PseudoInverse) -> str:
        return self.wrap(node.arg, st.POSTFIX) + "⁺"

    def _print_ir_Block(self, node: ir.Block) -> str:
        rows = ["[" + ", ".join(self._print(b) for b in row) + "]" for row in node.rows]
        return "[" + ", ".join(rows) + "]"


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


def text_terms(expr: ir.Expr, **settings: Any) -> tuple[str, ...]:
    """A sum's printed terms with their signs (one piece for anything else), for line breaks."""
    if isinstance(expr, ir.Add) and len(expr.terms) > 1:
        return tuple(IRTextPrinter(settings).add_pieces(expr))
    return (text_expr(expr, **settings),)


def text_expr(expr: ir.Expr, **settings: Any) -> str:
    """The one-line Unicode form of an IR expression."""
    return IRTextPrinter(settings).doprint(expr)


def text_relation(relation: str) -> str:
    """The Unicode sign of a relation as the IR spells it."""
    return RELATIONS[relation]
