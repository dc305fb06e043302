"""The runtime of every generated solver module: its tolerances, tables and input checks.

The generator copies the source below the marker line of this module and of
``runtime_methods``, ``runtime_interior``, ``runtime_recover`` and ``runtime_report``
(in that order) verbatim into each module it emits, after which come the functions
printed for the dual and a ``Spec`` that binds them.  The emitted module thus needs
only numpy and scipy (and, for a conic dual, clarabel), yet its runtime is an ordinary,
linted module with unit tests of its own.  The imports above a marker serve linting
and the tests only.
"""

import contextlib
import json
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse

# ---- copied into the generated module from here ----

GAP_TOL = 1e-6
"""A report is certified when primal minus dual value is within GAP_TOL * (1 + |p| + |d|)."""
VIOLATION_TOL = 1e-6
"""... and the largest primal constraint violation at the recovered point within VIOLATION_TOL."""
CERTIFY = GAP_TOL
"""A minimizer of the Lagrangian is kept as x only when it passes the same two tests."""
MAX_DEPTH = 32
"""The deepest nesting of lists an instance file may hold (a matrix needs two)."""
BLAS_THREADS = 1
"""BLAS threads for the solve.  The module's products are matrix-vector or thin
(m x r with r small), where extra threads only add synchronisation, and on a busy
machine they can cost a thousand times the product itself.  Run as a script the
module sets OPENBLAS_NUM_THREADS (and the OpenMP and MKL ones) to 1 before numpy
loads, unless already set; imported, it holds BLAS to this many threads during
``solve`` when threadpoolctl is installed, and leaves the caller's setting otherwise."""


@dataclass(frozen=True)
class Spec:
    """What the generator printed for one dual: the tables and the numeric functions.

    Every function takes the prepared data ``d``; dual functions take the stacked
    multipliers (and epigraph variables) ``z``, primal ones a dict ``x`` of variables.
    """

    method: str
    dual_names: list
    dual_sense: str = "maximize"
    primal_sense: str = "minimize"
    primal_names: list = field(default_factory=list)
    primal_scalar: list = field(default_factory=list)
    scalars: list = field(default_factory=list)
    data: list = field(default_factory=list)
    dims: list = field(default_factory=list)
    unrecovered: dict = field(default_factory=dict)
    by_lagrangian: bool = False
    stationary: list = field(default_factory=list)
    """(primal variable, index of the dual's equality that is its stationarity condition,
    factor taking the conic method's multiplier of that equality to the variable)."""
    constant_hessian: bool = False
    prepare: object = None
    sizes: object = None
    objective: object = None
    gradient: object = None
    hessian: object = None
    bounds: object = None
    constraints: object = None
    recover: object = None
    primal: object = None
    unknowns: object = None
    restricted: object = None
    lagrangian: object = None
    lagrangian_domain: object = None
    cones: object = None
    hessian_diagonal: object = None
    primal_shapes: object = None
    balls: object = None
    caution: str = ""


def _blas_threads():
    """A context holding BLAS to BLAS_THREADS threads (a no-op without threadpoolctl)."""
    try:
        import threadpoolctl
    except ImportError:
        return contextlib.nullcontext()
    return threadpoolctl.threadpool_limits(limits=BLAS_THREADS, user_api="blas")


class InputError(Exception):
    """Bad instance data: reported in one line, exit status 2."""


class NoFiniteDual(Exception):
    """A method proved the dual has no finite optimum: ``kind`` is "unbounded" (the dual
    grows without bound, so the primal is infeasible) or "infeasible" (no dual point)."""

    def __init__(self, kind, message):
        super().__init__(message)
        self.kind = kind


def _flat(value, size):
    """``value`` as ``size`` entries: a number spread, a matrix's entries row by row (the
    order of the Jacobians of a matrix-valued expression)."""
    value = np.asarray(value, dtype=float)
    return np.broadcast_to(value.reshape(-1) if value.ndim > 1 else value, (size,)).astype(float)


