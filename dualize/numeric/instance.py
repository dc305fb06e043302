"""Instances: concrete values for a problem's data, read from a file and checked.

An instance file (JSON or TOML) maps data names, and optionally dimension
symbols, to numbers, nested lists or ``{"file": "x.npy"}``.  Sizes are
inferred from the arrays; every value must fit its declared shape and set, so
a numeric check never runs on data that contradicts the problem statement.
Scalars are stored as floats, vectors as 1-D arrays, matrices as 2-D arrays.
"""

from __future__ import annotations

import json
import re
import tomllib
import unicodedata
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

import numpy as np
import sympy

from dualize.errors import DualizeError
from dualize.model.problem import DataDecl, Problem

SYM_RTOL = 1e-9
EIG_TOL = 1e-10


class InstanceError(DualizeError):
    """An instance that does not fit its problem; the message names the value and file."""

    def __init__(self, message: str) -> None:
        super().__init__(message, exit_code=2)


class ExactValues(dict):  # type: ignore[type-arg]
    """Values as floats (the dict) and, in ``exact``, as Fractions of the file's own
    decimals: exact decisions on an instance (Slater points, feasibility) use these."""

    def __init__(self, values: dict[str, object], exact: dict[str, object]) -> None:
        super().__init__(values)
        self.exact = exact


@dataclass(frozen=True)
class Instance:
    """Values for every data name, and every dimension symbol's size."""

    values: dict[str, np.ndarray | float]
    dims: dict[str, int]
    source: str = "<random>"


def parse_dims(text: str) -> dict[str, int]:
    """``"m=50,n=10"`` as ``{"m": 50, "n": 10}``; sizes are positive integers."""
    out: dict[str, int] = {}
    for item in filter(None, (part.strip() for part in text.split(","))):
        name, sep, number = (s.strip() for s in item.partition("="))
        if not sep or not name.isidentifier() or not number.isdigit() or int(number) < 1:
            raise DualizeError(f"bad dimension '{item}': write NAME=POSITIVE_INTEGER, "
                               "e.g. m=50,n=10", exit_code=2)
        out[name] = int(number)
    return dict(sorted(out.items()))


def read_instance(path: str, problem: Problem) -> Instance:
    """Read, size and check the instance at ``path`` for ``problem``."""
    raw = _load_mapping(Path(path))
    dim_names = {d.name for d in problem.dims}
    data_names = {d.name for d in problem.data}
    for key in sorted(raw):
        if key not in dim_names and key not in data_names:
            raise InstanceError(f"{path}: unknown name '{key}': the problem has no data or "
                                "dimension of that name")
    arrays = {d.name: _to_array(raw, d, Path(path)) for d in problem.data}
    dims = _infer_dims(problem, arrays, raw, path)
    values = {d.name: _fit(arrays[d.name], d, dims, path) for d in problem.data}
    exact = {d.name: _exact(raw[d.name], values[d.name]) for d in problem.data}
    for decl in problem.data:
        problem_in_set = set_violation(values[decl.name], decl.symbol.facts, exact[decl.name])
        if problem_in_set:
            raise InstanceError(f"{path}: value of '{decl.name}' is not in {decl.set_text}: "
                                f"{problem_in_set}")
    return Instance(ExactValues(values, exact), dims, str(path))


def _decimal(text: str) -> Fraction | float:
    """A decimal of the file as the exact fraction it denotes (0.1 is 1/10, not the
    nearest double); one too long or with a huge exponent stays a float (then refused
    as not finite, or kept as the double it is)."""
    power = _EXPONENT.search(text)
    if len(text) > 400 or (power and abs(int(power.group(1))) > 400):
        return float(text)
    return Fraction(text)


_EXPONENT = re.compile(r"[eE]([+-]?\d+)$")


def _exact(raw: object, value: object) -> object:
    """Exact entries of a value: the file's fractions, or the floats of an .npy file."""
    from dualize.analysis.exact import fractions_of

    source = value if isinstance(raw, dict) else raw
    try:
        return fractions_of(source)
    except (TypeError, ValueError, OverflowError):
        return fractions_of(np.asarray(value, dtype=float))


