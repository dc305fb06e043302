"""`dualize derive` through click's runner: formats, files, exit codes."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

from click.testing import CliRunner

from dualize.cli import main

ROOT = Path(__file__).resolve().parents[2]
SVM = str(ROOT / "examples" / "parts_soft_margin.prob")


def test_text_output_states_the_dual() -> None:
    result = CliRunner().invoke(main, ["derive", SVM])
    assert result.exit_code == 0, result.output
    assert "Dual problem" in result.output and "maximize" in result.output


def test_json_output_has_the_documented_fields() -> None:
    result = CliRunner().invoke(main, ["derive", SVM, "--format", "json"])
    assert result.exit_code == 0
    record = json.loads(result.output)
    for key in ("version", "primal", "dual", "strong_duality", "kkt", "recovery"):
        assert key in record
    assert record["dual"]["closed_form"] is True
    assert [v["name"] for v in record["dual"]["variables"]] == ["alpha"]


def test_output_file_is_written_whole(tmp_path: Path) -> None:
    out = tmp_path / "dual.tex"
    result = CliRunner().invoke(main, ["derive", SVM, "--format", "latex", "--standalone",
                                       "-o", str(out)])
    assert result.exit_code == 0 and result.output == ""
    text = out.read_text(encoding="utf-8")
    assert text.startswith("\\documentclass") or "\\documentclass" in text
    assert text.rstrip().endswith("\\end{document}")


def test_broken_problem_leaves_an_existing_file_untouched(tmp_path: Path) -> None:
    bad = tmp_path / "bad.prob"
    bad.write_text("minimize x +\nover x in R\n", encoding="utf-8")
    out = tmp_path / "out.md"
    out.write_text("before", encoding="utf-8")
    result = CliRunner().invoke(main, ["derive", str(bad), "-o", str(out)])
    assert result.exit_code == 2
    assert "dangling-operator" in result.output
    assert "Traceback" not in result.output
    assert out.read_text(encoding="utf-8") == "before"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.prob", "out.md"]


def test_missing_file_is_a_usage_error() -> None:
    result = CliRunner().invoke(main, ["derive", "no/such/file.prob"])
    assert result.exit_code == 2 and "no such problem file" in result.output


def test_output_is_byte_identical_across_hash_seeds() -> None:
    # Common practice: deterministic output does not depend on Python's hash seed.
    outputs = set()
    for seed in ("1", "2"):
        env = dict(os.environ, PYTHONHASHSEED=seed, NO_COLOR="1")
        run = subprocess.run([sys.executable, "-m", "dualize", "derive", SVM, "--format",
                              "json"], capture_output=True, env=env, check=True, cwd=ROOT)
        outputs.add(run.stdout)
    assert len(outputs) == 1
