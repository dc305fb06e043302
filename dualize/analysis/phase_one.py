"""Slater's condition on an instance, by a phase-one problem solved with scipy.

    minimize s  subject to  f_i(x) <= s   (nonaffine convex inequalities, LMIs as
                                           their largest eigenvalue, open domains)
                            affine inequalities and equalities kept as they are

(Boyd and Vandenberghe, 2004, section 11.4.1).  The problem is convex, so a
converged local solve is global: s* < 0 gives a strictly feasible point,
which is then re-checked at full precision before being shown; s* >= 0 says
none exists.  An infeasible affine part is decided exactly by linprog.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

import numpy as np
import sympy

from dualize.analysis.layout import Layout, SizeUnknown, layout_for
from dualize.analysis.measured import Measured
from dualize.analysis.report import Verdict
from dualize.model import expr as E
from dualize.model.functions import lookup
from dualize.model.problem import Problem

TOL = 1e-7
NEAR_ZERO = 1e-5  # an unconverged phase one this close to 0 has found no interior
SLATER = "Slater's condition holds (Boyd and Vandenberghe, 2004, section 5.2.3)"
REFINED = ("the refined Slater condition holds (Boyd and Vandenberghe, 2004, "
           "section 5.2.3)")
Row = Callable[[np.ndarray], np.ndarray]


def numeric_verdict(problem: Problem, strict_labels: frozenset[str],
                    instance: Measured) -> Verdict:
    """The verdict on an instance: a point found that holds the constraints labelled
    ``strict_labels`` strictly (and the others) shows Slater's condition."""
    try:
        lay = layout_for(problem, instance)
    except SizeUnknown as exc:
        return Verdict("unknown", f"the instance does not fix the size {exc}")
    rows = _Rows(problem, lay, set(strict_labels), _exact_data(problem, lay, instance.data))
    state, point = rows.affine_point()
    if state == "infeasible":
        return Verdict("not-guaranteed", "the instance is infeasible: its affine constraints "
                       "have no common point (linprog)", finding="slater-fails",
                       detail="the instance's affine constraints have no common point")
    if not rows.strict:
        if point is not None and rows.hard_ok(point):
            exact = rows.confirm(point)
            if exact is None:
                return _unconfirmed()
            return _shown(lay, exact, "feasible and every constraint is affine", REFINED)
        return Verdict("unknown", "linprog could not decide the feasibility of the affine "
                       "constraints on this instance")
    return _decide(rows, lay)


def _exact_data(problem: Problem, lay: Layout, instance: Any) -> dict[str, Any]:
    """The data as exact fractions: the instance file's decimals when it kept them
    (``numeric.instance``), else the exact binary value of each float."""
    from dualize.analysis.exact import fractions_of

    kept = getattr(instance, "exact", None) or getattr(getattr(instance, "values", None),
                                                       "exact", None) or {}
    names = {d.name for d in problem.data} | set(lay.dims)
    out: dict[str, Any] = {}
    for name in sorted(names & set(lay.values)):
        out[name] = kept[name] if name in kept else fractions_of(lay.values[name])
    return out


def _unconfirmed() -> Verdict:
    """The float point meets the constraints only within rounding: no certificate."""
    detail = ("the point the solver found meets the constraints only within rounding, and "
              "no point checked exactly on the instance's values was found: the instance may "
              "be infeasible")
    return Verdict("unknown", f"Slater's condition is not confirmed: {detail}", detail=detail)


def _shown(lay: Layout, z: np.ndarray, what: str, why: str = "") -> Verdict:
    z = np.where(z == 0, 0.0, z)  # no "-0" in reports
    shown = ", ".join(f"{k} = {_short(v)}" for k, v in lay.witness(z).items())
    return Verdict("guaranteed", f"{shown} is {what}: {why or SLATER}", lay.witness(z))


def _decide(rows: _Rows, lay: Layout) -> Verdict:
    s_star, z, converged = rows.solve()
    if z is None:
        return Verdict("unknown", "the phase-one solve failed on this instance")
    if s_star < -TOL and rows.check(z):
        exact = rows.confirm(z)
        if exact is None or not rows.check(exact):
            return _unconfirmed()
        return _shown(lay, exact, "strictly feasible")
    if not rows.hard_ok(z) or s_star < -NEAR_ZERO:
        return Verdict("unknown", "the phase-one solve did not converge on this instance")
    if not converged and s_star > NEAR_ZERO:
        return Verdict("unknown", f"no strictly feasible point was found: the phase-one "
                       f"solve stopped at s = {s_star:.3g} without converging, which proves "
                       "nothing")
    if s_star > NEAR_ZERO:
        detail = (f"the phase-one optimum is s* = {s_star:.3g} > 0: the instance is "
                  "infeasible")
    else:
        how = "" if converged else " (the solver stopped at its iteration limit there)"
        detail = (f"the phase-one optimum is s* = {s_star:.3g}, zero within tolerance{how}, "
                  "and no point with s < 0 satisfies the constraints on this instance")
    return Verdict("not-guaranteed", f"no strictly feasible point: {detail}; Slater's "
                   "condition fails and a duality gap is possible",
                   finding="slater-fails", detail=detail)