def _load_mapping(path: Path) -> dict[str, object]:
    try:
        text = path.read_bytes()
    except OSError as err:
        raise InstanceError(f"{path}: cannot read instance file ({err.strerror})") from None
    try:
        if path.suffix.lower() == ".toml":
            raw = tomllib.loads(text.decode("utf-8"), parse_float=_decimal)
        else:
            raw = json.loads(text.decode("utf-8"), parse_float=_decimal)
    except (UnicodeDecodeError, ValueError) as err:
        raise InstanceError(f"{path}: not a valid instance file: {err}") from None
    except RecursionError:
        raise InstanceError(f"{path}: not a valid instance file: nested too deeply") from None
    if not isinstance(raw, dict):
        raise InstanceError(f"{path}: an instance file must map names to values")
    return _normalized_keys(raw, path)


def _normalized_keys(raw: dict[str, object], path: Path) -> dict[str, object]:
    """Keys compared as the problem's names are: after NFKC normalization."""
    out: dict[str, object] = {}
    for key, value in raw.items():
        name = unicodedata.normalize("NFKC", key)
        if name in out:
            raise InstanceError(f"{path}: the name '{name}' is given twice (keys equal "
                                "after Unicode normalization)")
        out[name] = value
    return out


def _to_array(raw: dict[str, object], decl: DataDecl, path: Path) -> np.ndarray:
    if decl.name not in raw:
        raise InstanceError(f"{path}: missing value for data '{decl.name}' "
                            f"(declared in {decl.set_text})")
    value = raw[decl.name]
    if isinstance(value, dict):
        value = _load_npy(value, decl.name, path)
    if _has_bool(value):
        raise InstanceError(f"{path}: value of '{decl.name}' holds true/false; write numbers")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InstanceError(f"{path}: value of '{decl.name}' is not a number or a "
                            "rectangular list of numbers") from None
    if not np.all(np.isfinite(arr)):
        raise InstanceError(f"{path}: value of '{decl.name}' has entries that are not finite")
    return arr


def _has_bool(value: object) -> bool:
    if isinstance(value, bool):
        return True
    return isinstance(value, list) and any(_has_bool(v) for v in value)


def _load_npy(spec: dict[str, object], name: str, path: Path) -> np.ndarray:
    file = spec.get("file")
    if set(spec) != {"file"} or not isinstance(file, str):
        raise InstanceError(f"{path}: value of '{name}' must be a number, a list or "
                            '{"file": "NAME.npy"}')
    target = path.parent / file
    try:
        return np.load(target, allow_pickle=False)
    except (OSError, ValueError) as err:
        raise InstanceError(f"{path}: cannot load '{file}' for '{name}': {err}") from None


def _declared(decl: DataDecl) -> tuple[sympy.Expr, sympy.Expr]:
    return decl.symbol.sym_shape.rows, decl.symbol.sym_shape.cols


def _slots(arr: np.ndarray, decl: DataDecl, path: str) -> tuple[int, int]:
    """The (rows, cols) an array offers for the declared shape of ``decl``."""
    rows, cols = _declared(decl)
    if rows == 1 and cols == 1:
        if arr.size != 1:
            raise InstanceError(f"{path}: '{decl.name}' must be a scalar, got an array "
                                f"of shape {arr.shape}")
        return 1, 1
    if cols == 1 and (arr.ndim == 1 or (arr.ndim == 2 and arr.shape[1] == 1)):
        return arr.shape[0], 1
    if arr.ndim != 2:
        raise InstanceError(f"{path}: '{decl.name}' must be a {_shape_text(decl)}, got an "
                            f"array of shape {arr.shape}")
    return arr.shape[0], arr.shape[1]


def _shape_text(decl: DataDecl) -> str:
    rows, cols = _declared(decl)
    return f"vector of length {rows}" if cols == 1 else f"{rows}x{cols} matrix"


