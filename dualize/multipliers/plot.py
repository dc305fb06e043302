"""The trade-off curve as pictures: t against w, and the optimal f against t.

Deterministic output (common practice with matplotlib): the Agg backend, a
fixed ``svg.hashsalt`` so the SVG's ids do not change between runs, and no
date or software stamp in the files' metadata.  Only points that passed their
check or sit at the edge are drawn; a failed point would draw a wrong curve.
"""

from __future__ import annotations

import io
import math
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from dualize.multipliers.path import Curve
    from dualize.multipliers.sensitivity import Sensitivity

HASH_SALT = "dualize-trade-off"


def _pyplot() -> Any:
    """pyplot on the Agg backend with the settings that make files reproducible."""
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    plt.rcParams["svg.hashsalt"] = HASH_SALT
    plt.rcParams["svg.fonttype"] = "path"
    return plt


def _figure(curve: Curve) -> Any:
    plt = _pyplot()
    good = [p for p in curve.points if p.status in ("agrees", "edge")]
    pair = curve.pair
    fig, (left, right) = plt.subplots(1, 2, figsize=(9, 3.6))
    by_w = sorted(good, key=lambda p: p.weight)
    left.plot([p.weight for p in by_w], [p.bound for p in by_w], marker="o", markersize=3)
    if by_w and all(p.weight > 0 for p in by_w):
        left.set_xscale("log")
    left.set_xlabel(f"weight {pair.weight}")
    left.set_ylabel(f"matched bound {pair.bound} = r(x*)")
    left.set_title(f"r = {_short(pair.term)}", fontsize=9)
    by_t = sorted(good, key=lambda p: p.bound)
    right.plot([p.bound for p in by_t], [p.objective for p in by_t], marker="o", markersize=3)
    right.set_xlabel(f"bound {pair.bound}")
    right.set_ylabel("optimal f")
    right.set_title(f"f = {_short(pair.rest)}", fontsize=9)
    for axis in (left, right):
        axis.grid(True, linewidth=0.4)
    fig.tight_layout()
    return fig


def _short(text: str, limit: int = 48) -> str:
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _save(fig: Any, fmt: str) -> bytes:
    plt = _pyplot()
    buffer = io.BytesIO()
    metadata = {"Date": None} if fmt == "svg" else {"Software": None}
    try:
        fig.savefig(buffer, format=fmt, metadata=metadata, dpi=100)
    finally:
        plt.close(fig)
    return buffer.getvalue()


def curve_svg(curve: Curve) -> str:
    return _save(_figure(curve), "svg").decode("utf-8")


def curve_png(curve: Curve) -> bytes:
    return _save(_figure(curve), "png")


def _prices_figure(report: Sensitivity) -> Any:
    """One bar per entry: the multiplier's rate; a kink's one-sided rates as a bracket."""
    plt = _pyplot()
    rows = report.rows
    fig, axis = plt.subplots(figsize=(max(4.0, 0.55 * len(rows) + 1.5), 3.4))
    xs = list(range(len(rows)))
    axis.bar(xs, [r.rate for r in rows], color=["C0" if r.binds else "C7" for r in rows])
    for x, r in zip(xs, rows, strict=True):
        if r.check in ("kink", "edge") and math.isfinite(r.left) and math.isfinite(r.right):
            axis.plot([x, x], [r.left, r.right], color="C3", marker="_", markersize=12)
    axis.axhline(0, color="black", linewidth=0.6)
    axis.set_xticks(xs, [r.name for r in rows], rotation=60, ha="right", fontsize=8)
    axis.set_ylabel("dp*/du (rate)")
    axis.set_title("rates by entry (grey: not binding; red: one-sided rates at a kink)",
                   fontsize=9)
    fig.tight_layout()
    return fig


def prices_svg(report: Sensitivity) -> str:
    return _save(_prices_figure(report), "svg").decode("utf-8")


def prices_png(report: Sensitivity) -> bytes:
    return _save(_prices_figure(report), "png")