def _short(v: list | float) -> str:
    if isinstance(v, float):
        return f"{v:.4g}"
    flat = np.asarray(v, dtype=float).reshape(-1)
    body = ", ".join(f"{x:.4g}" for x in flat[:6])
    return f"({body}{', ...' if flat.size > 6 else ''})"


class _Rows:
    """The phase-one rows as functions of the flat vector z."""

    def __init__(self, problem: Problem, lay: Layout, strict_labels: set[str],
                 exact: dict[str, Any] | None = None) -> None:
        self.lay = lay
        self.exact_data = exact or {}
        self.strict: list[Row] = []
        self.affine: list[Row] = []
        self.equal: list[Row] = []
        self.exact_ineq: list[Row] = []
        self.exact_eq: list[Row] = []
        for c in problem.constraints:
            self._add(c, c.label in strict_labels)
        for arg in _open_domain_arguments(problem):
            neg = E.Scale(E.Number(sympy.Integer(-1)), arg)
            self.strict.append(self._entries(neg))
        self.start = np.zeros(lay.size)
        self.bounds = _bounds(problem, lay, self)

    def _add(self, con: Any, strict: bool) -> None:
        fn = con.function
        if con.kind == "psd":
            self.strict.append(self._eig(fn, largest=True))
        elif con.kind == "eq":
            self.equal.append(self._entries(fn))
            self.exact_eq.append(self._exact(fn))
        elif strict:
            self.strict.append(self._entries(fn))
        else:
            self.affine.append(self._entries(fn))
            self.exact_ineq.append(self._exact(fn))

    def _exact(self, fn: E.Expr) -> Row:
        from dualize.analysis.exact import exact_2d

        lay = self.lay
        return lambda z: exact_2d(fn, {**self.exact_data, **lay.unpack(z)}, lay.dims).reshape(-1)

    def confirm(self, z: np.ndarray) -> np.ndarray | None:
        """An exact point (as floats for display) meeting every affine row, or None."""
        from dualize.analysis.exact_point import exact_affine_point

        point = exact_affine_point(self.exact_ineq, self.exact_eq, z)
        return None if point is None else np.array([float(v) for v in point], dtype=float)

    def _entries(self, fn: E.Expr) -> Row:
        lay = self.lay
        return lambda z: lay.value(fn, lay.unpack(z)).reshape(-1)

    def _eig(self, fn: E.Expr, largest: bool) -> Row:
        entries = self._entries(fn)

        def row(z: np.ndarray) -> np.ndarray:
            flat = entries(z)
            k = int(round(np.sqrt(flat.size)))
            mat = flat.reshape(k, k)
            eig = np.linalg.eigvalsh((mat + mat.T) / 2)
            return np.array([eig[-1] if largest else -eig[0]])
        return row

    def solve(self) -> tuple[float, np.ndarray | None, bool]:
        from dualize.analysis.phase_one_solve import phase_one

        return phase_one(self)

    def values(self, rows: list[Row], z: np.ndarray) -> np.ndarray:
        parts = [r(z) for r in rows]
        return np.concatenate(parts) if parts else np.zeros(0)

    def hard_ok(self, z: np.ndarray) -> bool:
        scale = 1.0 + float(np.max(np.abs(z))) if z.size else 1.0
        aff, eq = self.values(self.affine, z), self.values(self.equal, z)
        return bool(np.all(aff <= 1e-8 * scale) and np.all(np.abs(eq) <= 1e-8 * scale))

    def check(self, z: np.ndarray) -> bool:
        strict = self.values(self.strict, z)
        return bool(np.all(np.isfinite(strict)) and np.all(strict < 0) and self.hard_ok(z))

    def affine_point(self) -> tuple[str, np.ndarray | None]:
        from dualize.analysis.phase_one_solve import affine_point

        return affine_point(self)


