"""``dualize lint`` options: rule selection, failure threshold, pyproject.toml settings,
instances, parallel folders.  Through click's test runner (common practice)."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest
from click.testing import CliRunner

from dualize.cli import main
from dualize.lint import lint_paths
from dualize.lint_config import LintConfig

PARTITION = "data W in S^n\nminimize x' * W * x\nover x in R^n\ns.t.\n  nu: x .* x == 1\n"
BALL = "data r in R\nminimize sum(x)\nover x in R^n\ns.t.\n  ball: ||x|| <= r\n"


def run(args: list[str], cwd: Path) -> tuple[int, str]:
    """Exit code and output of ``dualize ARGS`` run from the folder ``cwd``."""
    old = os.getcwd()
    os.chdir(cwd)
    try:
        result = CliRunner().invoke(main, args)
    finally:
        os.chdir(old)
    return result.exit_code, result.output


def rules(output: str) -> list[str]:
    return sorted(d["rule"] for d in json.loads(output))


@pytest.fixture
def folder(tmp_path: Path) -> Path:
    (tmp_path / "partition.prob").write_text(PARTITION, encoding="utf-8")
    (tmp_path / "ball.prob").write_text(BALL, encoding="utf-8")
    return tmp_path


def test_default_reports_all_and_passes_without_errors(folder: Path) -> None:
    code, out = run(["lint", ".", "--format", "json"], folder)
    assert code == 0
    assert rules(out) == ["convexity-undecided", "nonconvex-equality", "slater-undecided"]


def test_select_by_prefix_and_ignore_by_id(folder: Path) -> None:
    code, out = run(["lint", ".", "--format", "json", "--select", "nonconvex,slater"], folder)
    assert rules(out) == ["nonconvex-equality", "slater-undecided"]
    code, out = run(["lint", ".", "--format", "json", "--ignore", "slater-undecided"], folder)
    assert rules(out) == ["convexity-undecided", "nonconvex-equality"]


def test_longest_selector_wins() -> None:
    config = LintConfig(select=("slater-fails",), ignore=("slater",))
    assert config.keeps("slater-fails") and not config.keeps("slater-undecided")
    config = LintConfig(select=("nonconvex",), ignore=("nonconvex-equality",))
    assert config.keeps("nonconvex-objective") and not config.keeps("nonconvex-equality")
    assert not config.keeps("unused-data")


def test_fail_on_threshold(folder: Path) -> None:
    assert run(["lint", "."], folder)[0] == 0
    assert run(["lint", ".", "--fail-on", "warning"], folder)[0] == 1
    assert run(["lint", "ball.prob", "--fail-on", "warning"], folder)[0] == 0
    assert run(["lint", "ball.prob", "--fail-on", "info"], folder)[0] == 1


def test_settings_from_pyproject_found_upwards(folder: Path) -> None:
    (folder / "pyproject.toml").write_text(
        '[tool.dualize]\nselect = ["nonconvex"]\nfail-on = "warning"\n', encoding="utf-8")
    sub = folder / "deep" / "er"
    sub.mkdir(parents=True)
    code, out = run(["lint", str(folder), "--format", "json"], sub)
    assert code == 1 and rules(out) == ["nonconvex-equality"]
    # options replace the file's settings key by key
    code, out = run(["lint", str(folder), "--format", "json", "--select", "slater",
                     "--fail-on", "error"], sub)
    assert code == 0 and rules(out) == ["slater-undecided"]


def test_bad_settings_are_usage_errors(folder: Path) -> None:
    assert run(["lint", ".", "--select", "no-such-rule"], folder)[0] == 2
    (folder / "pyproject.toml").write_text('[tool.dualize]\nselekt = ["x"]\n',
                                           encoding="utf-8")
    code, out = run(["lint", "."], folder)
    assert code == 2 and "selekt" in out


def test_data_decides_slater(folder: Path) -> None:
    (folder / "ball.json").write_text('{"r": 2.0, "n": 3}', encoding="utf-8")
    code, out = run(["lint", "ball.prob", "--data", "ball.json", "--format", "json"], folder)
    assert code == 0 and rules(out) == []
    (folder / "ball0.json").write_text('{"r": 0.0, "n": 3}', encoding="utf-8")
    code, out = run(["lint", "ball.prob", "--data", "ball0.json", "--format", "json"], folder)
    assert rules(out) == ["slater-fails"]
    assert run(["lint", ".", "--data", "ball.json"], folder)[0] == 2  # one file only


def test_parallel_folder_matches_sequential_and_is_sorted(tmp_path: Path) -> None:
    texts = [PARTITION, BALL] * 4
    for i, text in enumerate(texts):
        (tmp_path / f"case{7 - i}.prob").write_text(text, encoding="utf-8")
    parallel = lint_paths([tmp_path], jobs=2)
    sequential = lint_paths([tmp_path], jobs=1)
    assert parallel == sequential
    assert [f.path for f in parallel.files] == sorted(f.path for f in parallel.files)


def test_sarif_output_is_stable(folder: Path) -> None:
    first = run(["lint", ".", "--format", "sarif"], folder)[1]
    assert first == run(["lint", ".", "--format", "sarif"], folder)[1]
    log = json.loads(first)
    assert [r["ruleId"] for r in log["runs"][0]["results"]] == [
        "slater-undecided", "convexity-undecided", "nonconvex-equality"]


def test_nearest_pyproject_without_our_table_is_passed_over(folder: Path) -> None:
    from dualize.lint_config import load_config

    (folder / "pyproject.toml").write_text('[tool.dualize]\nignore = ["curvature"]\n',
                                           encoding="utf-8")
    inner = folder / "pkg"
    inner.mkdir()
    (inner / "pyproject.toml").write_text('[project]\nname = "other"\n', encoding="utf-8")
    config = load_config(inner)
    assert config.ignore == ("curvature",) and config.source.endswith("pyproject.toml")
    assert not config.keeps("curvature-unknown") and config.keeps("slater-undecided")


def test_former_rule_id_still_selects_and_ignores(folder: Path) -> None:
    # The undecided-convexity rule was renamed; its former id stays an alias.
    code, out = run(["lint", ".", "--format", "json", "--select", "curvature-unknown"], folder)
    assert code == 0 and rules(out) == ["convexity-undecided"]
    code, out = run(["lint", ".", "--format", "json", "--ignore", "curvature"], folder)
    assert rules(out) == ["nonconvex-equality", "slater-undecided"]


def test_former_rule_id_in_pyproject(folder: Path) -> None:
    (folder / "pyproject.toml").write_text('[tool.dualize]\nignore = ["curvature-unknown"]\n',
                                           encoding="utf-8")
    code, out = run(["lint", ".", "--format", "json"], folder)
    assert code == 0 and rules(out) == ["nonconvex-equality", "slater-undecided"]


def test_sarif_names_the_former_id(folder: Path) -> None:
    # SARIF 2.1.0 (OASIS, 2020), section 3.49.4: deprecatedIds lists a rule's former ids.
    log = json.loads(run(["lint", ".", "--format", "sarif"], folder)[1])
    rules_ = {r["id"]: r for r in log["runs"][0]["tool"]["driver"]["rules"]}
    assert rules_["convexity-undecided"]["deprecatedIds"] == ["curvature-unknown"]
    assert "deprecatedIds" not in rules_["slater-fails"]


def test_an_unknown_selector_is_still_refused(folder: Path) -> None:
    code, out = run(["lint", ".", "--select", "curvatures"], folder)
    assert code == 2 and "unknown rule id or prefix: curvatures" in out
