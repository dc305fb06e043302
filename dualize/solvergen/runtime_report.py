"""The generated module's driver: read the instance, run the chosen method, report.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.
"""

import json
import sys

import numpy as np

from dualize.solvergen.runtime import (
    GAP_TOL,
    VIOLATION_TOL,
    InputError,
    NoFiniteDual,
    _blas_threads,
    _read,
    _split,
    load_instance,
)
from dualize.solvergen.runtime_conic import NeedsConicSolver, _solve_conic
from dualize.solvergen.runtime_interior import _solve_interior
from dualize.solvergen.runtime_lp import _solve_lp
from dualize.solvergen.runtime_methods import (
    _domain_start,
    _finite_at,
    _solve_augmented,
    _solve_lbfgsb,
    _solve_lbfgsb_c1,
    _solve_slsqp,
    _start,
)
from dualize.solvergen.runtime_recover import _listed, _primal_report

# ---- copied into the generated module from here ----

SOLVERS = {
    "linprog": _solve_lp,
    "lbfgsb": _solve_lbfgsb,
    "lbfgsb_c1": _solve_lbfgsb_c1,
    "interior": _solve_interior,
    "augmented": _solve_augmented,
    "slsqp": _solve_slsqp,
    "conic": _solve_conic,
}


def _dual_point(p, d, lo, hi, tol, max_iter):
    """(start, z, converged, message) from the method in ``p.method``, started inside the
    dual's domain."""
    if lo.size == 0:
        return lo, lo, True, "the dual has no variables: its value is a constant"
    if p.method == "conic":  # an interior-point method with its own start
        return lo * 0.0, *SOLVERS["conic"](p, d, np.zeros(lo.size), lo, hi, tol, max_iter)
    start = _domain_start(p, _start(lo, hi), lo, hi, d)
    if not _finite_at(p, start, d):
        return start, start, False, "no start was found where the dual objective is " \
            "finite: its domain may have no interior point (then the primal optimum may " \
            "not be attained)"
    return (start, *SOLVERS[p.method](p, d, start, lo, hi, tol, max_iter))


def run(p, data, tol=1e-9, max_iter=20000):
    """Solve the dual of ``p`` on ``data`` (a dict of name -> number or nested list).

    The report's ``status`` is "certified" only when the recovered primal point meets
    every constraint within VIOLATION_TOL, the multipliers meet the dual's within the
    same, and primal and dual values agree within GAP_TOL (1 + |p| + |d|).
    """
    d = _read(p, data)
    with np.errstate(all="ignore"), _blas_threads():
        d.update(p.prepare(d))
        lo, hi = p.bounds(d)
        try:
            start, z, converged, message = _dual_point(p, d, lo, hi, tol, max_iter)
        except NoFiniteDual as err:
            return _without_optimum(p, err.kind, str(err))
        except (FloatingPointError, OverflowError, np.linalg.LinAlgError, ValueError) as err:
            return _without_optimum(p, "unreliable", f"the method broke down: {err}")
        report = _report(p, d, z, (lo, hi), bool(converged), str(message))
        if report["status"] != "certified" and p.method != "conic" and \
                _diverges(p, d, start, z, lo, hi):
            return _without_optimum(p, "unbounded", "the dual objective grows without bound "
                                    f"along a ray of feasible multipliers ({message})")
        return report


def _report(p, d, z, box, converged, message):
    value = p.objective(z, d)
    dual_value = float(-value if p.dual_sense == "maximize" else value)
    primal, primal_value, violation, reasons, how = _primal_report(
        p, z, d, dual_value if converged and np.isfinite(dual_value) else None)
    multipliers = _split(z, p.sizes(d), p.scalars)[:len(p.dual_names)]
    gap = None
    if primal_value is not None:
        gap = primal_value - dual_value if p.primal_sense == "minimize" \
            else dual_value - primal_value
    dual_violation = _dual_violation(p, d, z, *box)
    status, why = _status(converged, dual_value, primal_value, gap, violation, dual_violation)
    return {
        "status": status, "method": p.method, "converged": converged,
        "message": f"{why}; the method: {message}" if why else message,
        "dual_value": dual_value, "primal_value": primal_value, "gap": gap,
        "max_violation": violation, "dual_violation": dual_violation,
        "tolerances": {"gap": GAP_TOL, "violation": VIOLATION_TOL},
        "multipliers": {n: _listed(q) for n, q in zip(p.dual_names, multipliers, strict=True)},
        "primal": primal, "unrecovered": reasons, "recovered_by": how, "caution": p.caution,
    }


