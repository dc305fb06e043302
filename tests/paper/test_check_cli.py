"""``dualize check FILE --claim draft.tex[#label]`` through click's runner."""

from __future__ import annotations

import shutil
from pathlib import Path

from click.testing import CliRunner

from dualize.commands.check import check_command
from tests.paper.helpers import HERE, ROOT


def _run(*args: str):  # type: ignore[no-untyped-def]
    return CliRunner().invoke(check_command, list(args))


def _draft(tmp_path: Path) -> str:
    target = tmp_path / "duals.tex"
    shutil.copy(HERE / "drafts" / "duals.tex", target)
    return str(target)


def test_labelled_paper_claim_is_checked(tmp_path: Path) -> None:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.1 (from memory):
    # the inequality-form LP dual, typeset in an array.
    problem = str(ROOT / "examples" / "joinery_lp.prob")
    result = _run(problem, "--claim", _draft(tmp_path) + "#lp:matrix", "--map", "lambda=hours",
                  "--random", "2")
    assert result.exit_code == 0, result.output
    assert "verdict: equivalent" in result.output


def test_untranslatable_paper_claim_exits_2_at_its_place(tmp_path: Path) -> None:
    # The soft-margin dual (C. Cortes and V. Vapnik, 1995, from memory) against the LP:
    # x_i is a row of a matrix the LP does not have, and the message points into the draft.
    problem = str(ROOT / "examples" / "joinery_lp.prob")
    draft = _draft(tmp_path)
    result = _run(problem, "--claim", draft + "#svm:index")
    assert result.exit_code == 2
    assert f"{draft}:12:109: error[paper-index]" in result.output
    assert "no matrix X" in result.output
