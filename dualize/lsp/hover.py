"""Hover texts (Markdown): constraints, variables, data, sizes and functions.

A constraint shows its multiplier, the multiplier's set and the constraints of
the dual that mention it, read from the derivation record; a variable shows its
domain and how it is recovered from optimal multipliers; a function shows its
definition, domain and curvature.  Without a derivation yet (it is still being
computed, or the problem has errors) the hover says what is known from the
problem alone and says that the rest is missing.
"""

from __future__ import annotations

import re

from dualize.duality.result import Derivation, DualConstraint, DualVariable
from dualize.lsp.functions import function_facts
from dualize.lsp.lookup import Mention, constraint_at, labelled_constraint, mention_at
from dualize.lsp.state import Snapshot
from dualize.model.expr import symbols_of
from dualize.model.problem import Constraint, Problem, Variable
from dualize.model.relations import Comparison

KIND_WORD = {"ineq": "inequality", "eq": "equality", "psd": "semidefinite constraint"}
SET_WORD = {"nonneg": "nonnegative", "nonpos": "nonpositive", "free": "free, any sign",
            "psd": "positive semidefinite", "symmetric": "symmetric"}
DOMAIN_WORD = {
    "free": "free: the inner minimization runs over every value",
    "nonneg": "nonnegative, kept in the inner minimization (no multiplier)",
    "pos": "positive, kept in the inner minimization (no multiplier)",
    "box": "a box, kept in the inner minimization (no multiplier)",
    "integer": "integer: the problem is not convex and the dual is a bound",
    "binary": "binary: the problem is not convex and the dual is a bound",
    "symmetric": "symmetric matrices",
    "psd": "positive semidefinite matrices, kept in the inner minimization",
    "pd": "positive definite matrices, kept in the inner minimization",
}


def hover_text(snap: Snapshot, offset: int, derivation: Derivation | None,
               pending: str | None = None) -> tuple[str, Mention | None] | None:
    """The hover for the caret at ``offset``, and the name it is about (if any)."""
    if snap.document is None:
        return None
    mention = mention_at(snap.document, offset)
    problem = snap.loaded.problem
    if mention is not None:
        text = _about_name(mention, snap, problem, derivation, pending)
        if text is not None:
            return text, mention
    if problem is None:
        return None
    constraint = constraint_at(problem, offset)
    if constraint is not None:
        return constraint_hover(constraint, derivation, pending), None
    span = snap.document.objective.span  # from the sense keyword to the expression's end
    if span.start <= offset <= span.end:
        return objective_hover(problem, derivation, pending), None
    return None


def objective_hover(problem: Problem, derivation: Derivation | None,
                    pending: str | None) -> str:
    """The objective and the dual problem in short: what the derivation arrives at."""
    from dualize.render.text_printer import text_expr, text_relation

    lines = [f"**objective** ({problem.sense} `{text_expr(problem.objective)}`)", ""]
    if derivation is None:
        return "\n".join(lines + [pending or "The dual is not available: the problem has "
                                            "errors."])
    dual = derivation.dual
    names = ", ".join(v.name for v in dual.variables)
    if dual.unbounded:
        return "\n".join(lines + ["The dual function is unbounded: the dual gives no bound."])
    inner = " (an infimum remains over " + ", ".join(v.name for v in dual.inner) + ")" \
        if dual.inner else ""
    lines += [f"dual: {dual.sense} over {names or 'no multiplier'}{inner}", "",
              f"`{text_expr(dual.objective)}`"]
    lines += [f"- `{text_expr(c.lhs)} {text_relation(c.relation)} {text_expr(c.rhs)}`"
              for c in dual.constraints]
    lines += [f"- `{v.name} ∈ {_set_text(v)}`" for v in dual.variables if v.set != "free"]
    return "\n".join(lines + _cut(derivation))


def _cut(derivation: Derivation) -> list[str]:
    """The engine's notes on steps cut by the time limit: what is shown is unfinished."""
    cut = [n for n in derivation.notes if "time limit" in n]
    return ["", *(f"Unfinished: {n}" for n in cut)] if cut else []


def _about_name(m: Mention, snap: Snapshot, problem: Problem | None,
                derivation: Derivation | None, pending: str | None) -> str | None:
    if m.kind == "function":
        return function_hover(m.name)
    if m.kind == "dimension":
        return f"**size `{m.name}`**\n\nA dimension symbol: a positive integer, given by " \
               "the instance's data shapes."
    if problem is None:
        return _declared(m, snap)
    if m.kind == "label":
        found = labelled_constraint(problem, m.name)
        return constraint_hover(found, derivation, pending) if found else None
    variable = next((v for v in problem.variables if v.name == m.name), None)
    if variable is not None:
        return variable_hover(variable, snap.text, derivation, pending)
    data = next((d for d in problem.data if d.name == m.name), None)
    if data is not None:
        return f"**data `{data.name}`** in `{data.set_text}`\n\nA parameter: its set " \
               "states facts the analysis may use (sign, symmetry, definiteness)."
    return None


