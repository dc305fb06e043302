"""The slack search of the symbolic Slater verdict folds each term once per variable in it.

A problem written entry by entry (n scalar variables, m constraints over all of them)
made the search fold every whole constraint once per variable: n * m folds of size n,
a minute at n = 150, m = 100.  Counted in nodes folded, not seconds (tests never time):
the work must grow like the problem's size n * m, not like n^2 * m.  The verdicts are
those of Boyd and Vandenberghe, Convex Optimization, 2004, section 5.2.3 (from memory):
with every variable entering each ``>=`` constraint with a positive coefficient, all of
them large make every constraint strict.
"""

from __future__ import annotations

import pytest

from dualize.analysis import at_zero as folding
from dualize.analysis.slack_point import slacks_of
from dualize.model import load


def _problem(n: int, m: int):  # type: ignore[no-untyped-def]
    names = [f"x{i}" for i in range(1, n + 1)]
    lines = ["minimize " + " + ".join(f"{v}^2" for v in names),
             "over " + ", ".join(f"{v} in R" for v in names), "subject to"]
    lines += [f"  c{k}: " + " + ".join(f"{(k * i) % 5 + 1}*{v}" for i, v in enumerate(names))
              + f" >= {k}" for k in range(m)]
    loaded = load("\n".join(lines) + "\n", "entries.prob")
    assert loaded.problem is not None
    return loaded.problem


def _folded_nodes(n: int, m: int, monkeypatch: pytest.MonkeyPatch) -> tuple[int, int]:
    count = [0]
    original = folding._fold

    def counting(node, names):  # type: ignore[no-untyped-def]
        count[0] += 1
        return original(node, names)

    monkeypatch.setattr(folding, "_fold", counting)
    found = slacks_of(_problem(n, m))
    monkeypatch.setattr(folding, "_fold", original)
    return len(found), count[0]


def test_every_variable_is_a_slack_and_the_work_grows_with_the_size(
        monkeypatch: pytest.MonkeyPatch) -> None:
    slacks_small, small = _folded_nodes(10, 10, monkeypatch)
    slacks_large, large = _folded_nodes(40, 10, monkeypatch)
    assert (slacks_small, slacks_large) == (10, 40)
    # four times the variables, four times the terms: about 4x the work (16x before)
    assert large < 6 * small


def test_a_term_negative_only_as_a_whole_is_not_counted_as_pushing_down() -> None:
    # -(2 x - 3 x) = x: the rule asks each summand to push down, and 3 x does not.
    loaded = load("minimize x^2\nover x in R\nsubject to\n  c: 1 >= -(2*x - 3*x)\n", "p.prob")
    assert loaded.problem is not None
    assert slacks_of(loaded.problem) == ()
