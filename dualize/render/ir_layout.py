"""The one dispatch over IR nodes that every mathematics printer shares.

The LaTeX and the terminal printers differ only in glyphs (``^\\top`` or ``ᵀ``,
``\\odot`` or ``⊙``, ``\\frac`` or ``/``); where parentheses go, how signs come
out of products, how a sum of entries reads and which factor leads a product
are decided once, here.  A target subclasses ``IRLayout`` beside its sympy
printer and fills in the glyph hooks; an IR node without a rule raises, so a
new node cannot slip through printed wrongly in one target only.
"""

from __future__ import annotations

from typing import Any

import sympy

from dualize.model import expr as ir
from dualize.model.functions import Function, lookup
from dualize.render import structure as st
from dualize.render.fractions import as_quotient


class IRLayout:
    """Structure shared by the printers; subclasses supply the hooks named below.

    Mixed in before a sympy printer, it needs the settings ``ones``,
    ``transpose``, ``identity`` and ``order_terms``.
    """

    _settings: dict
    target = "IR"
    ones_gap = ""
    inverse_mark = "^{-1}"
    pseudo_inverse_mark = "^{+}"

    # -- hooks a target fills in -------------------------------------------------
    def name(self, name: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def paren(self, text: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def juxtapose(self, pieces: list[str]) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def rational(self, p: int, q: int) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def fraction(self, top: ir.Expr, bottom: ir.Expr) -> str:  # pragma: no cover
        raise NotImplementedError

    def elementwise(self, op: str, left: str, right: str) -> str:  # pragma: no cover
        raise NotImplementedError

    def power(self, base: str, exponent: sympy.Rational) -> str:  # pragma: no cover
        raise NotImplementedError

    def function(self, func: str, inner: str) -> str:  # pragma: no cover - overridden
        """An operator the language spells as a function: max, min, diag, tr."""
        raise NotImplementedError

    def apply(self, function: Function, inner: str) -> str:  # pragma: no cover - overridden
        """An elementwise function of the function table, in this target's form."""
        raise NotImplementedError

    def norm(self, inner: str, p: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def block(self, rows: list[list[str]]) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def binds_as(self, node: ir.Expr, text: str) -> int:
        """How tightly the printed node binds (a target may know its glyphs bind tighter)."""
        return st.precedence(node)

    # -- dispatch ---------------------------------------------------------------
    def _print(self, expr: Any, **kwargs: Any) -> str:
        if isinstance(expr, ir.Expr):
            method = getattr(self, "_print_ir_" + type(expr).__name__, None)
            if method is None:
                raise TypeError(f"no {self.target} rule for IR node {type(expr).__name__}")
            return method(expr)
        return super()._print(expr, **kwargs)  # type: ignore[misc]

    def wrap(self, node: ir.Expr, bound: int) -> str:
        """The node, parenthesized when it binds no tighter than ``bound``."""
        text = self._print(node)
        return self.paren(text) if self.binds_as(node, text) <= bound else text

    def negated(self, magnitude: ir.Expr) -> str:
        return "-" + self.wrap(magnitude, st.NEG)

    def _print_ir_Symbol(self, node: ir.Symbol) -> str:  # noqa: N802
        return self.name(node.name)

    def _print_ir_Ones(self, node: ir.Ones) -> str:  # noqa: N802
        return self._settings["ones"]

    def _print_ir_Identity(self, node: ir.Identity) -> str:  # noqa: N802
        return self._settings["identity"]

    def _print_ir_Zero(self, node: ir.Zero) -> str:  # noqa: N802
        return "0"

    def _print_ir_Add(self, node: ir.Add) -> str:  # noqa: N802
        return " ".join(self.add_pieces(node))

    def add_pieces(self, node: ir.Add) -> list[str]:
        """The terms of a sum as printed, each but the first with its sign: ``a``, ``- b``."""
        order = st.ordered_terms if self._settings["order_terms"] else st.flat_terms
        pieces = []
        for index, term in enumerate(order(node)):
            negative, magnitude = st.split_sign(term)
            shown = self.wrap(magnitude, st.NEG if negative else st.ADD)
            if index == 0:
                pieces.append(("-" if negative else "") + shown)
            else:
                pieces.append(("- " if negative else "+ ") + shown)
        return pieces

    def _print_ir_Number(self, node: ir.Number) -> str:  # noqa: N802
        value = st.number_value(node.value)
        if st.is_negative_number(value):
            return self.negated(ir.Number(-value))
        if not value.is_Rational:
            return self.size(value)
        if value.q == 1:
            return self._print(sympy.Integer(value.p))
        return self.rational(int(value.p), int(value.q))

    def size(self, value: sympy.Expr) -> str:
        """A size such as n or n + 1, printed by sympy."""
        return self._print(value)

    def _print_ir_Scale(self, node: ir.Scale) -> str:  # noqa: N802
        negative, magnitude = st.split_sign(node)
        if negative:
            return self.negated(magnitude)
        if not isinstance(magnitude, ir.Scale):
            return self._print(magnitude)
        quotient = as_quotient(magnitude)
        if quotient is not None:
            shown = self.fraction(quotient.top, quotient.bottom)
            if quotient.rest is None:
                return shown
            return self.juxtapose([shown, self.scaled(quotient.rest)])
        factors, arg = st.scalar_factors(magnitude)
        return self.juxtapose([self.factor(f) for f in factors] + [self.scaled(arg)])

    def factor(self, factor: ir.Expr) -> str:
        """A scalar factor in front of what it scales; products get parentheses."""
        if isinstance(factor, ir.Number):
            return self.wrap(factor, st.ADD)
        return self.wrap(factor, st.MUL if not isinstance(factor, ir.Symbol) else 0)

    def scaled(self, arg: ir.Expr) -> str:
        loose = isinstance(arg, ir.Hadamard | ir.Divide)
        return self.wrap(arg, st.MUL if loose else st.NEG)

    def _print_ir_MatMul(self, node: ir.MatMul) -> str:  # noqa: N802
        negative, magnitude = st.split_sign(node)
        if negative:
            return self.negated(magnitude)
        entries = st.as_sum_of_entries(node)
        if entries is not None:
            return self._print(entries)
        pieces = []
        for index, factor in enumerate(node.factors):
            loose = isinstance(factor, ir.Hadamard | ir.Divide) or (
                index > 0 and isinstance(factor, ir.Scale))
            pieces.append(self.wrap(factor, st.MUL if loose else st.NEG))
        return self.juxtapose(pieces)

    def _print_ir_Broadcast(self, node: ir.Broadcast) -> str:  # noqa: N802
        if node.target.is_scalar:
            return self._print(node.arg)
        negative, magnitude = st.split_sign(node.arg)
        ones = self.ones_of(node.target)
        if st.is_number(magnitude, 0):
            return "0"
        body = ones if st.is_number(magnitude, 1) else self.juxtapose(
            [self.factor(magnitude), ones])
        return ("-" if negative else "") + body

    def ones_of(self, shape: ir.Shape) -> str:
        ones, top = self._settings["ones"], self._settings["transpose"]
        if shape.cols == 1:
            return ones
        return ones + top if shape.rows == 1 else ones + self.ones_gap + ones + top

    def _print_ir_Transpose(self, node: ir.Transpose) -> str:  # noqa: N802
        return self.wrap(node.arg, st.POSTFIX) + self._settings["transpose"]

    def _print_ir_Hadamard(self, node: ir.Hadamard) -> str:  # noqa: N802
        negative, magnitude = st.split_sign(node)
        if negative:
            return self.negated(magnitude)
        left, right = self.operand(node.left), self.operand(node.right)
        return self.elementwise("product", left, right)

    def operand(self, node: ir.Expr) -> str:
        """An operand of an elementwise product: a chain of them needs no parentheses."""
        return self._print(node) if isinstance(node, ir.Hadamard) else self.wrap(node, st.MUL)

    def _print_ir_Divide(self, node: ir.Divide) -> str:  # noqa: N802
        if node.right.shape.is_scalar:
            return self.fraction(node.left, node.right)
        return self.elementwise("quotient", self.operand(node.left),
                                self.wrap(node.right, st.MUL))

    def _print_ir_Power(self, node: ir.Power) -> str:  # noqa: N802
        return self.power(self.wrap(node.base, st.POSTFIX), sympy.Rational(node.exponent))

    def _print_ir_Apply(self, node: ir.Apply) -> str:  # noqa: N802
        return self.apply(lookup(node.func), self._print(node.arg))

    def _print_ir_Extremum(self, node: ir.Extremum) -> str:  # noqa: N802
        inner = f"{self._print(node.left)}, {self._print(node.right)}"
        return self.function(node.kind, inner)

    def _print_ir_Norm(self, node: ir.Norm) -> str:  # noqa: N802
        return self.norm(self._print(node.arg), node.p)

    def _print_ir_SumAll(self, node: ir.SumAll) -> str:  # noqa: N802
        shape = node.arg.shape
        if shape.is_scalar:
            return self._print(node.arg)
        ones = self._settings["ones"]
        loose = isinstance(node.arg, ir.Hadamard | ir.Divide | ir.Scale)
        inner = self.wrap(node.arg, st.MUL if loose else st.NEG)
        left = "" if shape.rows == 1 else ones + self._settings["transpose"] + " "
        right = "" if shape.cols == 1 else " " + ones
        return left + inner + right

    def _print_ir_Diag(self, node: ir.Diag) -> str:  # noqa: N802
        return self.function("diag", self._print(node.arg))

    def _print_ir_Trace(self, node: ir.Trace) -> str:  # noqa: N802
        return self.function("tr", self._print(node.arg))

    def _print_ir_Inverse(self, node: ir.Inverse) -> str:  # noqa: N802
        return self.wrap(node.arg, st.POSTFIX) + self.inverse_mark

    def _print_ir_PseudoInverse(self, node: ir.PseudoInverse) -> str:  # noqa: N802
        return self.wrap(node.arg, st.POSTFIX) + self.pseudo_inverse_mark

    def _print_ir_Block(self, node: ir.Block) -> str:  # noqa: N802
        return self.block([[self._print(b) for b in row] for row in node.rows])


def printed_terms(printer: IRLayout, expr: ir.Expr) -> tuple[str, ...]:
    """A sum's printed terms with their signs (one piece for anything else), for line breaks."""
    if isinstance(expr, ir.Add) and len(expr.terms) > 1:
        return tuple(printer.add_pieces(expr))
    return (printer.doprint(expr),)  # type: ignore[attr-defined]