def _bounds(problem: Problem, lay: Layout, rows: _Rows) -> list[tuple[float | None, float | None]]:
    """Bounds of each entry of z from polyhedral domains; open and PSD domains become
    strict rows (a Slater point lies in the relative interior of the domain)."""
    out: list[tuple[float | None, float | None]] = []
    at = 0
    for v, (r, c) in zip(problem.variables, lay.shapes, strict=True):
        kind, k = v.domain.kind, r * c
        lo = hi = None
        if kind in ("nonneg",):
            lo = 0.0
            rows.exact_ineq.append(_negated_slice(at, k))
        if kind == "box":
            lo = float(lay.value(v.domain.lo, lay.values).item())
            hi = float(lay.value(v.domain.hi, lay.values).item())
            rows.exact_ineq.extend(_box_rows(rows, v.domain, at, k))
        if kind == "pos":
            rows.strict.append(_negated_slice(at, k))
            rows.start[at:at + k] = 1.0
        if kind in ("psd", "pd", "symmetric"):
            _matrix_domain(rows, at, r, kind)
            rows.start[at:at + k] = np.eye(r).reshape(-1)
        if lo is not None:
            rows.start[at:at + k] = lo + 1.0 if hi is None else (lo + hi) / 2
        out.extend([(lo, hi)] * k)
        at += k
    return out


def _open_domain_arguments(problem: Problem) -> list[E.Expr]:
    """Arguments a point must keep positive: of log, sqrt, fractional or negative powers,
    and denominators (the relative interior of the functions' domains)."""
    exprs = [problem.objective] + [c.function for c in problem.constraints]
    found: dict[E.Expr, None] = {}
    for node in (n for e in exprs for n in E.walk(e)):
        arg = None
        if isinstance(node, E.Apply) and lookup(node.func).keep_positive:
            arg = node.arg
        elif isinstance(node, E.Power) and (node.exponent < 0 or node.exponent.q != 1):
            arg = node.base
        elif isinstance(node, E.Divide):
            arg = node.right
        if arg is not None and E.symbols_of(arg, "variable"):
            found.setdefault(arg, None)
    return list(found)


def _box_rows(rows: _Rows, domain: Any, at: int, k: int) -> list[Row]:
    """lo - z <= 0 and z - hi <= 0 on the entries of one boxed variable, exactly."""
    from dualize.analysis.exact import exact_2d

    def bound(expr: E.Expr) -> Any:
        return exact_2d(expr, rows.exact_data, rows.lay.dims).reshape(-1)

    return [lambda z: bound(domain.lo) - z[at:at + k], lambda z: z[at:at + k] - bound(domain.hi)]


def _negated_slice(at: int, k: int) -> Row:
    return lambda z: -z[at:at + k]


def _matrix_domain(rows: _Rows, at: int, n: int, kind: str) -> None:
    def sym(z: np.ndarray) -> np.ndarray:
        mat = z[at:at + n * n].reshape(n, n)
        return (mat - mat.T)[np.triu_indices(n, 1)]

    def neg_min_eig(z: np.ndarray) -> np.ndarray:
        mat = z[at:at + n * n].reshape(n, n)
        return np.array([-np.linalg.eigvalsh((mat + mat.T) / 2)[0]])

    rows.equal.append(sym)
    rows.exact_eq.append(sym)
    if kind in ("psd", "pd"):
        rows.strict.append(neg_min_eig)


def feasible_exactly(problem: Problem, instance: Measured,
                     point: Mapping[str, Any]) -> bool | None:
    """Whether a solver's primal point (by name) can be made to meet every affine
    constraint and domain bound exactly on the instance's values: True when an exact
    point was found near it, False when none was, None when sizes are unknown or it
    is too large to check.  ``instance`` carries the numeric evaluator (``Measured``)."""
    from dualize.analysis.convexity import analyse_convexity
    from dualize.analysis.exact import MAX_ENTRIES

    try:
        lay = layout_for(problem, instance)
    except SizeUnknown:
        return None
    conv = analyse_convexity(problem)
    affine = {"affine-inequality", "affine-equality"}
    nonaffine = {p.label for p in conv.constraints if p.kind not in affine}
    rows = _Rows(problem, lay, nonaffine, _exact_data(problem, lay, instance.data))
    try:
        z = np.concatenate([np.asarray(point[n], dtype=float).reshape(-1) for n in lay.names])
    except (KeyError, ValueError):
        return None
    if z.size != lay.size or z.size > MAX_ENTRIES or not np.all(np.isfinite(z)):
        return None
    return rows.confirm(z) is not None
