"""Matrix variables that enter through an elementwise product with data.

sum(C .* X) is the linear functional <C, X>, so the transport and assignment
problems get their textbook duals instead of a kept infimum.
"""

from __future__ import annotations

from tests.duality.test_engine_textbook import _check, _claim, _derive

TRANSPORT = "data C in R^(m,n)\ndata a in R^m_+\ndata b in R^n_+"


def test_transport_dual_is_the_textbook_one() -> None:
    # D. Bertsimas and J. Tsitsiklis, Introduction to Linear Optimization, 1997, chapter 7
    # (from memory): the transportation problem min sum C_ij x_ij s.t. sum_j x_ij = a_i,
    # sum_i x_ij = b_j, x >= 0 has the dual max sum a_i u_i + sum_j b_j v_j s.t.
    # u_i + v_j <= C_ij.  Our equality multipliers are the negatives (u = -supply,
    # v = -demand), since the Lagrangian adds supply'(X 1 - a).
    d = _derive(TRANSPORT + "\nminimize sum(C .* X)\nover X in R^(m,n)\nsubject to\n"
                "  supply: X * ones(n) == a\n  demand: X' * ones(m) == b\n  pos: X >= 0")
    claim = _claim(TRANSPORT, "maximize a' * (-supply) + b' * (-demand)\n"
                   "over supply in R^m, demand in R^n\nsubject to\n"
                   "  (-supply) * ones(n)' + ones(m) * (-demand)' <= C")
    _check(d, claim)
    assert not d.dual.inner


def test_assignment_over_nonnegative_matrices() -> None:
    # Bertsimas and Tsitsiklis, 1997, chapter 7 (from memory): the assignment problem's
    # dual is max sum_i u_i + sum_j v_j s.t. u_i + v_j <= C_ij; here X ranges over the
    # nonnegative matrices (a domain, not dualized), so no multiplier for X >= 0 appears.
    data = "data C in R^(n,n)"
    d = _derive(data + "\nminimize sum(C .* X)\nover X in R^(n,n)_+\nsubject to\n"
                "  row: X * ones(n) == 1\n  col: X' * ones(n) == 1")
    claim = _claim(data, "maximize sum(-row) + sum(-col)\nover row in R^n, col in R^n\n"
                   "subject to\n  (-row) * ones(n)' + ones(n) * (-col)' <= C")
    _check(d, claim)


def test_weighted_entries_are_a_linear_functional() -> None:
    # u'(D .* X) v = sum_ij u_i D_ij v_j X_ij = <diag(u) D diag(v), X> (common practice):
    # with X fixed to E the dual value is u'(D .* E) v, checked on numbers with numpy.
    import numpy as np

    from dualize.numeric.evaluate import evaluate

    data = "data D in R^(m,n)\ndata u in R^m\ndata v in R^n\ndata E in R^(m,n)"
    d = _derive(data + "\nminimize u' * (D .* X) * v\nover X in R^(m,n)\nsubject to\n"
                "  fix: X == E")
    assert d.dual.closed_form and not d.dual.inner
    rng = np.random.default_rng(5)
    values = {"D": rng.normal(size=(3, 4)), "u": rng.normal(size=3), "v": rng.normal(size=4),
              "E": rng.normal(size=(3, 4))}
    got = float(evaluate(d.dual.objective, values, {"m": 3, "n": 4}))
    want = values["u"] @ (values["D"] * values["E"]) @ values["v"]
    assert abs(got - want) <= 1e-9 * max(1.0, abs(want))


def test_derivation_states_where_the_dual_function_is_finite() -> None:
    # Outside the implicit constraints the dual function is minus infinity, and an
    # unbounded dual proves the primal infeasible (weak duality; S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, sections 5.1.2 and 5.2.2, from memory).
    d = _derive(TRANSPORT + "\nminimize sum(C .* X)\nover X in R^(m,n)\nsubject to\n"
                "  supply: X * ones(n) == a\n  demand: X' * ones(m) == b\n  pos: X >= 0")
    [last] = [s for s in d.steps if s.rule == "dual-problem"]
    assert "minus infinity" in last.text
    assert "unbounded above only if the primal is infeasible" in last.text
    up = _derive("data c in R^n\nmaximize c' * x\nover x in R^n\nsubject to\n  cap: x <= 1")
    [last] = [s for s in up.steps if s.rule == "dual-problem"]
    assert "plus infinity" in last.text and "unbounded below only if" in last.text


def test_entropic_transport_dual() -> None:
    # Entropy-regularized transport, minimize <C, P> + eps sum P log P s.t. P 1 = r,
    # P'1 = c, has the dual maximize -r'u - c'v - eps sum exp((-u 1' - 1 v' - C)/eps - 1)
    # with P = exp((-u 1' - 1 v' - C)/eps - 1) (M. Cuturi, Sinkhorn distances, 2013,
    # from memory; our multipliers u, v are the rows and cols labels).
    data = "data C in R^(m,n)\ndata r in R^m_++\ndata c in R^n_++\ndata eps in R_++"
    d = _derive(data + "\nminimize sum(C .* P) + eps * sum(P .* log(P))\n"
                "over P in R^(m,n)_+\nsubject to\n  rows: P * ones(n) == r\n"
                "  cols: P' * ones(m) == c")
    # The exponent's canonical forms differ by where 1/eps is distributed, so the two
    # objectives are compared on numbers at random multipliers.
    import numpy as np

    from dualize.numeric.evaluate import evaluate

    assert d.dual.closed_form and not d.dual.constraints
    rng = np.random.default_rng(2)
    m, n = 3, 4
    for _ in range(3):
        v = {"C": rng.normal(size=(m, n)), "r": rng.uniform(0.5, 1, m),
             "c": rng.uniform(0.5, 1, n), "eps": 0.7, "rows": rng.normal(size=m),
             "cols": rng.normal(size=n)}
        u, w = v["rows"], v["cols"]
        want = -v["r"] @ u - v["c"] @ w - 0.7 * np.sum(
            np.exp((-u[:, None] - w[None, :] - v["C"]) / 0.7 - 1))
        got = float(evaluate(d.dual.objective, v, {"m": m, "n": n}))
        assert abs(got - want) <= 1e-9 * max(1.0, abs(want))
    [rec] = d.recovery
    assert rec.formula is not None
