"""Render a terminal pane captured with ANSI colours (`tmux capture-pane -e -p`) as a PNG.

    python docs/images/pane_to_png.py pane.ansi out.png

Handles the SGR codes a terminal editor uses: reset, bold, reverse, underline,
the 16 basic colours and their bright forms, 256-colour and 24-bit colours.
Needs Pillow, fontTools and the DejaVu fonts (a character the monospaced font
lacks, such as a double-struck one, is drawn from DejaVu Sans or DejaVu Math).
"""

from __future__ import annotations

import re
import sys
from collections.abc import Callable
from dataclasses import dataclass, replace

from PIL import Image, ImageDraw, ImageFont

FONTS = "/usr/share/fonts/truetype/dejavu/"
FONT = FONTS + "DejaVuSansMono.ttf"
FALLBACKS = (FONTS + "DejaVuSans.ttf", FONTS + "DejaVuMathTeXGyre.ttf")
BASIC = ["#1e1e1e", "#cd3131", "#0dbc79", "#c7a008", "#2472c8", "#bc3fbc", "#11a8cd", "#e5e5e5",
         "#666666", "#f14c4c", "#23d18b", "#e5e510", "#3b8eea", "#d670d6", "#29b8db", "#ffffff"]
FG, BG = "#e5e5e5", "#1e1e1e"
SGR = re.compile(r"\x1b\[([0-9;:]*)m")


@dataclass(frozen=True)
class Style:
    fg: str = FG
    bg: str = BG
    bold: bool = False
    reverse: bool = False
    underline: bool = False


def colour256(n: int) -> str:
    if n < 16:
        return BASIC[n]
    if n < 232:
        n -= 16
        steps = [0, 95, 135, 175, 215, 255]
        return rgb(steps[n // 36], steps[n // 6 % 6], steps[n % 6])
    level = 8 + 10 * (n - 232)
    return rgb(level, level, level)


def rgb(*levels: int) -> str:
    return "#" + "".join(f"{v:02x}" for v in levels)


def apply(style: Style, codes: list[int]) -> Style:
    i = 0
    while i < len(codes):
        c = codes[i]
        if c in (38, 48, 58) and i + 1 < len(codes):
            if codes[i + 1] == 5:
                colour, i = colour256(codes[i + 2]), i + 3
            else:
                colour, i = rgb(*codes[i + 2:i + 5]), i + 5
            if c == 38:
                style = replace(style, fg=colour)
            elif c == 48:
                style = replace(style, bg=colour)
            continue
        style = _simple(style, c)
        i += 1
    return style


def _simple(style: Style, c: int) -> Style:
    table = {0: Style(), 1: replace(style, bold=True), 22: replace(style, bold=False),
             4: replace(style, underline=True), 24: replace(style, underline=False),
             7: replace(style, reverse=True), 27: replace(style, reverse=False),
             39: replace(style, fg=FG), 49: replace(style, bg=BG)}
    if c in table:
        return table[c]
    if 30 <= c <= 37:
        return replace(style, fg=BASIC[c - 30])
    if 90 <= c <= 97:
        return replace(style, fg=BASIC[c - 90 + 8])
    if 40 <= c <= 47:
        return replace(style, bg=BASIC[c - 40])
    if 100 <= c <= 107:
        return replace(style, bg=BASIC[c - 100 + 8])
    return style


def cells(line: str, style: Style) -> tuple[list[tuple[str, Style]], Style]:
    out, at = [], 0
    for match in SGR.finditer(line):
        out += [(ch, style) for ch in line[at:match.start()]]
        codes = [int(x) for x in re.split(r"[;:]", match.group(1)) if x] or [0]
        style = apply(style, codes)
        at = match.end()
    out += [(ch, style) for ch in line[at:]]
    return out, style


def font_for(size: int) -> Callable[[str, bool], ImageFont.FreeTypeFont]:
    """The font to draw a character with: the monospaced one when it has the glyph."""
    from fontTools.ttLib import TTFont

    paths = (FONT, *FALLBACKS)
    maps = [TTFont(p).getBestCmap() for p in paths]
    fonts = [ImageFont.truetype(p, size) for p in paths]
    bold = ImageFont.truetype(FONT.replace(".ttf", "-Bold.ttf"), size)

    def pick(ch: str, strong: bool) -> ImageFont.FreeTypeFont:
        found = next((f for f, m in zip(fonts, maps, strict=True) if ord(ch) in m), fonts[0])
        return bold if strong and found is fonts[0] else found

    return pick


def render(text: str, size: int = 18) -> Image.Image:
    font = ImageFont.truetype(FONT, size)
    pick = font_for(size)
    width, height = int(font.getlength("M")) + 1, int(size * 1.35)
    rows, style = [], Style()
    for line in text.rstrip("\n").split("\n"):
        row, style = cells(line, style)
        rows.append(row)
    columns = max(len(r) for r in rows) + 2
    image = Image.new("RGB", (columns * width + 24, len(rows) * height + 24), BG)
    draw = ImageDraw.Draw(image)
    for y, row in enumerate(rows):
        for x, (ch, st) in enumerate(row):
            fg, bg = (st.bg, st.fg) if st.reverse else (st.fg, st.bg)
            left, top = 12 + x * width, 12 + y * height
            draw.rectangle([left, top, left + width, top + height], fill=bg)
            draw.text((left, top + 2), ch, fill=fg, font=pick(ch, st.bold))
            if st.underline:
                draw.line([left, top + height - 2, left + width, top + height - 2], fill=fg)
    return image


if __name__ == "__main__":
    source, target = sys.argv[1], sys.argv[2]
    with open(source, encoding="utf-8") as handle:
        render(handle.read()).save(target)
