"""Compile a LaTeX source with pdflatex in a folder and return its log (test helper)."""

from __future__ import annotations

import subprocess
from pathlib import Path


def compile_log(source: str, folder: Path) -> str:
    """The pdflatex log of ``source``; fails the test when no PDF comes out."""
    (folder / "doc.tex").write_text(source, encoding="utf-8")
    subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"],
                   cwd=folder, capture_output=True, timeout=120, check=False)
    log = (folder / "doc.log").read_text(encoding="latin-1")
    assert (folder / "doc.pdf").exists(), log[-2000:]
    return log
