"""The generated module's methods for a dual without a printable Hessian, and its starts.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.  ``p`` is the module's ``Spec``
(the printed functions and tables), ``d`` the instance's data after ``p.prepare``.
"""

import numpy as np
import scipy.optimize
import scipy.sparse

from dualize.solvergen.runtime import NoFiniteDual

# ---- copied into the generated module from here ----


_SCIPY_WORDS = {
    "L-BFGS-B": {0: "converged: the projected gradient or the relative decrease of the "
                    "objective met its tolerance",
                 1: "stopped at the iteration or evaluation limit",
                 2: "stopped: the line search found no decrease (the objective may be badly "
                    "scaled or not smooth there)"},
    "SLSQP": {0: "converged: the step and the constraint violation met their tolerances",
              4: "stopped: the linearized constraints are incompatible",
              8: "stopped: the line search found no descent direction",
              9: "stopped at the iteration limit"},
    "HiGHS": {0: "solved", 1: "stopped at the iteration limit", 2: "infeasible",
              3: "unbounded", 4: "stopped on numerical difficulties"},
}


def _in_our_words(method, res):
    """What a scipy method's result means, said in the module's own words (the library's
    messages are its own and change between versions); the status number is kept."""
    said = _SCIPY_WORDS[method].get(int(res.status), "stopped early")
    return f"{method} {said} (status {int(res.status)})"


def _start(lo, hi):
    z = np.zeros(lo.shape)
    both = np.isfinite(lo) & np.isfinite(hi)
    z[both] = 0.5 * (lo[both] + hi[both])
    only_lo = np.isfinite(lo) & ~np.isfinite(hi)
    z[only_lo] = lo[only_lo] + 1.0
    only_hi = ~np.isfinite(lo) & np.isfinite(hi)
    z[only_hi] = hi[only_hi] - 1.0
    return z


def _numeric_jacobian(p, index, z, d):
    """The Jacobian of the affine constraint ``index``, read off at unit vectors (for a dual
    over a matrix multiplier, which has no printed Jacobian)."""
    base = np.zeros(len(z))
    origin = np.atleast_1d(p.constraints(base, d)[index][1])
    columns = []
    for i in range(len(z)):
        base[i] = 1.0
        columns.append(np.atleast_1d(p.constraints(base, d)[index][1]) - origin)
        base[i] = 0.0
    return np.column_stack(columns) if columns else np.zeros((len(origin), 0))


def _linear_parts(p, z, d):
    """The general constraints as J z (<= or =) b, exact because they are affine."""
    ub, eq = [], []
    for index, (relation, value, jac) in enumerate(p.constraints(z, d)):
        jac = _numeric_jacobian(p, index, z, d) if jac is None else jac
        target = eq if relation == "=" else ub
        target.append((jac, jac @ z - value))
    stack = [(_vstack([j for j, _ in q]), np.concatenate([b for _, b in q]))
             if q else (None, None) for q in (ub, eq)]
    return stack[0], stack[1]


def _vstack(blocks):
    """Rows stacked, sparse when any block is (a matrix-valued constraint's Jacobian)."""
    if any(scipy.sparse.issparse(b) for b in blocks):
        return scipy.sparse.vstack(blocks, format="csr")
    return np.vstack(blocks)


def _by_block(p, z, d, ub, eq):
    """Row multipliers of the inequality rows ``ub`` and the equality rows ``eq``, cut back
    into one vector per general constraint, in the order of ``p.constraints``."""
    out, i, j = [], 0, 0
    for relation, value, _ in p.constraints(z, d):
        count = np.size(value)
        if relation == "=":
            out.append(np.asarray(eq[j:j + count], dtype=float))
            j += count
        else:
            out.append(np.asarray(ub[i:i + count], dtype=float))
            i += count
    return out


def _keep_multipliers(p, z, d, ub, eq, bounds=()):
    """Store the multipliers a method found, for the recovery of the primal (KKT): one
    vector per general constraint, then one per dual variable and side of its bounds."""
    sizes = p.sizes(d)
    cut = np.cumsum(sizes)[:-1] if sizes else []
    parts = [q for w in bounds for q in np.split(np.asarray(w, dtype=float), cut)]
    d["_row_multipliers"] = _by_block(p, z, d, ub, eq) + parts


