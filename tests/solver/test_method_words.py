"""The generated module reports what a scipy method's result means in its own words.

scipy's result codes (scipy.optimize documentation: OptimizeResult.status for L-BFGS-B
and SLSQP, linprog's status 0 to 4; from memory) are read from real runs of each method,
so a change of their meaning in a new scipy shows here.
"""

from __future__ import annotations

import numpy as np
import scipy.optimize

from dualize.solvergen.runtime_methods import _in_our_words


def _quadratic(z: np.ndarray) -> tuple[float, np.ndarray]:
    return float(z @ z - 2.0 * z.sum()), 2.0 * z - 2.0


def test_lbfgsb_converged_and_stopped_at_its_limit() -> None:
    done = scipy.optimize.minimize(_quadratic, np.full(5, 9.0), jac=True, method="L-BFGS-B")
    cut = scipy.optimize.minimize(lambda z: (float(np.sum(np.cosh(z))), np.sinh(z)),
                                  np.full(5, 9.0), jac=True, method="L-BFGS-B",
                                  options={"maxiter": 1})
    assert _in_our_words("L-BFGS-B", done).startswith("L-BFGS-B converged")
    assert "iteration or evaluation limit" in _in_our_words("L-BFGS-B", cut)
    assert "CONVERGENCE" not in _in_our_words("L-BFGS-B", done)


def test_slsqp_with_incompatible_constraints_says_so() -> None:
    clash = [{"type": "ineq", "fun": lambda z: z[0] - 1.0},
             {"type": "ineq", "fun": lambda z: -z[0] - 1.0}]
    res = scipy.optimize.minimize(lambda z: float(z @ z), np.zeros(2), method="SLSQP",
                                  constraints=clash)
    assert not res.success
    said = _in_our_words("SLSQP", res)
    assert said.startswith("SLSQP ") and f"(status {res.status})" in said
    assert "converged" not in said


def test_highs_infeasible_and_unbounded() -> None:
    infeasible = scipy.optimize.linprog([1.0], A_ub=[[1.0], [-1.0]], b_ub=[-1.0, -1.0],
                                        bounds=[(None, None)], method="highs")
    unbounded = scipy.optimize.linprog([-1.0], bounds=[(0, None)], method="highs")
    assert _in_our_words("HiGHS", infeasible) == "HiGHS infeasible (status 2)"
    assert _in_our_words("HiGHS", unbounded) == "HiGHS unbounded (status 3)"
