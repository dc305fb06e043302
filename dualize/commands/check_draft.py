"""``dualize check-draft``: every marked dual of a LaTeX draft, checked in one call.

Exit codes: 0 when every claim is "equivalent" (or "tight, not attained"); 1 when any
is not, or cannot be read or checked; 2 for bad input (an unreadable draft, no marked
claim).
"""

from __future__ import annotations

import json
import sys

import click


@click.command("check-draft")
@click.argument("draft", type=click.Path())
@click.option("--map", "name_map", default="", metavar="alpha=a,w=w",
              help="The paper's names = the problem files' names, for every claim.")
@click.option("--random", "count", type=click.IntRange(min=1), default=3, show_default=True,
              help="How many random instances each claim is checked on.")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True, help="How to print the report.")
def check_draft_command(draft: str, name_map: str, count: int, fmt: str) -> None:
    """Check each dual marked '% dualize: claim for FILE.prob' in DRAFT (.tex) against
    the dual derived from its problem file; one verdict per claim, with its line."""
    from dualize.commands.common import emit, user_errors
    from dualize.paper.draft import _read, check_draft
    from dualize.paper.locate import parse_map

    with user_errors():
        checks = check_draft(_read(draft), draft, name_map=parse_map(name_map),
                             seeds=tuple(range(count)))
        rows = [_row(c) for c in checks]
        emit(json.dumps({"draft": draft, "claims": rows}, indent=2) if fmt == "json"
             else "\n".join(_line(draft, r) for r in rows)
             or f"{draft}: no claim for a problem file")
    sys.exit(0 if checks and all(c.verdict in _PASSING for c in checks) else 1)


def _row(check) -> dict:  # type: ignore[no-untyped-def]
    return {"line": check.line, "problem": check.problem_path, "verdict": check.verdict,
            "error": check.error}


def _line(draft: str, row: dict) -> str:  # type: ignore[type-arg]
    """``draft.tex:LINE: verdict [problem]``, so that an editor can jump there."""
    where = f"{row['problem']}" if row["problem"] else "no problem file"
    tail = f" ({row['error']})" if row["error"] else ""
    return f"{draft}:{row['line']}: {row['verdict']}  [{where}]{tail}"


_PASSING = ("equivalent", "tight, not attained")
"""Verdicts that mean the claim's optimal value is the primal optimum."""
