"""Duals claimed in a LaTeX paper draft, read and translated into the problem language.

- ``locate``: claims in a .tex file (marker comments, labels) -> ``PaperClaim``.
- ``reader``: a display's LaTeX -> paper nodes (grammar/paper_latex.lark).
- ``translate``: paper nodes -> a claim in our language with a map back to the .tex.
- ``draft``: every claim of a draft checked against its problem file.
"""