def _declared(m: Mention, snap: Snapshot) -> str | None:
    """While the file has errors: the declaration as written, if the name has one."""
    doc = snap.document
    decls = {d.name: ("data", d) for d in doc.data} if doc else {}
    decls.update({d.name: ("variable", d) for d in doc.variables} if doc else {})
    if m.name not in decls:
        return None
    what, decl = decls[m.name]
    written = snap.text[decl.span.start:decl.span.end]
    return f"**{what} `{m.name}`** (`{written}`, line {decl.span.line})\n\nThe rest " \
           "is shown once the file's errors are fixed."


def function_hover(name: str) -> str | None:
    facts = function_facts(name)
    if facts is None:
        return None
    return (f"**function `{facts.name}`**\n\n{facts.definition}\n\n"
            f"- domain: {facts.domain}\n- curvature: {facts.curvature}")


def constraint_hover(c: Constraint, derivation: Derivation | None,
                     pending: str | None) -> str:
    from dualize.render.text_printer import text_expr, text_relation

    lines = [f"**constraint `{c.label}`** ({KIND_WORD[c.kind]})", "",
             f"`{text_expr(c.lhs)} {text_relation(Comparison(c.relation).relation)} "
             f"{text_expr(c.rhs)}`", ""]
    if derivation is None:
        lines.append(f"multiplier `{c.multiplier.name}`: {_expected_set(c)}")
        lines += ["", pending or "The dual is not available: the problem has errors."]
        return "\n".join(lines)
    multiplier = next((m for m in derivation.multipliers if m.name == c.multiplier.name), None)
    if multiplier is not None:
        lines.append(f"multiplier `{multiplier.name}` ∈ `{_set_text(multiplier)}`: "
                     f"{SET_WORD.get(multiplier.set, multiplier.set)}")
    lines += ["", *_dual_constraints(c.multiplier.name, derivation)]
    dual = derivation.dual
    lines += _cut(derivation)
    if dual.unbounded:
        lines += ["", "The dual function is unbounded for every multiplier: no bound."]
    elif dual.inner:
        lines += ["", "The dual keeps an infimum over " + ", ".join(v.name for v in dual.inner)
                  + ": conditions it implies are not listed."]
    return "\n".join(lines)


def _expected_set(c: Constraint) -> str:
    return {"ineq": "nonnegative", "eq": "free (any sign)",
            "psd": "positive semidefinite"}[c.kind]


def _set_text(multiplier: DualVariable) -> str:
    from dualize.render.text import text_set

    shape = multiplier.symbol.shape
    if multiplier.set == "nonpos":
        return text_set("free", shape) + "_-"
    kind = {"nonneg": "nonneg", "free": "free", "psd": "psd", "symmetric": "symmetric"}
    return text_set(kind.get(multiplier.set, "free"), shape)


def _dual_constraints(name: str, derivation: Derivation) -> list[str]:
    """The dual's constraints that involve the multiplier ``name``, with their reasons."""
    from dualize.render.text_printer import text_expr, text_relation

    word = re.compile(rf"(?<![\w]){re.escape(name)}(?![\w])")
    found = [c for c in derivation.dual.constraints
             if _mentions(c, name) or word.search(c.reason)]
    kept = next((v for v in derivation.dual.variables if v.name == name), None)
    if not found:
        if kept is None:
            return ["It produces no dual constraint (it was eliminated from the dual)."]
        return ["It produces no dual constraint of its own" +
                ("." if kept.set == "free" else "; only its set is a condition on it.")]
    out = ["dual constraints it produces:"]
    for c in found:
        out.append(f"- `{text_expr(c.lhs)} {text_relation(c.relation)} {text_expr(c.rhs)}`"
                   f" — {c.reason}")
    return out


def _mentions(c: DualConstraint, name: str) -> bool:
    return any(s.name == name for e in (c.lhs, c.rhs) for s in symbols_of(e))


def variable_hover(v: Variable, text: str, derivation: Derivation | None,
                   pending: str | None) -> str:
    from dualize.render.text import TextFormatter

    written = text[v.span.start:v.span.end] if v.span is not None else v.name
    lines = [f"**variable `{v.name}`** (`{written}`)", "",
             f"domain `{TextFormatter().domain(v)}`: {DOMAIN_WORD[v.domain.kind]}", ""]
    if derivation is None:
        lines.append(pending or "The recovery is not available: the problem has errors.")
        return "\n".join(lines)
    return "\n".join(lines + [_recovery(v.name, derivation)])


def _recovery(name: str, derivation: Derivation) -> str:
    from dualize.render.text_printer import text_expr

    found = next((r for r in derivation.recovery if r.variable == name), None)
    if found is None:
        return "recovery: not stated by the derivation."
    if found.formula is not None:
        note = f" ({found.note})" if found.note else ""
        return f"recovered from optimal multipliers: `{name} = {text_expr(found.formula)}`{note}"
    return f"recovery: {found.note}"

