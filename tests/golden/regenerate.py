"""Write the golden renderings of every bundled example: run on purpose only.

    python tests/golden/regenerate.py            # all examples
    python tests/golden/regenerate.py NAME ...   # some of them

Review the diff by eye before committing: the golden files are the reviewed
appearance of each example in each format (LaTeX, Markdown, text, JSON), and
test_golden.py fails when a rendering drifts from them.
"""

from __future__ import annotations

import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
FORMATS = ("tex", "md", "txt", "json")


def example_names() -> list[str]:
    return sorted(p.stem for p in (ROOT / "examples").glob("*.prob"))


def render_all(name: str) -> dict[str, str]:
    """The example in every format, as the command line would print it (no colour)."""
    from dualize.analysis import analyze
    from dualize.duality import derive
    from dualize.model import load_file
    from dualize.render.json_out import render_json
    from dualize.render.latex import render_latex
    from dualize.render.markdown import render_markdown
    from dualize.render.text import render_text

    loaded = load_file(Path("examples") / f"{name}.prob")
    if loaded.problem is None:
        raise SystemExit(f"{name}: the example does not load")
    derivation, analysis = derive(loaded.problem), analyze(loaded.problem)
    return {
        "tex": render_latex(derivation, analysis, standalone=True),
        "md": render_markdown(derivation, analysis),
        "txt": render_text(derivation, analysis),
        "json": render_json(derivation, analysis),
    }


def golden_path(name: str, suffix: str) -> Path:
    return HERE / f"{name}.{suffix}"


def main(names: list[str]) -> None:
    sys.path.insert(0, str(ROOT))
    import os

    os.chdir(ROOT)  # paths inside the output are relative to the repository
    for name in names or example_names():
        for suffix, text in render_all(name).items():
            golden_path(name, suffix).write_text(text, encoding="utf-8")
        print(f"wrote {name}.{{{','.join(FORMATS)}}}")


if __name__ == "__main__":
    main(sys.argv[1:])
