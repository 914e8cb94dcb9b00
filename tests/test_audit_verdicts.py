"""The audit's verdicts: every 1 % change of a printed number is found, each value judged on
its own scale; findings come cause first."""

from __future__ import annotations

import pytest
import xlsxwriter

from stillair.addin.audit.check import audit_book
from stillair.addin.cli import main
from stillair.addin.workbook.cachewriter import write_cached_values
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.workbook.reader import read_book
from stillair.addin.templates.spec import TEMPLATE_DIR

# A wall in air: a 1e-5 K/W contact beside convection with Ra near 1e8 in one NET_SOLVE table,
# at a stated pressure of 101325 Pa (the largest number the formula reads: a tolerance scaled by
# it, 1e-12 x 101325 = 1e-7, would swallow a 1 % change of the 1e-5).
BRANCHES = [["contact", "hot", "mid", "resistance", 1e-5],
            ["plate", "mid", "air", "vplate", 0.5, 0.25]]
BOUNDARIES = [["hot", "T", 80.0], ["air", "T", 20.0]]


def network_book(path):
    wb = xlsxwriter.Workbook(str(path))
    ws = wb.add_worksheet("Net")
    for r, row in enumerate(BRANCHES):
        ws.write_row(r, 0, row)
    for r, row in enumerate(BOUNDARIES):
        ws.write_row(5 + r, 0, row)
    ws.write("A9", 101325.0)
    ws.write_array_formula("A10:J14", '{=NET_SOLVE(A1:J3,A6:C8,"air",A9)}')
    wb.close()
    return path


@pytest.fixture(scope="module")
def calculated(tmp_path_factory):
    """The network book with the values calc computes stored, as a spreadsheet saves them."""
    folder = tmp_path_factory.mktemp("verdicts")
    source = network_book(folder / "source.xlsx")
    book = read_book(str(source))
    evaluation = evaluate_book(book)
    saved = folder / "saved.xlsx"
    write_cached_values(book, str(saved), evaluation.writable_values())
    return folder, book, evaluation, saved


def _numbers(evaluation):
    return [(sheet, ref, value) for sheet, cells in evaluation.values.items()
            for ref, value in cells.items()
            if isinstance(value, float) and not isinstance(value, bool) and value != 0.0]


def _edited(folder, book, evaluation, sheet, ref, factor):
    values = {s: dict(cells) for s, cells in evaluation.writable_values().items()}
    values[sheet][ref] = values[sheet][ref] * factor
    path = folder / f"edited-{sheet}-{ref}.xlsx"
    path.unlink(missing_ok=True)
    write_cached_values(book, str(path), values)
    return path


def test_the_calculated_network_book_audits_clean(calculated):
    folder, book, evaluation, saved = calculated
    result = audit_book(str(saved))
    assert result.findings == []
    resistance = [ref for ref, v in evaluation.values["Net"].items() if v == 1e-5]
    assert resistance, "the table prints the contact's 1e-5 K/W"


def test_a_one_percent_change_of_a_small_value_in_a_table_is_found(calculated):
    folder, book, evaluation, _ = calculated
    ref = next(ref for ref, v in evaluation.values["Net"].items() if v == 1e-5)
    result = audit_book(str(_edited(folder, book, evaluation, "Net", ref, 1.01)))
    assert [f.cell for f in result.findings if f.kind == "mismatch"] == [f"Net!{ref}"]


@pytest.mark.slow  # one audit per printed number (about 40)
def test_every_one_percent_change_of_a_printed_number_is_found(calculated):
    folder, book, evaluation, _ = calculated
    missed = []
    for sheet, ref, value in _numbers(evaluation):
        result = audit_book(str(_edited(folder, book, evaluation, sheet, ref, 1.01)))
        if f"{sheet}!{ref}" not in [f.cell for f in result.findings]:
            missed.append((ref, value))
    assert missed == []


def test_findings_come_cause_first(tmp_path, capsys):
    """A typed-over result (the air layer's h_conv) comes first, named as such; every finding
    downstream says it follows from it."""
    edited = tmp_path / "edited.xlsx"
    assert main(["calc", str(TEMPLATE_DIR / "air-layer.xlsx"), "--set", "h_conv=2.5",
                 "--replace-formula", "--out", str(edited)]) == 0
    capsys.readouterr()
    result = audit_book(str(edited))
    first, rest = result.findings[0], result.findings[1:]
    assert first.cell == "Calculation!C15" and "typed over" in first.message
    assert rest and all("follows from Calculation!C15" in f.message for f in rest)


@pytest.mark.slow  # one audit per printed number of the template (about 120)
def test_every_one_percent_change_in_a_template_is_found(tmp_path):
    """The cabinet template: each number a formula prints, changed by 1 % in the saved file,
    is a finding at that cell."""
    book = read_book(str(TEMPLATE_DIR / "sealed-cabinet.xlsx"))
    evaluation = evaluate_book(book)
    missed = []
    numbers = _numbers(evaluation)
    for sheet, ref, value in numbers:
        result = audit_book(str(_edited(tmp_path, book, evaluation, sheet, ref, 1.01)))
        if f"{sheet}!{ref}" not in [f.cell for f in result.findings]:
            missed.append((sheet, ref, value))
    assert len(numbers) > 80
    assert missed == []
