"""Syntax expressions -> IR expressions, one method per syntax node class.

Dispatch is on the node's class with a strict fallback: a syntax node without a
method raises, so a new construct cannot be skipped silently.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable

import sympy

from dualize.model import ops
from dualize.model import rules as M
from dualize.model.expr import (
    Apply,
    Diag,
    Divide,
    Expr,
    Extremum,
    Hadamard,
    Identity,
    Inverse,
    Norm,
    Number,
    Ones,
    Power,
    SumAll,
    Trace,
    symbols_of,
    walk,
)
from dualize.model.functions import ABS, BY_SPELLING, LOG, Function
from dualize.model.notation import rewrite_for
from dualize.model.scope import FUNCTIONS, ResolveError, Scope
from dualize.syntax import ast

_WRITTEN_AS = {
    "abs": "the absolute value is written |e| (elementwise)",
    "norm": "norms are written ||e||, ||e||_1, ||e||_2 or ||e||_inf",
    "transpose": "the transpose is written e' (or e^T)",
    "square": "write e^2 (elementwise on a vector) or ||e||^2 for the squared norm",
}
"""Hints for functions a reader may expect that the language writes as mathematics."""

class ExprResolver:
    """Resolves expressions in one scope (data and variables declared before)."""

    def __init__(self, scope: Scope) -> None:
        self.scope = scope

    def __call__(self, node: ast.Expr) -> Expr:
        method: Callable[[ast.Expr], Expr] | None = getattr(
            self, f"_{type(node).__name__}", None)
        if method is None:
            raise NotImplementedError(f"no resolver for syntax node {type(node).__name__}")
        result = method(node)
        if isinstance(result, Number) and _digits(result.value) > MAX_NUMBER_DIGITS:
            raise self.scope.fail(M.NUMBER_TOO_LARGE, node.span,
                                  why=f"about {_digits(result.value)} digits, more than "
                                  f"{MAX_NUMBER_DIGITS}")
        return result

    def _Number(self, node: ast.Number) -> Expr:
        v = node.value
        return Number(sympy.Rational(v.numerator, v.denominator), span=node.span)

    def _Name(self, node: ast.Name) -> Expr:
        symbol = self.scope.names.get(node.name)
        if symbol is not None:
            return symbol.with_span(node.span)
        if node.name in self.scope.failed:
            raise ResolveError(None)
        if node.name in self.scope.dims:
            raise self.scope.fail(M.DIMENSION_AS_VALUE, node.span, name=node.name)
        error = self.scope.fail(M.UNDECLARED_NAME, node.span, name=node.name,
                                hint=self.scope.suggest(node.name))
        self.scope.failed.add(node.name)  # reported at its first use only
        raise error

    def _BinOp(self, node: ast.BinOp) -> Expr:
        a, b, s = self(node.left), self(node.right), self.scope
        if node.op == "+":
            return ops.add(a, b, s, node.span)
        if node.op == "-":
            return ops.sub(a, b, s, node.span)
        if node.op == "*":
            return ops.multiply(a, b, s, node.span)
        if node.op == ".*":
            return ops.hadamard(a, b, s, node.span)
        return ops.divide(a, b, s, node.span, elementwise=node.op == "./")

    def _Neg(self, node: ast.Neg) -> Expr:
        return ops.negate(self(node.operand), node.span)

    def _Power(self, node: ast.Power) -> Expr:
        base, exponent = self(node.base), self(node.exponent)
        if not isinstance(exponent, Number):
            found = "a variable expression" if symbols_of(exponent) else f"a {exponent.shape}"
            raise self.scope.fail(M.BAD_EXPONENT, node.exponent.span, found=found)
        largest = max((n.value for n in walk(base) if isinstance(n, Number)), key=_log10,
                      default=sympy.Integer(1))
        self._power_size(largest, exponent.value, node)
        if isinstance(base, Number) and _foldable(base.value, exponent.value):
            return ops.number(base.value ** exponent.value, node.span)
        return Power(base, exponent.value, span=node.span)

    def _power_size(self, base: sympy.Expr, exponent: sympy.Expr, node: ast.Power) -> None:
        """A number raised to a power is refused when its value would be too large."""
        if base == 0 or not exponent.is_Rational:
            return
        grows = int(_log10(base) * abs(exponent)) + 1
        if grows > MAX_NUMBER_DIGITS:
            raise self.scope.fail(M.NUMBER_TOO_LARGE, node.span,
                                  why=f"a number raised to the power {_shown(exponent)} "
                                  f"would have about {_shown(grows)} digits, more than "
                                  f"{MAX_NUMBER_DIGITS}")

    def _Transpose(self, node: ast.Transpose) -> Expr:
        return ops.transpose(self(node.operand), node.span)

    def _Norm(self, node: ast.Norm) -> Expr:
        arg = self(node.arg)
        if node.p != "2" and not (arg.shape.is_vector or arg.shape.is_scalar):
            raise self.scope.fail(M.WRONG_ARGUMENT, node.span, name=f"||.||_{node.p}",
                                  needs="takes a vector", found=str(arg.shape),
                                  hint="only the Euclidean (Frobenius) norm applies to "
                                       "matrices; use sum(|X|) for the entrywise 1-norm")
        return Norm(arg, node.p, span=node.span)  # type: ignore[arg-type]

    def _Abs(self, node: ast.Abs) -> Expr:
        return Apply(ABS.name, self(node.arg), span=node.span)

    def _Call(self, node: ast.Call) -> Expr:
        if node.func not in FUNCTIONS:
            close = difflib.get_close_matches(node.func, FUNCTIONS, n=1, cutoff=0.5)
            hint = f"did you mean `{close[0]}`?" if close else "the functions are " + \
                ", ".join(FUNCTIONS)
            hint = _WRITTEN_AS.get(node.func, hint)
            rewrite = rewrite_for(node.func)
            if rewrite is not None and node.func not in _WRITTEN_AS:
                raise self.scope.fail(M.OTHER_NOTATION, node.func_span, name=node.func,
                                      hint=rewrite)
            raise self.scope.fail(M.UNKNOWN_FUNCTION, node.func_span, name=node.func, hint=hint)
        if node.func in BY_SPELLING:
            return self._elementwise(node, BY_SPELLING[node.func])
        return getattr(self, f"_call_{node.func}")(node)

    # ---- functions ---------------------------------------------------------
    def _args(self, node: ast.Call, count: int) -> tuple[ast.Expr, ...]:
        if len(node.args) != count:
            expected = "one argument" if count == 1 else f"{count} arguments"
            raise self.scope.fail(M.ARGUMENT_COUNT, node.span, name=node.func,
                                  expected=expected, count=len(node.args))
        return node.args

    def _one(self, node: ast.Call) -> Expr:
        return self(self._args(node, 1)[0])

    def _call_sum(self, node: ast.Call) -> Expr:
        return SumAll(self._one(node), span=node.span)

    def _elementwise(self, node: ast.Call, function: Function) -> Expr:
        """A function of the table, applied entry by entry (its arity is one)."""
        return Apply(function.name, self(self._args(node, function.arity)[0]), span=node.span)

    def _call_max(self, node: ast.Call) -> Expr:
        return self._extremum(node, "max")

    def _call_min(self, node: ast.Call) -> Expr:
        return self._extremum(node, "min")

    def _extremum(self, node: ast.Call, kind: str) -> Expr:
        left, right = (self(a) for a in self._args(node, 2))
        left, right = ops.conform(left, right, f"in {kind}(...)", self.scope, node.span)
        return Extremum(kind, left, right, span=node.span)  # type: ignore[arg-type]

    def _call_relent(self, node: ast.Call) -> Expr:
        """relent(u, v) = u .* log(u ./ v), the relative entropy entry by entry (a shorthand:
        it resolves to that expression, whose curvature and conjugate the later stages
        know; S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.1.5)."""
        left, right = (self(a) for a in self._args(node, 2))
        left, right = ops.conform(left, right, "in relent(...)", self.scope, node.span)
        return Hadamard(left, Apply(LOG.name, Divide(left, right)), span=node.span)

    def _call_diag(self, node: ast.Call) -> Expr:
        arg = self._one(node)
        if not arg.shape.is_vector:
            self._wrong(node, "takes a vector (it makes a diagonal matrix)", arg)
        return Diag(arg, span=node.span)

    def _call_trace(self, node: ast.Call) -> Expr:
        arg = self._one(node)
        if not arg.shape.is_square:
            self._wrong(node, "takes a square matrix", arg)
        return Trace(arg, span=node.span)

    def _call_inv(self, node: ast.Call) -> Expr:
        arg = self._one(node)
        moving = [s for s in symbols_of(arg) if s.role != "data"]
        if moving:
            raise self.scope.fail(M.INVERSE_OF_VARIABLE, node.span, name=moving[0].name)
        if not arg.shape.is_square:
            self._wrong(node, "takes a square matrix", arg)
        return Inverse(arg, span=node.span)

    def _call_ones(self, node: ast.Call) -> Expr:
        return Ones(self._size_arg(node), span=node.span)

    def _call_identity(self, node: ast.Call) -> Expr:
        return Identity(self._size_arg(node), span=node.span)

    def _size_arg(self, node: ast.Call) -> sympy.Expr:
        arg = self._args(node, 1)[0]
        if isinstance(arg, ast.Number) and arg.value.denominator == 1 and arg.value >= 1:
            return sympy.Integer(int(arg.value))
        if isinstance(arg, ast.Name) and arg.name in self.scope.dims:
            return self.scope.dims[arg.name]
        raise self.scope.fail(M.WRONG_ARGUMENT, arg.span, name=node.func,
                              needs="takes a size (a positive integer or a dimension symbol)",
                              found=_kind_of(arg, self.scope))

    def _wrong(self, node: ast.Call, needs: str, arg: Expr) -> None:
        raise self.scope.fail(M.WRONG_ARGUMENT, node.span, name=node.func, needs=needs,
                              found=str(arg.shape))


MAX_NUMBER_DIGITS = 1000
"""Largest exact number (digits of numerator or denominator) a problem may hold."""


def _log10(value: sympy.Expr) -> float:
    """log10 of a rational's larger part (numerator or denominator), without ever
    converting a huge integer to a string."""
    if not value.is_Rational or value == 0:
        return 0.0
    parts = [abs(int(value.p)), int(value.q)]
    return max(math.log10(v) if v.bit_length() < 1000 else v.bit_length() * math.log10(2)
               for v in parts)


def _digits(value: sympy.Expr) -> int:
    """Decimal digits of a rational's larger part."""
    return int(_log10(value)) + 1


def _shown(value: object) -> str:
    text = str(int(value)) if getattr(value, "is_Integer", True) else str(value)
    return text if len(text) <= 12 else text[:9] + "..."


def _foldable(base: sympy.Expr, exponent: sympy.Expr) -> bool:
    """Fold number powers that stay small: integer exponents up to 64, nonzero base."""
    return bool(exponent.is_integer and abs(exponent) <= 64 and base != 0)


def _kind_of(arg: ast.Expr, scope: Scope) -> str:
    if isinstance(arg, ast.Name):
        symbol = scope.names.get(arg.name)
        return f"{symbol.role} name" if symbol else "undeclared name"
    if isinstance(arg, ast.Number):
        return "non-integer number" if arg.value.denominator != 1 else "number below 1"
    return "expression"

