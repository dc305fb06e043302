"""The sensitivity report as text, Markdown, LaTeX and JSON.

Numbers are printed with six significant digits (``%.6g``), minus zero as zero,
so that the same instance gives byte-identical reports.
"""

from __future__ import annotations

import html
import json
import math
from typing import Any

from dualize.multipliers.sensitivity import AGREE_REL, STEP_REL, Rate, Sensitivity
from dualize.numeric.solution import status_word
from dualize.render.caution import CAUTION

CHECK_WORDS = {
    "agrees": "agrees", "disagrees": "DISAGREES", "kink": "kink",
    "kink-disagrees": "kink, DISAGREES", "edge": "edge", "edge-disagrees": "edge, DISAGREES",
    "not-checked": "not checked",
}
CONVENTION = ("Each constraint is shifted in its normalized form: g(x) <= u for an "
              "inequality (u > 0 relaxes it, whichever side it was written on), h(x) = u for "
              "an equality, G(x) preceq u I for a matrix inequality. A vector constraint is "
              "shifted entry by entry: one row, one rate per entry.")
METHOD = (f"Each rate is measured by re-solving at shifts +-h and +-h/2 (h = {STEP_REL:g} "
          "times the right-hand side's scale, at most half a positive slack; then up to two "
          "steps 8 times smaller while the two sides disagree, or larger while solver noise "
          "drowns the check), one-sided differences with Richardson "
          f"extrapolation; it agrees when within {AGREE_REL:g} relative (with a floor for "
          "solver noise over h).")


def num(value: float) -> str:
    """``%.6g``, without a minus zero; nan and infinities in words."""
    if not math.isfinite(value):
        return "n/a" if math.isnan(value) else ("inf" if value > 0 else "-inf")
    text = f"{value:.6g}"
    return "0" if text in ("-0", "0") else text


def rate_word(report: Sensitivity) -> str:
    return "-lambda" if report.minimize else "+lambda"


def measured(row: Rate) -> str:
    """One number where the two sides agree, both where they do not."""
    if row.check in ("agrees", "disagrees"):
        return num(row.measured)
    if row.check == "not-checked":
        return "-"
    return f"{num(row.left)} / {num(row.right)}"


def single_rate(row: Rate) -> bool:
    """False at a kink or an edge of p*: there the derivative does not exist."""
    return not row.check.startswith(("kink", "edge"))


def rate_cell(row: Rate) -> str:
    return num(row.rate) if single_rate(row) else "none (one-sided)"


def table_rows(report: Sensitivity) -> list[list[str]]:
    head = ["entry", "as written", "multiplier", "slack", "binds",
            f"rate {rate_word(report)}", "re-solved (left / right)", "check"]
    rows = [[r.name, r.relation, num(r.multiplier), num(r.slack), "yes" if r.binds else "no",
             rate_cell(r), measured(r), CHECK_WORDS[r.check]] for r in report.rows]
    return [head, *rows]


def bound_terms(report: Sensitivity) -> str:
    """``p*(0) - sum lambda_i u_i`` with the numbers, u named by entry."""
    sign = -1.0 if report.minimize else 1.0
    parts = [num(report.value)]
    for r in report.rows:
        coef = sign * r.multiplier
        if num(coef) == "0":
            continue
        op = "-" if coef < 0 else "+"
        parts.append(f"{op} {num(abs(coef))} u[{r.name}]")
    return " ".join(parts)


def bound_sentence(report: Sensitivity) -> str:
    """The global bound with its conditions, or the reason it is refused."""
    if report.established:
        rel = ">=" if report.minimize else "<="
        formula = ("p*(0) - lambda*'u" if report.minimize else "p*(0) + lambda*'u")
        return (f"For every shift u: p*(u) {rel} {formula} = {bound_terms(report)}. "
                "It holds because strong duality is established ("
                f"{report.verdict_reason}) and lambda* is an optimal multiplier (the "
                "reference solve's status: solved); Boyd and Vandenberghe, 2004, "
                "section 5.6.2.")
    why = report.refusal or _not_established(report)
    return f"No global bound is stated: {why}."


def _not_established(report: Sensitivity) -> str:
    if report.verdict != "guaranteed":
        return f"strong duality is not established ({report.verdict}: {report.verdict_reason})"
    if report.status == "optimal":
        return "the solver returned no multiplier for some constraint"
    word = status_word(report.status)
    return (f"the reference solve's status is {word}, so the multiplier is not known "
            "to be optimal")


def rates_sentence(report: Sensitivity) -> str:
    rate = "dp*/du_i = -lambda_i" if report.minimize else "dp*/du_i = +lambda_i"
    state = "" if report.established else (" These rates are not established: the "
                                           "conditions of the global bound do not hold.")
    return (f"Local rates: {rate} where p* is differentiable at u = 0 (Boyd and "
            f"Vandenberghe, 2004, section 5.6.3); where the one-sided rates differ (a kink "
            f"of p*) both are shown instead of one number.{state}")


def header(report: Sensitivity) -> list[str]:
    p = report.problem
    title = p.title or p.path
    return [f"Prices of the constraints of \"{title}\" on {report.instance}",
            f"p*(0) = {num(report.value)} ({p.sense}; reference solve: "
            f"{status_word(report.status)})",
            f"Strong duality: {report.verdict} ({report.verdict_reason})"]


