"""LaTeX the reader must refuse, each with the line and column in the draft and what it
expected or why: never a translation it cannot stand behind.

The fragment is the third line of its draft (marker, ``\\begin{equation*}``, body);
columns are 1-based as compilers report them (common practice).
"""

from __future__ import annotations

import pytest

from tests.paper.helpers import fragment

SVM, LN, LP = "parts_soft_margin", "survey_least_norm", "joinery_lp"

REFUSED = [
    # an indexed constraint without a for-all condition
    (r"\max_{\alpha} \sum_{i=1}^m \alpha_i \quad \text{s.t.} \quad \alpha_i \ge 0", SVM,
     "paper-index", 61, "bound by no sum"),
    # x_i alone (not in x_i^T u) is a vector-valued sum, which a dual objective is not
    # (a weighted sum of rows, \sum_i alpha_i x_i, is a vector and reads as X' alpha)
    (r"\max_{\alpha} \sum_{i=1}^m \alpha_i x_i^2", SVM, "paper-index", 37, "is row i"),
    (r"\max_{\alpha} \sum_{i,j} \alpha_i \alpha_j", SVM, "paper-index", 15, "without x_i^T x_j"),
    (r"\max_{\alpha} \sum_{i=1}^m \sum_{j=1}^m \sum_{k=1}^m \alpha_i", SVM, "paper-index", 15,
     "more than two"),
    (r"\max_{\alpha} \sum_{i=1}^n \alpha_i", SVM, "paper-index", 28, "runs to n"),
    (r"\max_{\alpha} \sum_{i=2}^m \alpha_i", SVM, "paper-index", 15, "a sum from 2"),
    (r"\max_{\alpha} \sum_{i=1}^m \sum_{j=0}^m \alpha_i \alpha_j K_{ij}", SVM, "paper-index",
     28, "a sum from 0"),
    (r"\max_{\alpha} \alpha_i", SVM, "paper-index", 15, "bound by no sum"),
    (r"\max_{\alpha} \sum_{i} Q_{ij} \alpha_i", SVM, "paper-index", 24, "only i is bound"),
    (r"\max_{\alpha} \mathbf{1}^\top \alpha - \frac12 \alpha^\top Q \alpha", SVM, "paper-name",
     60, "`Q`"),
    (r"\max_{\nu} -\frac{1}{4} \nu^\top A A^\top \nu - b^\top \nu +", LN, "paper-syntax", 61,
     "display ends"),
    (r"\max_{\nu} -\frac{1}{4} \nu^\top A A^\top \nu \mathop{x}", LN, "paper-syntax", 47,
     "`\\mathop` is not a command"),
    (r"\max_{\nu} -\frac{1}{4} \nu^\top (A A^\top \nu", LN, "paper-syntax", 47, "expected ), +, -"),
    (r"\max_{\nu} -b^\top \nu \quad \text{s.t.} \quad \nu < 0", LN, "paper-syntax", 52,
     "unknown character `<`"),
    (r"\max_{\nu} -b^\top \nu \quad \text{s.t.} \quad \|\nu\|_3 \le 1", LN, "paper-unsupported",
     48, "subscript 3"),
    (r"\max_{\nu} -b^\top \nu^{\nu}", LN, "paper-unsupported", 25, "not a number"),
    (r"-b^\top \nu", LN, "paper-syntax", 1, "expected \\max or \\min"),
    (r"\max_{\lambda} -b^\top\lambda \quad \text{s.t.} \quad \lambda \ge 0, \quad i = 1, \dots, m",
     LP, "paper-index", 76, "no constraint that uses i"),
    (r"\max_{\lambda,\mu} -b^\top\lambda - \mu", LP, "paper-name", 7, "by shape"),
    (r"\max_{\lambda} -b^\top\lambda \text{ where } \lambda \ge 0", LP, "paper-syntax", 31,
     "`\\text` is not a command"),
    (r"\max_{\lambda} -b^\top\lambda \quad \text{s.t.} \quad \lambda \ge 0 \ge", LP,
     "paper-syntax", 72, "display ends"),
    (r"\max_{\lambda} \sum_{i=1}^m \exp(b_i) \lambda_i \quad \text{s.t.} \quad "
     r"\sum_{j} A_{ij} \lambda_j \le 1 \;\forall i", LP, "paper-index", 73,
     "sum inside an entrywise"),
    (r"\max_{\lambda} -b^\top\lambda \quad \text{s.t.} \quad \lambda \ge 0 \quad "
     r"\lambda^\top \frac{1}{0} \le 1", LP, "paper-unsupported", 88, "over zero"),
    (r"\max_{\lambda} \sum_{i=1}^m \sum_{j=1}^m \lambda_i \lambda_j x_i^\top z_j", LP,
     "paper-index", 62, "two matrices"),
    # a size as a value, where no set of the claim declares that size
]


@pytest.mark.parametrize(("body", "problem", "rule", "column", "says"), REFUSED)
def test_fragment_is_refused_where_it_goes_wrong(body: str, problem: str, rule: str,
                                                 column: int, says: str) -> None:
    t = fragment(body, problem)
    assert not t.ok and t.text is None
    (d,) = t.diagnostics
    assert d.rule == rule and d.path == "fragment.tex"
    assert d.span is not None and (d.span.line, d.span.column) == (3, column)
    assert says in d.message
    if "`<`" in says:
        assert d.hint is not None and "\\le" in d.hint


def test_a_size_no_set_of_the_claim_declares_is_refused_as_a_value() -> None:
    # The budget split's data B is a scalar, so no line of the claim declares the size n.
    t = fragment(r"\min_{\nu} \; B\nu - n \log \nu - n", "lab_budget_max", "map nu=budget")
    (d,) = t.diagnostics
    assert d.rule == "paper-unsupported" and "the size n as a value" in d.message
    assert d.span is not None and (d.span.line, d.span.column) == (3, 22)


def test_corpus_is_large_enough() -> None:
    assert len(REFUSED) >= 15
