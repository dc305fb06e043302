"""The grammar file: found in the checkout, and every rule has its builder."""

from dualize.syntax.build import Builder
from dualize.syntax.grammar_file import grammar_path, grammar_text
from dualize.syntax.parser import lark_parser


def test_grammar_file_is_found() -> None:
    assert grammar_path().name == "problem.lark"
    assert "start:" in grammar_text()


def test_every_rule_and_alias_has_a_builder_method() -> None:
    # Tree rule names after inlining (?rule) and aliases (-> name) are what the
    # builder sees; a rule without a method would otherwise be skipped silently.
    rules = lark_parser().rules
    aliases = {str(r.alias) for r in rules if r.alias}
    kept = {str(r.origin.name) for r in rules if not r.options.expand1}
    visible = {n for n in aliases | kept if not n.startswith("_")}
    missing = sorted(n for n in visible if not hasattr(Builder, f"rule_{n}"))
    assert missing == []
    assert {"binop", "neg", "power", "transpose", "call", "norm", "abs"} <= visible
