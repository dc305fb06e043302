"""Finding 6: after the README's first command (``pip install .``) every command of the
tour works, so what ``verify`` and ``check`` import must be a regular dependency."""

from __future__ import annotations

import re
import tomllib

from tests.reliability.helpers import ROOT, dualize


def _regular_dependencies() -> set[str]:
    meta = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    return {re.split(r"[<>=!~\[ ;]", dep, maxsplit=1)[0].lower()
            for dep in meta["project"]["dependencies"]}


def test_finding6_numeric_reference_is_a_regular_dependency():
    # verify and check solve primal and dual with cvxpy (their numeric reference).
    assert "cvxpy" in _regular_dependencies()
    for module in ("dualize/numeric/reference.py",):
        assert "import cvxpy" in (ROOT / module).read_text(encoding="utf-8")


def test_finding6_verify_runs_on_the_tour_example():
    run = dualize("verify", str(ROOT / "examples" / "joinery_lp.prob"))
    assert run.returncode == 0, run.stderr
    assert "internal error" not in run.stderr
