"""The commands prices, reform and trade-off through the command line.

The forms' equivalence (Boyd and Vandenberghe, 2004, sections 4.7.4 and 5.5) is
checked numerically elsewhere; here: outputs, files, exit codes, bad input.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

from dualize.cli import main
from dualize.model import load_file

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = ROOT / "examples"


def run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.stdout, result.stderr


@pytest.mark.parametrize("fmt", ["text", "markdown", "latex", "json"])
def test_prices_in_every_format(fmt: str) -> None:
    code, out, _ = run("prices", str(EXAMPLES / "joinery_lp.prob"), "--format", fmt)
    assert code == 0
    assert "hours[1]" in out
    if fmt == "json":
        data = json.loads(out)
        assert data["bound"]["established"] is True
        # joinery: 1.8 per hour of sawing (scipy's HiGHS gives the same, test_lp_prices)
        first = data["entries"][0]
        assert first["rate"] == pytest.approx(-first["multiplier"])
        assert first["check"] == "agrees"


def test_prices_needs_an_instance(tmp_path: Path) -> None:
    lone = tmp_path / "lone.prob"
    lone.write_text((EXAMPLES / "joinery_lp.prob").read_text())
    code, _, err = run("prices", str(lone))
    assert code == 2 and "--data" in err


def test_prices_bad_instance_is_a_located_error(tmp_path: Path) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text('{"A": "text"}')
    code, _, err = run("prices", str(EXAMPLES / "joinery_lp.prob"), "--data", str(bad))
    assert code == 2 and "bad.json" in err and "Traceback" not in err


def test_prices_with_nothing_to_price_exits_1() -> None:
    code, out, _ = run("prices", str(EXAMPLES / "shift_partition.prob"))
    assert code == 1 and "No global bound is stated" in out


@pytest.mark.parametrize("fmt", ["text", "markdown", "latex", "json"])
def test_reform_writes_a_problem_dualize_reads(tmp_path: Path, fmt: str) -> None:
    out_file = tmp_path / "lasso_bound.prob"
    code, out, _ = run("reform", str(EXAMPLES / "spectrum_lasso.prob"), "--format", fmt,
                       "-o", str(out_file))
    assert code == 0 and "lambda" in out
    loaded = load_file(out_file)
    assert loaded.problem is not None
    assert [c.label for c in loaded.problem.constraints] == ["bound"]
    # and back: the bound turned into a weighted term again
    back = tmp_path / "lasso_again.prob"
    code, _, _ = run("reform", str(out_file), "--bound", "bound", "-o", str(back))
    assert code == 0
    again = load_file(back).problem
    assert again is not None and not again.constraints
    assert {d.name for d in again.data} == {"A", "y", "w"}


def test_reform_of_a_maximization_subtracts_the_weight(tmp_path: Path) -> None:
    code, out, _ = run("reform", str(EXAMPLES / "orchard_mean_variance.prob"), "--format",
                       "json")
    assert code == 0
    data = json.loads(out)
    assert data["weight"] == "gamma" and data["sense"] == "maximize"
    assert "bound: (x' * S * x) <= t" in data["other_form"]


@pytest.mark.parametrize("args,needle", [
    (["--weight", "nope"], "no term 'nope"),
    (["--bound", "nope"], "no constraint labelled"),
    (["--weight", "lambda", "--bound", "b"], "not both"),
    (["--name", "A"], "already"),
    (["--name", "1bad"], "not a name"),
])
def test_reform_bad_requests(args: list[str], needle: str) -> None:
    code, _, err = run("reform", str(EXAMPLES / "spectrum_lasso.prob"), *args)
    assert code == 2 and needle in err


def test_reform_without_a_candidate() -> None:
    code, _, err = run("reform", str(EXAMPLES / "drone_thrust_qp.prob"))
    assert code == 2 and "no weighted term" in err


def test_trade_off_files(tmp_path: Path) -> None:
    csv, svg, png = tmp_path / "p.csv", tmp_path / "p.svg", tmp_path / "p.png"
    code, out, _ = run("trade-off", str(EXAMPLES / "weighbridge_ridge.prob"),
                       "--sweep-weights", "0.01:10:5", "--csv", str(csv), "--svg", str(svg),
                       "--png", str(png))
    assert code == 0, out
    assert len(csv.read_text().splitlines()) == 6
    assert svg.read_text().startswith("<?xml")
    assert png.read_bytes()[:4] == b"\x89PNG"


def test_trade_off_at_the_instances_weight() -> None:
    code, out, _ = run("trade-off", str(EXAMPLES / "weighbridge_ridge.prob"), "--format",
                       "json")
    assert code == 0
    point = json.loads(out)["points"][0]
    assert point["weight"] == 0.5 and point["status"] == "agrees"


@pytest.mark.parametrize("args", [["--sweep-weights", "1:0:5"], ["--sweep-weights", "x"],
                                  ["--sweep-bounds", "0:1:1"],
                                  ["--at-weight", "1", "--at-bound", "1"],
                                  ["--at-weight", "-1"], ["--at-bound", "nan"]])
def test_trade_off_bad_ranges(args: list[str]) -> None:
    code, _, err = run("trade-off", str(EXAMPLES / "weighbridge_ridge.prob"), *args)
    assert code == 2 and "Traceback" not in err


def _svg_in_a_process(path: Path) -> bytes:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    subprocess.run([sys.executable, "-m", "dualize", "trade-off",
                    str(EXAMPLES / "weighbridge_ridge.prob"), "--sweep-weights", "0.01:10:4",
                    "--svg", str(path)], check=True, env=env, capture_output=True, timeout=300)
    return path.read_bytes()


def test_svg_is_byte_identical_across_runs(tmp_path: Path) -> None:
    """Two separate processes draw the same bytes: no dates, no random ids (matplotlib's
    svg.hashsalt fixed and the Date metadata removed, common practice)."""
    first = _svg_in_a_process(tmp_path / "a.svg")
    second = _svg_in_a_process(tmp_path / "b.svg")
    assert first == second
    assert b"<dc:date>" not in first


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex missing")
@pytest.mark.parametrize("command", [
    ["prices", str(EXAMPLES / "pipe_leaks_l1.prob")],
    ["reform", str(EXAMPLES / "orchard_mean_variance.prob")],
    ["trade-off", str(EXAMPLES / "spectrum_lasso.prob"), "--sweep-weights", "0.1:10:3"],
])
def test_standalone_latex_compiles(tmp_path: Path, command: list[str]) -> None:
    """pdflatex accepts the document (common practice: a document that compiles)."""
    code, out, _ = run(*command, "--format", "latex", "--standalone")
    assert code == 0
    (tmp_path / "doc.tex").write_text(out)
    done = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error",
                           "doc.tex"], cwd=tmp_path, capture_output=True, timeout=120)
    assert done.returncode == 0, done.stdout[-2000:]


def test_reform_a_numeric_bound_and_a_taken_label(tmp_path: Path) -> None:
    source = tmp_path / "budget.prob"
    source.write_text("data A in R^(m,n)\ndata y in R^m\ndata t in R_+\n"
                      "minimize ||A*x - y||^2 + t * ||x||_1  # t weighs the 1-norm\n"
                      "over x in R^n\nsubject to\n  bound: sum(x) <= 3\n")
    code, out, _ = run("reform", str(source), "--weight", "t", "--format", "json")
    assert code == 0
    other = json.loads(out)["other_form"]
    assert "bound1: ||x||_1 <= t1" in other and "data t1 in R" in other
    written = tmp_path / "budget_bound.prob"
    written.write_text(other)
    assert load_file(written).problem is not None
    code, out, _ = run("reform", str(written), "--bound", "bound", "--format", "json")
    assert code == 0 and "w * sum(x)" in json.loads(out)["other_form"]


@pytest.mark.parametrize("constraint,needle", [
    ("  lo, box: 0 <= sum(x) <= 1", "one scalar relation"),
    ("  box: x <= 1", "one scalar relation"),
    ("  box: sum(x) == 1", "<= or >="),
])
def test_reform_refuses_what_is_not_a_bound(tmp_path: Path, constraint: str,
                                            needle: str) -> None:
    source = tmp_path / "p.prob"
    source.write_text(f"data c in R^n\nminimize c' * x\nover x in R^n\nsubject to\n"
                      f"{constraint}\n")
    code, _, err = run("reform", str(source), "--bound", "box")
    assert code == 2 and needle in err


def test_trade_off_at_a_bound_written_as_a_number(tmp_path: Path) -> None:
    source = tmp_path / "l1.prob"
    source.write_text("data A in R^(m,n)\ndata y in R^m\nminimize ||A*x - y||^2\n"
                      "over x in R^n\nsubject to\n  l1: ||x||_1 <= 1.5\n")
    data = json.loads((EXAMPLES / "spectrum_lasso.json").read_text())
    data.pop("lambda")
    (tmp_path / "l1.json").write_text(json.dumps(data))
    code, out, _ = run("trade-off", str(source), "--format", "json")
    assert code == 0
    point = json.loads(out)["points"][0]
    # the bound 1.5 and the weight 0.938548 match the lasso's sweep (test_forms_closed_form)
    assert point["bound"] == pytest.approx(1.5) and point["status"] == "agrees"


def test_the_written_form_is_derived_like_any_problem(tmp_path: Path) -> None:
    """The constrained lasso written by reform has the dual of a norm-ball least squares
    problem: derive must succeed on it and keep the bound's multiplier (Boyd and
    Vandenberghe, 2004, section 5.1: one multiplier per constraint, here beside the one
    the engine adds for the residual)."""
    from dualize.duality import derive

    out_file = tmp_path / "lasso_bound.prob"
    assert run("reform", str(EXAMPLES / "spectrum_lasso.prob"), "-o", str(out_file))[0] == 0
    problem = load_file(out_file).problem
    assert problem is not None
    derivation = derive(problem)
    assert "bound" in [v.name for v in derivation.dual.variables]


def test_a_weight_used_elsewhere_is_refused(tmp_path: Path) -> None:
    source = tmp_path / "twice.prob"
    source.write_text("data c in R^n\ndata w in R_+\nminimize c' * x + w * ||x||^2\n"
                      "over x in R^n\nsubject to\n  cap: sum(x) <= w\n")
    code, _, err = run("reform", str(source), "--weight", "w")
    assert code == 2 and "appears elsewhere" in err


def test_a_nonconvex_penalty_is_reported_not_crashed(tmp_path: Path) -> None:
    """r = -||x||^2 is concave: the conditions say so, and no point can be matched."""
    source = tmp_path / "concave.prob"
    source.write_text("data A in R^(m,n)\ndata y in R^m\ndata w in R_+\n"
                      "minimize ||A*x - y||^2 + w * (-(x' * x))\nover x in R^n\n")
    data = json.loads((EXAMPLES / "spectrum_lasso.json").read_text())
    data["w"] = data.pop("lambda")
    (tmp_path / "concave.json").write_text(json.dumps(data))
    code, out, _ = run("reform", str(source), "--format", "json")
    assert code == 0
    statuses = {c["condition"]: c["status"] for c in json.loads(out)["conditions"]}
    assert statuses["r is convex"].startswith("not shown")
    code, out, err = run("trade-off", str(source), "--format", "json")
    assert code == 1 and "internal error" not in err
    assert json.loads(out)["points"][0]["status"] == "failed"


@pytest.mark.parametrize("objective,r_text", [
    ("w * a' * x ./ 2", "(a' * x ./ 2)"),
    ("(x' * x) * w", "(x' * x)"),
    ("2 * w * ||x||^2", "(2 * ||x||^2)"),
    ("c' * x + w * (-(x' * x))", "(-(x' * x))"),
])
def test_weighted_terms_as_written(tmp_path: Path, objective: str, r_text: str) -> None:
    """The weight factors out of a product chain (a scalar commutes, common practice);
    the written bound keeps the term's own text and is read back by the loader."""
    source = tmp_path / "p.prob"
    source.write_text(f"data a in R^n\ndata c in R^n\ndata w in R_+\nminimize {objective}\n"
                      "over x in R^n\n")
    code, out, _ = run("reform", str(source), "--format", "json")
    assert code == 0
    data = json.loads(out)
    assert data["r"] == r_text and f"bound: {r_text} <= t" in data["other_form"]


