"""LaTeX of IR expressions, the way a careful author types it.

A subclass of sympy's LatexPrinter: sympy prints the scalar pieces (integers,
dimension symbols) and supplies the settings machinery (declared defaults,
unknown settings rejected); our IR nodes dispatch to ``_print_ir_<Class>``
methods, and an IR node without one raises, so a new node cannot slip through
printed wrongly.
"""

from __future__ import annotations

import re
from typing import Any

import sympy
from sympy.printing.latex import LatexPrinter

from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.render import structure as st
from dualize.render.names import latex_name

RELATIONS: dict[str, str] = {
    "=": "=", "<=": r"\leq", ">=": r"\geq", "succeq": r"\succeq",
    "preceq": r"\preceq", "in": r"\in", "!=": r"\neq",
}
_TALL = (r"\frac", r"\tfrac", "bmatrix")
_NORM_SUBSCRIPTS: dict[str, str] = {"1": "1", "2": "2", "inf": r"\infty"}


class IRLatexPrinter(st.SharedLeaves, LatexPrinter):
    """LaTeX for IR nodes: ``^\\top``, ``\\tfrac``, ``\\mathbf{1}``, ``\\odot``, few parentheses."""

    printmethod = "_dualize_latex"
    _default_settings: dict[str, Any] = {
        **LatexPrinter._default_settings,
        "order_terms": True,
        "transpose": r"^\top",
        "ones": r"\mathbf{1}",
        "identity": "I",
    }

    def _print(self, expr: Any, **kwargs: Any) -> str:
        if isinstance(expr, ir.Expr):
            method = getattr(self, "_print_ir_" + type(expr).__name__, None)
            if method is None:
                raise TypeError(f"no LaTeX rule for IR node {type(expr).__name__}")
            return method(expr)
        return super()._print(expr, **kwargs)

    def wrap(self, node: ir.Expr, bound: int) -> str:
        """The node, parenthesized when it binds no tighter than ``bound``."""
        text = self._print(node)
        return paren(text) if _precedence(node) <= bound else text

    def _print_ir_Symbol(self, node: ir.Symbol) -> str:
        return latex_name(node.name)

    def _print_ir_Number(self, node: ir.Number) -> str:
        value = st.number_value(node.value)
        if st.is_negative_number(value):
            return "-" + self.wrap(ir.Number(-value), st.NEG)
        if not value.is_Rational:
            return self._print(value)  # a size such as n or n + 1, printed by sympy
        if value.q == 1:
            return self._print(sympy.Integer(value.p))
        return rf"\tfrac{{{value.p}}}{{{value.q}}}"

    def _print_ir_Scale(self, node: ir.Scale) -> str:
        negative, magnitude = st.split_sign(node)
        if negative:
            return "-" + self.wrap(magnitude, st.NEG)
        if not isinstance(magnitude, ir.Scale):
            return self._print(magnitude)
        factors, arg = st.scalar_factors(magnitude)
        pieces = [self._factor(f) for f in factors] + [self._scaled(arg)]
        return _juxtapose(pieces)

    def _factor(self, factor: ir.Expr) -> str:
        """A scalar factor in front of what it scales; products get parentheses."""
        if isinstance(factor, ir.Number):
            return self.wrap(factor, st.ADD)
        return self.wrap(factor, st.MUL if not isinstance(factor, ir.Symbol) else 0)

    def _scaled(self, arg: ir.Expr) -> str:
        if isinstance(arg, ir.Hadamard | ir.Divide):
            return self.wrap(arg, st.MUL) if not _is_fraction(arg) else self._print(arg)
        return self.wrap(arg, st.NEG)

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
        body = ones if st.is_number(magnitude, 1) else _juxtapose([self._factor(magnitude), ones])
        return ("-" if negative else "") + body

    def _ones_of(self, shape: ir.Shape) -> str:
        ones, top = self._settings["ones"], self._settings["transpose"]
        if shape.cols == 1:
            return ones
        return ones + top if shape.rows == 1 else ones + ones + top

    def _print_ir_Transpose(self, node: ir.Transpose) -> str:
        return self.wrap(node.arg, st.POSTFIX) + self._settings["transpose"]

    def _print_ir_Hadamard(self, node: ir.Hadamard) -> str:
        negative, magnitude = st.split_sign(node)
        if negative:
            return "-" + self.wrap(magnitude, st.NEG)
        left, right = self._elementwise_operand(node.left), self._elementwise_operand(node.right)
        return rf"{left} \odot {right}"

    def _elementwise_operand(self, node: ir.Expr) -> str:
        if isinstance(node, ir.Hadamard):
            return self._print(node)
        return self.wrap(node, st.MUL)

    def _print_ir_Divide(self, node: ir.Divide) -> str:
        if _is_fraction(node):
            return rf"\frac{{{self._print(node.left)}}}{{{self._print(node.right)}}}"
        left = self._elementwise_operand(node.left)
        return rf"{left} \oslash {self.wrap(node.right, st.MUL)}"

    def _print_ir_Power(self, node: ir.Power) -> str:
        exponent = sympy.Rational(node.exponent)
        shown = str(exponent.p) if exponent.q == 1 else f"{exponent.p}/{exponent.q}"
        return f"{self.wrap(node.base, st.POSTFIX)}^{{{shown}}}"

    def _print_ir_Apply(self, node: ir.Apply) -> str:
        function = lookup(node.func)
        return function.print_with(self._print(node.arg), function.latex, paren)

    def _print_ir_Extremum(self, node: ir.Extremum) -> str:
        return "\\" + node.kind + paren(f"{self._print(node.left)}, {self._print(node.right)}")

    def _print_ir_Norm(self, node: ir.Norm) -> str:
        return rf"\lVert {self._print(node.arg)} \rVert_{{{_NORM_SUBSCRIPTS[node.p]}}}"

    def _print_ir_SumAll(self, node: ir.SumAll) -> str:
        shape = node.arg.shape
        if shape.is_scalar:
            return self._print(node.arg)
        ones_t = self._settings["ones"] + self._settings["transpose"]
        loose = isinstance(node.arg, ir.Hadamard | ir.Divide | ir.Scale)
        inner = self.wrap(node.arg, st.MUL if loose else st.NEG)
        right = "" if shape.cols == 1 else " " + self._settings["ones"]
        left = "" if shape.rows == 1 else ones_t + " "
        return left + inner + right

    def _print_ir_Diag(self, node: ir.Diag) -> str:
        return r"\operatorname{diag}" + paren(self._print(node.arg))

    def _print_ir_Trace(self, node: ir.Trace) -> str:
        return r"\operatorname{tr}" + paren(self._print(node.arg))

    def _print_ir_Inverse(self, node: ir.Inverse) -> str:
        return self.wrap(node.arg, st.POSTFIX) + "^{-1}"

    def _print_ir_PseudoInverse(self, node: ir.PseudoInverse) -> str:
        return self.wrap(node.arg, st.POSTFIX) + r"^{\dagger}"

    def _print_ir_Block(self, node: ir.Block) -> str:
        rows = [" & ".join(self._print(b) for b in row) for row in node.rows]
        return r"\begin{bmatrix} " + r" \\ ".join(rows) + r" \end{bmatrix}"


