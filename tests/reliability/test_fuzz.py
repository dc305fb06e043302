"""Fuzzing within a fixed budget: random text, token mutations of every example,
meaning-preserving rewrites that must give the same dual, and output files that are
never left partial.  Seeded, so a failure replays; about 5,000 cases in all.

The counts of each run are printed (``pytest -s``); the assertions demand 0 internal
errors (an exception other than a user error: what the command line would report as
"internal error"), 0 hangs past the time limit and 0 unequal duals.
"""

from __future__ import annotations

import os
import random

import pytest
from click.testing import CliRunner

from dualize.cli import main
from dualize.model import load
from dualize.outfile import write_output
from tests.reliability.fuzz_cases import (
    EXAMPLES,
    Tally,
    fullwidth,
    mutate,
    outcome,
    random_text,
    renamed,
    reordered,
    same_dual,
    unicode_spelling,
)

pytestmark = pytest.mark.fuzz

RANDOM_TEXTS = 1800
MUTANTS_PER_EXAMPLE = 120
DERIVE_EVERY = 2  # every 2nd mutant that loads is derived, analysed and rendered
REWRITES_PER_EXAMPLE = 4
CLI_RUNS = 120
FILE_CASES = 300


def _report(name: str, tally: Tally) -> None:
    print(f"\nfuzz {name}: {tally.cases} cases {dict(sorted(tally.counts.items()))}")
    assert not tally.failures(), tally.bad


def test_fuzz_random_text_never_breaks_the_reader():
    rng, tally = random.Random(1601), Tally()
    for _ in range(RANDOM_TEXTS):
        text = random_text(rng)
        tally.add(outcome(text, derive_it=True), text)
    _report("random text", tally)


def test_fuzz_token_mutations_of_every_example():
    rng, tally = random.Random(1602), Tally()
    loaded_count = 0
    for path in EXAMPLES:
        source = path.read_text(encoding="utf-8")
        for _ in range(MUTANTS_PER_EXAMPLE):
            text = mutate(source, rng)
            first = outcome(text, derive_it=False)
            if first == "loaded":
                loaded_count += 1
                if loaded_count % DERIVE_EVERY == 0:
                    first = outcome(text, derive_it=True)
            tally.add(first, text)
    assert tally.cases >= len(EXAMPLES) * MUTANTS_PER_EXAMPLE
    _report("token mutations", tally)


def test_fuzz_meaning_preserving_rewrites_give_the_same_dual():
    # Renamed names, reordered constraints and Unicode spellings state the same problem
    # (docs/language.md, section 2), so the duals must be equal up to the renaming.
    from dualize.duality import derive

    rng, tally = random.Random(1603), Tally()
    for path in EXAMPLES:
        source = path.read_text(encoding="utf-8")
        problem = load(source, str(path)).problem
        assert problem is not None, path
        reference = derive(problem)
        for _ in range(REWRITES_PER_EXAMPLE):
            text, back = renamed(source, problem, rng)
            variants = [(text, back), (unicode_spelling(source), {}),
                        (fullwidth(source, problem), {}), (unicode_spelling(text), back)]
            moved = reordered(source, problem, rng)
            variants += [(moved, {})] if moved is not None else []
            for variant, names in variants:
                other = load(variant, str(path)).problem
                if other is None:
                    tally.add("unequal: does not load", variant)
                    continue
                same = same_dual(reference, derive(other), names)
                tally.add("equal" if same else "unequal dual", variant)
    _report("rewrites", tally)


def test_fuzz_command_line_mutants_exit_cleanly(tmp_path):
    # Through the command line in-process: exit 0, 1 or 2 only (3 is an internal error),
    # and no exception escapes (a traceback); a refused run leaves no output file.
    rng, tally = random.Random(1604), Tally()
    runner = CliRunner()
    for k in range(CLI_RUNS):
        source = EXAMPLES[k % len(EXAMPLES)].read_text(encoding="utf-8")
        problem = tmp_path / f"m{k}.prob"
        problem.write_text(mutate(source, rng), encoding="utf-8", errors="surrogatepass")
        target = tmp_path / f"m{k}.out"
        result = runner.invoke(main, ["derive", str(problem), "--time-limit", "3", "-o",
                                      str(target)])
        if result.exception is not None and not isinstance(result.exception, SystemExit):
            tally.add(f"internal: traceback {type(result.exception).__name__}",
                      problem.read_text(encoding="utf-8", errors="replace"))
        elif result.exit_code == 3:
            tally.add("internal: exit 3", result.output)
        elif result.exit_code == 0 and not target.is_file():
            tally.add("partial: no output file", result.output)
        elif result.exit_code != 0 and target.exists():
            tally.add("partial: output file of a refused run", result.output)
        else:
            tally.add(f"exit {result.exit_code}", "")
    assert not [p for p in os.listdir(tmp_path) if p.startswith(".dualize-")]
    _report("command line", tally)


def test_fuzz_output_files_are_never_partial(tmp_path, monkeypatch):
    # A failure at any point of a write (the data, the mode, the rename; an OSError or
    # Ctrl-C) leaves the old file as it was and no temporary file behind.
    rng, tally = random.Random(1605), Tally()
    target = tmp_path / "out.txt"
    real_replace = os.replace
    for k in range(FILE_CASES):
        target.write_text("old\n", encoding="utf-8")
        failure = rng.choice([OSError(28, "No space left on device"), KeyboardInterrupt(),
                              None])
        text = "x" * rng.randint(0, 200_000)

        def replace(src, dst, failure=failure):
            if failure is not None:
                raise failure
            real_replace(src, dst)

        monkeypatch.setattr(os, "replace", replace)
        try:
            write_output(str(target), text)
            expected = text
        except (OSError, KeyboardInterrupt, Exception):  # noqa: B014 - any failure counts
            expected = "old\n"
        monkeypatch.setattr(os, "replace", real_replace)
        leftovers = [p for p in os.listdir(tmp_path) if p.startswith(".dualize-")]
        whole = target.read_text(encoding="utf-8") == expected
        tally.add("whole" if whole and not leftovers else f"partial: case {k}", "")
    _report("output files", tally)
