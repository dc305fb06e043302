"""Every claim of a draft checked against its problem file, in one call.

A marked claim names its problem file (relative to the draft's folder, else to
the working directory); a claim selected by label, or a marker without a file,
is checked against the problem given by the caller (the command's FILE).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from dualize.errors import DualizeError
from dualize.model.problem import Problem
from dualize.paper.locate import PaperClaim, PaperError, find_claims
from dualize.paper.translate import Translation, translate


@dataclass(frozen=True)
class DraftCheck:
    """One claim: its translation and, when it could be checked, the check's report."""

    claim: PaperClaim
    problem_path: str | None
    translation: Translation | None
    report: Any = None
    error: str | None = None

    @property
    def line(self) -> int:
        return self.claim.line

    @property
    def verdict(self) -> str:
        return self.report.verdict if self.report is not None else "unreadable"


def split_claim_path(text: str) -> tuple[str, str | None]:
    """``draft.tex#eq:dual`` -> ("draft.tex", "eq:dual"); no ``#``: no label."""
    path, sep, label = text.partition("#")
    return path, (label or None) if sep else None


def is_paper_path(text: str) -> bool:
    """A claim given as LaTeX (``.tex``, with or without ``#label``)."""
    return split_claim_path(text)[0].lower().endswith(".tex")


def translation_for(claim_arg: str, problem: Problem,
                    name_map: tuple[tuple[str, str], ...] = (),
                    problem_path: str | None = None) -> Translation:
    """The one claim ``draft.tex#label`` (or the draft's only marked claim for
    ``problem_path``, when given), translated.

    Raises ``PaperError`` (exit code 2) with the located diagnostics when the
    claim cannot be found or translated.
    """
    path, label = split_claim_path(claim_arg)
    tex = read_draft(path)
    try:
        claims = find_claims(tex, path, label)
    except PaperError as err:
        raise PaperError(err.message, err.diagnostics, tex) from None
    if len(claims) > 1 and problem_path is not None:
        claims = [c for c in claims if _for_problem(c, path, problem_path)] or claims
    if len(claims) > 1:
        raise PaperError(f"{path}: {len(claims)} claims are marked; select one with "
                         f"{path}#LABEL")
    translation = translate(_with_map(claims[0], name_map), problem)
    if not translation.ok:
        first = translation.diagnostics[0].message if translation.diagnostics else ""
        raise PaperError(f"{path}: the claim cannot be translated: {first}",
                         translation.diagnostics, tex)
    return translation


def check_draft(tex_text: str, path: str, problem: Problem | None = None,
                problem_path: str | None = None, label: str | None = None,
                name_map: tuple[tuple[str, str], ...] = (),
                seeds: Sequence[int] = (0, 1, 2)) -> list[DraftCheck]:
    """Check every marked claim (or the labelled one) of a draft; one entry per claim."""
    out = []
    for claim in find_claims(tex_text, path, label):
        claim = _with_map(claim, name_map)
        target = _problem_for(claim, path, problem, problem_path)
        if target is None:
            continue
        out.append(_check_one(claim, *target, seeds))
    return out


def _for_problem(claim: PaperClaim, draft: str, problem_path: str) -> bool:
    if claim.problem_path is None:
        return True
    return _resolve(claim.problem_path, draft).resolve() == Path(problem_path).resolve()


def _with_map(claim: PaperClaim, name_map: tuple[tuple[str, str], ...]) -> PaperClaim:
    if not name_map:
        return claim
    given = dict(name_map)
    kept = tuple((p, o) for p, o in claim.name_map if p not in given)
    return replace(claim, name_map=kept + tuple(sorted(given.items())))


def _problem_for(claim: PaperClaim, draft: str, problem: Problem | None,
                 problem_path: str | None) -> tuple[Problem | None, str | None] | None:
    """The claim's problem, or None when it names another file than the one given."""
    if claim.problem_path is None:
        return problem, problem_path
    found = _resolve(claim.problem_path, draft)
    if problem is not None and problem_path is not None:
        if Path(problem_path).resolve() != found.resolve():
            return None
        return problem, problem_path
    return _load(found), str(found)


def _resolve(name: str, draft: str) -> Path:
    beside = Path(draft).parent / name
    return beside if beside.is_file() else Path(name)


def _load(path: Path) -> Problem | None:
    from dualize.model import load_file

    loaded = load_file(path)
    return loaded.problem


def _check_one(claim: PaperClaim, problem: Problem | None, problem_path: str | None,
               seeds: Sequence[int]) -> DraftCheck:
    from dualize.checking import ClaimError, check_claim

    if problem is None:
        return DraftCheck(claim, problem_path, None, error="the problem file does not load")
    translation = translate(claim, problem)
    if not translation.ok:
        return DraftCheck(claim, problem_path, translation, error="not translated")
    try:
        report = check_claim(problem, translation.text or "", seeds=seeds,
                             claim_path=f"{claim.path}:{claim.line}")
    except ClaimError as err:
        return DraftCheck(claim, problem_path, translation, error=err.message)
    return DraftCheck(claim, problem_path, translation, report)


def read_draft(path: str) -> str:
    try:
        return Path(path).read_bytes().decode("utf-8").removeprefix("\ufeff")
    except OSError as err:
        raise DualizeError(f"cannot read {path}: {err.strerror or err}", 2) from None
    except UnicodeDecodeError:
        raise DualizeError(f"{path}: the draft is not UTF-8 text", 2) from None


def describe(translation: Translation) -> str:
    """One line for a report: where the claim is and how its names were matched."""
    claim = translation.claim
    names = ", ".join(f"{m.paper} = {m.ours} (by {m.how})" for m in translation.matches)
    return f"claim read from {claim.path}, line {claim.line}" + (f"; {names}" if names else "")