def _solve_linprog(p, d, z0, lo, hi, tol, max_iter):
    (a_ub, b_ub), (a_eq, b_eq) = _linear_parts(p, z0, d)
    res = scipy.optimize.linprog(
        p.gradient(z0, d), A_ub=a_ub, b_ub=b_ub, A_eq=a_eq, b_eq=b_eq,
        bounds=list(zip(lo, hi, strict=True)), method="highs",
        options={"maxiter": max_iter, "primal_feasibility_tolerance": max(tol, 1e-10)},
    )
    if res.status == 2:  # HiGHS proved the (negated) dual infeasible or unbounded
        raise NoFiniteDual("infeasible", "HiGHS proved that no multipliers meet the dual's "
                           "constraints")
    if res.status == 3:
        raise NoFiniteDual("unbounded", "HiGHS found the dual objective unbounded")
    z = res.x if res.x is not None else z0
    if res.status == 0:
        _keep_multipliers(p, z, d, res.ineqlin.marginals if a_ub is not None else [],
                          res.eqlin.marginals if a_eq is not None else [],
                          (res.lower.marginals, res.upper.marginals))
    words = {0: "the linear program was solved to HiGHS's tolerances",
             1: "HiGHS hit its iteration limit"}
    return z, res.status == 0, words.get(res.status, "HiGHS ran into numerical difficulty")


def _walled(fun, z0):
    """``fun`` with a steep wall where it is not finite (outside the dual's domain).

    At such a point the value rises linearly with the distance from the last point
    where ``fun`` was finite and the gradient points back there, so a line search
    backs off instead of stopping.
    """
    last = {"z": np.array(z0, dtype=float), "value": None}

    def walled(z):
        with np.errstate(all="ignore"):
            value, grad = fun(z)
        if np.isfinite(value) and np.all(np.isfinite(grad)):
            last["z"], last["value"] = np.array(z, dtype=float), value
            return value, grad
        base = last["value"] if last["value"] is not None else 1e10
        step = z - last["z"]
        distance = np.linalg.norm(step) or 1.0
        steep = 1e3 * (1.0 + abs(base))
        return base + steep * distance, steep * step / distance

    return walled


def _finite_at(p, z, d):
    with np.errstate(all="ignore"):
        return bool(np.isfinite(p.objective(z, d)) and np.all(np.isfinite(p.gradient(z, d))))


def _domain_start(p, z0, lo, hi, d):
    """A start where the dual objective is finite.

    First free entries moved by growing steps; then, when the constraints are
    affine, the most interior point of the bounds and linear constraints (a
    linear program: the largest margin t, at most 1, by which every inequality
    and bound holds), since a logarithm or entropy of the multipliers is finite
    exactly inside such constraints.
    """
    free = ~np.isfinite(lo) & ~np.isfinite(hi)
    for step in (0.0, 1.0, 10.0, 100.0, -1.0, -10.0, -100.0, 1000.0, -1000.0):
        z = np.clip(z0 + step * free, lo, hi)
        if _finite_at(p, z, d):
            return z
    if p.method in ("interior", "augmented", "linprog"):
        inside = _most_interior(p, z0, lo, hi, d)
        if inside is not None and _finite_at(p, inside, d):
            return inside
    return z0


def _most_interior(p, z0, lo, hi, d):
    """argmax t s.t. A_ub z + t <= b_ub, A_eq z = b_eq, lo + t <= z <= hi - t, t <= 1."""
    (a_ub, b_ub), (a_eq, b_eq) = _linear_parts(p, z0, d)
    size = len(z0)
    rows, right = [], []
    if a_ub is not None:
        rows.append(np.hstack([a_ub, np.ones((a_ub.shape[0], 1))]))
        right.append(b_ub)
    for side, sign in ((lo, -1.0), (hi, 1.0)):
        finite = np.flatnonzero(np.isfinite(side))
        block = np.zeros((len(finite), size + 1))
        block[np.arange(len(finite)), finite] = sign
        block[:, size] = 1.0
        rows.append(block)
        right.append(sign * side[finite])
    res = scipy.optimize.linprog(
        np.concatenate([np.zeros(size), [-1.0]]),
        A_ub=np.vstack(rows), b_ub=np.concatenate(right),
        A_eq=None if a_eq is None else np.hstack([a_eq, np.zeros((a_eq.shape[0], 1))]),
        b_eq=b_eq, bounds=[(None, None)] * size + [(None, 1.0)], method="highs",
    )
    if res.status == 2:  # t is free below, so only the constraints themselves can clash
        raise NoFiniteDual("infeasible", "no multipliers meet the dual's bounds and linear "
                           f"constraints ({_in_our_words('HiGHS', res)})")
    if res.status != 0 or res.x[size] <= 0:
        return None
    return res.x[:size]


