"""Where a draft states its duals: marker comments and labels in a .tex file.

A claim is a display environment (``equation*``, ``align*``, ``\\[ ... \\]``, ...)
either preceded by a marker comment on the line before it,

    % dualize: claim for examples/parts_soft_margin.prob map alpha=a, w=w

or selected by its ``\\label``.  Every marked display of a draft is found in one
call, in the order of the file.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from dualize.diagnostics import Diagnostic, make
from dualize.errors import DualizeError
from dualize.paper.rules import PAPER_NO_CLAIM
from dualize.paper.text_positions import Positions

MARKER = re.compile(r"^[ \t]*%+[ \t]*dualize:[ \t]*claim\b(?P<rest>[^\n]*)$", re.MULTILINE)
FOR_PATH = re.compile(r"\bfor[ \t]+(?P<path>[^\s,]+)")
MAP = re.compile(r"\bmap[ \t]+(?P<pairs>.*)$")
BEGIN = re.compile(r"\\begin\s*\{(?P<env>(equation|align|gather|multline|displaymath|eqnarray)"
                   r"\*?)\}|\\\[|\$\$")
LABEL = re.compile(r"\\label\s*\{(?P<label>[^{}]*)\}")


class PaperError(DualizeError):
    """No claim where one was asked for (exit code 2), with located diagnostics."""

    def __init__(self, message: str, diagnostics: tuple[Diagnostic, ...] = (),
                 source: str = "") -> None:
        super().__init__(message, exit_code=2)
        self.diagnostics = diagnostics
        self.source = source  # the draft's text, for the excerpt under each diagnostic


@dataclass(frozen=True)
class PaperClaim:
    """One display of the draft that states a dual.

    ``line`` is the line of the display's opening; ``body_start``/``body_end`` are
    offsets of its content in ``tex``; ``problem_path`` is the marker's problem
    file (None for a claim selected by label); ``name_map`` pairs paper names
    with problem names.
    """

    tex: str
    path: str
    line: int
    environment: str
    body_start: int
    body_end: int
    problem_path: str | None = None
    name_map: tuple[tuple[str, str], ...] = ()
    label: str | None = None

    @property
    def body(self) -> str:
        return self.tex[self.body_start:self.body_end]


def parse_map(text: str) -> tuple[tuple[str, str], ...]:
    """``alpha=a, \\nu=z`` -> (("alpha", "a"), ("nu", "z")); paper names without backslash."""
    pairs = []
    for part in text.replace(";", ",").split(","):
        if "=" not in part:
            continue
        paper, ours = (p.strip() for p in part.split("=", 1))
        if paper and ours:
            pairs.append((paper.lstrip("\\"), ours))
    return tuple(pairs)


def find_claims(tex_text: str, path: str, label: str | None = None) -> list[PaperClaim]:
    """Every marked claim of the draft, or the one display labelled ``label``."""
    if label is not None:
        return [_labelled(tex_text, path, label)]
    claims = [_marked(tex_text, path, m) for m in MARKER.finditer(tex_text)]
    if not claims:
        raise PaperError(f"{path}: no claim found; put '% dualize: claim for FILE.prob' on "
                         "the line before the display, or select one by its label")
    return claims


def _marked(tex: str, path: str, marker: re.Match[str]) -> PaperClaim:
    rest = marker.group("rest")
    found = FOR_PATH.search(rest)
    mapped = MAP.search(rest)
    start = _next_line(tex, marker.end())
    opening = BEGIN.match(tex, _skip_blank(tex, start))
    if opening is None:
        span = Positions(tex).span(marker.start(), marker.end())
        diag = make(PAPER_NO_CLAIM, path, span, what="the marker is not followed by a display "
                    "environment on the next line", hint="put \\begin{equation*} (or align*, "
                    "\\[) on the line after the marker")
        raise PaperError(f"{path}:{span.line}: the marker is not followed by a display",
                         (diag,))
    claim = _display(tex, path, opening)
    problem = found.group("path") if found else None
    name_map = parse_map(mapped.group("pairs")) if mapped else ()
    return PaperClaim(claim.tex, path, claim.line, claim.environment, claim.body_start,
                      claim.body_end, problem, name_map, claim.label)


def _labelled(tex: str, path: str, label: str) -> PaperClaim:
    for opening in BEGIN.finditer(tex):
        claim = _display(tex, path, opening)
        if claim.label == label:
            return claim
    raise PaperError(f"{path}: no display environment has the label '{label}'")


def _display(tex: str, path: str, opening: re.Match[str]) -> PaperClaim:
    """The display that ``opening`` begins, up to its end."""
    env = opening.group("env")
    closing = {"\\[": "\\]", "$$": "$$"}.get(opening.group(0), f"\\end{{{env}}}")
    end = tex.find(closing, opening.end())
    line = Positions(tex).point(opening.start())[0]
    if end < 0:
        span = Positions(tex).span(opening.start(), opening.end())
        diag = make(PAPER_NO_CLAIM, path, span, what=f"the display is never closed "
                    f"(no {closing})")
        raise PaperError(f"{path}:{line}: the display is never closed", (diag,))
    body = tex[opening.end():end]
    labelled = LABEL.search(body)
    return PaperClaim(tex, path, line, env or opening.group(0), opening.end(), end,
                      label=labelled.group("label") if labelled else None)


def _next_line(tex: str, offset: int) -> int:
    newline = tex.find("\n", offset)
    return len(tex) if newline < 0 else newline + 1


def _skip_blank(tex: str, offset: int) -> int:
    while offset < len(tex) and tex[offset] in " \t":
        offset += 1
    return offset
