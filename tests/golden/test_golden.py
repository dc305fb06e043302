"""Each bundled example renders exactly as its reviewed golden files.

The golden files were read by eye against the textbook forms of the duals they
show (e.g. Cortes and Vapnik 1995 for
parts_soft_margin, Boyd and Vandenberghe 2004 section 5.1.3 for
survey_least_norm; from memory) and are regenerated only on purpose with
tests/golden/regenerate.py.
"""

from __future__ import annotations

import pytest
from regenerate import FORMATS, ROOT, example_names, golden_path, render_all

NAMES = [n for n in example_names() if golden_path(n, "txt").exists()]


@pytest.mark.parametrize("name", NAMES)
def test_rendering_matches_golden(name: str, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(ROOT)
    rendered = render_all(name)
    for suffix in FORMATS:
        expected = golden_path(name, suffix).read_text(encoding="utf-8")
        assert rendered[suffix] == expected, (
            f"{name}.{suffix} differs from its golden file; if the change is intended, "
            f"review it and run: python tests/golden/regenerate.py {name}")


def test_every_example_has_golden_files() -> None:
    missing = [f"{n}.{s}" for n in example_names() for s in FORMATS
               if not golden_path(n, s).exists()]
    assert not missing, f"run python tests/golden/regenerate.py for: {missing}"
