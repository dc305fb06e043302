"""The on-disk cache of derived conjugates: identical output, damaged entries, concurrency."""

from __future__ import annotations

import json
import multiprocessing
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
import sympy

from dualize.duality import derivation_cache as cache
from dualize.duality import separable

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "examples" / "route_entropy.prob"


def _derive(env_cache: Path | None, tmp: Path) -> bytes:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1")
    env.pop("DUALIZE_CACHE", None)
    if env_cache is None:
        env["DUALIZE_CACHE"] = "off"
    else:
        env["DUALIZE_CACHE_DIR"] = str(env_cache)
    done = subprocess.run([sys.executable, "-m", "dualize", "derive", str(EXAMPLE)],
                          env=env, capture_output=True, timeout=300, cwd=tmp, check=False)
    assert done.returncode == 0, done.stderr.decode()
    return done.stdout


def _entries(folder: Path) -> list[Path]:
    return sorted((folder / "derivation").glob("*.json"))


def test_a_cache_hit_prints_what_a_cold_run_prints(tmp_path: Path) -> None:
    # The cache must be invisible in the output (byte-identical, as every run must be).
    folder = tmp_path / "cache"
    without = _derive(None, tmp_path)
    cold = _derive(folder, tmp_path)
    assert _entries(folder), "the cold run stored nothing"
    warm = _derive(folder, tmp_path)
    assert cold == without
    assert warm == cold


@pytest.fixture
def private_cache(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    monkeypatch.setenv("DUALIZE_CACHE_DIR", str(tmp_path))
    monkeypatch.delenv("DUALIZE_CACHE", raising=False)
    separable._conjugate.cache_clear()
    return tmp_path


def _entropy_derivation_text() -> str:
    from dualize.duality import derive
    from dualize.model import load_file

    separable._conjugate.cache_clear()
    loaded = load_file(EXAMPLE)
    assert loaded.problem is not None
    return repr(derive(loaded.problem))


def test_a_warm_entry_is_used_without_deriving(private_cache: Path,
                                              monkeypatch: pytest.MonkeyPatch) -> None:
    cold = _entropy_derivation_text()

    def refuse(*args: object) -> None:
        raise AssertionError("derived again despite a stored entry")

    monkeypatch.setattr(separable, "_derive_on", refuse)
    assert _entropy_derivation_text() == cold


@pytest.mark.parametrize("damage", ["garbage", "truncated", "foreign", "hostile", "flipped"])
def test_a_damaged_entry_is_ignored_and_rebuilt(private_cache: Path, damage: str) -> None:
    cold = _entropy_derivation_text()
    entries = _entries(private_cache)
    assert entries
    for path in entries:
        text = path.read_text()
        if damage == "garbage":
            path.write_bytes(b"\x00\xff not json")
        elif damage == "truncated":
            path.write_text(text[: len(text) // 2])
        elif damage == "foreign":
            entry = json.loads(text)
            entry["stamp"] = "0-other-version"
            path.write_text(json.dumps(entry))
        elif damage == "hostile":
            entry = json.loads(text)
            entry["payload"] = {"outcome": {"closed_form": True, "value": ["__import__", "os"]}}
            entry["digest"] = cache.disk_cache._digest(entry["payload"])
            path.write_text(json.dumps(entry))
        else:  # a digit changed in place: still valid JSON, caught by the digest
            entry = json.loads(text)
            before = json.dumps(entry["payload"])
            digit = re.search(r"\d", before)
            assert digit is not None
            flipped = "7" if digit.group() != "7" else "3"
            after = before[: digit.start()] + flipped + before[digit.end():]
            entry["payload"] = json.loads(after)
            path.write_text(json.dumps(entry))
    assert _entropy_derivation_text() == cold
    for path in _entries(private_cache):
        assert json.loads(path.read_text())["stamp"] == cache.stamp()


def test_formulas_read_back_identically() -> None:
    s = sympy.Symbol("s", real=True)
    c = sympy.Symbol("c", positive=True)
    for expr in (s * sympy.log(s) + (1 - s) * sympy.log(1 - s),
                 c * sympy.exp(s / c - 1), sympy.Max(s, 0) ** 2 / 2,
                 sympy.Interval(0, 1), sympy.Interval.open(-sympy.oo, 0),
                 sympy.Piecewise((0, s < 1), (1, True)), sympy.FiniteSet(sympy.Rational(3, 2))):
        assert cache.decode(json.loads(json.dumps(cache.encode(expr)))) == expr


def test_the_reader_builds_nothing_outside_its_whitelist() -> None:
    with pytest.raises(ValueError):
        cache.decode(["__import__", ["S", "os", {}]])
    with pytest.raises(cache.Unstorable):
        cache.encode(sympy.Float(0.1) * sympy.Symbol("s"))


def _writer(folder: str, index: int) -> None:
    os.environ["DUALIZE_CACHE_DIR"] = folder
    big = {"outcome": [index] * 20000}
    for _ in range(40):
        cache.store("shared-key", big)
        found = cache.lookup("shared-key")
        assert found is not None and len(found["outcome"]) == 20000
        assert len(set(found["outcome"])) == 1


def test_concurrent_writers_never_leave_a_damaged_entry(tmp_path: Path) -> None:
    # os.replace is atomic on POSIX (common practice): a reader sees a whole old or a
    # whole new entry, never a mix.
    context = multiprocessing.get_context("spawn")
    workers = [context.Process(target=_writer, args=(str(tmp_path), i)) for i in range(4)]
    for w in workers:
        w.start()
    for w in workers:
        w.join(120)
    assert all(w.exitcode == 0 for w in workers)
    os.environ.pop("DUALIZE_CACHE_DIR", None)
    entries = _entries(tmp_path)
    assert len(entries) == 1
    entry = json.loads(entries[0].read_text())
    assert len(set(entry["payload"]["outcome"])) == 1
    assert not [p for p in (tmp_path / "derivation").iterdir() if p.name.startswith(".tmp-")]
