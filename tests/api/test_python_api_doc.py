"""The walk-through of docs/python-api.md runs as written.

The page is the project's own text: its fenced ``python`` blocks are run in
order in one namespace, from the repository's root, as a reader would run them
in a notebook.  Each block carries its own checks (``assert``).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
PAGE = ROOT / "docs" / "python-api.md"


def python_blocks(text: str) -> list[str]:
    """The bodies of the page's fenced code blocks marked ``python``, in order."""
    return re.findall(r"^```python\n(.*?)^```$", text, flags=re.S | re.M)


def test_the_page_has_code_to_run() -> None:
    blocks = python_blocks(PAGE.read_text(encoding="utf-8"))
    assert len(blocks) >= 8
    assert all(b.strip() for b in blocks)


def test_the_walk_through_runs(monkeypatch: pytest.MonkeyPatch) -> None:
    pytest.importorskip("cvxpy")
    monkeypatch.chdir(ROOT)
    namespace: dict[str, object] = {"__name__": "walk_through"}
    for number, block in enumerate(python_blocks(PAGE.read_text(encoding="utf-8")), 1):
        code = compile(block, f"{PAGE.name}, block {number}", "exec")
        exec(code, namespace)  # noqa: S102 - the project's own documentation text


def test_blocks_are_found_as_written() -> None:
    text = "intro\n```python\nx = 1\n```\n```text\nnot code\n```\n```python\ny = 2\n```\n"
    assert python_blocks(text) == ["x = 1\n", "y = 2\n"]
