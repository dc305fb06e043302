"""The generated module's recovery of the primal solution from the multipliers found.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.
"""

import numpy as np
import scipy.optimize
import scipy.sparse

from dualize.solvergen.runtime import CERTIFY
from dualize.solvergen.runtime_methods import _in_our_words, _start, _walled

# ---- copied into the generated module from here ----


def _fill_unrecovered(p, x, z, d, dual_value):
    """The unrecovered variables: first those whose stationarity row of the dual the conic
    method priced, then the rest from the dual's multipliers, else from the primal's LP,
    else from minimizing the Lagrangian.

    Returns (None, how each was found) or (the reasons none applied, None).
    """
    how = _fill_by_stationarity(p, x, d)
    if all(name in how for name in p.unrecovered):
        return None, how
    failure, found = _fill_rest(p, x, z, d, dual_value)
    if failure:
        return failure, None
    how.update({name: found for name in p.unrecovered if name not in how})
    return None, how


def _fill_by_stationarity(p, x, d):
    """x = factor * the multiplier of its stationarity row (see ``Spec.stationary``); the
    report then certifies x by the duality gap and the violation like any other."""
    rows = d.get("_row_multipliers") or []
    how = {}
    for name, index, factor in p.stationary:
        if index < len(rows) and rows[index].size and np.all(np.isfinite(rows[index])):
            _place(p, x, [(name, rows[index].size)], [factor * rows[index]], d)
            how[name] = "the conic method's multiplier of its stationarity row of the dual " \
                "(KKT: the dual of the dual is the primal)"
    return how


def _fill_rest(p, x, z, d, dual_value):
    if _fill_by_multipliers(p, x, d, dual_value):
        return None, "the multipliers of the dual's own constraints (KKT: the dual of the " \
            "dual is the primal), certified by the duality gap and the constraint violation"
    failure = _fill_by_linear_program(p, x, d)
    if failure is None:
        return None, "the primal as a linear program in the unrecovered variables (HiGHS)"
    if not p.by_lagrangian:
        return failure, None
    more = _fill_by_lagrangian(p, x, z, d, dual_value)
    if more is None:
        return None, "a numeric minimization of the Lagrangian at the optimal multipliers " \
            "(L-BFGS-B), certified by the duality gap and the constraint violation"
    return f"{failure}; {more}", None


def _candidates(rows, size, pairs=True):
    """Vectors that may be a primal variable of ``size`` entries: each block of the dual's
    multipliers of that size and the difference of two (the two sides of a norm ball,
    whose multipliers give a variable's positive and negative parts), with either sign;
    a matrix variable (``size`` None) from the multiplier of a semidefinite constraint."""
    fits = (lambda r: r.ndim == 2) if size is None else (lambda r: r.size == size)
    same = [r for r in rows if fits(r) and np.all(np.isfinite(r))]
    found = [r for r in same]
    if pairs:
        found += [same[i] - same[j] for i in range(len(same)) for j in range(i + 1, len(same))]
    return [sign * r for r in found for sign in (1.0, -1.0)]


def _fill_by_multipliers(p, x, d, dual_value):
    """Whether the unrecovered variables were found among the dual's multipliers.

    The multipliers of the constraint a variable entering the Lagrangian linearly
    imposes on the dual are that variable, up to the sign convention of the method;
    which block and sign is not recorded, so the few candidates are tried and one is
    kept only when the duality gap and the violation certify it.
    """
    rows = d.get("_row_multipliers")
    if not rows or dual_value is None:
        return False
    spec = p.unknowns(d) or [(name, None, -np.inf, np.inf) for name in p.unrecovered
                             if name not in x]
    for pairs in (False, True):  # single blocks first: fewer combinations to try
        choices = [_candidates(rows, size, pairs) for _, size, _, _ in spec]
        if not spec or not all(choices) or np.prod([len(c) for c in choices]) > 4096:
            continue
        for pick in np.ndindex(*[len(c) for c in choices]):
            trial = dict(x)
            for (name, size, low, high), options, k in zip(spec, choices, pick, strict=True):
                _place(p, trial, [(name, size)], [np.clip(options[k], low, high)], d)
            if not _uncertified(p, trial, d, dual_value):
                x.update(trial)
                return True
    return False


