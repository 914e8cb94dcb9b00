"""Constants on sheets a checker signs: none rests on memory beside a result.

A constant whose source no one on the project could read is listed on the Notes sheet under
"UNVERIFIED CONSTANTS" (TemplateBook.unverified) and marked "unverified: see Notes" where it is
used; the words "from memory" appear on no sheet of a committed template.
"""

from __future__ import annotations

from pathlib import Path

import openpyxl
import pytest

TEMPLATES = sorted((Path(__file__).resolve().parents[1] / "templates").glob("*.xlsx"))
#: The templates that print a standard's or a handbook's constant we could not verify.
WITH_UNVERIFIED = {"air-layer", "glazing-unit", "solar-collector", "finned-heatsink", "hot-surface", "vented-cabinet",
                   "cabinet-day"}


def _texts(path: Path):
    book = openpyxl.load_workbook(path, read_only=True)
    for sheet in book.worksheets:
        for row in sheet.iter_rows(values_only=True):
            for value in row:
                if isinstance(value, str):
                    yield sheet.title, value


@pytest.mark.parametrize("path", TEMPLATES, ids=lambda p: p.stem)
def test_no_sheet_says_from_memory(path):
    offending = [(sheet, text[:80]) for sheet, text in _texts(path) if "from memory" in text.lower()]
    assert not offending


@pytest.mark.parametrize("path", TEMPLATES, ids=lambda p: p.stem)
def test_unverified_constants_are_listed_on_the_notes_sheet(path):
    notes = [text for sheet, text in _texts(path) if sheet == "Notes" and text.startswith("UNVERIFIED CONSTANTS")]
    marked = [text for sheet, text in _texts(path) if sheet != "Notes" and "unverified: see Notes" in text]
    assert bool(notes) == (path.stem in WITH_UNVERIFIED)
    if marked:   # every mark beside a result points at a list that exists
        assert notes
