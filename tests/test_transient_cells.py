"""NET_TRANSIENT and NET_PEAK: the network through time as cell functions.

The cell values equal stillair.solve_transient's (the engine is checked in tests/test_transient.py);
arguments arrive as a spreadsheet gives them (ranges as lists of rows, `formulas`' 1x1 arrays and
blanks); bad input is one message naming the cell function, the table, row and value.
"""

from __future__ import annotations

import numpy as np
import pytest
import schedula as sh

import stillair
from stillair.addin.cells.callpath import call

BRANCHES = [["film", "box", "air", "film", 8.0, 1.5, None, None, None, None],
            ["skin", "box", "shell", "resistance", 0.02, None, None, None, None, None],
            ["out", "shell", "air", "film", 10.0, 1.5, None, None, None, None]]
BOUNDARIES = [["air", "T", "outdoor"], ["box", "Q", 40.0]]
CAPACITIES = [["box", 60000.0], ["shell", 8000.0]]
TIMES = [[0.0], [3600.0], [7200.0], [10800.0]]
SERIES = [["outdoor", 0.0, 15.0], ["outdoor", 7200.0, 25.0]]


def engine(**options):
    return stillair.solve_transient(BRANCHES, BOUNDARIES, {"box": 60000.0, "shell": 8000.0},
                                    [0.0, 3600.0, 7200.0, 10800.0], series={"outdoor": [(0.0, 15.0), (7200.0, 25.0)]},
                                    **options)


def test_the_table_is_a_header_and_one_row_per_output_time():
    table = call("NET_TRANSIENT", BRANCHES, BOUNDARIES, CAPACITIES, TIMES, SERIES)
    result = engine()
    assert table[0] == ["time s", "box", "air", "shell"]
    assert [row[0] for row in table[1:]] == [0.0, 3600.0, 7200.0, 10800.0]
    for column, node in enumerate(table[0][1:], start=1):
        assert [row[column] for row in table[1:]] == result.temperatures[node].tolist()


def test_times_as_a_row_or_a_block_read_row_by_row_give_the_column_result():
    column = call("NET_TRANSIENT", BRANCHES, BOUNDARIES, CAPACITIES, TIMES, SERIES)
    assert call("NET_TRANSIENT", BRANCHES, BOUNDARIES, CAPACITIES, [[0.0, 3600.0, 7200.0, 10800.0]], SERIES) == column
    assert call("NET_TRANSIENT", BRANCHES, BOUNDARIES, CAPACITIES, [[0.0, 3600.0, 7200.0], [10800.0, None, None]],
                SERIES) == column


@pytest.mark.parametrize("which, pick", [("max", "peak"), (None, "peak"), ("min", "minimum"), (" MIN ", "minimum")])
def test_the_peak_and_minimum_equal_the_engine_result(which, pick):
    value = call("NET_PEAK", BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", which, SERIES)
    assert value == [list(getattr(engine(), pick)["box"])]


@pytest.mark.parametrize("initial, expected", [
    (30.0, {"box": 30.0, "shell": 30.0}), ([["box", 50.0]], {"box": 50.0}), ("periodic", "periodic")])
def test_the_start_is_one_number_a_table_or_periodic(initial, expected):
    value = call("NET_PEAK", BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", "max", SERIES, initial)
    assert value == [list(engine(initial=expected).peak["box"])]


def test_formulas_style_arguments_give_the_same_values():
    """`formulas` passes ranges as object arrays, single cells as 1x1 arrays, blanks as EMPTY."""
    def wrapped(rows):
        return np.array([[sh.EMPTY if v is None else v for v in row] for row in rows], dtype=object)
    value = call("NET_PEAK", wrapped(BRANCHES), wrapped(BOUNDARIES), wrapped(CAPACITIES), wrapped(TIMES),
                 np.array([["box"]], dtype=object), sh.EMPTY, wrapped(SERIES), sh.EMPTY, sh.EMPTY, sh.EMPTY)
    assert value == call("NET_PEAK", BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", None, SERIES)


@pytest.mark.parametrize("arguments, message", [
    ((BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "bx", None, SERIES),
     "NET_PEAK: node must be one of 'box', 'air', 'shell', got 'bx'"),
    ((BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", "highest", SERIES),
     'NET_PEAK: which must be "max" (blank) or "min", got \'highest\''),
    ((BRANCHES, BOUNDARIES, [["Box", 100.0]], TIMES, "box", None, SERIES),
     "NET_PEAK: capacity row 1 (Box), column node must be a node that some branch connects (did you mean "
     "'box'?), got 'Box'"),
    ((BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", None, None),
     "NET_PEAK: boundary row 1 (air), column value must be a number or the name of a series in the series "
     "table (no series table was given), got 'outdoor'"),
    ((BRANCHES, BOUNDARIES, CAPACITIES, [[0.0], [0.0]], "box", None, SERIES),
     "NET_PEAK: times, entry 2 must be later than the entry before it (0 s): times increase, got 0"),
    ((BRANCHES, BOUNDARIES, CAPACITIES, TIMES, "box", None, SERIES, [["box", 20.0, 1.0]]),
     'NET_PEAK: initial must be one number, "periodic" or rows of node | °C, got a range of 3 cells'),
    ((BRANCHES, BOUNDARIES, None, TIMES, "box"),
     "NET_PEAK: capacities must be a range with at least one row, got an empty cell"),
])
def test_bad_input_is_one_message_naming_the_function_the_argument_and_the_value(arguments, message):
    assert call("NET_PEAK", *arguments) == message


def test_a_correlation_out_of_range_is_noted_for_the_cell():
    from stillair.addin.cells.callpath import NoteRecorder

    branches = [["conv", "plate", "air", "vplate", 12.0, 24.0, None, None, None, None]]
    with NoteRecorder() as recorder:
        table = call("NET_TRANSIENT", branches, [["air", "T", 20.0]], [["plate", 2e6]], [[0.0], [60.0]], None, 30.0)
    assert table[1][1:] == [30.0, 20.0]
    assert len(recorder.notes) == 1 and recorder.notes[0][1].startswith("NET_TRANSIENT: branch conv: ")
