"""Entrywise sympy form of an IR expression of fixed, small size.

The Hessian fallback and the symbolic Slater search need ordinary sympy
expressions in scalar unknowns.  Only numeric sizes are expanded (a symbolic
size has no entries to name), and only scalar data become sympy symbols
carrying their declared sign as assumptions.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import sympy

from dualize.model import expr as E
from dualize.model.functions import lookup

MAX_ENTRIES = 36


class NotScalarizable(Exception):
    """The expression has symbolic sizes, matrix data or a node without an entrywise form."""


@dataclass(frozen=True)
class Unknowns:
    """sympy symbols standing for each variable's entries, in declaration order."""

    by_name: Mapping[str, sympy.Matrix]

    def flat(self) -> list[sympy.Symbol]:
        return [s for m in self.by_name.values() for s in m]


def _size(n: sympy.Expr) -> int:
    if not n.is_Integer or int(n) * 1 > MAX_ENTRIES:
        raise NotScalarizable(f"size {n} is not a small number")
    return int(n)


def _assumptions(sign: str | None) -> dict[str, bool]:
    if sign == "pos":
        return {"positive": True}
    if sign == "nonneg":
        return {"nonnegative": True}
    return {"real": True}


def unknowns_for(variables: Mapping[str, tuple[E.Shape, str | None]]) -> Unknowns:
    """One real symbol per entry, named x or x_1, x_2, ... (matrices x_1_2)."""
    out: dict[str, sympy.Matrix] = {}
    for name, (shape, sgn) in variables.items():
        r, c = _size(shape.rows), _size(shape.cols)
        kw = _assumptions(sgn)
        if r == c == 1:
            out[name] = sympy.Matrix([[sympy.Symbol(name, **kw)]])
        elif c == 1:
            out[name] = sympy.Matrix([[sympy.Symbol(f"{name}_{i + 1}", **kw)] for i in range(r)])
        else:
            out[name] = sympy.Matrix([[sympy.Symbol(f"{name}_{i + 1}_{j + 1}", **kw)
                                       for j in range(c)] for i in range(r)])
    return Unknowns(out)


def to_sympy(node: E.Expr, unknowns: Unknowns) -> sympy.Matrix:
    """The entries of ``node`` as a sympy Matrix (1x1 for scalars)."""
    return _Convert(unknowns).of(node)


def _data_symbol(sym: E.Symbol) -> sympy.Matrix:
    if not sym.shape.is_scalar:
        raise NotScalarizable(f"matrix data {sym.name}")
    sgn = "pos" if "pos" in sym.facts else ("nonneg" if sym.facts & {"nonneg", "binary"}
                                            else None)
    return sympy.Matrix([[sympy.Symbol(sym.name, **_assumptions(sgn))]])


def _elementwise(m: sympy.Matrix, f: object) -> sympy.Matrix:
    return m.applyfunc(f)


def _pair(a: sympy.Matrix, b: sympy.Matrix, f: object) -> sympy.Matrix:
    if b.shape == (1, 1) and a.shape != (1, 1):
        b = sympy.ones(*a.shape) * b[0, 0]
    return sympy.Matrix(a.shape[0], a.shape[1], lambda i, j: f(a[i, j], b[i, j]))  # type: ignore[operator]


class _Convert:
    def __init__(self, unknowns: Unknowns) -> None:
        self.u = unknowns

    def of(self, node: E.Expr) -> sympy.Matrix:
        method = getattr(self, "_" + type(node).__name__.lower(), None)
        if method is None:
            raise NotScalarizable(type(node).__name__)
        return method(node)

    def _symbol(self, node: E.Symbol) -> sympy.Matrix:
        if node.name in self.u.by_name:
            return self.u.by_name[node.name]
        if node.role == "data":
            return _data_symbol(node)
        raise NotScalarizable(f"unknown symbol {node.name}")

    def _number(self, node: E.Number) -> sympy.Matrix:
        return sympy.Matrix([[sympy.Rational(node.value)]])

    def _ones(self, node: E.Ones) -> sympy.Matrix:
        return sympy.ones(_size(node.n), 1)

    def _identity(self, node: E.Identity) -> sympy.Matrix:
        return sympy.eye(_size(node.n))

    def _zero(self, node: E.Zero) -> sympy.Matrix:
        return sympy.zeros(_size(node.shape.rows), _size(node.shape.cols))

    def _add(self, node: E.Add) -> sympy.Matrix:
        terms = [self.of(t) for t in node.terms]
        out = terms[0]
        for t in terms[1:]:
            out = _pair(out, t, lambda a, b: a + b)
        return out

    def _broadcast(self, node: E.Broadcast) -> sympy.Matrix:
        s = self.of(node.arg)[0, 0]
        return sympy.ones(_size(node.target.rows), _size(node.target.cols)) * s

    def _matmul(self, node: E.MatMul) -> sympy.Matrix:
        out = self.of(node.factors[0])
        for f in node.factors[1:]:
            out = out * self.of(f)
        return out

    def _scale(self, node: E.Scale) -> sympy.Matrix:
        return self.of(node.arg) * self.of(node.factor)[0, 0]

    def _transpose(self, node: E.Transpose) -> sympy.Matrix:
        return self.of(node.arg).T

    def _hadamard(self, node: E.Hadamard) -> sympy.Matrix:
        return _pair(self.of(node.left), self.of(node.right), lambda a, b: a * b)

    def _divide(self, node: E.Divide) -> sympy.Matrix:
        return _pair(self.of(node.left), self.of(node.right), lambda a, b: a / b)

    def _power(self, node: E.Power) -> sympy.Matrix:
        p = sympy.Rational(node.exponent)
        return _elementwise(self.of(node.base), lambda a: a ** p)

    def _apply(self, node: E.Apply) -> sympy.Matrix:
        return _elementwise(self.of(node.arg), lookup(node.func).to_sympy)

    def _extremum(self, node: E.Extremum) -> sympy.Matrix:
        f = sympy.Max if node.kind == "max" else sympy.Min
        return _pair(self.of(node.left), self.of(node.right), f)

    def _norm(self, node: E.Norm) -> sympy.Matrix:
        entries = list(self.of(node.arg))
        if node.p == "2":
            value = sympy.sqrt(sum(e ** 2 for e in entries))
        elif node.p == "1":
            value = sum(sympy.Abs(e) for e in entries)
        else:
            value = sympy.Max(*(sympy.Abs(e) for e in entries))
        return sympy.Matrix([[value]])

    def _sumall(self, node: E.SumAll) -> sympy.Matrix:
        return sympy.Matrix([[sum(self.of(node.arg))]])

    def _diag(self, node: E.Diag) -> sympy.Matrix:
        return sympy.diag(*list(self.of(node.arg)))

    def _trace(self, node: E.Trace) -> sympy.Matrix:
        return sympy.Matrix([[self.of(node.arg).trace()]])

    def _inverse(self, node: E.Inverse) -> sympy.Matrix:
        return self.of(node.arg).inv()
