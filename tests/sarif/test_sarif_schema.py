"""SARIF output validated against the OASIS SARIF 2.1.0 JSON schema (vendored beside this
file, see ORIGIN.md: OASIS, Static Analysis Results Interchange Format Version 2.1.0,
schema sarif-2.1.0-rtm.5)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from dualize.diagnostics import Diagnostic
from dualize.lint import rule_table
from dualize.render.sarif import artifact_uri, sarif_log
from dualize.syntax.span import Span

SCHEMA = Path(__file__).with_name("sarif-2.1.0-rtm.5.json")


def validate(log: dict) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    jsonschema.Draft4Validator.check_schema(schema)
    errors = sorted(jsonschema.Draft4Validator(schema).iter_errors(log), key=str)
    assert not errors, [e.message for e in errors]


def test_log_of_mixed_findings_is_valid() -> None:
    found = [
        Diagnostic("nonconvex-equality", "warning", "equality 'nu' is not affine",
                   "models/part ition.prob", Span(5, 3, 5, 20, 40, 57), hint="write it as..."),
        Diagnostic("slater-undecided", "info", "cannot be decided", "/abs/ball.prob", None),
        Diagnostic("syntax-error", "error", "unexpected token", "bad.prob",
                   Span(1, 1, 1, 2, 0, 1), notes=("expected a name",)),
    ]
    log = sarif_log(found, rule_table())
    validate(log)
    run = log["runs"][0]
    assert log["version"] == "2.1.0"
    assert [r["level"] for r in run["results"]] == ["warning", "note", "error"]
    ids = [r["id"] for r in run["tool"]["driver"]["rules"]]
    assert ids == sorted(ids)
    for result in run["results"]:
        assert ids[result["ruleIndex"]] == result["ruleId"]
    region = run["results"][0]["locations"][0]["physicalLocation"]["region"]
    assert region == {"startLine": 5, "startColumn": 3, "endLine": 5, "endColumn": 20}


def test_empty_log_is_valid() -> None:
    validate(sarif_log([], rule_table()))


def test_lint_of_the_examples_is_valid() -> None:
    from dualize.lint import lint_paths

    examples = Path(__file__).resolve().parents[2] / "examples"
    if not examples.is_dir():
        pytest.skip("no bundled examples")
    report = lint_paths([examples], jobs=1)
    validate(sarif_log(report.diagnostics, rule_table()))


def test_uris() -> None:
    assert artifact_uri("models/part ition.prob") == "models/part%20ition.prob"
    assert artifact_uri("/abs/ball.prob") == "file:///abs/ball.prob"
