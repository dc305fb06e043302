"""Smart constructors for IR expressions, with the local simplifications that
keep derived coefficients small: zeros and identities vanish, products and sums
flatten, numbers fold, and transposes move down to the leaves.

Every rule here is an identity of linear algebra, so the expressions they build
are equal (as matrices) to the naive ones.
"""

from __future__ import annotations

import sympy

from dualize.model.expr import (
    SCALAR,
    Add,
    Apply,
    Block,
    Broadcast,
    Diag,
    Divide,
    Expr,
    Extremum,
    Hadamard,
    Identity,
    Inverse,
    MatMul,
    Number,
    Ones,
    Power,
    PseudoInverse,
    Scale,
    Shape,
    Symbol,
    Transpose,
    Zero,
)
from dualize.model.functions import lookup
from dualize.model.ops import is_zero  # noqa: F401 - the one zero test, used as b.is_zero


def num(value: int | sympy.Expr) -> Number:
    return Number(sympy.Integer(value) if isinstance(value, int) else value)


def zeros(shape: Shape) -> Expr:
    return Number(sympy.Integer(0)) if shape.is_scalar else Zero(shape)


def is_one(e: Expr) -> bool:
    return isinstance(e, Number) and e.value == 1


def add(*terms: Expr | None, shape: Shape | None = None) -> Expr:
    """The sum, flattened, zeros dropped and numbers folded."""
    flat: list[Expr] = []
    constant = sympy.Integer(0)
    for t in terms:
        if is_zero(t):
            shape = shape or (t.shape if t is not None else None)
            continue
        assert t is not None
        parts = t.terms if isinstance(t, Add) else (t,)
        for p in parts:
            if isinstance(p, Number):
                constant += p.value
            else:
                flat.append(p)
        shape = shape or t.shape
    if constant != 0:
        flat.append(Number(constant))
    if not flat:
        return zeros(shape or SCALAR)
    return flat[0] if len(flat) == 1 else Add(tuple(flat))


def neg(e: Expr) -> Expr:
    return scale(num(-1), e)


def sub(a: Expr, b: Expr) -> Expr:
    return add(a, neg(b))


def scale(c: Expr, e: Expr) -> Expr:
    """A scalar times an expression: scalar factors flattened, numbers folded
    into one leading number, the result nested as Scale(k, Scale(c1, ... e))."""
    if is_zero(c) or is_zero(e):
        return zeros(e.shape)
    factors = _scalar_factors(c)
    while isinstance(e, Scale):
        factors += _scalar_factors(e.factor)
        e = e.arg
    if e.shape.is_scalar:
        factors += _scalar_factors(e)
        body: Expr | None = None
    else:
        body = e
    number = sympy.Integer(1)
    others: list[Expr] = []
    for f in factors:
        if isinstance(f, Number):
            number *= f.value
        else:
            others.append(f)
    if number == 0:
        return zeros(e.shape)
    parts = ([Number(number)] if number != 1 else []) + others
    if body is None:
        if not parts:
            return Number(sympy.Integer(1))
        body, parts = parts[-1], parts[:-1]
    for p in reversed(parts):
        body = Scale(p, body)
    return body


def _scalar_factors(c: Expr) -> list[Expr]:
    if isinstance(c, Scale) and c.arg.shape.is_scalar:
        return _scalar_factors(c.factor) + _scalar_factors(c.arg)
    return [c]


def mul_scalars(a: Expr, b: Expr) -> Expr:
    return scale(a, b)


def mul(*factors: Expr) -> Expr:
    """The matrix product; scalar factors become a scaling of the rest."""
    scalars: list[Expr] = []
    chain: list[Expr] = []
    for f in factors:
        if f.shape.is_scalar:
            scalars.append(f)
            continue
        for g in f.factors if isinstance(f, MatMul) else (f,):
            if isinstance(g, Scale):
                scalars.append(g.factor)
                g = g.arg
            chain.append(g)
    product = _chain(chain) if chain else num(1)
    for s in reversed(scalars):
        product = scale(s, product) if not product.shape.is_scalar else mul_scalars(s, product)
    return product


