"""The correspondence as text, Markdown, LaTeX, JSON and CSV."""

from __future__ import annotations

import json
from typing import TYPE_CHECKING, Any

from dualize.multipliers.forms import Pair
from dualize.multipliers.printing import aligned, json_number, md_row, num
from dualize.render.caution import CAUTION

if TYPE_CHECKING:
    from dualize.multipliers.path import Curve

CSV_HEAD = ["weight", "bound", "objective", "check_weight", "check_bound",
            "check_objective", "status"]


def relation(pair: Pair) -> str:
    """The two forms and how w and t correspond, in plain words."""
    op, rel = ("+", "minimize") if pair.sense == "minimize" else ("-", "maximize")
    return (f"Penalized: {rel} {pair.rest} {op} {pair.weight} * ({pair.term}). "
            f"Constrained: {rel} {pair.rest} subject to {pair.label}: {pair.term} <= "
            f"{pair.bound}. They have the same solutions when {pair.weight} is the optimal "
            f"multiplier of {pair.label}; then {pair.bound} = r(x*({pair.weight})), and the "
            f"penalized optimum equals the constrained optimum {op} {pair.weight} * "
            f"{pair.bound} (Lagrange duality; Boyd and Vandenberghe, 2004, sections 4.7.4 "
            "and 5.5).")


def condition_pairs(pair: Pair, curve: Curve | None = None) -> list[tuple[str, str]]:
    """Each condition and its status; on an instance, the one on t is decided there."""
    return [(what, _slater_status(curve) if curve is not None and "smallest value of r"
             in what else status) for what, status in pair.conditions]


def conditions(pair: Pair, curve: Curve | None = None) -> list[str]:
    return [f"{what}: {status}" for what, status in condition_pairs(pair, curve)]


def _slater_status(curve: Curve) -> str:
    floor = curve.smallest_r
    if floor != floor:  # nan: the solve of min r failed
        return "not decided on this instance (the smallest value of r could not be found)"
    edges = sum(1 for p in curve.points if p.status == "edge")
    tail = f"; {edges} point(s) at it are marked edge" if edges else ""
    return f"on this instance the smallest value of r is {num(floor)}{tail}"


def table(curve: Curve) -> list[list[str]]:
    head = [curve.pair.weight, curve.pair.bound, "optimal f", "checked " + curve.pair.weight,
            "checked " + curve.pair.bound, "checked f", "check"]
    return [head] + [[num(p.weight), num(p.bound), num(p.objective), num(p.check_weight),
                      num(p.check_bound), num(p.check_objective), p.status]
                     for p in curve.points]


def _lines(curve: Curve) -> list[str]:
    swept = "weight" if curve.given == "weight" else "bound"
    out = [f"Each {swept} is matched by solving its form; each point is checked by solving "
           f"the other form at the matched value (weights agree within 1e-4 relative, bounds "
           "and optimal values within 1e-5).",
           f"Smallest value of r over the other constraints: {num(curve.smallest_r)}."]
    out += [f"{p.status} at {curve.pair.weight} = {num(p.weight)}, {curve.pair.bound} = "
            f"{num(p.bound)}: {p.note}" for p in curve.points if p.note][:8]
    out += list(curve.problems) or ["The curve is monotone, as the theory requires."]
    return out


def curve_text(curve: Curve) -> str:
    pair = curve.pair
    lines = [f"Trade-off between {pair.weight} and {pair.bound} on {curve.instance}", "",
             relation(pair), "", "Conditions:", *[f"  {c}" for c in conditions(pair, curve)],
             "", *aligned(table(curve)), "", *_lines(curve), "", CAUTION]
    return "\n".join(lines) + "\n"


def curve_markdown(curve: Curve) -> str:
    pair, rows = curve.pair, table(curve)
    lines = [f"### Trade-off between {pair.weight} and {pair.bound} on {curve.instance}", "",
             relation(pair), "", *[f"- {c}" for c in conditions(pair, curve)], "",
             md_row(rows[0]), md_row(["---"] * len(rows[0])), *[md_row(r) for r in rows[1:]],
             "", *[f"- {line}" for line in _lines(curve)], "", f"*{CAUTION}*"]
    return "\n".join(lines) + "\n"


def curve_html(curve: Curve) -> str:
    from dualize.multipliers.printing import html_page

    head = [f"Trade-off between {curve.pair.weight} and {curve.pair.bound} on "
            f"{curve.instance}", relation(curve.pair), *conditions(curve.pair, curve)]
    return html_page(head, table(curve), _lines(curve) + [CAUTION])


