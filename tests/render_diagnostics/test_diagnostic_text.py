"""The compiler-style text form and the JSON form of diagnostics.

The text form follows the layout compilers such as gcc and rustc use:
``file:line:col: severity: message``, the source line, a caret under the column
(common practice).
"""

from dualize.diagnostics import Diagnostic
from dualize.render.diagnostics import diagnostic_dict, format_diagnostic, format_text
from dualize.syntax.span import Span

SOURCE = "data c in R^n\nminimize c' * x +\nover x in R^n\n"


def test_caret_and_tildes_under_the_span() -> None:
    d = Diagnostic("shape-mismatch", "error", "they differ", "f.prob", Span(2, 10, 2, 16, 0, 0),
                   hint="transpose one side")
    assert format_diagnostic(d, SOURCE) == (
        "f.prob:2:10: error[shape-mismatch]: they differ\n"
        " 2 | minimize c' * x +\n"
        "   |          ^~~~~~\n"
        "  hint: transpose one side")


def test_multiline_span_is_underlined_to_the_end_of_its_first_line() -> None:
    d = Diagnostic("r", "warning", "m", "f.prob", Span(2, 13, 3, 5, 0, 0))
    assert format_diagnostic(d, SOURCE).splitlines()[2] == "   |             ^~~~~"


def test_without_source_or_span() -> None:
    assert format_diagnostic(Diagnostic("r", "info", "m", "f.prob")) == "f.prob: info[r]: m"
    d = Diagnostic("r", "error", "m", "f.prob", Span(9, 1, 9, 2, 0, 0))
    assert format_diagnostic(d, SOURCE) == "f.prob:9:1: error[r]: m"


def test_tabs_are_kept_so_the_caret_lines_up() -> None:
    d = Diagnostic("r", "error", "m", "t.prob", Span(1, 3, 1, 4, 0, 0))
    assert format_diagnostic(d, "\t\tx\n").splitlines()[2] == "   | \t\t^"


def test_blocks_are_separated_by_blank_lines() -> None:
    a = Diagnostic("a", "error", "one", "f.prob")
    b = Diagnostic("b", "error", "two", "f.prob")
    assert format_text([a, b]) == "f.prob: error[a]: one\n\nf.prob: error[b]: two"


def test_json_fields() -> None:
    d = Diagnostic("r", "error", "m", "f.prob", Span(1, 2, 1, 5, 1, 4), hint="h")
    assert diagnostic_dict(d) == {"rule": "r", "severity": "error", "message": "m",
                                  "path": "f.prob", "line": 1, "column": 2, "end_line": 1,
                                  "end_column": 5, "hint": "h"}
