"""``dualize check`` through click's runner: verdicts, exit codes, files written."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

from click.testing import CliRunner

from dualize.commands.check import check_command
from tests.checking.paths import EXAMPLES, claim_path


def _run(*args: str):  # type: ignore[no-untyped-def]
    return CliRunner().invoke(check_command, list(args))


def test_equivalent_claim_exits_0_with_the_method_named() -> None:
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): the inequality-form LP dual.
    result = _run(str(EXAMPLES / "joinery_lp.prob"), "--claim", claim_path("lp_inequality_dual"))
    assert result.exit_code == 0, result.output
    assert "verdict: equivalent (by symbolic means)" in result.output
    assert "lam = hours (by shape)" in result.output
    assert "data taken from the primal: A, b, c" in result.output


def test_not_tight_claim_exits_1_with_the_largest_gap_in_json() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): with 1/2 for 1/4 the
    # least-norm dual peaks at p*/2, so the largest gap is half the largest p*.
    result = _run(str(EXAMPLES / "survey_least_norm.prob"), "--claim",
                  claim_path("least_norm_half"), "--format", "json")
    assert result.exit_code == 1
    data = json.loads(result.output)
    assert data["verdict"] == "valid bound, not tight" and data["method"] == "numeric"
    halves = [i["primal_value"] / 2 for i in data["instances"]]
    assert abs(data["max_gap"] - max(halves)) <= 1e-6 * max(halves)
    assert data["matched_variables"] == [{"claim": "nu", "derived": "nu1", "how": "shape"}]
    assert data["counterexample"] is None
    assert data["symbolic"]["proved"] is False


def test_invalid_claim_writes_the_default_counterexample_and_replays(tmp_path: Path) -> None:
    # Weak duality (common practice): a dual value above p* is impossible; the saved
    # instance must show it again when given back with --data.
    claim = tmp_path / "qp_sign_error.prob"
    shutil.copy(claim_path("qp_sign_error"), claim)
    primal = str(EXAMPLES / "drone_thrust_qp.prob")
    result = _run(primal, "--claim", str(claim), "--random", "4")
    assert result.exit_code == 1
    assert "verdict: invalid: exceeds the primal optimum" in result.output
    saved = tmp_path / "qp_sign_error.counterexample.json"
    assert saved.is_file() and f"counterexample written to {saved}" in result.output
    again = _run(primal, "--claim", str(claim), "--data", str(saved), "--random", "0",
                 "--save-counterexample", str(tmp_path / "second.json"), "--format", "json")
    assert again.exit_code == 1
    data = json.loads(again.output)
    assert data["verdict"] == "invalid: exceeds the primal optimum"
    assert data["instances"][0]["exceeds_primal"] is True
    assert json.loads((tmp_path / "second.json").read_text()) == json.loads(saved.read_text())


def test_unbounded_claim_has_its_own_verdict(tmp_path: Path) -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): without ||A'nu||_* <= 1
    # the norm-minimization dual is unbounded.
    result = _run(str(EXAMPLES / "antenna_norm_min.prob"), "--claim",
                  claim_path("norm_min_no_ball"), "--random", "2",
                  "--save-counterexample", str(tmp_path / "ce.json"))
    assert result.exit_code == 1
    assert "verdict: claim infeasible or unbounded where the true dual is not" in result.output
    assert "‖Aᵀ gain‖₂ ≤ 1" in result.output
    data = json.loads(_run(str(EXAMPLES / "antenna_norm_min.prob"), "--claim",
                           claim_path("norm_min_no_ball"), "--random", "1", "--format", "json",
                           "--save-counterexample", str(tmp_path / "ce.json")).output)
    [inst] = data["instances"]
    assert inst["claim_value"] is None and inst["claim_status"] == "unbounded"
    assert data["counterexample"] == str(tmp_path / "ce.json")


def test_wrong_sense_and_bad_files_exit_2(tmp_path: Path) -> None:
    primal = str(EXAMPLES / "survey_least_norm.prob")
    wrong = tmp_path / "wrong.prob"
    wrong.write_text("minimize -b' * nu\nover nu in R^m\n")
    result = _run(primal, "--claim", str(wrong))
    assert result.exit_code == 2 and "must maximize" in result.output
    broken = tmp_path / "broken.prob"
    broken.write_text("maximize -b' * \nover nu in R^m\n")
    assert _run(primal, "--claim", str(broken)).exit_code == 2
    foreign = tmp_path / "foreign.prob"
    foreign.write_text("data Q in R^(m,m)\nmaximize -nu' * Q * nu\nover nu in R^m\n")
    result = _run(primal, "--claim", str(foreign))
    assert result.exit_code == 2 and "'Q'" in result.output
    assert _run(primal, "--claim", str(tmp_path / "absent.prob")).exit_code == 2
    assert _run(primal).exit_code == 2  # --claim is required
    assert _run(primal, "--claim", claim_path("least_norm_dual"), "--random", "0"
                ).exit_code == 2


def test_output_is_deterministic() -> None:
    args = (str(EXAMPLES / "flour_blend_lp.prob"), "--claim", claim_path("lp_standard_dual"),
            "--random", "2", "--format", "json")
    assert _run(*args).output == _run(*args).output


def test_command_modules_load_no_heavy_library() -> None:
    # Start-up cost (the project's measured import times): the CLI imports these modules
    # to register the commands, so numpy, sympy, scipy and cvxpy must wait for a run.
    import subprocess
    import sys

    code = ("import sys, dualize.commands.verify, dualize.commands.check\n"
            "print(sorted(m for m in ('numpy', 'sympy', 'scipy', 'cvxpy', 'lark') "
            "if m in sys.modules))")
    root = Path(__file__).resolve().parents[2]
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=root, env={"PYTHONPATH": str(root)}, check=True)
    assert out.stdout.strip() == "[]"


def test_sign_turned_match_is_shown() -> None:
    # Boyd and Vandenberghe, 2004, section 5.7.1 (from memory): the norm-approximation dual
    # maximize b'nu s.t. ||nu||_1 <= 1, A'nu = 0 prices b - Ax; ours prices Ax - b.
    result = _run(str(EXAMPLES / "kiln_minimax.prob"), "--claim", claim_path("minimax_dual"),
                  "--random", "1")
    assert result.exit_code == 0, result.output
    assert "nu = -z (by shape, sign turned)" in result.output


def test_commands_keep_their_exit_codes_inside_the_program_group(tmp_path: Path) -> None:
    # The program's group turns user errors into exit codes; registered there, the
    # commands must keep theirs (0 equivalent, 1 otherwise, 2 bad input).
    import click

    from dualize.cli import DualizeGroup
    from dualize.commands.verify import verify_command

    @click.group(cls=DualizeGroup)
    def program() -> None:
        """A stand-in for the dualize program."""

    program.add_command(check_command)
    program.add_command(verify_command)
    runner = CliRunner()
    primal = str(EXAMPLES / "survey_least_norm.prob")
    ok = runner.invoke(program, ["check", primal, "--claim", claim_path("least_norm_dual"),
                                 "--random", "1"])
    assert ok.exit_code == 0, ok.output
    loose = runner.invoke(program, ["check", primal, "--claim", claim_path("least_norm_half"),
                                    "--random", "1"])
    assert loose.exit_code == 1
    missing = runner.invoke(program, ["verify", str(tmp_path / "none.prob")])
    assert missing.exit_code == 2
