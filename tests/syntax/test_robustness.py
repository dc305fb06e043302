"""No input, however broken, produces an exception: random text and mutated examples.

Mutations (deleted, inserted, swapped characters) are the classic way to fuzz a
parser's error paths (common practice).
"""

from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from dualize.diagnostics import Diagnostic
from dualize.model import load
from dualize.syntax.parser import MAX_CHARS

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "examples").glob("*.prob"))
TEXTS = [p.read_text(encoding="utf-8") for p in EXAMPLES] or ["minimize x over x in R\n"]
ALPHABET = st.sampled_from(list("xyAb01 \n\t+-*/.^'|()[]{},:=<>#\"_") +
                           ["||", "‖", "∈", "ℝ", "≤", "ᵀ", "minimize", "over", "in", "R^n",
                            "s.t.", "subject to", "data", "succeq", "sum(", "\x00", "\ufffd"])
SETTINGS = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def assert_reports(text: str) -> None:
    loaded = load(text)
    assert all(isinstance(d, Diagnostic) for d in loaded.diagnostics)
    if loaded.problem is None:
        assert loaded.diagnostics, "a rejected file must say why"
        assert all(d.span is not None and d.span.line >= 1 for d in loaded.diagnostics)


@SETTINGS
@given(st.text(max_size=300))
def test_random_unicode_text(text: str) -> None:
    assert_reports(text)


@SETTINGS
@given(st.lists(ALPHABET, max_size=60).map("".join))
def test_random_token_soup(text: str) -> None:
    assert_reports(text)


@st.composite
def mutated_example(draw: st.DrawFn) -> str:
    text = draw(st.sampled_from(TEXTS))
    for _ in range(draw(st.integers(1, 4))):
        if not text:
            break
        i = draw(st.integers(0, len(text) - 1))
        op = draw(st.sampled_from(["delete", "insert", "swap"]))
        if op == "delete":
            text = text[:i] + text[i + 1:]
        elif op == "insert":
            text = text[:i] + draw(ALPHABET) + text[i:]
        else:
            j = draw(st.integers(0, len(text) - 1))
            chars = list(text)
            chars[i], chars[j] = chars[j], chars[i]
            text = "".join(chars)
    return text


@SETTINGS
@given(mutated_example())
def test_mutated_examples(text: str) -> None:
    assert_reports(text)


def test_empty_and_blank_files() -> None:
    for text in ["", "\n\n", "   ", "# only a comment\n"]:
        assert [d.rule for d in load(text).diagnostics] == ["missing-objective"]


def test_deep_nesting_is_a_located_diagnostic() -> None:
    for text in ["minimize " + "(" * 5000 + "x" + ")" * 5000 + " over x in R",
                 "minimize " + "-" * 5000 + "x over x in R",
                 "minimize " + " + ".join(["x"] * 3000) + " over x in R",
                 "minimize " + "x^" * 3000 + "2 over x in R"]:
        diagnostics = load(text).diagnostics
        assert [d.rule for d in diagnostics] == ["too-deep"]
        assert diagnostics[0].span.line == 1


def test_multi_megabyte_file() -> None:
    text = "minimize x over x in R\ns.t.\n" + "x >= 0\n" * (MAX_CHARS // 6)
    assert [d.rule for d in load(text).diagnostics] == ["file-too-large"]


def test_random_bytes_as_text() -> None:
    import random

    rng = random.Random(7)
    for _ in range(50):
        raw = bytes(rng.randrange(256) for _ in range(200))
        assert_reports(raw.decode("utf-8", errors="replace"))


def test_huge_literals_are_refused_quickly() -> None:
    for literal in ["1e99999999", "1e-99999999", "7" * 5000, "0." + "3" * 5000]:
        diagnostics = load(f"minimize {literal} * x over x in R").diagnostics
        assert [d.rule for d in diagnostics] == ["number-out-of-range"]
        assert (diagnostics[0].span.line, diagnostics[0].span.column) == (1, 10)


def test_unicode_digit_like_characters_in_sizes() -> None:
    # '²' is alphanumeric but not a decimal digit; '٣' is the Arabic-Indic digit three.
    assert [d.rule for d in load("data v in R^²\nminimize x over x in R").diagnostics] == [
        "bad-size"]
    loaded = load("data v in R^٣\nminimize sum(v) + x over x in R")
    assert loaded.problem is not None and loaded.problem.data[0].symbol.shape.rows == 3
