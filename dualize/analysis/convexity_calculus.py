"""Curvature by the convexity calculus: the operations that keep convexity.

Source of the rules: S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
section 3.2 (operations that preserve convexity; the same rule set is stated
for modelling by M. Grant, S. Boyd and Y. Ye, 2006).  A composition h(g(x)) is
convex when h is convex and, for each argument, h is nondecreasing and g
convex, or h nonincreasing and g concave, or g affine.  The curvature of a
vector or matrix expression is entrywise.  Where no rule applies the answer is
"unknown" (the caller may then try a Hessian test), never a guess.
"""

from __future__ import annotations

from collections.abc import Mapping

from dualize.analysis import sign_rules as S
from dualize.analysis.forms import gram_middle, is_log_sum_exp, pull_scalars, transpose_of
from dualize.model import expr as E
from dualize.model.functions import LOG, lookup

Curvature = str  # "constant" | "affine" | "convex" | "concave" | "unknown"
_RANK = {"constant": 0, "affine": 1}
_FLIP = {"convex": "concave", "concave": "convex"}


def flip(c: Curvature) -> Curvature:
    """Curvature of the negation."""
    return _FLIP.get(c, c)


def is_convex(c: Curvature) -> bool:
    return c in ("constant", "affine", "convex")


def is_concave(c: Curvature) -> bool:
    return c in ("constant", "affine", "concave")


def combine(a: Curvature, b: Curvature) -> Curvature:
    """Curvature of a sum."""
    if a in _RANK and b in _RANK:
        return a if _RANK[a] >= _RANK[b] else b
    if a in _RANK:
        return b
    if b in _RANK:
        return a
    return a if a == b and a != "unknown" else "unknown"


def scaled(c: Curvature, s: S.Sign) -> Curvature:
    """Curvature of c times a constant of sign s."""
    if c in _RANK or s == "zero":
        return c if s != "zero" else "constant"
    if s in S.NONNEG:
        return c
    if s in S.NONPOS:
        return flip(c)
    return "unknown"


def compose(outer: Curvature, monotone: str, inner: Curvature) -> Curvature:
    """h(g) with h of curvature ``outer`` and monotonicity "inc", "dec" or "none"."""
    if inner == "constant":
        return "constant"
    if inner == "affine":
        return outer
    if outer == "convex" and ((monotone == "inc" and inner == "convex")
                              or (monotone == "dec" and inner == "concave")):
        return "convex"
    if outer == "concave" and ((monotone == "inc" and inner == "concave")
                               or (monotone == "dec" and inner == "convex")):
        return "concave"
    return "unknown"


def curvature(node: E.Expr, domains: Mapping[str, S.Sign] | None = None) -> Curvature:
    """The curvature of ``node`` in the variables (data, numbers: constant)."""
    return _Rules(domains or {}).of(node)


