"""Reading instances: sizes inferred and checked, values checked against their sets.

The set memberships (sign, symmetry, semidefiniteness by eigenvalues) are the
definitions of the sets in docs/language.md; the eigenvalue test for S^n_+ and
S^n_++ is common practice.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from numeric_handbuilt import data, least_norm, m, n, problem, small_sdp, standard_lp, var

from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.numeric.instance import (
    Instance,
    InstanceError,
    parse_dims,
    read_instance,
    set_violation,
)


def write(tmp_path: Path, payload: dict, name: str = "inst.json") -> str:
    path = tmp_path / name
    path.write_text(json.dumps(payload))
    return str(path)


def test_json_sizes_inferred_and_vectors_one_dimensional(tmp_path: Path) -> None:
    path = write(tmp_path, {"A": [[1, 2, 3], [4, 5, 6]], "b": [1, 2]})
    inst = read_instance(path, least_norm())
    assert isinstance(inst, Instance)
    assert inst.dims == {"m": 2, "n": 3}
    assert inst.values["b"].shape == (2,)
    assert inst.values["A"].shape == (2, 3)
    assert inst.source == path


def test_toml_and_npy_files(tmp_path: Path) -> None:
    np.save(tmp_path / "A.npy", np.arange(6.0).reshape(2, 3))
    path = tmp_path / "inst.toml"
    path.write_text('b = [1.0, 2.0]\nA = { file = "A.npy" }\n')
    inst = read_instance(str(path), least_norm())
    np.testing.assert_array_equal(inst.values["A"], np.arange(6.0).reshape(2, 3))


def test_column_vector_given_as_nested_list(tmp_path: Path) -> None:
    inst = read_instance(write(tmp_path, {"A": [[1, 0], [0, 1]], "b": [[3], [4]]}),
                         least_norm())
    assert inst.values["b"].shape == (2,)


def test_explicit_dimension_for_variable_only_size(tmp_path: Path) -> None:
    X = var("X", n, n, "symmetric")
    p = problem(ir.Trace(X.symbol), [X], [], [], dims=(n,))
    assert read_instance(write(tmp_path, {"n": 4}), p).dims == {"n": 4}
    with pytest.raises(InstanceError, match="dimension 'n' is not fixed"):
        read_instance(write(tmp_path, {}), p)


@pytest.mark.parametrize(("payload", "words"), [
    ({"A": [[1, 2]]}, ["missing value", "'b'"]),
    ({"A": [[1, 2]], "b": [1], "zeta": 3}, ["unknown name", "'zeta'"]),
    ({"A": [[1, 2], [3, 4]], "b": [1, 2, 3]}, ["'b' gives m = 3", "'A' gives m = 2"]),
    ({"A": [[1, 2]], "b": [1], "m": 2}, ["m = 1", "the value of m gives m = 2"]),
    ({"A": [1, 2], "b": [1]}, ["'A'", "matrix"]),
    ({"A": [[1, 2]], "b": "one"}, ["'b'", "not a number"]),
    ({"A": [[1, 2], [3]], "b": [1, 2]}, ["'A'", "rectangular"]),
    ({"A": [[1, 2]], "b": [1], "m": 0}, ["dimension 'm'", "positive integer"]),
    ({"A": [[1, float("nan")]], "b": [1]}, ["'A'", "not finite"]),
    ({"A": [[1, 2]], "b": {"file": "nowhere.npy"}}, ["'b'", "nowhere.npy"]),
    ({"A": [[1, 2]], "b": [True]}, ["'b'", "true/false"]),
    ({"A": [[1, 2]], "b": {"path": "b.npy"}}, ["'b'", "file"]),
])
def test_errors_name_the_value_and_the_file(tmp_path: Path, payload: dict,
                                            words: list[str]) -> None:
    path = write(tmp_path, payload)
    with pytest.raises(InstanceError) as info:
        read_instance(path, least_norm())
    assert info.value.exit_code == 2
    assert isinstance(info.value, DualizeError)
    assert path in info.value.message
    for word in words:
        assert word in info.value.message


def test_numeric_size_must_match(tmp_path: Path) -> None:
    d = data("v", 3, 1)
    x = var("x")
    p = problem(x.symbol, [x], [d], [], dims=())
    with pytest.raises(InstanceError, match="'v'.*size 2 where 3"):
        read_instance(write(tmp_path, {"v": [1, 2]}), p)


def test_unreadable_and_malformed_files(tmp_path: Path) -> None:
    with pytest.raises(InstanceError, match="cannot read"):
        read_instance(str(tmp_path / "absent.json"), least_norm())
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    with pytest.raises(InstanceError, match="not a valid instance"):
        read_instance(str(bad), least_norm())
    deep = tmp_path / "deep.json"
    deep.write_text("[" * 100000 + "]" * 100000)
    with pytest.raises(InstanceError, match="not a valid instance"):
        read_instance(str(deep), least_norm())
    listed = tmp_path / "list.json"
    listed.write_text("[1, 2]")
    with pytest.raises(InstanceError, match="map names"):
        read_instance(str(listed), least_norm())


def test_value_outside_its_set_is_named(tmp_path: Path) -> None:
    payload = {"A": [[1, 1]], "b": [1], "c": [1, -2]}
    with pytest.raises(InstanceError, match="'c' is not in R\\^n_\\+: entry 2 is negative"):
        read_instance(write(tmp_path, payload), standard_lp())


def test_non_symmetric_matrix_for_symmetric_set(tmp_path: Path) -> None:
    payload = {"C": [[1, 2], [0, 1]], "A1": [[1, 0], [0, 1]], "b1": 1}
    with pytest.raises(InstanceError, match="'C' is not in S\\^n: it is not symmetric"):
        read_instance(write(tmp_path, payload), small_sdp())


@pytest.mark.parametrize(("value", "facts", "expected"), [
    (2.0, {"pos", "nonneg"}, None),
    (0.0, {"pos", "nonneg"}, "entry 1 is not positive"),
    (0.0, {"nonneg"}, None),
    (np.array([1.0, -0.5]), {"nonneg"}, "entry 2 is negative"),
    (np.array([1.0, 2.5]), {"integer"}, "entry 2 is not an integer"),
    (np.array([1.0, 2.0]), {"binary", "integer"}, "entry 2 is neither 0 nor 1"),
    (np.array([[2.0, 1.0], [1.0, 2.0]]), {"symmetric", "psd", "pd"}, None),
    (np.array([[1.0, 1.0], [1.0, 1.0]]), {"symmetric", "psd"}, None),
    (np.array([[1.0, 1.0], [1.0, 1.0]]), {"symmetric", "psd", "pd"}, "not positive definite"),
    (np.array([[1.0, 2.0], [2.0, 1.0]]), {"symmetric", "psd"}, "not positive semidefinite"),
    (np.array([[1.0, 2.0], [2.0 + 1e-12, 1.0]]), {"symmetric"}, None),
    (np.array([[1.0, 2.0], [2.0 + 1e-6, 1.0]]), {"symmetric"}, "not symmetric"),
    (np.array([1.0, 2.0]), {"symmetric"}, "square matrix"),
])
def test_set_membership(value: object, facts: set[str], expected: str | None) -> None:
    got = set_violation(value, frozenset(facts))  # type: ignore[arg-type]
    if expected is None:
        assert got is None
    else:
        assert got is not None and expected in got


def test_matrix_entry_is_reported_with_row_and_column() -> None:
    got = set_violation(np.array([[1.0, 2.0], [3.0, -4.0]]), frozenset({"nonneg"}))
    assert got == "entry (2, 2) is negative"


def test_parse_dims() -> None:
    assert parse_dims("m=50,n=10") == {"m": 50, "n": 10}
    assert parse_dims(" n = 3 ") == {"n": 3}
    assert parse_dims("") == {}
    for bad in ("m", "m=0", "m=x", "3=4", "m=-1"):
        with pytest.raises(DualizeError, match="bad dimension"):
            parse_dims(bad)


def test_bundled_example_instances_read_cleanly() -> None:
    # Only once the resolver exists; the examples are this project's own.
    model = pytest.importorskip("dualize.model")
    if not hasattr(model, "load"):
        pytest.skip("the resolver has not landed yet")
    root = Path(__file__).resolve().parents[2] / "examples"
    checked = 0
    for prob in sorted(root.glob("*.prob")):
        loaded = model.load(prob.read_text(), str(prob))
        inst_path = prob.with_suffix(".json")
        if loaded.problem is None or not inst_path.exists():
            continue
        inst = read_instance(str(inst_path), loaded.problem)
        assert set(inst.values) == {d.name for d in loaded.problem.data}
        checked += 1
    assert checked > 0


def test_dims_ordered_and_shapes_consistent(tmp_path: Path) -> None:
    inst = read_instance(write(tmp_path, {"b": [1, 2], "A": [[1, 2, 3], [4, 5, 6]]}),
                         least_norm())
    assert list(inst.dims) == sorted(inst.dims) == [m.name, n.name]
