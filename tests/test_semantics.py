"""The spreadsheet's semantics headlessly: blanks, ranges past the used range, and the functions
that count or test cells, as Excel and LibreOffice define them.

Expected values follow each function's documented rule (Microsoft's Excel function reference
for COUNTA, COUNTBLANK, COUNTIF(S), SUMIF, ISBLANK, ISREF, ISFORMULA, ROW, COLUMN, ROWS, COLUMNS,
AREAS and the intersection operator; the same rules in LibreOffice Calc's help), worked by hand
for the small sheet built here.  The README's table "Blanks and references" states the same.
"""

from __future__ import annotations

import openpyxl
import pytest

from stillair.addin.cells.callpath import call
from stillair.addin.workbook.model import evaluate_book
from test_cells import BOUNDARIES, BRANCHES, Q_EXACT


@pytest.fixture(scope="module")
def sheet(tmp_path_factory):
    """B2:E5 hold 10*row + column; A3 "x", A5 2; rows past 8 and columns past G are empty."""
    path = tmp_path_factory.mktemp("semantics") / "semantics.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    for r in range(2, 6):
        for c in range(2, 6):
            ws.cell(r, c, r * 10 + c)
    ws["A3"], ws["A5"] = "x", 2
    for ref, formula in CASES.items():
        ws[ref] = formula[0]
    wb.save(path)
    return evaluate_book(str(path))


# cell: (formula, the value Excel gives, the rule)
CASES = {
    "G1": ("=ROW(C112)", 112.0, "ROW of a reference: its row, wherever it lies"),
    "G2": ("=COLUMN(C12)", 3.0, "COLUMN of a reference: its column"),
    "G3": ("=ROWS(B2:E9)", 8.0, "ROWS: rows of the reference, blank or not"),
    "G4": ("=COLUMNS(H2:Z5)", 19.0, "COLUMNS: columns of the reference, past the used range too"),
    "G5": ("=AREAS(B2:E5)", 1.0, "AREAS of one area"),
    "G6": ("=AREAS((B2:C3,D4))", 2.0, "AREAS of a union"),
    "G7": ("=COUNTA(A$3:A$245)", 3.0 - 1.0, "COUNTA counts non-empty cells only (A3, A5)"),
    "G8": ("=SUM(B2:E5 C3:D4)", 33.0 + 34 + 43 + 44, "a space intersects two areas"),
    "G9": ("=SUM(B2:C3 D4:E5)", "#NULL!", "areas that do not meet: #NULL!"),
    "G10": ("=ISREF(B2)", True, "ISREF of a reference"),
    "G11": ("=ISFORMULA(G1)", True, "ISFORMULA of a formula cell"),
    "G12": ("=ISFORMULA(B2)", False, "ISFORMULA of a constant"),
    "G13": ("=COUNTBLANK(A1:A10)", 8.0, "COUNTBLANK counts empty cells"),
    "G14": ('=COUNTIF(A1:A300,"")', 298.0, 'COUNTIF "" counts blank cells, past the used range too'),
    "G15": ('=COUNTIFS(A1:A10,"",B1:B10,"")', 6.0, "COUNTIFS over blank pairs"),
    "G16": ('=SUMIF(A1:A10,"x",B1:B10)', 32.0, "SUMIF"),
    "G17": ("=Z99+1", 1.0, "an empty cell is 0 in arithmetic"),
    "G18": ('=Z99&"a"', "a", 'an empty cell is "" in text'),
    "G19": ("=ISBLANK(Z99)", True, "ISBLANK of an empty cell"),
    "G20": ("=Z99", 0.0, "a formula that only references an empty cell shows 0"),
    "G21": ("=ISBLANK(G20)", False, "a formula cell is never blank, whatever it shows"),
    "G22": ("=COUNTA(Z1:Z2000)", 0.0, "COUNTA of a range wholly past the used range"),
    "G23": ("=ROWS(Z1:Z2000)", 2000.0, "ROWS of a range wholly past the used range"),
    "G25": ('=--(A3="x")+--(A5=3)', 1.0, "--TRUE is 1 and --FALSE is 0 (numbers, not logicals)"),
    "G24": ("=ROWS(G1:G30)+COLUMNS(A24:G24)", 37.0,
            "ROWS/COLUMNS of a range holding the cell itself: no circular reference (no value "
            "is read; LibreOffice agrees, tests/test_differential.py)"),
}


@pytest.mark.parametrize("ref", CASES)
def test_counting_and_testing_cells_behave_as_in_excel(sheet, ref):
    formula, expected, rule = CASES[ref]
    result = sheet.results[("S", ref)]
    if isinstance(expected, str) and expected.startswith("#"):
        assert result.value == expected, rule
    elif isinstance(expected, bool):
        assert result.value is expected, rule
    else:
        assert result.value == expected, f"{formula}: {rule}"
        assert result.status == "value", result.messages


def test_a_user_network_with_a_wider_range_than_filled(tmp_path):
    """A branch table typed into A10:H11 and passed as A10:J11 (columns I:J lie past the used
    range): the unfilled columns are blank table cells, and the series wall gives q = dT / sum R
    (Ohm's law for heat; the same value test_cells checks)."""
    path = tmp_path / "net.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Net"
    for i, row in enumerate(BRANCHES[:2]):
        assert all(v is None for v in row[8:])
        for j, value in enumerate(row[:8]):
            ws.cell(10 + i, 1 + j, value)
    for i, row in enumerate(BOUNDARIES[:2]):
        for j, value in enumerate(row):
            ws.cell(14 + i, 1 + j, value)
    ws["D20"] = "=NET_HEAT(A10:J11,A14:D16,\"wall\")"
    ws["E20"] = "=NET_CHECK(A10:J13,A14:C20)"
    wb.save(path)
    evaluation = evaluate_book(str(path))
    heat = evaluation.results[("Net", "D20")]
    assert heat.status == "value", heat.messages
    assert heat.value == pytest.approx(Q_EXACT, rel=1e-9)
    assert heat.value == call("NET_HEAT", BRANCHES, BOUNDARIES, "wall")
    assert evaluation.results[("Net", "E20")].value.startswith("OK")


def test_a_whole_row_in_an_array_formula_fills_its_range_with_zeros_past_the_data(tmp_path):
    """{=Data!1:1} over A1:J1: the blank cells of the row show 0 (Excel's rule for a blank
    reference), not #N/A (which is for cells beyond a smaller result)."""
    import xlsxwriter
    path = tmp_path / "row.xlsx"
    wb = xlsxwriter.Workbook(str(path))
    data = wb.add_worksheet("Data")
    data.write_row("A1", [1.0, 2.0, 3.0])
    wb.add_worksheet("Out").write_array_formula("A1:J1", "{=Data!1:1}")
    wb.close()
    row = evaluate_book(str(path)).values["Out"]
    assert [row[f"{c}1"] for c in "ABCDEFGHIJ"] == [1.0, 2.0, 3.0] + [0.0] * 7
