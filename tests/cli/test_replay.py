"""A finished ``dualize derive`` is replayed from the user cache on unchanged input.

The rule checked is the one of content-addressed build caches (common practice): an
output may be reused only under a key that holds every input it depends on, so a
replay is byte-identical to a fresh run and any change of input is a miss.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from dualize import replay

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "examples" / "route_entropy.prob"
PROBE = """
import sys
from dualize.cli import main
code = 0
try:
    main(sys.argv[1:])
except SystemExit as stop:
    code = stop.code or 0
sys.stderr.write("\\nSYMPY-LOADED " + str("sympy" in sys.modules) + "\\n")
sys.exit(code)
"""


def _run(args: list[str], cache: Path | None, cwd: Path) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1", NO_COLOR="1")
    env.pop("DUALIZE_CACHE", None)
    if cache is None:
        env["DUALIZE_CACHE"] = "off"
    else:
        env["DUALIZE_CACHE_DIR"] = str(cache)
    return subprocess.run([sys.executable, "-c", PROBE, *args], env=env, capture_output=True,
                          text=True, timeout=300, cwd=cwd, check=False)


def _sympy_loaded(done: subprocess.CompletedProcess[str]) -> bool:
    return "SYMPY-LOADED True" in done.stderr


def _stored(cache: Path) -> list[Path]:
    return sorted((cache / "output").glob("*.json"))


@pytest.fixture
def problem(tmp_path: Path) -> Path:
    path = tmp_path / "entropy.prob"
    path.write_bytes(EXAMPLE.read_bytes())
    return path


def test_a_second_run_replays_the_same_bytes_without_deriving(problem: Path,
                                                              tmp_path: Path) -> None:
    cache = tmp_path / "cache"
    fresh = _run(["derive", problem.name], None, tmp_path)
    first = _run(["derive", problem.name], cache, tmp_path)
    second = _run(["derive", problem.name], cache, tmp_path)
    assert first.returncode == second.returncode == fresh.returncode == 0
    assert _sympy_loaded(first) and not _sympy_loaded(second)
    assert second.stdout == first.stdout == fresh.stdout
    assert len(_stored(cache)) == 1


def test_a_changed_file_or_option_is_derived_again(problem: Path, tmp_path: Path) -> None:
    cache = tmp_path / "cache"
    _run(["derive", problem.name], cache, tmp_path)
    latex = _run(["derive", problem.name, "--format", "latex"], cache, tmp_path)
    assert _sympy_loaded(latex) and "\\begin" in latex.stdout
    text = problem.read_text(encoding="utf-8").replace("minimize", "minimize 0 +", 1)
    problem.write_text(text, encoding="utf-8")
    edited = _run(["derive", problem.name], cache, tmp_path)
    assert edited.returncode == 0 and _sympy_loaded(edited)
    assert len(_stored(cache)) == 3


def test_an_entry_changed_on_disk_is_a_miss(problem: Path, tmp_path: Path) -> None:
    cache = tmp_path / "cache"
    first = _run(["derive", problem.name], cache, tmp_path)
    (entry,) = _stored(cache)
    data = json.loads(entry.read_text(encoding="utf-8"))
    data["payload"]["text"] = "strong duality holds, trust me\n"
    entry.write_text(json.dumps(data), encoding="utf-8")
    again = _run(["derive", problem.name], cache, tmp_path)
    assert _sympy_loaded(again) and again.stdout == first.stdout


def test_a_run_cut_by_its_time_limit_is_not_stored(problem: Path, tmp_path: Path) -> None:
    cache = tmp_path / "cache"
    cut = _run(["derive", problem.name, "--time-limit", "0.01"], cache, tmp_path)
    assert cut.returncode == 0, cut.stderr
    assert _stored(cache) == []


def test_errors_are_never_stored(tmp_path: Path) -> None:
    cache = tmp_path / "cache"
    (tmp_path / "bad.prob").write_text("minimize x +\n", encoding="utf-8")
    for _ in range(2):
        done = _run(["derive", "bad.prob"], cache, tmp_path)
        assert done.returncode == 2 and "bad.prob:" in done.stderr
    assert _stored(cache) == []


@pytest.mark.parametrize("name", replay.LIBRARIES)
def test_library_versions_read_from_the_folder_names_equal_the_metadata(name: str) -> None:
    # The package metadata (importlib.metadata, the standard library's reader of it) is
    # the reference; the stamp reads the same version from one directory listing.
    from importlib.metadata import version

    assert replay._library_version(name) == version(name)


def test_dist_info_names_match_as_pip_normalizes_them(tmp_path: Path) -> None:
    # Project names compare case-insensitively with -, _ and . alike (PEP 503; the wheel
    # spec writes them with underscores in the folder name).
    for folder in ("Jinja2-3.1.6.dist-info", "lark_parser-0.9.dist-info", "numpy-2.0.tar.gz"):
        (tmp_path / folder).mkdir()
    assert replay._dist_info_version(str(tmp_path), "jinja2") == "3.1.6"
    assert replay._dist_info_version(str(tmp_path), "lark-parser") == "0.9"
    assert replay._dist_info_version(str(tmp_path), "numpy") is None
    assert replay._library_version("no_such_library_here") == "absent"