class _Rules:
    """One dispatch per node type; ``domains`` gives the signs variables' sets imply."""

    def __init__(self, domains: Mapping[str, S.Sign]) -> None:
        self.domains = domains

    def sign(self, node: E.Expr) -> S.Sign:
        return S.sign(node, self.domains)

    def of(self, node: E.Expr) -> Curvature:
        if isinstance(node, E.Symbol):
            return "constant" if node.role == "data" else "affine"
        if isinstance(node, (E.Number, E.Ones, E.Identity, E.Zero)):
            return "constant"
        method = getattr(self, "_" + type(node).__name__.lower(), None)
        if method is None:
            raise TypeError(f"curvature: unhandled node {type(node).__name__}")
        return method(node)

    def _add(self, node: E.Add) -> Curvature:
        out = "constant"
        for t in node.terms:
            out = combine(out, self.of(t))
        return out

    def _broadcast(self, node: E.Broadcast) -> Curvature:
        return self.of(node.arg)

    _transpose = _broadcast
    _sumall = _broadcast
    _trace = _broadcast
    _diag = _broadcast

    def _scale(self, node: E.Scale) -> Curvature:
        return self._product(node.factor, node.arg)

    def _hadamard(self, node: E.Hadamard) -> Curvature:
        if _is_entropy(node, self) or _is_relative_entropy(node, self):
            return "convex"
        return self._product(node.left, node.right)

    def _product(self, a: E.Expr, b: E.Expr) -> Curvature:
        ca, cb = self.of(a), self.of(b)
        if ca == "constant":
            return scaled(cb, self.sign(a))
        if cb == "constant":
            return scaled(ca, self.sign(b))
        if a == b and ca == "affine":
            return "convex"  # a square of an affine expression
        return "unknown"

    def _matmul(self, node: E.MatMul) -> Curvature:
        pulled = pull_scalars(node)
        if pulled != node:
            return self.of(pulled)
        curvs = [self.of(f) for f in node.factors]
        varying = [i for i, c in enumerate(curvs) if c != "constant"]
        if not varying:
            return "constant"
        if len(varying) == 1:
            return self._linear_image(node.factors, varying[0], curvs[varying[0]])
        return self._quadratic_form(node.factors)

    def _linear_image(self, factors: tuple[E.Expr, ...], i: int, c: Curvature) -> Curvature:
        """A x is affine for affine x; convex x stays convex under nonnegative weights."""
        if c == "affine":
            return "affine"
        signs = [self.sign(f) for j, f in enumerate(factors) if j != i]
        s = "pos"
        for t in signs:
            s = S.product(s, t)
        return scaled(c, s)

    def _quadratic_form(self, factors: tuple[E.Expr, ...]) -> Curvature:
        """e' M e with e affine and M positive semidefinite data is convex."""
        found = gram_middle(factors)
        if found is None:
            return "unknown"
        inner, middle = found
        if self.of(inner) != "affine":
            return "unknown"
        return "convex" if middle is None or _is_psd(middle) else "unknown"

    def _divide(self, node: E.Divide) -> Curvature:
        cl, cr = self.of(node.left), self.of(node.right)
        if cr == "constant":
            return scaled(cl, self.sign(node.right))
        if _quad_over_lin(node, self):
            return "convex"
        if cl == "constant" and self.sign(node.right) == "pos":
            inv = compose("convex", "dec", cr)  # 1/t is convex and decreasing on t > 0
            return scaled(inv, self.sign(node.left))
        return "unknown"

    def _power(self, node: E.Power) -> Curvature:
        p, base = node.exponent, node.base
        inner = self.of(base)
        if p == 0:
            return "constant"
        if p == 1:
            return inner
        return _power_rule(p, inner, self.sign(base))

    def _apply(self, node: E.Apply) -> Curvature:
        inner = self.of(node.arg)
        if is_log_sum_exp(node) is not None:
            return compose("convex", "inc", self.of(is_log_sum_exp(node)))
        if node.func == "log":
            shifted = _log_exp_plus_constant(node, self)
            if shifted is not None:
                return shifted
        function = lookup(node.func)
        if function.monotone == "by-sign":
            return _abs_rule(inner, self.sign(node.arg))
        return compose(function.curvature, function.monotone, inner)

    def _extremum(self, node: E.Extremum) -> Curvature:
        a, b = self.of(node.left), self.of(node.right)
        if node.kind == "max":
            out = combine(compose("convex", "inc", a), compose("convex", "inc", b))
        else:
            out = combine(compose("concave", "inc", a), compose("concave", "inc", b))
        return "constant" if a == b == "constant" else out

    def _norm(self, node: E.Norm) -> Curvature:
        inner = self.of(node.arg)
        if inner == "convex" and self.sign(node.arg) in S.NONNEG:
            return "convex"  # a norm is nondecreasing on the nonnegative orthant
        return compose("convex", "none", inner)

    def _inverse(self, node: E.Inverse) -> Curvature:
        return "constant" if self.of(node.arg) == "constant" else "unknown"

    _pseudoinverse = _inverse

    def _block(self, node: E.Block) -> Curvature:
        out = "constant"
        for b in node.children():
            c = self.of(b)
            out = combine(out, c) if c in _RANK else "unknown"
        return out


def _power_rule(p: object, inner: Curvature, base_sign: S.Sign) -> Curvature:
    """x^p: convex for p >= 1 on x >= 0 (and on R for even integer p); concave for
    0 < p < 1 on x >= 0; convex and decreasing for p < 0 on x > 0 (Boyd and
    Vandenberghe, 2004, section 3.1.5)."""
    even = p.q == 1 and p.p % 2 == 0  # type: ignore[attr-defined]
    if p > 1:  # type: ignore[operator]
        if even:
            if inner == "affine":
                return "convex"
            if base_sign in S.NONNEG:
                return compose("convex", "inc", inner)
            return compose("convex", "dec", inner) if base_sign in S.NONPOS else "unknown"
        return compose("convex", "inc", inner) if base_sign in S.NONNEG else "unknown"
    if p > 0:  # type: ignore[operator]
        return compose("concave", "inc", inner)
    if p.q == 1 and base_sign not in ("pos", "nonneg"):  # type: ignore[attr-defined]
        return "unknown"  # an integer negative power is defined for x < 0 too
    return compose("convex", "dec", inner)


