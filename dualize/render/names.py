"""How a name of the language is shown: Greek letters and subscripts.

The language lets users write ``lambda1``, ``nu_2``, ``alpha`` or ``α``; a reader
of papers expects \\lambda_{1}, \\nu_{2}, \\alpha.  Both printers (LaTeX and
terminal text) read the same split of a name into a base and a subscript, so the
two targets never disagree about what a name means.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

GREEK: dict[str, str] = {
    "alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ε",
    "zeta": "ζ", "eta": "η", "theta": "θ", "iota": "ι", "kappa": "κ",
    "lambda": "λ", "mu": "μ", "nu": "ν", "xi": "ξ", "omicron": "ο", "pi": "π",
    "rho": "ρ", "sigma": "σ", "tau": "τ", "upsilon": "υ", "phi": "φ", "chi": "χ",
    "psi": "ψ", "omega": "ω",
    "Gamma": "Γ", "Delta": "Δ", "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ", "Pi": "Π",
    "Sigma": "Σ", "Upsilon": "Υ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
}
"""Greek spellings accepted as names, with their letters."""

LATEX_OF_LETTER: dict[str, str] = {letter: f"\\{word}" for word, letter in GREEK.items()}
# Letters that LaTeX has no command for look like Latin ones.
LATEX_OF_LETTER["ο"] = "o"

_SUBSCRIPT_CHARS: dict[str, str] = dict(zip(
    "0123456789aehijklmnoprstuvx+-()", "₀₁₂₃₄₅₆₇₈₉ₐₑₕᵢⱼₖₗₘₙₒₚᵣₛₜᵤᵥₓ₊₋₍₎", strict=True
))
_TRAILING_DIGITS = re.compile(r"^(.*?[^\d_])(\d+)$")


@dataclass(frozen=True)
class NameParts:
    """A name split for display: ``base`` (a word or letter) and ``subscript``."""

    base: str
    subscript: str | None


def split_name(name: str) -> NameParts:
    """``lambda1`` -> (lambda, 1); ``x_max`` -> (x, max); ``alpha`` -> (alpha, None)."""
    if "_" in name.strip("_"):
        base, _, sub = name.strip("_").partition("_")
        return NameParts(base, sub)
    match = _TRAILING_DIGITS.match(name)
    if match:
        return NameParts(match.group(1), match.group(2))
    return NameParts(name, None)


def _latex_word(word: str) -> str:
    """A Greek word or letter as its command; one Latin letter bare; longer words upright."""
    if word in GREEK:
        return LATEX_OF_LETTER[GREEK[word]]
    if len(word) == 1:
        return _latex_letter(word)
    if word.isdigit():
        return word
    shown = "".join(_latex_letter(c) for c in word).replace("_", "\\_")
    return "\\mathrm{" + shown + "}"


def _latex_letter(char: str) -> str:
    """One character of a name in math mode; letters pdflatex lacks show their code point."""
    if char in LATEX_OF_LETTER:
        return LATEX_OF_LETTER[char]
    if char.isascii():
        return char
    if "\u00c0" <= char <= "\u00ff":
        return "\\text{" + char + "}"
    return f"\\text{{[U+{ord(char):04X}]}}"


def latex_name(name: str) -> str:
    """The LaTeX of a name: ``lambda1`` -> ``\\lambda_{1}``, ``x`` -> ``x``."""
    parts = split_name(name)
    base = _latex_word(parts.base)
    if parts.subscript is None:
        return base
    return f"{base}_{{{_latex_word(parts.subscript)}}}"


def unicode_subscript(text: str) -> str | None:
    """``12`` -> ``₁₂``; None when some character has no Unicode subscript form."""
    if all(c in _SUBSCRIPT_CHARS for c in text):
        return "".join(_SUBSCRIPT_CHARS[c] for c in text)
    return None


def text_name(name: str) -> str:
    """The terminal form of a name: ``lambda1`` -> ``λ₁``, ``x_max`` -> ``x_max``."""
    parts = split_name(name)
    base = GREEK.get(parts.base, parts.base)
    if parts.subscript is None:
        return base
    sub = GREEK.get(parts.subscript, parts.subscript)
    small = unicode_subscript(sub)
    return base + small if small is not None else f"{base}_{sub}"


_PROSE_TOKEN = re.compile(
    r"\$([#\w][\w#]*)\$|(?<![\w\\])([A-Za-z]+(?:_?[A-Za-z0-9]+)?)(?![\w])|(<=|>=|==|!=)")
PROSE_RELATIONS: dict[str, str] = {"<=": "<=", ">=": ">=", "==": "=", "!=": "!="}


def prose_pieces(text: str) -> list[tuple[str, str]]:
    """A sentence cut into plain text, marked formulas, Greek names and relation signs.

    Engine sentences mark their mathematics as ``$key$`` (a name, or the key of a
    formula the step carries); an unmarked "beta >= 0" still shows the letter and
    the sign, so each target sets these pieces as mathematics and the rest as words.
    """
    pieces: list[tuple[str, str]] = []
    last = 0
    for match in _PROSE_TOKEN.finditer(text):
        marked, word, relation = match.group(1), match.group(2), match.group(3)
        if word is not None and split_name(word).base not in GREEK:
            continue
        if match.start() > last:
            pieces.append(("text", text[last:match.start()]))
        if marked is not None:
            pieces.append(("math", marked))
        else:
            pieces.append(("name", word) if word is not None else ("relation", relation))
        last = match.end()
    if last < len(text):
        pieces.append(("text", text[last:]))
    return pieces
