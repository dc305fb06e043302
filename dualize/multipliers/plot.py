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

HASH_SALT = "dualize-trade-off"


def _figure(curve: Curve) -> Any:
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    plt.rcParams["svg.hashsalt"] = HASH_SALT
    plt.rcParams["svg.fonttype"] = "path"
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


def _save(curve: Curve, fmt: str) -> bytes:
    import matplotlib.pyplot as plt

    fig = _figure(curve)
    buffer = io.BytesIO()
    metadata = {"Date": None} if fmt == "svg" else {"Software": None}
    try:
        fig.savefig(buffer, format=fmt, metadata=metadata, dpi=100)
    finally:
        plt.close(fig)
    return buffer.getvalue()


def curve_svg(curve: Curve) -> str:
    return _save(curve, "svg").decode("utf-8")


def curve_png(curve: Curve) -> bytes:
    return _save(curve, "png")


def finite(value: float) -> bool:
    return math.isfinite(value)
