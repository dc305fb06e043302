"""DEVELOPERS.md gives true directions: the files it names exist, and so do the
functions, tables and classes its how-tos tell a contributor to use."""

from __future__ import annotations

import importlib
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
GUIDE = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")

# What the how-tos name, as (module, attribute).
NAMED = [
    ("dualize.syntax.build", "Builder"),
    ("dualize.model.expressions", "ExprResolver"),
    ("dualize.model.functions", "TABLE"),
    ("dualize.model.functions", "Function"),
    ("dualize.model.functions", "lookup"),
    ("dualize.duality.conjugate", "conjugate"),
    ("dualize.duality.building_blocks", "recognise"),
    ("dualize.duality.building_blocks", "_INFIMUM"),
    ("dualize.duality.building_blocks", "Infimum"),
    ("dualize.duality.blocks", "Outcome"),
    ("dualize.duality.normal", "tidy"),
    ("dualize.duality.normal", "expand"),
    ("dualize.duality.compare", "same_expression"),
    ("dualize.syntax.rules", "_syntax"),
    ("dualize.model.rules", "_model"),
    ("dualize.analysis.rules", "_kind"),
    ("dualize.paper.rules", "KINDS"),
    ("dualize.lint", "rule_table"),
    ("dualize.diagnostics", "make"),
    ("dualize.diagnostics", "RuleKind"),
    ("dualize.analysis.measured", "Measured"),
    ("dualize.render.formatter", "TargetFormatter"),
    ("dualize.render.ir_layout", "IRLayout"),
    ("dualize.render.document", "build_view"),
    ("dualize.render.templating", "fill"),
    ("dualize.render.formats", "FORMATS"),
    ("dualize.render.formats", "render"),
    ("dualize.commands.common", "reports_user_errors"),
    ("dualize.commands.common", "report_error"),
    ("dualize.cli", "COMMANDS"),
    ("dualize.api", "load_problem"),
    ("dualize.api", "ProblemError"),
    ("dualize.deadline", "Deadline"),
    ("dualize.numeric.solution", "status_word"),
]


def test_every_path_the_guide_names_exists() -> None:
    paths = set(re.findall(r"`((?:dualize|tests|docs|grammar|examples)/[\w./<>-]+)`", GUIDE))
    paths |= set(re.findall(r"^\s*(?:-> )?\s*(dualize/[\w./]+)", GUIDE, flags=re.M))
    concrete = [p for p in paths if "<" not in p]
    assert len(concrete) > 30
    missing = sorted(p for p in concrete if not (ROOT / p.rstrip("/")).exists())
    assert missing == []


def test_every_name_the_how_tos_use_exists() -> None:
    for module, name in NAMED:
        assert re.search(rf"\b{re.escape(name)}\b", GUIDE), name
        assert hasattr(importlib.import_module(module), name), f"{module}.{name}"
