"""Broken problem files: each names, in its first line, the rule it must trigger."""

import re
from pathlib import Path

import pytest

from dualize.model import load_file

BROKEN = sorted((Path(__file__).parent / "broken").glob("*.prob"))


def expected_rule(path: Path) -> str:
    first = path.read_text(encoding="utf-8").splitlines()[0]
    match = re.fullmatch(r"# expect: ([a-z0-9-]+)", first)
    assert match, f"{path.name} must start with '# expect: RULE'"
    return match.group(1)


def test_there_are_broken_files() -> None:
    assert len(BROKEN) >= 10


@pytest.mark.parametrize("path", BROKEN, ids=[p.stem for p in BROKEN])
def test_broken_file_reports_its_rule(path: Path) -> None:
    loaded = load_file(path)
    assert loaded.problem is None
    assert loaded.diagnostics[0].rule == expected_rule(path)
    assert all(d.span is not None and d.span.line >= 1 for d in loaded.diagnostics)
