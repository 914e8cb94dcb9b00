"""The branch table read column by column gives what the row-by-row reader gives.

stillair.network.tables reads a branch table column by column (names and kinds as lists, each
kind's parameter columns in one array check) and hands any table with a cell that is not plainly
good to the row-by-row reader, which words the first problem.  So the two readers must agree:
on a table of every kind, and on every single-cell change of it (blanks, text, booleans, numpy
numbers, NaN, values out of range, duplicates, error values), the column reader either gives the
row reader's branches exactly or steps aside -- never a different result, never a different
message.  Exact identities of the code; the tables are invented.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from stillair.network import NetworkError, solve_network
from stillair.network.reading import blank, error_text
from stillair.network.tables import (BRANCH_COLUMNS, _branches_by_column, _branches_by_row, _is_header, _rows,
                                     parse_branches)

# one row of every kind, with optional columns both filled and blank
TABLE = [
    ["wall", "in", "out", "conduction", 0.002, 16.0, 1.2],
    ["joint", "in", "out", "resistance", 3.5],
    ["skin", "out", "amb", "film", 8.0, 1.2],
    ["face", "out", "amb", "vplate", 1.2, 1.0, None, None, None, "churchill-chu"],
    ["face-wind", "out", "amb", "vplate", 1.2, 1.0, 2.0, 0.8],
    ["roof", "out", "amb", "hplate", 0.3, 0.6, "up"],
    ["slope", "out", "amb", "tplate", 0.5, 0.5, 30, "down"],
    ["pipe", "out", "amb", "hcyl", 0.05, 0.3, 1.5],
    ["ball", "out", "amb", "sphere", 0.1, 0.0314],
    ["post", "out", "amb", "vcyl", 1.0, 0.1, 0.31],
    ["layer", "in", "mid", "cavity", 0.016, 1.2, 1.2, 90, "argon"],
    ["layer-2", "mid", "out", "cavity", 0.012, 1.2, 1.2, None, None, "elsherbiny"],
    ["fins", "out", "amb", "channel", 0.008, 0.12, 0.05, "isothermal"],
    ["glow", "in", "out", "radiation", 0.9, 0.85, 1.2],
    ["glow-2", "out", "sky", "radiation", 0.9, None, 1.2],
    ["vent", "in", "amb", "vent", 0.004, 0.004, 0.6, 0.61, 0.5],
    ["fan", "in", "amb", "airflow", 0.01],
    ["fan-2", "in", "amb", "airflow", "0:80, 0.02:0", 0.004, 0.004],
]

REPLACEMENTS = [None, "", "  ", "text", "#N/A", "Err:502", True, np.float64(0.5), np.int64(2), math.nan,
                math.inf, -1.0, 0.0, 1e-9, 2e3, 1.5, 200.0, "up", "down", "flux", "auto", "elsherbiny",
                "wall", "in", "conduction", "RADIATION ", 7, " spaced "]


def reference_rows(table, width=len(BRANCH_COLUMNS)):
    """_rows' rule written plainly, cell by cell: blank rows skipped, no filled cell past the
    last column, no error value anywhere, a header row skipped (the error raised as ValueError)."""
    result = []
    for number, row in enumerate(table, start=1):
        row = list(row)
        if all(blank(v) for v in row):
            continue
        if any(not blank(v) for v in row[width:]):
            raise ValueError(f"row {number} too long")
        row = (row + [None] * width)[:width]
        if any(error_text(v) is not None for v in row):
            raise ValueError(f"row {number} has an error value")
        if not result and _is_header(row, BRANCH_COLUMNS):
            continue
        result.append((number, row))
    return result


def readers_agree(table):
    try:
        expected_rows = reference_rows(table)
    except ValueError:
        with pytest.raises(NetworkError):
            _rows(table, "branches", BRANCH_COLUMNS)
        return
    rows = _rows(table, "branches", BRANCH_COLUMNS)
    assert rows == expected_rows
    try:
        expected = _branches_by_row(rows)
    except NetworkError as error:
        assert _branches_by_column(rows) is None, str(error)
        return
    by_column = _branches_by_column(rows)
    assert by_column is None or by_column == expected


def test_the_column_reader_reads_every_kind_as_the_row_reader_does():
    rows = _rows(TABLE, "branches", BRANCH_COLUMNS)
    assert _branches_by_column(rows) == _branches_by_row(rows)   # and does not step aside


@pytest.mark.parametrize("table", [
    [tuple(row) for row in TABLE], np.array([row + [None] * (10 - len(row)) for row in TABLE], dtype=object),
    [["name", "from", "to", "kind"], *TABLE], [*TABLE, [None] * 10, ["", " "]], [row + [None, None] for row in TABLE],
])
def test_tables_of_tuples_arrays_headers_and_blank_rows_read_alike(table):
    readers_agree(table)


@pytest.mark.parametrize("row", range(len(TABLE)))
def test_any_one_changed_cell_gives_the_same_branches_or_the_row_readers_error(row):
    for column in range(len(BRANCH_COLUMNS)):
        for value in REPLACEMENTS:
            table = [list(r) + [None] * (len(BRANCH_COLUMNS) - len(r)) for r in TABLE]
            table[row][column] = value
            readers_agree(table)


@pytest.mark.parametrize("row", [
    [None, "", "  "], ["x", "a", "b", "resistance", 1.0, None, None, None, None, None, " "],
    ["x", "a", "b", "resistance", 1.0, None, None, None, None, None, 3.0], ["name", "from", "to"],
    ["#DIV/0!"], ["  err:502 "], ["e", "E", "x", "resistance", 1.0], [np.float64(1.0), "a"], [False],
])
def test_rows_are_read_as_the_plain_rule_says(row):
    for table in ([row, TABLE[0]], [TABLE[0], row], [row]):
        readers_agree(table)


def test_a_duplicate_name_and_a_self_loop_are_left_to_the_row_reader():
    for change in ((1, 0, "wall"), (0, 2, "in")):
        table = [list(r) for r in TABLE]
        table[change[0]][change[1]] = change[2]
        with pytest.raises(NetworkError):
            parse_branches(table)
        readers_agree(table)


def test_the_solved_network_is_the_same_whichever_reader_read_it(monkeypatch):
    branches = [["wall", "in", "out", "conduction", 0.002, 16.0, 1.2],
                ["face", "out", "amb", "vplate", 1.2, 1.2],
                ["glow", "out", "amb", "radiation", 0.9, None, 1.2]]
    boundaries = [["in", "T", 40.0], ["amb", "T", 20.0]]
    fast = solve_network(branches, boundaries, use_cache=False)
    monkeypatch.setattr("stillair.network.tables._branches_by_column", lambda rows: None)
    slow = solve_network(branches, boundaries, use_cache=False)
    assert fast.heat == slow.heat and fast.temperatures == slow.temperatures
