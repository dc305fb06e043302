"""LaTeX for the multiplier reports: plain sentences escaped, a tabular, the bound in math.

``standalone`` wraps the fragment in an article that pdflatex compiles.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from dualize.render.caution import CAUTION
from dualize.render.latex_chars import text_character

if TYPE_CHECKING:
    from dualize.multipliers.sensitivity import Sensitivity

PREAMBLE = ("\\documentclass{article}\n\\usepackage[utf8]{inputenc}\n"
            "\\usepackage{amsmath}\n\\usepackage{amssymb}\n\\begin{document}\n")


def escape(text: str) -> str:
    """Running text for pdflatex; straight double quotes become opening and closing ones."""
    out, opening = [], True
    for c in text:
        if c == '"':
            out.append("``" if opening else "''")
            opening = not opening
        else:
            out.append(text_character(c))
    return "".join(out)


def tabular(rows: list[list[str]]) -> str:
    """A left-aligned tabular in small type (a report's table has many columns); every
    cell escaped, the first row as the header."""
    spec = "l" * len(rows[0])
    body = [" & ".join(escape(c) for c in r) + r" \\" for r in rows]
    return "\n".join([r"\begin{center}\scriptsize\setlength{\tabcolsep}{2.5pt}",
                      f"\\begin{{tabular}}{{{spec}}}", r"\hline", body[0], r"\hline",
                      *body[1:], r"\hline", r"\end{tabular}", r"\end{center}"])


def wrap(parts: list[str], title: str, standalone: bool) -> str:
    text = "\n\n".join(parts)
    if not standalone:
        return text + "\n"
    return f"{PREAMBLE}\n\\section*{{{escape(title)}}}\n\n{text}\n\n\\end{{document}}\n"


def sensitivity_latex(report: Sensitivity, standalone: bool = False) -> str:
    from dualize.multipliers import printing as P

    head = P.header(report)
    parts = [r"\paragraph{Prices of the constraints.} " + escape(" ".join(head))]
    if report.rows:
        parts += [escape(P.CONVENTION), tabular(P.table_rows(report))]
        parts += [escape(f"{r.name}: {r.note}") for r in report.rows if r.note]
        parts += [escape(P.METHOD + " " + P.rates_sentence(report))]
    if report.established:
        rel = r"\geq" if report.minimize else r"\leq"
        sign = "-" if report.minimize else "+"
        parts.append(f"\\[ p^\\star(u) {rel} p^\\star(0) {sign} \\lambda^{{\\star\\top}} u "
                     "\\quad \\text{for every } u \\]")
    parts += [escape(P.bound_sentence(report)), r"\emph{" + escape(CAUTION) + "}"]
    title = report.problem.title or "Prices of the constraints"
    return wrap(parts, title, standalone)
