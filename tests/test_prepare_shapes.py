"""calc's shortcuts for big books give what the long way gives: copied-down formulas found by
their text outside the digits (rewrite.prepare's digit index) get the references, key and
problem that preparing each on its own gives; captions read once per sheet are the nearest
text left of each cell."""

from __future__ import annotations

import pytest

from stillair.addin.workbook.formulas_bridge import load
from stillair.addin.workbook.rewrite import prepare

USED = {"CASES": (400, 20), "OTHER": (400, 20)}

# (formula in row {n}, column): copies down a column, with what must not be taken for a row
# (constants, digits in a text, a function name with digits, $-fixed rows, a leading zero)
SHAPES = [
    ("=H_CAVITY(A{n},B{n},C{n},D{n})", 7),
    ("=1/(1/(G{n}+H{n})+0.17)", 9),
    ("=CAVITY_METHOD(J{n},AIR_PRANDTL((A{n}+B{n})/2),D{n}/C{n})", 11),
    ("=A{n}*$B$1+B$2-LOG10(C{n})", 5),
    ('=IF(A{n}>12,"row 12 of A12","x"&A{n})', 6),
    ("=SUM(A{n}:C{n})+Other!B{n}", 8),
    ("=A{n}+A{n}+10", 4),
    ("=A0{n}+1", 4),
]


@pytest.fixture(scope="module", autouse=True)
def _library():
    load()


def _same(a, b):
    assert a.references == b.references
    assert a.key == b.key
    assert a.problem == b.problem


@pytest.mark.parametrize("shape,col", SHAPES)
def test_a_copy_shares_the_preparation_it_would_get_alone(shape, col):
    cache, digits = {}, {}
    for n in list(range(2, 40)) + [399, 12, 3]:
        formula = shape.format(n=n)
        shared = prepare(formula, n, col, USED, "Cases", cache, digits=digits)
        _same(shared, prepare(formula, n, col, USED, "Cases"))
    assert digits, "the digit index holds the copied form"


def test_a_formula_differing_only_in_a_constant_is_not_taken_for_a_copy():
    """Same text outside the digits, another constant or a moved fixed row: its own shape."""
    cache, digits = {}, {}
    first = prepare("=A2*0.17+$B$1", 2, 5, USED, "Cases", cache, digits=digits)
    for formula in ("=A3*0.18+$B$1", "=A3*0.17+$B$2", "=A3*1.17+$B$1"):
        other = prepare(formula, 3, 5, USED, "Cases", cache, digits=digits)
        _same(other, prepare(formula, 3, 5, USED, "Cases"))
        assert other.key != first.key


def test_a_copy_in_another_column_or_sheet_is_checked_again():
    """The digit index is per sheet and column: the relative form decides elsewhere."""
    cache, digits = {}, {}
    prepare("=A2+B2", 2, 3, USED, "Cases", cache, digits=digits)
    for formula, row, col, sheet in (("=A2+B2", 2, 4, "Cases"), ("=A5+B5", 5, 3, "Other")):
        _same(prepare(formula, row, col, USED, sheet, cache, digits=digits),
              prepare(formula, row, col, USED, sheet))


def test_a_cells_caption_is_the_nearest_text_typed_to_its_left():
    """calc's listing names a cell by the nearest non-blank text left of it in its row (read
    once per sheet): not a number, not a blank text, nothing right of it or in another row."""
    from types import SimpleNamespace

    from stillair.addin.workbook.report import _caption, _captions
    sheet = SimpleNamespace(values={"A2": "gap", "B2": 0.02, "C2": " width ", "D2": "  ",
                                    "F2": "after", "A3": "other row", "B4": 3.0})
    captions = _captions(sheet)
    assert _caption(captions, "E2") == "width"     # C2, past the blank D2; F2 is to the right
    assert _caption(captions, "C2") == "gap"       # its own text does not count
    assert _caption(captions, "A2") == ""
    assert _caption(captions, "C4") == ""          # a number only
    assert _caption(captions, "Z3") == "other row"