def _fill_by_linear_program(p, x, d):
    """Solve the primal over the unrecovered variables, the others held (an LP), when it is one.

    ``p.restricted`` gives the linear program, epigraph variables included; only the
    primal variables of its solution are kept.
    """
    pieces = p.restricted(x, d)
    if isinstance(pieces, str):
        return pieces
    c, rows, variables = pieces
    ub = [(j, -v) for relation, v, j in rows if relation == "<="]
    eq = [(j, -v) for relation, v, j in rows if relation == "="]
    bounds = [(lo, hi) for _, size, lo, hi in variables for _ in range(size)]
    res = scipy.optimize.linprog(
        c, A_ub=scipy.sparse.vstack([j for j, _ in ub], format="csr") if ub else None,
        b_ub=np.concatenate([b for _, b in ub]) if ub else None,
        A_eq=scipy.sparse.vstack([j for j, _ in eq], format="csr") if eq else None,
        b_eq=np.concatenate([b for _, b in eq]) if eq else None,
        bounds=bounds, method="highs",
    )
    if res.status != 0:
        return "the linear program over the unrecovered variables has no solution (HiGHS " \
            f"status {res.status})"
    values = np.split(res.x, np.cumsum([size for _, size, _, _ in variables])[:-1])
    _place(p, x, [(name, size) for name, size, _, _ in variables], values, d)
    return None


def _place(p, x, sizes, values, d):
    """Put the primal variables among ``values`` into x (epigraph variables are dropped),
    a matrix variable's entries (row by row) back in its shape."""
    shapes = p.primal_shapes(d) if p.primal_shapes is not None else {}
    for (name, size), value in zip(sizes, values, strict=True):
        if name in p.primal_names:
            scalar = size == 1 and p.primal_scalar[p.primal_names.index(name)]
            shaped = np.reshape(value, shapes[name]) if name in shapes else value
            x[name] = float(value[0]) if scalar else shaped


def _fill_by_lagrangian(p, x, z, d, dual_value):
    """Minimize L(x, multipliers in z) over the unrecovered variables; keep x if certified.

    At optimal multipliers every primal optimum minimizes the Lagrangian, and a unique
    minimizer is the primal optimum; uniqueness is not known here, so the duality gap
    and the constraint violation at the minimizer decide.
    """
    if dual_value is None:
        return "the dual solve did not converge, so no gap can certify a minimizer of the " \
            "Lagrangian"
    spec = p.unknowns(d)
    sizes = [(name, size) for name, size, _, _ in spec]
    lo = np.concatenate([np.full(size, low, dtype=float) for _, size, low, _ in spec])
    hi = np.concatenate([np.full(size, high, dtype=float) for _, size, _, high in spec])

    def placed(u):
        trial = dict(x)
        _place(p, trial, sizes, np.split(u, np.cumsum([size for _, size in sizes])[:-1]), d)
        return trial

    def fun(u):
        with np.errstate(all="ignore"):
            return p.lagrangian(placed(u), z, d)

    start = _lagrangian_start(p, fun, x, d, lo, hi)
    if isinstance(start, str):
        return start
    res = scipy.optimize.minimize(
        _walled(fun, start), start, jac=True, method="L-BFGS-B",
        bounds=scipy.optimize.Bounds(lo, hi),
        options={"maxiter": 20000, "ftol": 1e-15, "gtol": 1e-11, "maxcor": 30},
    )
    candidate = placed(res.x)
    doubt = _uncertified(p, candidate, d, dual_value)
    if doubt:
        return f"a numeric minimization of the Lagrangian ({_in_our_words('L-BFGS-B', res)}) " \
            f"gave an x {doubt}; the Lagrangian may have many minimizers, not all of them " \
            "primal optimal"
    x.update(candidate)
    return None