def test_time_limits_leave_entries_and_points_unchecked() -> None:
    """A run past its time budget says what it did not do (common practice: a bounded run)."""
    code, out, _ = run("prices", str(EXAMPLES / "parts_soft_margin.prob"), "--time-limit",
                       "0.000001", "--format", "json")
    assert code == 0
    entries = json.loads(out)["entries"]
    assert all(e["check"] == "not-checked" and "time limit" in e["note"] for e in entries)
    code, out, _ = run("trade-off", str(EXAMPLES / "weighbridge_ridge.prob"),
                       "--sweep-weights", "0.1:10:3", "--time-limit", "0.000001",
                       "--format", "json")
    assert code == 1
    assert all("time limit" in p["note"] for p in json.loads(out)["points"])


@pytest.mark.parametrize("args", [
    ["reform", str(EXAMPLES / "spectrum_lasso.prob"), "-o", "/nonexistent-folder/x.prob"],
    ["prices", str(EXAMPLES / "joinery_lp.prob"), "--data", "/nonexistent-folder/i.json"],
    ["trade-off", str(EXAMPLES / "weighbridge_ridge.prob"), "--png", "/nonexistent-folder/a"],
    ["prices", str(EXAMPLES / "no_such_problem.prob")],
])
def test_unusable_paths_are_one_line_and_exit_2(args: list[str]) -> None:
    code, _, err = run(*args)
    assert code == 2 and "Traceback" not in err and "internal error" not in err
