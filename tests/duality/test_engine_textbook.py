"""The derivation engine against published duals, symbolically.

Each case states a primal problem in our language and the dual a textbook
gives for it, written in our language too, and checks that the derived dual
objective is provably equal to the published one (by the rules of linear
algebra, ``same_expression``) and that each published constraint is among the
derived ones (up to a positive factor).
"""

from __future__ import annotations

import sympy

from dualize.duality import derive
from dualize.duality.compare import same_constraint, same_expression
from dualize.model import load


def _derive(text: str):  # type: ignore[no-untyped-def]
    loaded = load(text)
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return derive(loaded.problem)


def _claim(data: str, text: str):  # type: ignore[no-untyped-def]
    """A published dual written in our language, with the primal's data lines."""
    loaded = load(data + "\n" + text)
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return loaded.problem


def _check(derivation, claim) -> None:  # type: ignore[no-untyped-def]
    dual = derivation.dual
    assert dual.closed_form
    assert dual.sense == claim.sense
    assert same_expression(dual.objective, claim.objective), dual.objective
    derived = [(c.lhs, c.relation, c.rhs) for c in dual.constraints]
    derived += [(v.symbol, ">=", _zero(v.symbol)) for v in dual.variables if v.set == "nonneg"]
    for c in claim.constraints:
        wanted = (c.lhs, c.relation.replace("==", "="), c.rhs)
        assert any(same_constraint(wanted, d) for d in derived), (wanted, derived)
    assert len(claim.constraints) == len(derived)


def _zero(e):  # type: ignore[no-untyped-def]
    from dualize.duality.build import zeros

    return zeros(e.shape)


def _names(derivation) -> list[str]:  # type: ignore[no-untyped-def]
    return [v.name for v in derivation.dual.variables]


LEAST_NORM = "data A in R^(m,n)\ndata b in R^m"


def test_least_norm_dual_is_the_textbook_quadratic() -> None:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.1.3 (from memory):
    # minimize x'x s.t. Ax = b has g(nu) = -(1/4) nu' A A' nu - b' nu.
    d = _derive(LEAST_NORM + "\nminimize x' * x\nover x in R^n\nsubject to\n  nu: A*x == b")
    claim = _claim(LEAST_NORM, "maximize -1/4 * nu' * A * A' * nu - b' * nu\nover nu in R^m")
    _check(d, claim)
    [rec] = d.recovery
    expected = _claim(LEAST_NORM, "minimize sum(-1/2 * A' * nu)\nover nu in R^m").objective
    assert same_expression(_sum(rec.formula), expected)


def _sum(e):  # type: ignore[no-untyped-def]
    from dualize.model.expr import SumAll

    return SumAll(e)


LP = "data A in R^(m,n)\ndata b in R^m\ndata c in R^n"


def test_standard_form_lp_dual() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): minimize c'x s.t. Ax = b,
    # x >= 0 has the dual maximize -b'nu s.t. A'nu + c >= 0 once the multiplier of
    # x >= 0 is eliminated.
    d = _derive(LP + "\nminimize c' * x\nover x in R^n\nsubject to\n  nu: A*x == b\n  lam: x >= 0")
    claim = _claim(LP, "maximize -b' * nu\nover nu in R^m\nsubject to\n  A' * nu + c >= 0")
    _check(d, claim)
    assert _names(d) == ["nu"]
    assert any(s.rule == "eliminate-slack-multiplier" for s in d.steps)


def test_inequality_form_lp_dual() -> None:
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): minimize c'x s.t. Ax <= b
    # has the dual maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0.
    d = _derive(LP + "\nminimize c' * x\nover x in R^n\nsubject to\n  lam: A*x <= b")
    claim = _claim(LP, "maximize -b' * lam\nover lam in R^m\nsubject to\n  A' * lam + c == 0\n"
                   "  lam >= 0")
    _check(d, claim)


