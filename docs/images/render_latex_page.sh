#!/bin/sh
# Regenerate docs/images/latex-page-soft-margin.png: the first page of the bundled
# soft-margin example's standalone LaTeX, as pdflatex sets it (needs pdflatex and
# pdftoppm from poppler-utils).
set -eu
root="$(cd "$(dirname "$0")/../.." && pwd)"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
cd "$root"
python -m dualize derive examples/parts_soft_margin.prob --format latex --standalone \
    -o "$work/page.tex"
(cd "$work" && pdflatex -interaction=nonstopmode -halt-on-error page.tex >/dev/null)
pdftoppm -png -r 100 -f 1 -l 1 -singlefile "$work/page.pdf" "$work/page"
cp "$work/page.png" docs/images/latex-page-soft-margin.png
