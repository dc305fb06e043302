"""The interior-point method of the generated module, with its structured linear algebra.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.
"""

import numpy as np
import scipy.linalg

from dualize.solvergen.runtime_methods import (
    _keep_multipliers,
    _linear_parts,
    _solve_augmented,
    _solve_slsqp,
)

# ---- copied into the generated module from here ----


def _hessian_times(p, d, size):
    """v -> H v for a block of columns, from gradient differences (exact for a quadratic
    dual up to rounding), and the rounding scale of those differences."""
    base = p.gradient(np.zeros(size), d)

    def times_h(block):
        return np.column_stack([p.gradient(column, d) - base for column in block.T])

    return times_h, np.abs(base).max(initial=0.0) * np.sqrt(size)


def _diagonal_hessian(p, d, size):
    """The diagonal of a constant Hessian that is diagonal (checked on two random
    probes), else None: such a dual needs no matrix at all."""
    times_h, rounding = _hessian_times(p, d, size)
    diagonal = times_h(np.ones((size, 1)))[:, 0]
    check = np.random.default_rng(1).standard_normal((size, 2))
    exact = times_h(check)
    scale = np.abs(exact).max(initial=0.0) + rounding
    return diagonal if np.abs(exact - diagonal[:, None] * check).max() <= 1e-9 * scale else None


def _gram_factor(p, d, size, probes=48):
    """F with H = F F' when the Hessian has low rank, else None.

    A randomized range finder (N. Halko, P.-G. Martinsson and J. Tropp, SIAM Review,
    2011, algorithm 4.1) with a fixed seed, on Hessian-vector products taken as
    gradient differences; when the rank reaches the number of probes, the probes
    double (a rank that grows as needed) until they pass a quarter of the size.  A
    factor is accepted only when fresh probes confirm it reproduces H to rounding.
    """
    times_h, rounding = _hessian_times(p, d, size)
    rng = np.random.default_rng(0)
    while 2 * probes <= size:
        q, _ = np.linalg.qr(times_h(rng.standard_normal((size, probes))))
        small = q.T @ times_h(q)
        values, vectors = np.linalg.eigh(0.5 * (small + small.T))
        top = max(float(values.max(initial=0.0)), 0.0)
        keep = values > 1e-10 * top
        if top == 0.0:
            return None
        if keep.sum() <= probes - 8:
            factor = (q @ vectors[:, keep]) * np.sqrt(values[keep])
            check = rng.standard_normal((size, 4))
            exact = times_h(check)
            scale = np.abs(exact).max() + rounding
            good = np.abs(exact - factor @ (factor.T @ check)).max() <= 1e-8 * scale
            return factor if good else None
        probes *= 2
        if 4 * probes > size:  # past a quarter of the size a dense factor is as cheap
            return None
    return None


def _kkt_solver(h, factor, diagonal, a):
    """A solver for [[H + D, -A'], [A, 0]] (dz, dy) = (r1, r2).

    H + D is solved through its structure: D alone (H diagonal, folded into D), D
    plus F F' by the Woodbury identity, or a dense Cholesky factor.  D gets a small
    ridge (primal regularization: A. Altman and J. Gondzio, Optimization Methods and
    Software, 1999), so a dual that is flat along some direction still gives a
    definite system; one step of iterative refinement follows each solve, and the
    Schur complement A (H + D)^-1 A' is formed with one solve on all of A's rows.
    """
    if factor is not None:
        apply_k, solve_k = _low_rank_parts(factor, diagonal)
    else:
        diagonal = diagonal + 1e-9 * max(1.0, float(np.abs(np.diag(h)).max(initial=0.0)))
        full = scipy.linalg.cho_factor(h + np.diag(diagonal))

        def apply_k(v):
            return h @ v + (diagonal * v.T).T

        def solve_k(r):
            return scipy.linalg.cho_solve(full, r)

    def refined(r):
        x = solve_k(r)
        return x + solve_k(r - apply_k(x))

    if a is None:
        return lambda r1, r2: (refined(r1), None)
    k_at = refined(np.ascontiguousarray(a.T))
    schur = scipy.linalg.cho_factor(a @ k_at)

    def solve(r1, r2):
        base = refined(r1)
        dy = scipy.linalg.cho_solve(schur, r2 - a @ base)
        return base + k_at @ dy, dy

    return solve


def _low_rank_parts(factor, diagonal):
    """(v -> (F F' + D) v, r -> (F F' + D)^-1 r) by the Woodbury identity, for vectors
    and blocks of columns alike; a factor of rank 0 leaves D alone."""
    scale = float(np.square(factor).sum(axis=1).max(initial=0.0))
    diagonal = diagonal + 1e-9 * max(1.0, scale)
    inverse = 1.0 / diagonal

    def scaled(vector_or_block, by):
        return (by * vector_or_block.T).T

    if factor.shape[1] == 0:
        return (lambda v: scaled(v, diagonal)), (lambda r: scaled(r, inverse))
    small = scipy.linalg.cho_factor(
        np.eye(factor.shape[1]) + factor.T @ (inverse[:, None] * factor))

    def apply_k(v):
        return factor @ (factor.T @ v) + scaled(v, diagonal)

    def solve_k(r):
        inner = scipy.linalg.cho_solve(small, factor.T @ scaled(r, inverse))
        return scaled(r - factor @ inner, inverse)

    return apply_k, solve_k


