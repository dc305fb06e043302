"""Diagnostics as an OASIS SARIF 2.1.0 log, for code-scanning services and editors.

One run, one tool driver named dualize whose ``rules`` are the registered kinds
(sorted by id, each with its message template and its "why it matters" text);
every diagnostic is one result pointing at its file and span.  Columns are
counted in Unicode code points, as the spans are.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from pathlib import PurePath
from typing import Any

from dualize.diagnostics import Diagnostic, RuleKind

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://json.schemastore.org/sarif-2.1.0.json"
_LEVEL = {"error": "error", "warning": "warning", "info": "note"}


def sarif_log(diagnostics: Iterable[Diagnostic], rules: Mapping[str, RuleKind],
              version: str = "0.1.0") -> dict[str, Any]:
    """The SARIF log (a JSON-ready dict) of ``diagnostics``, with ``rules`` as the driver's
    rule table.  Rules a diagnostic names but the table lacks are added by id only."""
    found = list(diagnostics)
    table = dict(sorted(rules.items()))
    for d in found:
        table.setdefault(d.rule, RuleKind(d.rule, d.severity, d.rule, "", "analysis"))
    table = dict(sorted(table.items()))
    index = {rule_id: i for i, rule_id in enumerate(table)}
    driver = {"name": "dualize", "version": version,
              "rules": [_rule(k) for k in table.values()]}
    run = {"tool": {"driver": driver}, "columnKind": "unicodeCodePoints",
           "results": [_result(d, index[d.rule]) for d in found]}
    return {"$schema": SARIF_SCHEMA, "version": SARIF_VERSION, "runs": [run]}


def _rule(kind: RuleKind) -> dict[str, Any]:
    out: dict[str, Any] = {
        "id": kind.id,
        "name": _camel(kind.id),
        "shortDescription": {"text": kind.template},
        "defaultConfiguration": {"level": _LEVEL[kind.severity]},
        "properties": {"stage": kind.stage},
    }
    if kind.aliases:  # SARIF 2.1.0, section 3.49.4: ids a rule was known by before
        out["deprecatedIds"] = list(kind.aliases)
    if kind.why:
        out["fullDescription"] = {"text": kind.why}
        out["help"] = {"text": kind.why}
    return out


def _camel(rule_id: str) -> str:
    """SARIF's ``name`` is an identifier: ``nonconvex-objective`` -> ``NonconvexObjective``."""
    return "".join(part[:1].upper() + part[1:] for part in rule_id.split("-") if part)


def _result(d: Diagnostic, rule_index: int) -> dict[str, Any]:
    text = d.message if d.hint is None else f"{d.message} (hint: {d.hint})"
    out: dict[str, Any] = {"ruleId": d.rule, "ruleIndex": rule_index,
                           "level": _LEVEL[d.severity], "message": {"text": text},
                           "locations": [_location(d)]}
    if d.notes:
        out["relatedLocations"] = [
            {"id": i, "message": {"text": note}, "physicalLocation": _physical(d, False)}
            for i, note in enumerate(d.notes)]
    return out


def _location(d: Diagnostic) -> dict[str, Any]:
    return {"physicalLocation": _physical(d, True)}


def _physical(d: Diagnostic, with_region: bool) -> dict[str, Any]:
    out: dict[str, Any] = {"artifactLocation": {"uri": artifact_uri(d.path)}}
    if with_region and d.span is not None:
        out["region"] = {"startLine": d.span.line, "startColumn": d.span.column,
                         "endLine": d.span.end_line, "endColumn": d.span.end_column}
    return out


def artifact_uri(path: str) -> str:
    """A relative path as a relative URI reference; an absolute one as a file: URI."""
    pure = PurePath(path)
    if pure.is_absolute():
        return pure.as_uri()
    return "/".join(_escape(part) for part in pure.parts)


def _escape(part: str) -> str:
    from urllib.parse import quote

    return quote(part, safe="@:+,;=!$&'()*-._~")