def _solve_lbfgsb(p, d, z0, lo, hi, tol, max_iter, ftol=None):
    def fun(z):
        return p.objective(z, d), p.gradient(z, d)

    ftol = tol * 1e-3 if ftol is None else ftol
    res = scipy.optimize.minimize(
        _walled(fun, z0), z0, jac=True, method="L-BFGS-B", bounds=scipy.optimize.Bounds(lo, hi),
        options={"maxiter": max_iter, "ftol": ftol, "gtol": tol, "maxcor": 30},
    )
    return res.x, bool(res.success), _in_our_words("L-BFGS-B", res)


def _solve_lbfgsb_c1(p, d, z0, lo, hi, tol, max_iter):
    """L-BFGS-B for a dual that is continuously differentiable but not twice (max and min
    left by strictly convex box blocks): no stop on the relative decrease of the objective,
    which the jumps of its curvature and the flat directions of entries held at a bound end
    early; it stops on the projected gradient or when no step decreases the objective."""
    return _solve_lbfgsb(p, d, z0, lo, hi, tol, max_iter, ftol=0.0)


def _projected_gradient(fun, z, lo, hi, tol, max_iter, memory=10):
    """Nonmonotone spectral projected gradient on a box (Birgin, Martinez and Raydan, 2000).

    Cheap iterations (one gradient, a clip) that stay fast on thousands of bounded
    multipliers; stops when the projected gradient step is below ``tol``.
    """
    z = np.clip(z, lo, hi)
    value, grad = fun(z)
    history, scale = [value], 1.0
    for _ in range(max_iter):
        if np.max(np.abs(np.clip(z - grad, lo, hi) - z), initial=0.0) <= tol:
            return z, True
        direction = np.clip(z - scale * grad, lo, hi) - z
        slope, ceiling, step = grad @ direction, max(history[-memory:]), 1.0
        while True:
            trial = z + step * direction
            new_value, new_grad = fun(trial)
            if np.isfinite(new_value) and new_value <= ceiling + 1e-4 * step * slope:
                break
            step *= 0.5
            if step < 1e-20:
                return z, False
        s, y = trial - z, new_grad - grad
        curvature = s @ y
        scale = min(1e10, max(1e-10, (s @ s) / curvature)) if curvature > 0 else 1e10
        z, value, grad = trial, new_value, new_grad
        history.append(value)
    return z, False


def _solve_augmented(p, d, z0, lo, hi, tol, max_iter):
    """Method of multipliers for J z = b; each inner problem on the bounds by projected gradient."""
    (_, _), (a_eq, b_eq) = _linear_parts(p, z0, d)
    mult, rho, z = np.zeros(len(b_eq)), 10.0, z0
    ok = False
    for _ in range(60):
        def fun(z, mult=mult, rho=rho):
            with np.errstate(all="ignore"):
                r = a_eq @ z - b_eq
                value = p.objective(z, d) + mult @ r + 0.5 * rho * (r @ r)
                return value, p.gradient(z, d) + a_eq.T @ (mult + rho * r)

        z, ok = _projected_gradient(fun, z, lo, hi, tol, max_iter * 10)
        residual = a_eq @ z - b_eq
        mult = mult + rho * residual
        if np.max(np.abs(residual), initial=0.0) <= tol * max(1.0, np.abs(b_eq).max(initial=0.0)):
            _keep_multipliers(p, z, d, [], mult)
            message = "equalities met; inner problems by projected gradient"
            return z, ok, message if ok else "an inner problem hit its iteration limit"
        rho = min(rho * 10.0, 1e10)
    return z, False, "the equality constraints were not met within 60 outer rounds"


def _solve_slsqp(p, d, z0, lo, hi, tol, max_iter):
    count = len(p.constraints(z0, d))

    def picked(i, part):
        return lambda z: -p.constraints(z, d)[i][part] if p.constraints(z, d)[i][0] != "=" \
            else p.constraints(z, d)[i][part]

    constraints = [
        {"type": "eq" if p.constraints(z0, d)[i][0] == "=" else "ineq",
         "fun": picked(i, 1), "jac": picked(i, 2)}
        for i in range(count)
    ]

    def fun(z):
        return p.objective(z, d), p.gradient(z, d)

    res = scipy.optimize.minimize(
        _walled(fun, z0), z0, jac=True, method="SLSQP",
        bounds=scipy.optimize.Bounds(lo, hi), constraints=constraints,
        options={"maxiter": max_iter, "ftol": tol},
    )
    return res.x, bool(res.success), _in_our_words("SLSQP", res)
