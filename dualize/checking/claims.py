"""A claimed dual, written by a user in the problem language, read against its primal.

A claim may leave out the primal's data declarations: a user writing down the
dual of a problem reuses its data (``A``, ``b``) without restating their sets.
The data lines of the primal are inserted, after the claim's title if it has
one, for every primal data name the claim uses but does not declare.  The
claim's decision variables are the multipliers; its sense must be the
opposite of the primal's (a lower bound for a minimization, an upper bound for
a maximization).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from dualize.diagnostics import Diagnostic
from dualize.errors import DualizeError
from dualize.model.problem import Problem

_NAME = re.compile(r"[^\W\d]\w*")
_NOISE = re.compile(r"#[^\n]*|\"[^\"\n]*\"")


class ClaimError(DualizeError):
    """A claim that cannot be read or does not fit its primal (exit code 2)."""

    def __init__(self, message: str, diagnostics: tuple[Diagnostic, ...] = (),
                 source: str = "") -> None:
        super().__init__(message, exit_code=2)
        self.diagnostics = diagnostics
        self.source = source


@dataclass(frozen=True)
class Claim:
    """The claim as a problem, the text it was loaded from, and the data names lent to it."""

    problem: Problem
    source: str
    borrowed: tuple[str, ...]


def used_names(text: str) -> tuple[str, ...]:
    """Every name the text mentions, outside comments and the title string, sorted."""
    return tuple(sorted(set(_NAME.findall(_NOISE.sub(" ", text)))))


def declared_names(text: str, path: str) -> tuple[frozenset[str], int]:
    """Names the claim declares (data and variables) and the line after its title (0: none)."""
    from dualize.syntax.parser import parse

    parsed = parse(text, path)
    if parsed.document is None:
        raise ClaimError(f"{path}: the claim does not parse", parsed.diagnostics, text)
    doc = parsed.document
    names = frozenset(d.name for d in doc.data) | frozenset(d.name for d in doc.variables)
    after = doc.title.span.end_line if doc.title is not None and doc.title.span else 0
    return names, after


def with_primal_data(primal: Problem, text: str, path: str) -> tuple[str, tuple[str, ...]]:
    """The claim's text with the primal's data lines it needs inserted, and their names."""
    declared, after = declared_names(text, path)
    used = set(used_names(text))
    borrowed = tuple(d.name for d in primal.data if d.name in used and d.name not in declared)
    if not borrowed:
        return text, ()
    lines = [f"data {d.name} in {d.set_text}" for d in primal.data if d.name in borrowed]
    head = text.splitlines(keepends=True)
    joined = "".join(head[:after]) + "\n".join(lines) + "\n" + "".join(head[after:])
    return joined, borrowed


def load_claim(primal: Problem, text: str, path: str = "<claim>") -> Claim:
    """Read a claim against ``primal``; raises ``ClaimError`` when it cannot be used."""
    from dualize.model import load

    source, borrowed = with_primal_data(primal, text, path)
    loaded = load(source, path)
    if loaded.problem is None:
        errors = tuple(d for d in loaded.diagnostics if d.severity == "error")
        note = " (with the primal's data lines inserted)" if borrowed else ""
        first = f": {errors[0].message}" if errors else ""
        raise ClaimError(f"{path}: the claim has errors{note}{first}", errors, source)
    claim = loaded.problem
    check_fits(primal, claim, path)
    return Claim(claim, source, borrowed)


def check_fits(primal: Problem, claim: Problem, path: str) -> None:
    """The claim's sense, data and sizes must make sense for the primal."""
    wanted = "maximize" if primal.sense == "minimize" else "minimize"
    if claim.sense != wanted:
        raise ClaimError(f"{path}: the claim must {wanted} (the dual of a {primal.sense[:-1]}"
                         f"ation is a {wanted[:-1]}ation), but it says {claim.sense}")
    _same_data(primal, claim, path)
    dims = {d.name for d in primal.dims}
    extra = sorted(d.name for d in claim.dims if d.name not in dims)
    if extra:
        raise ClaimError(f"{path}: the claim uses the size '{extra[0]}', which the primal "
                         "does not have; write sizes with the primal's dimension names")


def _same_data(primal: Problem, claim: Problem, path: str) -> None:
    known = {d.name: d for d in primal.data}
    for decl in claim.data:
        mine = known.get(decl.name)
        if mine is None:
            raise ClaimError(f"{path}: the claim declares data '{decl.name}', which the primal "
                             "does not have; a dual can only use the primal's data")
        if mine.symbol.sym_shape != decl.symbol.sym_shape:
            raise ClaimError(f"{path}: the claim declares '{decl.name}' in {decl.set_text}, but "
                             f"the primal has it in {mine.set_text}")