def sensitivity_text(report: Sensitivity) -> str:
    lines = header(report) + [""]
    if report.rows:
        lines += [CONVENTION, "", *aligned(table_rows(report)), ""]
        notes = [f"  {r.name}: {r.note}" for r in report.rows if r.note]
        lines += notes + ([""] if notes else []) + [METHOD, rates_sentence(report)]
    lines += ["", bound_sentence(report), "", CAUTION]
    return "\n".join(lines) + "\n"


def aligned(rows: list[list[str]]) -> list[str]:
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)).rstrip()
            for r in rows]


def sensitivity_markdown(report: Sensitivity) -> str:
    head, *_ = header(report)
    lines = [f"### {head}", "", *[f"- {s}" for s in header(report)[1:]], ""]
    if report.rows:
        rows = table_rows(report)
        lines += [CONVENTION, "", md_row(rows[0]), md_row(["---"] * len(rows[0]))]
        lines += [md_row(r) for r in rows[1:]] + [""]
        lines += [f"- `{r.name}`: {r.note}" for r in report.rows if r.note]
        lines += ["", METHOD, "", rates_sentence(report)]
    lines += ["", bound_sentence(report), "", f"*{CAUTION}*"]
    return "\n".join(lines) + "\n"


def md_row(cells: list[str]) -> str:
    return "| " + " | ".join(c.replace("|", "\\|") for c in cells) + " |"


def html_table(rows: list[list[str]]) -> str:
    """Rows as an HTML table (every cell escaped), the first row as the header."""
    head = "".join(f"<th>{html.escape(c)}</th>" for c in rows[0])
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in r) + "</tr>"
                   for r in rows[1:])
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def html_page(lines: list[str], rows: list[list[str]], after: list[str]) -> str:
    """A notebook's HTML view: sentences, the table, sentences (all escaped)."""
    paragraphs = "".join(f"<p>{html.escape(line)}</p>" for line in lines if line)
    tail = "".join(f"<p>{html.escape(line)}</p>" for line in after if line)
    return paragraphs + (html_table(rows) if len(rows) > 1 else "") + tail


def sensitivity_html(report: Sensitivity) -> str:
    notes = [f"{r.name}: {r.note}" for r in report.rows if r.note]
    return html_page(header(report), table_rows(report),
                     notes + [bound_sentence(report), CAUTION])


def sensitivity_json(report: Sensitivity) -> str:
    p = report.problem
    data: dict[str, Any] = {
        "title": p.title, "file": p.path, "instance": report.instance, "sense": p.sense,
        "status": status_word(report.status), "value": json_number(report.value),
        "strong_duality": {"status": report.verdict, "reason": report.verdict_reason},
        "perturbation": CONVENTION, "method": {"step_relative": STEP_REL,
                                               "agreement_relative": AGREE_REL},
        "bound": {"established": report.established, "statement": bound_sentence(report)},
        "entries": [_row_json(r) for r in report.rows],
        "failed_checks": len(report.failed_checks()), "caution": CAUTION,
    }
    return json.dumps(data, indent=2, ensure_ascii=False)


def _row_json(r: Rate) -> dict[str, Any]:
    n = json_number
    return {"entry": r.name, "constraint": r.constraint, "relation": r.relation,
            "multiplier": n(r.multiplier), "slack": n(r.slack), "binds": r.binds,
            "rate": n(r.rate) if single_rate(r) else None, "multiplier_rate": n(r.rate),
            "step": n(r.step), "left_rate": n(r.left), "right_rate": n(r.right),
            "tolerance": n(r.tolerance), "check": r.check, "note": r.note}


def json_number(value: float) -> float | None:
    """JSON has no nan or infinity: null stands for a value that does not exist."""
    if not math.isfinite(value):
        return None
    return 0.0 if value == 0 else float(f"{value:.12g}")


def render_sensitivity(report: Sensitivity, fmt: str, standalone: bool = False) -> str:
    """The report in ``fmt`` (text, markdown, latex or json); ``standalone`` LaTeX
    is a complete document."""
    if fmt == "latex":
        return sensitivity_latex(report, standalone)
    return {"text": sensitivity_text, "markdown": sensitivity_markdown,
            "json": sensitivity_json}[fmt](report)


def sensitivity_latex(report: Sensitivity, standalone: bool = False) -> str:
    from dualize.multipliers.latex import escape, tabular, wrap

    parts = [r"\paragraph{Prices of the constraints.} " + escape(" ".join(header(report)))]
    if report.rows:
        parts += [escape(CONVENTION), tabular(table_rows(report))]
        parts += [escape(f"{r.name}: {r.note}") for r in report.rows if r.note]
        parts += [escape(METHOD + " " + rates_sentence(report))]
    if report.established:
        rel = r"\geq" if report.minimize else r"\leq"
        sign = "-" if report.minimize else "+"
        parts.append(f"\\[ p^\\star(u) {rel} p^\\star(0) {sign} \\lambda^{{\\star\\top}} u "
                     "\\quad \\text{for every } u \\]")
    parts += [escape(bound_sentence(report)), r"\emph{" + escape(CAUTION) + "}"]
    return wrap(parts, report.problem.title or "Prices of the constraints", standalone)
