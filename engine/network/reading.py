"""Reading one cell of a network table: blanks, numbers, names, and spreadsheet error values."""

from __future__ import annotations

import math
import re

import numpy as np

from ..validity import InputError
from .errors import FUNCTION, NetworkError

__all__ = ["blank", "number", "name", "gas_key", "error_text", "option_number"]

# Error values a spreadsheet shows in a cell (Excel's, and LibreOffice's Err:nnn).  A range
# handed to a function may carry them as text; none is ever a name or a number.
_ERROR_TEXT = re.compile(r"^(#(NULL!|DIV/0!|VALUE!|REF!|NAME\?|NUM!|N/A|GETTING_DATA|SPILL!|CALC!|FIELD!"
                         r"|BLOCKED!|CONNECT!|BUSY!|UNKNOWN!|EXTERNAL!|PYTHON!)|Err:\d{3})$", re.IGNORECASE)


def error_text(value) -> str | None:
    """The error value's text ("#N/A") when ``value`` is a spreadsheet error, else None.

    Error objects of formula evaluators (the `formulas` package's XlError) count as well."""
    if isinstance(value, (float, int)) or value is None:
        return None
    if type(value).__name__ == "XlError":
        return str(value)
    if isinstance(value, str) and value.lstrip()[:1] in ("#", "E", "e") and _ERROR_TEXT.match(value.strip()):
        return value.strip().upper() if value.strip().startswith("#") else value.strip()
    return None


def blank(value) -> bool:
    if value is None:
        return True
    if isinstance(value, str):
        return value.strip() == ""
    return False  # a NaN is a (bad) number, reported as such


def name(value, where: str, column: str) -> str:
    """A node or branch name: text, or a whole number written as such."""
    if blank(value):
        raise NetworkError(FUNCTION, f"{where}, column {column}", None, "a name")
    if isinstance(value, str):
        return value.strip()
    if isinstance(value, (bool, np.bool_)):
        raise NetworkError(FUNCTION, f"{where}, column {column}", value, "a name")
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)) and math.isfinite(value):
        return str(int(value)) if float(value).is_integer() else repr(float(value))
    raise NetworkError(FUNCTION, f"{where}, column {column}", value, "a name")


def number(value, where: str, column: str, unit: str = "") -> float:
    """A finite float from a cell, or a NetworkError naming the cell."""
    if type(value) in _PLAIN_NUMBERS and math.isfinite(value):
        return float(value)   # the usual cell: no message texts to build (bool is not int here)
    allowed = "a number" + (f" in {unit}" if unit else "")
    here = f"{where}, column {column}"
    if blank(value):
        raise NetworkError(FUNCTION, here, None, allowed)
    if isinstance(value, (bool, np.bool_)):
        raise NetworkError(FUNCTION, here, value, allowed + ", not a logical value")
    if isinstance(value, str):
        raise NetworkError(FUNCTION, here, value, allowed + ", not text")
    try:
        result = float(value)
    except (TypeError, ValueError):
        raise NetworkError(FUNCTION, here, value, allowed) from None
    if not math.isfinite(result):
        raise NetworkError(FUNCTION, here, result, "a finite number")
    return result


_PLAIN_NUMBERS = (float, int)


def gas_key(gas: str) -> str:
    """Gas text normalised for the cache key (case and spaces do not change the gas)."""
    return ", ".join(part.strip() for part in gas.strip().lower().split(","))


def option_number(function: str, argument: str, value, unit: str, positive: bool = False) -> float:
    """A plain-number option of a network function (pressure, a temperature), or an InputError."""
    if value is None or isinstance(value, (bool, np.bool_, str)):
        raise InputError(function, argument, value, f"a number in {unit}")
    try:
        result = float(value)
    except (TypeError, ValueError):
        raise InputError(function, argument, value, f"a number in {unit}") from None
    if not math.isfinite(result) or (positive and not result > 0):
        raise InputError(function, argument, result, f"> 0 {unit}" if positive else "a finite number")
    return result