def _precedence(node: ir.Expr) -> int:
    """As in ``structure``, except that a ``\\frac`` binds like a postfix operand."""
    if _is_fraction(node) and not st.split_sign(node)[0]:
        return st.POSTFIX
    return st.precedence(node)


def paren(text: str) -> str:
    """Parentheses that grow only around tall contents (fractions, matrices)."""
    if any(tall in text for tall in _TALL):
        return rf"\left({text}\right)"
    return f"({text})"


def _is_fraction(node: ir.Expr) -> bool:
    """A quotient by a scalar prints as ``\\frac``; elementwise ones as ``\\oslash``."""
    return isinstance(node, ir.Divide) and node.right.shape.is_scalar


def _juxtapose(pieces: list[str]) -> str:
    """Products by juxtaposition: ``\\cdot`` where two numbers would touch, a thin space
    beside a multi-letter name (``B \\, \\mathrm{budget}``, not "Bbudget")."""
    out = pieces[0]
    for before, piece in zip(pieces, pieces[1:], strict=False):
        if piece[:1] in "0123456789":
            out += r" \cdot "
        elif _WORD.search(before) or piece.startswith(r"\mathrm"):
            out += r" \, "
        else:
            out += " "
        out += piece
    return out


_WORD = re.compile(r"\\mathrm\{[^{}]*\}(_\{[^{}]*\})?$")


def latex_terms(expr: ir.Expr, **settings: Any) -> tuple[str, ...]:
    """A sum's printed terms with their signs (one piece for anything else), for line breaks."""
    if isinstance(expr, ir.Add) and len(expr.terms) > 1:
        return tuple(IRLatexPrinter(settings).add_pieces(expr))
    return (latex_expr(expr, **settings),)


def latex_expr(expr: ir.Expr, **settings: Any) -> str:
    """The LaTeX (math mode, no delimiters) of an IR expression."""
    return IRLatexPrinter(settings).doprint(expr)


def latex_relation(relation: str) -> str:
    """The LaTeX of a relation as the IR spells it."""
    return RELATIONS[relation]