def _chain(chain: list[Expr]) -> Expr:
    out: list[Expr] = []
    for f in chain:
        if isinstance(f, Identity):
            continue
        if isinstance(f, Zero):
            return Zero(Shape(chain[0].shape.rows, chain[-1].shape.cols))
        if out and _ones_pair(out[-1], f):
            out.pop()
            out.append(Number(f.shape.rows))
            continue
        if out and inverse_pair(out[-1], f):
            out.pop()
            continue
        if out and isinstance(f, Ones) and isinstance(out[-1], Diag):
            out[-1] = out[-1].arg
            continue
        if out and isinstance(f, Diag) and _is_ones_row(out[-1]):
            out[-1] = transpose(f.arg)
            continue
        out.append(f)
    numbers = [f for f in out if isinstance(f, Number)]
    rest = [f for f in out if not isinstance(f, Number)]
    if not rest:
        if chain and not Shape(chain[0].shape.rows, chain[-1].shape.cols).is_scalar:
            return Identity(chain[0].shape.rows)
        value = sympy.Integer(1)
        for n in numbers:
            value *= n.value
        return Number(value)
    body = rest[0] if len(rest) == 1 else MatMul(tuple(rest))
    for n in numbers:
        body = scale(n, body)
    return body


def inverse_pair(a: Expr, c: Expr) -> bool:
    """Whether a c is an identity: M inv(M) or inv(M) M (M K^-1 K = M)."""
    if isinstance(a, Diag) and isinstance(c, Diag):
        return c.arg == power(a.arg, sympy.Integer(-1)) or a.arg == power(c.arg,
                                                                          sympy.Integer(-1))
    return c == Inverse(a) or a == Inverse(c)


def _ones_pair(a: Expr, b: Expr) -> bool:
    return _is_ones_row(a) and isinstance(b, Ones)


def _is_ones_row(e: Expr) -> bool:
    return isinstance(e, Transpose) and isinstance(e.arg, Ones)


def transpose(e: Expr) -> Expr:
    """The transpose, pushed down to the leaves."""
    if e.shape.is_scalar:
        return e
    if isinstance(e, Transpose):
        return e.arg
    if isinstance(e, Symbol) and "symmetric" in e.facts:
        return e
    if isinstance(e, Identity | Diag):
        return e
    if isinstance(e, Zero):
        return Zero(e.shape.transposed())
    if isinstance(e, MatMul):
        return mul(*(transpose(f) for f in reversed(e.factors)))
    if isinstance(e, Add):
        return add(*(transpose(t) for t in e.terms))
    if isinstance(e, Scale):
        return scale(e.factor, transpose(e.arg))
    if isinstance(e, Broadcast):
        return Broadcast(e.arg, e.shape.transposed())
    if isinstance(e, Inverse):
        inner = transpose(e.arg)
        return e if inner == e.arg else Inverse(inner)
    if isinstance(e, Apply | Power | Hadamard) and is_symmetric(e):
        return e
    return Transpose(e)


def is_symmetric(e: Expr) -> bool:
    """True when ``e`` is known to equal its transpose."""
    if e.shape.is_scalar or isinstance(e, Identity | Diag | Zero):
        return True
    if isinstance(e, Symbol):
        return "symmetric" in e.facts
    if isinstance(e, Add):
        return all(is_symmetric(t) for t in e.terms)
    if isinstance(e, Scale):
        return is_symmetric(e.arg)
    if isinstance(e, Inverse | PseudoInverse):
        return is_symmetric(e.arg)
    if isinstance(e, Apply | Power):
        return is_symmetric(e.arg if isinstance(e, Apply) else e.base)
    if isinstance(e, Hadamard):
        return is_symmetric(e.left) and is_symmetric(e.right)
    if isinstance(e, Broadcast):
        return e.shape.is_square
    if isinstance(e, MatMul):
        return _palindromic(e.factors)
    if isinstance(e, Block):
        n = len(e.rows)
        return all(
            (is_symmetric(e.rows[i][j]) if i == j else transpose(e.rows[i][j]) == e.rows[j][i])
            for i in range(n)
            for j in range(n)
        )
    return False


