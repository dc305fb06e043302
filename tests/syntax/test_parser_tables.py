"""The parser read back from its stored tables behaves exactly as the parser built afresh."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from lark import Lark, UnexpectedInput

from dualize import disk_cache
from dualize.syntax import parser_tables
from dualize.syntax.grammar_file import grammar_text
from dualize.syntax.newlines import NewlineFilter

ROOT = Path(__file__).resolve().parents[2]
FILES = sorted([*ROOT.glob("examples/*.prob"), *ROOT.glob("tests/broken/*.prob"),
                *ROOT.glob("tests/problems/*.prob")])


def _built() -> Lark:
    return Lark(grammar_text(), parser="lalr", propagate_positions=True,
                postlex=NewlineFilter(), maybe_placeholders=True)


@pytest.fixture(scope="module")
def pair() -> tuple[Lark, Lark]:
    built = _built()
    stored = json.loads(json.dumps(parser_tables.encode(parser_tables._tables(built))))
    return built, parser_tables._load(parser_tables.decode(stored), NewlineFilter())


def _outcome(parser: Lark, text: str) -> object:
    try:
        return parser.parse(text)
    except UnexpectedInput as err:
        return (type(err).__name__, err.line, err.column,
                sorted(getattr(err, "expected", None) or getattr(err, "allowed", None) or []))


@pytest.mark.parametrize("path", FILES, ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_loaded_parser_agrees_with_the_built_one(pair: tuple[Lark, Lark], path: Path) -> None:
    built, loaded = pair
    text = path.read_text(encoding="utf-8")
    assert _outcome(loaded, text) == _outcome(built, text)


def test_cached_parser_stores_then_reads(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("DUALIZE_CACHE_DIR", str(tmp_path))
    monkeypatch.setattr(disk_cache, "seed", dict)  # the user folder alone, no shipped seed
    builds: list[int] = []

    def build() -> Lark:
        builds.append(1)
        return _built()

    first = parser_tables.cached_parser(grammar_text(), build, NewlineFilter())
    second = parser_tables.cached_parser(grammar_text(), build, NewlineFilter())
    assert builds == [1]
    text = (ROOT / "examples" / "route_entropy.prob").read_text(encoding="utf-8")
    assert second.parse(text) == first.parse(text)
    for entry in (tmp_path / "parser").glob("*.json"):
        entry.write_text('{"stamp": "x", "key": "y", "payload": {"d": [[1, {"bad": 1}]]}}')
    parser_tables.cached_parser(grammar_text(), build, NewlineFilter())
    assert builds == [1, 1]


def test_the_reader_builds_only_plain_values() -> None:
    with pytest.raises(ValueError):
        parser_tables.decode({"__class__": "os.system"})
    with pytest.raises(TypeError):
        parser_tables.encode(object())
