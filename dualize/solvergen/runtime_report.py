"""The generated module's driver: read the instance, run the chosen method, report.

Everything below the marker line is copied verbatim into each generated module; the
imports above it serve linting and the unit tests only.
"""

import json
import sys

import numpy as np

from dualize.solvergen.runtime import InputError, _read, _split, load_instance
from dualize.solvergen.runtime_interior import _solve_interior
from dualize.solvergen.runtime_methods import (
    _domain_start,
    _finite_at,
    _solve_augmented,
    _solve_lbfgsb,
    _solve_linprog,
    _solve_slsqp,
    _start,
)
from dualize.solvergen.runtime_recover import _listed, _primal_report

# ---- copied into the generated module from here ----

SOLVERS = {
    "linprog": _solve_linprog,
    "lbfgsb": _solve_lbfgsb,
    "interior": _solve_interior,
    "augmented": _solve_augmented,
    "slsqp": _solve_slsqp,
}


def _dual_point(p, d, lo, hi, tol, max_iter):
    """(z, converged, message) from the method in ``p.method``, started inside the domain."""
    if lo.size == 0:
        return lo, True, "the dual has no variables: its value is a constant"
    start = _domain_start(p, _start(lo, hi), lo, hi, d)
    if not _finite_at(p, start, d):
        return start, False, "no start was found where the dual objective is finite: its " \
            "domain may have no interior point (then the primal optimum may not be attained)"
    return SOLVERS[p.method](p, d, start, lo, hi, tol, max_iter)


class NeedsConicSolver(Exception):
    """The dual has a semidefinite constraint: exit status 2."""


def run(p, data, tol=1e-9, max_iter=20000):
    """Solve the dual of ``p`` on ``data`` (a dict of name -> number or nested list)."""
    if p.method == "conic":
        raise NeedsConicSolver("this dual has a semidefinite constraint: it needs a conic "
                               "(SDP) solver, which this module does not include")
    d = _read(p, data)
    d.update(p.prepare(d))
    lo, hi = p.bounds(d)
    z, converged, message = _dual_point(p, d, lo, hi, tol, max_iter)
    with np.errstate(all="ignore"):
        value = p.objective(z, d)
    if not (np.isfinite(value) and np.all(np.isfinite(z))):
        converged = False
        message = f"the dual objective is not finite at the point reached ({message})"
    dual_value = -value if p.dual_sense == "maximize" else value
    primal, primal_value, violation, reasons, how = _primal_report(
        p, z, d, dual_value if converged else None)
    multipliers = _split(z, p.sizes(d), p.scalars)[:len(p.dual_names)]
    gap = None
    if primal_value is not None:
        gap = primal_value - dual_value if p.primal_sense == "minimize" \
            else dual_value - primal_value
    return {
        "method": p.method,
        "converged": bool(converged),
        "message": str(message),
        "dual_value": dual_value,
        "primal_value": primal_value,
        "gap": gap,
        "max_violation": violation,
        "multipliers": {n: _listed(q) for n, q in zip(p.dual_names, multipliers, strict=True)},
        "primal": primal,
        "unrecovered": reasons,
        "recovered_by": how,
        "caution": p.caution,
    }


def command(p, argv):
    """The command line: ``python module.py instance.json`` prints the JSON report."""
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
        report = run(p, load_instance(raw))
    except (InputError, NeedsConicSolver) as err:
        print(f"error: {argv[0]}: {err}", file=sys.stderr)
        return 2
    print(json.dumps(report, indent=2, sort_keys=True))
    return 0 if report["converged"] else 1
