"""Unit tests of the generated modules' runtime (dualize/solvergen/runtime*.py), run directly.

The dual used throughout is the least-norm problem's: minimize |x|^2 / 2 subject to
A x = b has the dual maximize b'v - |A'v|^2 / 2, attained at v = (A A')^-1 b with
x = A'v and the common value b'(A A')^-1 b / 2 (S. Boyd and L. Vandenberghe, Convex
Optimization, 2004, section 5.1.5 and exercise 5.x on least-norm solutions, from memory).
"""

from __future__ import annotations

import numpy as np
import pytest

from dualize.solvergen import runtime, runtime_report
from dualize.solvergen.solver import runtime_source


def least_norm_spec(method: str) -> runtime.Spec:
    """A Spec written by hand as the generator would print it for the least-norm dual."""

    def objective(z, d):  # the negated dual, minimized
        return 0.5 * float(np.sum((d["A"].T @ z) ** 2)) - float(d["b"] @ z)

    def gradient(z, d):
        return d["A"] @ (d["A"].T @ z) - d["b"]

    def primal(x, d):
        value = 0.5 * float(x["x"] @ x["x"])
        return value, [("eq", d["A"] @ x["x"] - d["b"])]

    return runtime.Spec(
        method=method, dual_names=["v"], primal_names=["x"], primal_scalar=[False],
        scalars=[False], data=[["A", "m", "n", []], ["b", "m", 1, []]], dims=["m", "n"],
        constant_hessian=True, prepare=lambda d: {}, sizes=lambda d: [d["m"]],
        objective=objective, gradient=gradient, hessian=lambda z, d: d["A"] @ d["A"].T,
        bounds=lambda d: (np.full(d["m"], -np.inf), np.full(d["m"], np.inf)),
        constraints=lambda z, d: [], recover=lambda z, d: {"x": d["A"].T @ z},
        primal=primal, caution="model as written",
    )


def instance(seed: int = 0, m: int = 3, n: int = 7) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "b": rng.normal(size=m).tolist()}


@pytest.mark.parametrize("method", ["lbfgsb", "interior"])
def test_run_solves_the_least_norm_dual_and_certifies_it(method):
    data = instance()
    report = runtime_report.run(least_norm_spec(method), data)
    A, b = np.array(data["A"]), np.array(data["b"])
    expected = 0.5 * b @ np.linalg.solve(A @ A.T, b)
    assert report["converged"], report["message"]
    assert report["dual_value"] == pytest.approx(expected, rel=1e-7)
    assert report["primal_value"] == pytest.approx(expected, rel=1e-7)
    assert np.allclose(report["primal"]["x"], np.linalg.pinv(A) @ b, atol=1e-6)
    assert abs(report["gap"]) <= 1e-6 and report["max_violation"] <= 1e-6


def test_split_cuts_z_into_parts_and_scalars():
    parts = runtime._split(np.arange(4.0), [1, 3], [True, False])
    assert isinstance(parts[0], np.float64) and parts[0] == 0.0
    assert parts[1].tolist() == [1.0, 2.0, 3.0]
    assert runtime._split(np.zeros(0), [], []) == []


def test_block_and_flat_broadcast_a_scalar():
    assert runtime._block(2.0, 2, 3).shape == (2, 3)
    assert runtime._flat(1.5, 4).tolist() == [1.5] * 4


@pytest.mark.parametrize(("raw", "words"), [
    (b'{"A": [[1, 2]], "A": [[3, 4]]}', "given twice"),
    (b'{"b": [1, NaN]}', "not a number"),
    (b'{"b": "\xff\xfe"}', "UTF-8"),
    (b"[" * 5000 + b"]" * 5000, "nested"),
    (b'{"b": ' + b"[" * 40 + b"]" * 40 + b"}", "nested"),
    (b'{"b": [1, 2', "not valid JSON"),
])
def test_load_instance_refuses_in_one_line(raw, words):
    # JSON itself (RFC 8259, sections 4 and 6) leaves duplicate names and number range to
    # the reader; refusing both is common practice for data files that steer a computation.
    with pytest.raises(runtime.InputError) as err:
        runtime.load_instance(raw)
    assert words in str(err.value) and "\n" not in str(err.value)