def test_two_way_partitioning_gets_the_semidefinite_constraint() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): minimize x'Wx s.t.
    # x_i^2 = 1 has g(nu) = -1'nu where W + diag(nu) is positive semidefinite.
    data = "data W in S^n"
    d = _derive(data + "\nminimize x' * W * x\nover x in R^n\nsubject to\n  nu: x .* x == 1")
    claim = _claim(data, "maximize -sum(nu)\nover nu in R^n\nsubject to\n  W + diag(nu) succeq 0")
    _check(d, claim)


def test_equality_constrained_norm_minimization_two_norms() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): minimize ||x|| s.t. Ax = b
    # has g(nu) = b'nu when the dual norm of A'nu is at most 1 (their multiplier is the
    # negative of ours, since they write b - Ax).
    for norm, dual_norm in (("", "_2"), ("_1", "_inf"), ("_inf", "_1")):
        d = _derive(LEAST_NORM + f"\nminimize ||x||{norm}\nover x in R^n\nsubject to\n"
                    "  nu: A*x == b")
        claim = _claim(LEAST_NORM, f"maximize -b' * nu\nover nu in R^m\nsubject to\n"
                       f"  ||A' * nu||{dual_norm} <= 1")
        _check(d, claim)


def test_entropy_maximization_dual_after_eliminating_nu() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): for minimize
    # sum x log x s.t. Ax <= b, 1'x = 1, g(lambda, nu) = -b'lambda - nu
    # - exp(-nu - 1) sum_i exp(-a_i'lambda); maximizing over nu in closed form
    # (section 5.2.4, from memory) leaves -b'lambda - log sum_i exp(-a_i'lambda).
    data = "data A in R^(m,n)\ndata b in R^m"
    d = _derive(data + "\nminimize sum(x .* log(x))\nover x in R^n\nsubject to\n"
                "  lam: A*x <= b\n  nu: sum(x) == 1")
    claim = _claim(data, "maximize -b' * lam - log(sum(exp(-A' * lam)))\nover lam in R^m\n"
                   "subject to\n  lam >= 0")
    _check(d, claim)
    assert any(s.rule == "maximize-free-multiplier" for s in d.steps)


SVM = "data X in R^(m,n)\ndata y in R^m\ndata C in R_++"


def test_soft_margin_dual() -> None:
    # C. Cortes and V. Vapnik, Support-vector networks, Machine Learning 20, 1995
    # (from memory): maximize 1'a - 1/2 a'Da s.t. y'a = 0, 0 <= a <= C, with
    # D_ij = y_i y_j x_i'x_j, and w = sum_i a_i y_i x_i.
    d = _derive(SVM + "\nminimize 1/2 * ||w||^2 + C * sum(s)\nover w in R^n, b in R, s in R^m\n"
                "subject to\n  alpha: y .* (X*w + b) >= 1 - s\n  beta: s >= 0")
    claim = _claim(SVM, "maximize sum(alpha) - 1/2 * alpha' * diag(y) * X * X' * diag(y) * alpha\n"
                   "over alpha in R^m\nsubject to\n  y' * alpha == 0\n  alpha >= 0\n"
                   "  alpha <= C")
    _check(d, claim)
    w = next(r for r in d.recovery if r.variable == "w")
    expected = _claim(SVM, "minimize sum(X' * (y .* alpha))\nover alpha in R^m").objective
    assert same_expression(_sum(w.formula), expected)
    b = next(r for r in d.recovery if r.variable == "b")
    assert b.formula is None and "complementary slackness" in b.note


QP = "data P in S^n_++\ndata q in R^n\ndata G in R^(m,n)\ndata h in R^m"


