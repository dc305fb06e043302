"""Diagnostic kinds of the paper reader: a draft's LaTeX that cannot become a claim.

Each is located in the .tex file, so an author sees the line and column of the
formula that the reader or the translation could not take.  Their stage is
``paper``: they concern a draft, not a problem file.
"""

from __future__ import annotations

from dualize.diagnostics import RuleKind

PAPER_SYNTAX = RuleKind(
    "paper-syntax", "error", "{found}: expected {expected}",
    "The formula is not LaTeX the reader knows for an optimization problem; nothing "
    "after this point could be read safely.", "paper")
PAPER_NO_CLAIM = RuleKind(
    "paper-no-claim", "error", "{what}",
    "A claim is found by a marker comment or a label; without one there is nothing to check.",
    "paper")
PAPER_UNSUPPORTED = RuleKind(
    "paper-unsupported", "error", "{what} has no translation into the problem language",
    "The reader translates only constructs with a declared meaning, never a guess.", "paper")
PAPER_INDEX = RuleKind(
    "paper-index", "error", "index notation not translated: {what}",
    "Index notation becomes matrix form only by the declared correspondences "
    "(docs/paper-claims.md); anything else would be a guess.", "paper")
PAPER_NAME = RuleKind(
    "paper-name", "error", "{what}",
    "Every symbol of the paper must stand for data of the problem file or a multiplier.",
    "paper")
PAPER_CLAIM = RuleKind(
    "paper-claim", "error", "the translated claim does not load: {message}",
    "The formula was read, but as a problem it has a defect (a shape, an undeclared name).",
    "paper")

KINDS: tuple[RuleKind, ...] = (PAPER_SYNTAX, PAPER_NO_CLAIM, PAPER_UNSUPPORTED, PAPER_INDEX,
                               PAPER_NAME, PAPER_CLAIM)
