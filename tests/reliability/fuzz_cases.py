"""Seeded generators of hostile inputs and meaning-preserving rewrites for the fuzz tests.

Every generator takes a ``random.Random`` so a run is reproducible from its seed
(common practice for fuzzing in CI: a fixed budget and a fixed seed).
"""

from __future__ import annotations

import random
import re
import time
from collections import Counter
from dataclasses import dataclass, field, replace
from pathlib import Path

from dualize.analysis import analyze
from dualize.api import render
from dualize.deadline import Deadline
from dualize.duality import derive
from dualize.errors import DualizeError
from dualize.model import expr as E
from dualize.model import load

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.prob"))
LIMIT = 3.0  # seconds of --time-limit for one fuzzed derivation
GRACE = 10.0  # a run past LIMIT + GRACE counts as a hang (a started sympy call may finish)

VOCAB = [
    "minimize", "maximize", "over", "subject to", "s.t.", "data", "title", "in", "∈", "R",
    "ℝ", "R^n", "R^(m,n)", "R_+", "R^n_++", "S^n", "S^n_+", "sum", "log", "exp", "sqrt",
    "max", "min", "diag", "inv", "trace", "ones", "identity", "||", "‖", "|", "'", "ᵀ",
    "^", "^2", ".^", ".*", "./", "*", "/", "+", "-", "−", "=", "==", "<=", ">=", "≤", "≥",
    "succeq", "preceq", "⪰", "(", ")", "[", "]", "{", "}", ",", ":", "\n", "\n  ", " ",
    "0", "1", "2", "0.5", ".5", "1e-3", "1e400", "1e-400", "2^100000", "10^999",
    "2^2^2^2^2", "x", "y", "w", "A", "b", "c", "n", "m", "ｘ", "ｂ", "𝑥", "\U00020000",
    "int", "np", "lambda", "λ", "α", "x_1", "_+", "_++", "#", '"', '"t"', "\x00", "\t",
    "\r\n", "\ufeff", "₁", "_inf", "×", "1/0", "0/0",
]
ALPHABET = "".join(sorted(set("".join(VOCAB)))) + "@$%&!?;~`\\"
TOKEN = re.compile(r"\w+|\s+|.", re.S)


@dataclass
class Tally:
    """Outcome counts of a fuzz run and the first few offending inputs."""

    counts: Counter[str] = field(default_factory=Counter)
    bad: list[tuple[str, str]] = field(default_factory=list)

    def add(self, outcome: str, text: str) -> None:
        self.counts[outcome] += 1
        if outcome.startswith(("internal", "hang", "unequal", "partial")) and len(self.bad) < 5:
            self.bad.append((outcome, text[:400]))

    @property
    def cases(self) -> int:
        return sum(self.counts.values())

    def failures(self) -> dict[str, int]:
        return {k: v for k, v in self.counts.items()
                if k.startswith(("internal", "hang", "unequal", "partial"))}


def random_text(rng: random.Random) -> str:
    """Random pieces of the language's vocabulary and random characters."""
    parts = []
    for _ in range(rng.randint(1, 40)):
        parts.append(rng.choice(VOCAB) if rng.random() < 0.7 else rng.choice(ALPHABET))
        if rng.random() < 0.5:
            parts.append(" ")
    return "".join(parts)


def mutate(text: str, rng: random.Random) -> str:
    """One to three token edits: delete, insert, replace, duplicate or swap."""
    tokens = TOKEN.findall(text)
    for _ in range(rng.randint(1, 3)):
        if not tokens:
            tokens = [rng.choice(VOCAB)]
        i = rng.randrange(len(tokens))
        op = rng.choice(("delete", "insert", "replace", "duplicate", "swap"))
        if op == "delete":
            del tokens[i]
        elif op == "insert":
            tokens.insert(i, rng.choice(VOCAB))
        elif op == "replace":
            tokens[i] = rng.choice(VOCAB)
        elif op == "duplicate":
            tokens.insert(i, tokens[i])
        elif i + 1 < len(tokens):
            tokens[i], tokens[i + 1] = tokens[i + 1], tokens[i]
    return "".join(tokens)


def outcome(text: str, derive_it: bool) -> str:
    """What the library does with ``text``: loaded/refused/derived, or a defect."""
    try:
        loaded = load(text, "fuzz.prob")
    except Exception as err:  # noqa: BLE001 - the defect being counted
        return f"internal: load {type(err).__name__}: {err}"
    if loaded.problem is None:
        return "refused"
    if not derive_it:
        return "loaded"
    start = time.monotonic()
    try:
        derivation = derive(loaded.problem, Deadline(LIMIT))
        analysis = analyze(loaded.problem, None)
        for fmt in ("text", "json", "latex"):
            render(derivation, fmt, analysis)
    except DualizeError:
        return "refused"
    except Exception as err:  # noqa: BLE001 - the defect being counted
        return f"internal: derive {type(err).__name__}: {err}"
    if time.monotonic() - start > LIMIT + GRACE:
        return "hang"
    return "derived"


