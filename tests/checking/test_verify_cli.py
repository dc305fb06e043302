"""``dualize verify`` through click's runner: outputs, exit codes, and the numbers."""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import numpy as np
from click.testing import CliRunner

from dualize.commands.verify import verify_command
from tests.checking.paths import EXAMPLES, example


def _run(*args: str):  # type: ignore[no-untyped-def]
    return CliRunner().invoke(verify_command, list(args))


def test_default_instance_is_the_bundled_one_and_zero_gap_exits_0() -> None:
    result = _run(str(EXAMPLES / "joinery_lp.prob"))
    assert result.exit_code == 0, result.output
    assert "joinery_lp.json" in result.output
    assert "verdict: zero-gap" in result.output
    assert "within solver tolerances" in result.output
    assert "weak duality only" not in result.output


def test_json_report_has_every_field() -> None:
    result = _run(str(EXAMPLES / "survey_least_norm.prob"), "--random", "2", "--seed", "5",
                  "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["verdict"] == "zero-gap"
    assert [i["seed"] for i in data["instances"]] == [5, 6]
    for inst in data["instances"]:
        assert {"seed", "primal_value", "dual_value", "gap", "primal_status", "dual_status",
                "multiplier_error"} <= set(inst)
        # Strong duality for a feasible convex problem with affine constraints only
        # (Boyd and Vandenberghe, 2004, section 5.2.3, from memory): the gap is zero.
        assert abs(inst["gap"]) <= 1e-6 * max(1.0, abs(inst["primal_value"]))
    assert data["max_abs_gap"] <= 1e-6


def test_dims_option_sets_sizes() -> None:
    result = _run(str(EXAMPLES / "survey_least_norm.prob"), "--random", "1", "--dims",
                  "m=2,n=7", "--format", "json")
    assert result.exit_code == 0, result.output
    assert json.loads(result.output)["verdict"] == "zero-gap"


def test_lp_multipliers_agree_with_highs_marginals() -> None:
    # scipy.optimize.linprog documentation (method "highs"): ineqlin.marginals and
    # eqlin.marginals are the sensitivities of the optimal value to the right-hand sides,
    # the negated multipliers of L = c'x + y'(Ax - b) (common practice).  Random
    # instances, since a degenerate LP (the bundled flour blend) has many multipliers.
    from dualize.duality import derive
    from dualize.numeric.reference import solve_dual
    from dualize.numeric.verify import verify

    # Sizes that make the optimal multipliers unique for generic data: more inequalities
    # than variables, fewer equalities than variables.
    cases = (("joinery_lp", "hours", "ineq", {"m": 6, "n": 3}),
             ("flour_blend_lp", "nu", "eq", {"m": 3, "n": 6}))
    for name, label, kind, dims in cases:
        derivation = derive(example(name))
        for seed in (0, 1, 2):
            [inst] = _random_instances(derivation, seed, dims)
            report = verify(derivation, [inst])
            assert report.verdict == "zero-gap"
            assert report.checks[0].multiplier_error is not None
            assert report.checks[0].multiplier_error < 1e-5
            marginals, value = _highs(inst.values, kind)
            ours = solve_dual(derivation.dual, inst).x[label]
            np.testing.assert_allclose(ours, -marginals, atol=1e-5)
            assert abs(report.checks[0].primal_value - value) < 1e-6 * max(1.0, abs(value))


def _random_instances(derivation, seed: int, dims):  # type: ignore[no-untyped-def]
    from dualize.numeric.dual_data import make_dual_feasible
    from dualize.numeric.random_data import random_instance

    return [make_dual_feasible(derivation, random_instance(derivation.problem, dims, seed),
                               seed)]


def _highs(values, kind: str) -> tuple[np.ndarray, float]:  # type: ignore[no-untyped-def]
    from scipy.optimize import linprog

    A, b, c = (np.asarray(values[k], dtype=float) for k in ("A", "b", "c"))
    if kind == "ineq":
        ref = linprog(c, A_ub=A, b_ub=b, bounds=(None, None), method="highs")
        return ref.ineqlin.marginals, float(ref.fun)
    ref = linprog(c, A_eq=A, b_eq=b, bounds=(0, None), method="highs")
    return ref.eqlin.marginals, float(ref.fun)


def test_nonconvex_partitioning_shows_a_gap_with_weak_duality_only() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): two-way partitioning is
    # nonconvex and its dual is only a lower bound.  p* is found here independently by
    # enumerating every sign vector x in {-1, 1}^n.
    path = EXAMPLES / "shift_partition.json"
    result = _run(str(EXAMPLES / "shift_partition.prob"), "--data", str(path))
    assert result.exit_code == 1
    assert "verdict: gap" in result.output and "weak duality only" in result.output
    data = json.loads(_run(str(EXAMPLES / "shift_partition.prob"), "--data", str(path),
                           "--format", "json").output)
    assert data["weak_duality_only"] is True and data["verdict"] == "gap"
    W = np.asarray(json.loads(path.read_text())["W"], dtype=float)
    best = min(float(np.array(x) @ W @ np.array(x))
               for x in itertools.product((-1.0, 1.0), repeat=W.shape[0]))
    [inst] = data["instances"]
    assert inst["dual_value"] < best - 1e-3
    assert inst["gap"] > 1e-3


