"""The templates the package ships compiled (dualize/templates/compiled) are current, and
a document rendered through them is the document the ``.j2`` files give.

A precompiled template may only save time, never change an output: the rule of any
build cache (common practice).  Stale files are never used, so a template edited
without ``python tests/render/regenerate_compiled_templates.py`` would only make
rendering slower; this test says so instead.
"""

from __future__ import annotations

import sys
from pathlib import Path

import jinja2

from dualize import api
from dualize.render import templating

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
sys.path.insert(0, str(HERE))

import regenerate_compiled_templates as regenerate  # noqa: E402 - beside this test

SHIPPED = {path.name: path.read_text(encoding="utf-8")
           for path in sorted(templating.COMPILED.iterdir()) if path.is_file()}


def _stamped_version() -> str:
    first = SHIPPED[templating.STAMP.name].splitlines()[0]
    return first.removeprefix("jinja2 ")


def test_the_stamp_names_every_template_with_its_current_hash() -> None:
    lines = SHIPPED[templating.STAMP.name]
    assert lines == templating.stamp(_stamped_version())
    assert len(lines.splitlines()) == 1 + len(list(templating.TEMPLATES.glob("*.j2")))


def test_the_shipped_files_are_what_the_installed_jinja2_compiles() -> None:
    if jinja2.__version__ == _stamped_version():
        assert SHIPPED == regenerate.compiled_files()
        assert isinstance(templating._loader(), jinja2.ModuleLoader)
    else:  # made with another jinja2: unused, the .j2 files are read
        assert isinstance(templating._loader(), jinja2.FileSystemLoader)


def test_an_edited_template_is_read_from_its_file(tmp_path: Path, monkeypatch) -> None:
    for path in templating.TEMPLATES.glob("*.j2"):
        (tmp_path / path.name).write_text(path.read_text(encoding="utf-8"), encoding="utf-8")
    (tmp_path / "derivation.txt.j2").write_text("edited {{ title }}\n", encoding="utf-8")
    monkeypatch.setattr(templating, "TEMPLATES", tmp_path)
    assert isinstance(templating._loader(), jinja2.FileSystemLoader)
    assert templating.fill("derivation.txt.j2", title="here") == "edited here\n"


def test_documents_through_the_compiled_templates_equal_those_from_the_sources(
        monkeypatch) -> None:
    derived = api.derive(ROOT / "examples" / "route_entropy.prob", with_analysis=True)
    formats = ("text", "markdown", "latex")
    compiled = [derived.render(fmt) for fmt in formats]
    monkeypatch.setattr(templating, "_loader",
                        lambda: jinja2.FileSystemLoader(str(templating.TEMPLATES)))
    assert [derived.render(fmt) for fmt in formats] == compiled
