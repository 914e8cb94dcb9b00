"""Page arithmetic: the printed page, each sheet's grid, and where a block must start a new
page so that it prints whole."""

from __future__ import annotations

import math

__all__ = ["PAGE", "GRIDS", "ROW_HEIGHT", "PAGE_CAPACITY", "MIN_PRINT_SCALE", "CHART_PX",
           "text_lines", "row_height", "page_used", "starts_new_page"]

MIN_PRINT_SCALE = 0.8

# Column widths (characters) of each sheet's grid.  Inputs: label | value | unit | note;
# Calculation: step | label | value | unit | note; Results: label | value | unit | note;
# Notes: one wrapped column; Tables (network tables and sweeps): ten narrow columns; Network:
# below.
# LibreOffice fits a sheet to the page width by its columns (a single wide column is clipped, not
# shrunk) and measures a character wider than Excel, so every grid stays within ~112 characters:
# that prints at full size on A4 landscape in both.
GRIDS = {
    "Inputs": (42, 14, 11, 45),
    "Calculation": (5, 40, 14, 11, 42),
    "Results": (42, 14, 11, 45),
    "Notes": (110,),
    "Tables": (14, 9, 9, 11, 9, 9, 9, 9, 18, 13),
    # Network (a network the user types, own-network): the ten table columns and, beside them,
    # what p1..p5 hold for the row's kind; the solution tables reuse the columns
    "Network": (11, 9, 9, 11, 7, 7, 7, 7, 7, 12, 25),
}

# A4 landscape, margins in inches (left/right, top/bottom, header/footer).
PAGE = {"width_in": 11.69, "height_in": 8.27, "side": 0.5, "top": 0.6, "bottom": 0.6, "header": 0.25,
        "footer": 0.25}
ROW_HEIGHT = 13.5         # points, one line of 10-pt text
# Height a printed page holds, points: A4 landscape less margins, header and footer, and a reserve
# for a viewer that prints slightly larger than 100 %.
PAGE_CAPACITY = 460.0
CHART_PX = (760, 280)     # width, height of every chart


def text_lines(text: str, width: float) -> int:
    """Lines ``text`` takes wrapped in a column of ``width`` characters.

    A character of running text counts 0.9 units of column width: measured, DejaVu Sans (which
    LibreOffice prints for Calibri where Calibri is missing) takes about 0.82, Calibri less; the
    rest is slack for word breaks."""
    lines = 0
    for paragraph in str(text).split("\n"):
        lines += max(1, math.ceil(0.9 * len(paragraph) / max(width - 1, 1)))
    return lines


def row_height(lines: dict[int, float], row: int) -> float:
    """Points ``row`` takes on the page (``lines``: row -> lines of wrapped text)."""
    return ROW_HEIGHT * lines.get(row, 1)


def page_used(lines: dict[int, float], breaks: list[int], row: int) -> float:
    """Points of the current printed page filled above ``row`` (pages break automatically
    when full, and at the manual ``breaks``)."""
    used = 0.0
    for r in range(row):
        height = row_height(lines, r)
        if r in breaks or used + height > PAGE_CAPACITY:
            used = 0.0
        used += height
    return 0.0 if row in breaks else used


def starts_new_page(lines: dict[int, float], breaks: list[int], first: int, last: int) -> bool:
    """A block of rows ``first``..``last`` that fits on one page but not on the rest of the
    current one: it must start a new page to print whole."""
    height = sum(row_height(lines, r) for r in range(first, last + 1))
    return height <= PAGE_CAPACITY and page_used(lines, breaks, first) + height > PAGE_CAPACITY
