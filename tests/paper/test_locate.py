"""Finding claims in a draft: markers, name maps, labels, and the located refusals."""

from __future__ import annotations

import pytest

from dualize.paper.draft import split_claim_path
from dualize.paper.locate import PaperError, find_claims, parse_map

DRAFT = r"""\section{Dual}
% dualize: claim for examples/joinery_lp.prob map \lambda=hours, nu = z
\begin{align*}
\max_{\lambda} & -b^T\lambda \label{eq:lp}
\end{align*}
text
% dualize: claim for examples/survey_least_norm.prob
\[ \max_{\nu} -b^\top \nu \]
\begin{equation}\label{eq:other} \max_x x \end{equation}
"""


def test_every_marked_claim_is_found_in_file_order() -> None:
    claims = find_claims(DRAFT, "d.tex")
    assert [(c.line, c.environment, c.problem_path) for c in claims] == [
        (3, "align*", "examples/joinery_lp.prob"), (8, "\\[", "examples/survey_least_norm.prob")]
    assert claims[0].name_map == (("lambda", "hours"), ("nu", "z"))
    assert claims[0].label == "eq:lp"
    assert claims[1].body.strip() == "\\max_{\\nu} -b^\\top \\nu"


def test_a_label_selects_an_unmarked_display() -> None:
    (claim,) = find_claims(DRAFT, "d.tex", "eq:other")
    assert claim.line == 9 and claim.problem_path is None
    assert claim.body.strip().endswith("\\max_x x")


def test_unknown_label_and_unmarked_draft_are_refused() -> None:
    with pytest.raises(PaperError, match="eq:none"):
        find_claims(DRAFT, "d.tex", "eq:none")
    with pytest.raises(PaperError, match="no claim found"):
        find_claims("\\begin{equation*} x \\end{equation*}", "d.tex")


def test_marker_without_display_is_located() -> None:
    with pytest.raises(PaperError) as err:
        find_claims("a\n% dualize: claim for p.prob\nsome text\n", "d.tex")
    (d,) = err.value.diagnostics
    assert d.rule == "paper-no-claim" and d.span is not None and d.span.line == 2


def test_unclosed_display_is_located() -> None:
    with pytest.raises(PaperError) as err:
        find_claims("% dualize: claim\n\\begin{equation*}\n\\max_x x\n", "d.tex")
    (d,) = err.value.diagnostics
    assert d.span is not None and (d.span.line, d.span.column) == (2, 1)


def test_claim_paths_and_maps() -> None:
    assert split_claim_path("draft.tex#eq:dual") == ("draft.tex", "eq:dual")
    assert split_claim_path("draft.tex") == ("draft.tex", None)
    assert parse_map("alpha=a; w = w, broken") == (("alpha", "a"), ("w", "w"))