def curve_latex(curve: Curve, standalone: bool = False) -> str:
    from dualize.multipliers.latex import escape, tabular, wrap

    parts = [r"\paragraph{Trade-off.} " + escape(relation(curve.pair)),
             escape("Conditions: " + "; ".join(conditions(curve.pair, curve)) + "."),
             tabular(table(curve)), escape(" ".join(_lines(curve))),
             r"\emph{" + escape(CAUTION) + "}"]
    return wrap(parts, f"Trade-off between {curve.pair.weight} and {curve.pair.bound}",
                standalone)


def curve_json(curve: Curve) -> str:
    pair = curve.pair
    data: dict[str, Any] = {
        "weight": pair.weight, "bound": pair.bound, "label": pair.label, "sense": pair.sense,
        "f": pair.rest, "r": pair.term, "instance": curve.instance, "swept": curve.given,
        "relation": relation(pair),
        "conditions": [{"condition": c, "status": s} for c, s in condition_pairs(pair, curve)],
        "smallest_r": json_number(curve.smallest_r),
        "points": [{k: (json_number(v) if isinstance(v, float) else v) for k, v in zip(
            CSV_HEAD + ["note"], _fields(p), strict=True)} for p in curve.points],
        "numerical_problems": list(curve.problems), "caution": CAUTION,
    }
    return json.dumps(data, indent=2, ensure_ascii=False)


def _fields(p: Any) -> list[Any]:
    return [p.weight, p.bound, p.objective, p.check_weight, p.check_bound, p.check_objective,
            p.status, p.note]


def curve_csv(curve: Curve) -> str:
    rows = [",".join(CSV_HEAD)]
    for p in curve.points:
        values = _fields(p)[:6]
        rows.append(",".join([*(repr(float(v)) for v in values), p.status]))
    return "\n".join(rows) + "\n"


def render_curve(curve: Curve, fmt: str, standalone: bool = False) -> str:
    if fmt == "latex":
        return curve_latex(curve, standalone)
    return {"text": curve_text, "markdown": curve_markdown, "json": curve_json}[fmt](curve)


def pair_text(pair: Pair) -> str:
    other = "constrained" if pair.given == "penalized" else "penalized"
    lines = [f"The {pair.given} form given; its {other} form:", "", relation(pair), "",
             "Conditions for the two forms to have the same solutions:",
             *[f"  {c}" for c in conditions(pair)], "", f"The {other} form as a problem file:",
             "", pair.other_text.rstrip("\n"), "", CAUTION]
    return "\n".join(lines) + "\n"


def pair_markdown(pair: Pair) -> str:
    other = "constrained" if pair.given == "penalized" else "penalized"
    lines = [f"### The {other} form", "", relation(pair), "", "Conditions:", "",
             *[f"- {c}" for c in conditions(pair)], "", "```", pair.other_text.rstrip("\n"),
             "```", "", f"*{CAUTION}*"]
    return "\n".join(lines) + "\n"


def pair_html(pair: Pair) -> str:
    import html

    from dualize.multipliers.printing import html_page

    page = html_page([relation(pair), *conditions(pair)], [], [])
    return page + f"<pre>{html.escape(pair.other_text)}</pre><p>{html.escape(CAUTION)}</p>"


def pair_latex(pair: Pair, standalone: bool = False) -> str:
    from dualize.multipliers.latex import escape, wrap

    other = "constrained" if pair.given == "penalized" else "penalized"
    parts = [rf"\paragraph{{The {other} form.}} " + escape(relation(pair)),
             r"\begin{itemize}" + "".join(rf"\item {escape(c)}" for c in conditions(pair))
             + r"\end{itemize}",
             r"\begin{verbatim}" + "\n" + pair.other_text.rstrip("\n") + "\n" + r"\end{verbatim}",
             r"\emph{" + escape(CAUTION) + "}"]
    return wrap(parts, f"The {other} form", standalone)


def pair_json(pair: Pair) -> str:
    data = {"given": pair.given, "sense": pair.sense, "weight": pair.weight,
            "bound": pair.bound, "label": pair.label, "f": pair.rest, "r": pair.term,
            "relation": relation(pair),
            "conditions": [{"condition": c, "status": s} for c, s in pair.conditions],
            "other_form": pair.other_text, "caution": CAUTION}
    return json.dumps(data, indent=2, ensure_ascii=False)


def render_pair(pair: Pair, fmt: str, standalone: bool = False) -> str:
    if fmt == "latex":
        return pair_latex(pair, standalone)
    return {"text": pair_text, "markdown": pair_markdown, "json": pair_json}[fmt](pair)
