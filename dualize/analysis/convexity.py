"""Is the problem convex, and if not, which part breaks it.

A problem is convex in the standard sense (Boyd and Vandenberghe, 2004,
section 4.2.1) when it minimizes a convex function (maximizes a concave one)
subject to convex inequalities f_i <= 0, affine equalities and linear matrix
inequalities, over convex domains.  Each constraint gets a class; the verdict
is True, False (a part is shown nonconvex) or None (a part is undecided).
"""

from __future__ import annotations

from dataclasses import dataclass

from dualize.analysis.convexity_calculus import Curvature, flip, is_convex
from dualize.analysis.hessian import curvature_with_fallback
from dualize.analysis.sign_rules import Sign
from dualize.model.expr import symbols_of
from dualize.model.problem import Constraint, Problem

CONVEX_CLASSES = frozenset({"affine-inequality", "convex-inequality", "affine-equality",
                            "linear-matrix-inequality"})
NONCONVEX_CLASSES = frozenset({"nonaffine-equality", "nonconvex-inequality", "integrality"})
_DOMAIN_SIGN: dict[str, Sign] = {"nonneg": "nonneg", "pos": "pos", "binary": "nonneg"}


@dataclass(frozen=True)
class Part:
    """One part of the problem with its curvature and class (for objectives: its role)."""

    label: str
    curvature: Curvature
    kind: str


@dataclass(frozen=True)
class Convexity:
    convex: bool | None
    objective: Part
    constraints: tuple[Part, ...]
    integral: tuple[str, ...]
    reasons: tuple[str, ...]


def variable_signs(problem: Problem) -> dict[str, Sign]:
    """The sign each variable's domain implies (R_+, R_++, {0,1}, a box above zero)."""
    out: dict[str, Sign] = {}
    for v in problem.variables:
        s = _DOMAIN_SIGN.get(v.domain.kind)
        if v.domain.kind == "box" and v.domain.lo is not None:
            from dualize.analysis.sign_rules import NONNEG, sign
            s = "nonneg" if sign(v.domain.lo) in NONNEG else None
        if s is not None:
            out[v.name] = s
    return out


def objective_part(problem: Problem, signs: dict[str, Sign]) -> Part:
    c = curvature_with_fallback(problem.objective, problem, signs)
    wanted = "convex" if problem.sense == "minimize" else "concave"
    ok = is_convex(c) if wanted == "convex" else is_convex(flip(c))
    return Part("objective", c, "fine" if ok else ("unknown" if c == "unknown" else "bad"))


def constraint_class(con: Constraint, problem: Problem, signs: dict[str, Sign]) -> Part:
    """Class of one normalized constraint, from the curvature of its function."""
    if not symbols_of(con.function, "variable"):
        return Part(con.label, "constant", "data-only")
    c = curvature_with_fallback(con.function, problem, signs)
    if con.kind == "psd":
        kind = "linear-matrix-inequality" if c == "affine" else "nonaffine-matrix-inequality"
    elif con.kind == "eq":
        kind = "affine-equality" if c == "affine" else (
            "unknown-equality" if c == "unknown" else "nonaffine-equality")
    else:
        kind = {"affine": "affine-inequality", "convex": "convex-inequality",
                "concave": "nonconvex-inequality"}.get(c, "unknown-inequality")
    return Part(con.label, c, kind)


def analyse_convexity(problem: Problem) -> Convexity:
    signs = variable_signs(problem)
    obj = objective_part(problem, signs)
    parts = tuple(constraint_class(c, problem, signs) for c in problem.constraints)
    integral = tuple(v.name for v in problem.variables
                     if v.domain.kind in ("integer", "binary"))
    reasons = _reasons(problem, obj, parts, integral)
    return Convexity(_verdict(obj, parts, integral), obj, parts, integral, reasons)


def _verdict(obj: Part, parts: tuple[Part, ...], integral: tuple[str, ...]) -> bool | None:
    if obj.kind == "bad" or integral or any(p.kind in NONCONVEX_CLASSES for p in parts):
        return False
    if obj.kind == "unknown":
        return None
    if all(p.kind in CONVEX_CLASSES or p.kind == "data-only" for p in parts):
        return True
    return None


def _reasons(problem: Problem, obj: Part, parts: tuple[Part, ...],
             integral: tuple[str, ...]) -> tuple[str, ...]:
    wanted = "convex" if problem.sense == "minimize" else "concave"
    out = [f"objective: {obj.curvature} ({problem.sense} needs {wanted})"]
    out += [f"constraint {p.label}: {p.kind.replace('-', ' ')}" for p in parts]
    out += [f"variable {name}: integrality (not a convex set)" for name in integral]
    return tuple(out)
