"""Every bundled example loads without a diagnostic from the front end."""

from pathlib import Path

import pytest

from dualize.model import load_file

EXAMPLES = sorted((Path(__file__).resolve().parents[1] / "examples").glob("*.prob"))


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_parses_and_resolves_clean(path: Path) -> None:
    loaded = load_file(path)
    assert loaded.diagnostics == ()
    assert loaded.problem is not None
    assert loaded.problem.objective.shape.is_scalar
    assert loaded.problem.variables


def test_loading_is_deterministic() -> None:
    for path in EXAMPLES:
        assert repr(load_file(path)) == repr(load_file(path))
