"""Quadratics with a singular or unknown-rank positive semidefinite Hessian.

The infimum of 1/2 x'Hx + g'x + r is r - 1/2 g'H^+ g when g lies in the range
of H and minus infinity otherwise (S. Boyd and L. Vandenberghe, Convex
Optimization, 2004, appendix A.5.4, from memory); the derived duals state the
range condition with a witness (g = -H v) or see that g is H times something,
and never fall back to a matrix inequality for a primal that has none.
"""

from __future__ import annotations

import numpy as np

from dualize.duality import derive
from dualize.model import load
from dualize.model.expr import Block, walk
from tests.duality.test_engine_textbook import _check, _claim, _derive

KERNEL = "data K in S^m_+\ndata y in R^m\ndata C in R_++"
KERNEL_PRIMAL = KERNEL + """
minimize 1/2 * beta' * K * beta + C * sum(s)
over beta in R^m, b in R, s in R^m
subject to
  margin: y .* (K * beta + b) >= 1 - s
  slack: s >= 0
"""


def _no_matrix_inequality(d) -> bool:  # type: ignore[no-untyped-def]
    exprs = [d.dual.objective] + [c.lhs for c in d.dual.constraints]
    return not any(isinstance(n, Block) for e in exprs for n in walk(e)) and all(
        c.relation not in ("succeq", "preceq") for c in d.dual.constraints)


def test_kernel_soft_margin_dual_is_the_published_one() -> None:
    # B. Schoelkopf and A. Smola, Learning with Kernels, 2002, chapter 7 (from memory):
    # the soft-margin dual is maximize sum(a) - 1/2 a' diag(y) K diag(y) a subject to
    # y'a = 0 and 0 <= a <= C; the data enter only through the kernel matrix K.
    d = _derive(KERNEL_PRIMAL)
    claim = _claim(KERNEL, "maximize sum(margin) - 1/2 * margin' * diag(y) * K * diag(y) * "
                   "margin\nover margin in R^m\nsubject to\n  y' * margin == 0\n"
                   "  margin <= C\n  margin >= 0")
    _check(d, claim)
    assert _no_matrix_inequality(d)
    [beta] = [r for r in d.recovery if r.variable == "beta"]
    # The representer form: beta = diag(y) a, so K beta = sum_i a_i y_i K(:, i), the
    # kernel expansion (Schoelkopf and Smola, 2002, chapter 7, from memory).
    assert beta.formula is not None and "kernel expansion" in beta.note


def test_singular_qp_states_the_range_condition_without_an_lmi() -> None:
    # Boyd and Vandenberghe, 2004, appendix A.5.4 (from memory): with P only positive
    # semidefinite, the dual of minimize 1/2 x'Px + q'x s.t. Ax <= b is
    # maximize -b'l - 1/2 v'Pv s.t. A'l + q = -P v, l >= 0 (the range condition of
    # q + A'l written with the witness v, as in Dorn's dual of a quadratic program).
    data = "data P in S^n_+\ndata q in R^n\ndata A in R^(m,n)\ndata b in R^m"
    d = _derive(data + "\nminimize 1/2 * x' * P * x + q' * x\nover x in R^n\nsubject to\n"
                "  l: A*x <= b")
    claim = _claim(data, "maximize -b' * l - 1/2 * v_x' * P * v_x\nover l in R^m, v_x in R^n\n"
                   "subject to\n  A' * l + P * v_x + q == 0\n  l >= 0")
    _check(d, claim)
    assert _no_matrix_inequality(d)


def test_inverse_products_cancel() -> None:
    # K K^-1 K = K for invertible K (common practice): a positive definite Hessian whose
    # linear coefficient is K w gives r - 1/2 w'K w, with no inverse left.
    data = "data K in S^n_++\ndata c in R^n"
    d = _derive(data + "\nminimize 1/2 * x' * K * x - c' * K * x\nover x in R^n")
    claim = _claim(data, "maximize -1/2 * c' * K * c\nover c2 in R")
    from dualize.duality.compare import same_expression

    assert same_expression(d.dual.objective, claim.objective)
    assert not any(type(n).__name__ == "Inverse" for n in walk(d.dual.objective))