def test_quadratic_program_dual() -> None:
    # Common practice (the QP dual, rederived by hand from the conjugate of 1/2 x'Px in
    # Boyd and Vandenberghe, 2004, section 3.3, from memory): minimize 1/2 x'Px + q'x
    # s.t. Gx <= h has the dual
    # maximize -1/2 (q + G'l)' P^-1 (q + G'l) - h'l s.t. l >= 0.
    d = _derive(QP + "\nminimize 1/2 * x' * P * x + q' * x\nover x in R^n\nsubject to\n"
                "  l: G*x <= h")
    claim = _claim(QP, "maximize -1/2 * (q + G'*l)' * inv(P) * (q + G'*l) - h' * l\n"
                   "over l in R^m\nsubject to\n  l >= 0")
    _check(d, claim)


def test_l1_regularized_least_squares_dual() -> None:
    # S.-J. Kim, K. Koh, M. Lustig, S. Boyd, D. Gorinevsky, An interior-point method for
    # large-scale l1-regularized least squares, IEEE J. Sel. Topics Signal Processing,
    # 2007 (from memory): maximize -(1/4) nu'nu - nu'y s.t. ||A'nu||_inf <= lambda.
    data = "data A in R^(m,n)\ndata y in R^m\ndata lambda in R_++"
    d = _derive(data + "\nminimize ||A*x - y||^2 + lambda * ||x||_1\nover x in R^n")
    [z] = _names(d)
    claim = _claim(data, f"maximize -1/4 * {z}' * {z} - {z}' * y\nover {z} in R^m\n"
                   f"subject to\n  ||A' * {z}||_inf <= lambda")
    _check(d, claim)


def test_log_sum_exp_dual_is_entropy_on_the_simplex() -> None:
    # Boyd and Vandenberghe, 2004, section 5.7.1 (from memory): minimize
    # log sum exp(Ax + b) has the dual maximize b'nu - sum nu log nu s.t. 1'nu = 1,
    # A'nu = 0 (nu >= 0 from the domain of the entropy).
    data = "data A in R^(m,n)\ndata b in R^m"
    d = _derive(data + "\nminimize log(sum(exp(A*x + b)))\nover x in R^n")
    [z] = _names(d)
    claim = _claim(data, f"maximize b' * {z} - sum({z} .* log({z}))\nover {z} in R^m\n"
                   f"subject to\n  sum({z}) == 1\n  A' * {z} == 0\n  {z} >= 0")
    _check(d, claim)


def test_semidefinite_program_dual() -> None:
    # Boyd and Vandenberghe, 2004, section 5.9 (from memory): the dual of
    # minimize tr(CX) s.t. tr(A X) = b, X succeq 0 is maximize -b nu s.t.
    # C + nu A succeq 0 (with our sign of nu).
    data = "data C in S^3\ndata A in S^3\ndata b in R"
    d = _derive(data + "\nminimize trace(C*X)\nover X in S^3\nsubject to\n  nu: trace(A*X) == b\n"
                "  Z: X succeq 0")
    claim = _claim(data, "maximize -b * nu\nover nu in R\nsubject to\n  C + nu * A succeq 0")
    _check(d, claim)


def test_chebyshev_approximation_dual() -> None:
    # Boyd and Vandenberghe, 2004, section 5.7 (from memory): minimize
    # ||Ax - b||_inf has the dual maximize b'nu s.t. ||nu||_1 <= 1, A'nu = 0 (our
    # multiplier is the negative of theirs).
    d = _derive(LEAST_NORM + "\nminimize ||A*x - b||_inf\nover x in R^n")
    [z] = _names(d)
    claim = _claim(LEAST_NORM, f"maximize -b' * {z}\nover {z} in R^m\nsubject to\n"
                   f"  ||{z}||_1 <= 1\n  A' * {z} == 0")
    _check(d, claim)


