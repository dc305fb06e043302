"""LP shadow prices against scipy's HiGHS marginals.

Source: the scipy.optimize.linprog documentation (method "highs"): the result's
``ineqlin.marginals`` and ``eqlin.marginals`` are the sensitivities (partial
derivatives) of the optimal value with respect to ``b_ub`` and ``b_eq``.  Our
rate for ``A x <= b`` and ``E x == d`` is the derivative of p* with respect to
the right-hand side (u enters as b + u), so the two must agree entry by entry
(Boyd and Vandenberghe, 2004, section 5.6.3: dp*/du_i = -lambda_i).
"""

from __future__ import annotations

import numpy as np
import pytest

from dualize.api import load_problem, prices
from dualize.multipliers.printing import bound_sentence
from dualize.numeric.instance import Instance

LP = """title "Random LP"
data A in R^(m,n)
data b in R^m
data E in R^(k,n)
data d in R^k
data c in R^n
minimize c' * x
over x in R^n
subject to
  cap: A*x <= b
  flow: E*x == d
  floor: x >= 0
"""


def _instance(seed: int) -> dict[str, np.ndarray]:
    """Feasible (x0 > 0) and bounded (c = z - A'y - E'v with y, z >= 0: dual feasible)."""
    rng = np.random.default_rng(seed)
    m, n, k = 4, 6, 2
    A, E = rng.normal(size=(m, n)), rng.normal(size=(k, n))
    x0 = rng.uniform(0.5, 1.5, n)
    b, d = A @ x0 + rng.uniform(0.1, 1.0, m), E @ x0
    y, z, v = rng.uniform(0, 1, m), rng.uniform(0, 1, n), rng.normal(size=k)
    return {"A": A, "b": b, "E": E, "d": d, "c": z - A.T @ y - E.T @ v}


@pytest.mark.parametrize("seed", [1, 2, 3, 4])
def test_rates_equal_highs_marginals(seed: int) -> None:
    from scipy.optimize import linprog

    data = _instance(seed)
    res = linprog(data["c"], A_ub=np.vstack([data["A"], -np.eye(6)]),
                  b_ub=np.concatenate([data["b"], np.zeros(6)]), A_eq=data["E"],
                  b_eq=data["d"], bounds=(None, None), method="highs")
    assert res.status == 0
    report = prices(load_problem(LP), Instance(data, {"m": 4, "n": 6, "k": 2}))
    assert report.established
    assert report.value == pytest.approx(res.fun, rel=1e-7, abs=1e-8)
    rates = {r.name: r.rate for r in report.rows}
    expected = ({f"cap[{i + 1}]": res.ineqlin.marginals[i] for i in range(4)}
                | {f"floor[{i + 1}]": res.ineqlin.marginals[4 + i] for i in range(6)}
                | {f"flow[{i + 1}]": res.eqlin.marginals[i] for i in range(2)})
    for name, value in expected.items():
        assert rates[name] == pytest.approx(value, rel=1e-6, abs=1e-7), name
    # each rate was also confirmed by re-solving the perturbed LP on both sides
    assert not report.failed_checks()
    assert {r.check for r in report.rows} <= {"agrees", "kink", "edge"}


def test_maximization_rate_has_the_opposite_sign() -> None:
    """maximize c'x s.t. x <= b (x >= 0 as a domain): p*(b) = c'b, so dp*/db = +c
    (the language's multipliers of a maximization are those of minimize -f)."""
    text = ("data b in R^2\nmaximize 3*x1 + 2*x2\nover x1 in R_+, x2 in R_+\nsubject to\n"
            "  one: x1 <= 4\n  two: x2 <= 5\n")
    report = prices(load_problem(text), Instance({"b": np.array([4.0, 5.0])}, {}))
    rates = {r.name: r.rate for r in report.rows}
    assert rates == pytest.approx({"one": 3.0, "two": 2.0}, rel=1e-6)
    assert all(r.check == "agrees" for r in report.rows)
    assert "p*(u) <=" in bound_sentence(report)
