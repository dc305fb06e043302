"""A canonical form of IR expressions: a sum of like terms collected.

An expression expands (through sums, scalings, products, transposes, sums of
entries and elementwise products with a vector) into terms

    coefficient * scalar factors * matrix chain

with an exact rational coefficient.  Like terms (same scalar factors, same
chain) are collected; a scalar chain and its transpose are one term (u'v =
v'u), so the textbook form -(1/4) nu'AA'nu - b'nu comes out however the
Lagrangian was written.  Anything nonlinear (norms, exp, log, ...) is an atom
whose arguments are put in canonical form recursively.

``tidy`` rebuilds an IR expression from the canonical form; ``node_key``
(``dualize.duality.keys``) gives a deterministic sort key for any expression.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import sympy

from dualize.duality import build as b
from dualize.duality.keys import node_key
from dualize.model.expr import (
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
    Norm,
    Number,
    Ones,
    Power,
    PseudoInverse,
    Scale,
    SumAll,
    Symbol,
    Trace,
    Transpose,
    Zero,
)


@dataclass(frozen=True)
class Term:
    coef: sympy.Expr
    scalars: tuple[Expr, ...]
    chain: tuple[Expr, ...]


def expand(e: Expr, keep_forms: bool = True) -> list[Term]:
    """The collected terms of ``e``.

    With ``keep_forms`` quadratic forms v' M v of a sum v stay whole, the way a
    textbook writes -(1/2)(G'l + q)' P^-1 (G'l + q) in a derived expression;
    without it they are multiplied out too (to prove two expressions equal).
    """
    return _collect(_expand(e, keep_forms))


def tidy(e: Expr, keep_forms: bool = True) -> Expr:
    """``e`` rebuilt from its canonical form: like terms collected, stable order."""
    return rebuild(expand(e, keep_forms), e.shape)


def equal(a: Expr, c: Expr) -> bool:
    """Structural equality after full expansion (a proof of equality, not a test)."""
    return expand(b.sub(a, c), keep_forms=False) == []


def _is_compact_form(e: MatMul) -> bool:
    f = e.factors
    if not e.shape.is_scalar or len(f) < 2:
        return False
    if not any(isinstance(x, Add) for x in f):
        return False
    n = len(f)
    return all(_same_sum(b.transpose(f[i]), f[n - 1 - i]) for i in range(n // 2)) and (
        n % 2 == 0 or b.is_symmetric(f[n // 2]))


def _same_sum(a: Expr, c: Expr) -> bool:
    """Equal as sums, whatever the order of the terms."""
    if isinstance(a, Add) and isinstance(c, Add):
        return sorted(map(node_key, a.terms)) == sorted(map(node_key, c.terms))
    return a == c


def _expand(e: Expr, keep: bool) -> list[Term]:
    handler = _EXPAND.get(type(e))
    if handler is not None:
        return handler(e, keep)
    return [_atom(_tidy_children(e, keep))]


def _atom(e: Expr) -> Term:
    if e.shape.is_scalar:
        return Term(sympy.Integer(1), (e,), ())
    return Term(sympy.Integer(1), (), (e,))


def _tidy_children(e: Expr, keep: bool) -> Expr:
    if isinstance(e, Block):
        return Block(tuple(tuple(tidy(x, keep) for x in row) for row in e.rows))
    changes = {}
    for f in fields(e):  # type: ignore[arg-type]
        value = getattr(e, f.name)
        if isinstance(value, Expr):
            changes[f.name] = tidy(value, keep)
    if not changes:
        return e
    from dataclasses import replace

    return replace(e, **changes)  # type: ignore[type-var]


def _number(e: Number, keep: bool = True) -> list[Term]:
    return [] if e.value == 0 else [Term(e.value, (), ())]


def _symbol(e: Symbol, keep: bool) -> list[Term]:
    return [_atom(e)]


def _add(e: Add, keep: bool) -> list[Term]:
    return [t for term in e.terms for t in _expand(term, keep)]


def _scale(e: Scale, keep: bool) -> list[Term]:
    return _product(_expand(e.factor, keep), _expand(e.arg, keep))


def _matmul(e: MatMul, keep: bool) -> list[Term]:
    if keep and _is_compact_form(e):
        scalars: list[Expr] = []
        chain: list[Expr] = []
        for f in e.factors:
            f = tidy(f, keep)
            while isinstance(f, Scale):
                scalars.append(f.factor)
                f = f.arg
            if not isinstance(f, Identity):
                chain.append(f)
        terms = [_atom(MatMul(tuple(chain)))]
        for s in scalars:
            terms = _product(_expand(s, keep), terms)
        return terms
    terms = _expand(e.factors[0], keep)
    for f in e.factors[1:]:
        terms = _product(terms, _expand(f, keep))
    return terms


def _transpose(e: Transpose, keep: bool) -> list[Term]:
    pushed = b.transpose(e.arg)
    if isinstance(pushed, Transpose):
        inner = tidy(pushed.arg, keep)
        pushed2 = b.transpose(inner)
        return [_atom(pushed2 if not isinstance(pushed2, Transpose) else Transpose(inner))]
    return _expand(pushed, keep)


def _broadcast(e: Broadcast, keep: bool) -> list[Term]:
    if e.shape.cols == 1:
        ones = [Term(sympy.Integer(1), (), (Ones(e.shape.rows),))]
        return _product(_expand(e.arg, keep), ones)
    return [_atom(Broadcast(tidy(e.arg, keep), e.shape))]


def _sumall(e: SumAll, keep: bool) -> list[Term]:
    return _expand(b.sum_all(e.arg) if not e.arg.shape.is_scalar else e.arg, keep)


def _diag(e: Diag, keep: bool) -> list[Term]:
    out = []
    for t in _expand(e.arg, keep):
        vec = rebuild([Term(sympy.Integer(1), (), t.chain)], e.arg.shape)
        out.append(Term(t.coef, t.scalars, (b.diag(vec),)))
    return out


def _hadamard(e: Hadamard, keep: bool) -> list[Term]:
    relative = _relative_entropy_with_data(e, keep)
    if relative is not None:
        return _expand(relative, keep)
    entropy = _entropy_form(e, keep)
    if entropy is not None:
        return [Term(sympy.Integer(1), (), (entropy,))]
    if e.shape.cols != 1:
        return [_atom(_sorted_pair(Hadamard, tidy(e.left, keep), tidy(e.right, keep)))]
    out: list[Term] = []
    for tl in _expand(e.left, keep):
        for tr in _expand(e.right, keep):
            out.extend(_hadamard_terms(tl, tr, e))
    return out


def _relative_entropy_with_data(e: Hadamard, keep: bool) -> Expr | None:
    """a .* log(a ./ q) = a .* log(a) - a .* log(q) for data q known positive.

    With q > 0, a ./ q > 0 exactly when a > 0, so both sides have one domain; the
    relative entropy to fixed positive weights is the negative entropy plus a
    linear term (the entropy stays one building block).
    """
    from dualize.duality.scalar import known_sign
    from dualize.model.expr import symbols_of

    for a, f in ((e.left, e.right), (e.right, e.left)):
        if not (isinstance(f, Apply) and f.func == "log" and isinstance(f.arg, Divide)):
            continue
        top, q = f.arg.left, f.arg.right
        data = all(s.role == "data" for s in symbols_of(q))
        if (tidy(top, keep) == tidy(a, keep) and data and known_sign(q) == "pos"
                and q.shape == a.shape):
            return b.sub(Hadamard(a, Apply("log", a)), Hadamard(a, Apply("log", q)))
    return None


def _entropy_form(e: Hadamard, keep: bool) -> Expr | None:
    """a .* f(a) stays whole (it is one building block, e.g. the entropy a .* log(a))."""
    for a, f in ((e.left, e.right), (e.right, e.left)):
        if isinstance(f, Apply) and tidy(a, keep) == tidy(f.arg, keep):
            return Hadamard(tidy(a, keep), Apply(f.func, tidy(f.arg, keep)))
    return None


def _hadamard_terms(tl: Term, tr: Term, e: Hadamard) -> list[Term]:
    coef = tl.coef * tr.coef
    scalars = tl.scalars + tr.scalars
    left = rebuild([Term(sympy.Integer(1), (), tl.chain)], e.shape)
    right = rebuild([Term(sympy.Integer(1), (), tr.chain)], e.shape)
    if isinstance(left, Ones):
        return [Term(coef, scalars, tr.chain)]
    if isinstance(right, Ones):
        return [Term(coef, scalars, tl.chain)]
    one = sympy.Integer(1)
    if len(tl.chain) == 1 and isinstance(left, Symbol):
        return _product([Term(coef, scalars, (Diag(left),))], [Term(one, (), tr.chain)])
    if len(tr.chain) == 1 and isinstance(right, Symbol):
        return _product([Term(coef, scalars, (Diag(right),))], [Term(one, (), tl.chain)])
    return [Term(coef, scalars, (_sorted_pair(Hadamard, left, right),))]


def _sorted_pair(cls: type, left: Expr, right: Expr) -> Expr:
    if node_key(right) < node_key(left):
        left, right = right, left
    return cls(left, right)


def _trace(e: Trace, keep: bool) -> list[Term]:
    out = []
    for t in _expand(e.arg, keep):
        inner = rebuild([Term(sympy.Integer(1), (), t.chain)], e.arg.shape)
        atom = Trace(inner) if not inner.shape.is_scalar else inner
        if isinstance(inner, Identity):
            out.append(Term(t.coef * inner.n, t.scalars, ()))
            continue
        out.append(Term(t.coef, _sort(t.scalars + ((atom,) if atom.shape.is_scalar and
                                                    not isinstance(atom, Number) else ())), ()))
    return out


def _power(e: Power, keep: bool) -> list[Term]:
    base = tidy(e.base, keep)
    if isinstance(base, Number):
        return _number(Number(base.value**e.exponent))
    if e.exponent == 1:
        return _expand(base, keep)
    if (e.exponent == 2 and e.shape.is_scalar and not isinstance(base, Symbol | Norm)
            and not keep):
        terms = _expand(base, keep)
        if len(terms) > 1:
            return _product(terms, terms)
    return [_atom(Power(base, e.exponent))]


def _zero(e: Expr, keep: bool) -> list[Term]:
    return []


def _identity(e: Identity, keep: bool) -> list[Term]:
    return [Term(sympy.Integer(1), (), (e,))]


_EXPAND = {
    Number: _number,
    Symbol: _symbol,
    Add: _add,
    Scale: _scale,
    MatMul: _matmul,
    Transpose: _transpose,
    Broadcast: _broadcast,
    SumAll: _sumall,
    Diag: _diag,
    Hadamard: _hadamard,
    Trace: _trace,
    Power: _power,
    Zero: _zero,
    Identity: _identity,
    Ones: lambda e, keep: [Term(sympy.Integer(1), (), (e,))],
}


def _product(left: list[Term], right: list[Term]) -> list[Term]:
    out = []
    for tl in left:
        for tr in right:
            out.append(_join(tl, tr))
    return out


def _join(tl: Term, tr: Term) -> Term:
    coef = tl.coef * tr.coef
    chain = _clean_chain(tl.chain + tr.chain)
    scalars = tl.scalars + tr.scalars
    numbers = [c for c in chain if isinstance(c, Number)]
    chain = tuple(c for c in chain if not isinstance(c, Number))
    for n in numbers:
        coef *= n.value
    if chain and _chain_shape_is_scalar(chain):
        scalars = scalars + (_orient(chain),)
        chain = ()
    return Term(coef, _sort(scalars), chain)


def _chain_shape_is_scalar(chain: tuple[Expr, ...]) -> bool:
    return chain[0].shape.rows == 1 and chain[-1].shape.cols == 1


def _clean_chain(chain: tuple[Expr, ...]) -> tuple[Expr, ...]:
    out: list[Expr] = []
    for f in chain:
        if isinstance(f, Identity) and (out or len(chain) > 1):
            continue
        if out and b.inverse_pair(out[-1], f):
            out.pop()
            continue
        if out and isinstance(f, Ones) and _is_ones_row(out[-1]):
            out.pop()
            out.append(Number(f.n))
            continue
        if out and isinstance(f, Ones) and isinstance(out[-1], Diag):
            out[-1] = out[-1].arg
            continue
        if out and isinstance(f, Diag) and _is_ones_row(out[-1]):
            out[-1] = b.transpose(f.arg)
            continue
        out.append(f)
    if not out and chain and not _chain_shape_is_scalar(chain):
        return (Identity(chain[0].shape.rows),)
    return tuple(out)


def _is_ones_row(e: Expr) -> bool:
    return isinstance(e, Transpose) and isinstance(e.arg, Ones)


def _orient(chain: tuple[Expr, ...]) -> Expr:
    """A scalar chain as one atom, oriented canonically (u'v and v'u are one)."""
    flipped = tuple(b.transpose(f) for f in reversed(chain))
    forward = chain[0] if len(chain) == 1 else MatMul(chain)
    backward = flipped[0] if len(flipped) == 1 else MatMul(flipped)
    if _pretty_order(backward) < _pretty_order(forward):
        return backward
    return forward


def _pretty_order(e: Expr) -> tuple[int, str]:
    """Prefer chains that start with a transposed vector that is not the ones vector."""
    if isinstance(e, MatMul):
        first = e.factors[0]
        ones_first = isinstance(first, Transpose) and isinstance(first.arg, Ones)
        return (1 if ones_first else 0, node_key(e))
    return (0, node_key(e))


def _sort(scalars: tuple[Expr, ...]) -> tuple[Expr, ...]:
    return tuple(sorted(scalars, key=node_key))


def _collect(terms: list[Term]) -> list[Term]:
    groups: dict[tuple[str, str], Term] = {}
    for t in terms:
        key = ("|".join(map(node_key, t.scalars)), "|".join(map(node_key, t.chain)))
        if key in groups:
            old = groups[key]
            groups[key] = Term(old.coef + t.coef, old.scalars, old.chain)
        else:
            groups[key] = t
    kept = [t for t in groups.values() if sympy.expand(t.coef) != 0]
    return sorted(kept, key=_term_order)


def _term_order(t: Term) -> tuple[int, int, str]:
    degree = sum(_degree(s) for s in t.scalars) + sum(_degree(c) for c in t.chain)
    constant = 1 if not t.scalars and not t.chain else 0
    key = "|".join(map(node_key, t.scalars + t.chain))
    return (constant, -degree, key)


def _degree(e: Expr) -> int:
    """How many times decision variables or multipliers occur (for term order)."""
    from dualize.model.expr import walk

    return sum(1 for n in walk(e) if isinstance(n, Symbol) and n.role != "data")


def rebuild(terms: list[Term], shape) -> Expr:  # type: ignore[no-untyped-def]
    """An IR expression from terms (the inverse of ``expand``)."""
    parts = []
    for t in terms:
        t = Term(t.coef, tuple(_as_sum(s) for s in t.scalars), t.chain)
        body: Expr | None = None
        if t.chain:
            body = t.chain[0] if len(t.chain) == 1 else MatMul(t.chain)
        scalar = _scalar_product(t.scalars)
        if body is None:
            body = scalar if scalar is not None else Number(sympy.Integer(1))
            scalar = None
        elif scalar is not None:
            body = Scale(scalar, body)
        if t.coef != 1:
            body = Number(t.coef) if b.is_one(body) else Scale(Number(t.coef), body)
        parts.append(body)
    if not parts:
        return b.zeros(shape)
    return parts[0] if len(parts) == 1 else Add(tuple(parts))


_ELEMENTWISE = (Apply, Power, Hadamard, Extremum, Divide)


def _as_sum(e: Expr) -> Expr:
    """1'E as sum(E), and a'E with an elementwise E as sum(a .* E), for reading."""
    if not isinstance(e, MatMul) or len(e.factors) != 2:
        return e
    first, second = e.factors
    if not isinstance(first, Transpose):
        return e
    if isinstance(first.arg, Ones) and isinstance(second, _ELEMENTWISE):
        return SumAll(second)
    if isinstance(second, Ones) and isinstance(first.arg, _ELEMENTWISE):
        return SumAll(first.arg)
    if isinstance(first.arg, _ELEMENTWISE) and not isinstance(second, _ELEMENTWISE):
        return SumAll(Hadamard(second, first.arg))
    if isinstance(second, _ELEMENTWISE) and not isinstance(first.arg, _ELEMENTWISE):
        return SumAll(Hadamard(first.arg, second))
    return e


def _scalar_product(scalars: tuple[Expr, ...]) -> Expr | None:
    if not scalars:
        return None
    counted: list[tuple[Expr, int]] = []
    for s in scalars:
        if counted and counted[-1][0] == s:
            counted[-1] = (s, counted[-1][1] + 1)
        else:
            counted.append((s, 1))
    factors = [s if k == 1 else Power(s, sympy.Integer(k)) for s, k in counted]
    out = factors[0]
    for f in factors[1:]:
        out = Scale(out, f)
    return out


# Atoms whose children are canonicalized but which stay whole.
_ATOMS = (Apply, Norm, Extremum, Inverse, PseudoInverse, Divide, Block)
