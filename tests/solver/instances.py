"""Random instances and array helpers shared by the generated-solver tests (invented data)."""

from __future__ import annotations

import numpy as np


def arrays(data: dict, *names: str) -> list[np.ndarray]:
    return [np.array(data[k], dtype=float) for k in names]


def equality_instance(seed: int, m: int = 3, n: int = 6) -> dict:
    """A x = b with a wide random A: feasible, for the least-norm problems."""
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "b": rng.normal(size=m).tolist()}


def center_instance(seed: int, n: int = 3) -> dict:
    """A bounded polyhedron A x <= b with an interior (a box plus three random rows)."""
    rng = np.random.default_rng(seed)
    A = np.vstack([np.eye(n), -np.eye(n), rng.normal(size=(3, n))])
    b = A @ (0.1 * rng.normal(size=n)) + 0.5 + rng.random(len(A))
    return {"A": A.tolist(), "b": b.tolist()}


def softmax_instance(seed: int, m: int = 6, n: int = 2) -> dict:
    """log(sum(exp(A x + b))) bounded below: 0 lies in the hull of the rows of A."""
    rng = np.random.default_rng(seed)
    rows = rng.normal(size=(m - 1, n))
    A = np.vstack([rows, -rows.sum(axis=0)])
    return {"A": A.tolist(), "b": rng.normal(size=m).tolist()}