def _palindromic(factors: tuple[Expr, ...]) -> bool:
    n = len(factors)
    for i in range(n // 2 + 1):
        j = n - 1 - i
        if i > j:
            break
        if i == j:
            if not is_symmetric(factors[i]):
                return False
        elif transpose(factors[i]) != factors[j]:
            return False
    return True


def hadamard(a: Expr, b: Expr) -> Expr:
    if a.shape.is_scalar:
        return scale(a, b)
    if b.shape.is_scalar:
        return scale(b, a)
    if is_zero(a) or is_zero(b):
        return Zero(a.shape)
    if isinstance(a, Broadcast):
        return scale(a.arg, b)
    if isinstance(b, Broadcast):
        return scale(b.arg, a)
    if isinstance(a, Ones) and a.shape == b.shape:
        return b
    if isinstance(b, Ones) and a.shape == b.shape:
        return a
    return Hadamard(a, b)


def diag(v: Expr) -> Expr:
    if isinstance(v, Ones):
        return Identity(v.shape.rows)
    if isinstance(v, Scale):
        return scale(v.factor, diag(v.arg))
    if isinstance(v, Broadcast):
        return scale(v.arg, Identity(v.shape.rows))
    if isinstance(v, Zero):
        return Zero(Shape(v.shape.rows, v.shape.rows))
    return Diag(v)


def sum_all(e: Expr) -> Expr:
    """1' e for a vector (kept as a product so that it combines linearly)."""
    if e.shape.is_scalar:
        return e
    if e.shape.cols == 1:
        return mul(Transpose(Ones(e.shape.rows)), e)
    if e.shape.rows == 1:
        return mul(e, Ones(e.shape.cols))
    return mul(Transpose(Ones(e.shape.rows)), e, Ones(e.shape.cols))


def broadcast(s: Expr, shape: Shape) -> Expr:
    if shape.is_scalar:
        return s
    if is_zero(s):
        return Zero(shape)
    if is_one(s) and shape.cols == 1:
        return Ones(shape.rows)
    if isinstance(s, Number) and shape.cols == 1:
        return scale(s, Ones(shape.rows))
    return Broadcast(s, shape)


def inverse(e: Expr) -> Expr:
    """The inverse of a matrix known to be invertible (the caller proves it)."""
    if e.shape.is_scalar:
        return power(e, sympy.Integer(-1))
    if isinstance(e, Identity):
        return e
    if isinstance(e, Scale):
        return scale(power(e.factor, sympy.Integer(-1)), inverse(e.arg))
    if isinstance(e, Inverse):
        return e.arg
    if isinstance(e, Diag):
        return Diag(power(e.arg, sympy.Integer(-1)))
    return Inverse(e)


def power(e: Expr, p: sympy.Rational) -> Expr:
    if p == 1:
        return e
    if isinstance(e, Number):
        return Number(e.value**p)
    if isinstance(e, Power):
        return Power(e.base, e.exponent * p)
    if isinstance(e, Scale) and isinstance(e.factor, Number) and e.shape.is_scalar:
        return scale(Number(e.factor.value**p), power(e.arg, p))
    return Power(e, p)


def divide(a: Expr, b: Expr) -> Expr:
    if b.shape.is_scalar:
        return scale(power(b, sympy.Integer(-1)), a)
    return Divide(a, b)


def apply(func: str, e: Expr) -> Expr:
    """func(e), with a function of the table and its inverse cancelled (exp(log u) = u)."""
    if isinstance(e, Apply) and lookup(func).inverse == e.func:
        return e.arg
    return Apply(func, e)


def minimum(a: Expr, b: Expr) -> Expr:
    return Extremum("min", a, b)


def maximum(a: Expr, b: Expr) -> Expr:
    return Extremum("max", a, b)


def inner(y: Expr, f: Expr) -> Expr:
    """<y, f>: product for scalars, y' f for vectors, trace(y f) for symmetric matrices."""
    if f.shape.is_scalar:
        return mul_scalars(y, f)
    if f.shape.cols == 1:
        return mul(transpose(y), f)
    if f.shape.rows == 1:
        return mul(f, transpose(y))
    from dualize.model.expr import Trace

    return Trace(mul(transpose(y), f))
