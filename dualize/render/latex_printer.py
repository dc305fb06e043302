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
from dualize.model.functions import Function
from dualize.render import structure as st
from dualize.render.fractions import as_quotient
from dualize.render.ir_layout import IRLayout
from dualize.render.names import latex_name

RELATIONS: dict[str, str] = {
    "=": "=", "==": "=", "<=": r"\leq", ">=": r"\geq", "succeq": r"\succeq",
    "preceq": r"\preceq", "in": r"\in", "!=": r"\neq", "<": "<", ">": ">",
}
_FUNCTIONS: dict[str, str] = {
    "max": r"\max", "min": r"\min",
    "diag": r"\operatorname{diag}", "tr": r"\operatorname{tr}",
}
_ELEMENTWISE: dict[str, str] = {"product": r"\odot", "quotient": r"\oslash"}
_TALL = (r"\frac", r"\tfrac", "bmatrix")
_NORM_SUBSCRIPTS: dict[str, str] = {"1": "1", "2": "2", "inf": r"\infty"}


class IRLatexPrinter(IRLayout, LatexPrinter):
    """LaTeX for IR nodes: ``^\\top``, ``\\frac``, ``\\mathbf{1}``, ``\\odot``, few parentheses."""

    printmethod = "_dualize_latex"
    _default_settings: dict[str, Any] = {
        **LatexPrinter._default_settings,
        "order_terms": True,
        "transpose": r"^\top",
        "ones": r"\mathbf{1}",
        "identity": "I",
    }
    target = "LaTeX"
    pseudo_inverse_mark = r"^{\dagger}"

    def name(self, name: str) -> str:
        return latex_name(name)

    def paren(self, text: str) -> str:
        return paren(text)

    def juxtapose(self, pieces: list[str]) -> str:
        return _juxtapose(pieces)

    def binds_as(self, node: ir.Expr, text: str) -> int:
        return _precedence(node)

    def rational(self, p: int, q: int) -> str:
        return rf"\tfrac{{{p}}}{{{q}}}"

    def fraction(self, top: ir.Expr, bottom: ir.Expr) -> str:
        return rf"\frac{{{self._print(top)}}}{{{self._print(bottom)}}}"

    def elementwise(self, op: str, left: str, right: str) -> str:
        return f"{left} {_ELEMENTWISE[op]} {right}"

    def power(self, base: str, exponent: sympy.Rational) -> str:
        shown = str(exponent.p) if exponent.q == 1 else f"{exponent.p}/{exponent.q}"
        return f"{base}^{{{shown}}}"

    def function(self, func: str, inner: str) -> str:
        return _FUNCTIONS.get(func, rf"\operatorname{{{func}}}") + paren(inner)

    def apply(self, function: Function, inner: str) -> str:
        return function.print_with(inner, function.latex, paren)

    def norm(self, inner: str, p: str) -> str:
        return rf"\lVert {inner} \rVert_{{{_NORM_SUBSCRIPTS[p]}}}"

    def block(self, rows: list[list[str]]) -> str:
        body = r" \\ ".join(" & ".join(row) for row in rows)
        return r"\begin{bmatrix} " + body + r" \end{bmatrix}"


def _precedence(node: ir.Expr) -> int:
    """As in ``structure``, except that a ``\\frac`` binds like a postfix operand."""
    if _is_fraction(node) and not st.split_sign(node)[0]:
        return st.POSTFIX
    return st.precedence(node)


def _is_fraction(node: ir.Expr) -> bool:
    """A quotient by a scalar, or a product whose scalar factors print as one ``\\frac``."""
    if isinstance(node, ir.Divide):
        return node.right.shape.is_scalar
    if isinstance(node, ir.Scale) and not st.split_sign(node)[0]:
        quotient = as_quotient(node)
        return quotient is not None and quotient.rest is None
    return False


def paren(text: str) -> str:
    """Parentheses that grow only around tall contents (fractions, matrices)."""
    if any(tall in text for tall in _TALL):
        return rf"\left({text}\right)"
    return f"({text})"


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


def latex_expr(expr: ir.Expr, **settings: Any) -> str:
    """The LaTeX (math mode, no delimiters) of an IR expression."""
    return IRLatexPrinter(settings).doprint(expr)


def latex_relation(relation: str) -> str:
    """The LaTeX of a relation as the IR spells it."""
    return RELATIONS[relation]
