"""Statements: title, data, objective and over, subject to, constraints, newlines."""

from dualize.syntax import ast
from dualize.syntax.parser import parse


def document(text: str) -> ast.Document:
    result = parse(text)
    assert result.document is not None, result.diagnostics
    return result.document


def test_full_file_from_the_language_contract() -> None:
    doc = document('''# A separating hyperplane with slack, for m labelled samples of n features.
title "Soft-margin separating hyperplane"

data X in R^(m,n)
data y in R^m
data C in R_++

minimize   1/2 * ||w||^2 + C * sum(s)
over       w in R^n, b in R, s in R^m
subject to
  alpha: y .* (X*w + b) >= 1 - s
  beta:  s >= 0
''')
    assert doc.title is not None and doc.title.text == "Soft-margin separating hyperplane"
    assert [d.name for d in doc.data] == ["X", "y", "C"]
    assert [d.name for d in doc.variables] == ["w", "b", "s"]
    assert [c.labels[0].name for c in doc.constraints] == ["alpha", "beta"]
    assert doc.objective.sense == "minimize"


def test_over_on_the_same_or_the_next_line() -> None:
    same = document("minimize x over x in R")
    nxt = document("minimize x\nover x in R")
    assert [d.name for d in same.variables] == [d.name for d in nxt.variables] == ["x"]


def test_several_declarations_on_one_data_line() -> None:
    doc = document("data a in R, b in R^n, c in S^n_+\nmaximize a over x in R")
    assert [d.name for d in doc.data] == ["a", "b", "c"]
    assert doc.objective.sense == "maximize"


def test_subject_to_and_st_and_a_constraint_on_the_same_line() -> None:
    a = document("minimize x over x in R\nsubject to\n x >= 1")
    b = document("minimize x over x in R\ns.t. x >= 1")
    assert len(a.constraints) == len(b.constraints) == 1


def test_problem_without_constraints_is_valid() -> None:
    assert document("minimize x'*x over x in R^n").constraints == ()


def test_chain_is_one_statement_with_two_relations_and_two_labels() -> None:
    doc = document("data C in R\nminimize x over x in R\ns.t.\n lo, hi: 0 <= x <= C")
    c = doc.constraints[0]
    assert [label.name for label in c.labels] == ["lo", "hi"]
    assert [r.op for r in c.relations] == ["<=", "<="]
    assert len(c.parts) == 3


def test_single_equals_is_accepted_for_double_equals() -> None:
    doc = document("minimize x over x in R\ns.t. x = 1")
    assert doc.constraints[0].relations[0].op == "=="
    assert doc.constraints[0].relations[0].text == "="


def test_newline_continues_after_binary_operator_comma_and_inside_brackets() -> None:
    doc = document("minimize x +\n  y + (z\n  + 1)\nover x in R,\n  y in R, z in R\n")
    assert [d.name for d in doc.variables] == ["x", "y", "z"]
    assert isinstance(doc.objective.expr, ast.BinOp)


def test_newline_ends_a_constraint() -> None:
    doc = document("minimize x over x in R\ns.t.\n x >= 0\n x <= 1\n\n\n x <= 2")
    assert len(doc.constraints) == 3


def test_crlf_line_endings() -> None:
    doc = document("minimize x\r\nover x in R\r\ns.t.\r\n x >= 0\r\n")
    assert len(doc.constraints) == 1


def test_british_spellings_of_the_sense() -> None:
    assert document("minimise x over x in R").objective.sense == "minimize"
    assert document("maximise x\nover x in R").objective.sense == "maximize"