class _Iterate:
    """One interior-point iterate: slacks s and bound multipliers w on each finite side."""

    def __init__(self, z, lo, hi, wl, wu):
        self.low, self.up = np.isfinite(lo), np.isfinite(hi)
        self.sl = np.where(self.low, z - lo, 1.0)
        self.su = np.where(self.up, hi - z, 1.0)
        self.wl, self.wu = wl, wu

    def gap(self):
        return self.sl @ self.wl + self.su @ self.wu

    def direction(self, solve, dual_res, primal_res, tau_l, tau_u):
        """The Newton step (dz, dy, dwl, dwu) toward s w = tau on the perturbed KKT system."""
        low, up, sl, su, wl, wu = self.low, self.up, self.sl, self.su, self.wl, self.wu
        r1 = -dual_res + np.where(low, tau_l / sl - wl, 0.0) - np.where(up, tau_u / su - wu, 0.0)
        dz, dy = solve(r1, -primal_res)
        dwl = np.where(low, (tau_l - sl * wl - wl * dz) / sl, 0.0)
        dwu = np.where(up, (tau_u - su * wu + wu * dz) / su, 0.0)
        return dz, dy, dwl, dwu

    def longest(self, dz, dwl, dwu):
        """The largest step in [0, 1] that keeps every slack and multiplier nonnegative."""
        def limit(value, change):
            shrinking = change < 0
            return float(np.min(-value[shrinking] / change[shrinking], initial=np.inf))

        return min(1.0, limit(self.sl[self.low], dz[self.low]),
                   limit(self.su[self.up], -dz[self.up]), limit(self.wl, dwl), limit(self.wu, dwu))

    def gap_after(self, step, dz, dwl, dwu):
        sl = self.sl + step * np.where(self.low, dz, 0.0)
        su = self.su - step * np.where(self.up, dz, 0.0)
        return sl @ (self.wl + step * dwl) + su @ (self.wu + step * dwu)


def _solve_interior(p, d, z0, lo, hi, tol, max_iter):
    """The interior-point method; the augmented Lagrangian if its linear algebra breaks down."""
    try:
        with np.errstate(over="raise", invalid="raise", divide="raise"):
            return _interior(p, d, z0, lo, hi, tol, max_iter)
    except (np.linalg.LinAlgError, FloatingPointError) as err:
        (a_ub, _), (_, _) = _linear_parts(p, z0, d)
        fallback, name = (_solve_slsqp, "SLSQP") if a_ub is not None else \
            (_solve_augmented, "augmented Lagrangian")
        z, ok, message = fallback(p, d, z0, lo, hi, tol, max_iter)
        return z, ok, f"interior point failed ({err}); {name}: {message}"


def _with_slacks(p, d, z0, lo, hi):
    """The constraints as A (z, s) = b with slacks s >= 0 for the inequality rows.

    Returns the objective and gradient on (z, s), a function giving the Hessian at
    an iterate as (dense matrix or None, Gram factor or None, diagonal), A, b and the
    widened start and bounds.  A constant Hessian is looked at once: kept as its
    diagonal or a low-rank Gram factor when it is one, else formed densely.
    """
    (a_ub, b_ub), (a_eq, b_eq) = _linear_parts(p, z0, d)
    size, extra = len(z0), 0 if a_ub is None else a_ub.shape[0]
    rows = [] if a_eq is None else [np.hstack([a_eq, np.zeros((a_eq.shape[0], extra))])]
    if extra:
        rows.append(np.hstack([a_ub, np.eye(extra)]))
    a = np.vstack(rows) if rows else None
    b = None if a is None else np.concatenate([v for v in (b_eq, b_ub) if v is not None])

    hessian = _hessian_function(p, d, z0, extra, lo, hi)
    def objective(z):
        return p.objective(z[:size], d)

    def gradient(z):
        return np.concatenate([p.gradient(z[:size], d), np.zeros(extra)])

    start = z0
    if extra:
        room = b_ub - a_ub @ z0
        start = np.concatenate([z0, np.where(room > 1e-8, room, 1.0)])
    return (objective, gradient, hessian, a, b, start,
            np.concatenate([lo, np.zeros(extra)]), np.concatenate([hi, np.full(extra, np.inf)]))


