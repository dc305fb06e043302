"""The cache entries the package ships (dualize/cache_seed.json) are exactly what a cold
run computes, and they obey the same rules as the user's own entries.

A seeded cache may only save time, never change an answer: the rule of any build cache
(common practice).  So the seed is compared with entries made afresh by this checkout,
and a cold run with it prints what a run without any cache prints.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

from dualize import disk_cache

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
sys.path.insert(0, str(HERE))

import regenerate_seed as regenerate  # noqa: E402 - the generator lives beside this test

SEED = json.loads(regenerate.SEED.read_text(encoding="utf-8"))


def _current_stamps() -> dict[str, str]:
    from lark import __version__ as lark_version

    from dualize.duality import derivation_cache
    from dualize.syntax import parser_tables

    return {"derivation": derivation_cache.stamp(),
            "parser": f"{parser_tables.FORMAT}-lark-{lark_version}"}


def test_every_entry_carries_its_own_key_and_a_matching_digest() -> None:
    assert set(SEED) == set(regenerate.SECTIONS)
    assert SEED["parser"] and SEED["derivation"]
    for entries in SEED.values():
        for key, entry in entries.items():
            assert entry["key"] == key
            assert disk_cache._valid(entry, key, entry["stamp"]) == entry["payload"], key


def test_the_seed_was_made_by_this_code_with_these_libraries() -> None:
    # A stale seed is silently unused; with the libraries it was made with, that can only
    # mean the engine or grammar changed without `python tests/cache_seed/regenerate_seed.py`.
    stamps = _current_stamps()
    library = {"derivation": 1, "parser": 2}  # where the library version sits in a stamp
    for section, entries in SEED.items():
        made_with = {entry["stamp"] for entry in entries.values()}
        assert len(made_with) == 1, section
        (stamp,) = made_with
        position = library[section]
        if stamp.split("-")[position] != stamps[section].split("-")[position]:
            pytest.skip(f"{section}: the seed was made with another library version ({stamp})")
        assert stamp == stamps[section], (
            f"{section}: the seed is stale; run python tests/cache_seed/regenerate_seed.py")


def test_the_seed_equals_what_a_cold_derivation_stores() -> None:
    if {e["stamp"] for e in SEED["derivation"].values()} != {_current_stamps()["derivation"]}:
        pytest.skip("the seed does not apply to this checkout's engine or sympy")
    with tempfile.TemporaryDirectory() as scratch:
        folder = Path(scratch)
        regenerate.derive_all(regenerate.corpus(folder), folder / "cache")
        fresh = regenerate.collect(folder / "cache")
    assert fresh["derivation"] == SEED["derivation"]


def test_only_parameter_free_conjugates_are_shipped() -> None:
    # Steps that involve a problem's own data are derived on the user's machine.
    for key in SEED["derivation"]:
        assert key.startswith("conjugate|")
        assert set(regenerate.ONLY_T.findall(key)) == {"t"}, key


def _derive(example: str, cache: str | None, seed: bool, cwd: Path) -> bytes:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1", NO_COLOR="1")
    env.pop("DUALIZE_CACHE", None)
    env.pop("DUALIZE_CACHE_SEED", None)
    if cache is None:
        env["DUALIZE_CACHE"] = "off"
    else:
        env["DUALIZE_CACHE_DIR"] = cache
    if not seed:
        env["DUALIZE_CACHE_SEED"] = "off"
    done = subprocess.run([sys.executable, "-m", "dualize", "derive",
                           str(ROOT / "examples" / example)], env=env, capture_output=True,
                          timeout=300, cwd=cwd, check=False)
    assert done.returncode == 0, done.stderr.decode()
    return done.stdout


def test_a_cold_run_with_the_seed_prints_what_a_run_without_any_cache_prints(
        tmp_path: Path) -> None:
    for example in ("route_entropy.prob", "robot_analytic_center.prob"):
        seeded = _derive(example, str(tmp_path / example), True, tmp_path)
        plain = _derive(example, None, False, tmp_path)
        assert seeded == plain


def test_a_seed_entry_with_a_foreign_stamp_is_a_miss(monkeypatch: pytest.MonkeyPatch,
                                                    tmp_path: Path) -> None:
    key = next(iter(SEED["derivation"]))
    entry = dict(SEED["derivation"][key], stamp="made-by-other-code")
    monkeypatch.setenv("DUALIZE_CACHE_DIR", str(tmp_path))
    monkeypatch.setattr(disk_cache, "seed", lambda: {"derivation": {key: entry}})
    assert disk_cache.lookup("derivation", key, SEED["derivation"][key]["stamp"]) is None
    assert disk_cache.lookup("derivation", key, "made-by-other-code") == entry["payload"]
