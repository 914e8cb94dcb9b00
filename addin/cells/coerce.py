"""Argument coercion (values as Excel or `formulas` deliver them) and result shaping.

Inputs arrive as floats, ints, bools, None (blank), strings, nested lists (xlwings ranges) or
object ndarrays with ``schedula.EMPTY`` and 1x1 arrays for single cells (`formulas`).  Outputs are
what a cell can hold: float, str or a 2-D list padded with "".
"""

from __future__ import annotations

import math
import numbers

import numpy as np

__all__ = ["CellInputError", "is_blank", "scalar", "to_number", "to_text", "to_table",
           "to_cell_value", "to_cell_table", "describe"]


class CellInputError(ValueError):
    """A cell argument that cannot be passed to the engine (text for a number, a range...)."""

    def __init__(self, argument: str, value, allowed: str):
        self.argument, self.value, self.allowed = argument, value, allowed
        super().__init__(f"{argument} must be {allowed}, got {describe(value)}")


def _is_empty_marker(value) -> bool:
    # schedula.EMPTY is a sentinel token; compare by identity without importing schedula here
    # (xlwings users do not need it).
    return type(value).__name__ == "Token" and str(value) == "empty"


def is_blank(value) -> bool:
    return value is None or (isinstance(value, str) and value.strip() == "") or _is_empty_marker(value)


def describe(value) -> str:
    """How a received value is shown in a message."""
    if is_blank(value):
        return "an empty cell"
    if isinstance(value, np.ndarray) or isinstance(value, (list, tuple)):
        return f"a range of {np.size(np.asarray(value, dtype=object))} cells"
    if isinstance(value, str):
        return repr(str(value))
    from stillair.validity import format_value  # engine imported on first message only
    return format_value(value)


def scalar(argument: str, value):
    """Unwrap a single cell (1x1 list or array); refuse a larger range."""
    if isinstance(value, (list, tuple, np.ndarray)):
        array = np.asarray(value, dtype=object)
        if array.size != 1:
            raise CellInputError(argument, value, "a single cell")
        value = array.reshape(-1)[0]
    return None if is_blank(value) else value


def to_number(argument: str, value, optional: bool, default):
    value = scalar(argument, value)
    if value is None:
        if optional:
            return default
        raise CellInputError(argument, value, "a number")
    if isinstance(value, (bool, np.bool_)):
        raise CellInputError(argument, value, "a number, not a logical value")
    if isinstance(value, str):  # includes Excel error values such as "#N/A"
        raise CellInputError(argument, value, "a number, not text")
    if isinstance(value, numbers.Real):
        return float(value)
    raise CellInputError(argument, value, "a number")


def _name_text(value):
    """Names (nodes, branches) may be typed as numbers: 1 and 1.0 both mean "1"."""
    if isinstance(value, (bool, np.bool_)):
        return None
    if isinstance(value, numbers.Real):
        value = float(value)
        return str(int(value)) if value.is_integer() else repr(value)
    if isinstance(value, str):
        return value.strip()
    return None


def to_text(argument: str, value, optional: bool, default, allow_numbers: bool = False):
    value = scalar(argument, value)
    if value is None:
        if optional:
            return default
        raise CellInputError(argument, value, "text")
    if isinstance(value, str):
        return value.strip()
    if allow_numbers:
        text = _name_text(value)
        if text is not None:
            return text
    raise CellInputError(argument, value, "text")


def _cell(value):
    """One table cell as the engine takes it: None for blank, float or stripped text."""
    # Plain floats and text first: the ABC checks below (numbers.Real) cost several times the
    # rest, and a network's tables are read by every cell that uses its solution.
    kind = type(value)
    if kind is float:
        return value
    if kind is str:
        stripped = value.strip()
        return stripped if stripped else None
    if is_blank(value):
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, numbers.Real):
        return float(value)
    if isinstance(value, str):
        return value.strip()
    return value


def to_table(argument: str, value, name_columns: tuple[int, ...] = ()):
    """A range as a list of row lists, blanks as None, trailing blank rows dropped.

    Columns in ``name_columns`` hold names; numbers there become text ("1" for 1.0) so a node
    typed as 1 in one table and "1" in another is the same node.
    """
    if not isinstance(value, (list, tuple, np.ndarray)) and is_blank(value):
        raise CellInputError(argument, value, "a range with at least one row")
    array = np.asarray(value, dtype=object)
    if array.ndim == 0:
        array = array.reshape(1, 1)
    elif array.ndim == 1:
        array = array.reshape(1, -1)  # xlwings gives a single row as a flat list without ndim=2
    rows = [[_cell(v) for v in row] for row in array.tolist()]
    while rows and all(v is None for v in rows[-1]):
        rows.pop()
    if not rows:
        raise CellInputError(argument, value, "a range with at least one row")
    for row in rows:
        for column in name_columns:
            if column < len(row) and row[column] is not None:
                text = _name_text(row[column])
                row[column] = text if text is not None else row[column]
    return rows


def to_cell_value(value):
    """A scalar result as a cell holds it: float (finite), str or bool."""
    if isinstance(value, np.ndarray):
        if value.size != 1:
            raise TypeError(f"expected one value, got an array of {value.size}")
        value = value.reshape(-1)[0]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, numbers.Real):
        value = float(value)
        if not math.isfinite(value):
            raise ArithmeticError(f"result is not a finite number ({value})")
        return value
    if isinstance(value, str):
        return value
    raise TypeError(f"cannot put a {type(value).__name__} into a cell")


def to_cell_table(rows) -> list[list]:
    """A 2-D list padded with "" to a rectangle; None and non-finite numbers become ""."""
    rows = [list(r) if isinstance(r, (list, tuple, np.ndarray)) else [r] for r in rows]
    width = max((len(r) for r in rows), default=1) or 1
    out = []
    for row in rows:
        cells = []
        for v in row:
            kind = type(v)
            if kind is float:   # the common cases first, as in _cell
                cells.append(v if math.isfinite(v) else "")
                continue
            if kind is str:
                cells.append(v)
                continue
            if v is None or (isinstance(v, numbers.Real) and not isinstance(v, (bool, np.bool_))
                             and not math.isfinite(float(v))):
                cells.append("")
            else:
                cells.append(to_cell_value(v))
        out.append(cells + [""] * (width - len(cells)))
    return out or [[""]]