def _hessian_function(p, d, z0, extra, lo, hi):
    """z -> (dense matrix or None, Gram factor or None, diagonal) on (z, slacks): the
    diagonal printed for a structurally diagonal Hessian; a constant Hessian looked at
    once (diagonal, low-rank Gram, else dense); otherwise the dense Hessian at z."""
    size = len(z0)

    def widened(h):
        return h if not extra else scipy.linalg.block_diag(h, np.zeros((extra, extra)))

    if p.hessian_diagonal is not None and p.hessian_diagonal(z0, d) is not None:
        def diagonal(z):
            values = np.concatenate([p.hessian_diagonal(z[:size], d), np.zeros(extra)])
            return None, np.zeros((size + extra, 0)), values

        return diagonal
    if p.constant_hessian:
        fixed = _structured_hessian(p, d, size, extra, lo, hi)
        fixed = fixed if fixed is not None else (widened(p.hessian(z0, d)), None, 0.0)
        return lambda z: fixed
    return lambda z: (widened(p.hessian(z[:size], d)), None, 0.0)


def _structured_hessian(p, d, size, extra, lo, hi):
    """(None, F, h) with H = F F' + diag(h) on (z, slacks), without forming H, when the
    constant Hessian is diagonal (F has no columns) or a low-rank Gram matrix."""
    diagonal = _diagonal_hessian(p, d, size)
    if diagonal is not None:
        return None, np.zeros((size + extra, 0)), np.concatenate([diagonal, np.zeros(extra)])
    factor = _gram_factor(p, d, size) if np.all(np.isfinite(lo) | np.isfinite(hi)) else None
    if factor is None:
        return None
    return None, np.vstack([factor, np.zeros((extra, factor.shape[1]))]), 0.0


def _interior(p, d, z0, lo, hi, tol, max_iter):
    """Mehrotra's predictor-corrector for min f(z) s.t. A z (<= or =) b, lo <= z <= hi.

    f is convex and smooth (the negated dual function); a step is shortened until
    f is finite (the dual's implicit domain).  Without a merit function convergence
    is not guaranteed for a nonquadratic f; the report's flag and gap say whether
    it happened.
    """
    objective, gradient, hessian, a, b, z, lo, hi = _with_slacks(p, d, z0, lo, hi)
    low, up = np.isfinite(lo), np.isfinite(hi)
    wl, wu, y = low.astype(float), up.astype(float), np.zeros(0 if a is None else len(b))
    count = max(int(low.sum() + up.sum()), 1)
    scale = 1.0 + np.abs(gradient(z)).max(initial=0.0)
    target = 1.0 + np.abs(b).max(initial=0.0) if b is not None else 1.0
    for _ in range(min(max_iter, 200)):
        it = _Iterate(z, lo, hi, wl, wu)
        dual_res = gradient(z) - wl + wu - (a.T @ y if a is not None else 0.0)
        primal_res = a @ z - b if a is not None else np.zeros(0)
        mu = it.gap() / count
        value = objective(z)
        if max(np.abs(dual_res).max(initial=0.0) / scale,
               np.abs(primal_res).max(initial=0.0) / target) <= tol and \
                np.isfinite(value) and mu * count <= tol * (1.0 + abs(value)):
            equalities = 0 if a is None else len(b) - (len(z) - len(z0))  # then the slacks
            _keep_multipliers(p, z[:len(z0)], d, y[equalities:], y[:equalities],
                              (wl[:len(z0)], wu[:len(z0)]))
            return z[:len(z0)], True, "interior point: residuals and complementarity below " \
                "the tolerance"
        if not (np.all(it.sl > 0) and np.all(it.su > 0) and np.all(np.isfinite(dual_res))):
            return z[:len(z0)], False, "interior point: lost interiority to rounding"
        dense, factor, diagonal = hessian(z)
        weights = np.where(low, wl / it.sl, 0.0) + np.where(up, wu / it.su, 0.0) + diagonal
        solve = _kkt_solver(dense, factor, weights, a)
        dz, dy, dwl, dwu = _mehrotra(it, solve, dual_res, primal_res, mu, count)
        step = _damped(objective, z, dz, 0.995 * it.longest(dz, dwl, dwu))
        if step == 0.0:
            return z[:len(z0)], False, "interior point: no step keeps the objective finite"
        z, wl, wu = z + step * dz, wl + step * dwl, wu + step * dwu
        y = y if dy is None else y + step * dy
    return z[:len(z0)], False, "interior point: iteration limit reached"


def _mehrotra(it, solve, dual_res, primal_res, mu, count):
    """The predictor step, then the corrector toward sigma mu with sigma = (mu_aff/mu)^3."""
    dz, _, dwl, dwu = it.direction(solve, dual_res, primal_res, 0.0, 0.0)
    predicted = it.gap_after(it.longest(dz, dwl, dwu), dz, dwl, dwu) / count
    sigma = (max(predicted, 0.0) / mu) ** 3 if mu > 0 else 0.0
    return it.direction(solve, dual_res, primal_res,
                        sigma * mu - np.where(it.low, dz, 0.0) * dwl,
                        sigma * mu + np.where(it.up, dz, 0.0) * dwu)


def _damped(objective, z, dz, step):
    """The step length, halved until f is finite at the new point (the dual's domain)."""
    for _ in range(60):
        with np.errstate(all="ignore"):
            if np.isfinite(objective(z + step * dz)):
                return step
        step *= 0.5
    return 0.0
