"""The compiled formulas run straight through (formulas_bridge.straight_line) give the
dispatcher's results, and the shapes the templates use most take that route."""

from __future__ import annotations

import numpy as np
import pytest

from stillair.addin.workbook import formulas_bridge as bridge


def cells(*rows):
    array = np.empty((len(rows), len(rows[0])), dtype=object)
    for i, row in enumerate(rows):
        for j, value in enumerate(row):
            array[i, j] = value
    return array


@pytest.mark.parametrize("formula, args, expected", [
    # INDEX carries a compile-time flag as an extra input (formulas' "extra_inputs"): the
    # templates read every network result through INDEX(NET_SOLVE(...), r, c).
    ("INDEX(A1:B2,2,1)", (cells([1.0, 2.0], [3.0, 4.0]),), 3.0),   # Excel: row 2, column 1
    ("INDEX(A1:B2,1,2)*2+B5", (cells([1.0, 2.0], [3.0, 4.0]), cells([0.5])), 4.5),
    ("SUM(A1:B2)/4", (cells([1.0, 2.0], [3.0, 4.0]),), 2.5),
])
def test_straight_line_runs_and_agrees_with_the_dispatcher(formula, args, expected):
    bridge.load()
    function, _ = bridge.compile_formula(formula)
    assert bridge.straight_line(function) is not None, "the formula falls back to the dispatcher"
    runner = bridge.fast_runner(function)
    first, second = runner(*args), runner(*args)   # the first call checks against the dispatcher
    assert runner.fast is not function             # the check passed: the straight route stays
    assert bridge.plain(np.asarray(first)[0, 0] if np.ndim(first) else first) == expected
    assert bridge.plain(np.asarray(second)[0, 0] if np.ndim(second) else second) == expected
