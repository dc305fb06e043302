"""The generated module's interior-point method for a linear dual, in normal equations.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.  For a dense linear program
with a few thousand multipliers, Mehrotra's predictor-corrector on the normal
equations (J. Nocedal and S. Wright, Numerical Optimization, 2nd ed., 2006, section
14.2) costs one rows x n x n product and one n x n Cholesky factor an iteration,
well below a simplex or a general sparse factorization on such data; HiGHS stays as
the fallback, and it is HiGHS that proves an infeasible or unbounded dual.
"""

import numpy as np
import scipy.linalg
import scipy.sparse

from dualize.solvergen.runtime_methods import _keep_multipliers, _linear_parts, _solve_linprog

# ---- copied into the generated module from here ----


class _Rows:
    """G z <= h as dense rows A z <= b plus the finite bounds, kept apart (no identity)."""

    def __init__(self, a, b, lo, hi):
        self.a = a if a is not None else np.zeros((0, len(lo)))
        self.b = b if b is not None else np.zeros(0)
        self.low, self.up = np.flatnonzero(np.isfinite(lo)), np.flatnonzero(np.isfinite(hi))
        self.h = np.concatenate([self.b, -lo[self.low], hi[self.up]])

    def times(self, z):
        return np.concatenate([self.a @ z, -z[self.low], z[self.up]])

    def transpose_times(self, v):
        k, first = len(self.b), len(self.b) + len(self.low)
        out = self.a.T @ v[:k]
        np.subtract.at(out, self.low, v[k:first])
        np.add.at(out, self.up, v[first:])
        return out

    def normal(self, weights):
        """G' diag(weights) G, the bounds adding to the diagonal only."""
        k, first = len(self.b), len(self.b) + len(self.low)
        m = (self.a.T * weights[:k]) @ self.a
        diagonal = np.zeros(m.shape[0])
        np.add.at(diagonal, self.low, weights[k:first])
        np.add.at(diagonal, self.up, weights[first:])
        return m + np.diag(diagonal)


def _lp_direction(rows, e, lam, s, m_factor, schur, r_d, r_g, r_e, r_c):
    """The Newton step (dz, dy, dlam, ds) of the LP's KKT system for complementarity r_c."""
    r1 = -r_d - rows.transpose_times(lam / s * r_g - r_c / s)
    def solve(r):
        return scipy.linalg.cho_solve(m_factor, r)

    base = solve(r1)
    dy = np.zeros(0)
    if e is not None:
        dy = scipy.linalg.cho_solve(schur, e @ base + r_e)
        base = base - solve(e.T @ dy)
    dlam = lam / s * (rows.times(base) + r_g) - r_c / s
    ds = (-r_c - s * dlam) / lam
    return base, dy, dlam, ds


def _longest(value, change):
    shrinking = change < 0
    return min(1.0, float(np.min(-value[shrinking] / change[shrinking], initial=np.inf)))


def _lp_interior(p, d, z0, lo, hi, tol, max_iter):
    """min c'z s.t. A z <= b, E z = e, lo <= z <= hi: (z, converged, rows multipliers)."""
    c = p.gradient(z0, d)
    (a_ub, b_ub), (e, e_rhs) = _linear_parts(p, z0, d)
    rows = _Rows(a_ub, b_ub, lo, hi)
    z = np.array(z0, dtype=float)
    s = np.maximum(rows.h - rows.times(z), 1.0)
    lam, y = np.ones_like(s), np.zeros(0 if e is None else len(e_rhs))
    scale = 1.0 + max(np.abs(c).max(initial=0.0), np.abs(rows.h).max(initial=0.0))
    for _ in range(min(max_iter, 150)):
        r_d = c + rows.transpose_times(lam) + (e.T @ y if e is not None else 0.0)
        r_g, r_e = rows.times(z) + s - rows.h, (e @ z - e_rhs) if e is not None else 0.0
        mu = s @ lam / max(len(s), 1)
        if max(np.abs(r_d).max(initial=0.0), np.abs(r_g).max(initial=0.0),
               np.abs(r_e).max(initial=0.0)) <= tol * scale and \
                s @ lam <= tol * (1.0 + abs(c @ z)):
            return z, True, (lam, y, rows)
        normal = rows.normal(lam / s)
        normal += 1e-11 * max(1.0, np.abs(np.diag(normal)).max(initial=0.0)) * np.eye(len(z))
        m_factor = scipy.linalg.cho_factor(normal)
        schur = None if e is None else scipy.linalg.cho_factor(
            e @ scipy.linalg.cho_solve(m_factor, e.T))
        args = (rows, e, lam, s, m_factor, schur, r_d, r_g, r_e)
        _, _, dlam, ds = _lp_direction(*args, s * lam)
        step = min(_longest(s, ds), _longest(lam, dlam))
        sigma = (((s + step * ds) @ (lam + step * dlam)) / max(len(s), 1) / mu) ** 3
        dz, dy, dlam2, ds2 = _lp_direction(*args, s * lam + ds * dlam - sigma * mu)
        step = 0.99 * min(_longest(s, ds2), _longest(lam, dlam2))
        z, y, lam, s = z + step * dz, y + step * dy, lam + step * dlam2, s + step * ds2
        if not (np.all(np.isfinite(z)) and np.all(s > 0) and np.all(lam > 0)):
            break
    return z, False, None


def _solve_lp(p, d, z0, lo, hi, tol, max_iter):
    """The normal-equations interior point; HiGHS when it does not converge, and HiGHS
    alone for sparse rows (a matrix-valued constraint: the transport kind), whose dense
    normal equations would waste what the sparsity saves."""
    if any(scipy.sparse.issparse(rows) for rows, _ in _linear_parts(p, z0, d)):
        return _solve_linprog(p, d, z0, lo, hi, tol, max_iter)
    try:
        with np.errstate(all="raise"):
            z, ok, found = _lp_interior(p, d, z0, lo, hi, tol, max_iter)
    except (np.linalg.LinAlgError, FloatingPointError, ValueError):
        ok = False
    if not ok:
        return _solve_linprog(p, d, z0, lo, hi, tol, max_iter)
    lam, y, rows = found
    k, first = len(rows.b), len(rows.b) + len(rows.low)
    lower, upper = np.zeros(len(z)), np.zeros(len(z))
    lower[rows.low], upper[rows.up] = lam[k:first], lam[first:]
    _keep_multipliers(p, z, d, lam[:k], y, (lower, upper))
    return z, True, "the linear program was solved by the interior-point method (normal " \
        "equations) to its tolerance"
