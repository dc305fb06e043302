"""Slater points on symbolic data: a sympy search on small problems, the origin otherwise.

Both searches prove what they claim with sympy's assumptions (the signs the
declared sets give): a strict inequality holds when sympy says the value is
negative, never because a sample looked negative.  Emptiness is proved the
same way: a function sympy shows nonnegative on the domain cannot be < 0.
"""

from __future__ import annotations

from collections.abc import Mapping
from itertools import product

from dualize.analysis.at_zero import Undefined, at_zero
from dualize.analysis.convexity import Convexity, variable_signs
from dualize.analysis.report import Verdict
from dualize.analysis.sign_rules import NONNEG, NONPOS, Sign, sign
from dualize.model import expr as E
from dualize.model.problem import Constraint, Problem

SLATER = "Slater's condition holds (Boyd and Vandenberghe, 2004, section 5.2.3)"
CANDIDATES = (0, 1, -1, 2, -2, "1/2", 3, 10)
MAX_SEARCH_UNKNOWNS = 3
MATRIX_DOMAINS = frozenset({"psd", "pd", "symmetric"})


def strict_labels_of(conv: Convexity) -> set[str]:
    return {p.label for p in conv.constraints
            if p.kind in ("convex-inequality", "linear-matrix-inequality")}


def scalar_search(problem: Problem, conv: Convexity) -> Verdict | None:
    """Search a strictly feasible point (or prove none) on problems of a few scalar unknowns."""
    import sympy

    from dualize.analysis.scalarize import NotScalarizable, to_sympy, unknowns_for

    if any(p.kind == "linear-matrix-inequality" for p in conv.constraints) or any(
            v.domain.kind in MATRIX_DOMAINS for v in problem.variables):
        return None  # the grid knows nothing of definiteness or symmetry
    signs = variable_signs(problem)
    try:
        u = unknowns_for({v.name: (v.symbol.shape, signs.get(v.name))
                          for v in problem.variables})
        if len(u.flat()) > MAX_SEARCH_UNKNOWNS:
            return None
        rows = [(c, list(to_sympy(c.function, u))) for c in problem.constraints]
        bounds = _box_rows(problem, u, to_sympy)
    except (NotScalarizable, ValueError, TypeError, ZeroDivisionError):
        return None
    xs = u.flat()
    strict = strict_labels_of(conv)
    empty = _proved_empty(rows, strict)
    if empty is not None:
        return empty
    return _grid(problem, rows + bounds, strict, xs, u, sympy)


def _box_rows(problem: Problem, u: object, convert: object) -> list:
    """lo - x <= 0 and x - hi <= 0 for boxed variables (affine: need only hold)."""
    out = []
    for v in problem.variables:
        if v.domain.kind != "box":
            continue
        xs = list(u.by_name[v.name])  # type: ignore[attr-defined]
        lo = convert(v.domain.lo, u)[0, 0]  # type: ignore[operator]
        hi = convert(v.domain.hi, u)[0, 0]  # type: ignore[operator]
        out.append((None, [lo - x for x in xs] + [x - hi for x in xs]))
    return out


def _proved_empty(rows: list, strict: set[str]) -> Verdict | None:
    for con, entries in rows:
        for f in entries:
            if con.label in strict and f.is_nonnegative is True:
                detail = (f"the function of '{con.label}' ({f}) is >= 0 on the whole domain, "
                          f"so '{con.label}' can never hold strictly")
                return Verdict("not-guaranteed", f"no strictly feasible point: {detail}; "
                               "Slater's condition fails and a duality gap is possible",
                               finding="slater-fails", detail=detail, label=con.label)
    return None


def _grid(problem: Problem, rows: list, strict: set[str], xs: list, u: object,
          sympy: object) -> Verdict | None:
    values = [sympy.Rational(c) for c in CANDIDATES]  # type: ignore[attr-defined]
    for point in product(values, repeat=len(xs)):
        subs = dict(zip(xs, point, strict=True))
        if _in_domain(xs, point) and _holds(rows, strict, subs, sympy):
            return _found(problem, u, subs, strict)
    return None


