"""LaTeX pieces for the multiplier reports: plain sentences escaped, a tabular, a page.

``standalone`` wraps the fragment in an article that pdflatex compiles.  The
reports themselves are laid out by ``printing`` and ``path_print``.
"""

from __future__ import annotations

from dualize.render.latex_chars import text_character

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
