"""``dualize check-draft``: every marked dual of a LaTeX draft, checked in one call.

Exit codes: 0 when every claim is "equivalent" (or "tight, not attained"); 1 when any
is not, or cannot be read or checked; 2 for bad input (an unreadable draft, no marked
claim).
"""

from __future__ import annotations

import sys

import click

from dualize.commands.common import emit, emit_json, reports_user_errors


@click.command("check-draft")
@click.argument("draft", type=click.Path())
@click.option("--map", "name_map", default="", metavar="alpha=a,w=w",
              help="The paper's names = the problem files' names, for every claim.")
@click.option("--random", "count", type=click.IntRange(min=1), default=3, show_default=True,
              help="How many random instances each claim is checked on.")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True, help="How to print the report.")
@reports_user_errors
def check_draft_command(draft: str, name_map: str, count: int, fmt: str) -> None:
    """Check each dual marked '% dualize: claim for FILE.prob' in DRAFT (.tex) against
    the dual derived from its problem file; one verdict per claim, with its line."""
    from dualize import api

    result = api.check_draft(draft, name_map=name_map, random=count)
    emit_json(result.json()) if fmt == "json" else emit(result.text())
    sys.exit(0 if result.ok else 1)
