"""The second-order test where the convexity calculus cannot decide.

A twice-differentiable function on a convex open domain is convex exactly
when its Hessian is positive semidefinite there (Boyd and Vandenberghe, 2004,
section 3.1.4).  We apply it to expressions of small fixed size, symbolically,
with the sign of each unknown as a sympy assumption: (x - 2)*(x - 4) has
Hessian 2 and is convex although the product rule rejects it.  A constant
indefinite Hessian proves the function neither convex nor concave
("neither"); anything sympy cannot sign stays "unknown".
"""

from __future__ import annotations

from collections.abc import Mapping
from itertools import combinations

from dualize.analysis.convexity_calculus import Curvature, curvature
from dualize.analysis.sign_rules import Sign
from dualize.model import expr as E
from dualize.model.problem import Problem

MAX_UNKNOWNS = 6


def curvature_with_fallback(node: E.Expr, problem: Problem | None,
                            signs: Mapping[str, Sign]) -> Curvature:
    """Curvature by the convexity calculus, else the Hessian test on a small fixed-size
    expression; may say "neither" (proved neither convex nor concave) beside the five
    curvatures."""
    c = curvature(node, signs)
    if c != "unknown":
        return c
    return hessian_curvature(node, signs)


def hessian_curvature(node: E.Expr, signs: Mapping[str, Sign]) -> Curvature:
    import sympy

    from dualize.analysis.scalarize import NotScalarizable, to_sympy, unknowns_for

    spec = {v.name: (v.shape, signs.get(v.name)) for v in E.symbols_of(node, "variable")}
    try:
        unknowns = unknowns_for(spec)
        if len(unknowns.flat()) > MAX_UNKNOWNS:
            return "unknown"
        entries = list(to_sympy(node, unknowns))
    except (NotScalarizable, ValueError, TypeError, ZeroDivisionError):
        return "unknown"
    xs = unknowns.flat()
    if any(e.has(sympy.Abs, sympy.Max, sympy.Min) for e in entries):
        return "unknown"
    return _join([_entry_curvature(e, xs) for e in entries])


def _join(found: list[Curvature]) -> Curvature:
    if "unknown" in found or "neither" in found:
        return "neither" if "neither" in found else "unknown"
    kinds = set(found) - {"constant", "affine"}
    if not kinds:
        return "affine" if "affine" in found else "constant"
    return kinds.pop() if len(kinds) == 1 else "neither"


def _entry_curvature(f: object, xs: list) -> Curvature:
    import sympy

    if not any(f.has(x) for x in xs):  # type: ignore[attr-defined]
        return "constant"
    hess = sympy.hessian(f, xs).applyfunc(sympy.simplify)
    if hess.is_zero_matrix:
        return "affine"
    if _psd(hess):
        return "convex"
    if _psd(-hess):
        return "concave"
    if not hess.free_symbols:
        return "neither"  # a constant indefinite Hessian
    return "unknown"


def _psd(h: object) -> bool:
    """All principal minors nonnegative (a symmetric matrix test, not just leading ones)."""
    import sympy

    n = h.shape[0]  # type: ignore[attr-defined]
    for k in range(1, n + 1):
        for idx in combinations(range(n), k):
            minor = sympy.simplify(h.extract(list(idx), list(idx)).det())  # type: ignore[attr-defined]
            if minor.is_nonnegative is not True:
                return False
    return True
