"""Write dualize/templates/compiled: the templates compiled by jinja2, and their stamp.

    python tests/render/regenerate_compiled_templates.py

Run after editing a template or upgrading jinja2; until then the package reads the
``.j2`` files (the stamp no longer matches) and is only slower.
test_compiled_templates.py checks that the shipped files are current.
"""

from __future__ import annotations

import shutil
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from dualize.render import templating  # noqa: E402 - the checkout's package, run as a script


def compiled_files() -> dict[str, str]:
    """File name -> text of every compiled template, as jinja2 writes them, and the stamp."""
    import jinja2

    with tempfile.TemporaryDirectory() as folder:
        templating.environment().compile_templates(folder, extensions=["j2"], zip=None,
                                                     ignore_errors=False)
        files = {path.name: path.read_text(encoding="utf-8")
                 for path in sorted(Path(folder).glob("*.py"))}
    files[templating.STAMP.name] = templating.stamp(jinja2.__version__)
    return files


def main() -> None:
    target = templating.COMPILED
    if target.exists():
        shutil.rmtree(target)
    target.mkdir()
    for name, text in compiled_files().items():
        (target / name).write_text(text, encoding="utf-8")
    print(f"wrote {len(list(target.iterdir()))} files to {target}")


if __name__ == "__main__":
    main()
