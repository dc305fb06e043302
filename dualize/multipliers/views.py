"""The multipliers' results as a notebook shows them: tables, pages and pictures.

The records (``Pair``, ``Curve``, ``Sensitivity``) stay plain data in the
modules that compute them, and the printers import only records; these
subclasses add the display on top of both, so no computing module imports a
printer.  ``dualize.api`` returns them (``shown``).
"""

from __future__ import annotations

from dataclasses import fields
from typing import Any

from dualize.multipliers.forms import Pair
from dualize.multipliers.path import Curve
from dualize.multipliers.sensitivity import Sensitivity


class PairView(Pair):
    """Both forms and how they correspond, as Markdown or an HTML page."""

    def _repr_markdown_(self) -> str:
        from dualize.multipliers.path_print import pair_markdown

        return pair_markdown(self)

    def _repr_html_(self) -> str:
        from dualize.multipliers.path_print import pair_html

        return pair_html(self)


class CurveView(Curve):
    """The matched points as a table (Markdown, HTML) and as the plot (SVG, PNG)."""

    def _repr_markdown_(self) -> str:
        from dualize.multipliers.path_print import curve_markdown

        return curve_markdown(self)

    def _repr_html_(self) -> str:
        from dualize.multipliers.path_print import curve_html

        return curve_html(self)

    def _repr_svg_(self) -> str:
        from dualize.multipliers.plot import curve_svg

        return curve_svg(self)

    def _repr_png_(self) -> bytes:
        from dualize.multipliers.plot import curve_png

        return curve_png(self)


class SensitivityView(Sensitivity):
    """The prices as a table (Markdown, HTML) and the rates as bars (SVG)."""

    def _repr_markdown_(self) -> str:
        from dualize.multipliers.printing import sensitivity_markdown

        return sensitivity_markdown(self)

    def _repr_html_(self) -> str:
        from dualize.multipliers.printing import sensitivity_html

        return sensitivity_html(self)

    def _repr_svg_(self) -> str | None:
        """The rates as bars (None, so a notebook shows no picture, when nothing is priced)."""
        from dualize.multipliers.plot import prices_svg

        return prices_svg(self) if self.rows else None


_VIEWS: dict[type, type] = {Pair: PairView, Curve: CurveView, Sensitivity: SensitivityView}


def shown(record: Any) -> Any:
    """``record`` (a ``Pair``, ``Curve`` or ``Sensitivity``) with its display; a view,
    or anything else, is returned as it is."""
    view = _VIEWS.get(type(record))
    if view is None:
        return record
    return view(*(getattr(record, f.name) for f in fields(record)))
