"""Repository hygiene: no merge-conflict markers left in tracked text files.

A conflict marker left in a Python module breaks the import, but one left in a
document, a golden file or a template passes silently; this check covers them all
(common practice: git's own conflict markers are seven '<', '=' or '>' at a line's start).
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
MARKER = re.compile(r"^(<{7} |>{7} |={7}$)", re.MULTILINE)
TEXT_SUFFIXES = {".py", ".md", ".j2", ".toml", ".lark", ".prob", ".tex", ".txt", ".json", ""}


def _tracked_files() -> list[Path]:
    try:
        listed = subprocess.run(["git", "ls-files"], cwd=ROOT, capture_output=True,
                                text=True, check=True, timeout=30).stdout.split("\n")
    except (OSError, subprocess.SubprocessError):
        pytest.skip("not a git checkout")
    return [ROOT / name for name in listed if name and Path(name).suffix in TEXT_SUFFIXES]


def test_no_conflict_markers_in_tracked_files() -> None:
    offenders = []
    for path in _tracked_files():
        if not path.is_file():
            continue
        text = path.read_text(encoding="utf-8", errors="replace")
        if MARKER.search(text):
            offenders.append(str(path.relative_to(ROOT)))
    assert offenders == []
