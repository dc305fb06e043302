"""Document symbols, go to definition and completion, as protocol types."""

from __future__ import annotations

import re

from lsprotocol import types as lsp

from dualize.lsp.functions import function_facts, function_names
from dualize.lsp.lookup import declarations, mention_at
from dualize.lsp.positions import TextMap
from dualize.lsp.state import Snapshot
from dualize.syntax import ast
from dualize.syntax.span import Span

SETS = ("R", "R^n", "R^n_+", "R^n_++", "R^(m,n)", "R_+", "R_++", "S^n", "S^n_+", "S^n_++",
        "Z", "Z^n", "{0,1}", "{0,1}^n", "[lo, hi]", "[lo, hi]^n")
KEYWORDS = ("data", "maximize", "minimize", "over", "subject to", "title")
AFTER_IN = re.compile(r"\bin\s+(\S*)$")


def symbols(snap: Snapshot, text: TextMap) -> list[lsp.DocumentSymbol]:
    """Data, variables, the objective and the constraints (by label), in text order."""
    doc = snap.document
    if doc is None:
        return []
    out = [_symbol(d.name, lsp.SymbolKind.Constant, d.span, d.name_span, text, "data",
                   snap.text) for d in doc.data]
    out += [_symbol(d.name, lsp.SymbolKind.Variable, d.span, d.name_span, text, "variable",
                    snap.text) for d in doc.variables]
    obj = doc.objective
    out.append(_symbol(obj.sense, lsp.SymbolKind.Function, obj.span, obj.span, text,
                       "objective", snap.text))
    out += _constraint_symbols(snap, text)
    return sorted(out, key=lambda s: (s.range.start.line, s.range.start.character))


def _constraint_symbols(snap: Snapshot, text: TextMap) -> list[lsp.DocumentSymbol]:
    problem = snap.loaded.problem
    if problem is not None:
        return [_symbol(c.label, lsp.SymbolKind.Property, c.span, c.span, text, "constraint",
                        snap.text) for c in problem.constraints if c.span is not None]
    doc = snap.document
    written = doc.constraints if doc is not None else ()
    return [_symbol(c.labels[0].name if c.labels else f"constraint {i}", lsp.SymbolKind.Property,
                    c.span, c.span, text, "constraint", snap.text)
            for i, c in enumerate(written, 1)]


def _symbol(name: str, kind: lsp.SymbolKind, span: Span, name_span: Span, text: TextMap,
            what: str, source: str) -> lsp.DocumentSymbol:
    written = " ".join(source[span.start:span.end].split())
    return lsp.DocumentSymbol(name=name, kind=kind, range=text.span_range(span),
                              selection_range=text.span_range(name_span),
                              detail=f"{what}: {written}" if written != name else what)


def definition(snap: Snapshot, offset: int, text: TextMap) -> lsp.Location | None:
    """Where the name under the caret is declared (data, variable, label or size)."""
    doc = snap.document
    if doc is None:
        return None
    mention = mention_at(doc, offset)
    if mention is None or mention.kind == "function":
        return None
    declared = declarations(doc).get(mention.name)
    if declared is None:
        return None
    return lsp.Location(snap.uri, text.span_range(declared.span))


def completions(snap: Snapshot, offset: int, known: ast.Document | None,
                text: TextMap) -> list[lsp.CompletionItem]:
    """Sets after `in`; otherwise the declared names, the functions and the keywords.
    ``known`` is the last document that parsed, for names while the text is broken.
    A set replaces what is typed of it (``R^`` becomes ``R^n_+``), since its
    characters are not a word an editor would replace by itself."""
    line_start = snap.text.rfind("\n", 0, offset) + 1
    after_in = AFTER_IN.search(snap.text[line_start:offset])
    if after_in:
        typed = text.offset_range(line_start + after_in.start(1), offset)
        return [lsp.CompletionItem(label=s, kind=lsp.CompletionItemKind.TypeParameter,
                                   detail="set", text_edit=lsp.TextEdit(typed, s))
                for s in SETS]
    doc = snap.document or known
    items = [_name_item(name, m.kind) for name, m in sorted(declarations(doc).items())
             ] if doc is not None else []
    items += [_function_item(name) for name in function_names()]
    items += [lsp.CompletionItem(label=k, kind=lsp.CompletionItemKind.Keyword) for k in KEYWORDS]
    return items


def _name_item(name: str, kind: str) -> lsp.CompletionItem:
    icon = {"data": lsp.CompletionItemKind.Constant, "variable": lsp.CompletionItemKind.Variable,
            "label": lsp.CompletionItemKind.Field}.get(kind, lsp.CompletionItemKind.Unit)
    word = {"label": "constraint label (its multiplier)", "dimension": "size"}.get(kind, kind)
    return lsp.CompletionItem(label=name, kind=icon, detail=word)


def _function_item(name: str) -> lsp.CompletionItem:
    facts = function_facts(name)
    return lsp.CompletionItem(label=name, kind=lsp.CompletionItemKind.Function,
                              detail=facts.definition if facts else "function")