# ---- meaning-preserving rewrites ------------------------------------------------

_FULLWIDTH = {chr(c): chr(c + 0xFEE0) for c in range(0x21, 0x7F)}


def _word(name: str) -> re.Pattern[str]:
    return re.compile(rf"(?<![\w]){re.escape(name)}(?![^\Wᵀ])")


def declared_names(problem) -> list[str]:  # type: ignore[no-untyped-def]
    """Data, variables and explicit labels (sizes are left alone: they shape symbols)."""
    names = [d.name for d in problem.data] + [v.name for v in problem.variables]
    names += [c.label for c in problem.constraints if c.labelled]
    keep = {str(d) for d in problem.dims} | {"R", "S"}  # sizes, and names that are also sets
    return [n for n in dict.fromkeys(names) if n not in keep]


def renamed(text: str, problem, rng: random.Random) -> tuple[str, dict[str, str]]:  # type: ignore[no-untyped-def]
    """Every declared name replaced by a fresh one; returns the text and new -> old."""
    back: dict[str, str] = {}
    for i, name in enumerate(declared_names(problem)):
        fresh = f"zq{rng.randint(10, 99)}n{i}"
        text = _word(name).sub(fresh, text)
        back[fresh] = name
    return text, back


def fullwidth(text: str, problem) -> str:  # type: ignore[no-untyped-def]
    """ASCII names spelled in fullwidth letters (one name to Python and to dualize)."""
    for name in declared_names(problem):
        if name.isascii():
            text = _word(name).sub("".join(_FULLWIDTH.get(ch, ch) for ch in name), text)
    return text


def unicode_spelling(text: str) -> str:
    """The language's Unicode spellings of relations, sets, membership and transpose."""
    for ascii_form, unicode_form in (("<=", "≤"), (">=", "≥"), (" in ", " ∈ "),
                                     ("R^", "ℝ^"), ("'", "ᵀ")):
        text = text.replace(ascii_form, unicode_form)
    return re.sub(r"(?<=∈ )R(?![\w^])", "ℝ", text)


def reordered(text: str, problem, rng: random.Random) -> str | None:  # type: ignore[no-untyped-def]
    """The constraints in another order, when all are labelled (else their automatic
    labels, hence the multipliers' names, would change)."""
    spans = [c.span for c in problem.constraints]
    if len(spans) < 2 or not all(c.labelled for c in problem.constraints) or None in spans:
        return None
    unique = sorted({(s.start, s.end) for s in spans})
    if len(unique) != len(spans):
        return None
    pieces = [text[a:b] for a, b in unique]
    order = pieces[::-1] if rng.random() < 0.5 else pieces[1:] + pieces[:1]
    out, last = [], 0
    for (a, b), piece in zip(unique, order, strict=True):
        out += [text[last:a], piece]
        last = b
    return "".join(out) + text[last:]


def same_dual(first, second, back: dict[str, str]) -> bool:  # type: ignore[no-untyped-def]
    """The two derivations' duals are one problem, names of ``second`` mapped by ``back``
    (compared by the engine's canonical form, duality.compare)."""
    from dualize.duality.compare import same_constraint, same_expression

    a, b = first.dual, second.dual
    rename = _renaming(b, back)
    if (a.sense, a.closed_form, a.unbounded) != (b.sense, b.closed_form, b.unbounded):
        return False
    names_b = sorted((back.get(v.name, v.name), v.set) for v in b.variables)
    if sorted((v.name, v.set) for v in a.variables) != names_b:
        return False
    if not same_expression(a.objective, E.substitute(b.objective, rename)):
        return False
    left = [(c.lhs, c.relation, c.rhs) for c in a.constraints]
    right = [(E.substitute(c.lhs, rename), c.relation, E.substitute(c.rhs, rename))
             for c in b.constraints]
    return len(left) == len(right) and all(
        any(same_constraint(x, y) for y in right) for x in left)


def _renaming(dual, back: dict[str, str]) -> dict[E.Expr, E.Expr]:  # type: ignore[no-untyped-def]
    exprs = [dual.objective] + [e for c in dual.constraints for e in (c.lhs, c.rhs)]
    out: dict[E.Expr, E.Expr] = {}
    for node in (n for e in exprs for n in E.walk(e)):
        if isinstance(node, E.Symbol) and node.name in back:
            out[node] = replace(node, name=back[node.name])
    return out
