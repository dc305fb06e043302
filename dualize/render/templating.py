"""The jinja2 environment that arranges rendered pieces into documents.

Templates receive strings that are already LaTeX, Markdown or text; they only
place them (headings, order, blank lines), so no mathematics lives in a template.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

TEMPLATES = Path(__file__).resolve().parent.parent / "templates"


def _environment() -> Any:
    """A fresh environment: cheap, and no state is kept between renders."""
    import jinja2

    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(TEMPLATES)),
        autoescape=False,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )


def fill(template: str, **context: Any) -> str:
    """The named template filled with already-rendered strings."""
    return _environment().get_template(template).render(**context)