def test_singular_instances_close_the_gap() -> None:
    # Strong duality for a convex QP with affine constraints when feasible (Boyd and
    # Vandenberghe, 2004, section 5.2.3, from memory); cvxpy's primal solve is the
    # reference, on instances whose P has rank 2 in dimension 6.
    from dualize.numeric.instance import Instance
    from dualize.numeric.verify import verify

    loaded = load("data P in S^n_+\ndata q in R^n\ndata A in R^(m,n)\ndata b in R^m\n"
                  "minimize 1/2 * x' * P * x + q' * x\nover x in R^n\nsubject to\n"
                  "  fit: A*x <= b\n  box: x <= 3\n  low: x >= -3")
    assert loaded.problem is not None
    d = derive(loaded.problem)
    assert _no_matrix_inequality(d)
    for seed in (1, 2, 3):
        rng = np.random.default_rng(seed)
        G = rng.normal(size=(6, 2))
        values = {"P": G @ G.T, "q": rng.normal(size=6), "A": rng.normal(size=(4, 6)),
                  "b": rng.uniform(0.5, 1.5, size=4)}
        assert np.linalg.matrix_rank(values["P"]) == 2
        report = verify(d, [Instance(values, {"n": 6, "m": 4})], seeds=[])
        [check] = report.checks
        assert check.primal_status == "optimal" and check.dual_status == "optimal", check
        assert abs(check.gap) <= 1e-5 * max(1.0, abs(check.primal_value)), check


def test_products_with_inverses_simplify() -> None:
    # K K^-1 K = K and diag(d) diag(d)^-1 = I (common practice).
    import sympy

    from dualize.duality import build as b
    from dualize.duality.normal import tidy
    from dualize.model.expr import Inverse, Shape, Symbol

    n = sympy.Symbol("n", positive=True, integer=True)
    K = Symbol("K", "data", Shape(n, n), frozenset({"pd", "symmetric"}))
    assert b.mul(K, Inverse(K), K) == K
    from dualize.model.expr import MatMul

    assert tidy(MatMul((K, Inverse(K), K))) == K


def test_kernel_ridge_dual_depends_on_the_kernel_only() -> None:
    # Kernel ridge regression, minimize 1/2 ||K a - y||^2 + lam/2 a'K a, has the dual
    # maximize -1/(2 lam) z'K z - 1/2 z'z - y'z, and a = -z/lam: the data enter only
    # through K (C. Saunders, A. Gammerman and V. Vovk, Ridge regression learning
    # algorithm in dual variables, 1998, from memory).
    data = "data K in S^m_+\ndata y in R^m\ndata lam in R_++"
    d = _derive(data + "\nminimize 1/2 * ||K * a - y||^2 + lam/2 * a' * K * a\nover a in R^m")
    claim = _claim(data, "maximize -1/(2*lam) * z' * K * z - 1/2 * z' * z - y' * z\n"
                   "over z in R^m")
    _check(d, claim)
    assert _no_matrix_inequality(d)
    [rec] = d.recovery
    assert rec.formula is not None and "kernel expansion" in rec.note


def test_explicit_features_enter_only_through_the_gram_matrix() -> None:
    # The soft-margin dual with explicit features X depends on X only through X X', and
    # w = X' diag(y) a makes w't a kernel expansion (Schoelkopf and Smola, Learning with
    # Kernels, 2002, chapter 7, from memory).
    data = "data X in R^(m,n)\ndata y in R^m\ndata C in R_++"
    d = _derive(data + "\nminimize 1/2 * ||w||^2 + C * sum(s)\nover w in R^n, b in R, "
                "s in R^m\nsubject to\n  a: y .* (X*w + b) >= 1 - s\n  t: s >= 0")
    [note] = [n for n in d.notes if "Gram matrix" in n]
    assert "X X'" in note and "kernel expansion" in note
    # A problem where X also enters alone (an equality A x = b has b'nu, and A' nu
    # in a norm ball) gets no such note.
    d2 = _derive("data A in R^(m,n)\ndata b in R^m\nminimize ||x||_1\nover x in R^n\n"
                 "subject to\n  nu: A*x == b")
    assert not any("Gram matrix" in n for n in d2.notes)


def test_variance_cap_dual_has_no_matrix_inequality() -> None:
    # maximize mu'x s.t. x'Sx <= r, 1'x = 1 with S positive definite has the dual
    # minimize (mu - nu 1)'S^-1(mu - nu 1)/(4 lam) + nu + r lam over lam >= 0 (the
    # Lagrangian's maximizer x = S^-1(mu - nu 1)/(2 lam); S. Boyd and L. Vandenberghe,
    # Convex Optimization, 2004, section 5.2.4 and exercise 5.1 in spirit, from memory).
    data = "data mu in R^n\ndata S in S^n_++\ndata r in R_++"
    d = _derive(data + "\nmaximize mu' * x\nover x in R^n\nsubject to\n  lam: x' * S * x <= r\n"
                "  nu: sum(x) == 1")
    claim = _claim(data, "minimize (nu * ones(n) - mu)' * inv(S) * (nu * ones(n) - mu) / "
                   "(4 * lam) + nu + r * lam\nover lam in R_+, nu in R\nsubject to\n  lam >= 0")
    _check(d, claim)
    assert _no_matrix_inequality(d)
    singular = _derive(data.replace("S^n_++", "S^n_+") + "\nmaximize mu' * x\nover x in R^n\n"
                       "subject to\n  lam: x' * S * x <= r\n  nu: sum(x) == 1")
    assert _no_matrix_inequality(singular)
    assert singular.dual.closed_form
