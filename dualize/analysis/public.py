"""The analysis's answers about one expression, for callers outside the stage."""

from __future__ import annotations

from collections.abc import Mapping

from dualize.analysis.sign_rules import Sign
from dualize.model import expr as E


def curvature(expr: E.Expr, signs: Mapping[str, Sign] | None = None) -> str:
    """"constant", "affine", "convex", "concave" or "unknown", by the convexity calculus
    and, where they cannot decide, the Hessian test on small fixed-size expressions.

    ``signs`` maps variable names to the sign their domain implies ("pos", "nonneg");
    ``dualize.analysis.convexity.variable_signs(problem)`` computes it from a problem.
    """
    from dualize.analysis.hessian import curvature_with_fallback

    found = curvature_with_fallback(expr, None, signs or {})
    return "unknown" if found == "neither" else found


def sign(expr: E.Expr, signs: Mapping[str, Sign] | None = None) -> Sign:
    """Entrywise sign: "pos", "nonneg", "zero", "nonpos", "neg" or "unknown"."""
    from dualize.analysis.sign_rules import sign as _sign

    return _sign(expr, signs)
