"""Headless results do not move when the evaluator is made faster: every template's `calc
--json` values against a snapshot taken before (tests/data/headless_snapshot.json, whose
"about" says from which commit), numbers to 1e-12 relative, text exactly."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from stillair.addin.cli import main

ROOT = Path(__file__).resolve().parents[1]
SNAPSHOT = json.loads((ROOT / "tests" / "data" / "headless_snapshot.json").read_text(encoding="utf-8"))

pytestmark = pytest.mark.slow  # calculates all eight templates (several seconds)


@pytest.mark.parametrize("template", sorted(SNAPSHOT["values"]))
def test_calc_values_equal_the_snapshot(template, capsys):
    assert main(["calc", str(ROOT / "templates" / template), "--json"]) == 0
    values = json.loads(capsys.readouterr().out)["values"]
    before = SNAPSHOT["values"][template]
    # a template may gain cells after the snapshot (the INPUT MISSING count); none may go
    assert set(before) <= set(values)
    for cell, old in before.items():
        new = values[cell]
        if isinstance(old, float) and isinstance(new, float):
            assert new == pytest.approx(old, rel=1e-12, abs=1e-12), cell
        else:
            assert new == old, cell