def _finite(fun, u):
    value, grad = fun(u)
    return bool(np.isfinite(value) and np.all(np.isfinite(grad)))


def _lagrangian_start(p, fun, x, d, lo, hi):
    """A start where L and its gradient are finite: 0 or the middle of the bounds, else the
    point of a linear program that keeps every argument of L's logarithms, roots and real
    powers at least s > 0 (s at most 1, the largest such s); or the reason there is none."""
    start = _start(lo, hi)
    if _finite(fun, start):
        return start
    rows = p.lagrangian_domain(x, d)
    if isinstance(rows, str) or not rows:
        why = rows if isinstance(rows, str) else "nothing tells where it is finite"
        return f"the Lagrangian is not finite at the start point and {why}"
    jac = np.vstack([j for _, j in rows])
    value = np.concatenate([v for v, _ in rows])
    size = len(start)
    res = scipy.optimize.linprog(
        np.concatenate([np.zeros(size), [-1.0]]),
        A_ub=np.hstack([-jac, np.ones((len(value), 1))]), b_ub=value,
        bounds=[*zip(lo, hi, strict=True), (-np.inf, 1.0)], method="highs",
    )
    if res.status != 0 or res.x[-1] <= 0:
        return "no point keeps every argument of the Lagrangian's logarithms, roots and real " \
            "powers positive, so the Lagrangian is finite nowhere"
    if not _finite(fun, res.x[:size]):
        return "the Lagrangian is not finite at the interior point found for it"
    return res.x[:size]


def _uncertified(p, candidate, d, dual_value):
    """Why ``candidate`` is not certified primal optimal (empty when it is)."""
    with np.errstate(all="ignore"):
        value, parts = p.primal(candidate, d)
    violation = _violation(parts)
    gap = value - dual_value if p.primal_sense == "minimize" else dual_value - value
    if not (np.isfinite(value) and np.isfinite(violation)):
        return "where the primal is not finite"
    if violation > CERTIFY or abs(gap) > CERTIFY * (1.0 + abs(dual_value)):
        return f"with duality gap {gap:.3g} and constraint violation {violation:.3g}, too large " \
            "to certify it"
    return ""


def _violation(parts):
    worst = 0.0
    for kind, value in parts:
        value = np.asarray(value, dtype=float)
        if kind == "ineq":
            worst = max(worst, float(np.max(value, initial=0.0)))
        elif kind == "eq":
            worst = max(worst, float(np.max(np.abs(value), initial=0.0)))
        else:
            worst = max(worst, float(np.linalg.eigvalsh(value).max()))
    return worst


def _listed(value):
    return np.asarray(value, dtype=float).tolist()


def _primal_report(p, z, d, dual_value):
    """x, the primal value and violation at it, the reasons for what is missing, and how
    each variable was found; ``dual_value`` is None when the dual solve did not converge."""
    with np.errstate(all="ignore"):
        x = p.recover(z, d)  # not finite off the dual's domain: reported below
    how = {name: "its recovery formula at the optimal multipliers" for name in x}
    reasons = {}
    if p.unrecovered:
        failure, found = _fill_unrecovered(p, x, z, d, dual_value)
        if failure:
            reasons = {name: f"{note}; {failure}" for name, note in p.unrecovered.items()
                       if name not in x}
        else:
            how.update(found)
    for name in p.primal_names:
        if name in x and not np.all(np.isfinite(x[name])):
            reasons[name] = "its recovery formula is not finite at these multipliers (a " \
                "multiplier sits where the Lagrangian's minimizer runs off to infinity): " \
                "the primal optimum may not be attained"
            del x[name]
            how.pop(name, None)
    if reasons:
        return {name: (_listed(x[name]) if name in x else None) for name in p.primal_names}, \
            None, None, reasons, how
    value, parts = p.primal(x, d)
    return {name: _listed(x[name]) for name in p.primal_names}, value, _violation(parts), {}, how