def _infer_dims(problem: Problem, arrays: dict[str, np.ndarray], raw: dict[str, object],
                path: str) -> dict[str, int]:
    """Bind each dimension symbol to a size; every binding must agree."""
    dims: dict[str, int] = {}
    seen_from: dict[str, str] = {}
    for dim in problem.dims:
        if dim.name in raw:
            dims[dim.name] = _dim_value(raw[dim.name], dim.name, path)
            seen_from[dim.name] = f"the value of {dim.name}"
    for decl in problem.data:
        offered = _slots(arrays[decl.name], decl, path)
        for size, got in zip(_declared(decl), offered, strict=True):
            _bind(size, got, decl, dims, seen_from, path)
    missing = [d.name for d in problem.dims if d.name not in dims]
    if missing:
        raise InstanceError(f"{path}: dimension '{missing[0]}' is not fixed by the data; "
                            f"add \"{missing[0]}\": SIZE to the instance")
    return dict(sorted(dims.items()))


def _dim_value(value: object, name: str, path: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        raise InstanceError(f"{path}: dimension '{name}' must be a positive integer, "
                            f"got {value!r}")
    return value


def _bind(size: sympy.Expr, got: int, decl: DataDecl, dims: dict[str, int],
          seen_from: dict[str, str], path: str) -> None:
    if size.is_Integer:
        if int(size) != got:
            raise InstanceError(f"{path}: '{decl.name}' must be a {_shape_text(decl)}, "
                                f"got size {got} where {size} is declared")
        return
    if not size.is_Symbol:
        return  # a compound size is checked when the value is fitted
    name = size.name
    if name in dims and dims[name] != got:
        raise InstanceError(f"{path}: '{decl.name}' gives {name} = {got}, but "
                            f"{seen_from[name]} gives {name} = {dims[name]}")
    dims.setdefault(name, got)
    seen_from.setdefault(name, f"'{decl.name}'")


def _fit(arr: np.ndarray, decl: DataDecl, dims: dict[str, int],
         path: str) -> np.ndarray | float:
    from dualize.numeric.evaluate import shape_of

    rows, cols = shape_of(decl.symbol.sym_shape, dims)
    if arr.size != rows * cols:
        raise InstanceError(f"{path}: '{decl.name}' has shape {arr.shape}, expected "
                            f"{rows}x{cols}")
    if rows == 1 and cols == 1:
        return float(arr.reshape(-1)[0])
    if cols == 1:
        return arr.reshape(rows).copy()
    return arr.reshape(rows, cols).copy()


def set_violation(value: np.ndarray | float, facts: frozenset[str],
                  exact: np.ndarray | None = None) -> str | None:
    """Why ``value`` is outside the set the ``facts`` describe, or None if inside
    (definiteness decided on the ``exact`` entries when given)."""
    arr = np.atleast_1d(np.asarray(value, dtype=float))
    if "pos" in facts and np.any(arr <= 0):
        return f"entry {_first(arr <= 0)} is not positive"
    if "nonneg" in facts and np.any(arr < 0):
        return f"entry {_first(arr < 0)} is negative"
    if "integer" in facts and np.any(arr != np.round(arr)):
        return f"entry {_first(arr != np.round(arr))} is not an integer"
    if "binary" in facts and np.any((arr != 0) & (arr != 1)):
        return f"entry {_first((arr != 0) & (arr != 1))} is neither 0 nor 1"
    if facts & {"symmetric", "psd", "pd"}:
        return _matrix_violation(arr, facts, exact)
    return None


def _first(mask: np.ndarray) -> str:
    index = tuple(int(i) + 1 for i in np.argwhere(mask)[0])
    return "(" + ", ".join(map(str, index)) + ")" if len(index) > 1 else str(index[0])


def _matrix_violation(arr: np.ndarray, facts: frozenset[str],
                      exact: np.ndarray | None = None) -> str | None:
    if arr.ndim != 2 or arr.shape[0] != arr.shape[1]:
        return f"a square matrix is needed, got shape {arr.shape}"
    scale = max(float(np.max(np.abs(arr))), 1.0)
    asym = float(np.max(np.abs(arr - arr.T)))
    if asym > SYM_RTOL * scale:
        return f"it is not symmetric (largest |M - M'| entry is {asym:.3g})"
    from dualize.numeric.definite_data import decide

    for fact, word in (("pd", "definite"), ("psd", "semidefinite")):
        if fact in facts and decide(arr, fact == "pd", exact) == "no":
            low = float(np.linalg.eigvalsh((arr + arr.T) / 2)[0])
            return f"it is not positive {word} (smallest eigenvalue about {low:.3g})"
    return None