def _block(value, rows, cols):
    value = np.asarray(value, dtype=float)
    if value.size == 1 and rows * cols != 1:
        return np.broadcast_to(value.reshape(()), (rows, cols)).astype(float)
    return value.reshape(rows, cols)


def _sparse_block(value, rows, cols):
    """``_block`` for a Jacobian that may be sparse: a scipy sparse array either way."""
    if scipy.sparse.issparse(value):
        return scipy.sparse.csr_array(value.reshape((rows, cols)))
    return scipy.sparse.csr_array(_block(value, rows, cols))


def _split(z, sizes, scalars):
    """The stacked vector z cut into one part per variable: a number (scalar True), a
    vector (False) or a square matrix ("square", its entries row by row)."""
    if not sizes:
        return []
    parts = np.split(np.asarray(z, dtype=float), np.cumsum(sizes)[:-1])
    return [_shaped(q, kind) for q, kind in zip(parts, scalars, strict=True)]


def _shaped(part, kind):
    if kind == "square":
        k = int(round(np.sqrt(part.size)))
        return part.reshape(k, k)
    return np.float64(part[0]) if kind else part


def _unique_keys(pairs):
    """A JSON object hook that refuses a name given twice (the later would win silently)."""
    seen = {}
    for key, value in pairs:
        if key in seen:
            raise InputError(f"the name {key!r} is given twice")
        seen[key] = value
    return seen


def _no_constant(text):
    raise InputError(f"{text} is not a number an instance may hold")


def load_instance(raw):
    """The instance in the bytes ``raw``: a JSON object of names to numbers or nested lists.

    Strict where ``json`` is lenient: UTF-8 only, no repeated names, no NaN or
    Infinity, nesting at most MAX_DEPTH deep (numbers past the float range are
    caught when the arrays are read).
    """
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as err:
        raise InputError(f"the instance is not valid UTF-8 (byte {err.start})") from None
    deep = _bracket_depth(raw) > MAX_DEPTH
    try:
        data = json.loads(text, object_pairs_hook=_unique_keys, parse_constant=_no_constant)
    except RecursionError:
        raise InputError("the instance is nested too deeply") from None
    except ValueError as err:
        raise InputError(f"the instance is not valid JSON: {err}") from None
    if deep:  # the byte count may include brackets inside strings: confirm on the data
        _depth(data, 0)
    return data


def _bracket_depth(raw, chunk=1 << 20):
    """An upper bound on the nesting depth, counted on the bytes a megabyte at a time (fast
    on large files, and without a temporary the size of the file)."""
    codes = np.frombuffer(raw, dtype=np.uint8)
    depth = deepest = 0
    for start in range(0, len(codes), chunk):
        part = codes[start:start + chunk]
        steps = (part == 91).astype(np.int32) + (part == 123) - (part == 93) - (part == 125)
        running = depth + np.cumsum(steps)
        deepest = max(deepest, int(running.max(initial=depth)))
        depth = int(running[-1]) if len(running) else depth
    return deepest


def _depth(value, level):
    if level > MAX_DEPTH:
        raise InputError(f"the instance is nested more than {MAX_DEPTH} levels deep")
    items = value.values() if isinstance(value, dict) else value if isinstance(value, list) \
        else ()
    for item in items:
        if isinstance(item, list | dict):
            _depth(item, level + 1)


def _numbers_only(name, value, level=0):
    """Refuse what numpy would quietly turn into a number: true/false, strings, objects."""
    if isinstance(value, list):
        if level >= 2:
            raise InputError(f"{name}: nested deeper than a matrix")
        if all(type(item) is float or type(item) is int for item in value):
            return
        for item in value:
            _numbers_only(name, item, level + 1)
    elif isinstance(value, bool | np.bool_):
        raise InputError(f"{name}: holds true/false where a number belongs")
    elif not isinstance(value, int | float | np.ndarray | np.number):
        raise InputError(f"{name}: not a number or a (nested) list of numbers")