@pytest.mark.parametrize(("value", "words"), [
    ([[1, True], [0, 1]], "true/false"),
    ([[1, "2"], [0, 1]], "not a number"),
    ([[[1]], [[2]]], "deeper than a matrix"),
    ([[1, 2], [3]], "rectangular"),
    ([[1, 1e400], [0, 1]], "floating-point range"),
    ([[1, 10**320], [0, 1]], "floating-point range"),
    ([[1, 2], [3, float("nan")]], "not finite"),
])
def test_read_refuses_what_numpy_would_coerce(value, words):
    spec = least_norm_spec("lbfgsb")
    with pytest.raises(runtime.InputError, match=words):
        runtime._read(spec, {"A": value, "b": [1.0, 2.0]})


def test_read_binds_sizes_and_refuses_disagreement():
    spec = least_norm_spec("lbfgsb")
    d = runtime._read(spec, instance(1, 2, 5))
    assert d["m"] == 2 and d["n"] == 5
    with pytest.raises(runtime.InputError, match="disagrees"):
        runtime._read(spec, {"A": [[1.0, 2.0]], "b": [1.0, 2.0]})


def test_runtime_source_has_no_imports_and_every_module_once():
    # The emitted module carries one import block of its own; a copied import would
    # repeat it, and a missing marker would copy a module's test-only header.
    source = runtime_source()
    assert "\nimport " not in source and "\nfrom " not in source
    for name in ("def load_instance", "def _interior", "def _primal_report", "def run"):
        assert source.count(name + "(") == 1


def lp_spec(c, A, b) -> runtime.Spec:
    """min c'z s.t. A z <= b, z >= 0, as the generator would print it."""
    return runtime.Spec(
        method="linprog", dual_names=["z"], dual_sense="minimize", scalars=[False],
        prepare=lambda d: {}, sizes=lambda d: [len(c)],
        objective=lambda z, d: float(c @ z), gradient=lambda z, d: np.array(c, dtype=float),
        bounds=lambda d: (np.zeros(len(c)), np.full(len(c), np.inf)),
        constraints=lambda z, d: [("<=", A @ z - b, A)],
    )


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_normal_equation_interior_point_matches_highs(seed):
    # scipy's HiGHS as the reference optimum of a random bounded LP (c > 0, z >= 0).
    import scipy.optimize

    from dualize.solvergen import runtime_lp

    rng = np.random.default_rng(seed)
    A, c = rng.normal(size=(30, 12)), 0.5 + rng.random(12)
    b = A @ rng.random(12) + rng.random(30)
    spec = lp_spec(-c, A, b) if seed == 2 else lp_spec(c, A, b)
    z, ok, _ = runtime_lp._solve_lp(spec, {}, np.zeros(12), np.zeros(12),
                                    np.full(12, np.inf), 1e-9, 200)
    reference = scipy.optimize.linprog(spec.gradient(None, None), A_ub=A, b_ub=b,
                                       bounds=[(0, None)] * 12, method="highs")
    assert ok and reference.status == 0
    assert spec.objective(z, None) == pytest.approx(reference.fun, rel=1e-7, abs=1e-9)
    assert np.max(A @ z - b) <= 1e-7 and z.min() >= -1e-9


@pytest.mark.parametrize("chunk", [1, 3, 7, 1 << 20])
def test_bracket_depth_is_the_same_across_chunk_boundaries(chunk):
    raw = b'{"a": [[1, [2]], [[3]]], "b": {"c": [4]}}'
    assert runtime._bracket_depth(raw, chunk) == 4


def test_svec_keeps_inner_products_and_inverts():
    # The scaled vectorization keeps the trace inner product, <A, B> = svec(A)'svec(B)
    # (common practice for semidefinite cones; Clarabel's documented triangle form).
    from dualize.solvergen import runtime_conic

    rng = np.random.default_rng(4)
    a, b = rng.normal(size=(2, 4, 4))
    a, b = a + a.T, b + b.T
    assert runtime_conic._svec(a) @ runtime_conic._svec(b) == pytest.approx(np.trace(a @ b))
    assert np.allclose(runtime_conic._unsvec(runtime_conic._svec(a), 4), a)
    assert runtime_conic._svec(np.eye(2)).tolist() == [1.0, 0.0, 1.0]
