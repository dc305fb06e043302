"""`dualize check-draft`: four textbook duals of the examples, in one call."""

from __future__ import annotations

import json
from pathlib import Path

from click.testing import CliRunner

from dualize.cli import main

DRAFT = Path(__file__).resolve().parent / "drafts" / "four_duals.tex"


def test_four_duals_in_one_call_with_their_lines() -> None:
    # The textbook duals (C. Cortes and V. Vapnik, 1995; S. Boyd and L. Vandenberghe,
    # Convex Optimization, 2004, sections 5.2.1, 5.1.3 and 5.1.6; from memory), one with
    # the factor 1/2 where the least-norm dual has 1/4: a valid bound that is not tight.
    result = CliRunner().invoke(main, ["check-draft", str(DRAFT), "--format", "json"])
    claims = json.loads(result.output)["claims"]
    verdicts = [(c["line"], c["verdict"]) for c in claims]
    assert verdicts == [(7, "equivalent"), (16, "equivalent"), (21, "valid bound, not tight"),
                        (26, "equivalent")]
    assert result.exit_code == 1


def test_text_lines_name_the_draft_and_line() -> None:
    result = CliRunner().invoke(main, ["check-draft", str(DRAFT)])
    first = result.output.splitlines()[0]
    assert first.startswith(f"{DRAFT}:7: equivalent")