def test_scalar_exercise_dual_optimum() -> None:
    # Boyd and Vandenberghe, 2004, exercise 5.1 (from memory): minimize x^2 + 1 s.t.
    # (x - 2)(x - 4) <= 0 has p* = 5; the dual optimum is 5 at lambda = 2.
    d = _derive("minimize x^2 + 1\nover x in R\nsubject to\n  lam: (x - 2)*(x - 4) <= 0")
    g = _scalar_function(d, "lam")
    assert sympy.simplify(g(2) - 5) == 0
    lam = sympy.Symbol("lam", nonnegative=True)
    stationary = sympy.solve(sympy.diff(g(lam), lam), lam)
    assert 2 in stationary


def test_nocedal_wright_example_multiplier() -> None:
    # J. Nocedal and S. Wright, Numerical Optimization, 2nd ed., 2006, chapter 12 (from
    # memory): minimize x1 + x2 s.t. 2 - x1^2 - x2^2 >= 0 has x* = (-1, -1), multiplier 1/2.
    d = _derive("minimize x1 + x2\nover x1 in R, x2 in R\nsubject to\n"
                "  lam: 2 - x1^2 - x2^2 >= 0")
    g = _scalar_function(d, "lam")
    lam = sympy.Symbol("lam", positive=True)
    assert sympy.Rational(1, 2) in sympy.solve(sympy.diff(g(lam), lam), lam)
    assert sympy.simplify(g(sympy.Rational(1, 2)) + 2) == 0
    x1 = next(r for r in d.recovery if r.variable == "x1").formula
    assert _scalar(x1, "lam", sympy.Rational(1, 2)) == -1


def _scalar_function(d, name):  # type: ignore[no-untyped-def]
    def g(value):  # type: ignore[no-untyped-def]
        return _scalar(d.dual.objective, name, value)

    return g


def _scalar(e, name, value):  # type: ignore[no-untyped-def]
    from dualize.duality.scalar import Scope, to_sympy

    scope = Scope()
    expr = to_sympy(e, scope)
    subs = {s: value for s in expr.free_symbols if s.name == name}
    return sympy.simplify(expr.subs(subs))


def test_concave_quadratic_objective_makes_the_dual_minus_infinity() -> None:
    # Common practice: minimize -x'x subject to affine constraints has a Lagrangian that is
    # unbounded below in x for every multiplier, so g = -infinity.
    d = _derive(LEAST_NORM + "\nminimize -(x' * x)\nover x in R^n\nsubject to\n  nu: A*x == b")
    assert d.dual.unbounded and not d.dual.closed_form


def test_maximization_is_dualized_as_an_upper_bound() -> None:
    # docs/language.md sign conventions (common practice): maximize f has the dual
    # minimize h with h = sup_x (f - sum y f_i) >= p*.  For maximize -x'x + 2 c'x
    # with no constraints the dual is the constant c'c.
    d = _derive("data c in R^n\nmaximize -(x' * x) + 2 * c' * x\nover x in R^n")
    assert d.dual.sense == "minimize"
    claim = _claim("data c in R^n", "minimize c' * c\nover t in R")
    assert same_expression(d.dual.objective, claim.objective)


def test_term_without_rule_keeps_the_infimum() -> None:
    # Common practice: a term with no known conjugate (here x' * x * exp-like coupling of
    # a norm and a product) must not produce a guessed dual.
    d = _derive("minimize ||x||_1 * ||x||_2\nover x in R^n")
    assert not d.dual.closed_form and [v.name for v in d.dual.inner] == ["x"]


ORTHANT = "data A in R^(m,n)\ndata b in R^m\ndata c in R^n\ndata h in R_++"


def test_quadratic_over_the_orthant_keeps_a_clipped_square() -> None:
    # The conjugate of 1/2 ||x||^2 restricted to x >= 0 is 1/2 ||max(y, 0)||^2 (S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 3.3 and exercise 3.36, from
    # memory), so inf over x >= 0 of h/2 ||x||^2 + g'x is -||min(g, 0)||^2 / (2h) with
    # g = A'nu + c, attained at x = max(-g, 0)/h.
    d = _derive(ORTHANT + "\nminimize h/2 * ||x||^2 + c' * x\nover x in R^n_+\n"
                "subject to\n  nu: A*x == b")
    claim = _claim(ORTHANT, "maximize -1/(2*h) * ||min(A' * nu + c, 0)||^2 - b' * nu\n"
                   "over nu in R^m")
    _check(d, claim)
    [rec] = d.recovery
    expected = _claim(ORTHANT, "minimize sum(1/h * max(-A' * nu - c, 0))\nover nu in R^m")
    assert same_expression(_sum(rec.formula), expected.objective)


