"""Reading a claim against its primal: borrowed data lines, sense, foreign names."""

from __future__ import annotations

import pytest

from dualize.checking.claims import ClaimError, load_claim, used_names, with_primal_data
from dualize.checking.counterexample import default_path
from tests.checking.paths import example


def test_data_lines_are_inserted_after_the_title() -> None:
    primal = example("parts_soft_margin")
    text = 'title "mine"\nmaximize sum(alpha)\nover alpha in [0, C]^m\n'
    joined, borrowed = with_primal_data(primal, text, "c.prob")
    assert borrowed == ("C",)
    assert joined.splitlines()[:2] == ['title "mine"', "data C in R_++"]


def test_declared_data_is_not_borrowed_and_names_in_comments_are_ignored() -> None:
    primal = example("survey_least_norm")
    text = "# uses A and b\ndata b in R^m\nmaximize -b' * nu\nover nu in R^m\n"
    joined, borrowed = with_primal_data(primal, text, "c.prob")
    assert borrowed == () and joined == text
    assert "A" not in used_names(text)


def test_a_claim_that_minimizes_a_lower_bound_is_refused() -> None:
    with pytest.raises(ClaimError, match="must maximize"):
        load_claim(example("survey_least_norm"), "minimize -b' * nu\nover nu in R^m\n")


def test_a_claim_with_another_shape_for_shared_data_is_refused() -> None:
    with pytest.raises(ClaimError, match="R\\^n"):
        load_claim(example("survey_least_norm"), "data b in R^n\nmaximize -b' * nu\n"
                   "over nu in R^n\n")


def test_a_claim_with_a_size_of_its_own_is_refused() -> None:
    with pytest.raises(ClaimError, match="'k'"):
        load_claim(example("survey_least_norm"), "maximize -sum(nu)\nover nu in R^k\n")


def test_claim_errors_carry_diagnostics() -> None:
    with pytest.raises(ClaimError) as caught:
        load_claim(example("survey_least_norm"), "maximize -b' * mu\nover nu in R^m\n")
    assert caught.value.diagnostics and caught.value.exit_code == 2


def test_default_counterexample_path() -> None:
    assert default_path("tests/claims/x.prob") == "tests/claims/x.counterexample.json"
    assert default_path("plain") == "plain.counterexample.json"
