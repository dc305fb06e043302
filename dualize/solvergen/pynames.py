"""User names and user text inside a generated Python module.

Python reads identifiers after Unicode compatibility normalization (NFKC), so two
names that dualize keeps apart could become one variable in the module, and a
user name could shadow a builtin (``int``), a module alias (``np``) or a keyword.
Every user name therefore gets a mangled identifier made of ASCII letters,
digits and underscores under a prefix the module never uses for its own names:

- a name that is plain ASCII ``name`` becomes ``u_name``;
- any other name becomes ``w<k>_<ascii part>``, where ``k`` is its rank among the
  non-ASCII names (sorted), which keeps the mapping one-to-one.

User text (names as dictionary keys, the title, messages) is written only as a
string literal from :func:`literal`, which escapes every code point that is not
printable ASCII (``\\x00``, lone surrogates, astral-plane characters as
``\\U0001d44f``), so the module compiles and its keys equal the instance's keys.
"""

from __future__ import annotations

import re
import unicodedata

_ASCII_NAME = re.compile(r"[A-Za-z][A-Za-z0-9_]*\Z")


def python_names(names: list[str]) -> dict[str, str]:
    """Map problem names to collision-free Python identifiers, deterministically."""
    out: dict[str, str] = {}
    rank = 0
    for name in sorted(set(names)):
        if _ASCII_NAME.match(name):
            out[name] = f"u_{name}"
        else:
            out[name] = f"w{rank}_{_ascii_part(name)}"
            rank += 1
    return out


def _ascii_part(name: str) -> str:
    """A readable ASCII hint of ``name`` (accents dropped, other letters left out)."""
    folded = unicodedata.normalize("NFKD", name)
    return "".join(ch for ch in folded if ch.isascii() and (ch.isalnum() or ch == "_"))


def literal(value: object) -> str:
    """A Python literal for ``value`` (str, number, bool, None, list, tuple or dict of
    those) that is pure printable ASCII and reads back as exactly ``value``."""
    text = ascii(value)
    if any(not (" " <= ch <= "~") for ch in text):  # pragma: no cover - ascii() guarantees it
        raise ValueError("not an ASCII literal")
    return text


def comment_text(text: str) -> str:
    """Text for a docstring: no character that could break the file's encoding or the
    compiler (controls but the line end, surrogates, unassigned) is left as it is."""
    out = []
    for ch in text:
        if ch != "\n" and unicodedata.category(ch) in {"Cc", "Cs", "Cn", "Co", "Zl", "Zp"}:
            out.append(f"<U+{ord(ch):04X}>")
        else:
            out.append(ch)
    return "".join(out)
