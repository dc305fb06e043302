"""The public API is the one way in: the commands print what it returns.

Checks against outside facts name their source; the rest checks that the
program and the library agree, and that the commands reach the stages only
through ``dualize.api``.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from dualize import api
from dualize.cli import main
from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from tests.architecture.import_graph import arrows

ROOT = Path(__file__).resolve().parents[2]
SURVEY = str(ROOT / "examples" / "survey_least_norm.prob")


# Besides the API, commands may import formatters (printers, pictures) and the server
# they start; nothing that computes.
FORMATTERS = ("dualize.render.diagnostics", "dualize.render.formats",
              "dualize.multipliers.printing", "dualize.multipliers.path_print",
              "dualize.multipliers.plot", "dualize.lsp.run")
# Commands that still compute something themselves; the list only shrinks.
STILL_COMPUTING = {("dualize.commands.trade_off", "dualize.multipliers.path")}


def _reached() -> set[tuple[str, str]]:
    # replay and outfile only read and write finished text (a replayed output must not
    # import the API, whose import loads sympy).
    allowed = ("dualize.api", "dualize.commands", "dualize.errors", "dualize.deadline",
               "dualize.replay", "dualize.outfile", *FORMATTERS)
    return {(a.source, a.target) for a in arrows() if a.source.startswith("dualize.commands")
            and not a.target.startswith(allowed)}


def test_commands_reach_the_stages_only_through_the_api() -> None:
    assert _reached() - STILL_COMPUTING == set()


def test_the_list_of_commands_still_computing_only_shrinks() -> None:
    assert STILL_COMPUTING <= _reached()


def test_a_problem_is_text_a_path_or_loaded() -> None:
    text = Path(SURVEY).read_text(encoding="utf-8")
    by_path = api.load_problem(SURVEY)
    assert api.load_problem(Path(SURVEY)).title == by_path.title
    assert api.load_problem(text).title == by_path.title
    assert api.load_problem(by_path) is by_path


def test_a_missing_file_is_bad_input() -> None:
    with pytest.raises(DualizeError) as caught:
        api.load_problem("no/such/plan.prob")
    assert caught.value.exit_code == 2 and "no such problem file" in caught.value.message


def test_a_problem_with_errors_carries_its_diagnostics() -> None:
    with pytest.raises(api.ProblemError) as caught:
        api.derive("minimize x +\nover x in R\n")
    err = caught.value
    assert err.exit_code == 2 and [d.rule for d in err.diagnostics] == ["dangling-operator"]
    assert "1 | minimize x +" in str(err) and str(err).endswith("nothing was derived")


def test_the_derivation_displays_itself_at_the_api_only() -> None:
    dual = api.derive(SURVEY)
    assert isinstance(dual, Derivation)
    assert not hasattr(Derivation, "_repr_latex_")  # the duality stage prints nothing
    # Boyd and Vandenberghe, Convex Optimization, 2004, section 5.1.4 (from memory): the
    # least-norm dual maximizes -(1/4) nu' A A' nu - b' nu.
    assert "-\\tfrac{1}{4}" in dual._repr_latex_()
    assert dual._repr_markdown_().startswith("# Least-norm correction")


def test_derive_prints_what_the_api_renders() -> None:
    out = CliRunner().invoke(main, ["derive", SURVEY, "--format", "json"])
    assert out.exit_code == 0
    assert out.output == api.derive(SURVEY, with_analysis=True).render("json")


def test_lint_prints_what_the_api_returns() -> None:
    path = str(ROOT / "examples" / "shift_partition.prob")
    out = CliRunner().invoke(main, ["lint", "--format", "json", path])
    result = api.lint([path])
    assert json.loads(out.output) == result.json()
    assert out.exit_code == (0 if result.ok else 1)
    assert "| `nonconvex-equality` |" in result._repr_markdown_()


def test_verify_prints_what_the_api_returns() -> None:
    pytest.importorskip("cvxpy")
    out = CliRunner().invoke(main, ["verify", SURVEY, "--format", "json"])
    result = api.verify(SURVEY)
    assert json.loads(out.output) == result.json()
    assert out.exit_code == 0 and result.ok
    assert result._repr_markdown_().startswith("**verdict: zero-gap")


def test_check_rejects_a_claim_off_by_a_factor() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.4 (from memory): the factor is 1/4; with
    # 1/2 the claimed optimum falls short of the primal's.
    pytest.importorskip("cvxpy")
    claim = "maximize -1/2 * nu' * A * A' * nu - b' * nu\nover nu in R^m\n"
    result = api.check(SURVEY, claim, random=1)
    assert not result.ok and result.verdict != "equivalent"
    assert "**verdict:" in result._repr_markdown_()


def test_the_generated_solver_is_the_commands(tmp_path: Path) -> None:
    target = tmp_path / "solver.py"
    out = CliRunner().invoke(main, ["solver", SURVEY, "-o", str(target)])
    assert out.exit_code == 0
    assert target.read_text(encoding="utf-8") == api.generate_solver(SURVEY).code


def test_reports_speak_their_own_status_words() -> None:
    # The reference solver's vocabulary ("optimal", "optimal_inaccurate") stays inside;
    # users read the program's words (docs/checking.md).
    pytest.importorskip("cvxpy")
    result = api.verify(SURVEY)
    rows = result.json()["instances"]
    assert {(r["primal_status"], r["dual_status"]) for r in rows} == {("solved", "solved")}
    assert "solved/solved" in result.text() and "optimal/" not in result.text()


def test_a_time_limit_reaches_the_engine() -> None:
    # A budget spent before the first step: the derivation says which steps were cut,
    # and a library call without a limit cuts nothing.
    from dualize.deadline import Deadline

    entropy = str(ROOT / "examples" / "route_entropy.prob")
    cut = api.derive(entropy, time_limit=Deadline(1e-9))
    assert any(note.startswith("Time limit:") for note in cut.notes)
    assert api.derive(entropy).notes == ()