def _status(converged, dual_value, primal_value, gap, violation, dual_violation):
    """Our status word and, unless certified, why (weak duality checked: d <= p)."""
    if not np.isfinite(dual_value) or not np.isfinite(dual_violation):
        return "unreliable", "the dual value is not finite (overflow or NaN)"
    if primal_value is None:
        word = "dual-only" if converged and dual_violation <= VIOLATION_TOL \
            else "stopped-with-gap"
        return word, "no primal point to certify the dual value against"
    if not (np.isfinite(primal_value) and np.isfinite(violation)):
        return "unreliable", "the primal value or violation is not finite (overflow or NaN)"
    slack = GAP_TOL * (1.0 + abs(primal_value) + abs(dual_value))
    if gap < -slack and violation <= VIOLATION_TOL and dual_violation <= VIOLATION_TOL:
        return "unreliable", f"weak duality fails (gap {gap:.3g} < 0): the numbers cannot " \
            "both be right"
    if violation > VIOLATION_TOL or dual_violation > VIOLATION_TOL or abs(gap) > slack:
        return "stopped-with-gap", f"not certified: gap {gap:.3g}, primal violation " \
            f"{violation:.3g}, dual violation {dual_violation:.3g}"
    return "certified", ""


def _dual_violation(p, d, z, lo, hi):
    """The largest violation of the dual's bounds and general constraints at z."""
    worst = float(np.max(np.concatenate([lo - z, z - hi, [0.0]])))
    for relation, value, _ in p.constraints(z, d):
        worst = max(worst, float(np.max(np.abs(value) if relation == "=" else value,
                                        initial=0.0)))
    for matrix in p.cones(z, d) if p.cones is not None else ():
        worst = max(worst, -float(np.linalg.eigvalsh(0.5 * (matrix + matrix.T)).min()))
    return worst if np.isfinite(worst) else float("inf")


def _diverges(p, d, start, z, lo, hi):
    """Whether the dual objective keeps falling along the ray from ``start`` through z.

    The ray must be a recession direction of the bounds and linear constraints, and the
    (minimized, convex) objective must drop at a rate that does not shrink over three
    decades of distance: numerical evidence that the dual is unbounded.
    """
    ray = np.asarray(z, dtype=float) - start
    length = float(np.linalg.norm(ray))
    if not np.isfinite(length) or length <= 1e6 * (1.0 + float(np.linalg.norm(start))):
        return False
    ray /= length
    if np.any(ray[np.isfinite(lo)] < -1e-8) or np.any(ray[np.isfinite(hi)] > 1e-8):
        return False
    for relation, _, jac in p.constraints(z, d):
        move = jac @ ray
        if np.max(np.abs(move) if relation == "=" else move, initial=0.0) > 1e-8:
            return False
    values = [p.objective(z + t * length * ray, d) for t in (0.0, 1.0, 10.0, 100.0)]
    if not np.all(np.isfinite(values)):
        return False
    rates = [(values[i] - values[i + 1]) / (t * length) for i, t in enumerate((1.0, 9.0, 90.0))]
    return rates[0] > 0 and min(rates) >= 0.5 * rates[0]


def _without_optimum(p, kind, message):
    """The report when the dual has no finite optimum, or the numbers broke down."""
    up = float("inf")
    dual_value = primal_value = None
    if kind == "unbounded":  # d* = +inf for a maximized dual: by weak duality, no primal point
        dual_value = up if p.dual_sense == "maximize" else -up
        primal_value = up if p.primal_sense == "minimize" else -up
    elif kind == "infeasible":  # sup of the empty set
        dual_value = -up if p.dual_sense == "maximize" else up
    status = {"unbounded": "infeasible", "infeasible": "dual-infeasible"}.get(kind, kind)
    meaning = {
        "infeasible": "the primal has no feasible point (the dual is unbounded)",
        "dual-infeasible": "the dual has no feasible point: the primal is unbounded, or "
                           "infeasible, or has a value no dual bound certifies",
        "unreliable": "no value can be trusted",
    }[status]
    return {
        "status": status, "method": p.method, "converged": False,
        "message": f"{meaning}; {message}", "dual_value": dual_value,
        "primal_value": primal_value, "gap": None, "max_violation": None,
        "dual_violation": None, "tolerances": {"gap": GAP_TOL, "violation": VIOLATION_TOL},
        "multipliers": {name: None for name in p.dual_names},
        "primal": {name: None for name in p.primal_names}, "unrecovered": {},
        "recovered_by": {}, "caution": p.caution,
    }


def _json_ready(value):
    """The report as strict JSON: NaN becomes null, an infinity the string "inf" or "-inf"."""
    if isinstance(value, dict):
        return {key: _json_ready(item) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [_json_ready(item) for item in value]
    if isinstance(value, float) and not np.isfinite(value):
        return None if np.isnan(value) else ("inf" if value > 0 else "-inf")
    return value


def command(p, argv):
    """The command line: ``python module.py instance.json`` prints the JSON report.

    Exit 0 only for a certified report; 1 for any other status; 2 for bad input.
    """
    if len(argv) != 1:
        print("usage: python solver.py instance.json", file=sys.stderr)
        return 2
    try:
        with open(argv[0], "rb") as handle:
            raw = handle.read()
    except OSError as err:
        print(f"error: cannot read {argv[0]}: {err.strerror}", file=sys.stderr)
        return 2
    try:
        data = load_instance(raw)
        del raw  # the parsed instance is all that is needed from here on
        report = run(p, data)
    except (InputError, NeedsConicSolver) as err:
        print(f"error: {argv[0]}: {err}", file=sys.stderr)
        return 2
    print(json.dumps(_json_ready(report), indent=2, sort_keys=True, allow_nan=False))
    return 0 if report["status"] == "certified" else 1
