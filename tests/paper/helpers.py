"""Shared helpers of the paper-claim tests: drafts, examples, and the derived dual."""

from __future__ import annotations

from functools import cache
from pathlib import Path

from dualize.duality import derive
from dualize.duality.compare import same_constraint, same_expression
from dualize.duality.result import Derivation
from dualize.model import load, load_file
from dualize.model.problem import Problem
from dualize.paper.locate import find_claims
from dualize.paper.translate import Translation, translate

HERE = Path(__file__).parent
ROOT = HERE.parents[1]


@cache
def example(name: str) -> Problem:
    problem = load_file(ROOT / "examples" / f"{name}.prob").problem
    assert problem is not None
    return problem


@cache
def derived(name: str) -> Derivation:
    return derive(example(name))


def draft(name: str) -> str:
    return (HERE / "drafts" / name).read_text(encoding="utf-8")


def by_label(draft_name: str, label: str, problem: str) -> Translation:
    tex = draft(draft_name)
    (claim,) = find_claims(tex, f"drafts/{draft_name}", label)
    return translate(claim, example(problem), derived(problem))


def fragment(body: str, problem: str, marker: str = "") -> Translation:
    """A one-display draft of ``body`` marked as a claim for ``problem``."""
    tex = f"% dualize: claim for examples/{problem}.prob {marker}\n\\begin{{equation*}}\n" \
          f"{body}\n\\end{{equation*}}\n"
    (claim,) = find_claims(tex, "fragment.tex")
    return translate(claim, example(problem), derived(problem))


def agreement(t: Translation, problem: str) -> tuple[bool, list[bool], int]:
    """(objective proved equal, for each derived constraint whether the claim has it,
    number of claim constraints)."""
    from dualize.checking.symbolic import claim_constraints, derived_constraints

    assert t.text is not None, t.diagnostics
    loaded = load(t.text)
    assert loaded.problem is not None, loaded.diagnostics
    dual = derived(problem).dual
    mine = claim_constraints(loaded.problem)
    found = [any(same_constraint(d, c) for c in mine) for d in derived_constraints(dual)]
    return same_expression(dual.objective, loaded.problem.objective), found, len(mine)


def claim_objective_equals(t: Translation, text: str) -> bool:
    """The translated objective equals ``text`` (our language) over the claim's names."""
    assert t.text is not None, t.diagnostics
    claim = load(t.text).problem
    head = t.text.split("\nmaximize", 1)[0]
    over = next(line for line in t.text.splitlines() if line.startswith("over "))
    other = load(f"{head}\nmaximize {text}\n{over}\n").problem
    assert claim is not None and other is not None
    return same_expression(claim.objective, other.objective)
