"""A whole draft checked in one call: each marked claim against its own problem file."""

from __future__ import annotations

from dualize.paper.draft import check_draft
from tests.paper.helpers import HERE, draft


def test_four_textbook_duals_checked_in_one_call() -> None:
    # Cortes and Vapnik, 1995; Boyd and Vandenberghe, 2004, sections 5.2.1, 5.1.3 and 5.1.6
    # (all from memory): the soft-margin, LP and entropy duals are right; the least-norm
    # dual has 1/2 where the conjugate of x'x gives 1/4, which makes its value too low
    # (a valid bound that is not tight) rather than equivalent.
    path = str(HERE / "drafts" / "four_duals.tex")
    results = check_draft(draft("four_duals.tex"), path, seeds=(0, 1))
    assert [r.line for r in results] == [7, 16, 21, 26]
    verdicts = [r.verdict for r in results]
    assert verdicts[0] == verdicts[1] == verdicts[3] == "equivalent", [r.error for r in results]
    assert verdicts[2] != "equivalent"
    assert [m.how for m in results[1].translation.matches] == ["map"]
    assert [r.problem_path.rsplit("/", 1)[-1] for r in results] == [
        "parts_soft_margin.prob", "joinery_lp.prob", "survey_least_norm.prob",
        "route_entropy.prob"]


def test_one_claim_for_a_command(tmp_path) -> None:  # type: ignore[no-untyped-def]
    import pytest

    from dualize.paper.draft import is_paper_path, translation_for
    from dualize.paper.locate import PaperError
    from tests.paper.helpers import agreement, example

    target = tmp_path / "draft.tex"
    target.write_text(draft("duals.tex"), encoding="utf-8")
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): the LP dual, by its label.
    t = translation_for(f"{target}#lp:matrix", example("joinery_lp"), (("lambda", "hours"),))
    assert [m.how for m in t.matches] == ["map"]
    objective, constraints, _ = agreement(t, "joinery_lp")
    assert objective and all(constraints)
    assert is_paper_path(f"{target}#lp:matrix") and not is_paper_path("dual.prob")
    with pytest.raises(PaperError) as err:
        translation_for(f"{target}#svm:index", example("joinery_lp"))
    assert err.value.diagnostics and err.value.source.startswith("%")
    with pytest.raises(PaperError, match="no display"):
        translation_for(f"{target}#missing", example("joinery_lp"))


def test_the_claim_for_the_given_problem_is_picked_from_a_draft() -> None:
    from dualize.paper.draft import translation_for
    from tests.paper.helpers import ROOT, example

    path = str(HERE / "drafts" / "four_duals.tex")
    problem = str(ROOT / "examples" / "route_entropy.prob")
    t = translation_for(path, example("route_entropy"), problem_path=problem)
    assert t.ok and t.claim.line == 26
    from dualize.paper.draft import describe

    assert describe(t) == f"claim read from {path}, line 26; lambda = capacity (by shape)"
