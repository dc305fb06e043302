"""Derived and checked results of the costly symbolic steps, kept on disk between processes.

Deriving a conjugate by the Legendre transform and checking it numerically
costs seconds (sympy's solver, limits and simplification),
and the same few functions (x log x, exp, -log, softplus) come back in every
run; so does the closed-form maximization over a free scalar multiplier.  This
module keeps each outcome in a user cache folder so that a second process
reads it back instead of deriving it again.  Each entry is keyed by the kind
of step and the exact sympy input (``key_of``).

- Where: the ``derivation`` folder of the user cache (``dualize.disk_cache``:
  ``$DUALIZE_CACHE_DIR``, ``$XDG_CACHE_HOME/dualize`` or ``~/.cache/dualize``;
  ``DUALIZE_CACHE=off`` turns it off).
- Versioned: an entry records a stamp made of the cache format, the sympy
  version and a hash of the engine's source files, so an entry written by other
  code is ignored and rebuilt; so is an entry that does not parse.
- Safe: entries are written to a temporary file in the same folder and moved
  into place with ``os.replace``, so concurrent processes never see half a file.
- No evaluation: formulas are stored as JSON trees of a small whitelist of
  sympy classes and rebuilt by this module's own reader; an entry is written
  only when the tree reads back to an expression identical to the original,
  so a cache hit prints byte for byte what a cold run prints.
"""

from __future__ import annotations

import functools
import hashlib
from collections.abc import Callable
from pathlib import Path
from typing import Any

import sympy

from dualize import disk_cache

FORMAT = 1
_SOURCES = ("conjugate.py", "conjugate_check.py", "separable.py", "derivation_cache.py",
            "elementwise.py", "simplify.py", "scalar.py", "definite.py")


class Unstorable(Exception):  # noqa: N818 - a plain outcome: this value is not cached
    """A value outside the whitelist (or one that does not read back identically)."""


SECTION = "derivation"


@functools.lru_cache(maxsize=1)
def stamp() -> str:
    """The version an entry must carry: format, sympy version, engine source hash."""
    digest = hashlib.sha256()
    here = Path(__file__).resolve().parent
    for name in _SOURCES:
        try:
            digest.update((here / name).read_bytes())
        except OSError:
            digest.update(name.encode())
    return f"{FORMAT}-{sympy.__version__}-{digest.hexdigest()[:16]}"


def lookup(key: str) -> Any | None:
    """The stored payload for ``key`` (a JSON value), or None on a miss or a bad entry."""
    return disk_cache.lookup(SECTION, key, stamp())


def store(key: str, payload: Any) -> None:
    """Write the entry atomically (see ``dualize.disk_cache``)."""
    disk_cache.store(SECTION, key, stamp(), payload)


def key_of(kind: str, *parts: sympy.Basic) -> str:
    """A key naming the step and its sympy inputs exactly (srepr keeps names and assumptions)."""
    return "|".join([kind, *(sympy.srepr(p) for p in parts)])


def memo(key: str, compute: Callable[[], Any], to_payload: Callable[[Any], Any],
         from_payload: Callable[[Any], Any]) -> Any:
    """``compute()``, or its stored outcome; a damaged entry is recomputed and replaced."""
    stored = lookup(key)
    if isinstance(stored, dict) and "outcome" in stored:
        try:
            return from_payload(stored["outcome"])
        except Exception:  # noqa: BLE001, S110 - a damaged entry is a miss, whatever is wrong
            pass
    result = compute()
    try:
        store(key, {"outcome": to_payload(result)})
    except Unstorable:
        pass
    return result


# ---------------------------------------------------------------- sympy <-> JSON

_CONSTANTS: dict[str, Callable[[], sympy.Basic]] = {
    "E": lambda: sympy.E, "pi": lambda: sympy.pi, "oo": lambda: sympy.oo,
    "-oo": lambda: -sympy.oo, "true": lambda: sympy.true, "false": lambda: sympy.false,
    "Reals": lambda: sympy.S.Reals, "EmptySet": lambda: sympy.S.EmptySet,
}


@functools.lru_cache(maxsize=1)
def _nodes() -> dict[str, Callable[..., sympy.Basic]]:
    """The compound classes a stored formula may use, each rebuilt without evaluation."""
    from sympy.functions.elementary.piecewise import ExprCondPair

    def plain(cls: Any) -> Callable[..., sympy.Basic]:
        return lambda *args: cls(*args, evaluate=False)

    nodes = {name: plain(getattr(sympy, name)) for name in (
        "Add", "Mul", "Pow", "exp", "log", "Abs", "Max", "Min", "sign",
        "StrictLessThan", "LessThan", "StrictGreaterThan", "GreaterThan", "Eq")}
    nodes["Equality"] = nodes.pop("Eq")
    nodes["Piecewise"] = plain(sympy.Piecewise)
    nodes["ExprCondPair"] = ExprCondPair
    nodes["Interval"] = sympy.Interval
    nodes["FiniteSet"] = plain(sympy.FiniteSet)
    return nodes


def encode(expr: sympy.Basic) -> Any:
    """``expr`` as a JSON tree; Unstorable when a class is outside the whitelist."""
    tree = _encode(expr)
    if decode(tree) != expr:
        raise Unstorable(f"{sympy.srepr(expr)[:80]} does not read back identically")
    return tree


def _encode(e: sympy.Basic) -> Any:
    for name, make in _CONSTANTS.items():
        if e == make() and type(e) is type(make()):
            return ["C", name]
    if isinstance(e, sympy.Integer):
        return ["I", str(int(e))]
    if isinstance(e, sympy.Rational):
        return ["Q", str(e.p), str(e.q)]
    if type(e) is sympy.Symbol:
        assumptions = getattr(e, "_assumptions_orig", None)
        if assumptions is None:
            raise Unstorable("a symbol without its original assumptions")
        return ["S", e.name, {k: bool(v) for k, v in sorted(assumptions.items())}]
    name = type(e).__name__
    if name not in _nodes():
        raise Unstorable(f"the class {name} is not stored")
    return [name, *(_encode(a) for a in e.args)]


def decode(tree: Any) -> sympy.Basic:
    """Our own reader of ``encode``'s trees: only whitelisted classes are ever built."""
    if not isinstance(tree, list) or not tree or not isinstance(tree[0], str):
        raise ValueError("a stored formula is not a tagged list")
    tag, rest = tree[0], tree[1:]
    if tag == "C":
        return _CONSTANTS[rest[0]]()
    if tag == "I":
        return sympy.Integer(int(rest[0]))
    if tag == "Q":
        return sympy.Rational(int(rest[0]), int(rest[1]))
    if tag == "S":
        flags = rest[1]
        if not isinstance(rest[0], str) or not isinstance(flags, dict):
            raise ValueError("a stored symbol is malformed")
        return sympy.Symbol(rest[0], **{str(k): bool(v) for k, v in flags.items()})
    make = _nodes().get(tag)
    if make is None:
        raise ValueError(f"the class {tag!r} is not stored")
    return make(*(decode(a) for a in rest))
