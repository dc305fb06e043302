"""The API's objects show a table and a picture in a notebook (IPython's display
protocol: _repr_markdown_, _repr_html_, _repr_svg_, _repr_png_; common practice)."""

from __future__ import annotations

from pathlib import Path

from dualize.api import load_problem, other_form, prices, trade_off

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def test_prices_object_shows_a_table_and_bars() -> None:
    path = EXAMPLES / "drone_thrust_qp.prob"
    report = prices(path, str(path.with_suffix(".json")))
    assert "| limits[1] |" in report._repr_markdown_()
    html = report._repr_html_()
    assert "<table>" in html and "limits[1]" in html
    assert report._repr_svg_().lstrip().startswith("<?xml")


def test_nothing_priced_shows_no_picture() -> None:
    path = EXAMPLES / "shift_partition.prob"
    report = prices(load_problem(path), str(path.with_suffix(".json")))
    assert report._repr_svg_() is None
    assert "No global bound" in report._repr_markdown_()


def test_curve_object_shows_a_table_and_the_plot() -> None:
    path = EXAMPLES / "weighbridge_ridge.prob"
    curve = trade_off(path, str(path.with_suffix(".json")), weights=[0.1, 1.0, 10.0])
    assert curve._repr_markdown_().count("| agrees |") == 3
    assert "<table>" in curve._repr_html_()
    assert curve._repr_png_()[:4] == b"\x89PNG"
    assert "<svg" in curve._repr_svg_()


def test_pair_object_shows_the_other_form() -> None:
    pair = other_form(EXAMPLES / "weighbridge_ridge.prob")
    assert "bound: ||x||^2 <= t" in pair._repr_markdown_()
    assert "&lt;= t" in pair._repr_html_()


def test_html_escapes_the_problem_text() -> None:
    """A title is user text: the notebook's HTML shows it, never runs it (common practice)."""
    from dualize.numeric.instance import Instance

    text = ('title "<script>alert(1)</script>"\nminimize x\nover x in R\nsubject to\n'
            "  c: x >= 1\n")
    report = prices(load_problem(text), Instance({}, {}))
    html = report._repr_html_()
    assert "<script>" not in html and "&lt;script&gt;" in html


def test_the_rates_picture_is_reproducible() -> None:
    path = EXAMPLES / "joinery_lp.prob"
    report = prices(path, str(path.with_suffix(".json")))
    assert report._repr_svg_() == report._repr_svg_()
