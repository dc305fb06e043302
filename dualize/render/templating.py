"""The jinja2 environment that arranges rendered pieces into documents.

Templates receive strings that are already LaTeX, Markdown or text; they only
place them (headings, order, blank lines), so no mathematics lives in a template.

Compiling a template costs a few hundredths of a second in every process that
renders one, so the package ships the templates compiled by jinja2 itself
(``Environment.compile_templates``) in ``templates/compiled``, with a stamp: the
jinja2 version and a hash of each template's text.  They are used only while the
stamp matches the installed jinja2 and the templates on disk; an edited
template or another jinja2 reads the ``.j2`` files as before.
``tests/render/regenerate_compiled_templates.py`` rewrites them, and
``tests/render/test_compiled_templates.py`` checks that they are current.
"""

from __future__ import annotations

import hashlib
from pathlib import Path
from typing import Any

TEMPLATES = Path(__file__).resolve().parent.parent / "templates"
COMPILED = TEMPLATES / "compiled"
STAMP = COMPILED / "stamp.txt"


def environment(loader: Any = None) -> Any:
    """A fresh environment (cheap, and no state is kept between renders) reading the
    templates through ``loader``, by default the ``.j2`` files."""
    import jinja2

    return jinja2.Environment(
        loader=loader or jinja2.FileSystemLoader(str(TEMPLATES)),
        autoescape=False,
        keep_trailing_newline=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )


def stamp(jinja_version: str) -> str:
    """What the compiled templates were made from: jinja2's version and each template."""
    lines = [f"jinja2 {jinja_version}"]
    for path in sorted(TEMPLATES.glob("*.j2")):
        lines.append(f"{path.name} {hashlib.sha256(path.read_bytes()).hexdigest()}")
    return "\n".join(lines) + "\n"


def _loader() -> Any:
    """The shipped compiled templates while their stamp holds, else the ``.j2`` files."""
    import jinja2

    try:
        current = STAMP.read_text(encoding="utf-8") == stamp(jinja2.__version__)
    except OSError:
        current = False
    if current:
        return jinja2.ModuleLoader(str(COMPILED))
    return jinja2.FileSystemLoader(str(TEMPLATES))


def fill(template: str, **context: Any) -> str:
    """The named template filled with already-rendered strings."""
    return environment(_loader()).get_template(template).render(**context)