def _bind_size(size, length, name, dims):
    if isinstance(size, int):
        if size != length:
            raise InputError(f"{name}: expected size {size}, got {length}")
        return
    if dims.setdefault(size, length) != length:
        raise InputError(f"{name}: size {length} disagrees with {size} = {dims[size]}")


def _array(name, value):
    _numbers_only(name, value)
    try:
        array = np.asarray(value)
    except (TypeError, ValueError, OverflowError):
        raise InputError(f"{name}: not a number or a rectangular list of numbers") from None
    if array.dtype.kind == "b":
        raise InputError(f"{name}: holds true/false where a number belongs")
    if array.dtype.kind not in "iuf":
        raise InputError(f"{name}: holds a number beyond the floating-point range or a "
                         "value that is not a number")
    if array.ndim > 2:
        raise InputError(f"{name}: nested deeper than a matrix")
    with np.errstate(all="ignore"):
        array = array.astype(float)
    if not np.all(np.isfinite(array)):
        raise InputError(f"{name}: holds a value that is not finite or beyond the "
                         "floating-point range")
    return array


def _check_facts(name, array, facts):
    if "pos" in facts and not np.all(array > 0):
        raise InputError(f"{name}: must be positive")
    if "nonneg" in facts and not np.all(array >= 0):
        raise InputError(f"{name}: must be nonnegative")
    if {"symmetric", "psd", "pd"} & set(facts):
        if array.ndim != 2 or not np.allclose(array, array.T, rtol=1e-9, atol=1e-12):
            raise InputError(f"{name}: must be a symmetric matrix")
        low = np.linalg.eigvalsh(array).min() if array.size else 0.0
        if "pd" in facts and low <= 0:
            raise InputError(f"{name}: must be positive definite")
        if "psd" in facts and low < -1e-9 * max(1.0, np.abs(array).max()):
            raise InputError(f"{name}: must be positive semidefinite")


def _read_one(name, value, rows, cols, dims):
    array = _array(name, value)
    if rows == 1 and cols == 1:
        if array.size != 1:
            raise InputError(f"{name}: expected a number")
        return float(array.reshape(()))
    if rows == 1 or cols == 1:
        if array.ndim != 1:
            raise InputError(f"{name}: expected a flat list (a vector)")
        _bind_size(cols if rows == 1 else rows, array.shape[0], name, dims)
        return array
    if array.ndim != 2:
        raise InputError(f"{name}: expected a matrix (a list of rows)")
    _bind_size(rows, array.shape[0], name, dims)
    _bind_size(cols, array.shape[1], name, dims)
    return array


def _read_dims(p, data):
    dims = {}
    for name in p.dims:
        if name in data:
            value = data[name]
            if isinstance(value, bool) or not isinstance(value, int) or value < 1:
                raise InputError(f"{name}: a dimension must be a positive integer")
            dims[name] = value
    return dims


def _normalized(data):
    """Keys as the problem's names are: after Unicode compatibility normalization (NFKC)."""
    import unicodedata

    out = {}
    for key, value in data.items():
        name = unicodedata.normalize("NFKC", key)
        if name in out:
            raise InputError(f"{name}: given twice (keys equal after Unicode normalization)")
        out[name] = value
    return out


def _read(p, data):
    """The instance's data checked against the declarations, sizes bound, facts tested."""
    if not isinstance(data, dict):
        raise InputError("the instance must be a JSON object mapping names to values")
    data = _normalized(data)
    known = {row[0] for row in p.data} | set(p.dims)
    unknown = sorted(set(data) - known)
    if unknown:
        raise InputError(f"unknown name(s) in the instance: {', '.join(unknown)}")
    dims = _read_dims(p, data)
    values = {}
    for name, rows, cols, facts in p.data:
        if name not in data:
            raise InputError(f"missing data: {name}")
        values[name] = _read_one(name, data[name], rows, cols, dims)
        _check_facts(name, np.asarray(values[name]), facts)
    missing = [name for name in p.dims if name not in dims]
    if missing:
        raise InputError(f"give the size(s) {', '.join(missing)} in the instance")
    values.update(dims)
    return values
