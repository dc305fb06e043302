"""In-process checks of the server's pieces: positions, time limits, hovers.

UTF-16 counts a character outside the Basic Multilingual Plane as two code units
(the LSP specification, "Text Documents", position encoding; Unicode standard,
section 3.9, from memory).
"""

from __future__ import annotations

import asyncio
import threading
import time

import pytest
from lsprotocol import types as lsp

from dualize.lsp import tasks
from dualize.lsp.hover import hover_text
from dualize.lsp.positions import TextMap
from dualize.lsp.state import analysed, snapshot
from dualize.syntax.span import Span

GOOD = "minimize x^2 over x in R\nsubject to\n  c: x >= 1\n"


def test_positions_count_utf16_code_units() -> None:
    text = 'title "𝔼 risk"\nminimize x over x in R\n'
    utf16 = TextMap(text)
    # "risk" starts at character 10 of line 1; 𝔼 takes two UTF-16 units
    assert utf16.position(1, 11) == lsp.Position(0, 11)
    assert TextMap(text, lsp.PositionEncodingKind.Utf32).position(1, 11) == lsp.Position(0, 10)
    assert TextMap(text, lsp.PositionEncodingKind.Utf8).position(1, 11) == lsp.Position(0, 13)
    assert TextMap(text, "utf-8").position(1, 11) == lsp.Position(0, 13)
    assert utf16.offset(lsp.Position(0, 11)) == 10
    assert utf16.offset(lsp.Position(99, 0)) == len(text)
    span = Span(2, 10, 2, 11, 25, 26)
    assert utf16.span_range(span) == lsp.Range(lsp.Position(1, 9), lsp.Position(1, 10))


def test_slow_derivation_times_out_and_leaves_lint_free(monkeypatch: pytest.MonkeyPatch) -> None:
    release = threading.Event()

    def slow(snap: object, seconds: float) -> object:
        release.wait(20)
        raise RuntimeError("released")

    monkeypatch.setattr(tasks, "derive_snapshot", slow)

    async def main() -> None:
        work = tasks.Work()
        try:
            snap = await work.snapshot("untitled:a", 1, GOOD, 20)
            started = time.monotonic()
            with pytest.raises(TimeoutError):
                await work.derived(snap, 0.3, 60)
            assert time.monotonic() - started < 5
            done = await asyncio.wait_for(work.analysed(snap, 20), 20)
            assert done.findings is not None
        finally:
            release.set()
            work.close()

    asyncio.run(main())


def test_hover_on_a_variable_shows_domain_and_recovery() -> None:
    # min x^2 s.t. x >= 1: L = x^2 + c(1 - x), minimized at x = c/2 (Boyd and
    # Vandenberghe, Convex Optimization, 2004, section 5.5.5, from memory)
    from dualize.api import derive

    snap = analysed(snapshot("untitled:a", 1, GOOD))
    derivation = derive(snap.loaded.problem)
    text, mention = hover_text(snap, GOOD.index("x in"), derivation)
    assert mention is not None and mention.name == "x"
    assert "domain `ℝ`" in text and "`x = ½ c`" in text
    text, _ = hover_text(snap, GOOD.index("c:"), None, "still deriving")
    assert "multiplier `c`: nonnegative" in text and "still deriving" in text


def test_hover_on_the_objective_states_the_dual() -> None:
    # inequality-form LP min c'x s.t. Ax <= b: the dual is max -b'l s.t. A'l + c = 0,
    # l >= 0 (Boyd and Vandenberghe, Convex Optimization, 2004, section 5.2.1, from memory)
    from dualize.api import derive

    text = "data A in R^(m,n)\ndata b in R^m\ndata c in R^n\nminimize c' * x\n" \
           "over x in R^n\nsubject to\n  l: A*x <= b\n"
    snap = snapshot("untitled:lp", 1, text)
    shown, _ = hover_text(snap, text.index("minimize") + 3, derive(snap.loaded.problem))
    assert "dual: maximize over l" in shown and "`-bᵀ l`" in shown
    assert "`Aᵀ l = -c`" in shown and "`l ∈ ℝ^m_+`" in shown


def test_hover_on_functions_states_domain_and_curvature() -> None:
    # log is concave and increasing on the positive reals, exp convex and increasing
    # on all reals (Boyd and Vandenberghe, Convex Optimization, 2004, section 3.1.5)
    text = "data a in R^n\nminimize sum(exp(x)) - sum(log(x + a))\nover x in R^n\n"
    snap = snapshot("untitled:f", 1, text)
    shown, mention = hover_text(snap, text.index("log") + 1, None)
    assert mention is not None and mention.kind == "function"
    assert "concave, increasing" in shown and "positive numbers" in shown
    shown, _ = hover_text(snap, text.index("exp"), None)
    assert "convex, increasing" in shown and "every real number" in shown
    shown, _ = hover_text(snap, text.index("sum"), None)
    assert "affine" in shown


def test_hovers_say_when_the_time_limit_cut_the_derivation() -> None:
    from dataclasses import replace

    from dualize.api import derive
    from dualize.deadline import DeadlineExceeded

    snap = snapshot("untitled:a", 1, GOOD)
    note = f"Time limit: {DeadlineExceeded('simplifying the dual', 2.0)}."
    cut = replace(derive(snap.loaded.problem), notes=(note,))
    for at in (GOOD.index("c:"), GOOD.index("minimize")):
        shown, _ = hover_text(snap, at, cut)
        assert f"Unfinished: {note}" in shown
