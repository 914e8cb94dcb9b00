"""Workbooks saved by real spreadsheet programs, with the values they cached, for the corpus test.

The Excel-made set is tests/data/excel-made/: the workbooks of the source distribution of
xlcalculator 0.5.0 on PyPI whose docProps/app.xml names Microsoft Excel (its tests/resources
folder; MIT licence, kept beside them with SOURCE.md), committed so that CI needs no network.  Each
formula cell's cached value is compared with what ``stillair calc`` computes and with what the
``formulas`` library computes on its own (its ``ExcelModel``), under one rule (:func:`agrees`).
"""

from __future__ import annotations

import math
import re
import warnings
import zipfile
from pathlib import Path

SOURCE = ("xlcalculator", "0.5.0")        # MIT licence (PKG-INFO: "License: MIT")
EXCEL_MADE = Path(__file__).parent / "data" / "excel-made"


def application(path: Path) -> str:
    with zipfile.ZipFile(path) as archive:
        try:
            text = archive.read("docProps/app.xml").decode("utf-8", "replace")
        except KeyError:
            return ""
    m = re.search(r"<(?:\w+:)?Application>([^<]*)<", text)
    return m.group(1) if m else ""


def excel_made(folder: Path) -> list[Path]:
    return sorted(p for p in folder.glob("*.xls*") if "Excel" in application(p))


def cached_values(path: Path) -> dict[tuple[str, str], object]:
    """(sheet, ref) -> the value the file stores for every formula cell (array members too)."""
    from stillair.addin.workbook.reader import read_book
    book = read_book(str(path))
    out = {}
    for sheet in book.sheets:
        for ref, cell in sheet.formulas.items():
            if cell.has_cached:
                out[(sheet.name, ref)] = _stored(cell.cached)
        for ref, value in sheet.cached.items():
            out[(sheet.name, ref)] = _stored(value)
    return out


def _stored(value):
    from stillair.addin.workbook.reader import CellError
    return str(value) if isinstance(value, CellError) else value


def agrees(cached, computed) -> bool:
    """One rule for both evaluators: numbers within 1e-9 relative (or 1e-12 absolute), text and
    errors exactly, TRUE/FALSE as such, an empty text like an empty cell."""
    if isinstance(cached, bool) or isinstance(computed, bool):
        return isinstance(cached, bool) and isinstance(computed, bool) and cached == computed
    if isinstance(cached, float) and isinstance(computed, (int, float)):
        computed = float(computed)
        if not math.isfinite(computed):
            return False
        return abs(cached - computed) <= max(1e-9 * max(abs(cached), abs(computed)), 1e-12)
    if cached in ("", None) and computed in ("", None):
        return True
    return cached == computed


def ours(path: Path) -> dict[tuple[str, str], object]:
    from stillair.addin.workbook.model import evaluate_book
    evaluation = evaluate_book(str(path))
    return {(sheet, ref): value for sheet, cells in evaluation.values.items()
            for ref, value in cells.items()}


def library(path: Path) -> dict[tuple[str, str], object]:
    """The formulas library on its own: ExcelModel loads, compiles and calculates the file."""
    import formulas
    import numpy as np
    import schedula as sh
    from formulas.tokens.operand import XlError

    from stillair.addin.workbook.reader import read_book
    sheets = {s.name.upper(): s.name for s in read_book(str(path)).sheets}
    with warnings.catch_warnings():
        # openpyxl, under the library, on a worksheet extension it does not know (it would drop it
        # on saving; nothing is saved here); stillair's own reader reads these files silently
        warnings.filterwarnings("ignore", "Unknown extension is not supported", UserWarning)
        model = formulas.ExcelModel().loads(str(path)).finish()
    solution = model.calculate()
    from stillair.addin.workbook.formulas_bridge import input_reference_text
    from stillair.addin.workbook.reader import index_to_col, split_ref

    def one(value):
        if value is sh.EMPTY:
            return None
        if isinstance(value, XlError):
            return str(value)
        if isinstance(value, (np.bool_, bool)):
            return bool(value)
        if isinstance(value, (int, float, np.integer, np.floating)):
            return float(value)
        return value

    out, single = {}, set()
    for key, ranges in solution.items():
        m = re.match(r"^'?\[[^\]]+\](.+?)'?!(.+)$", str(key))
        if not m:
            continue
        sheet = sheets.get(m.group(1).replace("''", "'").upper())
        area = input_reference_text(m.group(2))
        first, _, last = area.partition(":")
        try:
            (r1, c1), (r2, c2) = split_ref(first), split_ref(last or first)
        except ValueError:
            continue
        if sheet is None or (r2 - r1 + 1) * (c2 - c1 + 1) > 100_000:
            continue
        value = np.asarray(getattr(ranges, "value", ranges), dtype=object)
        if value.ndim < 2:
            value = value.reshape(1, -1) if value.ndim == 1 else value.reshape(1, 1)
        for r in range(r1, r2 + 1):
            for c in range(c1, c2 + 1):
                cell = (sheet, f"{index_to_col(c)}{r}")
                if cell in single or r - r1 >= value.shape[0] or c - c1 >= value.shape[1]:
                    continue
                out[cell] = one(value[r - r1, c - c1])
                if not last:
                    single.add(cell)
    return out


def reproduced(path: Path, evaluator) -> tuple[set, int]:
    """The formula cells whose cached value the evaluator reproduces, and how many there are."""
    cached = cached_values(path)
    try:
        computed = evaluator(path)
    except Exception:          # the evaluator fails on the whole file: none reproduced
        computed = {}
    return {key for key, value in cached.items()
            if key in computed and agrees(value, computed[key])}, len(cached)
