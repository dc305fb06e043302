"""dualize's diagnostics as the protocol's: rule id as the code, severity, range,
the hint and notes as related information (pointing at the finding itself)."""

from __future__ import annotations

from lsprotocol import types as lsp

from dualize.diagnostics import Diagnostic
from dualize.lsp.positions import TextMap

SOURCE = "dualize"
SEVERITY = {"error": lsp.DiagnosticSeverity.Error, "warning": lsp.DiagnosticSeverity.Warning,
            "info": lsp.DiagnosticSeverity.Information}


def to_protocol(found: Diagnostic, text: TextMap, uri: str) -> lsp.Diagnostic:
    """One finding as a protocol diagnostic."""
    where = text.span_range(found.span)
    related = [lsp.DiagnosticRelatedInformation(lsp.Location(uri, where), f"hint: {found.hint}")
               ] if found.hint else []
    related += [lsp.DiagnosticRelatedInformation(lsp.Location(uri, where), note)
                for note in found.notes]
    return lsp.Diagnostic(range=where, message=found.message, severity=SEVERITY[found.severity],
                          code=found.rule, source=SOURCE, related_information=related or None)


def all_to_protocol(found: tuple[Diagnostic, ...], text: TextMap,
                    uri: str) -> list[lsp.Diagnostic]:
    return [to_protocol(d, text, uri) for d in found]


def notice(message: str) -> lsp.Diagnostic:
    """A server notice shown with the findings (no rule id: it is not a finding)."""
    start = lsp.Position(0, 0)
    return lsp.Diagnostic(range=lsp.Range(start, start), message=message,
                          severity=lsp.DiagnosticSeverity.Information, source=SOURCE)
