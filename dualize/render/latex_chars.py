"""Characters of plain sentences made safe for pdflatex.

Engine and analysis sentences are Unicode; pdflatex with the standard fonts
knows only ASCII and the Latin letters that inputenc maps.  Every other
character becomes a LaTeX command (math signs in math mode), and a character we
cannot typeset is shown as its code point rather than breaking the document.
"""

from __future__ import annotations

from dualize.render.names import LATEX_OF_LETTER

TEXT_ESCAPES: dict[str, str] = {
    "\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
    "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}", "^": r"\textasciicircum{}",
    "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}",
    "–": "--", "—": "---", "‘": "`", "’": "'", "“": "``", "”": "''", "…": r"\ldots{}",
    "\u00a0": "~", "−": "-", "′": "'",
}
MATH_CHARACTERS: dict[str, str] = {
    "≤": r"\leq", "≥": r"\geq", "≠": r"\neq", "⪰": r"\succeq", "⪯": r"\preceq",
    "≺": r"\prec", "≻": r"\succ", "∈": r"\in", "∉": r"\notin", "ℝ": r"\mathbb{R}",
    "𝕊": r"\mathbb{S}", "ℤ": r"\mathbb{Z}", "ℕ": r"\mathbb{N}", "×": r"\times",
    "·": r"\cdot", "∞": r"\infty", "‖": r"\Vert", "ᵀ": r"^\top", "⊤": r"\top",
    "⊙": r"\odot", "⊘": r"\oslash", "𝟏": r"\mathbf{1}", "→": r"\to", "∘": r"\circ",
    "†": r"^\dagger", "⁺": "^{+}", "⁻": "^{-}", "√": r"\surd", "∂": r"\partial",
    "∇": r"\nabla", "∑": r"\sum", "∏": r"\prod", "≈": r"\approx", "≡": r"\equiv",
    "±": r"\pm", "∓": r"\mp", "∀": r"\forall", "∃": r"\exists", "⊆": r"\subseteq",
    "⊂": r"\subset", "∩": r"\cap", "∪": r"\cup", "∅": r"\emptyset", "⇒": r"\Rightarrow",
    "⇔": r"\Leftrightarrow", "⟨": r"\langle", "⟩": r"\rangle", "∗": "*", "⋆": r"\star",
    "¹": "^{1}", "²": "^{2}", "³": "^{3}",
    **{chr(0x2080 + d): f"_{{{d}}}" for d in range(10)},
    **{chr(0x2070 + d): f"^{{{d}}}" for d in (0, 4, 5, 6, 7, 8, 9)},
    **{small: f"_{{{letter}}}" for small, letter in zip(
        "ₐₑₕᵢⱼₖₗₘₙₒₚᵣₛₜᵤᵥₓ", "aehijklmnoprstuvx", strict=True)},
}


def math_symbol(char: str) -> str | None:
    """The math-mode LaTeX of a Greek letter or math sign; None for other characters."""
    return LATEX_OF_LETTER.get(char) or MATH_CHARACTERS.get(char)


def text_character(char: str) -> str:
    """A character of running text: escaped, kept (ASCII, Latin-1 letters) or its code point."""
    if char in TEXT_ESCAPES:
        return TEXT_ESCAPES[char]
    if char.isascii() or ("\u00c0" <= char <= "\u00ff" and char.isalpha()):
        return char
    return rf"\texttt{{[U+{ord(char):04X}]}}"
