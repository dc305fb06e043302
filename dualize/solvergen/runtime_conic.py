"""The generated module's conic method, for a dual with a semidefinite constraint.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.  Clarabel is imported when
the method runs, so a module whose dual needs no cone never asks for it.
"""

import numpy as np
import scipy.sparse

from dualize.solvergen.runtime import NoFiniteDual
from dualize.solvergen.runtime_methods import _by_block, _linear_parts

# ---- copied into the generated module from here ----


class NeedsConicSolver(Exception):
    """The dual needs the conic solver and it is not installed: exit status 2."""


def _svec(matrix):
    """The upper triangle column by column, off-diagonal entries times sqrt(2): the
    vectorization under which Clarabel's semidefinite cone keeps inner products."""
    cols, rows = np.tril_indices(matrix.shape[0])
    sym = 0.5 * (matrix + matrix.T)
    return np.where(rows == cols, 1.0, np.sqrt(2.0)) * sym[rows, cols]


def _unsvec(vector, k):
    cols, rows = np.tril_indices(k)
    matrix = np.zeros((k, k))
    matrix[rows, cols] = np.where(rows == cols, 1.0, 1.0 / np.sqrt(2.0)) * vector
    return matrix + np.triu(matrix, 1).T


def _affine_cones(p, d, size):
    """For each semidefinite constraint M(z) >= 0: (svec M(0), columns svec(M(e_i) - M(0)))
    and the check that M is affine at a random point."""
    zero = np.zeros(size)
    out = []
    for index, base in enumerate(p.cones(zero, d)):
        columns = [_svec(p.cones(np.eye(1, size, i)[0], d)[index] - base) for i in range(size)]
        jac = np.column_stack(columns) if columns else np.zeros((len(_svec(base)), 0))
        probe = np.random.default_rng(index).standard_normal(size)
        expected = _svec(base) + jac @ probe
        if np.abs(_svec(p.cones(probe, d)[index]) - expected).max(initial=0.0) > \
                1e-8 * (1.0 + np.abs(expected).max(initial=0.0)):
            raise ValueError("a semidefinite constraint is not affine in the multipliers")
        out.append((_svec(base), jac, base.shape[0]))
    return out


def _affine_balls(p, d, size):
    """For each 2-norm ball ||a(z)|| <= r(z): (the cone vector (r, a) at 0, its columns in z),
    read off at unit vectors and checked affine at a random point, as for the semidefinite
    constraints."""
    def stacked(z):
        return [np.concatenate([r, a]) for r, a in p.balls(z, d)]

    base = stacked(np.zeros(size))
    units = [stacked(np.eye(1, size, i)[0]) for i in range(size)]
    out = []
    for index, origin in enumerate(base):
        columns = [unit[index] - origin for unit in units]
        jac = np.column_stack(columns) if columns else np.zeros((len(origin), 0))
        probe = np.random.default_rng(100 + index).standard_normal(size)
        expected = origin + jac @ probe
        if np.abs(stacked(probe)[index] - expected).max(initial=0.0) > \
                1e-8 * (1.0 + np.abs(expected).max(initial=0.0)):
            raise ValueError("a 2-norm ball of the dual is not affine in the multipliers")
        out.append((origin, jac))
    return out


def _linear_objective(p, d, size):
    """q with f(z) = f(0) + q'z, read off at unit vectors and checked at a random point."""
    origin = p.objective(np.zeros(size), d)
    q = np.array([p.objective(np.eye(1, size, i)[0], d) - origin for i in range(size)])
    probe = np.random.default_rng(7).standard_normal(size)
    if abs(p.objective(probe, d) - origin - q @ probe) > 1e-8 * (1.0 + abs(origin) +
                                                                 np.abs(q).sum()):
        raise ValueError("the dual objective over the matrix multiplier is not linear")
    return q


def _symmetry_rows(p, d, size):
    """Rows V[i, j] - V[j, i] = 0 for each square multiplier V stacked in z."""
    rows, start = [], 0
    for length, kind in zip(p.sizes(d), p.scalars, strict=False):
        if kind == "square":
            k = int(round(np.sqrt(length)))
            for i in range(k):
                for j in range(i + 1, k):
                    row = np.zeros(size)
                    row[start + i * k + j], row[start + j * k + i] = 1.0, -1.0
                    rows.append(row)
        start += length
    return np.array(rows).reshape(len(rows), size)


