"""The hand check on the hand-built workbooks of tests/data/hand (make_hand_books.py).

Recall (seeded mistakes found, by cell and kind) and false alarms (findings on the correct
versions) over the whole set; the Done-when of issue 24: >= 12 books, >= 30 seeded mistakes,
recall >= 90 %, no finding on a correct version.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from stillair.addin.audit.hand import check_hand_book

HAND = Path(__file__).resolve().parent / "data" / "hand"
MANIFEST = json.loads((HAND / "manifest.json").read_text())


@pytest.fixture(scope="module")
def results():
    return {book["file"]: check_hand_book(str(HAND / book["file"])) for book in MANIFEST}


def _found(result, mistake) -> bool:
    return any(f.kind == mistake["kind"] and (mistake["cell"] == "*" or f.cell == mistake["cell"])
               for f in result.findings)


def test_the_set_is_as_large_as_the_issue_asks():
    assert len(MANIFEST) >= 12
    assert sum(len(b["mistakes"]) for b in MANIFEST) >= 30
    assert {b["scenario"] for b in MANIFEST if b["correct"]} == {"cabinet", "glazing", "pipe",
                                                                  "heatsink"}


def test_recall_and_false_alarms(results):
    seeded = [(b["file"], m) for b in MANIFEST for m in b["mistakes"]]
    missed = [(file, m) for file, m in seeded if not _found(results[file], m)]
    recall = 1 - len(missed) / len(seeded)
    false_alarms = [(b["file"], f.kind, f.cell, f.message) for b in MANIFEST if b["correct"]
                    for f in results[b["file"]].findings]
    print(f"\nrecall {recall:.1%} ({len(seeded) - len(missed)}/{len(seeded)}), "
          f"false alarms on correct books {len(false_alarms)}")
    for file, m in missed:
        print("missed", file, m)
    # Findings on a seeded book that no seed names: consequences of a seed (a wrong Nusselt
    # number moves the iterated wall temperature away from the one the properties were typed
    # for) or false alarms; listed for the reader, bounded here.
    extra = [(b["file"], f.kind, f.cell) for b in MANIFEST if not b["correct"]
             for f in results[b["file"]].findings
             if not any(f.kind == m["kind"] and m["cell"] in ("*", f.cell) for m in b["mistakes"])]
    for item in extra:
        print("beyond the seeds", *item)
    iterated = {b["file"] for b in MANIFEST if b["scenario"] == "cabinet"}
    assert all(kind == "property" and file in iterated for file, kind, _ in extra), extra
    assert not false_alarms, false_alarms
    assert recall >= 0.9, missed


def test_correct_books_recognise_their_hand_calculation(results):
    """Every correct book has its group, its correlation and its coefficient recognised, and
    the recognised correlation is the one typed (registry names)."""
    typed = {"cabinet": ("vplate", "churchill-chu"), "glazing": ("cavity", "elsherbiny"),
             "pipe": ("hcyl", "churchill-chu"), "heatsink": ("channel", "bar-cohen-rohsenow")}
    for book in MANIFEST:
        if not book["correct"]:
            continue
        recognised = results[book["file"]].recognised
        quantities = {r.form.quantity for r in recognised}
        assert {"Ra", "Nu", "h", "Q"} <= quantities, (book["file"], quantities)
        correlations = {(r.form.geometry, r.form.method) for r in recognised if r.form.geometry}
        assert typed[book["scenario"]] in correlations, (book["file"], correlations)


def test_a_rounded_gravity_is_stated_not_a_finding(results):
    """g typed as 9.81: the Rayleigh number is recognised with the ratio 9.81/9.80665 stated."""
    cabinet = results["cabinet-correct.xlsx"]
    ra = next(r for r in cabinet.recognised if r.form.quantity == "Ra")
    assert ra.ratio == pytest.approx(9.81 / 9.80665, rel=1e-9)
    assert any("9.81" in s for s in ra.statements)
    assert not ra.findings


def test_the_iterated_book_is_converged_and_the_edited_one_is_not(results):
    assert results["cabinet-correct.xlsx"].iteration["converged"]
    edited = next(b["file"] for b in MANIFEST if any(m["kind"] == "not-converged"
                                                     for m in b["mistakes"]))
    iteration = results[edited].iteration
    assert not iteration["converged"] and iteration["reached"]
    # the converged state balances the heat: convection + radiation = the heat to lose
    assert "'Side wall'!B27" in iteration["cells"]
