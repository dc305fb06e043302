"""The LALR parser's tables, kept in the user cache so that a run need not rebuild them.

Building the parser from the grammar takes a tenth of a second or more on every
run; loading its tables takes a few milliseconds.  The tables are lark's own
serialization (plain lists, dicts, tuples and scalars), stored as tagged JSON
through ``dualize.disk_cache`` and keyed by the grammar text, the options and
the lark version, so a changed grammar or another lark never reads stale
tables.  Anything wrong with an entry means the parser is built afresh.
"""

from __future__ import annotations

import hashlib
from collections.abc import Callable
from typing import Any

from lark import Lark, __version__
from lark.grammar import Rule
from lark.lexer import TerminalDef

SECTION = "parser"
FORMAT = 1
_SKIPPED_OPTIONS = ("postlex",)


def cached_parser(grammar: str, build: Callable[[], Lark], postlex: object) -> Lark:
    """The parser from stored tables, or ``build()`` (and its tables stored)."""
    from dualize import disk_cache

    key = hashlib.sha256(grammar.encode()).hexdigest()
    stamp = f"{FORMAT}-lark-{__version__}"
    payload = disk_cache.lookup(SECTION, key, stamp)
    if payload is not None:
        try:
            return _load(decode(payload), postlex)
        except Exception:  # noqa: BLE001 - damaged tables: build afresh, whatever is wrong
            pass
    parser = build()
    try:
        disk_cache.store(SECTION, key, stamp, encode(_tables(parser)))
    except (TypeError, ValueError):
        pass
    return parser


def _tables(parser: Lark) -> dict[str, Any]:
    data, memo = parser.memo_serialize([TerminalDef, Rule])
    data["options"] = {k: v for k, v in data["options"].items() if k not in _SKIPPED_OPTIONS}
    return {"data": data, "memo": memo}


def _load(tables: Any, postlex: object) -> Lark:
    if not isinstance(tables, dict) or set(tables) != {"data", "memo"}:
        raise ValueError("stored parser tables are malformed")
    return Lark.__new__(Lark)._load(tables, postlex=postlex)


def encode(value: Any) -> Any:
    """Tagged JSON: tuples and dicts (whose keys may be numbers) keep their types."""
    if isinstance(value, tuple):
        return {"t": [encode(v) for v in value]}
    if isinstance(value, list):
        return [encode(v) for v in value]
    if isinstance(value, dict):
        return {"d": [[encode(k), encode(v)] for k, v in value.items()]}
    if value is None or isinstance(value, bool | int | float | str):
        return value
    raise TypeError(f"cannot store a {type(value).__name__} in the parser tables")


def decode(value: Any) -> Any:
    """The inverse of ``encode``; only lists, tuples, dicts and scalars are built."""
    if isinstance(value, list):
        return [decode(v) for v in value]
    if isinstance(value, dict):
        if set(value) == {"t"}:
            return tuple(decode(v) for v in value["t"])
        if set(value) == {"d"}:
            return {_key(decode(k)): decode(v) for k, v in value["d"]}
        raise ValueError("an untagged object in the parser tables")
    return value


def _key(value: Any) -> Any:
    if isinstance(value, list | dict):
        raise ValueError("an unhashable key in the parser tables")
    return value