def _conic_rows(p, d, size, lo, hi):
    """Clarabel's A z + s = b, s in K: equalities, then inequalities and bounds, then cones."""
    import clarabel

    (a_ub, b_ub), (a_eq, b_eq) = _linear_parts(p, np.zeros(size), d)
    eye = np.eye(size)
    low, up = np.flatnonzero(np.isfinite(lo)), np.flatnonzero(np.isfinite(hi))
    ineq = [m for m in (a_ub, -eye[low], eye[up]) if m is not None and len(m)]
    right = [v for v in (b_ub, -lo[low], hi[up]) if v is not None and len(v)]
    symmetric = _symmetry_rows(p, d, size)
    if len(symmetric):
        a_eq = symmetric if a_eq is None else np.vstack([a_eq, symmetric])
        b_eq = np.zeros(len(symmetric)) if b_eq is None else \
            np.concatenate([b_eq, np.zeros(len(symmetric))])
    rows, rhs, cones = [], [], []
    if a_eq is not None:
        rows, rhs, cones = [a_eq], [b_eq], [clarabel.ZeroConeT(len(b_eq))]
    if ineq:
        rows.append(np.vstack(ineq))
        rhs.append(np.concatenate(right))
        cones.append(clarabel.NonnegativeConeT(len(rhs[-1])))
    for base, jac in (_affine_balls(p, d, size) if p.balls is not None else []):
        rows.append(-jac)
        rhs.append(base)
        cones.append(clarabel.SecondOrderConeT(len(base)))
    psd = _affine_cones(p, d, size)
    for base, jac, k in psd:
        rows.append(-jac)
        rhs.append(base)
        cones.append(clarabel.PSDTriangleConeT(k))
    matrix = scipy.sparse.csc_matrix(np.vstack(rows)) if rows else \
        scipy.sparse.csc_matrix((0, size))
    counts = (0 if a_eq is None else len(b_eq), 0 if a_ub is None else len(b_ub))
    return matrix, np.concatenate(rhs) if rhs else np.zeros(0), cones, counts, psd


_CONIC_WORDS = {
    "Solved": "the conic interior-point method met its tolerances",
    "AlmostSolved": "the conic interior-point method stopped near, not at, its tolerances",
    "MaxIterations": "the conic interior-point method hit its iteration limit",
    "MaxTime": "the conic interior-point method hit its time limit",
}


def _solve_conic(p, d, z0, lo, hi, tol, max_iter):
    """Clarabel on min 1/2 z'P z + q'z over the dual's bounds, linear rows and cones."""
    try:
        import clarabel
    except ImportError:
        raise NeedsConicSolver("this dual has a semidefinite constraint; the module solves "
                               "it with clarabel, which is not installed (pip install "
                               "clarabel)") from None
    size = len(z0)
    q = p.gradient(np.zeros(size), d)
    q = _linear_objective(p, d, size) if q is None else q
    hessian = p.hessian(np.zeros(size), d)
    P = scipy.sparse.csc_matrix(np.triu(hessian) if hessian is not None else (size, size))
    A, b, cones, (equalities, inequalities), psd = _conic_rows(p, d, size, lo, hi)
    settings = clarabel.DefaultSettings()
    settings.verbose = False
    settings.max_iter = min(max_iter, 500)
    settings.tol_gap_abs = settings.tol_gap_rel = settings.tol_feas = max(tol, 1e-12)
    solution = clarabel.DefaultSolver(P, q, A, b, cones, settings).solve()
    word = str(solution.status).split(".")[-1]
    if word in ("PrimalInfeasible", "AlmostPrimalInfeasible"):
        raise NoFiniteDual("infeasible", "the conic method found a certificate that no "
                           "multipliers meet the dual's constraints")
    if word in ("DualInfeasible", "AlmostDualInfeasible"):
        raise NoFiniteDual("unbounded", "the conic method found a ray along which the dual "
                           "objective grows without bound")
    z, y = np.asarray(solution.x, dtype=float), np.asarray(solution.z, dtype=float)
    blocks = _by_block(p, z, d, y[equalities:equalities + inequalities], y[:equalities])
    balls = [1 + np.size(a) for _, a in p.balls(z, d)] if p.balls is not None else []
    start = len(b) - sum(len(base) for base, _, _ in psd) - sum(balls)
    for k in balls:  # the part of a ball's multiplier paired with its argument
        blocks.append(y[start + 1:start + k])
        start += k
    for base, _, k in psd:
        blocks.append(_unsvec(y[start:start + len(base)], k))
        start += len(base)
    d["_row_multipliers"] = blocks
    message = _CONIC_WORDS.get(word, "the conic interior-point method stopped early "
                               "(numerical difficulty or no progress)")
    return z, word == "Solved", message
