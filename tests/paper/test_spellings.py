"""The many ways papers typeset one dual: every spelling must translate to the derived
dual (objective by ``same_expression``, constraints by ``same_constraint``)."""

from __future__ import annotations

import pytest

from tests.paper.helpers import agreement, fragment

# S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.1.3 (from memory):
# minimize x'x s.t. Ax = b has the dual maximize -1/4 nu'AA'nu - b'nu.
LEAST_NORM = [
    r"\max_{\nu} \; -\frac{1}{4} \nu^\top A A^\top \nu - b^\top \nu",
    r"\max_\nu -\tfrac14 \nu^T A A^T \nu - b^T \nu",
    r"\operatorname*{maximize}_{\nu} \quad -\dfrac{1}{4}\, \nu' A A' \nu - b' \nu",
    r"\underset{\boldsymbol{\nu}}{\mathop{\text{maximize}}} -\frac{1}{4}"
    r" \boldsymbol{\nu}^{\mathsf T} \mathbf{A} \mathbf{A}^{\mathsf{T}} \boldsymbol{\nu}"
    r" - \mathbf{b}^{\intercal} \boldsymbol{\nu}",
    r"\text{maximize}_{\bm{\nu}} \; -\frac14 \cdot \bm{\nu}^{\top} A \cdot A^{\top} \bm{\nu}"
    r" - \bm{b}^{\top} \bm{\nu}",
    r"\max_{\nu \in \mathbb{R}^m} -\frac{1}{4}\sum_{i,j} \nu_i \nu_j a_i^\top a_j"
    r" - \sum_{i=1}^m b_i \nu_i",
    r"\max_{\nu} -\frac{1}{4}\sum_{i=1}^{m}\sum_{j=1}^{m} \nu_i a_i^\top a_j \nu_j"
    r" - \sum_i \nu_i b_i",
    r"\max_{\nu} \; \left( -\frac{1}{4} \nu^\top A A^\top \nu - b^\top \nu \right)",
    r"\max_{\nu} -\nu^\top A A^\top \nu / 4 - \mathbf{1}^\top \operatorname{diag}(b) \nu",
    r"\max_{\nu} -\frac{(A^\top\nu)^\top A^\top \nu}{4} - \nu^\top b",
]


@pytest.mark.parametrize("body", LEAST_NORM)
def test_least_norm_spellings(body: str) -> None:
    t = fragment(body, "survey_least_norm")
    assert t.ok, t.diagnostics
    objective, constraints, mine = agreement(t, "survey_least_norm")
    assert objective and mine == 0, t.text


# Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): the inequality-form LP's dual
# maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0.
LP = [
    r"\max_{\lambda \succeq 0} -b^\top \lambda \quad \text{s.t.} \quad A^\top \lambda + c = 0",
    r"\max_{\lambda \geq 0} -b^\top \lambda \quad \text{subject to} \quad A^\top \lambda = -c",
    r"\max_{\lambda \in \mathbb{R}^m_+} -b^\top \lambda \;\; \mathrm{s.t.} \;\; c + A^T\lambda = 0",
    r"\begin{array}{ll} \max & -b^T\lambda \\ \text{s.t.} & A^T\lambda + c = \mathbf{0}, "
    r"\quad \lambda \succeq \mathbf{0} \end{array}",
    r"\max_{\lambda} -\sum_{i=1}^m b_i \lambda_i \quad \text{s.t.} \quad A^\top \lambda + c = 0,"
    r" \quad \lambda_i \geq 0, \; i = 1, \ldots, m",
    r"\max_{\lambda} -b^\top\lambda \quad \text{s.t.} \quad A^\top \lambda + c = 0, \;"
    r" \lambda_i \ge 0 \text{ for all } i",
    r"\max_{\lambda} -b^\top\lambda \quad \text{s.t.} \quad A^\top \lambda + c = 0, \quad"
    r" -\lambda_i \le 0 \quad \forall i \in \{1, \dots, m\}",
]


@pytest.mark.parametrize("body", LP)
def test_lp_spellings(body: str) -> None:
    t = fragment(body, "joinery_lp")
    assert t.ok, t.diagnostics
    objective, constraints, mine = agreement(t, "joinery_lp")
    assert objective and all(constraints) and mine == len(constraints) == 2, t.text


def test_matrix_inequality_stays_semidefinite() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): two-way partitioning has
    # g(nu) = -1'nu where W + diag(nu) is positive semidefinite; a vector's \succeq is
    # entrywise, a matrix's is the semidefinite order.
    body = (r"\max_{\nu} -\mathbf{1}^\top \nu \quad \text{s.t.} \quad W + "
            r"\operatorname{diag}(\nu) \succeq 0")
    t = fragment(body, "shift_partition")
    assert t.ok, t.diagnostics
    assert "W + diag(side) succeq 0" in (t.text or "")
    objective, constraints, mine = agreement(t, "shift_partition")
    assert objective and all(constraints) and mine == len(constraints) == 1


def test_kernel_entries_become_a_quadratic_form() -> None:
    # The declared correspondence (docs/paper-claims.md): sum_ij u_i v_j K_ij = u' K v;
    # with K = W and u = v = nu this is nu' W nu (common practice).
    body = r"\max_{\nu} \sum_{i,j} \nu_i \nu_j W_{ij} - \sum_i \nu_i"
    t = fragment(body, "shift_partition")
    assert t.ok, t.diagnostics
    assert "side' * W * side - sum(side)" in (t.text or "")
