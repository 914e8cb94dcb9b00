"""Iterative calculation as the spreadsheet does it (Excel's documented rule: at most
"Maximum Iterations" sweeps, stopping when no value changes by more than "Maximum Change",
saved as calcPr iterate/iterateCount/iterateDelta in ECMA-376 Part 1, 18.2.2), circular
references without it, and the audit of iterative workbooks."""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from iterative_books import PLATE, plate_loop, simple_loop
from stillair.addin.audit.check import audit_book
from stillair.addin.cells.callpath import call
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.workbook.reader import read_book

# LibreOffice 7.4's iteration of this loop with count 200 and delta 1e-9, measured by the
# project (/work/shared/notes/libreoffice.md, "A workbook saved with iterative calculation").
LIBREOFFICE_A1 = 1.33333333302289


def test_the_settings_are_read_from_calcpr(tmp_path):
    book = read_book(str(simple_loop(tmp_path / "on.xlsx", 37, 1e-4)))
    assert (book.iteration.count, book.iteration.delta) == (37, 1e-4)
    assert read_book(str(simple_loop(tmp_path / "off.xlsx", None, 0))).iteration is None


def test_a_converging_loop_agrees_with_the_fixed_point_and_libreoffice(tmp_path):
    delta = 1e-9
    evaluation = evaluate_book(str(simple_loop(tmp_path / "loop.xlsx", 200, delta)))
    a1 = evaluation.results[("S", "A1")]
    assert a1.status == "value"
    assert abs(a1.value - 4 / 3) <= 2 * delta           # the fixed point of A1 = 1 + A1/4
    assert abs(a1.value - LIBREOFFICE_A1) <= delta
    assert evaluation.results[("S", "B1")].value == pytest.approx(10 * a1.value, rel=1e-15)
    (loop,) = evaluation.loops
    assert loop.converged and loop.cells == ("S!A1", "S!A2") and loop.last_change <= delta


def test_a_loop_that_does_not_settle_within_the_count_says_so_with_the_last_change(tmp_path):
    # From A1 = A2 = 0, sweep k gives A1 = 1 + A1(k-1)/4: after 5 sweeps 1.33203125, the
    # last sweep having changed A1 by 4**-4 = 0.00390625 (worked by hand).
    evaluation = evaluate_book(str(simple_loop(tmp_path / "loop.xlsx", 5, 1e-9)))
    a1 = evaluation.results[("S", "A1")]
    assert a1.value == 1.33203125
    assert a1.status == "error"
    assert "did not converge" in a1.messages[0] and "0.00391" in a1.messages[0]
    assert "after 5 sweeps" in a1.messages[0] and "S!A1, S!A2" in a1.messages[0]
    (loop,) = evaluation.loops
    assert not loop.converged and loop.last_change == 4.0 ** -4
    assert evaluation.results[("S", "B1")].status == "error"


def test_iteration_starts_from_the_stored_values(tmp_path):
    """Stored values already at the fixed point: one sweep, nothing moves beyond the delta."""
    stored = (4 / 3, 2 / 3)
    evaluation = evaluate_book(str(simple_loop(tmp_path / "loop.xlsx", 100, 1e-12, stored)))
    (loop,) = evaluation.loops
    assert loop.sweeps == 1 and loop.stored_converged


def test_without_iteration_a_cycle_is_a_circular_reference_naming_its_cells(tmp_path):
    evaluation = evaluate_book(str(simple_loop(tmp_path / "loop.xlsx", None, 0)))
    for ref in ("A1", "A2"):
        result = evaluation.results[("S", ref)]
        assert result.status == "cannot-evaluate"
        assert "circular reference" in result.messages[0]
        assert "S!A1, S!A2" in result.messages[0]
        assert "iterative calculation" in result.messages[0]
    assert evaluation.results[("S", "B1")].status == "cannot-evaluate"
    assert evaluation.loops == []


def _plate_balance(tw: float) -> float:
    """Q - (h_conv + h_rad) A (Tw - Ta): zero at the plate's wall temperature (energy balance)."""
    area = PLATE["height"] * PLATE["width"]
    h = call("H_VPLATE", tw, PLATE["ta"], PLATE["height"]) + \
        call("H_RAD", tw, PLATE["ta"], PLATE["eps"], 1.0)
    return PLATE["Q"] - h * area * (tw - PLATE["ta"])


def test_the_trades_wall_temperature_loop_converges_to_the_energy_balance(tmp_path):
    delta = 1e-6
    evaluation = evaluate_book(str(plate_loop(tmp_path / "plate.xlsx", 100, delta)))
    tw = evaluation.results[("Plate", "B7")].value
    exact = brentq(_plate_balance, 26.0, 300.0, xtol=1e-12)
    assert abs(tw - exact) <= 10 * delta
    assert evaluation.results[("Plate", "B10")].value == pytest.approx(PLATE["Q"], rel=1e-5)
    (loop,) = evaluation.loops
    assert loop.converged and loop.cells == ("Plate!B7", "Plate!B8", "Plate!B9")


def test_the_audit_checks_an_iterative_workbook_and_says_when_it_was_not_converged(tmp_path):
    settled = evaluate_book(str(plate_loop(tmp_path / "first.xlsx", 100, 1e-9)))
    values = tuple(settled.results[("Plate", r)].value for r in ("B7", "B8", "B9", "B10"))
    clean = audit_book(str(plate_loop(tmp_path / "clean.xlsx", 100, 1e-9, stored=values)))
    assert clean.findings == [], clean.findings
    assert "Plate!B7" in clean.ok
    guessed = audit_book(str(plate_loop(tmp_path / "guessed.xlsx", 100, 1e-9)))
    stale = [f for f in guessed.findings if f.kind == "stale" and "not converged" in f.message]
    assert len(stale) == 1 and stale[0].cell == "Plate!B7"
    assert "Plate!B7, Plate!B8, Plate!B9" in stale[0].message
    assert math.isfinite(settled.results[("Plate", "B7")].value)