def test_quadratic_over_the_orthant_with_a_general_hessian_keeps_the_infimum() -> None:
    # No closed form is claimed where the rule does not apply: for x'Px on the orthant the
    # infimum is a nonnegative least-squares value (common practice), left as written.
    d = _derive("data P in S^n_++\ndata c in R^n\nminimize 1/2 * x' * P * x + c' * x\n"
                "over x in R^n_+")
    assert not d.dual.closed_form
    assert [v.name for v in d.dual.inner] == ["x"]


def test_no_split_leaves_a_concave_remainder() -> None:
    # inf over x of x^4 - 2x^2 + (1 + lam) x is finite for every lam; splitting u = x off
    # the quartic would leave -2x^2 alone, unbounded below, and make the dual minus
    # infinity: a weaker bound than the Lagrangian dual of the problem as written
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.7, from memory).
    d = _derive("minimize x^4 - 2*x^2 + x\nover x in R\nsubject to\n  lam: x <= 5")
    assert not d.dual.unbounded
    assert [v.name for v in d.dual.inner] == ["x"]
    # And for a nonconvex constraint: min x^4 s.t. x^2 >= 1 has dual value 1 = p*, which the
    # split would lose (lam x^2 enters with a negative sign).
    d = _derive("minimize x^4\nover x in R\nsubject to\n  lam: x^2 >= 1")
    assert not d.dual.unbounded and not d.dual.closed_form


def test_convex_remainder_still_splits() -> None:
    # The lasso keeps its closed-form dual: the remainder ||Ax - y||^2 is convex.
    d = _derive("data A in R^(m,n)\ndata y in R^m\ndata lam in R_++\n"
                "minimize ||A*x - y||^2 + lam * ||x||_1\nover x in R^n")
    assert d.dual.closed_form


WEIGHTED = "data A in R^(m,n)\ndata b in R^m\ndata w in R^n_++"


def test_weighted_one_norm_dual_is_an_entrywise_box() -> None:
    # The dual norm of sum(w .* |x|) with w > 0 is max |s_i| / w_i, so minimize
    # sum(w .* |x|) s.t. Ax = b has the dual maximize -b'nu s.t. |A'nu| <= w entry by entry
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section A.1.6 and example
    # 5.x on norm minimization, from memory).
    for objective in ("sum(w .* |x|)", "w' * |x|"):
        d = _derive(WEIGHTED + f"\nminimize {objective}\nover x in R^n\nsubject to\n"
                    "  nu: A*x == b")
        claim = _claim(WEIGHTED, "maximize -b' * nu\nover nu in R^m\nsubject to\n"
                       "  |A' * nu| <= w")
        _check(d, claim)


def test_cost_weighted_hinge_gives_per_sample_boxes() -> None:
    # A soft margin with per-sample costs c_i: the dual box is 0 <= z_i <= c_i (C. Cortes
    # and V. Vapnik, Support-vector networks, 1995, with per-sample weights, from memory).
    data = "data X in R^(m,n)\ndata y in R^m\ndata c in R^m_+"
    d = _derive(data + "\nminimize 1/2 * ||v||^2 + sum(c .* max(1 - y .* (X*v), 0))\n"
                "over v in R^n")
    claim = _claim(data, "maximize sum(z) - 1/2 * z' * diag(y) * X * X' * diag(y) * z\n"
                   "over z in R^m\nsubject to\n  z >= 0\n  z <= c")
    _check(d, claim)