def _abs_rule(inner: Curvature, arg_sign: S.Sign) -> Curvature:
    """A convex function least at 0, increasing for t >= 0 and decreasing for t <= 0."""
    if inner in ("constant", "affine"):
        return "constant" if inner == "constant" else "convex"
    if arg_sign in S.NONNEG:
        return compose("convex", "inc", inner)
    if arg_sign in S.NONPOS:
        return compose("convex", "dec", inner)
    return "unknown"


def _is_psd(m: E.Expr) -> bool:
    if isinstance(m, E.Identity):
        return True
    if isinstance(m, E.Symbol):
        return bool(m.facts & {"psd", "pd"})
    if isinstance(m, E.Scale):
        return _is_psd(m.arg) and S.sign(m.factor) in S.NONNEG
    if isinstance(m, E.MatMul):
        return gram_middle(m.factors) is not None and _gram_psd(m.factors)
    if isinstance(m, E.Add):
        return all(_is_psd(t) for t in m.terms)
    if isinstance(m, E.Diag):
        return S.sign(m.arg) in S.NONNEG
    return False


def _gram_psd(factors: tuple[E.Expr, ...]) -> bool:
    found = gram_middle(factors)
    return found is not None and (found[1] is None or _is_psd(found[1]))


def _is_entropy(node: E.Hadamard, rules: _Rules) -> bool:
    """e .* log(e) with e affine: the negative entropy, convex (Boyd and Vandenberghe,
    2004, section 3.1.5)."""
    for a, b in ((node.left, node.right), (node.right, node.left)):
        if isinstance(b, E.Apply) and b.func == LOG.name and b.arg == a:
            return rules.of(a) == "affine"
    return False


def _is_relative_entropy(node: E.Hadamard, rules: _Rules) -> bool:
    """u .* log(u ./ v) with u and v affine: the relative entropy, jointly convex as the
    perspective of -log (Boyd and Vandenberghe, 2004, section 3.2.6, from memory)."""
    for a, b in ((node.left, node.right), (node.right, node.left)):
        if (isinstance(b, E.Apply) and b.func == "log" and isinstance(b.arg, E.Divide)
                and b.arg.left == a):
            return rules.of(a) == "affine" and rules.of(b.arg.right) in ("affine", "constant")
    return False


def _log_exp_plus_constant(node: E.Apply, rules: _Rules) -> Curvature | None:
    """log(c + exp(g1) + ... + exp(gk)) with c a nonnegative constant: log-sum-exp of
    (log c, g1, ..., gk), convex and nondecreasing in each g (Boyd and Vandenberghe, 2004,
    section 3.1.5, from memory); with c = 1, k = 1 the softplus log(1 + exp(g))."""
    arg = node.arg
    if not isinstance(arg, E.Add):
        return None
    exps = [t for t in arg.terms if isinstance(t, E.Apply) and t.func == "exp"]
    rest = [t for t in arg.terms if not (isinstance(t, E.Apply) and t.func == "exp")]
    if not exps or any(rules.of(t) != "constant" or rules.sign(t) not in S.NONNEG
                       for t in rest):
        return None
    out = "constant"
    for t in exps:
        out = combine(out, compose("convex", "inc", rules.of(t.arg)))
    return out if out != "affine" else "convex"


def _quad_over_lin(node: E.Divide, rules: _Rules) -> bool:
    """e^2 / y (elementwise) or ||e||^2 / y with e affine, y concave and positive:
    convex (Boyd and Vandenberghe, 2004, section 3.1.5, quadratic-over-linear)."""
    top, bottom = node.left, node.right
    if rules.sign(bottom) != "pos" or not is_concave(rules.of(bottom)):
        return False
    if isinstance(top, E.Power) and top.exponent == 2:
        return rules.of(top.base) == "affine" or (
            isinstance(top.base, E.Norm) and rules.of(top.base.arg) == "affine")
    if isinstance(top, E.MatMul) and node.shape.is_scalar:
        found = gram_middle(top.factors)
        return found is not None and found[1] is None and rules.of(found[0]) == "affine"
    return False


__all__ = ["curvature", "combine", "compose", "flip", "is_convex", "is_concave",
           "transpose_of"]
