"""The resolver's kinds of diagnostic: names, sets, shapes, functions, constraints."""

from __future__ import annotations

from dualize.diagnostics import RuleKind

_KINDS: list[RuleKind] = []  # filled by this module alone, in order


def _model(id: str, template: str, why: str) -> RuleKind:
    kind = RuleKind(id, "error", template, why, "model")
    _KINDS.append(kind)
    return kind


UNDECLARED_NAME = _model(
    "undeclared-name", "`{name}` is not declared",
    "Every name in an expression is data (declared with `data`) or a decision variable "
    "(declared after `over`).")
DECLARED_TWICE = _model(
    "declared-twice", "`{name}` is declared twice",
    "One name, one meaning: a second declaration would silently replace the first.")
LABEL_TWICE = _model(
    "label-twice", "the label `{name}` is used twice",
    "A label names a constraint's multiplier; two constraints cannot share one.")
LABEL_CLASH = _model(
    "label-clash", "the label `{name}` is already the name of {what}",
    "A label becomes the multiplier's name, so it must not collide with data, "
    "variables or sizes.")
DIMENSION_AS_NAME = _model(
    "dimension-as-name", "`{name}` is a size in a set and cannot also be {what}",
    "Sizes such as m and n in R^(m,n) are dimension symbols, distinct from data and "
    "variables.")
DIMENSION_AS_VALUE = _model(
    "dimension-as-value", "`{name}` is a size, not a value",
    "Dimension symbols stand for sizes; use them in sets, ones(n) and identity(n).")
RESERVED_NAME = _model(
    "reserved-name", "`{name}` is a reserved word and cannot be declared",
    "Keywords and function names keep one meaning throughout a file.")
UNKNOWN_SET = _model(
    "unknown-set", "unknown set `{name}`",
    "Sets are R, S, Z, {0,1} and boxes [lo, hi], with sizes and signs as documented.")
BAD_SET = _model(
    "bad-set", "{message}",
    "The set is written in a way the language does not define.")
SET_NOT_ALLOWED = _model(
    "set-not-allowed", "{set} is allowed on variables only, not on data `{name}`",
    "Integrality and boxes are domains of decision variables; data are facts.")
BAD_SIZE = _model(
    "bad-size", "`{size}` is not a size: sizes are positive integers or dimension symbols",
    "A set's sizes say how many entries it has.")
BAD_BOX_BOUND = _model(
    "bad-box-bound", "a box bound must be a number or scalar data, not {found}",
    "Box domains are the inner minimization's set; their bounds are constants.")
SHAPE_MISMATCH = _model(
    "shape-mismatch", "{what}: {left} and {right} do not conform",
    "Operands of sums, products and relations must have conforming shapes; only "
    "scalars broadcast.")
NONSCALAR_OBJECTIVE = _model(
    "nonscalar-objective", "the objective is a {shape}, not a scalar",
    "An optimization problem minimizes or maximizes one number; sum(...) or a norm "
    "makes a scalar of a vector.")
UNKNOWN_FUNCTION = _model(
    "unknown-function", "unknown function `{name}`",
    "The functions are sum, exp, log, sqrt, max, min, diag, trace, inv, ones and "
    "identity.")
OTHER_NOTATION = _model(
    "other-notation", "`{name}` is a function name from another notation",
    "The language writes building blocks as mathematics (x' * P * x, ||e||^2, "
    "log(sum(exp(e))), semidefinite constraints for eigenvalues) rather than by name; "
    "the hint gives the rewrite.")
ARGUMENT_COUNT = _model(
    "argument-count", "`{name}` takes {expected}, not {count}",
    "Each function has a fixed number of arguments.")
WRONG_ARGUMENT = _model(
    "wrong-argument", "`{name}` {needs}, not a {found}",
    "The function is defined only for arguments of that kind.")
INVERSE_OF_VARIABLE = _model(
    "inverse-of-variable", "inv(...) of an expression in the variable `{name}`",
    "inv is for data; the inverse of a variable matrix is not a building block the "
    "derivation can use.")
BAD_EXPONENT = _model(
    "bad-exponent", "an exponent must be a number, not {found}",
    "Powers have exact rational exponents such as 2, 1/2 or -1.")
NUMBER_TOO_LARGE = _model(
    "number-too-large", "this exact number is too large: {why}",
    "Numbers stay exact rationals through the derivation; one with thousands of digits "
    "makes every later step and every printed formula slow or impossible to read.")
DIVISION_BY_ZERO = _model(
    "division-by-zero", "division by zero",
    "The expression has no value.")
NOT_SYMMETRIC = _model(
    "not-symmetric", "`{relation}` needs symmetric matrices, but the {side} side is not "
    "known to be symmetric",
    "The semidefinite order compares symmetric matrices; declare the data in S^n or "
    "write a symmetric expression such as A' * X * A or B + B'.")

KINDS: tuple[RuleKind, ...] = tuple(_KINDS)