def _in_domain(xs: list, point: tuple) -> bool:
    for x, value in zip(xs, point, strict=True):
        if (x.is_positive and value <= 0) or (x.is_nonnegative and value < 0):
            return False
    return True


def _holds(rows: list, strict: set[str], subs: dict, sympy: object) -> bool:
    for con, entries in rows:
        for f in entries:
            value = f.subs(subs)
            if not value.is_Number:
                value = sympy.simplify(value)  # type: ignore[attr-defined]
            if not _satisfied(value, con, strict):
                return False
    return True


def _satisfied(value: object, con: Constraint | None, strict: set[str]) -> bool:
    if value.is_real is not True:  # type: ignore[attr-defined]
        return False
    if con is not None and con.kind == "eq":
        return value.is_zero is True  # type: ignore[attr-defined]
    if con is not None and con.label in strict:
        return value.is_negative is True  # type: ignore[attr-defined]
    return value.is_nonpositive is True  # type: ignore[attr-defined]


def _found(problem: Problem, u: object, subs: dict, strict: set[str]) -> Verdict:
    witness: dict[str, list | float] = {}
    for name, m in u.by_name.items():  # type: ignore[attr-defined]
        vals = [float(subs[s]) for s in m]
        witness[name] = vals[0] if len(vals) == 1 else vals
    shown = ", ".join(f"{k} = {_show(v)}" for k, v in witness.items())
    what = ("satisfies " + ", ".join(sorted(strict)) + " strictly and the affine "
            "constraints") if strict else "satisfies every (affine) constraint"
    return Verdict("guaranteed", f"{shown} {what}: {SLATER}", witness)


def _show(v: list | float) -> str:
    return f"{v:g}" if isinstance(v, float) else "(" + ", ".join(f"{x:g}" for x in v) + ")"


def zero_candidate(problem: Problem, conv: Convexity,
                   signs: Mapping[str, Sign] | None = None) -> Verdict | None:
    """The origin as a Slater point, proved from the declared facts, or None."""
    signs = dict(signs or variable_signs(problem))
    if not all(zero_allowed(v.domain) for v in problem.variables):
        return None
    names = frozenset(v.name for v in problem.variables)
    strict = strict_labels_of(conv)
    try:
        at_zero(problem.objective, names)
        ok = all(zero_satisfies(c, names, strict) for c in problem.constraints)
    except Undefined:
        return None
    if not ok:
        return None
    witness: dict[str, list | float] = {v.name: 0.0 for v in problem.variables}
    what = ("satisfies " + ", ".join(sorted(strict)) + " strictly by the declared facts "
            "and the affine constraints") if strict else "satisfies every constraint"
    return Verdict("guaranteed", f"the point where every variable is 0 {what}: {SLATER}",
                   witness)


def zero_allowed(domain: object) -> bool:
    kind = domain.kind  # type: ignore[attr-defined]
    if kind in ("free", "nonneg", "symmetric", "integer", "binary"):
        return True
    if kind == "box":
        return sign(domain.lo) in NONPOS and sign(domain.hi) in NONNEG  # type: ignore[attr-defined]
    return False


def zero_satisfies(con: Constraint, names: frozenset[str], strict: set[str]) -> bool:
    folded = at_zero(con.function, names)
    if con.kind == "eq":
        return isinstance(folded, E.Zero)
    if con.kind == "psd":
        return _negative_definite(folded) if con.label in strict else False
    s = sign(folded)
    return s == "neg" if con.label in strict else s in NONPOS


def _negative_definite(m: E.Expr) -> bool:
    """-P with P positive definite data (or the identity), times a positive scalar."""
    if isinstance(m, E.Scale) and sign(m.factor) == "neg":
        inner = m.arg
        return isinstance(inner, E.Identity) or (
            isinstance(inner, E.Symbol) and "pd" in inner.facts)
    return False
