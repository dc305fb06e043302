"""`dualize lint` through click's runner: output, formats and exit codes.

Exit codes follow the common convention of linters (0 clean, 1 findings, 2 usage
error; common practice, e.g. flake8 and ruff behave so).
"""

import json
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

import dualize.lint
from dualize.cli import main
from dualize.diagnostics import Diagnostic

GOOD = "title \"Plan\"\ndata c in R^n\nminimize c' * x\nover x in R^n\nsubject to\n  x >= 0\n"
BAD = "minimize x +\nover x in R\n"


@pytest.fixture(autouse=True)
def front_end_only(monkeypatch: pytest.MonkeyPatch) -> None:
    """These tests are about the front end; the analysis stage is tested on its own.

    Tests of the hook itself replace it again with a stand-in stage.
    """
    monkeypatch.setattr(dualize.lint, "analysis_hook", lambda: None)


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def test_clean_file_exits_zero(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["lint", str(write(tmp_path, "good.prob", GOOD))])
    assert result.exit_code == 0, result.output
    assert "0 error(s)" in result.output


def test_error_exits_one_with_compiler_style_text(tmp_path: Path) -> None:
    path = write(tmp_path, "bad.prob", BAD)
    result = CliRunner().invoke(main, ["lint", str(path)])
    assert result.exit_code == 1
    lines = result.output.splitlines()
    message = "`+` ends the line but nothing follows it"
    assert lines[0] == f"{path}:1:12: error[dangling-operator]: {message}"
    assert lines[1] == " 1 | minimize x +"
    assert lines[2] == "   |            ^"
    assert lines[3].startswith("  hint: ")


def test_json_format(tmp_path: Path) -> None:
    path = write(tmp_path, "bad.prob", BAD)
    result = CliRunner().invoke(main, ["lint", "--format", "json", str(path)])
    assert result.exit_code == 1
    records = json.loads(result.output)
    assert records[0]["rule"] == "dangling-operator"
    assert (records[0]["line"], records[0]["column"]) == (1, 12)
    assert set(records[0]) == {"rule", "severity", "message", "path", "line", "column",
                               "end_line", "end_column", "hint"}


def test_folders_are_searched_recursively_in_sorted_order(tmp_path: Path) -> None:
    write(tmp_path, "b/second.prob", BAD)
    write(tmp_path, "a/first.prob", BAD)
    write(tmp_path, "a/notes.txt", "not a problem")
    result = CliRunner().invoke(main, ["lint", "--format", "json", str(tmp_path)])
    paths = [r["path"] for r in json.loads(result.output)]
    assert paths == [str(tmp_path / "a/first.prob"), str(tmp_path / "b/second.prob")]


def test_output_is_deterministic(tmp_path: Path) -> None:
    write(tmp_path, "x.prob", BAD)
    write(tmp_path, "y.prob", "data A in R^(m,n)\nminimize sum(A*x) over x in R^m\n")
    runs = {CliRunner().invoke(main, ["lint", str(tmp_path)]).output for _ in range(3)}
    assert len(runs) == 1


def test_missing_path_exits_two_with_one_line(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["lint", str(tmp_path / "nowhere.prob")])
    assert result.exit_code == 2
    assert result.output.strip().count("\n") == 0
    assert "no such file or folder" in result.output


def test_usage_errors_exit_two() -> None:
    assert CliRunner().invoke(main, ["lint"]).exit_code == 2
    assert CliRunner().invoke(main, ["lint", "--format", "yaml", "x.prob"]).exit_code == 2


def test_binary_file_is_a_diagnostic_not_a_crash(tmp_path: Path) -> None:
    path = tmp_path / "blob.prob"
    path.write_bytes(bytes(range(256)))
    result = CliRunner().invoke(main, ["lint", str(path)])
    assert result.exit_code == 1
    assert "not-utf8" in result.output


def test_version() -> None:
    result = CliRunner().invoke(main, ["--version"])
    assert result.exit_code == 0 and "dualize" in result.output


def test_help_imports_no_heavy_library() -> None:
    code = ("import sys; from dualize.cli import main\n"
            "try:\n    main(['--help'])\nexcept SystemExit:\n    pass\n"
            "names = ('sympy', 'scipy', 'cvxpy', 'numpy', 'lark')\n"
            "heavy = [m for m in names if m in sys.modules]\n"
            "print(heavy)")
    root = Path(__file__).resolve().parents[2]
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=root,
                         check=True)
    assert out.stdout.strip().splitlines()[-1] == "[]"


class _Analysis:
    def __init__(self, problem: object) -> None:
        self.diagnostics = (Diagnostic("planted-finding", "warning", "planted", "p.prob"),)


def test_analysis_findings_are_added_when_the_stage_is_present(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(dualize.lint, "analysis_hook", lambda: _Analysis)
    result = CliRunner().invoke(main, ["lint", str(write(tmp_path, "good.prob", GOOD))])
    assert result.exit_code == 0
    assert "warning[planted-finding]: planted" in result.output


def test_internal_errors_are_one_line_with_exit_three(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    def broken(problem: object) -> object:
        raise RuntimeError("boom")

    monkeypatch.setattr(dualize.lint, "analysis_hook", lambda: broken)
    result = CliRunner().invoke(main, ["lint", str(write(tmp_path, "good.prob", GOOD))])
    assert result.exit_code == 3
    assert result.output.strip() == "internal error: RuntimeError: boom"


def test_unreadable_file_exits_two(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    path = write(tmp_path, "locked.prob", GOOD)

    def refuse(self: Path) -> bytes:
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(Path, "read_bytes", refuse)
    result = CliRunner().invoke(main, ["lint", str(path)])
    assert result.exit_code == 2
    assert result.output.strip() == f"dualize: cannot read {path}: Permission denied"


def test_byte_order_mark_is_accepted(tmp_path: Path) -> None:
    path = tmp_path / "bom.prob"
    path.write_bytes(b"\xef\xbb\xbf" + GOOD.encode("utf-8"))
    assert CliRunner().invoke(main, ["lint", str(path)]).exit_code == 0