def test_infeasible_instance_gives_nulls_with_statuses(tmp_path: Path) -> None:
    # x <= -1 and -x <= -1 have no solution (common practice): the primal is infeasible,
    # the dual unbounded, so no finite value can be reported; that pair is what weak
    # duality predicts (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section
    # 5.2.2, from memory), so the verdict is infinite-agree and the exit status 0.
    data = tmp_path / "empty.json"
    data.write_text(json.dumps({"A": [[1], [-1]], "b": [-1, -1], "c": [1]}))
    result = _run(str(EXAMPLES / "joinery_lp.prob"), "--data", str(data), "--format", "json")
    assert result.exit_code == 0, result.output
    report = json.loads(result.output)
    assert report["verdict"] == "infinite-agree"
    [inst] = report["instances"]
    assert inst["primal_value"] is None and inst["primal_status"] == "infeasible"
    assert inst["dual_status"] == "unbounded"
    assert inst["gap"] is None


def test_unbounded_primal_with_infeasible_dual_agrees(tmp_path: Path) -> None:
    # minimize c'x s.t. A x <= b with A = [-1], c = -1 (minimize -x over x >= -1) falls
    # without bound; its dual max -b'l s.t. A'l + c = 0, l >= 0 needs l = -1, so it is
    # infeasible: the other pair weak duality predicts (Boyd and Vandenberghe, 2004,
    # section 5.2.2, from memory).
    data = tmp_path / "ray.json"
    data.write_text(json.dumps({"A": [[-1]], "b": [1], "c": [-1]}))
    result = _run(str(EXAMPLES / "joinery_lp.prob"), "--data", str(data))
    assert result.exit_code == 0, result.output
    assert "verdict: infinite-agree" in result.output
    assert "unbounded" in result.output and "infeasible" in result.output


def test_bad_input_exits_2(tmp_path: Path) -> None:
    assert _run(str(tmp_path / "missing.prob")).exit_code == 2
    bad = tmp_path / "bad.prob"
    bad.write_text("minimize x +\n")
    result = _run(str(bad))
    assert result.exit_code == 2 and "bad.prob:" in result.output
    joinery = str(EXAMPLES / "joinery_lp.prob")
    assert _run(joinery, "--dims", "m=zero").exit_code == 2
    assert _run(joinery, "--data", str(tmp_path / "none.json")).exit_code == 2
    both = _run(joinery, "--random", "2", "--data", str(EXAMPLES / "joinery_lp.json"))
    assert both.exit_code == 2


def test_output_is_deterministic() -> None:
    args = (str(EXAMPLES / "flour_blend_lp.prob"), "--random", "2", "--format", "json")
    assert _run(*args).output == _run(*args).output


class _Terminal:
    """A stand-in for stderr that says it is a terminal and keeps what is written."""

    def __init__(self, tty: bool) -> None:
        self.tty = tty
        self.text = ""

    def isatty(self) -> bool:
        return self.tty

    def write(self, text: str) -> int:
        self.text += text
        return len(text)

    def flush(self) -> None:
        pass


def test_progress_bar_only_on_a_terminal_and_for_several_items(monkeypatch) -> None:  # type: ignore[no-untyped-def]
    import dualize.commands.common as common

    for tty, items, shown in ((True, [1, 2, 3], True), (False, [1, 2, 3], False),
                              (True, [1], False)):
        fake = _Terminal(tty)
        monkeypatch.setattr(common.sys, "stderr", fake)
        assert list(common.progress(items, "verifying")) == items
        assert ("verifying" in fake.text) == shown


def test_text_report_closes_with_the_verdict() -> None:
    result = _run(str(EXAMPLES / "joinery_lp.prob"))
    lines = result.output.rstrip("\n").splitlines()
    assert lines[-1].startswith("verdict: zero-gap")
    assert "within solver tolerances" in lines[-2]


def test_scalar_textbook_values() -> None:
    # Boyd and Vandenberghe, 2004, exercise 5.1 (from memory): minimize x^2 + 1 s.t.
    # (x - 2)(x - 4) <= 0 has p* = d* = 5.  J. Nocedal and S. Wright, Numerical
    # Optimization, 2nd ed., 2006, chapter 12 (from memory): minimize x1 + x2 s.t.
    # 2 - x1^2 - x2^2 >= 0 has p* = -2 at (-1, -1).
    for name, value in (("window_scalar", 5.0), ("disk_scalar", -2.0)):
        result = _run(str(EXAMPLES / f"{name}.prob"), "--format", "json")
        assert result.exit_code == 0, result.output
        [inst] = json.loads(result.output)["instances"]
        assert abs(inst["primal_value"] - value) < 1e-6
        assert abs(inst["dual_value"] - value) < 1e-6
