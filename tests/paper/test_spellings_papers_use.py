"""Spellings papers use for the elementwise product, ones vectors, transposes, norms,
fractions, function names and vector-valued sums: each reads, translates to the
language, and the translation is the derived dual.

Sources (from memory): C. Cortes and V. Vapnik, Support-vector networks, 1995, for the
soft-margin dual, written there with sum_i alpha_i y_i x_i; S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, section 5.2.1 for the inequality-form LP dual and 5.1.6 for
entropy maximization; \\circ and \\odot for the Hadamard product are common practice.
"""

from __future__ import annotations

import pytest

from dualize.checking import check_claim
from tests.paper.helpers import agreement, example, fragment

SOFT_MARGIN = "parts_soft_margin"
CONSTRAINTS = r"\quad \text{s.t.} \quad y^\top \alpha = 0, \; 0 \le \alpha \le C \mathbf{1}"

# (spelling, the problem, what the translated claim must contain)
SPELLINGS = [
    (r"\max_{\alpha} \mathbf{1}^\top \alpha - \frac{1}{2} (y \circ \alpha)^\top X X^\top "
     r"(y \circ \alpha)" + CONSTRAINTS, SOFT_MARGIN, "(y .* alpha)'"),
    (r"\max_{\alpha} \mathbf{1}^\top \alpha - \tfrac{1}{2} (y \odot \alpha)^{\mathsf T} X "
     r"X^{\mathsf T} (y \odot \alpha)" + CONSTRAINTS, SOFT_MARGIN, "(y .* alpha)'"),
    (r"\max_{\alpha} \mathbb{1}^\top \alpha - \dfrac{1}{2} \left\| X^\top (y \circ \alpha) "
     r"\right\|_2^2" + CONSTRAINTS, SOFT_MARGIN, "||X' * (y .* alpha)||^2"),
    (r"\max_{\alpha} \one^T \alpha - \frac12 \lVert X' (y \circ \alpha) \rVert_2^2"
     + CONSTRAINTS, SOFT_MARGIN, "||X' * (y .* alpha)||^2"),
    (r"\max_{\alpha} \sum_{i=1}^m \alpha_i - \frac{1}{2} \Big\| \sum_{i=1}^m \alpha_i y_i x_i "
     r"\Big\|_2^2 \quad \text{s.t.} \quad \sum_{i=1}^m y_i \alpha_i = 0, \; 0 \le \alpha_i "
     r"\le C, \; i = 1, \dots, m", SOFT_MARGIN, "X' * (alpha .* y)"),
    (r"\max_{\mathrm{hours} \geq 0} -b^\top \mathrm{hours} \quad \text{s.t.} \quad "
     r"A^\top \mathrm{hours} + c = 0", "joinery_lp", "A' * hours"),
    (r"\max_{\lambda \geq 0} -b' \lambda \quad \text{s.t.} \quad \sum_{i=1}^m \lambda_i a_i "
     r"+ c = 0", "joinery_lp", "A' * (hours)"),
    (r"\max_{\lambda \succeq 0} -b^\top \lambda - \operatorname{log} \mathbf{1}^\top "
     r"\operatorname{exp}(-A^\top \lambda)", "route_entropy", "log(sum(exp("),
]


@pytest.mark.parametrize(("body", "problem", "expected"), SPELLINGS)
def test_spelling_reads_and_translates(body: str, problem: str, expected: str) -> None:
    t = fragment(body, problem)
    assert t.ok, [d.message for d in t.diagnostics]
    assert expected in t.text, t.text


@pytest.mark.parametrize(("body", "problem", "expected"), SPELLINGS)
def test_spelling_is_the_derived_dual(body: str, problem: str, expected: str) -> None:
    t = fragment(body, problem)
    _, constraints, _ = agreement(t, problem)
    assert all(constraints), t.text
    report = check_claim(example(problem), t.text, seeds=(0,))
    assert report.verdict == "equivalent", report.messages


def test_an_elementwise_quotient_reads_as_one() -> None:
    t = fragment(r"\max_{\nu} -b^\top \nu - \mathbf{1}^\top (\nu \oslash \nu)",
                 "survey_least_norm")
    assert t.ok and "nu ./ nu" in t.text.replace("nu1", "nu"), t.text
